"""The command line's one way out to the terminal: every character written is safe to show.

:func:`guarded_output` replaces ``sys.stdout`` and ``sys.stderr`` for the run of
a command by streams that pass every write through
:func:`model.site.safe_text.shown`: a label, a path or a CSV cell holding an
escape sequence, a C1 control or a bidi override is printed as a visible
escape, never obeyed by the terminal.  Newlines and tabs pass unchanged.

``--json`` output goes through the same streams and stays exact JSON: the JSON
writer already escapes C0 controls, and DEL, C1 controls, bidi controls and
line separators become ``\\u`` escapes, which JSON reads back as the same
characters.  A name the terminal's encoding cannot hold (a file name that is
not valid UTF-8) is written with backslash escapes instead of failing.
"""

from __future__ import annotations

import sys
from collections.abc import Iterator
from contextlib import contextmanager
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
