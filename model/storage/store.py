"""Reading and writing site files.

``load_site`` never modifies the file it reads and turns every problem into a
:class:`SiteLoadError` with a one-line message naming the file and where in it
the problem is.  ``dumps_site`` is the canonical text of a site: the same site
always gives the same bytes.  ``save_site`` replaces a file atomically and
keeps the previous version beside it as ``<name>.bak``; a save that fails
raises :class:`SaveError` and leaves the file on disk as it was.

Nothing in a site file is ever executed or evaluated: it is read with the JSON
parser only, and every value is then checked by the models in
:mod:`model.site.models`.

Format versions: a file newer than :data:`~model.site.terms.FORMAT_VERSION` is
refused; an older one is converted in memory by the functions in
:data:`MIGRATIONS` (one per version step) and is written in the current
version only when it is next saved.
"""

from __future__ import annotations

import contextlib
import errno
import hashlib
import json
import os
import re
import secrets
import stat
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from pydantic import ValidationError

from model.site.messages import error_text
from model.site.models import SiteFile
from model.site.terms import FORMAT_NAME, FORMAT_VERSION, ID_RULE

#: Largest site file that is read. [bytes]
MAX_FILE_BYTES = 50 * 1024 * 1024
#: Suffix of the one backup kept beside a site file (``site.json.bak``).
BACKUP_SUFFIX = ".bak"

_CONTROL = {c: f"\\x{c:02x}" for c in range(32)} | {10: "\\n", 13: "\\r", 9: " "}


def one_line(text: str) -> str:
    """``text`` with line breaks and control characters escaped, so it prints as one line."""
    return text.translate(_CONTROL)


class SiteLoadError(Exception):
    """A site file could not be loaded.  ``str()`` is one line fit for a user."""

    def __init__(self, path: str | os.PathLike[str] | None, message: str) -> None:
        self.path = None if path is None else str(path)
        self.message = one_line(message)
        super().__init__(f"{one_line(self.path)}: {self.message}" if self.path else self.message)


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
    errno.EFBIG: "the file is too large for this disk",
}


def plain_os_error(exc: OSError) -> str:
    """A short, plain-words reason for an operating-system error."""
    if exc.errno in _PLAIN_ERRNO:
        return _PLAIN_ERRNO[exc.errno]
    return (exc.strerror or str(exc) or type(exc).__name__).lower()


