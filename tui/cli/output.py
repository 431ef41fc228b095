"""The command line's one way out to the terminal: every character written is safe to show.

:func:`guarded_output` replaces ``sys.stdout`` and ``sys.stderr`` for the run of
a command by streams that pass every write through
:func:`model.site.safe_text.shown`: a label, a path or a CSV cell holding an
escape sequence, a C1 control or a bidi override is printed as a visible
escape, never obeyed by the terminal.  Newlines and tabs pass unchanged.

``--json`` output goes through the same streams and stays exact JSON: the JSON
writer already escapes C0 controls, and DEL, C1 controls, bidi controls and
line separators become ``\\u`` escapes, which JSON reads back as the same
characters.  :func:`write_json` writes a document as ``json.dumps(doc,
ensure_ascii=False, indent=2)`` would, byte for byte, in large pieces.  A name the terminal's encoding cannot hold (a file name that is
not valid UTF-8) is written with backslash escapes instead of failing.
"""

from __future__ import annotations

import sys
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from json.encoder import encode_basestring
from typing import Any, TextIO

from model.site.safe_text import shown, shown_line


class SafeStream:
    """A text stream that writes only what a terminal shows and never obeys.

    With ``one_line`` (the message stream), each write is one line: a line
    break inside it (a newline in a file name) is shown as ``\\n``; only a
    line break at its end is written as one.  ``print(message, file=...)``
    writes the message and its end separately, so each message is one line.
    """

    def __init__(self, inner: TextIO, *, one_line: bool = False) -> None:
        self._inner = inner
        self.one_line = one_line

    def write(self, text: str) -> int:
        if self.one_line:
            body, end = (text[:-1], "\n") if text.endswith("\n") else (text, "")
            safe = shown_line(body) + end
        else:
            safe = shown(text)
        try:
            self._inner.write(safe)
        except UnicodeEncodeError:
            enc = getattr(self._inner, "encoding", None) or "utf-8"
            self._inner.write(safe.encode(enc, "backslashreplace").decode(enc))
        return len(text)

    def writelines(self, lines: Any) -> None:
        for line in lines:
            self.write(line)

    def __getattr__(self, name: str) -> Any:
        return getattr(self._inner, name)


@contextmanager
def guarded_output() -> Iterator[SafeStream]:
    """Within the block, ``sys.stdout`` and ``sys.stderr`` show text and obey none of it.

    Yields the stderr stream; the caller sets its ``one_line`` once the
    command line is parsed (the usage text argparse prints has several lines).
    """
    out, err = sys.stdout, sys.stderr
    safe_err = SafeStream(err)
    sys.stdout, sys.stderr = SafeStream(out), safe_err  # type: ignore[assignment]
    try:
        yield safe_err
    finally:
        sys.stdout, sys.stderr = out, err


# --- JSON output ---------------------------------------------------------------

#: About how many characters :func:`write_json` hands to the stream at a time.
JSON_PIECE_CHARS = 1 << 20

#: Levels of a document written piece by piece; deeper containers (one finding,
#: one pair) are built whole, which is faster.
_STREAMED_LEVELS = 2


