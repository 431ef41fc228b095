"""A bare Textual app for testing one screen on its own."""

from __future__ import annotations

from textual.app import App
from textual.screen import Screen


class Host(App[None]):
    """Pushes one screen on mount and keeps every value it is dismissed with."""

    def __init__(self, screen: Screen[object]) -> None:
        super().__init__()
        self.modal = screen
        self.results: list[object] = []

    def on_mount(self) -> None:
        self.push_screen(self.modal, self.results.append)
