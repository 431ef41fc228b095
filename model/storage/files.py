"""Files on disk: reading a site file safely and the one atomic writer.

:func:`write_atomic` is the only way tripwise replaces or creates a file it
must never leave half-written (site files, their journals, documents): the
data go to a temporary file in the same folder, synced to disk; the current
file may be kept as ``<name>.bak``; the temporary file is renamed into place
and the folder is synced.  A failure at any step leaves the target as it was,
no temporary file behind, and raises :class:`SaveError` saying in plain words
what failed and where.
"""

from __future__ import annotations

import contextlib
import errno
import os
import stat
from pathlib import Path

from model.site.messages import one_line
from model.storage.codec import SiteLoadError
from model.storage.sidefiles import side_path, temp_name

#: Largest site file that is read. [bytes]
MAX_FILE_BYTES = 50 * 1024 * 1024
#: Suffix of the one backup kept beside a site file (``site.json.bak``).
BACKUP_SUFFIX = ".bak"

_PLAIN_ERRNO = {
    errno.ENOSPC: "the disk is full",
    errno.EDQUOT: "the disk quota is used up",
    errno.EACCES: "permission denied",
    errno.EPERM: "permission denied",
    errno.EROFS: "the folder is on a read-only disk",
    errno.EIO: "the disk reported an input/output error",
    errno.ENOENT: "the folder does not exist",
    errno.ENOTDIR: "a part of the path is not a folder",
    errno.EISDIR: "a folder has that name",
    errno.ENAMETOOLONG: "the name is too long",
    errno.EFBIG: "the file is too large for this disk (or the file size limit of this shell)",
    errno.ELOOP: "a symbolic link loops, or is not followed here",
}


def plain_os_error(exc: OSError) -> str:
    """A short, plain-words reason for an operating-system error."""
    if exc.errno in _PLAIN_ERRNO:
        return _PLAIN_ERRNO[exc.errno]
    return (exc.strerror or str(exc) or type(exc).__name__).lower()


class SaveError(Exception):
    """A file could not be saved; the file on disk was left as it was.

    ``str()`` is one line in plain words: what failed and where.  The
    operating-system error behind it, if any, is :attr:`os_error`.
    """

    def __init__(
        self, path: str | os.PathLike[str], step: str, reason: str, *, unchanged: bool = True
    ) -> None:
        self.path = str(path)
        self.step = step
        self.reason = reason
        self.unchanged = unchanged
        tail = (
            "the file on disk was not changed"
            if unchanged
            else "the new version is in place but may not survive a power cut"
        )
        super().__init__(one_line(f"could not save {self.path}: {reason} ({step}); {tail}"))

    @property
    def os_error(self) -> OSError | None:
        """The operating-system error that made the save fail (None when there was none)."""
        cause = self.__cause__
        return cause if isinstance(cause, OSError) else None


class TargetExists(FileExistsError):
    """:func:`write_atomic` was asked not to replace a file, and the file exists."""


def canonical_path(path: str | os.PathLike[str]) -> Path:
    """The path as given, or its real path when symbolic links are involved.

    Two editors reaching one file by different links must find the same lock
    and journal.
    """
    given = Path(path)
    real = Path(os.path.realpath(given))
    return given if real == Path(os.path.abspath(given)) else real


def size_text(n: int) -> str:
    """A byte count as the user reads it: ``52,428,801 bytes (50.0 MiB)``."""
    return f"{n:,} bytes" + (f" ({n / 2**20:.1f} MiB)" if n >= 2**20 else "")


class FileRefused(Exception):
    """A file that is only read was refused; ``reason`` is a few plain words."""

    def __init__(self, path: str | os.PathLike[str], reason: str) -> None:
        self.path = Path(path)
        self.reason = reason
        super().__init__(f"{self.path}: {reason}")


def read_regular(
    path: str | os.PathLike[str], limit: int, *, follow_links: bool = True, what: str = "file"
) -> bytes:
    """The bytes of a regular file of at most ``limit`` bytes, or :class:`FileRefused`.

    Folders, devices (``/dev/zero``), pipes and sockets are refused before
    anything is read, so nothing can hang or fill the memory; with
    ``follow_links`` False a symbolic link is refused too.
    """
    flags = os.O_RDONLY | os.O_NONBLOCK | getattr(os, "O_CLOEXEC", 0)
    if not follow_links:
        flags |= os.O_NOFOLLOW
    try:
        fd = os.open(path, flags)
    except FileNotFoundError:
        raise FileRefused(path, "no such file") from None
    except OSError as exc:
        if exc.errno == errno.ELOOP and not follow_links:
            raise FileRefused(path, "is a symbolic link, not followed") from None
        raise FileRefused(path, plain_os_error(exc)) from None
    try:
        st = os.fstat(fd)
        if stat.S_ISDIR(st.st_mode):
            raise FileRefused(path, "is a folder, not a file")
        if not stat.S_ISREG(st.st_mode):
            raise FileRefused(
                path, f"is not a regular file (a device, pipe or socket); a {what} must be"
            )
        too_big = f"the limit is {size_text(limit)}"
        if st.st_size > limit:
            raise FileRefused(path, f"is {size_text(st.st_size)}; {too_big}")
        chunks: list[bytes] = []
        got = 0
        while got <= limit:
            chunk = os.read(fd, min(1 << 20, limit + 1 - got))
            if not chunk:
                break
            chunks.append(chunk)
            got += len(chunk)
        if got > limit:
            raise FileRefused(path, f"grew over the limit while read; {too_big}")
        return b"".join(chunks)
    except OSError as exc:
        raise FileRefused(path, plain_os_error(exc)) from None
    finally:
        os.close(fd)


