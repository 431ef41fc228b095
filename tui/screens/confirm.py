"""A yes/no question."""

from __future__ import annotations

from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.widgets import Button, Label, Static

from tui.screens.closing import Dialog


class ConfirmScreen(Dialog[bool]):
    """Asks one question; `y`/Enter on Yes confirms, `n`/Escape declines."""

    BINDINGS = [
        Binding("y", "answer(True)", "Yes"),
        Binding("n,escape", "answer(False)", "No"),
    ]

    def __init__(self, title: str, body: str, yes: str = "Yes", no: str = "No") -> None:
        super().__init__()
        self._title, self._body, self._yes, self._no = title, body, yes, no

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog"):
            yield Label(self._title, classes="dialog-title", markup=False)
            yield Static(self._body, classes="dialog-body", markup=False)
            with Horizontal(classes="dialog-buttons"):
                yield Button(f"{self._yes} (y)", id="yes", variant="warning", compact=True)
                yield Button(f"{self._no} (n / Esc)", id="no", compact=True)

    def on_mount(self) -> None:
        self.query_one("#no", Button).focus()

    @on(Button.Pressed)
    def _pressed(self, event: Button.Pressed) -> None:
        event.stop()
        self.dismiss(event.button.id == "yes")

    def action_answer(self, yes: bool) -> None:
        self.dismiss(yes)
