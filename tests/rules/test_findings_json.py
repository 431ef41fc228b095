"""A finding's JSON form is every field of the finding, nodes as a list (public: `check --json`)."""

from __future__ import annotations

import dataclasses

from model.rules.findings import Finding


def test_finding_json_holds_every_field_and_nothing_else() -> None:
    f = Finding(
        rule="reading.too-slow",
        severity="required",
        nodes=("rc1", "c2"),
        board="b1",
        message="m",
        action="a",
        source="IEC 61008-1 Table 1",
        measured="320 ms",
        band="≤ 300 ms",
        visit="2026-01-05",
    )
    d = f.as_json()
    assert set(d) == {x.name for x in dataclasses.fields(Finding)}
    assert d["nodes"] == ["rc1", "c2"]
    assert d == {**dataclasses.asdict(f), "nodes": ["rc1", "c2"]}
