"""The JSON form of a site: what a site file holds, before it becomes text.

The site file (:mod:`model.storage.codec`) and the edits of the recovery
journal (:mod:`model.site.ops`) both write a site in this form.
"""

from __future__ import annotations

from typing import Any

from model.site.models import SiteFile
from model.site.terms import FORMAT_NAME, FORMAT_VERSION


def site_to_dict(site: SiteFile) -> dict[str, Any]:
    """The JSON-ready form of a site, defaults left out."""
    d = site.model_dump(mode="json", exclude_defaults=True)
    d["format"] = FORMAT_NAME
    d["version"] = FORMAT_VERSION
    ordered: dict[str, Any] = {
        k: d[k] for k in ("format", "version", "site", "nodes", "visits") if k in d
    }
    return ordered
