"""The recovery journal: every accepted edit on disk before it is shown as saved.

Beside ``site.json`` the editor keeps ``site.json.tripwise-journal``, a file
of JSON lines.  The first line is a header naming the digest of the site file
the edits apply to::

    {"journal": "tripwise.journal", "version": 1, "base": "sha256:…"}

and each further line is one edit (an op of :mod:`model.site.ops`), appended
and synced to disk before the edit is reported as saved.

A full save first appends ``{"saving": "sha256:…"}`` (the digest the file is
about to have), then replaces the file, then removes the journal; a journal
found with a ``saving`` digest equal to the file's is already in the file.
A last line cut off by a crash is ignored with a warning; so is a damaged line.
A journal grown large is compacted into one whole-site entry.
"""

from __future__ import annotations

import contextlib
import datetime as dt
import errno
import json
import os
from collections.abc import Iterator
from dataclasses import dataclass, field
from pathlib import Path

from pydantic import ValidationError

from model.site.messages import describe_validation_error
from model.site.models import SiteFile
from model.site.ops import Op, ReplaceSite, op_from_dict, op_to_dict
from model.storage.files import (
    FileRefused,
    SaveError,
    fsync_dir,
    plain_os_error,
    read_regular,
    write_atomic,
)
from model.storage.sidefiles import JOURNAL_SUFFIX as JOURNAL_SUFFIX
from model.storage.sidefiles import fit_name
from model.storage.sidefiles import journal_path as journal_path

JOURNAL_FORMAT = "tripwise.journal"
JOURNAL_VERSION = 1
#: A journal larger than this is rewritten as one whole-site entry. [bytes]
COMPACT_BYTES = 8 * 1024 * 1024
#: Largest journal that is read back. [bytes]
MAX_JOURNAL_BYTES = 256 * 1024 * 1024


#: Opening a journal to append: never through a symbolic link, never blocking on a pipe.
_WRITE_NO_LINK = os.O_WRONLY | os.O_NOFOLLOW | os.O_NONBLOCK | getattr(os, "O_CLOEXEC", 0)


@dataclass
class JournalContents:
    """What a journal file holds, read without changing it."""

    path: Path
    #: Digest of the site file the ops apply to (None when the header is unreadable).
    base: str | None
    ops: list[Op] = field(default_factory=list)
    #: Digests of full saves that were begun while this journal was in use.
    saving: list[str] = field(default_factory=list)
    warnings: list[str] = field(default_factory=list)
    #: Bytes up to the end of the last whole line (a torn tail starts here).
    good_size: int = 0
    #: Why the journal was not read at all (a link, a pipe, too large ...), or None.
    refused: str | None = None


def _header(base: str) -> bytes:
    return (
        json.dumps({"journal": JOURNAL_FORMAT, "version": JOURNAL_VERSION, "base": base}) + "\n"
    ).encode("utf-8")


def _lines(data: bytes) -> Iterator[tuple[int, bytes, int]]:
    """(line number, line bytes, offset just past its newline) for each whole line."""
    pos = 0
    lineno = 0
    while True:
        nl = data.find(b"\n", pos)
        if nl < 0:
            return
        lineno += 1
        yield lineno, data[pos:nl], nl + 1
        pos = nl + 1


def read_journal(path: str | os.PathLike[str]) -> JournalContents | None:
    """Read a journal (None when there is none).  Never raises for damaged content."""
    jp = Path(path)
    if not os.path.lexists(jp):
        return None
    try:
        data = read_regular(jp, MAX_JOURNAL_BYTES, follow_links=False, what="recovery journal")
    except FileRefused as exc:
        out = JournalContents(jp, None)
        out.refused = exc.reason
        out.warnings.append(f"the recovery journal {jp.name} was not read: {exc.reason}")
        return out
    out = JournalContents(jp, None)
    for lineno, line, end in _lines(data):
        out.good_size = end
        try:
            item = json.loads(line.decode("utf-8"))
        except (UnicodeDecodeError, ValueError, RecursionError):
            item = None
        if lineno == 1:
            if (
                isinstance(item, dict)
                and item.get("journal") == JOURNAL_FORMAT
                and item.get("version") == JOURNAL_VERSION
                and isinstance(item.get("base"), str)
            ):
                out.base = item["base"]
                continue
            out.warnings.append(
                f"the recovery journal {jp.name} is not one this tripwise can read; it was ignored"
            )
            return out
        if item is None:
            out.warnings.append(
                f"entry {lineno} of the recovery journal is damaged and was ignored"
            )
            continue
        if isinstance(item, dict) and isinstance(item.get("saving"), str) and len(item) == 1:
            out.saving.append(item["saving"])
            continue
        try:
            out.ops.append(op_from_dict(item))
        except ValidationError as exc:
            out.warnings.append(
                f"entry {lineno} of the recovery journal is not a valid edit and was ignored "
                f"({describe_validation_error(exc, item)})"
            )
    if out.good_size < len(data):
        if out.base is None and out.good_size == 0:
            out.warnings.append(
                f"the recovery journal {jp.name} was cut off before its first line; it was ignored"
            )
        else:
            out.warnings.append(
                "the last entry of the recovery journal was cut off (tripwise stopped while "
                "writing it) and was ignored"
            )
    return out