def write_json(doc: Any, write: Callable[[str], Any]) -> None:
    """Write ``doc`` as ``json.dumps(doc, ensure_ascii=False, indent=2) + "\\n"``, byte for byte.

    The standard library writes indented JSON with its pure-Python encoder, a
    generator per level handing up every token (the C encoder does no
    indenting before Python 3.13); this builds the same text with one Python
    step per value.  The outer two levels are handed to ``write`` in pieces of
    about a megabyte: a few dozen writes for the largest site, and the whole
    text (tens of megabytes, twice that as a string with a non-ASCII character
    in it) never held at once.  Values other than JSON's own types raise
    ``TypeError``, as ``json.dumps`` does.
    """
    parts: list[str] = []
    size = 0

    def stream(value: Any, level: int) -> None:
        nonlocal size
        if level >= _STREAMED_LEVELS or not isinstance(value, (dict, list, tuple)) or not value:
            text = _text(value, level)
            parts.append(text)
            size += len(text)
            return
        inner = _INDENTS[level + 1]
        sep = inner
        if isinstance(value, dict):
            parts.append("{")
            for key, item in value.items():
                parts.append(f"{sep}{_key_text(key)}: ")
                stream(item, level + 1)
                sep = "," + inner
            parts.append(_INDENTS[level] + "}")
        else:
            parts.append("[")
            for item in value:
                parts.append(sep)
                stream(item, level + 1)
                sep = "," + inner
                if size >= JSON_PIECE_CHARS:
                    write("".join(parts))
                    parts.clear()
                    size = 0
            parts.append(_INDENTS[level] + "]")

    stream(doc, 0)
    parts.append("\n")
    write("".join(parts))


def _text(value: Any, level: int) -> str:
    """The JSON text of one value whose first line is indented to ``level``."""
    scalar = _SCALAR_TEXT.get(type(value))
    if scalar is not None:
        return scalar(value)
    if isinstance(value, dict):
        if not value:
            return "{}"
        inner = _INDENTS[level + 1]
        lines = []
        for key, item in value.items():
            scalar = _SCALAR_TEXT.get(type(item))
            text = scalar(item) if scalar is not None else _text(item, level + 1)
            key_text = _KEY_TEXT.get(key) if type(key) is str else None
            if key_text is None:
                key_text = _key_text(key)
            lines.append(f"{key_text}: {text}")
        return "{" + inner + ("," + inner).join(lines) + _INDENTS[level] + "}"
    if isinstance(value, (list, tuple)):
        if not value:
            return "[]"
        inner = _INDENTS[level + 1]
        items = []
        for item in value:
            scalar = _SCALAR_TEXT.get(type(item))
            items.append(scalar(item) if scalar is not None else _text(item, level + 1))
        return "[" + inner + ("," + inner).join(items) + _INDENTS[level] + "]"
    return _other_scalar(value)


def _other_scalar(value: Any) -> str:
    """Subclasses of JSON's types as ``json`` writes them; anything else refused alike."""
    if isinstance(value, str):
        return encode_basestring(value)
    if isinstance(value, int):  # True and False are exact bools, found before this
        return int.__repr__(value)
    if isinstance(value, float):
        return _float_text(value)
    raise TypeError(f"Object of type {type(value).__name__} is not JSON serializable")


def _key_text(key: Any) -> str:
    if isinstance(key, str):
        text = _KEY_TEXT.get(key)
        if text is None:
            text = encode_basestring(key)
            if len(_KEY_TEXT) < 1000:  # the few keys of a document repeat
                _KEY_TEXT[key] = text
        return text
    if isinstance(key, float):
        return encode_basestring(_float_text(key))
    if key is True or key is False or key is None:
        return encode_basestring(_SCALAR_TEXT[type(key)](key))
    if isinstance(key, int):
        return encode_basestring(int.__repr__(key))
    raise TypeError(f"keys must be str, int, float, bool or None, not {type(key).__name__}")


def _float_text(value: float) -> str:
    """A float as the JSON writer gives it (NaN and infinities as it spells them)."""
    if value != value:
        return "NaN"
    if value == float("inf"):
        return "Infinity"
    if value == float("-inf"):
        return "-Infinity"
    return float.__repr__(value)


_SCALAR_TEXT: dict[type, Callable[[Any], str]] = {
    str: encode_basestring,
    int: int.__repr__,
    float: _float_text,
    bool: ("false", "true").__getitem__,
    type(None): lambda _: "null",
}
_KEY_TEXT: dict[str, str] = {}


class _Indents(dict[int, str]):
    """A new line indented to a level (two spaces a level), made once per level."""

    def __missing__(self, level: int) -> str:
        self[level] = text = "\n" + "  " * level
        return text


_INDENTS = _Indents()
