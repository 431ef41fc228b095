"""Running the checks in the background: after each edit, and once just after start-up.

The checks run in a worker thread so typing never waits for them.  Each edit
bumps a generation counter; a result is shown only if no edit came after the
one it was started for.
"""

from __future__ import annotations

import contextlib

from textual import work
from textual.css.query import NoMatches
from textual.timer import Timer

from model.rules.checks import analyse
from model.rules.findings import Analysis
from model.site.models import SiteFile
from model.site.tree import SiteIndex
from model.storage.session import EditSession

#: Seconds after the last edit before the checks are re-run.
ANALYSIS_DELAY_S = 0.12
#: Seconds after the first paint before the first checks (the tree is usable meanwhile).
FIRST_ANALYSIS_DELAY_S = 0.1


class AnalysisMixin:
    """The analysis part of :class:`~tui.app.shell.TripwiseApp` (a mixin of the app)."""

    session: EditSession | None
    analysis: Analysis | None
    index: SiteIndex
    _analysis_timer: Timer | None = None
    #: Bumped by every edit; a result for an older generation is dropped.
    _analysis_gen = 0
    #: True when the site changed since the checks were last started.
    _analysis_wanted = False

    def _schedule_analysis(self) -> None:
        self._analysis_gen += 1
        self._analysis_wanted = True
        if self._analysis_timer is not None:
            self._analysis_timer.stop()
        self._analysis_timer = self.set_timer(ANALYSIS_DELAY_S, self._start_analysis)

    def _start_analysis(self) -> None:
        self._analysis_timer = None
        if self.session is None or not self._analysis_wanted:
            return
        self._analysis_wanted = False
        site = self.session.site
        # the tree's index is handed on when it was built from this very site
        index = self.index if self.index.site is site else None
        self._run_analysis(site, index, self._analysis_gen)
        self._say_checking(True)

    def _first_analysis(self) -> None:
        self._analysis_wanted = True
        self.call_after_refresh(self._after_first_paint)

    def _after_first_paint(self) -> None:
        self._analysis_timer = self.set_timer(FIRST_ANALYSIS_DELAY_S, self._start_analysis)

    def _say_checking(self, on: bool) -> None:
        """Tell the findings the checks run (or ended); nothing while the app closes."""
        with contextlib.suppress(LookupError, NoMatches):
            self.main.findings.set_checking(on)

    @work(thread=True, exclusive=True, group="analysis", exit_on_error=False)
    def _run_analysis(self, site: SiteFile, index: SiteIndex | None, gen: int) -> None:
        try:
            result: Analysis | str = analyse(site, index)
        except Exception as exc:  # noqa: BLE001 - reported on screen
            result = f"the checks failed: {exc}"
        self.call_from_thread(self._analysis_done, result, gen)

    def _analysis_done(self, result: Analysis | str, gen: int) -> None:
        if gen != self._analysis_gen:
            return  # a newer run is on its way; the findings still say "checking"
        if not self._analysis_wanted:
            self._say_checking(False)
        if isinstance(result, str):
            self.notify(result, severity="error")
            return
        self.analysis = result
        self.main.show_analysis()

    async def settle(self) -> None:
        """Run pending checks now and wait for them (used by tests and benchmarks)."""
        if self._analysis_timer is not None:
            self._analysis_timer.stop()
        self._start_analysis()
        await self.workers.wait_for_complete()
