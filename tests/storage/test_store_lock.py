"""One editor per site: a second process is told who holds it; a dead holder's lock is taken over."""

from __future__ import annotations

import os
import re
import signal
import socket
import subprocess
import sys
import textwrap
from pathlib import Path

import pytest

from model.storage.lock import LockHeld, LockInfo, SiteLock, lock_path
from model.storage.session import EditSession

ROOT = Path(__file__).resolve().parents[2]

HOLDER = textwrap.dedent(
    """
    import sys
    from model.storage.session import EditSession
    from model.site.models import Reading
    s = EditSession.open(sys.argv[1])
    dev = [n.id for n in s.site.nodes if n.kind in ("rccb", "rcbo")][0]
    s.set_reading(s.site.visits[-1].id, dev, Reading(x1_0=23.5))
    print("holding", dev, flush=True)
    sys.stdin.readline()
    s.close()
    print("released", flush=True)
    """
)

MESSAGE = re.compile(
    r"^(?P<name>.+) is open for editing by pid (?P<pid>\d+) on host (?P<host>\S+) "
    r"since \d{4}-\d\d-\d\d \d\d:\d\d$"
)


def _start_holder(site: Path) -> tuple[subprocess.Popen[str], str]:
    child = subprocess.Popen(
        [sys.executable, "-c", HOLDER, str(site)],
        cwd=ROOT,
        stdin=subprocess.PIPE,
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        text=True,
    )
    assert child.stdout is not None
    line = child.stdout.readline().split()  # waits until the child holds the lock
    assert line and line[0] == "holding", child.stderr.read() if child.stderr else ""
    return child, line[1]


def test_second_process_sees_holder_then_takes_over_after_kill(site_file: Path) -> None:
    child, dev = _start_holder(site_file)
    try:
        with pytest.raises(LockHeld) as err:
            EditSession.open(site_file)
        holder = err.value.holder
        assert isinstance(holder, LockInfo)
        assert holder.pid == child.pid
        assert holder.host == socket.gethostname()
        m = MESSAGE.match(str(err.value))
        assert m, str(err.value)
        assert m["name"] == "site.json" and int(m["pid"]) == child.pid
        # read-only is allowed, and sees the reading the holder has journaled
        ro = EditSession.open(site_file, read_only=True)
        assert ro.site.visits[-1].readings[dev].x1_0 == 23.5
        assert ro.recovered == [f"recovered reading for {dev} on visit {ro.site.visits[-1].id}"]
        ro.close()
    finally:
        child.send_signal(signal.SIGKILL)
        child.wait()
        for stream in (child.stdin, child.stdout, child.stderr):
            if stream:
                stream.close()
    # the killed holder left its lock file behind; the next editor takes it over
    # (flock(2), Linux man-pages: the lock is released when the holder's open file is
    # closed, which the kernel does for a process that is killed)
    assert lock_path(site_file).exists()
    sess = EditSession.open(site_file)
    try:
        assert any(f"pid {child.pid}" in w and "took over" in w for w in sess.warnings)
        assert sess.site.visits[-1].readings[dev].x1_0 == 23.5  # and recovers its reading
        assert LockInfo.from_json(lock_path(site_file).read_text()) == sess._lock.info  # type: ignore[union-attr]
    finally:
        sess.close()
    assert not lock_path(site_file).exists()


def test_holder_released_cleanly_lets_the_next_one_in(site_file: Path) -> None:
    child, _ = _start_holder(site_file)
    assert child.stdin and child.stdout
    child.stdin.write("\n")
    child.stdin.flush()
    assert child.stdout.readline().strip() == "released"
    child.wait(timeout=30)
    child.stdin.close()
    child.stdout.close()
    if child.stderr:
        child.stderr.close()
    sess = EditSession.open(site_file)
    assert not any("took over" in w for w in sess.warnings)
    sess.close()


