"""Running the checks: one device at once after a reading, the whole site in the background.

After a reading the device is re-judged at once on the main path
(:func:`model.rules.partial.rejudge_reading`: its reading findings, its pairs,
its trend, the counts), so the findings are right before the next key.  The
full analysis still runs, in a worker thread, once the keys have stopped for
:data:`IDLE_ANALYSIS_S`; after any other edit it runs :data:`ANALYSIS_DELAY_S`
after the last one.  Each change bumps a generation counter; a result is taken
only if no change came after the one it was started for, so an older result
never replaces a newer one.
"""

from __future__ import annotations

import contextlib
import time

from textual import events, work
from textual.css.query import NoMatches
from textual.timer import Timer
from textual.worker import WorkerCancelled

from model.rules.checks import analyse
from model.rules.findings import Analysis
from model.rules.partial import rejudge_reading
from model.site.models import SiteFile
from model.site.tree import SiteIndex
from model.storage.session import EditSession

#: Seconds after the last edit before the checks are re-run (edits other than readings).
ANALYSIS_DELAY_S = 0.12
#: Seconds after the first paint before the first checks (the tree is usable meanwhile).
FIRST_ANALYSIS_DELAY_S = 0.1
#: Seconds without a key before the full checks follow a reading (its device is
#: re-judged at once, so they only confirm; they never run between keys).
IDLE_ANALYSIS_S = 1.0


class AnalysisMixin:
    """The analysis part of :class:`~tui.app.shell.TripwiseApp` (a mixin of the app)."""

    session: EditSession | None
    analysis: Analysis | None
    index: SiteIndex
    _analysis_timer: Timer | None = None
    #: Bumped by every change; a result for an older generation is dropped.
    _analysis_gen = 0
    #: True when the site changed since the checks were last started.
    _analysis_wanted = False
    #: True when the analysis shown is already right for the site (a device re-judged):
    #: the full run only confirms it, so the findings do not say "checking".
    _analysis_current = False
    #: When the last key arrived (monotonic seconds).
    _last_key_at = 0.0

    async def on_event(self, event: events.Event) -> None:
        if isinstance(event, events.Key):
            self._last_key_at = time.monotonic()
        await super().on_event(event)

    def _schedule_analysis(self, delay: float = ANALYSIS_DELAY_S) -> None:
        self._analysis_gen += 1
        self._analysis_wanted = True
        self._analysis_current = False
        self._arm_analysis(delay)

    def _arm_analysis(self, delay: float) -> None:
        if self._analysis_timer is not None:
            self._analysis_timer.stop()
        self._analysis_timer = self.set_timer(delay, self._start_analysis)

    def _reading_changed(self, device_id: str) -> None:
        """One device's reading changed: re-judge it now, the whole site when idle."""
        assert self.session is not None
        site = self.session.site
        before = self.analysis
        partial = None if before is None else rejudge_reading(site, before, device_id)
        if partial is None:
            self._schedule_analysis()
            return
        self._analysis_gen += 1
        self._analysis_wanted = True
        self._analysis_current = True
        self.analysis = partial
        assert partial.index is not None
        self.index = partial.index  # the same tree, read from the new site
        self._show_analysis()
        self._arm_analysis(IDLE_ANALYSIS_S)

    def _start_analysis(self, *, now: bool = False) -> None:
        if now and self._analysis_timer is not None:  # called at once: no timer needed
            self._analysis_timer.stop()
        self._analysis_timer = None
        if self.session is None or not self._analysis_wanted:
            return
        if self._analysis_current and not now:
            quiet = time.monotonic() - self._last_key_at
            if quiet < IDLE_ANALYSIS_S:  # still typing: wait for the keys to stop
                self._arm_analysis(IDLE_ANALYSIS_S - quiet)
                return
        self._analysis_wanted = False
        site = self.session.site
        # the tree's index is handed on when it was built from this very site
        index = self.index if self.index.site is site else None
        self._run_analysis(site, index, self._analysis_gen)
        if not self._analysis_current:
            self._say_checking(True)

    def _first_analysis(self) -> None:
        self._analysis_wanted = True
        self.call_after_refresh(self._after_first_paint)

    def _after_first_paint(self) -> None:
        self._arm_analysis(FIRST_ANALYSIS_DELAY_S)

    def _say_checking(self, on: bool) -> None:
        """Tell the findings the checks run (or ended); nothing while the app closes."""
        with contextlib.suppress(LookupError, NoMatches):
            self.main.findings.set_checking(on)

    # a description of our own: by default the worker's is the repr of its arguments,
    # which for a large site takes longer than the checks
    @work(
        thread=True,
        exclusive=True,
        group="analysis",
        exit_on_error=False,
        description="the checks of the whole site",
    )
    def _run_analysis(self, site: SiteFile, index: SiteIndex | None, gen: int) -> None:
        try:
            result: Analysis | str = analyse(site, index)
        except Exception as exc:  # noqa: BLE001 - reported on screen
            result = f"the checks failed: {exc}"
        self.call_from_thread(self._analysis_done, result, gen)

    def _analysis_done(self, result: Analysis | str, gen: int) -> None:
        if gen != self._analysis_gen:
            return  # the site changed since: a newer result is shown or on its way
        if not self._analysis_wanted:
            self._say_checking(False)
        if isinstance(result, str):
            self.notify(result, severity="error")
            return
        same = result == self.analysis  # the usual case after a re-judged reading
        self.analysis = result
        self._analysis_current = False
        if not same:
            self._show_analysis()

    def _show_analysis(self) -> None:
        with contextlib.suppress(LookupError):
            self.main.show_analysis()

    async def settle(self) -> None:
        """Run pending checks now and wait for them (used by tests and benchmarks)."""
        self._start_analysis(now=True)
        for worker in list(self.workers):
            with contextlib.suppress(WorkerCancelled):  # a newer run took over from it
                await worker.wait()
