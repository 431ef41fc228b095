"""The keys that apply where the cursor is, on one line: Textual's own footer, compact."""

from __future__ import annotations

from collections.abc import Iterable
from typing import Any

from textual import events
from textual.app import ComposeResult
from textual.widget import Widget
from textual.widgets import Footer
from textual.widgets._footer import FooterKey

#: Actions whose keys are left off the line, in this order, when it is too narrow for
#: all (each stays in the help, F1, and the palette): the rarer tree edits, the keys
#: everyone knows, then the views.  Help and the palette always stay.
DROP_FIRST = (
    "copy_node",
    "move_node",
    "quit_app",
    "focus_findings",
    "impact",
    "filter('or-worse')",  # the findings' filter keys: their header shows them too
    "filter('board')",
    "undo",
    "pair",
    "what_if",
    "device(-1)",  # the readings: previous device (next device stays)
)


def key_width(key: FooterKey) -> int:
    """Cells a compact key takes: its key, a space, its description, a space."""
    return len(key.key_display) + len(key.description) + 2


def fitted(keys: list[Widget], width: int) -> list[Widget]:
    """``keys`` without the ones :data:`DROP_FIRST` names, in that order, until the rest
    fit in ``width`` cells; then, if need be, without the last ones (Help and the
    palette key always stay)."""
    kept = list(keys)

    def used() -> int:
        return sum(key_width(k) if isinstance(k, FooterKey) else 0 for k in kept)

    for action in DROP_FIRST:
        if used() <= width:
            break
        kept = [
            k
            for k in kept
            if not (isinstance(k, FooterKey) and k.action.removeprefix("app.") == action)
        ]
    # a screen whose own keys still do not fit: the last ones give way, never Help or
    # the palette (its keys are all in the help)
    while used() > width:
        last = next(
            (
                k
                for k in reversed(kept)
                if isinstance(k, FooterKey)
                and k.action.removeprefix("app.") != "help"
                and not k.has_class("-command-palette")
            ),
            None,
        )
        if last is None:
            break
        kept.remove(last)
    return kept


class KeyBar(Footer):
    """The key line: the bindings shown where the focus is (redrawn as it moves), the
    palette key at the right.  A key the app refuses there (a change to a read-only
    site) is not shown; on a narrow terminal the rarer keys give way (:data:`DROP_FIRST`)
    so that Help and the palette stay on the line."""

    def __init__(self, **kwargs: Any) -> None:
        kwargs.setdefault("compact", True)
        kwargs.setdefault("show_command_palette", True)
        super().__init__(**kwargs)
        self._width = 0

    def compose(self) -> ComposeResult:
        keys: Iterable[Widget] = super().compose()
        kept = fitted(list(keys), self.app.size.width - 2)  # the palette key's rule
        self.styles.grid_size_columns = sum(1 for k in kept if not k.has_class("-command-palette"))
        yield from kept

    def on_resize(self, event: events.Resize) -> None:
        if event.size.width != self._width:
            self._width = event.size.width
            self.refresh(recompose=True)

    def refresh_keys(self) -> None:
        """Redraw (after a change of theme)."""
        self.refresh(recompose=True)
