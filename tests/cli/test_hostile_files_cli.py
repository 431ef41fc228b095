"""Hostile files and concurrent editors, through the command line as a user runs it.

Each test reproduces one way a command used to clobber, crash or hang: a
site held by the app, a planted lock link, a hard link, outputs over a
site's files, failed writes, over-long names, pipes and devices as input.
Every refusal is exit 2 with one line on stderr and leaves the files as
they were.
"""

from __future__ import annotations

import os
import resource
import subprocess
import sys
from pathlib import Path

import pytest

from model.site.models import Reading
from model.storage.files import backup_path
from model.storage.journal import journal_path
from model.storage.lock import lock_path
from model.storage.session import EditSession
from model.storage.sites import load_site
from tests.visits_helpers import REPO, sample_copy, sheet_csv


def cli(
    *args: str, fsize: int | None = None, timeout: float = 60
) -> subprocess.CompletedProcess[str]:
    """``python -m tui ARGS``; ``fsize`` sets the shell's file size limit (``ulimit -f``)."""

    def limit() -> None:
        if fsize is not None:
            resource.setrlimit(resource.RLIMIT_FSIZE, (fsize, fsize))

    return subprocess.run(
        [sys.executable, "-m", "tui", *args],
        cwd=REPO,
        capture_output=True,
        text=True,
        stdin=subprocess.DEVNULL,
        timeout=timeout,
        check=False,
        preexec_fn=limit,
    )


def one_line_refusal(p: subprocess.CompletedProcess[str]) -> str:
    """The one line of a refusal (a note that a journal exists may come before it)."""
    assert p.returncode == 2, (p.returncode, p.stdout, p.stderr)
    lines = [x for x in p.stderr.strip().splitlines() if not x.startswith("tripwise: note:")]
    assert len(lines) == 1 and lines[0].startswith("tripwise: "), p.stderr
    assert "Traceback" not in p.stderr
    # the paths here are long (the test folder, names up to 300 bytes); the rest is short
    rest = lines[0]
    for arg in sorted(map(str, p.args), key=len, reverse=True):
        rest = rest.replace(arg, "")
    assert len(rest.replace(str(Path(p.args[-1]).parent), "")) < 300, rest
    return lines[0]


def merge_inputs(tmp_path: Path) -> tuple[Path, Path]:
    a = sample_copy(tmp_path, dest="a.json")
    b = sample_copy(tmp_path, dest="b.json")
    return a, b


def csv_for(tmp_path: Path, rows: list[dict[str, object]]) -> Path:
    p = tmp_path / "sheet.csv"
    p.write_text(sheet_csv(rows), encoding="utf-8", newline="")
    return p


# --- the editing lock ----------------------------------------------------------------


def test_merge_out_refused_while_an_editor_holds_the_site(tmp_path: Path) -> None:
    a, b = merge_inputs(tmp_path)
    site = sample_copy(tmp_path, dest="open in app.json")
    before = site.read_bytes()
    with EditSession.open(site):
        p = cli("merge", str(a), str(b), "--out", str(site), "--force")
    line = one_line_refusal(p)
    assert f"is open for editing by pid {os.getpid()}" in line
    assert site.read_bytes() == before


def test_merge_out_replays_a_dead_editors_journal(tmp_path: Path) -> None:
    a, b = merge_inputs(tmp_path)
    site = sample_copy(tmp_path, dest="target.json")
    s = EditSession.open(site)  # an editor that stopped without saving
    s.set_reading(s.site.visits[-1].id, "rc1", Reading(x1_0=41.0))
    s.close()
    p = cli("merge", str(a), str(b), "--out", str(site), "--force")
    assert p.returncode == 0, p.stderr
    assert not journal_path(site).exists()
    # the journalled reading was saved before the file was replaced: the backup holds it
    assert load_site(backup_path(site)).visits[-1].readings["rc1"].x1_0 == 41.0
    assert "saved first" in p.stderr


def test_import_refused_while_held_by_another_name(tmp_path: Path) -> None:
    # a hard link in another folder: the same file, so the same editor lock
    site = sample_copy(tmp_path, dest="site.json")
    other_dir = tmp_path / "other"
    other_dir.mkdir()
    other = other_dir / "same file.json"
    os.link(site, other)
    csv_path = csv_for(tmp_path, [{"device": "rb2", "x1_0": 19.0}])
    before = site.read_bytes()
    with EditSession.open(site):
        p = cli("import-readings", str(other), str(csv_path), "--yes")
        with pytest.raises(Exception, match="under another name"):
            EditSession.open(other)
    line = one_line_refusal(p)
    assert "under another name" in line and f"pid {os.getpid()}" in line
    assert site.read_bytes() == before


def test_opening_a_hard_linked_site_warns_that_names_part(tmp_path: Path) -> None:
    site = sample_copy(tmp_path, dest="site.json")
    os.link(site, tmp_path / "alias.json")
    with EditSession.open(site) as s:
        assert any("2 names on this disk" in w for w in s.warnings)


