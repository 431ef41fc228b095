"""The command line prints text from files as visible escapes, never as terminal commands."""

from __future__ import annotations

import json
from pathlib import Path

from sitekit import SAMPLES, tripwise

from tests.visits_helpers import sheet_csv

#: Window title (OSC 0), clipboard (OSC 52), hyperlink (OSC 8), clear screen
#: (CSI 2J and C1 CSI), DEL, right-to-left override, isolate, line separator;
#: then markup, which is plain text on the command line.
HOSTILE = (
    "\x1b]0;PWNED\x07\x1b]52;c;aGk=\x07\x1b]8;;http://x.invalid\x1b\\L\x1b]8;;\x1b\\"
    "\x1b[2J\x9b2J\x7f\u202eRTL\u2066I\u2069\u2028\u2029[b]x[/b]"
)
RAW = ("\x1b", "\x07", "\x9b", "\x7f", "\u202e", "\u2066", "\u2069", "\u2028", "\u2029")


def hostile_site(tmp_path: Path, name: str = "hostile.json") -> Path:
    doc = json.loads((SAMPLES / "oak-lane-house.json").read_text(encoding="utf-8"))
    for n in doc["nodes"]:
        n["label"] = n.get("label", n["id"])[:8] + HOSTILE
    doc["site"]["name"] = "Site" + HOSTILE
    path = tmp_path / name
    path.write_text(json.dumps(doc, ensure_ascii=False), encoding="utf-8")
    return path


def assert_no_raw(text: str) -> None:
    for raw in RAW:
        assert raw not in text, repr(raw)


def test_check_and_compare_print_escapes_visibly(tmp_path: Path) -> None:
    site = hostile_site(tmp_path)
    for args in (("check", str(site)), ("compare", str(site))):
        p = tripwise(*args)
        assert p.returncode in (0, 1), p.stderr
        assert_no_raw(p.stdout + p.stderr)
        assert "\\x1b]0;PWNED\\x07" in p.stdout and "\\u202eRTL" in p.stdout
        assert "[b]x[/b]" in p.stdout


def test_json_output_stays_exact_json(tmp_path: Path) -> None:
    """--json carries every character exactly, as JSON escapes the terminal cannot obey."""
    site = hostile_site(tmp_path, "site\u202e\x9b\x7f.json")
    for args in (("check", "--json", str(site)), ("compare", "--json", str(site))):
        p = tripwise(*args)
        assert p.returncode in (0, 1), p.stderr
        assert_no_raw(p.stdout)
        doc = json.loads(p.stdout)
        assert doc["file"] == str(site)
        if args[0] == "check":
            assert doc["site"] == "Site" + HOSTILE
            assert "\\u202e" in p.stdout and "\\u009b" in p.stdout


def test_import_preview_and_its_errors_escape_cells(tmp_path: Path) -> None:
    site = hostile_site(tmp_path)
    csv_path = tmp_path / "sheet.csv"
    csv_path.write_text("device,x1_0 [ms],note\x1b]0;PWNED\x07\u202e\nrb2,19,x\n", encoding="utf-8")
    p = tripwise("import-readings", str(site), str(csv_path))
    assert p.returncode == 0, p.stderr
    assert_no_raw(p.stdout + p.stderr)
    assert "note\\x1b]0;PWNED\\x07\\u202e" in p.stdout  # an ignored column, named

    csv_path.write_text(
        sheet_csv(
            [{"device": "gh\x1b]0;X\x07ost", "x1_0": 19.0}, {"device": "rc1", "x1_0": "\x9b2J"}]
        ),
        encoding="utf-8",
    )
    before = site.read_bytes()
    p = tripwise("import-readings", str(site), str(csv_path), "--yes")
    assert p.returncode == 2
    assert_no_raw(p.stdout + p.stderr)
    # the problems are listed on stdout; stderr has the one summary line
    assert "gh\\x1b]0;X\\x07ost" in p.stdout and "\\u009b2J" in p.stdout
    assert site.read_bytes() == before


