"""The tripwise terminal app: one site file, edited through an editing session.

``make_app(site_path)`` opens the session and builds the app; the CLI and the
tests both use it.  This module holds the app's frame: its keys, start-up
(including the question when the file is open elsewhere) and quitting.  The
rest of the app is made of parts, one module each: saving
(:mod:`tui.app.autosave`), the checks in the background (:mod:`tui.app.analysis`),
changes and undo (:mod:`tui.app.edits`), the tree's actions
(:mod:`tui.app.node_actions`), trying a change on a scratch copy
(:mod:`tui.app.what_if`) and the other screens (:mod:`tui.app.dialogs`).
"""

from __future__ import annotations

import os
from pathlib import Path
from typing import Any

from textual.app import App
from textual.binding import Binding
from textual.reactive import reactive
from textual.screen import ModalScreen, Screen

from model.rules.findings import Analysis
from model.site.tree import SiteIndex
from model.site.undo import UndoStack
from model.storage.session import EditSession, LockHeld, SaveError
from tui.app.analysis import AnalysisMixin
from tui.app.autosave import AutosaveMixin
from tui.app.commands import CommandsMixin
from tui.app.dialogs import DialogActionsMixin
from tui.app.edits import EditsMixin
from tui.app.looks import LooksMixin
from tui.app.node_actions import NodeActionsMixin
from tui.app.safe_display import show_controls_visibly
from tui.app.what_if import WhatIfMixin
from tui.screens.closing import KeyGate
from tui.screens.confirm import ConfirmScreen
from tui.screens.main import MainScreen
from tui.screens.readings import ReadingScreen


