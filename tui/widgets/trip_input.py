"""A trip-time field with a one-key "did not trip"."""

from __future__ import annotations

from dataclasses import dataclass

from textual import events
from textual.message import Message
from textual.widgets import Input

from model.site import DID_NOT_TRIP

#: The key that records "did not trip" in a time field.
DID_NOT_TRIP_KEY = "n"


class TripInput(Input):
    """Digits for a trip time in ms; the key ``n`` records "did not trip" and moves on."""

    @dataclass
    class DidNotTrip(Message):
        input: TripInput

    def __init__(self, *, id: str | None = None, placeholder: str = "ms") -> None:
        super().__init__(placeholder=placeholder, restrict=r"[0-9.,]*", compact=True, id=id)

    async def _on_key(self, event: events.Key) -> None:
        if event.character == DID_NOT_TRIP_KEY:
            event.stop()
            event.prevent_default()
            self.value = DID_NOT_TRIP
            self.cursor_position = len(self.value)
            self.post_message(self.DidNotTrip(self))
            return
        if self.value == DID_NOT_TRIP and (event.is_printable or event.key == "backspace"):
            self.value = ""
            if not event.is_printable:
                event.stop()
                event.prevent_default()
                return
        await super()._on_key(event)
