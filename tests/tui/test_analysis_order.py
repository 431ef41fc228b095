"""After a reading the device is judged at once; the full checks follow and never go back.

The full analysis is held by a gate the test opens, so the order of events is
set by the test, not by timing luck.
"""

from __future__ import annotations

import threading
from pathlib import Path
from typing import Any

import pytest

import tui.app.analysis as analysis_mod
import tui.app.autosave as autosave_mod
from model.rules.checks import analyse
from model.site.models import Reading
from model.site.terms import DID_NOT_TRIP
from model.storage.sites import load_site
from tui.app.shell import make_app


def _no_trip(analysis: Any, dev: str) -> bool:
    return any(f.rule == "reading.no-trip" and f.nodes == (dev,) for f in analysis.findings)


async def test_a_reading_is_judged_before_the_full_checks_and_an_older_run_never_wins(
    oak_lane: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    app = make_app(oak_lane)
    async with app.run_test(size=(120, 40)) as pilot:
        await app.settle()
        assert app.analysis is not None and not _no_trip(app.analysis, "rc1")
        gate = threading.Event()
        started: list[Any] = []

        def held_analyse(site: Any, index: Any = None) -> Any:
            started.append(site)
            gate.wait(30)
            return analyse(site, index)

        monkeypatch.setattr(analysis_mod, "analyse", held_analyse)
        try:
            # a full run starts on the site as it is now, and is held
            app._schedule_analysis()
            app._start_analysis(now=True)
            for _ in range(100):
                if started:
                    break
                await pilot.pause(0.02)
            assert started
            # IEC 61008-1 Table 1: a device that does not trip at IΔn fails (urgent here)
            assert app.record_reading("rc1", Reading(x1_0=DID_NOT_TRIP)) is None
            # judged at once, before any full run has finished
            assert _no_trip(app.analysis, "rc1")
            assert app.analysis.counts()["urgent"] >= 1
            assert app.analysis == analyse(app.site)  # the same as a full analysis now
            # the held run (of the site before the reading) lands: it must not win
            gate.set()
            await app.workers.wait_for_complete()
            await pilot.pause()
            assert _no_trip(app.analysis, "rc1")
            assert any(
                f.rule == "reading.no-trip" and f.nodes == ("rc1",) for f in app.main.findings.shown
            )
            # the full run for the site now replaces it, with the same findings
            await app.settle()
            assert app.analysis == analyse(app.site)
            assert _no_trip(app.analysis, "rc1")
        finally:
            gate.set()


async def test_the_save_runs_in_the_background_and_lands(
    oak_lane: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    # the saves start when the test says (as when the typing stops), never on a timer
    monkeypatch.setattr(autosave_mod, "SAVE_DELAY_S", 600.0)
    app = make_app(oak_lane)
    async with app.run_test(size=(120, 40)) as pilot:
        await app.settle()
        assert app.record_reading("rc1", Reading(x1_0=41.0)) is None
        assert app.save_state == "pending"
        app._save_due()  # as when the typing stopped
        await app.workers.wait_for_complete()
        await pilot.pause()
        assert app.save_state == "saved"
        assert not app.session.dirty
        assert load_site(oak_lane).visits[-1].readings["rc1"].x1_0 == 41.0
        # an edit typed while a save encodes the site: that save writes nothing and the
        # edit is never shown as saved
        gate, taken = threading.Event(), threading.Event()
        session = app.session
        real_snapshot = session.snapshot

        def held_snapshot() -> tuple[int, bytes]:
            snap = real_snapshot()
            taken.set()
            gate.wait(30)
            return snap

        session.snapshot = held_snapshot  # type: ignore[method-assign]
        try:
            assert app.record_reading("rc1", Reading(x1_0=42.0)) is None
            app._save_due()
            for _ in range(200):
                if taken.is_set():
                    break
                await pilot.pause(0.02)
            assert taken.is_set()
            assert app.record_reading("rc1", Reading(x1_0=43.0)) is None
        finally:
            gate.set()
        await app.workers.wait_for_complete()
        await pilot.pause()
        assert app.save_state == "pending" and session.dirty
        assert load_site(oak_lane).visits[-1].readings["rc1"].x1_0 == 41.0  # not 42 alone
        assert app.save_now()
        assert app.save_state == "saved"
        assert load_site(oak_lane).visits[-1].readings["rc1"].x1_0 == 43.0
