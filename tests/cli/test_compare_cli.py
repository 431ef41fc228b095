"""``tripwise compare``: exit codes, text and JSON output, on a copy of the sample site."""

from __future__ import annotations

import json
from pathlib import Path

from tests.visits_helpers import run_cli, sample_copy


def test_compare_sample_default_visits(tmp_path: Path) -> None:
    site = sample_copy(tmp_path)
    before = site.read_bytes()
    p = run_cli("compare", str(site))
    assert p.returncode == 0, p.stderr
    assert "visit 2023-05-09 → visit 2026-11-14" in p.stdout
    # rc2's 1 × IΔn time at 180°: 180 -> 312 ms on the invented sample
    assert "+132 ms" in p.stdout
    assert "Caution:" in p.stdout and "not a certificate" in p.stdout
    assert site.read_bytes() == before


def test_compare_json(tmp_path: Path) -> None:
    site = sample_copy(tmp_path)
    p = run_cli("compare", str(site), "--from", "2023-05-09", "--to", "2026-11-14", "--json")
    assert p.returncode == 0, p.stderr
    doc = json.loads(p.stdout)
    assert doc["from"]["id"] == "2023-05-09" and doc["to"]["id"] == "2026-11-14"
    assert doc["added"] == ["rb3"] and doc["untested"] == ["rb2"]
    new = {(f["rule"], tuple(f["nodes"])) for f in doc["findings"]["new"]}
    # IEC 61008-1 Table 1: 312 ms at 1 × IΔn exceeds the general type's 300 ms
    assert ("reading.too-slow", ("rc2",)) in new
    rc2 = next(d for d in doc["devices"] if d["device"] == "rc2")
    x1 = next(v for v in rc2["values"] if v["key"] == "x1_180")
    assert (x1["from"], x1["to"], x1["change"]) == (180.0, 312.0, 132.0)


def test_compare_unknown_visit_exit_2(tmp_path: Path) -> None:
    site = sample_copy(tmp_path)
    p = run_cli("compare", str(site), "--from", "1999-01-01")
    assert p.returncode == 2
    assert "1999-01-01" in p.stderr and "2023-05-09, 2026-11-14" in p.stderr
    assert "Traceback" not in p.stderr and p.stdout == ""


def test_compare_bad_file_exit_2(tmp_path: Path) -> None:
    bad = tmp_path / "bad.json"
    bad.write_text("{not json", encoding="utf-8")
    p = run_cli("compare", str(bad))
    assert p.returncode == 2 and "not valid JSON" in p.stderr