class JournalWriter:
    """Appends ops to a site's journal, each synced to disk before ``append`` returns."""

    def __init__(self, site_path: Path, base: str, *, existing_size: int | None = None) -> None:
        self.path = journal_path(site_path)
        self.base = base
        self._fd: int | None = None
        self._size = 0
        if existing_size is not None:
            self._open_existing(existing_size)

    @property
    def size(self) -> int:
        """Bytes in the journal now (0 when there is none)."""
        return self._size if self._fd is not None else 0

    def _open_existing(self, good_size: int) -> None:
        fd = os.open(self.path, _WRITE_NO_LINK)
        try:
            if os.fstat(fd).st_size != good_size:  # drop a torn tail before appending
                os.ftruncate(fd, good_size)
                os.fsync(fd)
        except BaseException:
            os.close(fd)
            raise
        self._fd = fd
        self._size = good_size

    def _start(self, first_lines: bytes = b"") -> None:
        """Put a fresh journal (header and ``first_lines``) in place atomically.

        Raises the ``OSError`` behind a failure: the callers say what they were doing.
        """
        try:
            write_atomic(
                self.path,
                _header(self.base) + first_lines,
                replace=True,
                backup=False,
                follow_links=False,
            )
        except SaveError as exc:
            raise exc.os_error or OSError(exc.reason) from None
        fd = os.open(self.path, _WRITE_NO_LINK)
        self._close_fd()
        self._fd = fd
        self._size = os.fstat(fd).st_size

    def append(self, op: Op) -> None:
        """Write one op and sync it; raises :class:`SaveError` and leaves no partial line."""
        line = (json.dumps(op_to_dict(op), ensure_ascii=False) + "\n").encode("utf-8")
        try:
            if self._fd is None:
                self._start(line)
                return
            start = self._size
            try:
                view = memoryview(line)
                off = start
                while view:
                    n = os.pwrite(self._fd, view, off)
                    view = view[n:]
                    off += n
                _datasync(self._fd)
            except OSError:
                with contextlib.suppress(OSError):
                    os.ftruncate(self._fd, start)
                    _datasync(self._fd)
                raise
            self._size = start + len(line)
        except OSError as exc:
            raise SaveError(
                self.path,
                f"recording the edit in the recovery journal {self.path.name}",
                plain_os_error(exc),
            ) from exc

    def mark_saving(self, digest: str) -> None:
        """Record, before a full save replaces the file, the digest the file is about to get.

        A save cut off after its rename but before :meth:`clear` then leaves
        a journal whose every entry is known to be in the file.
        """
        if self._fd is None:
            return
        line = (json.dumps({"saving": digest}) + "\n").encode("utf-8")
        try:
            os.pwrite(self._fd, line, self._size)
            _datasync(self._fd)
        except OSError as exc:
            with contextlib.suppress(OSError):
                os.ftruncate(self._fd, self._size)
            raise SaveError(
                self.path, f"updating the recovery journal {self.path.name}", plain_os_error(exc)
            ) from exc
        self._size += len(line)

    def compact(self, site: SiteFile) -> None:
        """Rewrite the journal as one whole-site entry (keeps it small after many edits)."""
        line = (json.dumps(op_to_dict(ReplaceSite(site=site)), ensure_ascii=False) + "\n").encode(
            "utf-8"
        )
        try:
            self._start(line)
        except OSError as exc:
            raise SaveError(
                self.path, "compacting the recovery journal", plain_os_error(exc)
            ) from exc

    def clear(self, new_base: str) -> None:
        """Remove the journal after a full save; later ops start a journal on ``new_base``."""
        self._close_fd()
        self.base = new_base
        with contextlib.suppress(FileNotFoundError):
            self.path.unlink()
        fsync_dir(self.path.parent)

    def _close_fd(self) -> None:
        fd, self._fd = self._fd, None
        if fd is not None:
            with contextlib.suppress(OSError):
                os.close(fd)

    def close(self) -> None:
        """Stop writing (the journal stays on disk)."""
        self._close_fd()


def _datasync(fd: int) -> None:
    sync = getattr(os, "fdatasync", os.fsync)
    sync(fd)


def move_aside(path: Path, label: str) -> Path | None:
    """Rename a journal that cannot be applied to ``<site>.<label>-<time>.tripwise-journal``."""
    stamp = dt.datetime.now().strftime("%Y%m%dT%H%M%S")
    stem = path.name[: -len(JOURNAL_SUFFIX)] if path.name.endswith(JOURNAL_SUFFIX) else path.name
    for n in range(100):
        extra = "" if n == 0 else f"-{n}"
        dest = path.with_name(fit_name(stem, f".{label}-{stamp}{extra}{JOURNAL_SUFFIX}"))
        if dest.exists():
            continue
        try:
            os.link(path, dest)
            os.unlink(path)
        except FileExistsError:
            continue
        except OSError as exc:
            if exc.errno in (errno.EPERM, errno.ENOTSUP, errno.EXDEV):
                os.replace(path, dest)
            else:
                return None
        fsync_dir(path.parent)
        return dest
    return None
