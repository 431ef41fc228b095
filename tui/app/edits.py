"""Every change to the open site: through the editing session, with an undo step before it.

An edit is made by the session (which validates and journals it); the app then
shows the site again, schedules the save and re-runs the checks.  Undo puts back
the whole site as it was before the last change.
"""

from __future__ import annotations

from collections.abc import Callable

from pydantic import ValidationError

from model.site.messages import error_text
from model.site.models import Reading, SiteFile
from model.site.tree import SiteIndex
from model.site.undo import UndoStack
from model.storage.files import SaveError
from model.storage.session import EditSession
from tui.screens.readings import ReadingScreen


def describe(exc: BaseException) -> str:
    """One line for the user from a refused edit."""
    if isinstance(exc, ValidationError):
        msgs = []
        for err in exc.errors()[:3]:
            msgs.append(error_text(err))
        return "; ".join(msgs)
    return str(exc)


class EditsMixin:
    """The editing part of :class:`~tui.app.shell.TripwiseApp` (a mixin of the app)."""

    session: EditSession | None
    index: SiteIndex
    site_name: str
    undo_stack: UndoStack

    @property
    def site(self) -> SiteFile:
        assert self.session is not None
        return self.session.site

    def _writable(self) -> bool:
        if self.session is None:
            return False
        if self.session.read_only:
            self.notify("The site is open read-only; nothing can be changed.", severity="warning")
            return False
        return True

    def apply_edit(
        self,
        label: str,
        change: Callable[[EditSession], None],
        *,
        select: str | None = None,
    ) -> str | None:
        """Make one change through the session; None when accepted, else why it was refused."""
        if not self._writable():
            return "the site is open read-only"
        assert self.session is not None
        before = self.site
        try:
            change(self.session)
        except (ValueError, TypeError, KeyError, OSError, SaveError) as exc:
            return describe(exc)
        self.undo_stack.push(label, before)
        self._after_edit(structural=True, select=select)
        return None

    def record_reading(self, device_id: str, reading: Reading | None) -> str | None:
        """Record one device's reading on the latest visit (None when accepted)."""
        if not self._writable():
            return "the site is open read-only"
        assert self.session is not None
        visit = self.site.latest_visit()
        if visit is None:
            return "there is no visit to record on"
        if visit.readings.get(device_id) == reading:
            return None  # nothing changed: nothing to journal
        try:
            self.session.set_reading(visit.id, device_id, reading)
        except (ValueError, TypeError, KeyError, OSError, SaveError) as exc:
            return describe(exc)
        self.site_name = self.site.site.name
        self._schedule_save()
        self._reading_changed(device_id)  # that device re-judged at once
        return None

    def _after_edit(self, *, structural: bool, select: str | None = None) -> None:
        self.site_name = self.site.site.name
        if structural:
            self.index = SiteIndex.build(self.site)
            self.main.show_site(keep=select)
        self._schedule_save()
        self._schedule_analysis()

    def action_undo(self) -> None:
        if not self._writable():
            return
        if not self.undo_stack:
            self.notify("Nothing to undo.")
            return
        assert self.session is not None
        label, state = self.undo_stack.undo()
        try:
            self.session.replace_site(state)
        except (ValueError, TypeError, OSError, SaveError) as exc:
            self.notify(f"Could not undo: {describe(exc)}", severity="error")
            return
        self.index = SiteIndex.build(self.site)
        self.site_name = self.site.site.name
        self.main.show_site(keep=None)
        if isinstance(self.screen, ReadingScreen):
            self.screen.site_replaced()
        self._schedule_save()
        self._schedule_analysis()
        self.notify(f"Undone: {label}")
