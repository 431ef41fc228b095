"""Text helpers of the printed documents: user text made fit for a page, and numbers as text.

Every text that comes from the site file passes through :func:`clean` (or
:func:`clean_lines` for notes kept on several lines) when a document is
built, so no renderer ever meets a control character.
"""

from __future__ import annotations

import re
import unicodedata

_CONTROL = re.compile(r"[\x00-\x1f\x7f-\x9f\u2028\u2029\u200b-\u200f\u202a-\u202e\u2066-\u2069]")


def clean(text: object) -> str:
    """User text fit for one printed line: control characters removed, whitespace collapsed.

    Line breaks and tabs become spaces; other control and bidirectional
    formatting characters are dropped, so a label prints as what it says.
    """
    s = unicodedata.normalize("NFC", str(text))
    s = re.sub(r"[\t\r\n\v\f\u2028\u2029]+", " ", s)
    s = _CONTROL.sub("", s)
    return re.sub(r" {2,}", " ", s).strip()


def clean_lines(text: object) -> str:
    """Like :func:`clean` but keeps line breaks (as ``\\n``): for notes written to CSV."""
    s = unicodedata.normalize("NFC", str(text)).replace("\r\n", "\n").replace("\r", "\n")
    return "\n".join(clean(line) for line in s.split("\n")).strip("\n")


def with_way(label: str, way: str) -> str:
    """A node's name with its board way in front: 'way 3 · Kitchen sockets' ('' way: the label)."""
    return f"way {way} · {label}" if way else label


def num_text(value: float) -> str:
    """A number as the shortest text that reads back to the same float ('312', '12.5')."""
    s = repr(float(value))
    return s[:-2] if s.endswith(".0") else s