def test_child_process_is_refused_while_this_one_holds(site_file: Path) -> None:
    sess = EditSession.open(site_file)
    try:
        code = (
            "import sys\nfrom model.storage.session import EditSession, LockHeld\n"
            "try:\n    EditSession.open(sys.argv[1])\nexcept LockHeld as e:\n"
            "    print(e.holder.pid, e.holder.host)\n"
        )
        r = subprocess.run(
            [sys.executable, "-c", code, str(site_file)],
            cwd=ROOT,
            capture_output=True,
            text=True,
            timeout=60,
        )
        assert r.stdout.split() == [str(os.getpid()), socket.gethostname()], r.stderr
    finally:
        sess.close()


def test_two_sessions_in_one_process_exclude_each_other(site_file: Path) -> None:
    # flock(2): locks belong to the open file description, so two open() calls in one
    # process conflict (unlike fcntl(2) record locks, which are per process)
    first = EditSession.open(site_file)
    with pytest.raises(LockHeld):
        EditSession.open(site_file)
    first.close()
    second = EditSession.open(site_file)
    second.close()


def test_lock_file_with_garbage_and_no_holder_is_taken_over(site_file: Path) -> None:
    lock_path(site_file).write_bytes(b"\x00garbage{")
    lock = SiteLock.acquire(site_file)
    assert lock.took_over is None
    assert LockInfo.from_json(lock_path(site_file).read_text()) == lock.info
    lock.release()
    lock.release()  # twice is harmless


def test_stale_lock_file_of_a_dead_pid_is_taken_over(site_file: Path) -> None:
    dead = subprocess.Popen([sys.executable, "-c", "pass"])
    dead.wait()
    stale = LockInfo(host=socket.gethostname(), pid=dead.pid, since="2026-12-01T09:14:00+00:00")
    lock_path(site_file).write_text(stale.to_json())
    sess = EditSession.open(site_file)
    assert sess._lock is not None and sess._lock.took_over == stale
    assert any("2026-12-01 09:14" in w for w in sess.warnings)
    sess.close()


def test_a_symlink_to_the_site_shares_its_lock(site_file: Path) -> None:
    link = site_file.with_name("shortcut.json")
    link.symlink_to(site_file)
    first = EditSession.open(site_file)
    with pytest.raises(LockHeld):
        EditSession.open(link)
    first.close()
    via_link = EditSession.open(link)
    assert via_link.path == site_file
    via_link.set_site_info(via_link.site.site.model_copy(update={"notes": "via the link"}))
    via_link.save()
    via_link.close()
    assert link.is_symlink()  # saving through a link keeps the link
    assert "via the link" in site_file.read_text()


@pytest.mark.skipif(not hasattr(os, "fork"), reason="needs fork")
def test_racing_processes_never_hold_the_lock_together(site_file: Path) -> None:
    """Four processes take and release the lock as fast as they can; never two at once."""
    marker = site_file.with_name("inside")
    rfd, wfd = os.pipe()
    pids = []
    for k in range(4):
        pid = os.fork()
        if pid == 0:  # pragma: no cover - the child
            os.close(rfd)
            held = clashes = 0
            try:
                while held < 150:
                    try:
                        lock = SiteLock.acquire(site_file)
                    except LockHeld:
                        continue
                    try:
                        fd = os.open(marker, os.O_CREAT | os.O_EXCL | os.O_WRONLY)
                    except FileExistsError:
                        clashes += 1
                    else:
                        os.close(fd)
                        os.unlink(marker)
                    held += 1
                    lock.release()
                os.write(wfd, f"{k} {held} {clashes}\n".encode())
            finally:
                os._exit(0)
        pids.append(pid)
    os.close(wfd)
    out = b""
    while chunk := os.read(rfd, 4096):
        out += chunk
    os.close(rfd)
    for pid in pids:
        os.waitpid(pid, 0)
    rows = [line.split() for line in out.decode().splitlines()]
    assert len(rows) == 4, out
    assert all(int(held) == 150 for _, held, _ in rows)
    assert sum(int(clashes) for _, _, clashes in rows) == 0
    assert not lock_path(site_file).exists()
