"""The app's two themes (dark, and daylight for a screen in the sun) and its named tones.

Every colour of the app lives here, as a Textual :class:`~textual.theme.Theme`.
The ``.tcss`` files use the theme's ``$`` variables; code that builds Rich text
names the same variables in its styles (:func:`tone`), read from the theme in
use when the text is built, so switching the theme recolours everything.
"""

from __future__ import annotations

from textual.app import active_app
from textual.theme import Theme

DARK = "tripwise-dark"
LIGHT = "tripwise-daylight"

#: Our own variables (``$tw-…`` in .tcss and in :func:`tone`), dark values.
_DARK_TONES: dict[str, str] = {
    "tw-muted": "#8fa7b3",  # secondary text: paths, ids, hints
    "tw-value": "#d9c28a",  # ratings and values
    "tw-field": "#9fb4bf",  # a field's title
    "tw-quiet": "#6b7c86",  # optional things
    "tw-ok": "#7bd88f",
    "tw-bad": "#ff4d5e",
    "tw-urgent": "#ff4d5e",
    "tw-required": "#ff9a3c",
    "tw-advisory": "#e8c547",
    "tw-investigate": "#5ec8e5",
    "tw-none": "#4a5a66",  # no finding on a node
    "tw-cell": "#1e2a32",  # a value cell
    "tw-cell-here": "#3a3220",  # the value cell being typed in
    "tw-key-text": "#c9d4da",  # a key's description in the key line
    "tw-chip": "#22303a",  # filter chips
    "tw-caution-bg": "#2a2418",
    "tw-caution": "#e8cf8a",
    "tw-tree-bg": "#151b20",
    "tw-box-bg": "#171d22",
    "tw-line": "#2f3b44",  # box borders
    "tw-cursor": "#2c4a55",
    "tw-save-ok": "#2d6a45",
    "tw-save-pending": "#6b5a1e",
    "tw-save-error": "#9c2a33",
    "tw-save-ro": "#4a4f7a",
    "tw-dim": "#0b0f12 70%",  # behind a dialog
    "tw-chart-up": "#e8a33d",  # the upstream device on a band chart
    "tw-chart-down": "#56b6e2",  # the downstream device
    "tw-chart-shade": "#78343c",  # currents where selectivity is not guaranteed
    "tw-chart-fault": "#8c8c8c",  # the largest fault current
    "tw-chart-limit": "#5aaa5a",  # the current a pair is selective up to
    "tw-chart-unshown": "#5a5a5a",  # currents the published bands cannot settle
}

#: The same variables for daylight: dark text on a pale ground, deeper colours
#: so that marks stay apart in strong light.
_LIGHT_TONES: dict[str, str] = {
    "tw-muted": "#3f5561",
    "tw-value": "#6a4a00",
    "tw-field": "#2f4654",
    "tw-quiet": "#5c6b73",
    "tw-ok": "#1c7a3c",
    "tw-bad": "#b3001e",
    "tw-urgent": "#b3001e",
    "tw-required": "#b04a00",
    "tw-advisory": "#7d6200",
    "tw-investigate": "#005f85",
    "tw-none": "#9aa7ae",
    "tw-cell": "#e3e9ec",
    "tw-cell-here": "#f6dfa6",
    "tw-key-text": "#1c2a32",
    "tw-chip": "#d6e1e6",
    "tw-caution-bg": "#f3e2b3",
    "tw-caution": "#3d2d00",
    "tw-tree-bg": "#ffffff",
    "tw-box-bg": "#f8f9f9",
    "tw-line": "#8a9ba5",
    "tw-cursor": "#c6dde6",
    "tw-save-ok": "#b9e3c6",
    "tw-save-pending": "#f1dd9a",
    "tw-save-error": "#f2b8bf",
    "tw-save-ro": "#cfd1ee",
    "tw-dim": "#6b7780 50%",
    "tw-chart-up": "#a55a00",
    "tw-chart-down": "#0a5f8f",
    "tw-chart-shade": "#e7b7bd",
    "tw-chart-fault": "#6b6b6b",
    "tw-chart-limit": "#2e7d32",
    "tw-chart-unshown": "#b0b0b0",
}

THEMES: dict[str, Theme] = {
    DARK: Theme(
        name=DARK,
        primary="#1f4e5a",
        secondary="#2c4a55",
        accent="#e0a526",
        warning="#ff9a3c",
        error="#ff4d5e",
        success="#7bd88f",
        foreground="#d6dde2",
        background="#12171b",
        surface="#1b2228",
        panel="#151b20",
        dark=True,
        variables=_DARK_TONES,
    ),
    LIGHT: Theme(
        name=LIGHT,
        primary="#1d5c6b",
        secondary="#c6dde6",
        accent="#a85d00",
        warning="#b04a00",
        error="#b3001e",
        success="#1c7a3c",
        foreground="#0e1418",
        background="#f4f3ee",
        surface="#ffffff",
        panel="#e9edef",
        dark=False,
        variables=_LIGHT_TONES,
    ),
}

#: In words, for the command palette and notices.
THEME_WORDS: dict[str, str] = {DARK: "dark", LIGHT: "daylight"}


def tone_defaults() -> dict[str, str]:
    """Values for our variables under a theme that does not set them (any other theme)."""
    return dict(_DARK_TONES)


#: Outside a running app (a test rendering a widget alone): the dark values.
_FALLBACK: dict[str, str] = {
    **_DARK_TONES,
    "accent": "#e0a526",
    "background": "#12171b",
    "foreground": "#d6dde2",
    "warning": "#ff9a3c",
    "error": "#ff4d5e",
    "success": "#7bd88f",
}


def tone(spec: str) -> str:
    """A Rich style with each ``$variable`` replaced by its colour in the theme in use.

    ``tone("bold $tw-urgent")`` gives ``"bold #ff4d5e"`` under the dark theme;
    the names are those of the ``.tcss`` files (Textual's own and our ``tw-…``).
    Outside a running app the dark values are used.
    """
    try:
        variables: dict[str, str] = active_app.get().theme_variables
    except LookupError:
        variables = _FALLBACK
    words = []
    for word in spec.split():
        if word.startswith("$"):
            name = word[1:]
            word = (variables.get(name) or _FALLBACK[name]).split()[0]  # Rich has no opacity
        words.append(word)
    return " ".join(words)
