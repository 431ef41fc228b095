"""A save that cannot complete leaves the file on disk byte-identical.

Real failures where the machine allows it (a tiny tmpfs filled up, then
remounted read-only: needs root), and injected OS errors everywhere else.
"""

from __future__ import annotations

import contextlib
import errno
import os
import subprocess
import uuid
from collections.abc import Iterator
from pathlib import Path

import pytest

from bench.gen_site import generate_site
from model.site.models import Reading
from model.storage import files
from model.storage.codec import SiteLoadError
from model.storage.files import SaveError, backup_path
from model.storage.session import EditSession
from model.storage.sites import load_site, save_site
from tests.storage.helpers import file_digest, rcd_ids


def _mount_tmpfs(where: Path, size: str) -> bool:
    where.mkdir()
    try:
        r = subprocess.run(
            [
                "mount",
                "-t",
                "tmpfs",
                "-o",
                f"size={size},mode=0755",
                f"tw-{uuid.uuid4().hex[:6]}",
                str(where),
            ],
            capture_output=True,
            timeout=20,
        )
    except (OSError, subprocess.SubprocessError):
        return False
    return r.returncode == 0


@pytest.fixture
def tiny_disk(tmp_path: Path) -> Iterator[Path]:
    """A 256 KiB tmpfs, unmounted afterwards (skipped where mounting is not allowed)."""
    mnt = tmp_path / "tiny disk"
    if os.geteuid() != 0 or not _mount_tmpfs(mnt, "256k"):
        pytest.skip("cannot mount a tmpfs here (needs root)")
    try:
        yield mnt
    finally:
        subprocess.run(["umount", "-l", str(mnt)], capture_output=True, timeout=20)


def _fill(folder: Path) -> None:
    with contextlib.suppress(OSError), open(folder / "filler", "wb", buffering=0) as fh:
        while True:
            fh.write(b"\0" * 4096)


def _edited(site_path: Path):  # type: ignore[no-untyped-def]
    site = load_site(site_path)
    info = site.site.model_copy(update={"notes": site.site.notes + "x" * 10_000})
    return site.model_copy(update={"site": info})


def test_full_disk_leaves_original_identical(tiny_disk: Path) -> None:
    p = tiny_disk / "site.json"
    save_site(generate_site(100, seed=2), p)
    before = p.read_bytes()
    _fill(tiny_disk)
    with pytest.raises(SaveError) as err:
        save_site(_edited(p), p)
    assert p.read_bytes() == before
    msg = str(err.value)
    assert "disk is full" in msg and str(p) in msg and "\n" not in msg
    assert "not changed" in msg
    assert sorted(x.name for x in tiny_disk.iterdir()) == ["filler", "site.json"]


def test_full_disk_during_edit_session(tiny_disk: Path) -> None:
    p = tiny_disk / "site.json"
    save_site(generate_site(100, seed=2), p)
    sess = EditSession.open(p)
    dev = rcd_ids(sess.site)[0]
    visit = sess.site.visits[-1].id
    sess.set_reading(visit, dev, Reading(x1_0=21.0))  # makes the journal
    _fill(tiny_disk)
    before_site = sess.site
    before_file = p.read_bytes()
    journal = p.with_name(p.name + ".tripwise-journal")
    before_journal = journal.read_bytes()
    long_note = Reading(x1_0=22.0, note="n" * 2000)
    with contextlib.suppress(SaveError):
        for _ in range(200):  # until the last free block is gone
            sess.set_reading(visit, dev, long_note)
            before_site, before_journal = sess.site, journal.read_bytes()
    with pytest.raises(SaveError) as err:
        sess.set_reading(visit, dev, long_note)
    assert "disk is full" in str(err.value)
    assert sess.site is before_site  # the edit was not shown as made
    assert journal.read_bytes() == before_journal  # no half line left behind
    with pytest.raises(SaveError):
        sess.replace_site(_edited(p))
    with pytest.raises(SaveError):
        sess.site = _edited(p)
        sess.save()
    assert p.read_bytes() == before_file
    sess.close()
    (tiny_disk / "filler").unlink()
    again = EditSession.open(p)  # every edit that returned is still recovered
    assert again.site.visits[-1].readings[dev] == before_site.visits[-1].readings[dev]
    again.close()


def test_read_only_disk(tiny_disk: Path) -> None:
    p = tiny_disk / "site.json"
    save_site(generate_site(60, seed=4), p)
    before = p.read_bytes()
    r = subprocess.run(["mount", "-o", "remount,ro", str(tiny_disk)], capture_output=True)
    if r.returncode != 0:
        pytest.skip("cannot remount read-only")
    with pytest.raises(SaveError) as err:
        save_site(_edited(p), p)
    assert "read-only" in str(err.value)
    assert p.read_bytes() == before
    with pytest.raises(SiteLoadError) as err2:
        EditSession.open(p)
    assert "read-only" in str(err2.value)
    ro = EditSession.open(p, read_only=True)
    assert ro.read_only and ro.site == load_site(p)
    with pytest.raises(PermissionError):
        ro.save()


