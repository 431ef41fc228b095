"""The command line's JSON writer and what a command imports before it starts working.

``write_json`` must write exactly what ``json.dumps(doc, ensure_ascii=False,
indent=2)`` writes (the ``--json`` output is a public interface and did not
change when the writer did), and a command must not import what it does not use.
"""

from __future__ import annotations

import json
import math
import random
import subprocess
import sys
from typing import Any

import pytest
from sitekit import ROOT, SAMPLES

from model.rules.checks import analyse
from model.storage.sites import load_site
from tui.cli.output import JSON_PIECE_CHARS, SafeStream, write_json


def _reference(doc: Any) -> str:
    return json.dumps(doc, ensure_ascii=False, indent=2) + "\n"


def _written(doc: Any) -> tuple[str, list[str]]:
    pieces: list[str] = []
    write_json(doc, pieces.append)
    return "".join(pieces), pieces


def _random_value(rng: random.Random, depth: int) -> Any:
    roll = rng.random()
    if depth > 4 or roll < 0.5:
        return rng.choice(
            [
                None,
                True,
                False,
                0,
                -3,
                10**30,
                1.5,
                -0.0,
                1e300,
                math.nan,
                math.inf,
                -math.inf,
                "",
                'quote " backslash \\ newline \n NUL \x00 DEL \x7f LS \u2028 é € 😀',
                "IΔn 30 mA, Zs 1.44 Ω",
            ]
        )
    if roll < 0.75:
        return [_random_value(rng, depth + 1) for _ in range(rng.randrange(0, 5))]
    if roll < 0.8:
        return tuple(_random_value(rng, depth + 1) for _ in range(rng.randrange(0, 3)))
    keys = ["rule", "é", "\n", 1, 2.5, True, False, None, "a longer key"]
    return {rng.choice(keys): _random_value(rng, depth + 1) for _ in range(rng.randrange(0, 5))}


def test_write_json_matches_the_standard_writer_on_random_documents() -> None:
    rng = random.Random(13)
    for _ in range(3000):
        doc = _random_value(rng, 0)
        assert _written(doc)[0] == _reference(doc), doc


def test_write_json_matches_on_a_deeply_nested_document() -> None:
    doc: list[Any] = []
    inner = doc
    for _ in range(150):
        nxt: list[Any] = []
        inner.extend([{"k": [1, 2.5, "x"]}, nxt])
        inner = nxt
    assert _written(doc)[0] == _reference(doc)


@pytest.mark.parametrize("bad", [{1j: 1}, [object()], {"a": {1, 2}}])
def test_write_json_refuses_what_json_refuses(bad: Any) -> None:
    with pytest.raises(TypeError):
        _reference(bad)
    with pytest.raises(TypeError):
        _written(bad)


@pytest.mark.parametrize("name", sorted(p.name for p in SAMPLES.glob("*.json")))
def test_check_documents_of_the_sample_sites_are_written_unchanged(name: str) -> None:
    site = load_site(SAMPLES / name)
    doc = {"site": site.site.name, "file": name, **analyse(site).as_json()}
    assert _written(doc)[0] == _reference(doc)


def test_a_large_document_is_written_in_pieces_and_stays_exact() -> None:
    finding = {
        "rule": "type.ac-unsuitable",
        "severity": "required",
        "nodes": ["rc35", "c155"],
        "message": "RCCB 30 mA is Type AC …",
        "measured": None,
        "band": [0.0, 300.0],
    }
    doc = {"site": "big", "findings": [dict(finding, board=f"db{i}") for i in range(20_000)]}
    text, pieces = _written(doc)
    assert text == _reference(doc)
    assert len(pieces) > 2
    assert max(len(p) for p in pieces) < 2 * JSON_PIECE_CHARS


def test_json_through_the_safe_stream_reads_back_as_the_same_text(tmp_path: Any) -> None:
    # a label holding an escape sequence, C1 and bidi controls is shown escaped and the
    # output is still exact JSON that reads back as the stored characters
    doc = {"label": "board\x1b]0;title\x07 \x9b \u202e gnp.exe", "n": [1, 2]}
    out = tmp_path / "out.json"
    with out.open("w", encoding="utf-8") as fh:
        write_json(doc, SafeStream(fh).write)
    text = out.read_text(encoding="utf-8")
    assert "\x1b" not in text and "\x9b" not in text and "\u202e" not in text
    assert json.loads(text) == doc


def _imported_after(args: list[str]) -> set[str]:
    code = (
        "import sys, io, contextlib\n"
        "from tui.cli.main import main\n"
        "with contextlib.redirect_stdout(io.StringIO()):\n"
        f"    rc = main({args!r})\n"
        "print(rc, ' '.join(sorted(sys.modules)))\n"
    )
    done = subprocess.run(
        [sys.executable, "-c", code], cwd=ROOT, capture_output=True, text=True, check=True
    )
    rc, *mods = done.stdout.split()
    assert rc in {"0", "1"}, done.stderr
    return set(mods)


def test_version_imports_neither_pydantic_nor_numpy() -> None:
    mods = _imported_after(["--version"])
    assert "pydantic" not in mods and "numpy" not in mods
    assert not any(m.startswith("tui.cli.commands.") for m in mods)


def test_check_json_imports_no_editing_journal_or_report_modules() -> None:
    mods = _imported_after(["check", str(SAMPLES / "oak-lane-house.json"), "--json"])
    for unused in (
        "model.site.ops",
        "model.storage.journal",
        "model.storage.session",
        "model.storage.lock",
        "model.reports.check_text",
        "textual",
    ):
        assert unused not in mods, unused