class SaveError(Exception):
    """A site file could not be saved; the file on disk was left as it was.

    ``str()`` is one line in plain words: what failed and where.
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


def _shown_key(key: str) -> str:
    return key if key.isprintable() and len(key) <= 40 else repr(key[:40])


def _walk(loc: tuple[Any, ...], raw: Any) -> tuple[str, int]:
    """A JSON path like ``nodes[3] (rcd1).idn_ma`` for a pydantic error location.

    Also returns how many elements of ``loc`` name real places in the data; the
    rest are pydantic's labels of union members, which users never typed.
    """
    parts: list[str] = []
    cur = raw
    i = 0
    used = 0
    while i < len(loc):
        key = loc[i]
        if isinstance(key, int) and isinstance(cur, list):
            parts.append(f"[{key}]")
            nxt = cur[key] if 0 <= key < len(cur) else None
            if isinstance(nxt, dict) and isinstance(nxt.get("id"), str):
                node_id = nxt["id"]
                shown = (
                    node_id if node_id.isprintable() and len(node_id) <= 40 else repr(node_id[:40])
                )
                parts.append(f" ({shown})")
                # pydantic adds the union tag after a list index of a discriminated union
                if i + 1 < len(loc) and loc[i + 1] == nxt.get("kind"):
                    i += 1
            cur = nxt
        elif isinstance(cur, dict) and isinstance(key, str) and key in cur:
            parts.append(f".{_shown_key(key)}" if parts else _shown_key(key))
            cur = cur[key]
        elif isinstance(cur, dict) and isinstance(key, str) and i == len(loc) - 1:
            # a missing or extra field
            parts.append(f".{_shown_key(key)}" if parts else _shown_key(key))
            cur = None
        elif (
            isinstance(cur, dict)
            and i + 1 < len(loc)
            and isinstance(loc[i + 1], str)
            and loc[i + 1] in cur
        ):
            i += 1  # a tagged-union label in the middle of the path
            continue
        else:
            break
        i += 1
        used = i
    return "".join(parts), used


def _loc_text(loc: tuple[Any, ...], raw: Any) -> str:
    return _walk(loc, raw)[0] or "(top level)"


def describe_validation_error(exc: ValidationError, raw: Any) -> str:
    """One clause per problem, each with its JSON path; joined by '; '.

    Errors from the members of one union (a time or 'did not trip') are merged
    into one clause.
    """
    merged: dict[str, list[str]] = {}
    for err in exc.errors():
        loc = tuple(err.get("loc", ()))
        msg = error_text(err)
        if err.get("type") == "extra_forbidden":
            field = loc[-1] if loc else "?"
            msg = f"field {str(field)[:60]!r} is not allowed here"
            loc = loc[:-1]
        elif err.get("type") == "union_tag_invalid":
            msg = "unknown kind; " + msg
        elif err.get("type") == "string_pattern_mismatch" and loc and loc[-1] in ("id", "parent"):
            msg = f"an id is {ID_RULE}"
        elif err.get("type") == "missing":
            msg = "required field is missing"
        where, _ = _walk(loc, raw)
        msgs = merged.setdefault(where, [])
        if msg not in msgs:
            msgs.append(msg)
    out: list[str] = []
    for where, msgs in merged.items():
        text = " or ".join(msgs)
        out.append(f"{where}: {text}" if where else text)
    if len(out) > 5:
        out = [*out[:5], f"and {len(out) - 5} more"]
    return "; ".join(out)


#: Conversions of an older format to the next one: ``MIGRATIONS[v]`` takes the
#: parsed JSON of a version ``v`` file and returns the same site as version
#: ``v + 1``.  Only version 1 exists so far, so the table is empty; the tests
#: exercise it with a made-up version 0.
MIGRATIONS: dict[int, Callable[[dict[str, Any]], dict[str, Any]]] = {}

_MAX_NUMBER_DIGITS = 40


class _BadLiteral(ValueError):
    """A JSON number or constant refused while parsing; ``literal`` is its text."""

    def __init__(self, literal: str, message: str) -> None:
        super().__init__(message)
        self.literal = literal


def _parse_float(text: str) -> float:
    value = float(text)
    if value in (float("inf"), float("-inf")):
        raise _BadLiteral(text, f"number {text[:40]} is too large (numbers must be finite)")
    return value


def _parse_int(text: str) -> int:
    if len(text.lstrip("-")) > _MAX_NUMBER_DIGITS:
        raise _BadLiteral(text, f"number {text[:20]}… has more than {_MAX_NUMBER_DIGITS} digits")
    return int(text)


def _refuse_constant(name: str) -> Any:
    raise _BadLiteral(name, f"{name} is not allowed in a site file (numbers must be finite)")


def _line_col(text: str, index: int) -> tuple[int, int]:
    line = text.count("\n", 0, index) + 1
    return line, index - (text.rfind("\n", 0, index) + 1) + 1


def _where_literal(text: str, literal: str) -> str:
    """``at line L, column C: `` of the first place ``literal`` stands as a value."""
    pattern = r"(?<![\w.+-])" + re.escape(literal) + r"(?![\w.])"
    m = re.search(pattern, text)
    if m is None:
        return ""
    line, col = _line_col(text, m.start())
    return f"at line {line}, column {col}: "


def _no_duplicate_keys(pairs: list[tuple[str, Any]]) -> dict[str, Any]:
    out = dict(pairs)
    if len(out) != len(pairs):
        seen: set[str] = set()
        for key, _ in pairs:
            if key in seen:
                where = (
                    f" (in the object with id {out['id']!r})"
                    if isinstance(out.get("id"), str)
                    else ""
                )
                raise ValueError(f"key {key[:40]!r} appears twice in one object{where}")
            seen.add(key)
    return out


def _decode_json(data: str | bytes, path: str | os.PathLike[str] | None) -> Any:
    if isinstance(data, bytes):
        try:
            text = data.decode("utf-8")
        except UnicodeDecodeError as exc:
            line = data.count(b"\n", 0, exc.start) + 1
            raise SiteLoadError(path, f"not UTF-8 text at line {line} (byte {exc.start})") from None
    else:
        text = data
    if text.startswith("\ufeff"):  # a byte-order mark left by some editors
        text = text[1:]
    if not text.strip():
        raise SiteLoadError(path, "the file is empty")
    try:
        return json.loads(
            text,
            parse_constant=_refuse_constant,
            parse_float=_parse_float,
            parse_int=_parse_int,
            object_pairs_hook=_no_duplicate_keys,
        )
    except json.JSONDecodeError as exc:
        raise SiteLoadError(
            path, f"not valid JSON at line {exc.lineno}, column {exc.colno}: {exc.msg}"
        ) from None
    except RecursionError:
        raise SiteLoadError(path, "JSON nested too deeply") from None
    except _BadLiteral as exc:
        raise SiteLoadError(path, _where_literal(text, exc.literal) + str(exc)) from None
    except ValueError as exc:
        raise SiteLoadError(path, str(exc)) from None


def _file_version(raw: Any, path: str | os.PathLike[str] | None) -> int:
    if not isinstance(raw, dict):
        kind = {list: "a list", str: "a string", bool: "true/false"}.get(
            type(raw), "a single value"
        )
        raise SiteLoadError(
            path, f"not a tripwise site file (the top level is {kind}, not an object)"
        )
    if raw.get("format") != FORMAT_NAME:
        raise SiteLoadError(path, f'not a tripwise site file (no "format": "{FORMAT_NAME}")')
    version = raw.get("version")
    if not isinstance(version, int) or isinstance(version, bool):
        raise SiteLoadError(path, "version: must be a whole number")
    if version > FORMAT_VERSION:
        raise SiteLoadError(
            path,
            f"format version {version} is newer than this tripwise understands "
            f"({FORMAT_VERSION}); update tripwise to open it (the file was not changed)",
        )
    return version


def migrate(raw: dict[str, Any], path: str | os.PathLike[str] | None = None) -> dict[str, Any]:
    """Convert the parsed JSON of an older version, step by step, to the current one."""
    version = _file_version(raw, path)
    while version < FORMAT_VERSION:
        step = MIGRATIONS.get(version)
        if step is None:
            raise SiteLoadError(path, f"format version {version} is not a known version")
        try:
            raw = step(raw)
        except (KeyError, TypeError, ValueError, AttributeError, IndexError) as exc:
            raise SiteLoadError(
                path,
                f"could not convert format version {version} to {version + 1}: "
                f"{type(exc).__name__} {exc}",
            ) from None
        if not isinstance(raw, dict) or raw.get("version") != version + 1:
            raise SiteLoadError(path, f"converting format version {version} went wrong")
        version += 1
    return raw


def _validate(raw: dict[str, Any], path: str | os.PathLike[str] | None) -> SiteFile:
    try:
        return SiteFile.model_validate(raw)
    except ValidationError as exc:
        raise SiteLoadError(path, describe_validation_error(exc, raw)) from None
    except RecursionError:
        raise SiteLoadError(path, "JSON nested too deeply") from None


@dataclass(frozen=True)
class LoadedSite:
    """A site as read from disk, with what the editor needs to know about the file."""

    site: SiteFile
    #: Format version the file was written in (older ones are converted in memory).
    source_version: int
    #: ``sha256:<hex>`` of the file's bytes, to tell whether a journal belongs to it.
    digest: str


def digest_bytes(data: bytes) -> str:
    """The digest recorded in journals: ``sha256:<hex>``."""
    return "sha256:" + hashlib.sha256(data).hexdigest()


def parse_site_versioned(
    text: str | bytes, path: str | os.PathLike[str] | None = None
) -> tuple[SiteFile, int]:
    """Validate the text of a site file; also give the format version it was written in."""
    raw = _decode_json(text, path)
    version = _file_version(raw, path)
    if version < FORMAT_VERSION:
        raw = migrate(raw, path)
    return _validate(raw, path), version


def parse_site(text: str | bytes, path: str | os.PathLike[str] | None = None) -> SiteFile:
    """Validate the text of a site file (older format versions are converted in memory)."""
    return parse_site_versioned(text, path)[0]


def read_site_bytes(path: str | os.PathLike[str]) -> bytes:
    """The bytes of a site file, refusing folders, devices and files over the size limit."""
    p = Path(path)
    try:
        st = p.stat()
    except FileNotFoundError:
        raise SiteLoadError(p, "no such file") from None
    except OSError as exc:
        raise SiteLoadError(p, plain_os_error(exc)) from None
    if stat.S_ISDIR(st.st_mode):
        raise SiteLoadError(p, "is a folder, not a site file")
    if not stat.S_ISREG(st.st_mode):
        raise SiteLoadError(p, "is not a regular file")
    limit_mb = MAX_FILE_BYTES // 2**20
    too_big = f"site files are limited to {limit_mb} MB"
    if st.st_size > MAX_FILE_BYTES:
        raise SiteLoadError(p, f"file is {st.st_size / 2**20:.0f} MB; {too_big}")
    try:
        with open(p, "rb") as fh:
            data = fh.read(MAX_FILE_BYTES + 1)
    except OSError as exc:
        raise SiteLoadError(p, plain_os_error(exc)) from None
    if len(data) > MAX_FILE_BYTES:
        raise SiteLoadError(p, f"file is over {limit_mb} MB; {too_big}")
    return data


def read_site(path: str | os.PathLike[str]) -> LoadedSite:
    """Load a site file with its source version and digest.  The file is never modified."""
    data = read_site_bytes(path)
    site, version = parse_site_versioned(data, path)
    return LoadedSite(site=site, source_version=version, digest=digest_bytes(data))


def load_site(path: str | os.PathLike[str]) -> SiteFile:
    """Load and validate a site file.  The file is never modified."""
    return read_site(path).site


def site_to_dict(site: SiteFile) -> dict[str, Any]:
    """The JSON-ready form of a site, defaults left out."""
    d = site.model_dump(mode="json", exclude_defaults=True)
    d["format"] = FORMAT_NAME
    d["version"] = FORMAT_VERSION
    ordered: dict[str, Any] = {
        k: d[k] for k in ("format", "version", "site", "nodes", "visits") if k in d
    }
    return ordered


def dumps_site(site: SiteFile) -> str:
    """Canonical text of a site file (UTF-8, two-space indent, trailing newline)."""
    return json.dumps(site_to_dict(site), indent=2, ensure_ascii=False) + "\n"


def backup_path(path: str | os.PathLike[str]) -> Path:
    """Where the previous version of a site file is kept: ``<name>.bak`` beside it."""
    p = Path(path)
    return p.with_name(p.name + BACKUP_SUFFIX)


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


def temp_name(target: Path) -> Path:
    return target.with_name(f".{target.name}.{os.getpid()}-{secrets.token_hex(4)}.tmp")


def write_new_file(tmp: Path, data: bytes, mode: int | None) -> None:
    fd = os.open(tmp, os.O_WRONLY | os.O_CREAT | os.O_EXCL | getattr(os, "O_CLOEXEC", 0), 0o666)
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


def write_site_bytes(
    data: bytes, path: str | os.PathLike[str], *, backup: bool = True, exclusive: bool = False
) -> None:
    """Atomically put ``data`` at ``path``; see :func:`save_site`.

    With ``exclusive`` the file must not exist yet (``FileExistsError``
    otherwise, even when another program creates it at the same moment).
    """
    p = Path(os.path.realpath(path))
    folder = p.parent
    shown = Path(path)
    old_mode: int | None = None
    step = "reading the current file"
    tmp = temp_name(p)
    try:
        try:
            st = p.stat()
        except FileNotFoundError:
            st = None
        if st is not None:
            if exclusive:
                raise FileExistsError(errno.EEXIST, "already exists", str(shown))
            old_mode = st.st_mode
            if st.st_size == len(data) and p.read_bytes() == data:
                return  # already saved: keep the backup of the version before
        step = f"writing a temporary file in {folder}"
        write_new_file(tmp, data, old_mode)
        if st is not None and backup:
            step = f"keeping the previous version as {backup_path(p).name}"
            copy_aside(p, backup_path(p))
        step = f"putting the new version in place in {folder}"
        if exclusive:
            try:
                os.link(tmp, p)
            except FileExistsError:
                raise
            except OSError:
                fd = os.open(p, os.O_WRONLY | os.O_CREAT | os.O_EXCL, 0o666)
                os.close(fd)
                os.replace(tmp, p)
            else:
                tmp.unlink()
        else:
            os.replace(tmp, p)
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


def save_site(site: SiteFile, path: str | os.PathLike[str]) -> None:
    """Write a site file safely.

    The new text goes to a temporary file in the same folder, which is flushed
    and synced to disk; the current file (if any) is kept as ``<name>.bak``;
    the temporary file is then renamed over the original and the folder is
    synced.  A save of identical content changes nothing.  On failure the
    original is left untouched and :class:`SaveError` says what failed and
    where.
    """
    write_site_bytes(dumps_site(site).encode("utf-8"), path)