# --- injected failures (run everywhere) -------------------------------------

FAILURES = [
    ("open", errno.EACCES, "permission denied"),
    ("write", errno.ENOSPC, "disk is full"),
    ("fsync", errno.EIO, "input/output error"),
    ("replace", errno.EROFS, "read-only"),
    ("link", errno.EDQUOT, "quota"),
]


@pytest.mark.parametrize(("call", "code", "words"), FAILURES)
def test_injected_os_errors_leave_original_identical(
    site_file: Path, monkeypatch: pytest.MonkeyPatch, call: str, code: int, words: str
) -> None:
    save_site(_edited(site_file), site_file)  # makes a backup too
    before = file_digest(site_file)
    before_bak = file_digest(backup_path(site_file))
    edited = _edited(site_file)  # read before the failures are injected
    real = getattr(os, call)
    calls = {"n": 0}

    def failing(*args, **kwargs):  # type: ignore[no-untyped-def]
        calls["n"] += 1
        if call == "write" and calls["n"] == 1:
            return real(args[0], bytes(args[1])[:100])  # a short write first, then the error
        raise OSError(code, os.strerror(code))

    monkeypatch.setattr(os, call, failing)
    if call == "link":
        # a failed hard link falls back to a copy; make that copy fail too
        real_write_new = files.write_new_file
        writes: list[Path] = []

        def second_fails(tmp: Path, data: bytes, mode: int | None) -> None:
            writes.append(tmp)
            if len(writes) > 1:  # the new version's temp file is written; the backup copy fails
                raise OSError(code, os.strerror(code))
            real_write_new(tmp, data, mode)

        monkeypatch.setattr(files, "write_new_file", second_fails)
    with pytest.raises(SaveError) as err:
        save_site(edited, site_file)
    monkeypatch.undo()
    assert calls["n"] >= 1
    assert file_digest(site_file) == before
    assert file_digest(backup_path(site_file)) == before_bak
    assert words in str(err.value) and str(site_file) in str(err.value)
    assert [x.name for x in site_file.parent.iterdir() if x.name.endswith(".tmp")] == []


def _raise(code: int):  # type: ignore[no-untyped-def]
    def f(*a, **k):  # type: ignore[no-untyped-def]
        raise OSError(code, os.strerror(code))

    return f


def test_failed_save_in_session_keeps_journal_and_dirty(
    site_file: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    sess = EditSession.open(site_file)
    dev = rcd_ids(sess.site)[1]
    visit = sess.site.visits[-1].id
    sess.set_reading(visit, dev, Reading(x1_0=19.0))
    before = site_file.read_bytes()
    monkeypatch.setattr(os, "replace", _raise(errno.ENOSPC))
    with pytest.raises(SaveError):
        sess.save()
    monkeypatch.undo()
    assert sess.dirty
    assert site_file.read_bytes() == before
    sess.save()
    assert not sess.dirty
    assert load_site(site_file).visits[-1].readings[dev].x1_0 == 19.0
    sess.close()


def test_save_syncs_the_new_file_before_the_rename_and_the_folder_after(
    site_file: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    """rename(2) is atomic but not durable by itself: data first, then name, then folder.

    POSIX rename(): the new name refers to the old or the new file at every moment;
    fsync(2) (Linux man-pages): syncing a file does not sync the folder entry naming it.
    """
    events: list[str] = []
    folder_fds: set[int] = set()
    real_open, real_fsync, real_replace, real_link = os.open, os.fsync, os.replace, os.link

    def rec_open(path, flags, *a):  # type: ignore[no-untyped-def]
        fd = real_open(path, flags, *a)
        if os.path.isdir(path):
            folder_fds.add(fd)
        return fd

    def rec_fsync(fd: int) -> None:
        events.append("fsync folder" if fd in folder_fds else "fsync file")
        real_fsync(fd)

    def rec_replace(src, dst):  # type: ignore[no-untyped-def]
        events.append(f"rename to {Path(dst).name}")
        real_replace(src, dst)

    def rec_link(src, dst):  # type: ignore[no-untyped-def]
        events.append(f"link {Path(src).name}")
        real_link(src, dst)

    monkeypatch.setattr(os, "open", rec_open)
    monkeypatch.setattr(os, "fsync", rec_fsync)
    monkeypatch.setattr(os, "replace", rec_replace)
    monkeypatch.setattr(os, "link", rec_link)
    save_site(_edited(site_file), site_file)
    monkeypatch.undo()
    assert events == [
        "fsync file",  # the new version is on disk ...
        "link site.json",  # ... the current one is kept as the backup ...
        "rename to site.json.bak",
        "rename to site.json",  # ... then the new one takes the name ...
        "fsync folder",  # ... and the rename itself is made durable
    ]
