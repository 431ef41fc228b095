"""Readings from the test-sheet CSV: same readings back, every bad row reported, nothing applied."""

from __future__ import annotations

import json
from pathlib import Path
from typing import Any

import pytest

from model.site.models import SiteFile
from model.storage.sites import load_site
from model.visits.import_csv import CsvImportError, ImportTargetError, plan_import, preview_text
from tests.visits_helpers import SAMPLES, make_site, sheet_csv

SAMPLE = SAMPLES / "oak-lane-house.json"


def sample_with_empty_latest() -> tuple[SiteFile, dict[str, Any]]:
    """The sample with its latest visit's readings removed, and those readings."""
    doc = json.loads(SAMPLE.read_text(encoding="utf-8"))
    readings = doc["visits"][-1]["readings"]
    doc["visits"][-1]["readings"] = {}
    return SiteFile.model_validate(doc), readings


@pytest.mark.parametrize("guard", [False, True])
def test_csv_imports_to_the_same_readings(guard: bool) -> None:
    site, readings = sample_with_empty_latest()
    rows = [{"device": dev, **r} for dev, r in readings.items()]
    plan = plan_import(site, sheet_csv(rows, guard=guard))
    assert plan.visit_id == "2026-11-14" and plan.rows == len(rows)
    got = plan.site.visits[-1].readings
    expected = load_site(SAMPLE).visits[-1].readings
    assert got == expected
    assert plan.counts()["changed"] == 0 and plan.counts()["added"] > 0
    assert "label" in plan.ignored_columns and "x1 mark" in plan.ignored_columns
    # the site given is not modified
    assert site.visits[-1].readings == {}


def test_reimport_of_same_values_changes_nothing() -> None:
    site = load_site(SAMPLE)
    rows = [
        {"device": d, **r.model_dump(exclude_defaults=True)}
        for d, r in site.visits[-1].readings.items()
    ]
    plan = plan_import(site, sheet_csv(rows))
    assert not plan.changed and plan.counts()["added"] == 0


def test_preview_added_changed_unchanged() -> None:
    site = make_site([("v1", "2025-01-01", {"rc1": {"x1_0": 22.0, "x5_0": 12.0}})])
    csv_text = sheet_csv(
        [
            {"device": "rc1", "x1_0": 22.0, "x5_0": 14.0, "x1_180": 25.0},
            {"device": "rc2", "x1_0": "did not trip"},
        ]
    )
    plan = plan_import(site, csv_text)
    status = {(c.device, c.key): c.status for c in plan.changes}
    assert status == {
        ("rc1", "x1_0"): "unchanged",
        ("rc1", "x5_0"): "changed",
        ("rc1", "x1_180"): "added",
        ("rc2", "x1_0"): "added",
    }
    r = plan.site.visits[0].readings
    assert (r["rc1"].x1_0, r["rc1"].x5_0, r["rc1"].x1_180) == (22.0, 14.0, 25.0)
    assert r["rc2"].x1_0 == "did not trip"
    text = preview_text(plan)
    assert "changed   x5_0 [ms]      12 → 14" in text
    assert "1 value(s) changed" not in text and "1 changed" in text


def test_empty_cell_keeps_the_recorded_value() -> None:
    site = make_site([("v1", "2025-01-01", {"rc1": {"x1_0": 22.0, "ramp_ma": 24.0}})])
    plan = plan_import(site, sheet_csv([{"device": "rc1", "x5_0": 11.0}]))
    r = plan.site.visits[0].readings["rc1"]
    assert (r.x1_0, r.ramp_ma, r.x5_0) == (22.0, 24.0, 11.0)


def test_values_replace_an_earlier_not_tested_reason() -> None:
    site = make_site([("v1", "2025-01-01", {"rc1": {"not_tested": "no access"}})])
    plan = plan_import(site, sheet_csv([{"device": "rc1", "x1_0": 21.0}]))
    r = plan.site.visits[0].readings["rc1"]
    assert (r.x1_0, r.not_tested) == (21.0, None)
    assert ("rc1", "not_tested", "changed") in {(c.device, c.key, c.status) for c in plan.changes}


def test_every_bad_row_is_reported_with_row_and_column() -> None:
    site = make_site([("v1", "2025-01-01", {"rc1": {"x1_0": 22.0}})])
    csv_text = sheet_csv(
        [
            {"device": "rc1", "x1_0": "fast"},  # row 2
            {"device": "nope", "x1_0": 20.0},  # row 3
            {"device": "m3", "x1_0": 20.0},  # row 4: an MCB
            {"device": "rc2", "x1_0": -5.0, "button": "maybe"},  # row 5
            {"device": "rc2", "x1_0": 20.0},  # row 6: repeated
            {"device": "rc1", "x5_0": 20000.0},  # row 7: repeated and too long
        ]
    )
    with pytest.raises(CsvImportError) as info:
        plan_import(site, csv_text)
    got = [(e.row, e.column) for e in info.value.errors]
    assert got == [
        (2, "x1_0 [ms]"),
        (3, "device"),
        (4, "device"),
        (5, "button"),
        (6, "device"),
        (7, "device"),
    ]
    texts = [e.text() for e in info.value.errors]
    assert "'fast' is not a number" in texts[0] and "a trip time in ms" in texts[0]
    assert "no device 'nope'" in texts[1] and "is a mcb" in texts[2]
    assert "already given in row 5" in texts[4]