def test_a_path_with_a_newline_or_escape_stays_on_one_line(tmp_path: Path) -> None:
    bad = tmp_path / "bro\nken\x1b[2J.json"
    bad.write_text("{", encoding="utf-8")
    for cmd in ("check", "compare", "report", "open"):
        p = tripwise(cmd, str(bad))
        assert p.returncode == 2, (cmd, p.stderr)
        assert p.stderr.count("\n") == 1 and p.stderr.endswith("\n"), (cmd, p.stderr)
        assert "bro\\nken\\x1b[2J.json" in p.stderr and "\x1b" not in p.stderr
    missing = tmp_path / "no\nsuch.csv"
    p = tripwise("import-readings", str(hostile_site(tmp_path)), str(missing))
    assert p.returncode == 2 and p.stderr.count("\n") == 1 and "no\\nsuch.csv" in p.stderr
    site = hostile_site(tmp_path, "a\nb.json")
    p = tripwise("merge", str(site), str(site), "--out", str(site))
    assert p.returncode == 2 and p.stderr.count("\n") == 1 and "a\\nb.json" in p.stderr


def test_an_invalid_kind_is_cut_and_escaped(tmp_path: Path) -> None:
    doc = json.loads((SAMPLES / "oak-lane-house.json").read_text(encoding="utf-8"))
    doc["nodes"][1]["kind"] = "x\x1b]0;PWNED\x07" + "k" * 5_000_000
    path = tmp_path / "kind.json"
    path.write_text(json.dumps(doc), encoding="utf-8")
    p = tripwise("check", str(path))
    assert p.returncode == 2
    assert p.stderr.count("\n") == 1 and len(p.stderr) < 400, len(p.stderr)
    assert "unknown kind 'x\\x1b]0;PWNED\\x07kkk" in p.stderr and "…'" in p.stderr
    assert "(one of: origin, board," in p.stderr and "\x1b" not in p.stderr


def _site_with_labels(tmp_path: Path, labels: dict[str, str]) -> Path:
    doc = json.loads((SAMPLES / "oak-lane-house.json").read_text(encoding="utf-8"))
    for n in doc["nodes"]:
        n["label"] = labels.get(n["id"], n.get("label", n["id"]))
    path = tmp_path / "labels.json"
    path.write_text(json.dumps(doc, ensure_ascii=False), encoding="utf-8")
    return path


def test_pdf_shows_characters_outside_its_font_and_lists_them(tmp_path: Path) -> None:
    import shutil
    import subprocess

    import pytest

    if shutil.which("pdftotext") is None:
        pytest.skip("pdftotext is not installed")
    site = _site_with_labels(tmp_path, {"rc1": "Upstairs ＝SUM(1) 中"})
    out = tmp_path / "sheet.pdf"
    p = tripwise("report", str(site), "--kind", "sheet", "--format", "pdf", "--out", str(out))
    assert p.returncode == 0, p.stderr
    text = subprocess.run(
        ["pdftotext", "-layout", str(out), "-"], capture_output=True, text=True, check=True
    ).stdout
    assert "[U+FF1D]SUM(1)" in text and "[U+4E2D]" in text
    flat = " ".join(text.split())
    assert (
        "[U+FF1D] FULLWIDTH EQUALS SIGN" in flat and "[U+4E2D] CJK UNIFIED IDEOGRAPH-4E2D" in flat
    )


def test_csv_guards_full_width_formula_starts(tmp_path: Path) -> None:
    import csv

    labels = {"rc1": "＝HYPERLINK(1)", "rc2": "＋1", "rb1": "﹦1", "rb2": "＠SUM(1)", "m1": "－2"}
    site = _site_with_labels(tmp_path, labels)
    out = tmp_path / "sheet.csv"
    p = tripwise("report", str(site), "--kind", "sheet", "--format", "csv", "--out", str(out))
    assert p.returncode == 0, p.stderr
    with out.open(encoding="utf-8-sig", newline="") as f:
        cells = [c for row in csv.reader(f) for c in row]
    for label in labels.values():
        if any(label in c for c in cells):
            assert "'" + label in cells and label not in cells, label
    assert "'＝HYPERLINK(1)" in cells
