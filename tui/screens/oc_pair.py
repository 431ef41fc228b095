"""One series pair of fuses or breakers: both bands, the verdict in words, the data it rests on."""

from __future__ import annotations

from textual.widget import Widget

from model.reports.oc_chart import OcChart, oc_chart_data
from model.rules.findings import Analysis
from model.rules.overcurrent.pairs import fmt_a
from model.site.models import SiteFile
from tui.screens.pair_view import PairView
from tui.widgets.occhart import OcBandChart


class OcPairScreen(PairView):
    """Selectivity of an upstream and a downstream overcurrent device."""

    def __init__(self, site: SiteFile, analysis: Analysis, up_id: str, down_id: str) -> None:
        super().__init__()
        self.chart: OcChart = oc_chart_data(site, analysis, up_id, down_id)

    def title_text(self) -> str:
        return f"Selectivity: {self.chart.up_label} above {self.chart.down_label}"

    def rows(self) -> list[tuple[str, str, str]]:
        c = self.chart
        rows = [
            ("Upstream", f"{c.up_label} ({c.up_id}) · {c.up_name}", ""),
            ("Downstream", f"{c.down_label} ({c.down_id}) · {c.down_name}", ""),
            ("Verdict", f"{c.verdict.upper()}: {c.verdict_words}", f"-{c.verdict}"),
            ("Why", c.explanation, ""),
        ]
        if c.limit_a is not None:
            rows.append(("Selective up to", fmt_a(c.limit_a), ""))
        if c.i_max_a is not None:
            rows.append(("Largest fault current", fmt_a(c.i_max_a), ""))
        for lo, hi, kind in c.ranges:
            rows.append(("Range", f"{kind}: {fmt_a(lo)} to {fmt_a(hi)}", "-warn"))
        for line in c.data:
            rows.append(("Rests on", line, "-muted"))
        for note in c.notes:
            rows.append(("Note", note, "-muted"))
        return rows

    def chart_widget(self) -> Widget:
        return OcBandChart(id="pair-chart")

    def fill_chart(self) -> None:
        self.query_one(OcBandChart).chart = self.chart
