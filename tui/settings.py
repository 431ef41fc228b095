"""The user's own settings (now: the theme), kept per user in a small JSON file.

The file lives in the user's configuration folder (``platformdirs``:
``~/.config/tripwise/settings.json`` on Linux).  A missing file means the
defaults; a file that cannot be read or understood is ignored with a note for
the user, never an error, and is replaced at the next change.
"""

from __future__ import annotations

import json
from dataclasses import dataclass, field
from pathlib import Path

from platformdirs import user_config_path

from model.storage.files import SaveError, write_atomic
from tui.themes import DARK, THEMES

FILE_NAME = "settings.json"


def settings_dir() -> Path:
    """The folder of the user's settings (tests point it elsewhere)."""
    return user_config_path("tripwise", appauthor=False)


def settings_path() -> Path:
    return settings_dir() / FILE_NAME


@dataclass
class Settings:
    """What is remembered between sessions, and any note about reading it."""

    theme: str = DARK
    notes: list[str] = field(default_factory=list)


def load_settings() -> Settings:
    """The user's settings; defaults (with a note) where the file cannot be used."""
    path = settings_path()
    try:
        raw = path.read_text(encoding="utf-8")
    except FileNotFoundError:
        return Settings()
    except OSError as exc:
        return Settings(
            notes=[
                f"Your settings file {path} could not be read ({exc.strerror}); using the defaults."
            ]
        )
    try:
        doc = json.loads(raw)
    except ValueError:
        doc = None
    if not isinstance(doc, dict):
        return Settings(
            notes=[
                f"Your settings file {path} is not valid JSON; using the "
                "defaults (it is replaced when you change a setting)."
            ]
        )
    settings = Settings()
    theme = doc.get("theme", DARK)
    if theme in THEMES:
        settings.theme = theme
    else:
        settings.notes.append(
            f"Your settings file {path} names an unknown theme {theme!r}; using the dark theme."
        )
    return settings


def save_settings(settings: Settings) -> str | None:
    """Write the settings; None when saved, else why not (in words)."""
    path = settings_path()
    data = json.dumps({"theme": settings.theme}, indent=2) + "\n"
    try:
        path.parent.mkdir(parents=True, exist_ok=True)
        write_atomic(path, data.encode("utf-8"), replace=True, backup=False)
    except (OSError, SaveError) as exc:
        return f"the theme could not be remembered: {exc}"
    return None
