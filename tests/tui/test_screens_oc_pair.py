"""OcPairScreen on the worked example's fuse and breaker pairs (tests/rules/wrenfield-lodge.json).

gG 80 A over C40: by the IEC 60269-1 gates (from memory) and IEC 60898-1 Table 7 the fuse may
melt in a quarter or less of the time the C40 may take from 274 A to 400 A: not selective.
"""

from __future__ import annotations

from pathlib import Path

from hosting import Host
from textual.widgets import Static
from textual_plotext import PlotextPlot

from model.rules.checks import analyse
from model.rules.findings import CAUTION
from model.rules.overcurrent.analysis import nearest_oc_pair
from model.rules.overcurrent.disconnection import device_summary
from model.storage.sites import load_site
from tui.screens.oc_pair import OcPairScreen
from tui.widgets.occhart import OcBandChart

EXAMPLE = Path(__file__).resolve().parents[1] / "rules" / "wrenfield-lodge.json"


async def test_oc_pair_screen_shows_bands_verdict_and_marks() -> None:
    site = load_site(EXAMPLE)
    result = analyse(site)
    assert nearest_oc_pair(result.index, "m-sub") == ("cut", "m-sub")
    app = Host(OcPairScreen(site, result, "cut", "m-sub"))
    async with app.run_test(size=(150, 45)) as pilot:
        await pilot.pause()
        screen = app.screen
        text = "\n".join(str(s.content) for s in screen.query(".pair-row").results(Static))
        assert "NOT-SELECTIVE" in text and "274 A to 400 A" in text
        assert "Largest fault current: 8 kA" in text  # recorded at the intake
        assert "from memory" in text  # the gates' standing is shown with the data
        chart = screen.query_one(OcBandChart)
        assert chart.chart is not None and chart.chart.limit_a is not None
        assert chart.chart.up_min and chart.chart.down_max  # both bands drawn
        drawn = str(chart.query_one(PlotextPlot).render())
        assert "░" in drawn and "▒" in drawn and "∞" in drawn
        assert CAUTION in str(screen.query_one(".caution", Static).content)
        await pilot.press("escape")
        await pilot.pause()
        assert app.results == [None]


def test_node_form_facts_name_zs_maximum_and_time() -> None:
    result = analyse(load_site(EXAMPLE))
    text = device_summary(result.oc.disconnection, "m-ws")
    # IEC 60898-1 Table 7 test e; BS 7671 411.4.4 and Table 41.1: B16 2.73 Ω, 0.4 s
    assert "Zs max 2.73 Ω (cold reading ≤ 2.19 Ω) to disconnect in 0.4 s" in text
    assert device_summary(result.oc.disconnection, "cu") == ""