def test_planted_lock_link_is_refused_and_its_target_untouched(tmp_path: Path) -> None:
    site = sample_copy(tmp_path, dest="site.json")
    victim = tmp_path / "precious.txt"
    victim.write_bytes(b"keep me exactly")
    lock_path(site).symlink_to(victim)
    csv_path = csv_for(tmp_path, [{"device": "rb2", "x1_0": 19.0}])
    before = site.read_bytes()
    p = cli("import-readings", str(site), str(csv_path), "--yes")
    line = one_line_refusal(p)
    assert "symbolic link" in line
    assert victim.read_bytes() == b"keep me exactly" and site.read_bytes() == before
    a, b = merge_inputs(tmp_path)
    one_line_refusal(cli("merge", str(a), str(b), "--out", str(site), "--force"))
    assert victim.read_bytes() == b"keep me exactly" and site.read_bytes() == before


def test_planted_journal_link_is_refused_for_editing(tmp_path: Path) -> None:
    site = sample_copy(tmp_path, dest="site.json")
    victim = tmp_path / "precious.txt"
    victim.write_bytes(b"keep me exactly")
    journal_path(site).symlink_to(victim)
    a, b = merge_inputs(tmp_path)
    line = one_line_refusal(cli("merge", str(a), str(b), "--out", str(site), "--force"))
    assert "symbolic link" in line
    assert victim.read_bytes() == b"keep me exactly"
    assert os.path.islink(journal_path(site))


# --- outputs over a site's files ----------------------------------------------------


@pytest.mark.parametrize("which", ["site", "backup", "journal", "lock"])
def test_report_never_written_over_a_site_or_its_side_files(tmp_path: Path, which: str) -> None:
    site = sample_copy(tmp_path, dest="site.json")
    s = EditSession.open(site)
    s.set_reading(s.site.visits[-1].id, "rc1", Reading(x1_0=41.0))
    s.save()  # makes site.json.bak
    s.set_reading(s.site.visits[-1].id, "rc1", Reading(x1_0=42.0))  # a journal
    target = {
        "site": site,
        "backup": backup_path(site),
        "journal": journal_path(site),
        "lock": lock_path(site),
    }[which]
    before = {p: p.read_bytes() for p in (site, backup_path(site), journal_path(site))}
    p = cli("report", str(site), "--format", "csv", "--out", str(target), "--force")
    s.close()
    line = one_line_refusal(p)
    assert "not written there" in line
    assert {p: p.read_bytes() for p in before} == before


# --- failed writes: one line, exit 2 ------------------------------------------------


def test_merge_out_failures_are_one_line(tmp_path: Path) -> None:
    a, b = merge_inputs(tmp_path)
    missing = tmp_path / "no such folder" / "m.json"
    assert "no such folder" in one_line_refusal(cli("merge", str(a), str(b), "--out", str(missing)))
    too_long = tmp_path / ("n" * 256 + ".json")
    assert "too long" in one_line_refusal(cli("merge", str(a), str(b), "--out", str(too_long)))
    out = tmp_path / "small disk.json"
    line = one_line_refusal(cli("merge", str(a), str(b), "--out", str(out), fsize=4096))
    assert "too large" in line
    assert not out.exists() and not lock_path(out).exists()
    assert sorted(x.name for x in tmp_path.iterdir()) == ["a.json", "b.json"]


