"""``tripwise plan``: output, JSON keys, exit codes, and ``--out`` never over the site."""

from __future__ import annotations

import json
import os
from pathlib import Path

from sitekit import copy_sample, site_doc, tripwise, write_doc

from model.plan.changes import PLAN_CAUTION
from model.rules.findings import CAUTION
from model.storage.sites import load_site


def test_text_lists_numbered_changes_what_remains_and_the_caution(tmp_path: Path) -> None:
    site = copy_sample("oak-lane-house", tmp_path)
    done = tripwise("plan", str(site))
    assert done.returncode == 0, done.stderr
    out = done.stdout
    assert '1. replace RCCB "RCCB 2 (downstairs)" (30 mA, Type AC, general)' in out
    assert "clears: " in out
    assert "Remaining (" in out and "needs a test" in out
    assert out.rstrip().endswith(CAUTION)
    assert PLAN_CAUTION.split(":")[0] in out


def test_json_has_the_issue_keys(tmp_path: Path) -> None:
    site = copy_sample("oak-lane-house", tmp_path)
    done = tripwise("plan", str(site), "--json")
    assert done.returncode == 0, done.stderr
    doc = json.loads(done.stdout)
    assert {"changes", "remaining", "caution"} <= doc.keys()
    first = doc["changes"][0]
    assert {"node", "field", "from", "to", "clears"} <= first.keys()
    # BS 7671 531.3.3: the Type AC RCCB over sockets becomes Type A.
    assert (first["node"], first["field"], first["from"], first["to"]) == (
        "rc2",
        "waveform",
        "AC",
        "A",
    )
    assert {"rule": "type.ac-unsuitable", "nodes": ["rc2", "c-l2", "c-s2", "c-s3"]} in first[
        "clears"
    ]
    assert all("reason" in r and "rule" in r for r in doc["remaining"])
    assert PLAN_CAUTION in doc["caution"] and CAUTION in doc["caution"]


def test_nothing_to_improve_is_exit_1(tmp_path: Path) -> None:
    clean = write_doc(tmp_path / "clean.json", site_doc([]))
    done = tripwise("plan", str(clean), "--json")
    assert done.returncode == 1, done.stderr
    doc = json.loads(done.stdout)
    assert doc["changes"] == [] and doc["remaining"] == []
    out = tmp_path / "new.json"
    done = tripwise("plan", str(clean), "--out", str(out))
    assert done.returncode == 1
    assert not out.exists()  # nothing changed, nothing written


def test_bad_input_is_exit_2_with_one_line(tmp_path: Path) -> None:
    done = tripwise("plan", str(tmp_path / "missing.json"))
    assert done.returncode == 2
    assert "missing.json" in done.stderr and done.stdout == ""
    broken = tmp_path / "broken.json"
    broken.write_text("{not json", encoding="utf-8")
    done = tripwise("plan", str(broken))
    assert done.returncode == 2 and "broken.json" in done.stderr
    site = copy_sample("oak-lane-house", tmp_path)
    done = tripwise("plan", str(site), "--force")
    assert done.returncode == 2 and "--out" in done.stderr


def test_out_writes_a_new_file_with_the_changes_and_the_plan_in_its_notes(tmp_path: Path) -> None:
    site = copy_sample("oak-lane-house", tmp_path)
    original = site.read_bytes()
    out = tmp_path / "planned.json"
    done = tripwise("plan", str(site), "--out", str(out), "--json")
    assert done.returncode == 0, done.stderr
    assert json.loads(done.stdout)["out"] == str(out)
    assert site.read_bytes() == original  # SITE untouched
    new = load_site(out)
    assert new.node("rc2").waveform == "A"
    assert "Remedy plan made by tripwise" in new.site.notes
    assert 'replace RCCB "RCCB 2 (downstairs)"' in new.site.notes
    assert new.site.notes.startswith(load_site(site).site.notes)
    # The plan of the new file has nothing left that the first plan cleared.
    again = json.loads(tripwise("plan", str(out), "--json").stdout)
    assert not {c["node"] for c in again["changes"]} & {"rc2", "m8"}


def test_out_never_over_the_site_even_with_force(tmp_path: Path) -> None:
    site = copy_sample("oak-lane-house", tmp_path)
    original = site.read_bytes()
    for args in (["--out", str(site)], ["--out", str(site), "--force"]):
        done = tripwise("plan", str(site), *args)
        assert done.returncode == 2
        assert "site file itself" in done.stderr
    link = tmp_path / "link.json"
    os.symlink(site, link)
    done = tripwise("plan", str(site), "--out", str(link), "--force")
    assert done.returncode == 2 and "site file itself" in done.stderr
    assert site.read_bytes() == original


def test_out_refuses_an_existing_file_unless_forced(tmp_path: Path) -> None:
    site = copy_sample("oak-lane-house", tmp_path)
    out = tmp_path / "planned.json"
    out.write_text("keep me", encoding="utf-8")
    done = tripwise("plan", str(site), "--out", str(out))
    assert done.returncode == 2 and "--force" in done.stderr
    assert out.read_text(encoding="utf-8") == "keep me"
    done = tripwise("plan", str(site), "--out", str(out), "--force")
    assert done.returncode == 0, done.stderr
    assert load_site(out).node("rc2").waveform == "A"
    done = tripwise("plan", str(site), "--out", str(tmp_path / "no-folder" / "x.json"))
    assert done.returncode == 2 and "no folder" in done.stderr
