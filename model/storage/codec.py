"""The text of a site file: bytes to a validated site and back, and format versions.

Nothing in a site file is ever executed or evaluated: it is read with the JSON
parser only (numbers must be finite and of sane length, a key may not appear
twice in one object), and every value is then checked by the models in
:mod:`model.site.models`.  Every problem becomes a :class:`SiteLoadError`
with a one-line message naming the file and where in it the problem is.
:func:`dumps_site` is the canonical text of a site: the same site always
gives the same bytes.

Format versions: a file newer than :data:`~model.site.terms.FORMAT_VERSION` is
refused; an older one is converted in memory by the functions in
:data:`MIGRATIONS` (one per version step) and is written in the current
version only when it is next saved.
"""

from __future__ import annotations

import contextlib
import gc
import hashlib
import json
import os
import re
from collections.abc import Callable, Iterator
from typing import Any

from pydantic import ValidationError

from model.site.messages import describe_validation_error, one_line
from model.site.models import SiteFile, site_to_dict
from model.site.terms import FORMAT_NAME, FORMAT_VERSION


class SiteLoadError(Exception):
    """A site file could not be loaded.  ``str()`` is one line fit for a user."""

    def __init__(self, path: str | os.PathLike[str] | None, message: str) -> None:
        self.path = None if path is None else str(path)
        self.message = one_line(message)
        super().__init__(f"{one_line(self.path)}: {self.message}" if self.path else self.message)


def _v1_to_v2(doc: dict[str, Any]) -> dict[str, Any]:
    """Version 2 only adds optional fields, so a version 1 site is already a valid one."""
    out = dict(doc)
    out["version"] = 2
    return out


#: Conversions of an older format to the next one: ``MIGRATIONS[v]`` takes the
#: parsed JSON of a version ``v`` file and returns the same site as version
#: ``v + 1``.  The tests also exercise the chain with a made-up version 0.
MIGRATIONS: dict[int, Callable[[dict[str, Any]], dict[str, Any]]] = {1: _v1_to_v2}

_MAX_NUMBER_DIGITS = 40


# --- JSON, read strictly -----------------------------------------------------


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


_NUMBER_HOOKS: dict[str, Callable[[str], Any]] = {
    "parse_float": _parse_float,
    "parse_int": _parse_int,
}
#: Text that may hold a number the hooks would refuse (also matches inside strings:
#: then the slower careful reading is used, with the same result).
_RISKY_NUMBER = re.compile(rf"\d{{{_MAX_NUMBER_DIGITS + 1},}}|[eE][+-]?\d{{3,}}")


@contextlib.contextmanager
def _gc_paused() -> Iterator[None]:
    """Pause the cyclic garbage collector while a site is built: building tens of
    thousands of objects that all stay alive triggers collections that find nothing
    (a large site validates in about half the time)."""
    was_on = gc.isenabled()
    gc.disable()
    try:
        yield
    finally:
        if was_on:
            gc.enable()


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
    # The number hooks cost a Python call per number; they can only refuse a run of
    # over 40 digits or an exponent of three digits or more, so a text without
    # either is read by the C parser's own number reading (the result is the same).
    numbers = {} if _RISKY_NUMBER.search(text) is None else _NUMBER_HOOKS
    try:
        with _gc_paused():
            return json.loads(
                text,
                parse_constant=_refuse_constant,
                object_pairs_hook=_no_duplicate_keys,
                **numbers,  # type: ignore[arg-type]
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


# --- format versions ---------------------------------------------------------


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


# --- the site ----------------------------------------------------------------


def _validate(raw: dict[str, Any], path: str | os.PathLike[str] | None) -> SiteFile:
    try:
        with _gc_paused():
            return SiteFile.model_validate(raw)
    except ValidationError as exc:
        raise SiteLoadError(path, describe_validation_error(exc, raw)) from None
    except RecursionError:
        raise SiteLoadError(path, "JSON nested too deeply") from None


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


def dumps_site(site: SiteFile) -> str:
    """Canonical text of a site file (UTF-8, two-space indent, trailing newline)."""
    return json.dumps(site_to_dict(site), indent=2, ensure_ascii=False) + "\n"


def digest_bytes(data: bytes) -> str:
    """The digest recorded in journals: ``sha256:<hex>``."""
    return "sha256:" + hashlib.sha256(data).hexdigest()
