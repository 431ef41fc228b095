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

The lock file is never opened through a symbolic link (a planted link would
otherwise lead the holder's details over another file) and must be a
regular file.  Besides the lock file, the editor holds an ``flock`` on the
site file itself, i.e. on its identity (device and inode): a second editor
reaching the same file by another name (a hard link) is refused too, and
named from the system's lock table where it has one (``/proc/locks``).

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
import stat
import time
from dataclasses import dataclass
from pathlib import Path

from model.storage.sidefiles import side_path

#: Suffix of the lock file beside a site file (``site.json.tripwise-lock``).
LOCK_SUFFIX = ".tripwise-lock"

_HOLDER_WAIT_S = 0.5


def lock_path(site_path: str | os.PathLike[str]) -> Path:
    """The lock file of a site file."""
    return side_path(site_path, LOCK_SUFFIX)


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

    def __init__(
        self, site_path: str | os.PathLike[str], holder: LockInfo, *, other_name: bool = False
    ) -> None:
        self.path = Path(site_path)
        self.holder = holder
        since = f" since {holder.since_text()}" if holder.since else ""
        via = " under another name (a hard link to the same file)" if other_name else ""
        super().__init__(
            f"{self.path.name} is open for editing{via} by pid {holder.pid} on host "
            f"{holder.host}{since}"
        )


class LockUnavailable(OSError):
    """The lock file could not be made (e.g. a read-only folder, a planted link)."""

    def __init__(
        self, err: int | None, reason: str | None, filename: str, *, plain: str | None = None
    ) -> None:
        super().__init__(err, reason, filename)
        #: Plain words for a refusal that is not an operating-system failure.
        self.plain = plain


_OPEN_LOCK = os.O_RDWR | os.O_CREAT | os.O_NOFOLLOW | os.O_NONBLOCK | getattr(os, "O_CLOEXEC", 0)
_NOT_FOLLOWED = "it is a symbolic link, which tripwise never follows (remove it if nobody meant it)"


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
        #: The open site file whose identity is held, and that identity.
        self._file_fd: int | None = None
        self._ident: tuple[int, int] | None = None

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
                fd = os.open(lp, _OPEN_LOCK, 0o644)
            except OSError as exc:
                plain = _NOT_FOLLOWED if exc.errno == errno.ELOOP else None
                raise LockUnavailable(exc.errno, exc.strerror, str(lp), plain=plain) from exc
            if not stat.S_ISREG(os.fstat(fd).st_mode):
                os.close(fd)
                raise LockUnavailable(
                    errno.EINVAL, "not a regular file", str(lp), plain="it is not a regular file"
                )
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
                st_path = os.lstat(lp)
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
                _unlink_if_same(lp, fd)  # no empty lock file is left behind
                os.close(fd)
                raise LockUnavailable(exc.errno, exc.strerror, str(lp)) from exc
            lock = cls(sp, fd, info, previous)
            try:
                lock.follow_file()
            except BaseException:
                lock.release()
                raise
            return lock
        raise LockUnavailable(errno.EAGAIN, "the lock file keeps changing", str(lp))

    def follow_file(self) -> None:
        """Hold the site file's identity (device, inode): call after each save replaces it.

        Raises :class:`LockHeld` when another editor holds the same file under
        another name.  Nothing is held while the file does not exist yet.
        """
        try:
            fd = os.open(self.site_path, os.O_RDONLY | os.O_NONBLOCK | getattr(os, "O_CLOEXEC", 0))
        except OSError:
            return
        st = os.fstat(fd)
        ident = (st.st_dev, st.st_ino)
        if not stat.S_ISREG(st.st_mode) or ident == self._ident:
            os.close(fd)
            return
        try:
            fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
        except BlockingIOError:
            os.close(fd)
            raise LockHeld(self.site_path, _flock_holder(st), other_name=True) from None
        except OSError:
            os.close(fd)  # a disk without flock: the lock file alone guards the path
            return
        old, self._file_fd, self._ident = self._file_fd, fd, ident
        if old is not None:
            os.close(old)

    def release(self) -> None:
        """Give up the lock and remove the lock file (safe to call twice)."""
        file_fd, self._file_fd, self._ident = self._file_fd, None, None
        if file_fd is not None:
            os.close(file_fd)
        fd, self._fd = self._fd, None
        if fd is None:
            return
        _unlink_if_same(self.path, fd)
        os.close(fd)


def _unlink_if_same(path: Path, fd: int) -> None:
    """Remove ``path`` if it is still the file open as ``fd`` (the lock is held)."""
    with contextlib.suppress(OSError):
        st_path = os.lstat(path)
        st_fd = os.fstat(fd)
        if (st_path.st_dev, st_path.st_ino) == (st_fd.st_dev, st_fd.st_ino):
            os.unlink(path)


def _flock_holder(st: os.stat_result) -> LockInfo:
    """Who holds an ``flock`` on this file, from the system's lock table (Linux)."""
    want = (os.major(st.st_dev), os.minor(st.st_dev), st.st_ino)
    host = socket.gethostname()
    try:
        with open("/proc/locks", encoding="ascii", errors="replace") as fh:
            for line in fh:
                parts = line.split()
                if "->" in parts or len(parts) < 6 or parts[1] != "FLOCK":
                    continue
                try:
                    major, minor, ino = parts[5].split(":")
                    if (int(major, 16), int(minor, 16), int(ino)) == want:
                        return LockInfo(host=host, pid=int(parts[4]), since="")
                except ValueError:
                    continue
    except OSError:
        pass
    return LockInfo(host=host, pid=0, since="")


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
