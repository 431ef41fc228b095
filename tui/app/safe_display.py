"""Every text the app shows is shown, never obeyed by the terminal.

Textual and Rich already drop a few control characters (bell, backspace, form
feed, carriage return) from the text of every widget, in one translation table
each, and pass the rest (escape, C1 controls, bidi overrides) to the
terminal.  :func:`show_controls_visibly` puts the model's table
(:data:`model.site.safe_text.CONTROL_ESCAPES`) into both, so a label, a note, a
file name or a message holding an escape sequence is drawn as the visible
escape ``\\x1b]0;…`` in the tree, the tables, the dialogs, the status line and
the notices alike, and its width is counted after the change, so the layout
holds.  Only what is drawn changes: the site keeps every character.
Markup in user text stays text (the app never reads user text as markup).
"""

from __future__ import annotations

import rich.control
import textual.content

from model.site.safe_text import CONTROL_ESCAPES


def show_controls_visibly() -> None:
    """Make Textual and Rich draw every control character as its visible escape.

    Idempotent; called when the app is built.  Both libraries apply their
    table, a module-level dict bound as a default argument, to the text of
    every ``Content`` and ``Text`` they make, so the table is updated in place.
    """
    for table in (
        textual.content._CONTROL_STRIP_TRANSLATE,
        rich.control._CONTROL_STRIP_TRANSLATE,
    ):
        table.update(CONTROL_ESCAPES)  # type: ignore[arg-type]
