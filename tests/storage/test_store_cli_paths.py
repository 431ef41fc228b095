"""``tripwise check`` takes any path: relative, with spaces, with non-ASCII names."""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

import pytest

from bench.gen_site import generate_site
from model.storage.sites import save_site

ROOT = Path(__file__).resolve().parents[2]

NAMES = [
    "plain.json",
    "with spaces in name.json",
    "Zählerschrank Müller.json",
    "ведомость.json",
    "日本の現場.json",
    "emoji 🔌 board.json",
    "no-extension",
    "-leading-dash.json",
]


def _check(path_arg: str, *extra: str) -> subprocess.CompletedProcess[str]:
    return subprocess.run(
        [sys.executable, "-m", "tui", "check", *extra, "--", path_arg]
        if path_arg.startswith("-")
        else [sys.executable, "-m", "tui", "check", *extra, path_arg],
        cwd=ROOT,
        capture_output=True,
        text=True,
        timeout=60,
        env={**os.environ, "PYTHONIOENCODING": "utf-8"},
    )


@pytest.mark.parametrize("name", NAMES)
def test_check_reads_awkward_names_by_absolute_and_relative_path(tmp_path: Path, name: str) -> None:
    folder = tmp_path / "jobs 2026" / "ñandú"
    folder.mkdir(parents=True)
    p = folder / name
    site = generate_site(25, seed=4)
    save_site(site, p)
    before = p.read_bytes()
    rel = os.path.relpath(p, ROOT)
    for arg in (str(p), rel):
        r = _check(arg, "--json")
        assert r.returncode in (0, 1), r.stderr
        doc = json.loads(r.stdout)
        assert doc["site"] == site.site.name
        assert doc["file"] == arg
    assert p.read_bytes() == before


def test_missing_file_with_awkward_name_is_exit_2_one_line(tmp_path: Path) -> None:
    p = tmp_path / "nicht da ü.json"
    r = _check(str(p))
    assert r.returncode == 2
    assert r.stderr.strip().splitlines() == [f"tripwise: cannot load {p}: no such file"]
    assert "Traceback" not in r.stderr


def test_check_notes_unsaved_journal_edits(tmp_path: Path) -> None:
    from model.site.models import Reading
    from model.storage.session import EditSession

    p = tmp_path / "site ö.json"
    s = EditSession.create(p, generate_site(25, seed=4))
    dev = next(n.id for n in s.site.nodes if n.kind == "rcbo")
    s.set_reading(s.site.visits[-1].id, dev, Reading(x1_0=20.0))
    s.close()
    r = _check(str(p), "--json")
    assert r.returncode in (0, 1)
    json.loads(r.stdout)  # stdout is still one JSON object only
    assert "has edits not yet saved" in r.stderr and "site ö.json.tripwise-journal" in r.stderr
