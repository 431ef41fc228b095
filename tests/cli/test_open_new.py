"""The `new`, `open` and `demo` commands, run as the user runs them."""

from __future__ import annotations

import os
from pathlib import Path

from sitekit import tripwise

from model.storage.sites import load_site

ROOT = Path(__file__).resolve().parents[2]


def test_new_creates_an_empty_site_and_refuses_to_overwrite(tmp_path: Path) -> None:
    path = tmp_path / "Ferme du Pré.json"
    done = tripwise("new", str(path), "--no-open")
    assert done.returncode == 0, done.stderr
    site = load_site(path)
    assert [n.kind for n in site.nodes] == ["origin"]
    assert site.site.name == "Ferme du Pré"
    before = path.read_bytes()
    again = tripwise("new", str(path), "--no-open")
    assert again.returncode == 2
    assert "already exists" in again.stderr and "Traceback" not in again.stderr
    assert path.read_bytes() == before


def test_open_bad_file_is_one_line_and_exit_2(tmp_path: Path) -> None:
    bad = tmp_path / "broken.json"
    bad.write_text('{"format": "tripwise.site", "version": 2, "site": {}}', encoding="utf-8")
    for args in (("open", str(bad)), (str(bad),), (str(tmp_path / "missing.json"),)):
        done = tripwise(*args)
        assert done.returncode == 2
        assert "Traceback" not in done.stderr
        assert len(done.stderr.strip().splitlines()) == 1


def test_demo_check_prints_the_check_and_copies_nothing(tmp_path: Path) -> None:
    env = {**os.environ, "XDG_DATA_HOME": str(tmp_path)}
    for _ in range(2):  # run twice: still no copy
        done = tripwise("demo", "--check", env=env)
        assert done.returncode == 1  # the invented sample has findings
        assert "not a certificate" in done.stdout
        assert "nothing copied" in done.stderr
    assert sorted(tmp_path.rglob("*")) == []
    other = tripwise("demo", "kestrel-hill-school", "--check", env=env)
    assert other.returncode == 1 and "Kestrel Hill" in other.stdout
    unknown = tripwise("demo", "nowhere", "--check", env=env)
    assert unknown.returncode == 2 and "oak-lane-house" in unknown.stderr
    assert sorted(tmp_path.rglob("*")) == []
