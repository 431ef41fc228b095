"""A choice among a few values, each picked by one key (test button, test waveform)."""

from __future__ import annotations

from dataclasses import dataclass

from rich.text import Text
from textual import events
from textual.message import Message
from textual.reactive import reactive
from textual.widget import Widget


class KeyChoice(Widget, can_focus=True):
    """One of a few values, each chosen by a single key; Enter keeps the shown value.

    Space or left/right step through the values without moving on.
    """

    DEFAULT_CSS = """
    KeyChoice { height: 1; width: 1fr; padding: 0 1; background: $boost; }
    KeyChoice:focus { background: $accent 40%; text-style: bold; }
    """

    value: reactive[str | None] = reactive(None)

    @dataclass
    class Chosen(Message):
        """A value was chosen (or kept with Enter); the form moves on."""

        choice: KeyChoice
        value: str | None

    @dataclass
    class Stepped(Message):
        choice: KeyChoice
        value: str | None

    def __init__(
        self,
        options: list[tuple[str, str, str]],
        *,
        value: str | None = None,
        allow_none: bool = True,
        id: str | None = None,
    ) -> None:
        """``options`` are (key, value, title)."""
        super().__init__(id=id)
        self._options = options
        self._allow_none = allow_none
        self.set_reactive(KeyChoice.value, value)

    def render(self) -> Text:
        t = Text(no_wrap=True, overflow="ellipsis")
        for key, value, title in self._options:
            style = "bold reverse" if value == self.value else "#8fa7b3"
            t.append(f" {key}", style="bold #d9c28a")
            t.append(f":{title} ", style=style)
        if self.value is None:
            t.append("  —", style="#8fa7b3")
        return t

    def _values(self) -> list[str | None]:
        vals: list[str | None] = [v for _, v, _ in self._options]
        return ([None] if self._allow_none else []) + vals

    async def _on_key(self, event: events.Key) -> None:
        for key, value, _ in self._options:
            if event.character == key:
                event.stop()
                event.prevent_default()
                self.value = value
                self.post_message(self.Chosen(self, value))
                return
        if event.key == "enter":
            event.stop()
            event.prevent_default()
            self.post_message(self.Chosen(self, self.value))
        elif event.key in ("space", "right", "left"):
            event.stop()
            event.prevent_default()
            vals = self._values()
            i = vals.index(self.value) if self.value in vals else 0
            step = -1 if event.key == "left" else 1
            self.value = vals[(i + step) % len(vals)]
            self.post_message(self.Stepped(self, self.value))
        elif event.key in ("backspace", "delete") and self._allow_none:
            event.stop()
            self.value = None
            self.post_message(self.Stepped(self, None))
