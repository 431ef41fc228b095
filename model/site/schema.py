"""The published JSON Schema of the site file (committed as schema/site.schema.json)."""

from __future__ import annotations

import json
from typing import Any

from model.site.models import SiteFile
from model.site.terms import FORMAT_VERSION


def site_schema() -> dict[str, Any]:
    """The JSON Schema of the site file, built from the models."""
    schema = SiteFile.model_json_schema()
    schema["$schema"] = "https://json-schema.org/draft/2020-12/schema"
    schema["$id"] = f"tripwise.site/v{FORMAT_VERSION}"
    return schema


def schema_text() -> str:
    """The schema as ``tripwise schema`` prints it and the committed file holds it."""
    return json.dumps(site_schema(), ensure_ascii=False, indent=2) + "\n"
