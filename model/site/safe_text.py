"""Text from a file or a person, made safe to show on a terminal.

A site file, a CSV or a path can hold characters that a terminal obeys instead
of showing: escape sequences (set the title, write the clipboard, clear the
screen), C1 controls, bidirectional overrides that show text in another order
than it is stored, and line or paragraph separators.  :func:`shown` replaces
each of them by a visible escape (``\\x1b``, ``\\u009b``, ``\\u202e``), so the
text is shown as it is stored, character for character, and nothing in it
reaches the terminal as a command.  Only what is shown changes; the stored
value never does.

``shown`` keeps newline and tab (a note may have several lines); :func:`shown_line`
also escapes those, for a value inside a one-line message; :func:`echoed` also
cuts a long value, for a value quoted back in an error message.
"""

from __future__ import annotations

import re

#: Bidirectional embeddings, overrides and isolates (Unicode UAX #9), and the
#: line and paragraph separators: shown escaped, never obeyed.
_FORMAT_CONTROLS = (*range(0x202A, 0x202F), *range(0x2066, 0x206A), 0x2028, 0x2029)


def _escape(code: int) -> str:
    # \u form from DEL up: inside a JSON string it is the JSON escape of the
    # same character, so JSON passed through :func:`shown` stays exact JSON
    # (JSON writers already escape C0 controls, never DEL or C1).
    return f"\\x{code:02x}" if code < 0x20 else f"\\u{code:04x}"


#: ``str.translate`` table: C0 controls except newline and tab, DEL, C1 controls,
#: bidi overrides and isolates, line and paragraph separators -> visible escapes.
CONTROL_ESCAPES: dict[int, str] = {
    code: _escape(code)
    for code in (*range(0x20), *range(0x7F, 0xA0), *_FORMAT_CONTROLS)
    if code not in (0x0A, 0x09)
} | {0x0D: "\\r"}

#: As :data:`CONTROL_ESCAPES`, and newline and tab escaped too: one line.
LINE_ESCAPES: dict[int, str] = CONTROL_ESCAPES | {0x0A: "\\n", 0x09: "\\t"}


def _finder(table: dict[int, str]) -> re.Pattern[str]:
    return re.compile("[" + "".join(re.escape(chr(code)) for code in sorted(table)) + "]")


# ``str.translate`` looks every character up in the table, which on a long text
# holding any non-ASCII character (Δ, Ω in a command's output) is about twenty
# times slower than finding the few characters to replace; same result.
_CONTROL_FINDER = _finder(CONTROL_ESCAPES)
_LINE_FINDER = _finder(LINE_ESCAPES)


def _control_escape(m: re.Match[str]) -> str:
    return CONTROL_ESCAPES[ord(m.group())]


def _line_escape(m: re.Match[str]) -> str:
    return LINE_ESCAPES[ord(m.group())]


#: How many characters of a value an error message quotes back.
ECHO_LIMIT = 60


def shown(text: str) -> str:
    """``text`` with every terminal control replaced by a visible escape; lines kept."""
    return _CONTROL_FINDER.sub(_control_escape, text)


def shown_line(text: str) -> str:
    """``text`` as one line: :func:`shown`, with line breaks and tabs escaped as well."""
    return _LINE_FINDER.sub(_line_escape, text)


def has_controls(text: str) -> bool:
    """True if :func:`shown` would change ``text``."""
    return shown(text) != text


def cut(text: str, limit: int = ECHO_LIMIT) -> str:
    """``text`` cut to ``limit`` characters, ending with '…' when it was longer."""
    return text if len(text) <= limit else text[: limit - 1] + "…"


def echoed(value: object, limit: int = ECHO_LIMIT) -> str:
    """A value quoted back in a message: one line, escaped, at most ``limit`` characters.

    The value is cut before it is escaped, so a 5-million-character value
    costs no more than a short one; the escapes may add a few characters.
    """
    return shown_line(cut(str(value), limit))
