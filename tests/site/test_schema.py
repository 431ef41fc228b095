"""The committed JSON Schema matches the models."""

from __future__ import annotations

import json
from pathlib import Path

from model.site.schema import schema_text, site_schema

ROOT = Path(__file__).resolve().parents[2]


def test_committed_schema_matches_models() -> None:
    committed = (ROOT / "schema" / "site.schema.json").read_text(encoding="utf-8")
    assert committed == schema_text(), (
        "regenerate with: python -m tui schema > schema/site.schema.json"
    )


def test_schema_names_every_node_kind() -> None:
    text = json.dumps(site_schema())
    for kind in (
        "origin",
        "board",
        "switch",
        "fuse",
        "mcb",
        "rccb",
        "rcbo",
        "srcd",
        "prcd",
        "cbr",
        "rcm",
        "circuit",
    ):
        assert f'"const": "{kind}"' in text
