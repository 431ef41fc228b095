"""Reading and writing site files.

``load_site`` never modifies the file it reads and turns every problem into a
:class:`SiteLoadError` with a one-line message naming the file and where in it
the problem is.  ``dumps_site`` is the canonical text of a site: the same site
always gives the same bytes.
"""

from __future__ import annotations

import contextlib
import json
import os
from pathlib import Path
from typing import Any

from pydantic import ValidationError

from model.site import FORMAT_NAME, FORMAT_VERSION, SiteFile

MAX_FILE_BYTES = 50 * 1024 * 1024


class SiteLoadError(Exception):
    """A site file could not be loaded.  ``str()`` is one line fit for a user."""

    def __init__(self, path: str | os.PathLike[str] | None, message: str) -> None:
        self.path = None if path is None else str(path)
        self.message = message
        super().__init__(f"{self.path}: {message}" if self.path else message)


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
                parts.append(f" ({nxt['id']})")
                # pydantic adds the union tag after a list index of a discriminated union
                if i + 1 < len(loc) and loc[i + 1] == nxt.get("kind"):
                    i += 1
            cur = nxt
        elif isinstance(cur, dict) and isinstance(key, str) and key in cur:
            parts.append(f".{key}" if parts else key)
            cur = cur[key]
        elif isinstance(cur, dict) and isinstance(key, str) and i == len(loc) - 1:
            parts.append(f".{key}" if parts else key)  # a missing or extra field
            cur = None
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
        msg = str(err.get("msg", "invalid"))
        if msg.startswith("Value error, "):
            msg = msg[len("Value error, ") :]
        if err.get("type") == "extra_forbidden":
            field = loc[-1] if loc else "?"
            msg = f"field {field!r} is not allowed here"
            loc = loc[:-1]
        elif err.get("type") == "union_tag_invalid":
            msg = "unknown kind; " + msg
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


def parse_site(text: str | bytes, path: str | os.PathLike[str] | None = None) -> SiteFile:
    """Validate the text of a site file."""
    if isinstance(text, bytes):
        try:
            text = text.decode("utf-8")
        except UnicodeDecodeError as exc:
            raise SiteLoadError(path, f"not UTF-8 text (byte {exc.start})") from None
    try:
        raw = json.loads(text, parse_constant=_refuse_constant)
    except json.JSONDecodeError as exc:
        raise SiteLoadError(
            path, f"not valid JSON at line {exc.lineno}, column {exc.colno}: {exc.msg}"
        ) from None
    except ValueError as exc:
        raise SiteLoadError(path, str(exc)) from None
    except RecursionError:
        raise SiteLoadError(path, "JSON nested too deeply") from None
    if not isinstance(raw, dict) or raw.get("format") != FORMAT_NAME:
        raise SiteLoadError(path, f'not a tripwise site file (no "format": "{FORMAT_NAME}")')
    version = raw.get("version")
    if not isinstance(version, int) or isinstance(version, bool):
        raise SiteLoadError(path, "version: must be a whole number")
    if version > FORMAT_VERSION:
        raise SiteLoadError(
            path,
            f"format version {version} is newer than this tripwise understands "
            f"({FORMAT_VERSION}); update tripwise to open it",
        )
    if version < 1:
        raise SiteLoadError(path, f"format version {version} is not a known version")
    try:
        return SiteFile.model_validate(raw)
    except ValidationError as exc:
        raise SiteLoadError(path, describe_validation_error(exc, raw)) from None
    except RecursionError:
        raise SiteLoadError(path, "JSON nested too deeply") from None


def _refuse_constant(name: str) -> Any:
    raise ValueError(f"{name} is not allowed in a site file (numbers must be finite)")


def load_site(path: str | os.PathLike[str]) -> SiteFile:
    """Load and validate a site file.  The file is never modified."""
    p = Path(path)
    try:
        size = p.stat().st_size
    except FileNotFoundError:
        raise SiteLoadError(p, "no such file") from None
    except OSError as exc:
        raise SiteLoadError(p, exc.strerror or str(exc)) from None
    if p.is_dir():
        raise SiteLoadError(p, "is a folder, not a site file")
    if size > MAX_FILE_BYTES:
        raise SiteLoadError(
            p,
            f"file is {size / 1e6:.0f} MB; site files are limited to {MAX_FILE_BYTES // 2**20} MB",
        )
    try:
        data = p.read_bytes()
    except OSError as exc:
        raise SiteLoadError(p, exc.strerror or str(exc)) from None
    return parse_site(data, p)


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


def save_site(site: SiteFile, path: str | os.PathLike[str]) -> None:
    """Write a site file safely: temporary file, fsync, rename over the original."""
    p = Path(path)
    tmp = p.with_name(f".{p.name}.tmp-{os.getpid()}")
    data = dumps_site(site).encode("utf-8")
    try:
        with open(tmp, "wb") as fh:
            fh.write(data)
            fh.flush()
            os.fsync(fh.fileno())
        os.replace(tmp, p)
    except BaseException:
        with contextlib.suppress(OSError):
            tmp.unlink()
        raise
