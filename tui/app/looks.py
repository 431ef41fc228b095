"""The app's looks: the dark and daylight themes, switched by a key or the command
palette and remembered per user (:mod:`tui.settings`)."""

from __future__ import annotations

from collections.abc import Iterable
from typing import Any

from textual.app import SystemCommand
from textual.screen import Screen

from tui.settings import Settings, load_settings, save_settings
from tui.themes import DARK, LIGHT, THEME_WORDS, THEMES, tone_defaults


class LooksMixin:
    """The theme part of :class:`~tui.app.shell.TripwiseApp` (a mixin of the app)."""

    settings: Settings
    theme: str

    def _set_up_looks(self) -> None:
        """Register our themes and take the user's (call once, in the app's ``__init__``)."""
        app: Any = self
        for t in THEMES.values():
            app.register_theme(t)
        self.settings = load_settings()
        self.theme = self.settings.theme

    def _looks_mounted(self) -> None:
        app: Any = self
        for note in self.settings.notes:
            app.notify(note, title="Settings", severity="warning", timeout=10)
        app.watch(app, "theme", self._theme_changed, init=False)

    def get_theme_variable_defaults(self) -> dict[str, str]:
        # a theme of Textual's own (chosen elsewhere) still has our variables
        return tone_defaults()

    def action_toggle_theme(self) -> None:
        """Daylight if dark, dark if daylight."""
        self.theme = DARK if self.theme == LIGHT else LIGHT

    def _theme_changed(self, name: str) -> None:
        app: Any = self
        if name not in THEMES:
            return
        for screen in app.screen_stack:
            retone = getattr(screen, "retone", None)
            if retone is not None:
                retone()
        if name == self.settings.theme:
            return
        self.settings.theme = name
        problem = save_settings(self.settings)
        if problem:
            app.notify(problem, severity="warning")

    def get_system_commands(self, screen: Screen[Any]) -> Iterable[SystemCommand]:
        # Textual's own theme list holds themes that are not ours: offer our two instead
        for cmd in super().get_system_commands(screen):  # type: ignore[misc]
            if cmd.title != "Theme":
                yield cmd
        other = DARK if self.theme == LIGHT else LIGHT
        yield SystemCommand(
            f"{THEME_WORDS[other].capitalize()} theme",
            f"Switch to the {THEME_WORDS[other]} colours (key l); remembered for next time",
            self.action_toggle_theme,
        )
