"""The test-sheet CSV read back with the csv module equals the site's readings."""

from __future__ import annotations

import csv
import io
from pathlib import Path

import pytest

from model.reports.heading import STATEMENT
from model.reports.render.csv import REMEDIAL_COLUMNS, SHEET_COLUMNS
from model.reports.writer import write_report
from model.site.models import SiteFile
from model.site.terms import DID_NOT_TRIP, TEST_NAMES
from model.site.tree import SiteIndex
from model.storage.sites import load_site
from tests.reports.report_sites import (
    FORMULA_LABEL,
    MARKUP_LABEL,
    SAMPLES,
    awkward_site,
    copy_samples,
)


def _read(path: Path) -> list[list[str]]:
    raw = path.read_bytes()
    assert raw.startswith(b"\xef\xbb\xbf"), "UTF-8 with a byte-order mark"
    return list(csv.reader(io.StringIO(raw.decode("utf-8-sig"), newline="")))


def _sheet(site: SiteFile, tmp: Path) -> tuple[list[str], list[dict[str, str]], list[str]]:
    rows = _read(write_report(site, "sheet", "csv", tmp / "sheet.csv"))
    header, body, last = rows[0], rows[1:-1], rows[-1]
    return header, [dict(zip(header, r, strict=True)) for r in body], last


def _value(cell: str) -> float | str | None:
    if cell == "":
        return None
    if cell == DID_NOT_TRIP:
        return DID_NOT_TRIP
    return float(cell)


def _assert_equals_readings(site: SiteFile, rows: list[dict[str, str]]) -> None:
    idx = SiteIndex.build(site)
    visit = site.latest_visit()
    # one row per RCD, tree order, then one row per further test waveform of its reading
    want = []
    for d in idx.rcds():
        r0 = visit.readings.get(d) if visit else None
        want += [d] * (1 + (len(r0.further) if r0 is not None else 0))
    assert [r["device"] for r in rows] == want
    seen: set[str] = set()
    for r in rows:
        reading = visit.readings.get(r["device"]) if visit else None
        if reading is not None and r["device"] in seen:
            further = reading.results_for(r["waveform"])
            assert further is not None and further is not reading
            for t in TEST_NAMES:
                assert _value(r[f"{t} [ms]"]) == getattr(further, t), (r["device"], t)
            assert (r["test_current"] or None) == further.test_current
            assert r["button"] == r["note"] == r["not_tested"] == ""
            continue
        seen.add(r["device"])
        if reading is None:
            assert all(r[f"{t} [ms]"] == "" for t in TEST_NAMES)
            assert r["ramp [mA]"] == r["button"] == r["not_tested"] == ""
            continue
        for t in TEST_NAMES:
            assert _value(r[f"{t} [ms]"]) == getattr(reading, t), (r["device"], t)
        assert _value(r["ramp [mA]"]) == reading.ramp_ma
        assert (r["button"] or None) == reading.button
        assert r["waveform"] == reading.waveform
        assert (r["not_tested"].removeprefix("'") or None) == reading.not_tested
        assert r["note"] == reading.note
        assert r["visit"] == visit.id


@pytest.mark.parametrize("sample", SAMPLES, ids=lambda p: p.stem)
def test_sheet_csv_equals_the_readings(sample: Path, tmp_path: Path) -> None:
    (path,) = [p for p in copy_samples(tmp_path) if p.name == sample.name]
    site = load_site(path)
    header, rows, last = _sheet(site, tmp_path)
    assert tuple(header) == SHEET_COLUMNS
    assert header[0] == "device"
    _assert_equals_readings(site, rows)
    assert last[0] == "" and STATEMENT in last[-1]


def test_awkward_readings_round_trip(tmp_path: Path) -> None:
    site = awkward_site()
    _, rows, _ = _sheet(site, tmp_path)
    _assert_equals_readings(site, rows)
    by_id = {r["device"]: r for r in rows}
    assert by_id["rb3"]["x1_180 [ms]"] == DID_NOT_TRIP
    assert by_id["rb3"]["note"] == "First line\nsecond line @home"  # line break kept
    assert by_id["rb2"]["not_tested"].startswith("'+ socket")


def test_marks_are_separate_from_values(tmp_path: Path) -> None:
    _, rows, _ = _sheet(awkward_site(), tmp_path)
    by_id = {r["device"]: r for r in rows}
    rc2, rb3 = by_id["rc2"], by_id["rb3"]
    # IEC 61008-1 Ed.3 Table 1: a general-type device breaks within 300 ms at IΔn
    assert (rc2["x1_0 [ms]"], rc2["x1_0 mark"]) == ("260", "pass")
    assert (rc2["x1_180 [ms]"], rc2["x1_180 mark"]) == ("312", "out of band")
    assert rc2["x1 band"] == "≤ 300 ms"
    # IEC 61008-1 IΔno = 0.5 IΔn: 'did not trip' at half rating is the expected outcome
    assert (rc2["half_0 [ms]"], rc2["half_0 mark"]) == ("did not trip", "pass")
    # 'did not trip' at IΔn is outside the band (IEC 61008-1 Ed.3 Table 1)
    assert rb3["x1_180 mark"] == "out of band"
    # BS 7671 643.7.1 (A2:2022): only the test at IΔn is required
    assert rc2["x1 required"] == "yes" and rc2["x5 required"] == "no"
    # type S at IΔn: 130 to 500 ms (IEC 61008-1 Ed.3 Table 1)
    assert by_id["rc3"]["x1 band"] == "130–500 ms"
    # ramp: a 30 mA device trips above 15 mA and by 30 mA (IEC 61008-1, sinusoidal)
    assert (rc2["ramp [mA]"], rc2["ramp mark"]) == ("27", "pass")


def test_cells_are_harmless_in_a_spreadsheet(tmp_path: Path) -> None:
    for kind in ("sheet", "remedial"):
        rows = _read(write_report(awkward_site(), kind, "csv", tmp_path / f"{kind}.csv"))
        for row in rows:
            for cell in row:
                assert not cell.startswith(("=", "+", "-", "@", "\t", "\r")), cell
    rows = _read(tmp_path / "sheet.csv")
    labels = [r[2] for r in rows[1:-1]]
    assert "'" + FORMULA_LABEL in labels
    assert MARKUP_LABEL in labels  # not a formula: left as typed
    assert "'@upstairs" in labels


def test_numbers_stay_numbers(tmp_path: Path) -> None:
    _, rows, _ = _sheet(awkward_site(), tmp_path)
    for r in rows:
        for col in (*(f"{t} [ms]" for t in TEST_NAMES), "ramp [mA]", "idn [mA]"):
            if r[col] not in ("", DID_NOT_TRIP):
                float(r[col])  # a plain number a spreadsheet reads as one
                assert not r[col].startswith("'")


def test_remedial_csv_one_row_per_finding(tmp_path: Path) -> None:
    from model.rules.checks import analyse

    site = awkward_site()
    rows = _read(write_report(site, "remedial", "csv", tmp_path / "r.csv"))
    assert tuple(rows[0]) == REMEDIAL_COLUMNS
    body = rows[1:-1]
    result = analyse(site)
    assert len(body) == len(result.findings)
    assert sorted(r[2] for r in body) == sorted(f.rule for f in result.findings)
    # the statement stays in the `notes` column (README), before the added `planned_change`
    assert STATEMENT in rows[-1][REMEDIAL_COLUMNS.index("notes")]
    assert rows[-1][-1] == ""
