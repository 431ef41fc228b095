"""PairScreen on the sample's workshop pairs.

rc3 is a 100 mA type S RCCB, rb1 and rb2 are 30 mA general RCBOs below it.
By IEC 61008-1 Ed.3 Table 1 (step-function reading between the tabulated
currents; IΔno = 0.5 IΔn) selectivity is not guaranteed from 50 mA (rc3 may
trip above 0.5 × 100 mA with a 130 ms minimum) to 250 mA (the Table 1 note lets
0.25 A replace 5 × 30 mA, so the downstream maximum drops to 40 ms only there).
rb1's 5 IΔn reading within 40 ms confirms it from 150 mA, and its readings
(slowest 21 ms) against rc3's fastest (92 ms) show a margin; rb2 has no
readings.  The pair meets the 3:1 and delay rule, so rb2 is "not guaranteed",
not "not selective".
"""

from __future__ import annotations

from hosting import Host
from textual.screen import Screen
from textual.widgets import Static
from textual_plotext import PlotextPlot

from model.rules.checks import analyse
from model.rules.findings import CAUTION
from model.site.models import SiteFile
from tui.screens.pair import PairScreen
from tui.widgets.bandchart import BandChart


def shown(screen: Screen[object]) -> str:
    return "\n".join(str(s.content) for s in screen.query(".pair-row").results(Static))


async def test_rc3_rb1_selective_in_practice_with_chart(site: SiteFile) -> None:
    app = Host(PairScreen(site, analyse(site), "rc3", "rb1"))
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.pause()
        screen = app.screen
        text = shown(screen)
        assert "50 mA to 250 mA" in text  # IEC 61008-1 Table 1 and note, step-function reading
        assert "confirms it within 40 ms" in text  # rb1's 5 IΔn reading, 10 ms
        assert "selective in practice" in text.lower()
        assert "margin 71 ms" in text  # 92 ms (rc3 fastest at 5 × IΔn) - 21 ms (rb1 slowest)
        assert "ratio 3.33:1" in text  # 100 mA / 30 mA
        chart = screen.query_one(BandChart)
        assert chart.chart is not None
        assert chart.chart.ranges == [(50.0, 250.0)]
        assert 300.0 in chart.chart.down_max  # general max break at IΔn (Table 1)
        assert 130.0 in chart.chart.up_min  # type S min non-actuating at IΔn (Table 1)
        assert chart.chart.down_points and chart.chart.up_points
        drawn = str(chart.query_one(PlotextPlot).render())
        assert "∞" in drawn and "●" in drawn and "■" in drawn and "▲" in drawn
        assert CAUTION in str(screen.query_one(".caution", Static).content)
        await pilot.press("escape")
        await pilot.pause()
        assert app.results == [None]


async def test_rc3_rb2_not_selective_without_readings(site: SiteFile) -> None:
    app = Host(PairScreen(site, analyse(site), "rc3", "rb2"))
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.pause()
        text = shown(app.screen)
        assert "50 mA to 250 mA" in text
        # BS 7671 536.4.1.4 met (3.33:1, type S): not "NOT SELECTIVE"
        assert "NOT GUARANTEED" in text and "NOT SELECTIVE" not in text
        assert "not guaranteed between 50 mA and 250 mA; confirm by testing both devices" in text
        assert "SELECTIVE IN PRACTICE" not in text
        assert "time-delayed" not in text.split("To close the gap:")[1]
        assert "no reading" in text
        chart = app.screen.query_one(BandChart).chart
        assert chart is not None and chart.down_points == []


async def test_pair_not_in_series_is_said_plainly(site: SiteFile) -> None:
    app = Host(PairScreen(site, analyse(site), "rc1", "rb1"))
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        text = shown(app.screen)
        assert "NOT IN SERIES" in text
        assert "Verdict" not in text


async def test_reversed_pair_is_named(site: SiteFile) -> None:
    app = Host(PairScreen(site, analyse(site), "rb1", "rc3"))
    async with app.run_test(size=(160, 45)) as pilot:
        await pilot.pause()
        text = shown(app.screen)
        assert "NOT IN SERIES" in text and "other way round" in text
        assert app.screen.has_class("-wide")


async def test_c_brings_the_chart_into_view_on_a_short_terminal(site: SiteFile) -> None:
    app = Host(PairScreen(site, analyse(site), "rc3", "rb1"))
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        body = app.screen.query_one("#pair-body")
        assert body.scroll_y == 0
        await pilot.press("c")
        await pilot.pause()
        assert body.scroll_y > 0
