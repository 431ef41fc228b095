"""The caution line shown under every screen; it always says "not a certificate"."""

from __future__ import annotations

from textual import events
from textual.widgets import Static

from tui.format import caution_for_width


class CautionBar(Static):
    """The shortest honest form of the caution that fits the width."""

    def on_mount(self) -> None:
        self.update(caution_for_width(max(self.size.width, 1) if self.size.width else 76))

    def on_resize(self, event: events.Resize) -> None:
        self.update(caution_for_width(event.size.width))
