"""The names of the files kept beside a site file, made to fit the disk's name limit.

A site file ``site.json`` has side files named after it: ``site.json.bak``,
``site.json.tripwise-journal``, ``site.json.tripwise-lock``, version backups
and temporary files.  A name may hold at most :data:`NAME_MAX` bytes on the
usual disks, so a site file with a long (legal) name would get side names
the disk refuses.  :func:`fit_name` keeps today's name whenever it fits; only
a name that would be too long is shortened to the start of the site file's
name, ``~`` and 12 hex digits of the SHA-256 of its whole name, so it stays
unique and is the same every time.

Temporary files carry the writing process's id and a token of that process
(its start time where the system gives one), so a file left by a process
that ended is recognised even when a new process has the same id.
"""

from __future__ import annotations

import hashlib
import os
import re
import secrets
import stat
from pathlib import Path

#: Longest file name, in bytes, on the usual disks (ext4, XFS, APFS, NTFS via UTF-8).
NAME_MAX = 255
#: Bytes kept free after a temporary file's stem for ``.<pid>-<token>-<8 hex>.tmp``.
_TEMP_TAIL_MAX = 40

#: ``.<stem>.<pid>-<token>-<8 hex>.tmp`` (files written before the token: ``.<stem>.<pid>-<8 hex>.tmp``).
_TEMP_NAME = re.compile(
    r"^\.(?P<stem>.+)\.(?P<pid>\d+)(?:-(?P<token>[0-9a-z]+))?-[0-9a-f]{8}\.tmp$", re.DOTALL
)


def _nbytes(name: str) -> int:
    return len(os.fsencode(name))


def _head(name: str, max_bytes: int) -> str:
    """The longest start of ``name`` (whole characters) of at most ``max_bytes`` bytes."""
    out: list[str] = []
    used = 0
    for ch in name:
        n = _nbytes(ch)
        if used + n > max_bytes:
            break
        out.append(ch)
        used += n
    return "".join(out)


def fit_name(base: str, suffix: str, *, prefix: str = "", reserve: int = 0) -> str:
    """``prefix + base + suffix`` when it fits in :data:`NAME_MAX` bytes (less ``reserve``).

    Otherwise ``base`` is cut to its start and followed by ``~`` and 12 hex
    digits of its SHA-256, so the name fits and is the same each time.
    """
    room = NAME_MAX - reserve
    whole = prefix + base + suffix
    if _nbytes(whole) <= room:
        return whole
    tag = "~" + hashlib.sha256(os.fsencode(base)).hexdigest()[:12]
    keep = room - _nbytes(prefix + tag + suffix)
    return prefix + _head(base, max(keep, 0)) + tag + suffix


def side_path(site_path: str | os.PathLike[str], suffix: str) -> Path:
    """The side file of a site file with this suffix (``.bak``, ``.tripwise-lock`` ...)."""
    p = Path(site_path)
    return p.with_name(fit_name(p.name, suffix))


#: Suffix of the recovery journal beside a site file (``site.json.tripwise-journal``).
JOURNAL_SUFFIX = ".tripwise-journal"


def journal_path(site_path: str | os.PathLike[str]) -> Path:
    """The recovery journal of a site file (:mod:`model.storage.journal` reads and writes it;
    named here so that a command that only reads a site need not import the journal)."""
    return side_path(site_path, JOURNAL_SUFFIX)


# --- temporary files ----------------------------------------------------------


def _start_token(pid: int) -> str | None:
    """A token that tells this process from a later one with the same id (its start time)."""
    try:
        with open(f"/proc/{pid}/stat", "rb") as fh:
            data = fh.read(4096)
        fields = data[data.rindex(b")") + 2 :].split()
        return _base36(int(fields[19]))  # field 22, the start time in clock ticks
    except (OSError, ValueError, IndexError):
        return None


def _base36(n: int) -> str:
    digits = "0123456789abcdefghijklmnopqrstuvwxyz"
    out = ""
    while True:
        n, r = divmod(n, 36)
        out = digits[r] + out
        if n == 0:
            return out


_MY_TOKEN: dict[int, str] = {}


def process_token() -> str:
    """This process's token (its start time, or a random one where the system has none)."""
    pid = os.getpid()
    if pid not in _MY_TOKEN:  # a forked child gets its own
        _MY_TOKEN[pid] = _start_token(pid) or "r" + secrets.token_hex(4)
    return _MY_TOKEN[pid]


def temp_stem(target_name: str) -> str:
    """The part of a temporary file's name that stands for its target."""
    return fit_name(target_name, "", prefix=".", reserve=_TEMP_TAIL_MAX)[1:]


def temp_name(target: Path) -> Path:
    """A fresh temporary file beside ``target`` (named after it, this process and a token)."""
    tail = f".{os.getpid()}-{process_token()}-{secrets.token_hex(4)}.tmp"
    return target.with_name(f".{temp_stem(target.name)}{tail}")


def temp_file_of(name: str) -> tuple[str, int, str | None] | None:
    """For a name made by :func:`temp_name`: the target's stem, the writer's id and token."""
    m = _TEMP_NAME.match(name)
    if m is None:
        return None
    return m.group("stem"), int(m.group("pid")), m.group("token")


def writer_running(pid: int, token: str | None) -> bool:
    """True when the process that wrote a temporary file may still be running."""
    if pid == os.getpid():
        return False  # this process is not saving while it looks (or an earlier one had its id)
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except OSError:
        pass  # it exists but belongs to someone else
    if token is None or token.startswith("r"):
        return True
    now = _start_token(pid)
    return now is None or now == token


# --- files that only tripwise's site saving may write ---------------------------

#: Suffixes of the side files that name a site's lock and journal.
_WORK_SUFFIXES = (".tripwise-lock", JOURNAL_SUFFIX)
_BACKUP = re.compile(r"^(?P<site>.+?)(?:\.v\d+)?\.bak$", re.DOTALL)
_SNIFF_BYTES = 4096


def looks_like_site_file(path: str | os.PathLike[str]) -> bool:
    """True when ``path`` is a regular file whose start names the tripwise site format.

    A symbolic link is not followed: a document written there replaces the link.
    """
    try:
        fd = os.open(
            path, os.O_RDONLY | os.O_NONBLOCK | os.O_NOFOLLOW | getattr(os, "O_CLOEXEC", 0)
        )
    except OSError:
        return False
    try:
        if not stat.S_ISREG(os.fstat(fd).st_mode):
            return False
        head = os.read(fd, _SNIFF_BYTES)
    except OSError:
        return False
    finally:
        os.close(fd)
    return b'"tripwise.site"' in head


def protected_reason(path: str | os.PathLike[str], *, sites_too: bool = True) -> str | None:
    """Why no document or copy may be written at ``path`` (None when it may).

    A site's lock, journal and backups are written only by its editing
    session; with ``sites_too`` a site file itself is protected as well.
    """
    p = Path(path)
    name = p.name
    if name.endswith(_WORK_SUFFIXES):
        return "it is the name of a site's lock or recovery journal"
    m = _BACKUP.match(name)
    if m is not None and (os.path.lexists(p.with_name(m.group("site"))) or looks_like_site_file(p)):
        return "it is a site file's backup"
    if sites_too and looks_like_site_file(p):
        return "it is a site file"
    return None
