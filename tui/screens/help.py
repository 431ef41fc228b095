"""Every key of the app, by where it applies, made from the key bindings themselves.

The rows come from the ``BINDINGS`` of the app, the tree, the findings, the forms
and the reading screen, so a key added to a binding is listed here at once.  Keys
that are typed rather than bound (digits and letters in the reading form, the
tree's arrows) are listed from :data:`TYPED_KEYS`.
"""

from __future__ import annotations

from typing import Any

from rich.table import Table
from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical, VerticalScroll
from textual.widgets import Label, Static

from tui.screens.closing import Dialog
from tui.themes import tone

#: Keys read as typing, not bindings: (where, keys, what).
TYPED_KEYS: list[tuple[str, str, str]] = [
    ("anywhere", "tab  shift+tab", "next / previous area or field"),
    ("tree", "↑ ↓ ← →  space", "move, open and close branches"),
    (
        "add menu",
        "b r o m c w f s p k n",
        "board, RCCB, RCBO, MCB, circuit, switch, fuse, socket RCD, portable RCD, CBR, RCM",
    ),
    ("form", "a letter", "in a choice: pick the choice it starts (again: the next one)"),
    ("form", "space", "tick or clear a box, or a flag in a list"),
    ("readings", "digits  enter", "record a value and go to the next field"),
    ("readings", "n", "in a time field: did not trip (and go on)"),
    ("readings", "w  f", "test button: worked / failed (and go on)"),
    ("readings", "a  h  d", "test waveform: AC / half-wave / smooth DC (and go on)"),
    ("readings", "r  s", "half-wave/DC test made at the rated multiple / scaled current"),
    ("readings", "ctrl+w", "show the next test waveform's results (AC, half-wave, DC)"),
    ("readings", "enter on the note", "record and go to the next untested device"),
    ("readings", "↑ ↓", "previous / next field"),
]


def _classes() -> list[tuple[str, type]]:
    """(where, the class whose BINDINGS apply there), in the order of the help."""
    from tui.app.shell import TripwiseApp
    from tui.screens.node_editor import NodeEditorScreen
    from tui.screens.readings import ReadingScreen
    from tui.screens.what_if import WhatIfScreen
    from tui.widgets.choice_row import ChoiceRow
    from tui.widgets.findings_panel import FindingsTable
    from tui.widgets.site_tree import SiteTree

    return [
        ("anywhere", TripwiseApp),
        ("tree", SiteTree),
        ("findings", FindingsTable),
        ("form", NodeEditorScreen),
        ("form", ChoiceRow),
        ("readings", ReadingScreen),
        ("what if", WhatIfScreen),
    ]


def key_rows(app: Any) -> list[tuple[str, str, str]]:
    """Every key the app answers to, as (where, keys, what): bindings first, then typing."""
    rows: list[tuple[str, str, str]] = [
        (
            "anywhere",
            app.get_key_display(Binding(app.COMMAND_PALETTE_BINDING, "")),
            "command palette: every action by name",
        ),
    ]
    for where, cls in _classes():
        by_action: dict[str, tuple[list[str], str]] = {}
        for b in getattr(cls, "BINDINGS", []):
            if not isinstance(b, Binding):
                continue
            keys, what = by_action.setdefault(b.action, ([], b.tooltip or b.description))
            keys.extend(app.get_key_display(Binding(k, b.action)) for k in b.key.split(","))
        for keys, what in by_action.values():
            rows.append((where, "  ".join(dict.fromkeys(keys)), what))
    return rows + TYPED_KEYS


class HelpScreen(Dialog[None]):
    """The key map."""

    BINDINGS = [Binding("escape,q,question_mark,f1", "close", "Close")]

    def compose(self) -> ComposeResult:
        table = Table(box=None, expand=True, show_header=True, header_style="bold")
        table.add_column("where", style=tone("$tw-muted"), no_wrap=True)
        table.add_column("keys", style=tone("bold $tw-value"), no_wrap=True)
        table.add_column("what it does")
        for where, keys, what in key_rows(self.app):
            table.add_row(where, keys, what)
        with Vertical(classes="dialog wide"):
            yield Label("Keys", classes="dialog-title", markup=False)
            with VerticalScroll():
                yield Static(table, markup=False)
            yield Static(Text("Esc closes", style=tone("$tw-muted")), markup=False)

    def action_close(self) -> None:
        self.dismiss(None)
