"""A choice field shown on its own lines: every choice in view, one letter picks one.

No list opens over the form: the choices are always shown, the chosen one in
brackets (``[A]``), so it differs by shape as well as colour.  A letter picks the
choice it starts (again: the next choice with that letter), ← → step through them,
``-`` or Backspace clears an optional choice, and Enter moves to the next field
like every other field of a form.
"""

from __future__ import annotations

from rich.text import Text
from textual import events
from textual.binding import Binding
from textual.message import Message
from textual.widget import Widget

#: What an optional field shows for "no choice".
NONE_TEXT = "none"


def _letter(text: str) -> str:
    return next((c.lower() for c in text if c.isalnum()), "")


class ChoiceRow(Widget, can_focus=True):
    """One choice of several; ``value`` is the chosen value (None: no choice)."""

    DEFAULT_CSS = """
    ChoiceRow { height: auto; width: 1fr; }
    ChoiceRow:focus { background: $boost; }
    """
    BINDINGS = [
        Binding("left", "step(-1)", "Previous choice", show=False),
        Binding("right", "step(1)", "Next choice", show=False),
        Binding("enter", "next_field", "Next field", show=False),
        Binding("backspace,delete,minus", "clear", "No choice", show=False),
    ]

    class Changed(Message):
        """The choice changed."""

        def __init__(self, row: ChoiceRow, value: str | None) -> None:
            super().__init__()
            self.row = row
            self.value = value

        @property
        def control(self) -> ChoiceRow:
            return self.row

    def __init__(
        self,
        options: list[tuple[str, str]],
        value: str | None,
        *,
        optional: bool = False,
        id: str | None = None,
    ) -> None:
        """``options``: (shown text, value) pairs in order."""
        super().__init__(id=id)
        self.options = list(options)
        self.optional = optional
        values = [v for _t, v in self.options]
        self._value: str | None = value if value in values else None

    @property
    def value(self) -> str | None:
        return self._value

    @value.setter
    def value(self, value: str | None) -> None:
        if value is not None and value not in [v for _t, v in self.options]:
            raise ValueError(f"{value!r} is not one of the choices")
        if value != self._value:
            self._value = value
            self.refresh(layout=True)
            self.post_message(self.Changed(self, value))

    def render(self) -> Text:
        text = Text()
        shown = list(self.options)
        if self.optional:
            shown.insert(0, (NONE_TEXT, ""))
        for i, (label, value) in enumerate(shown):
            chosen = (value or None) == self._value
            if i:
                text.append(" ")
            if chosen:
                text.append(f"[{label}]", style="bold reverse")
            else:
                text.append(f" {label} ", style="dim" if value == "" else "")
        return text

    def on_key(self, event: events.Key) -> None:
        ch = (event.character or "").lower()
        if not ch.isalnum() or len(ch) != 1:
            return
        matches = [v for t, v in self.options if _letter(t) == ch]
        if not matches:
            self.app.bell()
            event.stop()
            return
        event.stop()
        event.prevent_default()
        if self._value in matches:
            self.value = matches[(matches.index(self._value) + 1) % len(matches)]
        else:
            self.value = matches[0]

    def action_step(self, by: int) -> None:
        values: list[str | None] = [v for _t, v in self.options]
        if self.optional:
            values.insert(0, None)
        i = values.index(self._value) if self._value in values else -1
        self.value = values[(i + by) % len(values)] if i >= 0 else values[0]

    def action_clear(self) -> None:
        if self.optional:
            self.value = None
        else:
            self.app.bell()

    def action_next_field(self) -> None:
        self.screen.focus_next()
