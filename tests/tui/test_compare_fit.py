"""The compare screen fits 80×24 and 100×30: every column, the change included, on screen."""

from __future__ import annotations

from pathlib import Path

import pytest
from textual.widgets import DataTable

from tests.tui.test_main_snapshot import settled_text
from tui.app.shell import make_app
from tui.screens.compare import CompareScreen


@pytest.mark.parametrize("size", [(80, 24), (100, 30)])
async def test_compare_fits(oak_lane: Path, size: tuple[int, int]) -> None:
    app = make_app(oak_lane)
    async with app.run_test(size=size) as pilot:
        await app.settle()
        await pilot.press("h")
        await app.workers.wait_for_complete()
        await pilot.pause()
        assert isinstance(app.screen, CompareScreen)
        table = app.screen.query_one("#compare-readings", DataTable)
        # the first rows: RCCB 1 (upstairs), ½ × IΔn, 0°, …; move to RCCB 2's 1 × IΔn, 0°
        table.move_cursor(row=table.get_row_index("rc2:x1_0"))
        lines = (await settled_text(pilot)).splitlines()
    assert len(lines) == size[1]
    # headings and a whole row with its change, inside the screen's width
    assert any("earlier" in line and "later" in line and "change" in line for line in lines)
    row = next(line for line in lines if "1 × IΔn, 0°" in line and "140 ms" in line)
    assert "260 ms" in row and "+120 ms (+86 %)" in row and len(row) <= size[0]
    assert any("Not a certificate" in line for line in lines)
