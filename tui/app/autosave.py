"""Saving the open site: a moment after the last edit, at once on request, and its warnings.

Every accepted edit is journalled by the session at once; the file itself is
written a moment after the typing stops.  The save state in the top bar shows
where that stands.
"""

from __future__ import annotations

from textual.timer import Timer

from model.storage.session import EditSession

#: Seconds after the last edit before the file is written (edits are journalled at once).
SAVE_DELAY_S = 0.8


class AutosaveMixin:
    """The saving part of :class:`~tui.app.shell.TripwiseApp` (a mixin of the app)."""

    session: EditSession | None
    save_state: str
    save_message: str
    _save_timer: Timer | None = None
    #: How many of the session's warnings have been shown.
    _warned = 0

    def _schedule_save(self) -> None:
        self.save_state = "pending"
        if self._save_timer is not None:
            self._save_timer.stop()
        self._save_timer = self.set_timer(SAVE_DELAY_S, self._save_due)

    def _save_due(self) -> None:
        self._save_timer = None
        self.save_state = "saving"
        self.call_after_refresh(self.save_now)

    def save_now(self) -> bool:
        """Write the file now; the save state shows the outcome."""
        if self._save_timer is not None:
            self._save_timer.stop()
            self._save_timer = None
        if self.session is None or self.session.read_only:
            return True
        if not self.session.dirty and self.save_state == "saved":
            return True
        try:
            self.session.save()
        except Exception as exc:  # noqa: BLE001 - any failure is shown, the journal keeps the edits
            self.save_state = "error"
            self.save_message = str(exc) or exc.__class__.__name__
            return False
        self.save_state = "saved"
        self.save_message = ""
        self._show_new_warnings()
        return True

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
