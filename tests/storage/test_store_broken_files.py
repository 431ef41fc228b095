"""Broken files give one clear line each, never a traceback, and are never modified."""

from __future__ import annotations

import collections
import os
import subprocess
import sys
from pathlib import Path

import pytest

from model.storage.codec import SiteLoadError
from model.storage.files import MAX_FILE_BYTES
from model.storage.sites import load_site
from tests.storage.broken_corpus import BrokenCase, broken_cases

ROOT = Path(__file__).resolve().parents[2]
CASES = list(broken_cases())


def test_corpus_is_large_and_varied() -> None:
    assert len(CASES) >= 1000
    kinds = collections.Counter(c.name.split("-")[0] for c in CASES)
    assert len(kinds) >= 10, kinds
    assert len({c.name for c in CASES}) == len(CASES)


def _check_one(folder: Path, case: BrokenCase) -> None:
    p = folder / f"{case.name}.json"
    p.write_bytes(case.data)
    before = sorted(os.listdir(folder))
    try:
        load_site(p)
    except SiteLoadError as exc:
        msg = str(exc)
        assert "\n" not in msg and "\r" not in msg, (case.name, msg)
        assert msg.startswith(str(p) + ": "), (case.name, msg)
        assert len(msg) < 1500, (case.name, len(msg))
        assert "Traceback" not in msg
        if case.expect is not None:
            assert case.expect in msg, (case.name, msg)
    else:
        assert case.expect is None, f"{case.name}: loaded, but expected {case.expect!r}"
    assert p.read_bytes() == case.data  # a failed load never modifies the file
    assert sorted(os.listdir(folder)) == before  # ... nor leaves anything beside it
    p.unlink()


def test_every_broken_file_gives_one_clear_line(tmp_path: Path) -> None:
    assert len(CASES) >= 1000
    for case in CASES:
        _check_one(tmp_path, case)


def test_file_over_50_mb_is_refused_with_its_size(tmp_path: Path) -> None:
    p = tmp_path / "huge site.json"
    with open(p, "wb") as fh:
        fh.write(b'{"format": "tripwise.site", "version": 2, "site": {"name": "big", "notes": "')
        chunk = b"x" * (1 << 20)
        for _ in range(60):
            fh.write(chunk)
        fh.write(b'"}, "nodes": []}\n')
    assert p.stat().st_size > MAX_FILE_BYTES
    with pytest.raises(SiteLoadError) as err:
        load_site(p)
    size = p.stat().st_size
    assert f"is {size:,} bytes (60.0 MiB)" in str(err.value)
    assert "the limit is 52,428,800 bytes (50.0 MiB)" in str(err.value)


def test_one_byte_over_the_limit_says_the_real_size(tmp_path: Path) -> None:
    # "50 MB" for a 50 MiB + 1 byte file hid why it was refused: the size and the limit are exact
    p = tmp_path / "site.json"
    with open(p, "wb") as fh:
        fh.truncate(MAX_FILE_BYTES + 1)
    with pytest.raises(SiteLoadError) as err:
        load_site(p)
    assert "is 52,428,801 bytes" in str(err.value)
    assert "the limit is 52,428,800 bytes" in str(err.value)


def test_not_a_regular_file(tmp_path: Path) -> None:
    with pytest.raises(SiteLoadError, match="is a folder"):
        load_site(tmp_path)
    with pytest.raises(SiteLoadError, match="not a regular file"):
        load_site("/dev/zero")  # would otherwise be read for ever
    with pytest.raises(SiteLoadError, match="no such file"):
        load_site(tmp_path / "missing.json")


def test_nothing_in_the_file_is_executed(tmp_path: Path) -> None:
    marker = tmp_path / "pwned"
    p = tmp_path / "s.json"
    p.write_text(
        '{"format": "tripwise.site", "version": 2, "site": {"name": "__import__(\'pathlib\')'
        f'.Path(\'{marker}\').touch()", "earthing": "TT"}}, "nodes": '
        '[{"id": "o", "kind": "origin", "label": "eval(\'1+1\')"}]}'
    )
    site = load_site(p)
    assert site.nodes[0].label == "eval('1+1')"  # kept as text
    assert not marker.exists()


def _cli_sample() -> list[BrokenCase]:
    by_kind: dict[str, list[BrokenCase]] = collections.defaultdict(list)
    for c in CASES:
        if c.expect is not None:
            by_kind[c.name.split("-")[0]].append(c)
    return [cases[len(cases) // 2] for cases in by_kind.values()] + [by_kind["number"][0]]


@pytest.mark.parametrize("case", _cli_sample(), ids=lambda c: c.name)
def test_cli_check_exit_2_and_no_traceback(tmp_path: Path, case: BrokenCase) -> None:
    p = tmp_path / f"bröken {case.name}.json"
    p.write_bytes(case.data)
    r = subprocess.run(
        [sys.executable, "-m", "tui", "check", str(p)],
        cwd=ROOT,
        capture_output=True,
        text=True,
        timeout=60,
    )
    assert r.returncode == 2, (case.name, r.stdout, r.stderr)
    assert "Traceback" not in r.stderr
    assert r.stdout == ""
    lines = r.stderr.strip().splitlines()
    assert len(lines) == 1, r.stderr
    assert case.expect is not None and case.expect in lines[0]
    assert p.read_bytes() == case.data


def test_refused_numbers_say_where(tmp_path: Path) -> None:
    p = tmp_path / "s.json"
    p.write_text('{"format": "tripwise.site",\n "version": 2,\n "site": {"u0_v": NaN}}')
    with pytest.raises(SiteLoadError) as err:
        load_site(p)
    # RFC 8259 §6: NaN is not a JSON number; line 3, column 19 is where it stands
    assert "at line 3, column 19: NaN is not allowed" in str(err.value)
    p.write_bytes(b'{"format": "tripwise.site",\n "version": 2,\n "x": "\xff"}')
    with pytest.raises(SiteLoadError, match=r"not UTF-8 text at line 3 \(byte 50\)"):
        load_site(p)


def test_byte_order_mark_is_accepted(tmp_path: Path, site_file: Path) -> None:
    # RFC 8259 §8.1: parsers MAY ignore a byte order mark (some editors add one)
    p = tmp_path / "bom.json"
    p.write_bytes(b"\xef\xbb\xbf" + site_file.read_bytes())
    assert load_site(p) == load_site(site_file)
