"""ImpactScreen on the bundled sample: what goes dark when a device trips.

Expected circuits follow the sample file's tree (rc1 feeds MCBs 1-3; rc3 feeds
the workshop board).  Lighting resilience is the principle of BS 7671 314.1 /
314.2 (divide the installation so one fault does not cause needless loss).
"""

from __future__ import annotations

from hosting import Host
from textual.screen import Screen
from textual.widgets import DataTable, Static

from model.rules.findings import CAUTION
from model.site.models import SiteFile
from tui.screens.impact import ImpactScreen


def rows(screen: Screen[object]) -> list[list[str]]:
    table = screen.query_one("#impact-lost", DataTable)
    return [[str(c) for c in table.get_row_at(i)] for i in range(table.row_count)]


def text_of(screen: Screen[object], selector: str) -> str:
    return str(screen.query_one(selector, Static).content)


async def test_rc1_loses_upstairs_circuits_and_keeps_other_lighting(site: SiteFile) -> None:
    app = Host(ImpactScreen(site, "rc1"))
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.pause()
        screen = app.screen
        assert isinstance(screen, ImpactScreen)
        assert [r[0] for r in rows(screen)] == ["c-l1", "c-s1", "c-sh"]
        assert [r[1] for r in rows(screen)] == ["Lights upstairs", "Sockets upstairs", "Shower"]
        assert {r[2] for r in rows(screen)} == {"Consumer unit"}
        assert [r[3] for r in rows(screen)] == ["lighting", "sockets", "shower"]
        lighting = text_of(screen, "#impact-lighting")
        assert "Lights downstairs (c-l2)" in lighting
        assert "Workshop lights (c-wl)" in lighting
        assert "ALL LIGHTING" not in lighting
        assert CAUTION in text_of(screen, ".caution")
        await pilot.press("escape")
        await pilot.pause()
        assert app.results == [None]
        assert not isinstance(app.screen, ImpactScreen)


async def test_rc3_loses_the_workshop(site: SiteFile) -> None:
    app = Host(ImpactScreen(site, "rc3"))
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.pause()
        got = rows(app.screen)
        assert [r[0] for r in got] == ["c-ws", "c-wl", "c-ev"]
        assert {r[2] for r in got} == {"Workshop board"}
        lighting = text_of(app.screen, "#impact-lighting")
        assert "Workshop lights (c-wl)" in lighting.split("stays on")[0]
        assert "Lights upstairs (c-l1)" in lighting and "Lights downstairs (c-l2)" in lighting


async def test_main_switch_warns_all_lighting_lost(site: SiteFile) -> None:
    app = Host(ImpactScreen(site, "main"))
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        assert (
            len(rows(app.screen)) == 11
        )  # all 11 circuits of the sample are below the main switch
        lighting = app.screen.query_one("#impact-lighting", Static)
        assert "ALL LIGHTING IS LOST" in str(lighting.content)
        assert lighting.has_class("-all-lost")
