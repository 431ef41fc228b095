"""A dialog that offers a list and returns the chosen value (or None)."""

from __future__ import annotations

from rich.text import Text
from textual import events, on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.widgets import Label, OptionList
from textual.widgets.option_list import Option

from tui.screens.closing import Dialog
from tui.themes import tone


class ChoiceScreen(Dialog[str | None]):
    """Pick one of several values; Enter chooses, Escape cancels.

    With ``keys`` (value -> letter) each option shows its letter, and the letter
    picks it at once.
    """

    BINDINGS = [Binding("escape", "cancel", "Cancel")]

    def __init__(
        self,
        title: str,
        options: list[tuple[str, str]],
        hint: str = "",
        keys: dict[str, str] | None = None,
    ) -> None:
        super().__init__()
        self._title = title
        self._options = options
        self._keys = {
            v: k for v, k in (keys or {}).items() if v in dict((v, t) for t, v in options)
        }
        self._hint = hint

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog"):
            yield Label(self._title, classes="dialog-title", markup=False)
            yield OptionList(
                *[Option(self._shown(text, value), id=value) for text, value in self._options]
            )
            hint = self._hint or (
                "a letter or Enter chooses · Esc cancels"
                if self._keys
                else "Enter chooses · Esc cancels"
            )
            yield Label(hint, classes="dialog-hint", markup=False)

    def _shown(self, text: str, value: str) -> Text:
        key = self._keys.get(value)
        if key is None:
            return Text(text)
        return Text.assemble((f"{key} ", tone("bold $tw-value")), text)

    def on_key(self, event: events.Key) -> None:
        ch = event.character or ""
        for value, key in self._keys.items():
            if ch == key:
                event.stop()
                event.prevent_default()
                self.dismiss(value)
                return

    def on_mount(self) -> None:
        self.query_one(OptionList).focus()

    @on(OptionList.OptionSelected)
    def _chosen(self, event: OptionList.OptionSelected) -> None:
        event.stop()
        self.dismiss(event.option.id)

    def action_cancel(self) -> None:
        self.dismiss(None)