def test_import_yes_under_a_file_size_limit_is_one_line(tmp_path: Path) -> None:
    site = sample_copy(tmp_path, dest="site.json")
    before = site.read_bytes()
    csv_path = csv_for(tmp_path, [{"device": "rb2", "x1_0": 19.0}])
    line = one_line_refusal(
        cli("import-readings", str(site), str(csv_path), "--yes", fsize=len(before) // 2)
    )
    assert "could not save" in line
    assert site.read_bytes() == before
    assert not lock_path(site).exists() and not journal_path(site).exists()


def test_new_failures_leave_no_lock_behind(tmp_path: Path) -> None:
    new = tmp_path / "fresh.json"
    line = one_line_refusal(cli("new", str(new), "--no-open", fsize=20))
    assert "could not save" in line
    assert list(tmp_path.iterdir()) == []
    assert "no folder" in one_line_refusal(cli("new", str(tmp_path / "x" / "y.json"), "--no-open"))
    assert "too long" in one_line_refusal(
        cli("new", str(tmp_path / ("n" * 300 + ".json")), "--no-open")
    )
    assert list(tmp_path.iterdir()) == []


def test_new_on_a_dangling_link_creates_nothing_elsewhere(tmp_path: Path) -> None:
    far = tmp_path / "far away"
    far.mkdir()
    link = tmp_path / "link.json"
    link.symlink_to(far / "target.json")
    line = one_line_refusal(cli("new", str(link), "--no-open"))
    assert "symbolic link" in line
    assert list(far.iterdir()) == []


def test_demo_name_cannot_reach_outside_the_samples(tmp_path: Path) -> None:
    secret = tmp_path / "elsewhere.json"
    secret.write_text("{}")
    data = tmp_path / "data"
    env_name = os.path.relpath(secret.with_suffix(""), REPO / "sample_sites")
    p = subprocess.run(
        [sys.executable, "-m", "tui", "demo", env_name, "--check"],
        cwd=REPO,
        capture_output=True,
        text=True,
        env={**os.environ, "XDG_DATA_HOME": str(data)},
        stdin=subprocess.DEVNULL,
        timeout=60,
        check=False,
    )
    assert "no sample site" in one_line_refusal(p)
    assert not data.exists()


# --- odd paths and names ------------------------------------------------------------


def test_merge_with_a_link_loop_input(tmp_path: Path) -> None:
    a, _ = merge_inputs(tmp_path)
    loop = tmp_path / "loop.json"
    loop.symlink_to(loop)
    line = one_line_refusal(cli("merge", str(a), str(loop)))
    assert "loop.json" in line


def test_long_site_name_gets_side_files_that_fit(tmp_path: Path) -> None:
    # 245 bytes is a legal name; "<name>.tripwise-journal" would be 262 bytes
    site = sample_copy(tmp_path, dest="s" * 240 + ".json")
    assert cli("check", str(site)).returncode in (0, 1)
    s = EditSession.open(site)
    s.set_reading(s.site.visits[-1].id, "rc1", Reading(x1_0=41.0))
    jp = journal_path(site)
    assert jp.exists() and len(jp.name.encode()) <= 255 and jp.name.endswith(".tripwise-journal")
    s.close()
    p = cli("check", str(site))
    assert p.returncode in (0, 1) and "has edits not yet saved" in p.stderr
    with EditSession.open(site) as again:  # the journal is found by the same short name
        assert again.site.visits[-1].readings["rc1"].x1_0 == 41.0
        again.save()
        assert backup_path(site).exists()
    out = tmp_path / ("r" * 249 + ".csv")  # 253 bytes: legal, but a temp name is longer
    p = cli("report", str(site), "--format", "csv", "--out", str(out))
    assert p.returncode == 0, p.stderr
    assert out.exists() and not [x for x in tmp_path.iterdir() if x.name.endswith(".tmp")]
    p = cli("report", str(site), "--format", "txt")  # the default name beside it is too long
    assert p.returncode in (0, 2) and "Traceback" not in p.stderr


# --- pipes, devices and runaway CSVs --------------------------------------------------


def test_fifo_and_device_as_csv_are_refused_at_once(tmp_path: Path) -> None:
    site = sample_copy(tmp_path, dest="site.json")
    fifo = tmp_path / "pipe.csv"
    os.mkfifo(fifo)
    line = one_line_refusal(cli("import-readings", str(site), str(fifo), timeout=30))
    assert "not a regular file" in line
    line = one_line_refusal(cli("import-readings", str(site), "/dev/zero", timeout=30))
    assert "not a regular file" in line


def test_fifo_at_the_journal_does_not_hang(tmp_path: Path) -> None:
    site = sample_copy(tmp_path, dest="site.json")
    os.mkfifo(journal_path(site))
    csv_path = csv_for(tmp_path, [{"device": "rb2", "x1_0": 19.0}])
    p = cli("import-readings", str(site), str(csv_path), "--yes", timeout=30)
    assert p.returncode == 2 and "not a regular file" in p.stderr
    with pytest.raises(Exception, match="not a regular file"):
        EditSession.open(site)


def test_a_csv_of_many_bad_rows_lists_50(tmp_path: Path) -> None:
    site = sample_copy(tmp_path, dest="site.json")
    rows = [{"device": f"nope{i}", "x1_0": 19.0} for i in range(100_000)]
    rows[0] = {"device": "rc1", "x1_0": "9" * 5000}
    csv_path = csv_for(tmp_path, rows)
    p = cli("import-readings", str(site), str(csv_path))
    assert "100,000 problem(s)" in one_line_refusal(p)
    lines = p.stdout.strip().splitlines()
    assert len(lines) == 51  # the first 50 problems, then the count of the rest
    assert max(len(x) for x in lines) < 400  # the 5,000-digit cell is cut
    assert "99,950 more problem(s) not listed" in lines[50]


def test_a_reused_process_id_does_not_keep_a_dead_saves_temp_file(tmp_path: Path) -> None:
    site = sample_copy(tmp_path, dest="site.json")
    alive = subprocess.Popen([sys.executable, "-c", "import time; time.sleep(60)"])
    try:
        # a temp file of an earlier process that had the id the sleeper has now
        stray = tmp_path / f".site.json.{alive.pid}-zzzzzz-0123abcd.tmp"
        stray.write_bytes(b"half a save")
        ours = tmp_path / f".other.json.{alive.pid}-zzzzzz-0123abcd.tmp"
        ours.write_bytes(b"not this site's")
        with EditSession.open(site):
            pass
        assert not stray.exists() and ours.exists()
    finally:
        alive.kill()
        alive.wait()
