"""Every key of the app, by where it applies."""

from __future__ import annotations

from rich.table import Table
from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical, VerticalScroll
from textual.screen import ModalScreen
from textual.widgets import Label, Static

from tui.themes import tone

#: (where, keys, what) for every key the app answers to.
KEY_MAP: list[tuple[str, str, str]] = [
    ("anywhere", "F1  ?", "this help (? outside the reading form)"),
    ("anywhere", "ctrl+s", "save now (edits are also saved a moment after you stop typing)"),
    ("anywhere", "ctrl+z  u", "undo the last change (whole-site step; u outside the reading form)"),
    ("anywhere", "t", "go to the tree"),
    ("anywhere", "f", "go to the findings"),
    ("anywhere", "s", "site details (name, earthing, supply, rule set)"),
    ("anywhere", "v", "visits (add a visit)"),
    ("anywhere", "x", "export a report / test sheet"),
    ("anywhere", "h", "compare two visits (readings side by side, findings new / gone)"),
    ("anywhere", "o", "merge another copy of this site (from a second laptop)"),
    ("anywhere", "l", "daylight / dark theme (remembered for next time)"),
    ("anywhere", "tab  shift+tab", "next / previous area"),
    ("anywhere", "q", "save and quit"),
    ("tree", "↑ ↓ ← →  space", "move, open and close branches"),
    ("tree", "a", "add a node under the cursor (choose its kind)"),
    ("tree", "e  enter", "edit the node"),
    ("tree", "m", "move the node (and what it feeds) to another parent"),
    ("tree", "c", "copy the node with everything below it (new ids)"),
    ("tree", "d  delete", "delete the node and everything below it (asks; undo with u)"),
    ("tree", "r", "enter readings for this device (or the next untested one)"),
    ("tree", "i", "trip impact: what loses supply if this device opens"),
    ("tree", "p", "pair: this RCD with its nearest RCD above (or below)"),
    ("findings", "enter", "go to the finding's node in the tree"),
    ("findings", "1  2", "step the severity / board filter (click a filter too)"),
    ("findings", "!", "severity filter: that severity only / that or worse"),
    ("form", "enter", "next field; on the last field, apply"),
    ("form", "ctrl+s", "apply the form"),
    ("form", "escape", "cancel"),
    ("readings", "digits  enter", "record a value and go to the next field"),
    ("readings", "n", "in a time field: did not trip (and go on)"),
    ("readings", "w  f", "test button: worked / failed (and go on)"),
    ("readings", "a  h  d", "test waveform: AC / half-wave / smooth DC (and go on)"),
    ("readings", "enter on the note", "record and go to the next untested device"),
    ("readings", "ctrl+t", "not tested: give a reason instead of values"),
    ("readings", "ctrl+n  ctrl+p", "next / previous device"),
    ("readings", "↑ ↓", "previous / next field"),
    ("readings", "escape", "back to the tree"),
]


class HelpScreen(ModalScreen[None]):
    """The key map."""

    BINDINGS = [Binding("escape,q,question_mark,f1", "close", "Close")]

    def compose(self) -> ComposeResult:
        table = Table(box=None, expand=True, show_header=True, header_style="bold")
        table.add_column("where", style=tone("$tw-muted"), no_wrap=True)
        table.add_column("keys", style=tone("bold $tw-value"), no_wrap=True)
        table.add_column("what it does")
        for where, keys, what in KEY_MAP:
            table.add_row(where, keys, what)
        with Vertical(classes="dialog wide"):
            yield Label("Keys", classes="dialog-title", markup=False)
            with VerticalScroll():
                yield Static(table, markup=False)
            yield Static(Text("escape closes", style=tone("$tw-muted")), markup=False)

    def action_close(self) -> None:
        self.dismiss(None)
