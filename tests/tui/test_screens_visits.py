"""VisitsScreen: list the sample's visits and start a new one by keys."""

from __future__ import annotations

import datetime as dt

from hosting import Host
from textual.widgets import DataTable, Input, Static

from model.site.history import new_visit_id
from model.site.models import SiteFile, Visit
from tui.screens.visits import VisitsScreen

INSPECTOR = "T. Brackenridge (invented)"  # the sample's latest visit
INSTRUMENT = "Multifunction tester (unnamed)"


async def test_new_visit_by_keys_alone(site: SiteFile) -> None:
    app = Host(VisitsScreen(site))
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.pause()
        table = app.screen.query_one("#visits-table", DataTable)
        assert table.row_count == 2
        assert [str(c) for c in table.get_row_at(1)][:3] == ["2026-11-14", "2026-11-14", "5"]
        # Enter moves down the fields; on the last one it starts the visit
        await pilot.press("enter", "enter")
        assert app.results == []
        assert app.screen.focused is app.screen.query_one("#v-instrument")
        await pilot.press("enter")
        await pilot.pause()
    today = dt.date.today().isoformat()
    assert len(app.results) == 1
    visit = app.results[0]
    assert isinstance(visit, Visit)
    assert visit.date == today
    assert visit.inspector == INSPECTOR
    assert visit.instrument == INSTRUMENT
    assert visit.readings == {}
    assert visit.id == new_visit_id(today, [v.id for v in site.visits])


async def test_same_day_visit_gets_a_new_id(site: SiteFile) -> None:
    app = Host(VisitsScreen(site))
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.pause()
        app.screen.query_one("#v-date", Input).value = "2026-11-14"
        await pilot.pause()
        assert "2026-11-14-2" in str(app.screen.query_one("#visits-id-hint", Static).content)
        await pilot.press("ctrl+n")
        await pilot.pause()
    visit = app.results[0]
    assert isinstance(visit, Visit)
    assert (visit.id, visit.date) == ("2026-11-14-2", "2026-11-14")


async def test_bad_date_refused_and_escape_cancels(site: SiteFile) -> None:
    app = Host(VisitsScreen(site))
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        inp = app.screen.query_one("#v-date", Input)
        inp.value = ""
        await pilot.press(*"2026-13-01", "ctrl+s")
        await pilot.pause()
        assert app.results == []
        assert "not a real date" in str(app.screen.query_one("#verr-date", Static).content)
        await pilot.press("escape")
        await pilot.pause()
        assert app.results == [None]
