"""The keys that apply where the cursor is, on one line (a light stand-in for a footer)."""

from __future__ import annotations

from typing import Any

from rich.text import Text
from textual.widgets import Static

from tui.themes import tone


class KeyBar(Static):
    """Follows the screen's active bindings; redrawn whenever the focus moves.

    In this app the keys that apply change only with the focused widget.
    """

    def on_mount(self) -> None:
        self.watch(self.screen, "focused", self._focus_moved)

    def _focus_moved(self, _focused: Any) -> None:
        self._show()

    def refresh_keys(self) -> None:
        """Redraw (after a change of theme)."""
        self._show()

    def _show(self) -> None:
        seen: set[str] = set()
        t = Text(no_wrap=True, overflow="ellipsis")
        for _node, binding, enabled, _tooltip in self.screen.active_bindings.values():
            if not binding.show or not enabled or binding.action in seen:
                continue
            seen.add(binding.action)
            t.append(
                f" {self.app.get_key_display(binding)} ", style=tone("bold $background on $accent")
            )
            t.append(f" {binding.description} ", style=tone("$tw-key-text"))
        self.update(t)
