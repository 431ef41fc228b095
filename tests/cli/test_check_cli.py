"""`tripwise check`: output, --json, exit codes, and the message for each bad file."""

from __future__ import annotations

import copy
import json
import subprocess
import sys
from pathlib import Path
from typing import Any

import pytest
from sitekit import ROOT, SAMPLES, circuit, node, rcd, site_doc, tripwise, write_doc

from model.rules.findings import CAUTION


def test_findings_exit_1_grouped_by_board_with_caution() -> None:
    out = tripwise("check", str(SAMPLES / "hollowmere-farm.json"))
    assert out.returncode == 1
    assert "[Farmhouse board]" in out.stdout and "[Dairy board]" in out.stdout
    # worst first: the first finding printed is urgent
    first = next(
        line
        for line in out.stdout.splitlines()
        if line.startswith("  ") and line.strip().isupper() is False
    )
    assert "URGENT" in first
    assert out.stdout.rstrip().endswith(CAUTION)


def test_clean_site_exits_0(tmp_path: Path) -> None:
    # a typed gG 100 A fuse over a B32 at 0.5 kA is selective (IEC 60269-1 gates, from memory;
    # IEC 60898-1 Table 7): an untyped fuse would leave its selectivity not shown
    doc = site_doc(
        [
            node("f", "o", "fuse", rated_a=100.0, fuse_type="gG"),
            node("m", "f", "mcb", rated_a=32.0, curve="B"),
            circuit("c", "m", "cooker", rated_a=32.0),
        ]
    )
    doc["nodes"][0]["pscc_ka"] = 0.5
    out = tripwise("check", str(write_doc(tmp_path / "clean site é.json", doc)))
    assert out.returncode == 0, out.stdout + out.stderr
    assert "No findings." in out.stdout


def test_json_is_one_object_and_nothing_else() -> None:
    out = tripwise("check", "--json", str(SAMPLES / "oak-lane-house.json"))
    assert out.returncode == 1
    doc = json.loads(out.stdout)
    assert set(doc) >= {"findings", "pairs", "oc_pairs", "caution", "counts", "rules"}
    f = doc["findings"][0]
    assert set(f) == {
        "rule",
        "severity",
        "nodes",
        "board",
        "message",
        "action",
        "source",
        "basis",
        "measured",
        "band",
        "visit",
    }
    pairs = {(p["up"], p["down"]): p for p in doc["pairs"]}
    # the pair analysis is in the output whether or not it became a finding
    assert pairs[("rc3", "rb1")]["verdict"] == "selective-in-practice"
    # IEC 61008-1 Table 1 with its 0.25 A note: 40 ms guaranteed only from 250 mA
    assert pairs[("rc3", "rb1")]["ranges"] == [{"lo_ma": 50.0, "hi_ma": 250.0}]


def test_relative_path_with_spaces(tmp_path: Path) -> None:
    target = tmp_path / "a folder" / "Ferme d'été.json"
    target.parent.mkdir()
    target.write_bytes((SAMPLES / "oak-lane-house.json").read_bytes())
    out = subprocess.run(
        [sys.executable, "-m", "tui", "check", "a folder/Ferme d'été.json"],
        cwd=tmp_path,
        capture_output=True,
        text=True,
        env={"PYTHONPATH": str(ROOT), "PATH": "/usr/bin:/bin"},
    )
    assert out.returncode == 1, out.stderr


def good() -> dict[str, Any]:
    return site_doc(
        [rcd("r1", "o", 30), circuit("c1", "r1", "sockets", rated_a=20.0)],
        [{"id": "v1", "date": "2026-11-30", "readings": {"r1": {"x1_0": 20.0}}}],
    )


def broken(mutate: Any) -> dict[str, Any]:
    d = copy.deepcopy(good())
    mutate(d)
    return d


BAD = [
    (
        "unknown parent",
        lambda d: d["nodes"][2].update(parent="nowhere"),
        "nodes[2] (c1): unknown parent 'nowhere'",
    ),
    ("duplicate id", lambda d: d["nodes"].append(circuit("c1", "r1")), "duplicate id 'c1'"),
    (
        "cycle",
        lambda d: d["nodes"].extend([node("b1", "b2", "board"), node("b2", "b1", "board")]),
        "cycle b1 -> b2 -> b1",
    ),
    (
        "S type 30 mA",
        lambda d: d["nodes"][1].update(delay="S"),
        "type S exists only for IΔn above 30 mA",
    ),
    (
        "RCD fields on a fuse",
        lambda d: d["nodes"].append(node("f", "o", "fuse", rated_a=10.0, idn_ma=30.0)),
        "nodes[3] (f): field 'idn_ma' is not allowed here",
    ),
    ("amps for mA", lambda d: d["nodes"][1].update(idn_ma=0.03), "idn_ma 0.03 looks like amps"),
    ("quoted number", lambda d: d["nodes"][1].update(idn_ma="30"), "nodes[1] (r1).idn_ma"),
    (
        "negative time",
        lambda d: d["visits"][0]["readings"]["r1"].update(x1_0=-5.0),
        "visits[0] (v1).readings.r1.x1_0: Input should be greater than 0 or Input should be 'did not trip'",
    ),
    ("time over 10 s", lambda d: d["visits"][0]["readings"]["r1"].update(x1_0=12000.0), "x1_0"),
    (
        "reading for a circuit",
        lambda d: d["visits"][0]["readings"].update(c1={"x1_0": 20.0}),
        "readings are for residual-current devices",
    ),
    (
        "unknown rule set",
        lambda d: d["site"].update(rules="mars-2099"),
        "unknown rule set 'mars-2099'",
    ),
    ("unknown kind", lambda d: d["nodes"].append(node("z", "o", "toaster")), "nodes[3]"),
    ("two origins", lambda d: d["nodes"].append(node("o2", None, "origin")), "exactly one origin"),
    ("newer version", lambda d: d.update(version=9), "format version 9 is newer"),
    ("not a site", lambda d: d.update(format="something"), "not a tripwise site file"),
]


@pytest.mark.parametrize(("name", "mutate", "message"), BAD, ids=[b[0] for b in BAD])
def test_bad_file_message_and_exit_2(tmp_path: Path, name: str, mutate: Any, message: str) -> None:
    path = write_doc(tmp_path / "bad.json", broken(mutate))
    before = path.read_bytes()
    out = tripwise("check", str(path))
    assert out.returncode == 2
    assert message in out.stderr
    assert "Traceback" not in out.stderr and out.stdout == ""
    assert len(out.stderr.strip().splitlines()) == 1
    assert path.read_bytes() == before


def test_json_syntax_error_gives_line_and_column(tmp_path: Path) -> None:
    p = tmp_path / "syntax.json"
    p.write_text('{\n  "format": "tripwise.site",\n  "version": 2,,\n}', encoding="utf-8")
    out = tripwise("check", str(p))
    assert out.returncode == 2 and "line 3, column 16" in out.stderr


def test_missing_file_exit_2(tmp_path: Path) -> None:
    out = tripwise("check", str(tmp_path / "absent.json"))
    assert out.returncode == 2 and "no such file" in out.stderr


def test_schema_command_prints_the_schema() -> None:
    out = tripwise("schema")
    assert out.returncode == 0
    assert json.loads(out.stdout)["title"] == "SiteFile"
