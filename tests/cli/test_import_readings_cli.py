"""``tripwise import-readings``: preview, --yes applies, bad rows leave the site byte-identical."""

from __future__ import annotations

import json
import os
from pathlib import Path

from model.site.models import Reading
from model.storage.files import backup_path
from model.storage.journal import journal_path
from model.storage.session import EditSession
from model.storage.sites import load_site
from tests.visits_helpers import run_cli, sample_copy, sheet_csv


def setup(tmp_path: Path, rows: list[dict[str, object]]) -> tuple[Path, Path, bytes]:
    site = sample_copy(tmp_path)
    csv_path = tmp_path / "sheet.csv"
    csv_path.write_text(sheet_csv(rows), encoding="utf-8", newline="")
    return site, csv_path, site.read_bytes()


def test_yes_applies(tmp_path: Path) -> None:
    # rb2 has no reading on the sample's latest visit; rc1's x1_0 changes 22 -> 23 ms
    site, csv_path, _ = setup(
        tmp_path,
        [{"device": "rb2", "x1_0": 19.0, "button": "worked"}, {"device": "rc1", "x1_0": 23.0}],
    )
    p = run_cli("import-readings", str(site), str(csv_path), "--yes")
    assert p.returncode == 0, p.stderr
    assert "added" in p.stdout and "changed   x1_0 [ms]      22 → 23" in p.stdout
    r = load_site(site).visits[-1].readings
    assert r["rb2"].x1_0 == 19.0 and r["rb2"].button == "worked" and r["rc1"].x1_0 == 23.0
    assert r["rc1"].x1_180 == 25.0  # untouched value kept


def test_without_yes_and_no_terminal_is_a_dry_run(tmp_path: Path) -> None:
    site, csv_path, before = setup(tmp_path, [{"device": "rb2", "x1_0": 19.0}])
    p = run_cli("import-readings", str(site), str(csv_path), stdin="y\n")
    assert p.returncode == 0, p.stderr
    assert "added" in p.stdout and "Nothing written" in p.stdout
    assert site.read_bytes() == before


def test_bad_rows_listed_and_site_byte_identical(tmp_path: Path) -> None:
    site, csv_path, before = setup(
        tmp_path,
        [
            {"device": "rb2", "x1_0": 19.0},  # row 2 is fine
            {"device": "ghost", "x1_0": 19.0},  # row 3
            {"device": "rc1", "x5_0": "quick"},  # row 4
            {"device": "m1", "x1_0": 10.0},  # row 5: an MCB
        ],
    )
    p = run_cli("import-readings", str(site), str(csv_path), "--yes")
    assert p.returncode == 2
    err = p.stdout + p.stderr
    assert len(p.stderr.strip().splitlines()) == 1  # the refusal; the problems are on stdout
    assert "row 3, column 'device': no device 'ghost'" in err
    assert "row 4, column 'x5_0 [ms]'" in err and "row 5, column 'device'" in err
    assert "3 problem(s)" in err and "nothing written" in err and "Traceback" not in err
    assert site.read_bytes() == before
    assert sorted(x.name for x in tmp_path.iterdir()) == ["oak-lane-house.json", "sheet.csv"]


def test_visit_option(tmp_path: Path) -> None:
    site, csv_path, before = setup(tmp_path, [{"device": "rb2", "x1_0": 19.0}])
    p = run_cli("import-readings", str(site), str(csv_path), "--visit", "2000-01-01", "--yes")
    assert p.returncode == 2 and "known visits: 2023-05-09, 2026-11-14" in p.stderr
    assert site.read_bytes() == before
    p = run_cli("import-readings", str(site), str(csv_path), "--visit", "2023-05-09", "--yes")
    assert p.returncode == 0, p.stderr
    doc = json.loads(site.read_text(encoding="utf-8"))
    assert doc["visits"][0]["readings"]["rb2"] == {"x1_0": 19.0}
    assert "rb2" not in doc["visits"][1]["readings"]


def test_missing_csv_and_nothing_to_change(tmp_path: Path) -> None:
    site, csv_path, before = setup(tmp_path, [{"device": "rc1", "x1_0": 22.0}])
    p = run_cli("import-readings", str(site), str(tmp_path / "none.csv"), "--yes")
    assert p.returncode == 2 and "no such file" in p.stderr
    p = run_cli("import-readings", str(site), str(csv_path), "--yes")
    assert p.returncode == 0 and "Nothing to change" in p.stdout
    assert site.read_bytes() == before


def test_site_open_in_the_app_is_not_written(tmp_path: Path) -> None:
    site, csv_path, before = setup(tmp_path, [{"device": "rb2", "x1_0": 19.0}])
    holder = EditSession.open(site)  # the app has the site open
    try:
        p = run_cli("import-readings", str(site), str(csv_path), "--yes")
    finally:
        holder.close()
    assert p.returncode == 2
    (line,) = p.stderr.strip().splitlines()
    assert f"cannot write {site}" in line and f"open for editing by pid {os.getpid()}" in line
    assert "nothing written" in line
    assert site.read_bytes() == before
    assert sorted(x.name for x in tmp_path.iterdir()) == ["oak-lane-house.json", "sheet.csv"]


def test_written_as_the_app_saves_it(tmp_path: Path) -> None:
    site, csv_path, before = setup(tmp_path, [{"device": "rb2", "x1_0": 19.0}])
    p = run_cli("import-readings", str(site), str(csv_path), "--yes")
    assert p.returncode == 0, p.stderr
    # the previous version kept as the backup; no lock or journal left behind
    assert sorted(x.name for x in tmp_path.iterdir()) == [
        "oak-lane-house.json",
        "oak-lane-house.json.bak",
        "sheet.csv",
    ]
    assert (tmp_path / "oak-lane-house.json.bak").read_bytes() == before


def test_unsaved_app_edits_are_replayed_not_dropped(tmp_path: Path) -> None:
    # an app that stopped without saving left a journalled reading: the import keeps it
    site, csv_path, _ = setup(tmp_path, [{"device": "rb2", "x1_0": 19.0}])
    s = EditSession.open(site)
    s.set_reading(s.site.visits[-1].id, "rc1", Reading(x1_0=41.0))
    s.close()
    p = run_cli("import-readings", str(site), str(csv_path), "--yes")
    assert p.returncode == 0, p.stderr
    assert "1 edit(s) in its recovery journal" in p.stderr
    r = load_site(site).visits[-1].readings
    assert r["rb2"].x1_0 == 19.0 and r["rc1"].x1_0 == 41.0  # the journalled edit is in the file
    assert not journal_path(site).exists()
    assert load_site(backup_path(site)).visits[-1].readings["rc1"].x1_0 == 41.0
    again = EditSession.open(site)
    assert again.warnings == [] and not again.dirty
    again.close()


def test_refused_while_the_app_holds_the_site(tmp_path: Path) -> None:
    site, csv_path, before = setup(tmp_path, [{"device": "rb2", "x1_0": 19.0}])
    with EditSession.open(site):
        p = run_cli("import-readings", str(site), str(csv_path), "--yes")
    assert p.returncode == 2
    assert f"is open for editing by pid {os.getpid()}" in p.stderr
    assert len(p.stderr.strip().splitlines()) == 1
    assert site.read_bytes() == before
