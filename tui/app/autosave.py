"""Saving the open site: a moment after the last edit, at once on request, and its warnings.

Every accepted edit is journalled by the session at once, on the main path,
in order; the file itself is written a moment after the typing stops, in a
worker thread, so writing a large site never holds up a key.  The session
writes what it encoded only if no edit came after it (the next save takes that
edit), and a failed save leaves every edit in the journal.  The save state in
the top bar shows where that stands.  Saving on request (Ctrl+S) and on
quitting is done at once, on the main path.
"""

from __future__ import annotations

import contextlib
import time

from textual import work
from textual.timer import Timer

from model.storage.session import EditSession

#: Seconds after the last edit before the file is written (edits are journalled at once).
SAVE_DELAY_S = 0.8
#: Seconds without a key before the file is written (encoding a large site takes a while).
SAVE_QUIET_S = 0.5


class AutosaveMixin:
    """The saving part of :class:`~tui.app.shell.TripwiseApp` (a mixin of the app)."""

    session: EditSession | None
    save_state: str
    save_message: str
    _save_timer: Timer | None = None
    #: How many of the session's warnings have been shown.
    _warned = 0
    _last_key_at = 0.0

    #: Bumped by every edit and every save on request: a background save that
    #: finds it changed has been overtaken (its outcome is not shown).
    _save_turn = 0

    def _schedule_save(self) -> None:
        self._save_turn += 1
        self.save_state = "pending"  # already says "saving…": the background save adds no state
        self._arm_save(SAVE_DELAY_S)

    def _arm_save(self, delay: float) -> None:
        if self._save_timer is not None:
            self._save_timer.stop()
        self._save_timer = self.set_timer(delay, self._save_due)

    def _save_due(self) -> None:
        self._save_timer = None
        session = self.session
        if session is None or session.read_only:
            return
        quiet = time.monotonic() - self._last_key_at
        if quiet < SAVE_QUIET_S:  # still typing: the edits are safe in the journal
            self._arm_save(SAVE_QUIET_S - quiet)
            return
        self._save_in_background(session, self._save_turn)

    @work(thread=True, group="save", exit_on_error=False, description="saving the site file")
    def _save_in_background(self, session: EditSession, turn: int) -> None:
        outcome: bool | Exception
        try:
            outcome = session.write_snapshot(session.snapshot())
        except Exception as exc:  # noqa: BLE001 - any failure is shown, the journal keeps the edits
            outcome = exc
        with contextlib.suppress(RuntimeError):  # the app has closed meanwhile
            self.call_from_thread(self._saved_in_background, session, turn, outcome)

    def _saved_in_background(
        self, session: EditSession, turn: int, outcome: bool | Exception
    ) -> None:
        if session is not self.session or turn != self._save_turn:
            return  # an edit came after it (its save is scheduled), or a save on request
        if isinstance(outcome, Exception):
            self._save_failed(outcome)
        elif outcome and not session.dirty:
            self._save_done()
        else:  # an edit came while it was encoded: save again
            self._schedule_save()

    def save_now(self) -> bool:
        """Write the file now; the save state shows the outcome."""
        if self._save_timer is not None:
            self._save_timer.stop()
            self._save_timer = None
        if self.session is None or self.session.read_only:
            return True
        if not self.session.dirty and self.save_state == "saved":
            return True
        self._save_turn += 1
        try:
            self.session.save()
        except Exception as exc:  # noqa: BLE001 - any failure is shown, the journal keeps the edits
            self._save_failed(exc)
            return False
        self._save_done()
        return True

    def _save_failed(self, exc: Exception) -> None:
        self.save_state = "error"
        self.save_message = str(exc) or exc.__class__.__name__

    def _save_done(self) -> None:
        self.save_state = "saved"
        self.save_message = ""
        self._show_new_warnings()

    def _show_new_warnings(self) -> None:
        assert self.session is not None
        for line in self.session.warnings[self._warned :]:
            self.notify(line, title="Warning", severity="warning", timeout=12)
        self._warned = len(self.session.warnings)

    def action_save(self) -> None:
        if self.session is not None and self.session.read_only:
            self.notify("Read-only: nothing to save.")
            return
        if self.save_now():
            self.notify("Saved.", timeout=2)
