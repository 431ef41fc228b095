"""``tripwise merge``: exit codes, inputs left byte-identical, nothing written on conflicts."""

from __future__ import annotations

import json
import os
from pathlib import Path
from typing import Any

from model.storage.session import EditSession
from model.storage.sites import load_site
from tests.visits_helpers import run_cli, sample_copy


def edit(path: Path, fn: Any) -> None:
    doc = json.loads(path.read_text(encoding="utf-8"))
    fn(doc)
    path.write_text(json.dumps(doc, indent=2), encoding="utf-8")


def latest_readings(doc: dict[str, Any]) -> dict[str, Any]:
    return doc["visits"][-1]["readings"]  # type: ignore[no-any-return]


def pair(tmp_path: Path, conflict: bool) -> tuple[Path, Path, bytes, bytes]:
    base = sample_copy(tmp_path, dest="base.json")
    other = sample_copy(tmp_path, dest="other.json")

    def theirs(doc: dict[str, Any]) -> None:
        latest_readings(doc)["rb2"] = {"x1_0": 17.0, "x1_180": 19.0}  # the other laptop's board
        if conflict:
            latest_readings(doc)["rc1"]["x1_0"] = 23.0  # ours says 22 ms

    edit(other, theirs)
    return base, other, base.read_bytes(), other.read_bytes()


def test_clean_merge_writes_default_out(tmp_path: Path) -> None:
    base, other, b0, o0 = pair(tmp_path, conflict=False)
    p = run_cli("merge", str(base), str(other))
    assert p.returncode == 0, p.stderr
    out = tmp_path / "base-merged.json"
    merged = load_site(out)
    assert merged.visits[-1].readings["rb2"].x1_180 == 19.0
    assert merged.visits[-1].readings["rc1"].x1_0 == 22.0
    assert "no conflicts" in p.stdout
    assert base.read_bytes() == b0 and other.read_bytes() == o0


def test_conflicts_listed_nothing_written_exit_1(tmp_path: Path) -> None:
    base, other, b0, o0 = pair(tmp_path, conflict=True)
    p = run_cli("merge", str(base), str(other))
    assert p.returncode == 1, p.stderr
    assert "reading:2026-11-14/rc1/x1_0" in p.stdout and "22.0" in p.stdout and "23.0" in p.stdout
    assert not (tmp_path / "base-merged.json").exists()
    assert sorted(x.name for x in tmp_path.iterdir()) == ["base.json", "other.json"]
    assert base.read_bytes() == b0 and other.read_bytes() == o0


def test_conflicts_json(tmp_path: Path) -> None:
    base, other, _, _ = pair(tmp_path, conflict=True)
    p = run_cli("merge", str(base), str(other), "--json")
    assert p.returncode == 1
    doc = json.loads(p.stdout)
    assert doc["written"] is False and not doc["clean"]
    (c,) = doc["conflicts"]
    assert (c["id"], c["ours"], c["theirs"]) == ("reading:2026-11-14/rc1/x1_0", 22.0, 23.0)
    assert doc["summary"]["in_conflicts"] == 2  # one value from each copy


def test_take_theirs_resolves_and_says_so(tmp_path: Path) -> None:
    base, other, b0, o0 = pair(tmp_path, conflict=True)
    out = tmp_path / "m.json"
    p = run_cli("merge", str(base), str(other), "--out", str(out), "--take", "theirs")
    assert p.returncode == 0, p.stderr
    assert "settled by taking theirs" in p.stdout
    r = load_site(out).visits[-1].readings
    assert r["rc1"].x1_0 == 23.0 and r["rb2"].x1_0 == 17.0
    assert base.read_bytes() == b0 and other.read_bytes() == o0


def test_existing_out_refused_unless_force(tmp_path: Path) -> None:
    base, other, b0, o0 = pair(tmp_path, conflict=False)
    out = tmp_path / "taken.json"
    out.write_bytes(b"keep me")
    p = run_cli("merge", str(base), str(other), "--out", str(out))
    assert p.returncode == 2 and "already exists" in p.stderr
    assert out.read_bytes() == b"keep me"
    p = run_cli("merge", str(base), str(other), "--out", str(out), "--force")
    assert p.returncode == 0, p.stderr
    assert load_site(out).visits[-1].readings["rb2"].x1_0 == 17.0
    # never over an input, even with --force
    p = run_cli("merge", str(base), str(other), "--out", str(other), "--force")
    assert p.returncode == 2 and "inputs are never overwritten" in p.stderr
    assert base.read_bytes() == b0 and other.read_bytes() == o0


def test_bad_input_exit_2(tmp_path: Path) -> None:
    base = sample_copy(tmp_path, dest="base.json")
    bad = tmp_path / "bad.json"
    bad.write_text('{"format": "tripwise.site", "version": 2}', encoding="utf-8")
    p = run_cli("merge", str(base), str(bad))
    assert p.returncode == 2 and "bad.json" in p.stderr and "Traceback" not in p.stderr
    p = run_cli("merge", str(base), str(tmp_path / "missing.json"))
    assert p.returncode == 2 and "no such file" in p.stderr
    assert not (tmp_path / "base-merged.json").exists()


def test_out_open_in_the_app_is_not_replaced(tmp_path: Path) -> None:
    base, other, b0, o0 = pair(tmp_path, conflict=False)
    out = sample_copy(tmp_path, dest="m.json")
    held = out.read_bytes()
    holder = EditSession.open(out)  # the app has the --out site open
    try:
        p = run_cli("merge", str(base), str(other), "--out", str(out), "--force")
    finally:
        holder.close()
    assert p.returncode == 2
    (line,) = p.stderr.strip().splitlines()
    assert f"cannot write {out}" in line and f"open for editing by pid {os.getpid()}" in line
    assert out.read_bytes() == held
    assert base.read_bytes() == b0 and other.read_bytes() == o0


def test_new_out_is_created_as_the_app_creates_a_site(tmp_path: Path) -> None:
    base, other, _, _ = pair(tmp_path, conflict=False)
    out = tmp_path / "m.json"
    p = run_cli("merge", str(base), str(other), "--out", str(out))
    assert p.returncode == 0, p.stderr
    assert sorted(x.name for x in tmp_path.iterdir()) == ["base.json", "m.json", "other.json"]
    p = run_cli("merge", str(base), str(other), "--out", str(out), "--force")
    assert p.returncode == 0, p.stderr  # same content: nothing to replace, nothing kept aside
    assert sorted(x.name for x in tmp_path.iterdir()) == ["base.json", "m.json", "other.json"]