def read_site_bytes(path: str | os.PathLike[str]) -> bytes:
    """The bytes of a site file, refusing folders, devices and files over the size limit."""
    try:
        return read_regular(path, MAX_FILE_BYTES, what="site file")
    except FileRefused as exc:
        raise SiteLoadError(Path(path), exc.reason) from None


def backup_path(path: str | os.PathLike[str]) -> Path:
    """Where the previous version of a site file is kept: ``<name>.bak`` beside it."""
    return side_path(path, BACKUP_SUFFIX)


def fsync_dir(folder: Path) -> None:
    """Make a rename or unlink in ``folder`` durable (a no-op where folders cannot be synced)."""
    try:
        fd = os.open(folder, os.O_RDONLY | getattr(os, "O_DIRECTORY", 0))
    except OSError:
        return
    try:
        os.fsync(fd)
    except OSError as exc:
        if exc.errno not in (errno.EINVAL, errno.ENOTSUP, errno.EBADF):
            raise
    finally:
        os.close(fd)


def write_new_file(tmp: Path, data: bytes, mode: int | None) -> None:
    """Create ``tmp`` (it must not exist), write all of ``data`` and sync it to disk."""
    flags = os.O_WRONLY | os.O_CREAT | os.O_EXCL | os.O_NOFOLLOW | getattr(os, "O_CLOEXEC", 0)
    fd = os.open(tmp, flags, 0o666)
    try:
        if mode is not None:
            os.fchmod(fd, stat.S_IMODE(mode))
        view = memoryview(data)
        while view:
            n = os.write(fd, view)
            view = view[n:]
        os.fsync(fd)
    finally:
        os.close(fd)


def _unlink_quietly(p: Path) -> None:
    with contextlib.suppress(OSError):
        p.unlink()


def copy_aside(src: Path, dest: Path) -> None:
    """Make ``dest`` a durable copy of ``src`` (a hard link where the disk allows), atomically."""
    tmp = temp_name(dest)
    try:
        try:
            os.link(src, tmp)
        except OSError:
            write_new_file(tmp, src.read_bytes(), src.stat().st_mode)
        os.replace(tmp, dest)
    except BaseException:
        _unlink_quietly(tmp)
        raise


def _place_new(tmp: Path, target: Path, shown: Path) -> None:
    """Give ``tmp`` the name ``target`` only if nothing has that name, even at the same moment."""
    try:
        os.link(tmp, target)
    except FileExistsError:
        raise TargetExists(errno.EEXIST, "already exists", str(shown)) from None
    except OSError:  # a disk without hard links: claim the name first, then rename over it
        try:
            fd = os.open(target, os.O_WRONLY | os.O_CREAT | os.O_EXCL, 0o666)
        except FileExistsError:
            raise TargetExists(errno.EEXIST, "already exists", str(shown)) from None
        os.close(fd)
        try:
            os.replace(tmp, target)
        except BaseException:
            _unlink_quietly(target)  # the empty file that claimed the name
            raise
    else:
        tmp.unlink()


def write_atomic(
    target: str | os.PathLike[str],
    data: bytes,
    *,
    replace: bool,
    backup: bool,
    mode: int | None = None,
    follow_links: bool = True,
) -> None:
    """Put ``data`` at ``target``: afterwards the file holds either the old or the new bytes.

    - ``replace``: an existing file may be replaced; without it an existing
      file (even one another program creates at the same moment) is refused
      with :class:`TargetExists`, a ``FileExistsError``.
    - ``backup``: the file replaced is kept as ``<name>.bak`` (see
      :func:`backup_path`), itself replaced atomically.
    - ``mode``: the new file's permission bits; None keeps those of the file
      replaced (a new file gets the usual ``0o666`` less the umask).

    - ``follow_links``: a symbolic link at ``target`` is followed and the file
      it names is replaced (how a site file is saved); without it the link
      itself is replaced (how a document is written, so a link never leads a
      document over another file).
    When the file already holds exactly ``data`` nothing is written (and the
    backup keeps the version before).  Any failure raises :class:`SaveError`
    (``unchanged`` is False only when the folder could not be synced after
    the new version took the name) and leaves no temporary file behind.
    """
    shown = Path(target)
    p = Path(os.path.realpath(target) if follow_links else os.path.abspath(target))
    folder = p.parent
    step = "reading the current file"
    tmp = temp_name(p)
    try:
        try:
            st = p.stat() if follow_links else p.lstat()
        except FileNotFoundError:
            st = None
        if st is not None and not follow_links and stat.S_ISLNK(st.st_mode):
            if not replace:
                raise TargetExists(errno.EEXIST, "already exists", str(shown))
            st = None  # the link itself is replaced by a new file
        if st is not None:
            if not replace:
                raise TargetExists(errno.EEXIST, "already exists", str(shown))
            if mode is None:
                mode = st.st_mode
            if st.st_size == len(data) and p.read_bytes() == data:
                return  # already saved: keep the backup of the version before
        step = f"writing a temporary file in {folder}"
        write_new_file(tmp, data, mode)
        if st is not None and backup:
            step = f"keeping the previous version as {backup_path(p).name}"
            copy_aside(p, backup_path(p))
        step = f"putting the new version in place in {folder}"
        if replace:
            os.replace(tmp, p)
        else:
            _place_new(tmp, p, shown)
    except FileExistsError:
        _unlink_quietly(tmp)
        raise
    except OSError as exc:
        _unlink_quietly(tmp)
        raise SaveError(shown, step, plain_os_error(exc)) from exc
    except BaseException:
        _unlink_quietly(tmp)
        raise
    try:
        fsync_dir(folder)
    except OSError as exc:
        raise SaveError(
            shown, f"syncing the folder {folder}", plain_os_error(exc), unchanged=False
        ) from exc
