"""The keys that apply where the cursor is, on one line: Textual's own footer, compact."""

from __future__ import annotations

from typing import Any

from textual.widgets import Footer


class KeyBar(Footer):
    """The key line: the bindings shown where the focus is (redrawn as it moves), the
    palette key at the right.  A key the app refuses there (a change to a read-only
    site) is not shown."""

    def __init__(self, **kwargs: Any) -> None:
        kwargs.setdefault("compact", True)
        kwargs.setdefault("show_command_palette", True)
        super().__init__(**kwargs)

    def refresh_keys(self) -> None:
        """Redraw (after a change of theme)."""
        self.refresh(recompose=True)
