"""Asks for a file path."""

from __future__ import annotations

from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.widgets import Input, Label, Static

from tui.screens.closing import Dialog


class PathPromptScreen(Dialog[str | None]):
    """One line of input for a path; Enter accepts, Escape cancels."""

    BINDINGS = [Binding("escape", "cancel", "Cancel")]

    def __init__(self, title: str, body: str, start: str = "") -> None:
        super().__init__()
        self._title, self._body, self._start = title, body, start

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog"):
            yield Label(self._title, classes="dialog-title", markup=False)
            yield Static(self._body, classes="dialog-body", markup=False)
            yield Input(value=self._start, id="path", placeholder="/path/to/copy.json")
            yield Static("Enter to merge · Esc to cancel", classes="dialog-body", markup=False)

    def on_mount(self) -> None:
        self.query_one("#path", Input).focus()

    @on(Input.Submitted, "#path")
    def _submitted(self, event: Input.Submitted) -> None:
        event.stop()
        value = event.value.strip()
        self.dismiss(value or None)

    def action_cancel(self) -> None:
        self.dismiss(None)
