"""The strip along the top: product, site name and file, file mode and save state."""

from __future__ import annotations

from rich.text import Text
from textual.app import ComposeResult
from textual.containers import Horizontal
from textual.widgets import Static

SAVE_TEXT: dict[str, tuple[str, str]] = {
    "saved": ("✔ saved", "save-ok"),
    "recovered": ("✎ recovered, not yet saved", "save-pending"),
    "pending": ("✎ journalled, saving…", "save-pending"),
    "saving": ("⟳ saving…", "save-pending"),
    "error": ("✖ not saved", "save-error"),
    "read-only": ("⊘ read-only", "save-ro"),
}


class TopBar(Horizontal):
    """Shows the site name and the save state; follows the app's reactives."""

    def compose(self) -> ComposeResult:
        yield Static(Text("tripwise", style="bold"), id="brand", markup=False)
        yield Static("", id="site-name", markup=False)
        yield Static("", id="save-state", markup=False)

    _save_unseen = False

    def screen_shown(self) -> None:
        """Its screen is on top again: show the save state if it changed meanwhile."""
        if self._save_unseen:
            self._show_save()

    def on_mount(self) -> None:
        self.watch(self.app, "site_name", self._show_name)
        self.watch(self.app, "save_state", self._show_save)
        self.watch(self.app, "save_message", self._show_save)

    def _show_name(self, name: str) -> None:
        text = Text(name, overflow="ellipsis", no_wrap=True)
        path = getattr(self.app, "site_path", None)
        if path is not None:  # which file the edits go to (a demo copy, a colleague's copy)
            text.append(f"  {path.name}", style="not bold")
        self.query_one("#site-name", Static).update(text)

    def _show_save(self, _value: str = "") -> None:
        if not self.screen.is_active:
            # Under another screen: drawn when its screen is shown again (a change drawn
            # on a screen underneath makes the screen on top draw itself again too).
            self._save_unseen = True
            return
        self._save_unseen = False
        state = str(getattr(self.app, "save_state", "saved"))
        message = str(getattr(self.app, "save_message", ""))
        text, cls = SAVE_TEXT.get(state, (state, "save-pending"))
        if state in ("error", "read-only") and message:
            text = f"{text}: {message}"
        label = self.query_one("#save-state", Static)
        label.update(Text(text, overflow="ellipsis", no_wrap=True))
        label.set_classes(cls)
