"""One editor per site file: the lock beside it.

Opening ``site.json`` for editing takes an exclusive ``flock`` on
``site.json.tripwise-lock`` and writes the holder's host, process id and
start time into that file.  A second process (or a second window of the same
program) that tries to open the site for editing fails at once with
:class:`LockHeld`, which names the holder; it may open the site read-only.

The operating system releases an ``flock`` when its process ends, however it
ends (crash, power cut, ``kill -9``), so a lock file left by a dead process is
simply taken over by the next editor; the stale holder's details are kept in
:attr:`SiteLock.took_over` so the app can say so.  On release the lock file is
removed while the lock is still held, and an editor that acquires a lock
checks that the file it locked is still the one at the path, so two editors
can never both believe they hold it.

``fcntl.flock`` is used directly rather than a locking library: the lock has
to carry the holder's details for the message, and two sessions in the same
process must exclude each other (``flock`` locks belong to an open file, not
to a process, which is exactly that).
"""

from __future__ import annotations

import contextlib
import datetime as dt
import errno
import fcntl
import json
import os
import socket
import time
from dataclasses import dataclass
from pathlib import Path

#: Suffix of the lock file beside a site file (``site.json.tripwise-lock``).
LOCK_SUFFIX = ".tripwise-lock"

_HOLDER_WAIT_S = 0.5


def lock_path(site_path: str | os.PathLike[str]) -> Path:
    """The lock file of a site file."""
    p = Path(site_path)
    return p.with_name(p.name + LOCK_SUFFIX)


@dataclass(frozen=True)
class LockInfo:
    """Who holds a site open for editing."""

    host: str
    pid: int
    #: When the holder opened the site, ISO 8601 local time with offset.
    since: str

    def since_text(self) -> str:
        """``since`` as ``YYYY-MM-DD HH:MM`` (the holder's local time)."""
        try:
            return dt.datetime.fromisoformat(self.since).strftime("%Y-%m-%d %H:%M")
        except ValueError:
            return self.since[:40] or "an unknown time"

    def to_json(self) -> str:
        return json.dumps({"host": self.host, "pid": self.pid, "since": self.since})

    @classmethod
    def from_json(cls, text: str) -> LockInfo | None:
        try:
            d = json.loads(text)
        except ValueError:
            return None
        if not isinstance(d, dict):
            return None
        host, pid, since = d.get("host"), d.get("pid"), d.get("since")
        if isinstance(host, str) and isinstance(pid, int) and isinstance(since, str):
            return cls(host=host, pid=pid, since=since)
        return None

    @classmethod
    def mine(cls) -> LockInfo:
        now = dt.datetime.now().astimezone().isoformat(timespec="seconds")
        return cls(host=socket.gethostname(), pid=os.getpid(), since=now)


class LockHeld(Exception):
    """The site is open for editing elsewhere.  ``str()`` names the holder."""

    def __init__(self, site_path: str | os.PathLike[str], holder: LockInfo) -> None:
        self.path = Path(site_path)
        self.holder = holder
        super().__init__(
            f"{self.path.name} is open for editing by pid {holder.pid} on host "
            f"{holder.host} since {holder.since_text()}"
        )


class LockUnavailable(OSError):
    """The lock file could not be made (e.g. a read-only folder)."""


def _read_holder(fd: int) -> LockInfo | None:
    try:
        data = os.pread(fd, 4096, 0)
    except OSError:
        return None
    return LockInfo.from_json(data.decode("utf-8", "replace"))


class SiteLock:
    """An exclusive editing lock on one site file; see the module docstring."""

    def __init__(self, site_path: Path, fd: int, info: LockInfo, took_over: LockInfo | None):
        self.site_path = site_path
        self.path = lock_path(site_path)
        self.info = info
        #: The details of a dead holder whose lock file was taken over, if any.
        self.took_over = took_over
        self._fd: int | None = fd

    @property
    def held(self) -> bool:
        return self._fd is not None

    @classmethod
    def acquire(cls, site_path: str | os.PathLike[str]) -> SiteLock:
        """Take the lock or raise :class:`LockHeld` (or :class:`LockUnavailable`)."""
        sp = Path(site_path)
        lp = lock_path(sp)
        for _ in range(20):
            try:
                fd = os.open(lp, os.O_RDWR | os.O_CREAT | getattr(os, "O_CLOEXEC", 0), 0o644)
            except OSError as exc:
                raise LockUnavailable(exc.errno, exc.strerror, str(lp)) from exc
            try:
                fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
            except BlockingIOError:
                holder = _wait_for_holder(fd)
                os.close(fd)
                raise LockHeld(sp, holder) from None
            except OSError as exc:
                os.close(fd)
                raise LockUnavailable(exc.errno, exc.strerror, str(lp)) from exc
            # The file may have been removed (released) between our open and our lock.
            try:
                st_path = os.stat(lp)
            except FileNotFoundError:
                os.close(fd)
                continue
            st_fd = os.fstat(fd)
            if (st_path.st_dev, st_path.st_ino) != (st_fd.st_dev, st_fd.st_ino):
                os.close(fd)
                continue
            previous = _read_holder(fd)
            info = LockInfo.mine()
            try:
                data = info.to_json().encode("utf-8")
                os.ftruncate(fd, 0)
                os.pwrite(fd, data, 0)
                os.fsync(fd)
            except OSError as exc:
                os.close(fd)
                raise LockUnavailable(exc.errno, exc.strerror, str(lp)) from exc
            return cls(sp, fd, info, previous)
        raise LockUnavailable(errno.EAGAIN, "the lock file keeps changing", str(lp))

    def release(self) -> None:
        """Give up the lock and remove the lock file (safe to call twice)."""
        fd, self._fd = self._fd, None
        if fd is None:
            return
        with contextlib.suppress(OSError):
            st_path = os.stat(self.path)
            st_fd = os.fstat(fd)
            if (st_path.st_dev, st_path.st_ino) == (st_fd.st_dev, st_fd.st_ino):
                os.unlink(self.path)
        os.close(fd)


def _wait_for_holder(fd: int) -> LockInfo:
    """The holder's details; a holder that has just taken the lock may not have written them yet."""
    deadline = time.monotonic() + _HOLDER_WAIT_S
    while True:
        holder = _read_holder(fd)
        if holder is not None:
            return holder
        if time.monotonic() > deadline:
            return LockInfo(host="an unknown host", pid=0, since="")
        time.sleep(0.01)