def test_value_limits_come_from_the_reading_model() -> None:
    site = make_site([("v1", "2025-01-01", {"rc1": {"x1_0": 22.0}})])
    csv_text = sheet_csv(
        [
            {"device": "rc1", "x1_0": -5.0},  # row 2: must be above 0
            {"device": "rc2", "x5_0": 20000.0},  # row 3: at most 10 000 ms
            {"device": "c1"},  # row 4: a circuit
        ]
    )
    with pytest.raises(CsvImportError) as info:
        plan_import(site, csv_text)
    assert [(e.row, e.column) for e in info.value.errors] == [
        (2, "x1_0 [ms]"),
        (3, "x5_0 [ms]"),
        (4, "device"),
    ]
    assert "greater than 0" in info.value.errors[0].message


def test_not_tested_with_values_is_refused() -> None:
    site = make_site([("v1", "2025-01-01", {"rc1": {"x1_0": 22.0}})])
    with pytest.raises(CsvImportError) as info:
        plan_import(site, sheet_csv([{"device": "rc1", "not_tested": "locked"}]))
    (e,) = info.value.errors
    assert (e.row, e.column) == (2, "not_tested") and "cannot also carry" in e.message


def test_header_problems() -> None:
    site = make_site([("v1", "2025-01-01", {})])
    with pytest.raises(CsvImportError, match="no 'device' column"):
        plan_import(site, "label,x1_0 [ms]\nA,20\n")
    with pytest.raises(CsvImportError, match="semicolon"):
        plan_import(site, "device;x1_0 [ms]\nrc1;20\n")
    with pytest.raises(CsvImportError, match="no reading columns"):
        plan_import(site, "device,label\nrc1,A\n")
    with pytest.raises(CsvImportError, match="not UTF-8"):
        plan_import(site, b"device,x1_0 [ms]\nrc\xff,20\n")


def test_visit_must_exist() -> None:
    site = make_site([("v1", "2025-01-01", {}), ("v2", "2025-02-01", {})])
    with pytest.raises(ImportTargetError, match=r"'v9'; known visits: v1, v2"):
        plan_import(site, sheet_csv([{"device": "rc1", "x1_0": 20.0}]), "v9")
    plan = plan_import(site, sheet_csv([{"device": "rc1", "x1_0": 20.0}]), "v1")
    assert plan.site.visits[0].readings["rc1"].x1_0 == 20.0
    assert plan.site.visits[1].readings == {}
    with pytest.raises(ImportTargetError, match="no visits"):
        plan_import(make_site([]), sheet_csv([{"device": "rc1", "x1_0": 20.0}]))


def test_blank_lines_and_bom_are_fine(tmp_path: Path) -> None:
    site = make_site([("v1", "2025-01-01", {})])
    data = ("\ufeff" + sheet_csv([{"device": "rc1", "x1_0": 20.0}]) + "\r\n,,,\r\n").encode()
    plan = plan_import(site, data)
    assert plan.rows == 1 and plan.site.visits[0].readings["rc1"].x1_0 == 20.0


def test_a_further_row_brings_another_waveforms_results() -> None:
    # an AC and a half-wave test on one visit (BS 7671 643.7.1 note: the AC one is required)
    site = make_site([("v1", "2025-01-01", {"rc1": {"x1_0": 22.0, "button": "worked"}})])
    csv_text = sheet_csv(
        [
            {"device": "rc1", "x5_0": 11.0},
            {"device": "rc1", "waveform": "half-wave", "test_current": "scaled", "x1_0": 27.0},
        ]
    )
    plan = plan_import(site, csv_text)
    r = plan.site.visits[0].readings["rc1"]
    assert (r.x1_0, r.x5_0, r.button, r.waveform) == (22.0, 11.0, "worked", "AC")
    hw = r.results_for("half-wave")
    assert hw is not None and (hw.x1_0, hw.test_current) == (27.0, "scaled")
    assert ("rc1", "x1_0", "added", "half-wave") in {
        (c.device, c.key, c.status, c.waveform) for c in plan.changes
    }
    # near miss: the same waveform twice, and a button on a further row, are refused
    bad = sheet_csv(
        [
            {"device": "rc1", "x5_0": 11.0},
            {"device": "rc1", "waveform": "AC", "x1_0": 27.0},
            {"device": "rc1", "waveform": "smooth-dc", "x1_0": 27.0, "button": "failed"},
        ]
    )
    with pytest.raises(CsvImportError) as info:
        plan_import(site, bad)
    assert [(e.row, e.column) for e in info.value.errors] == [(3, "waveform"), (4, "button")]