class TripwiseApp(
    CommandsMixin,
    NodeActionsMixin,
    WhatIfMixin,
    DialogActionsMixin,
    EditsMixin,
    AutosaveMixin,
    AnalysisMixin,
    LooksMixin,
    KeyGate,
    App[None],
):
    """The app for one site file."""

    CSS_PATH = "app.tcss"
    TITLE = "tripwise"

    BINDINGS = [
        Binding("f1", "help", "Help", tooltip="every key, by where it applies"),
        Binding("question_mark", "help", "Help", show=False, tooltip="every key"),
        Binding("ctrl+s", "save", "Save", show=False, tooltip="save now (edits also save soon)"),
        Binding("ctrl+z", "undo", "Undo", tooltip="undo the last change (whole-site step)"),
        Binding("u", "undo", "Undo", show=False, tooltip="undo the last change"),
        Binding("t", "focus_tree", "Tree", show=False, tooltip="go to the tree"),
        Binding("f", "focus_findings", "Findings", tooltip="go to the findings"),
        Binding("s", "site_details", "Site", show=False, tooltip="site details and supply"),
        Binding("v", "visits", "Visits", show=False, tooltip="visits; start a new one"),
        Binding("x", "export", "Export", show=False, tooltip="write a report or test sheet"),
        Binding(
            "h", "compare_visits", "Compare visits", show=False, tooltip="two visits side by side"
        ),
        Binding(
            "o",
            "merge_other",
            "Merge a copy",
            show=False,
            tooltip="merge another copy of this site",
        ),
        Binding(
            "l", "toggle_theme", "Daylight / dark", show=False, tooltip="daylight or dark theme"
        ),
        Binding("q", "quit_app", "Quit", tooltip="save and quit"),
    ]

    site_name: reactive[str] = reactive("")
    save_state: reactive[str] = reactive("saved")
    save_message: reactive[str] = reactive("")

    def __init__(
        self,
        site_path: Path,
        session: EditSession | None,
        *,
        lock_message: str | None = None,
        welcome: str | None = None,
        open_error: str | None = None,
    ) -> None:
        show_controls_visibly()
        super().__init__()
        self.site_path = site_path
        #: Said as the site opens (where the demo copy is), then kept as the sub-title.
        self.welcome = welcome
        #: Why a site that was to be edited is open read-only (no journal could be started).
        self.open_error = open_error
        self.session: EditSession | None = session
        self.lock_message = lock_message
        self.analysis: Analysis | None = None
        self.index: SiteIndex = _empty_index()
        self.undo_stack = UndoStack()
        self._set_up_looks()
        if session is not None:
            self._took_session(session)

    _APP_ACTIONS = frozenset(
        {"help", "save", "undo", "focus_tree", "focus_findings", "site_details", "visits"}
        | {"export", "quit_app", "toggle_theme"}
    )
    #: Actions that make no sense while typing readings (their keys are values there).
    _NOT_WHILE_READING = frozenset(
        {"focus_tree", "focus_findings", "quit_app", "site_details", "visits", "export"}
        | {"toggle_theme"}
    )

    #: App actions offered under a dialog (the others wait until it is closed).
    _UNDER_A_DIALOG = frozenset({"help", "save"})
    #: Actions that change the site: neither shown nor offered when it is open read-only.
    _CHANGES = frozenset(
        {"undo", "merge_other", "add_node", "edit_node", "move_node", "copy_node"}
        | {"delete_node", "readings"}
    )

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        if action in self._CHANGES and (self.session is None or self.session.read_only):
            return False
        if isinstance(self.screen, ModalScreen):
            return action in self._UNDER_A_DIALOG or action not in self._APP_ACTIONS
        reading = isinstance(self.screen, ReadingScreen)
        return not (reading and action in self._NOT_WHILE_READING)

    # ------------------------------------------------------------ start-up
    def get_default_screen(self) -> Screen[Any]:
        return MainScreen()

    def _took_session(self, session: EditSession) -> None:
        self.session = session
        self.index = SiteIndex.build(session.site)
        self.site_name = session.site.site.name
        if session.read_only:
            self.save_state = "read-only"
            self.save_message = self.open_error or ""
        else:
            # edits replayed from the journal are not in the file until it is saved
            self.save_state = "recovered" if session.dirty else "saved"

    def notify(
        self,
        message: str,
        *,
        title: str = "",
        severity: Any = "information",
        timeout: float | None = None,
        markup: bool = False,
    ) -> None:
        """Notices carry user text (labels, file names): never read them as markup."""
        super().notify(message, title=title, severity=severity, timeout=timeout, markup=False)

    def on_mount(self) -> None:
        self._looks_mounted()
        if self.session is None:
            self.push_screen(
                ConfirmScreen(
                    "This site is open elsewhere",
                    f"{self.lock_message}\n\nOpen it read-only (look, but change nothing)?",
                    yes="Open read-only",
                    no="Quit",
                ),
                self._lock_answer,
            )
            return
        self._opened()

    def _lock_answer(self, yes: bool | None) -> None:
        if not yes:
            self.exit()
            return
        try:
            self._took_session(EditSession.open(self.site_path, read_only=True))
        except Exception as exc:  # noqa: BLE001 - shown to the user, never a traceback
            self.exit(message=f"tripwise: cannot open {self.site_path}: {exc}")
            return
        self.main.show_site(keep=None)
        self._opened()

    def _opened(self) -> None:
        assert self.session is not None
        self.sub_title = str(self.site_path)
        if self.welcome:
            # long enough to read the path; the file name stays in the top bar afterwards
            self.notify(self.welcome, title="tripwise", timeout=10)
        if self.open_error:
            self.notify(
                f"{self.open_error}; opened read-only",
                title="Cannot edit",
                severity="error",
                timeout=20,
            )
        for line in self.session.recovered:
            self.notify(line, title="Recovered from the journal", timeout=12)
        self._show_new_warnings()
        # the first screen is drawn before the checks start, so the tree is usable at once
        self._first_analysis()

    @property
    def has_site(self) -> bool:
        """False only while the app asks whether to open a site held elsewhere read-only."""
        return self.session is not None

    @property
    def main(self) -> MainScreen:
        """The main screen (at the bottom of the screen stack)."""
        for s in self.screen_stack:
            if isinstance(s, MainScreen):
                return s
        raise LookupError("main screen")

    # ------------------------------------------------------------ quitting
    def action_quit_app(self) -> None:
        unsaved = (
            self.session is not None
            and not self.session.read_only
            and (
                self.session.dirty or self.save_state in ("pending", "saving", "error", "recovered")
            )
        )
        if unsaved and not self.save_now():

            def answered(yes: bool | None) -> None:
                if yes:
                    self._close_and_exit()

            self.push_screen(
                ConfirmScreen(
                    "Saving failed",
                    f"{self.save_message}\nYour edits are kept in the journal. Quit anyway?",
                ),
                answered,
            )
            return
        self._close_and_exit()

    def _close_and_exit(self) -> None:
        if self.session is not None:
            self.session.close()
        self.exit()


def _empty_index() -> SiteIndex:
    return SiteIndex(site=None)  # type: ignore[arg-type]


def make_app(
    site_path: str | os.PathLike[str], *, read_only: bool = False, welcome: str | None = None
) -> TripwiseApp:
    """Open a site file for editing (or read-only) and build the app on it.

    Raises ``model.storage.codec.SiteLoadError`` when the file cannot be used.  When the
    file is held by another session the app starts by offering to open it read-only.
    """
    path = Path(site_path)
    try:
        session = EditSession.open(path, read_only=read_only)
    except LockHeld as exc:
        return TripwiseApp(path, None, lock_message=str(exc), welcome=welcome)
    try:
        session.check_journal()
    except SaveError as exc:
        # a read-only folder or a full disk: edits could not be kept, so none are taken
        session.close()
        session = EditSession.open(path, read_only=True)
        return TripwiseApp(path, session, open_error=str(exc), welcome=welcome)
    return TripwiseApp(path, session, welcome=welcome)
