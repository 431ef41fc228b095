"""The compare screen, shown over a tiny host app."""

from __future__ import annotations

from pathlib import Path

from textual.app import App
from textual.widgets import DataTable, Static

from model.storage.sites import load_site
from tests.visits_helpers import make_site, sample_copy
from tui.screens.compare import CompareScreen


class Host(App[None]):
    pass


async def test_compare_screen_shows_changes_and_closes(tmp_path: Path) -> None:
    site = load_site(sample_copy(tmp_path))
    app = Host()
    async with app.run_test(size=(120, 40)) as pilot:
        screen = CompareScreen(site)
        await app.push_screen(screen)
        await app.workers.wait_for_complete()
        await pilot.pause()
        assert screen.comparison is not None and screen.error is None
        table = screen.query_one("#compare-readings", DataTable)
        row = table.get_row("rc2:x1_180")
        # rc2 on the invented sample: 180 -> 312 ms at 1 × IΔn, 180°, named as the trade does
        assert [str(c) for c in row] == ["  1 × IΔn, 180°", "180 ms", "312 ms", "+132 ms (+73 %)"]
        assert str(table.get_row("rc2")[0]) == "RCCB 2 (downstairs)"
        assert str(table.get_row("rb3")[0]) == "RCBO W3 — tested on the later visit only"
        findings = str(screen.query_one("#compare-findings", Static).render())
        assert "required    RCCB 2 (downstairs): 1 × IΔn test 312 ms is slower" in findings
        assert "reading.too-slow" not in findings and "(rc2)" not in findings
        await pilot.press("escape")
        await pilot.pause()
        assert app.screen is not screen


async def test_compare_screen_unknown_visit_says_so(tmp_path: Path) -> None:
    site = load_site(sample_copy(tmp_path))
    app = Host()
    async with app.run_test(size=(120, 40)) as pilot:
        screen = CompareScreen(site, from_id="nope")
        await app.push_screen(screen)
        await app.workers.wait_for_complete()
        await pilot.pause()
        assert screen.comparison is None
        assert screen.error is not None and "nope" in screen.error
        title = str(screen.query_one("#compare-title", Static).render())
        assert "Cannot compare" in title


async def test_step_to_earlier_and_later_pair() -> None:
    site = make_site(
        [
            ("v1", "2019-03-01", {"rc1": {"x1_0": 20.0}}),
            ("v2", "2022-03-01", {"rc1": {"x1_0": 22.0}}),
            ("v3", "2025-03-01", {"rc1": {"x1_0": 30.0}}),
        ]
    )
    app = Host()
    async with app.run_test(size=(120, 40)) as pilot:
        screen = CompareScreen(site)
        await app.push_screen(screen)
        await app.workers.wait_for_complete()
        await pilot.pause()
        assert screen.comparison is not None
        assert (screen.comparison.from_id, screen.comparison.to_id) == ("v2", "v3")
        await pilot.press("left_square_bracket")
        await app.workers.wait_for_complete()
        await pilot.pause()
        assert (screen.comparison.from_id, screen.comparison.to_id) == ("v1", "v2")
        row = screen.query_one("#compare-readings", DataTable).get_row("rc1:x1_0")
        assert [str(c) for c in row[1:]] == ["20 ms", "22 ms", "+2 ms (+10 %)"]
        await pilot.press("left_square_bracket")  # no earlier pair: stays
        await app.workers.wait_for_complete()
        await pilot.pause()
        assert (screen.comparison.from_id, screen.comparison.to_id) == ("v1", "v2")
        await pilot.press("right_square_bracket")
        await app.workers.wait_for_complete()
        await pilot.pause()
        assert (screen.comparison.from_id, screen.comparison.to_id) == ("v2", "v3")
