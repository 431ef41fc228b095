"""A test sheet exported as CSV imports back to the same readings."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest
from sitekit import ROOT, copy_sample

from model.reports.writer import render
from model.storage.sites import load_site
from model.visits.import_csv import plan_import


@pytest.mark.parametrize("name", ["oak-lane-house", "hollowmere-farm", "kestrel-hill-school"])
def test_exported_sheet_imports_back_unchanged(name: str, tmp_path: Path) -> None:
    site = load_site(copy_sample(name, tmp_path))
    data = render(site, "sheet", "csv")
    plan = plan_import(site, data)
    assert not plan.changed
    latest = site.latest_visit()
    assert latest is not None
    assert plan.site.latest_visit() == latest


def test_edited_sheet_brings_a_new_reading_in(tmp_path: Path) -> None:
    path = copy_sample("oak-lane-house", tmp_path)
    site = load_site(path)
    text = render(site, "sheet", "csv").decode("utf-8-sig")
    # rb2 had no reading on the latest visit: type its 1× results into the sheet
    lines = text.splitlines()
    header = lines[0].split(",")
    row = next(i for i, line in enumerate(lines) if line.startswith("rb2,"))
    cells = lines[row].split(",")
    cells += [""] * (len(header) - len(cells))
    cells[header.index("x1_0 [ms]")] = "23"
    cells[header.index("x1_180 [ms]")] = "did not trip"
    lines[row] = ",".join(cells)
    csv_path = tmp_path / "sheet.csv"
    csv_path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    out = subprocess.run(
        [sys.executable, "-m", "tui", "import-readings", str(path), str(csv_path), "--yes"],
        cwd=ROOT,
        capture_output=True,
        text=True,
        timeout=120,
    )
    assert out.returncode == 0, out.stderr
    reading = load_site(path).latest_visit().readings["rb2"]  # type: ignore[union-attr]
    assert (reading.x1_0, reading.x1_180) == (23.0, "did not trip")
