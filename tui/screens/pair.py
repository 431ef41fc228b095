"""One series pair of residual-current devices: rule, bands, readings, verdict and chart."""

from __future__ import annotations

from textual.widget import Widget
from textual.widgets import Static

from model.reports.analysis_view import site_index
from model.reports.charts import CHART_SOURCE, MeasuredPoint, PairChart, pair_chart_data
from model.rules.bands import GROUP_TITLE, fmt_result, group_of
from model.rules.findings import Analysis, PairAnalysis, device_text, fmt_ma, fmt_ratio
from model.rules.limits import CASCADE_RATIO
from model.site.models import SiteFile
from tui.screens.pair_view import PairView
from tui.widgets.bandchart import BandChart

VERDICT_TITLE = {
    "selective": "SELECTIVE",
    "selective-in-practice": "SELECTIVE IN PRACTICE",
    "not-guaranteed": "NOT GUARANTEED",
    "not-selective": "NOT SELECTIVE",
}


def points_text(points: list[MeasuredPoint]) -> str:
    """'½ × IΔn (15 mA): did not trip, did not trip; 1 × IΔn (30 mA): 18 ms, 21 ms'."""
    groups: dict[str, tuple[float, list[str]]] = {}
    for current, value, test in points:
        g = group_of(test)
        groups.setdefault(g, (current, []))[1].append(fmt_result(value))
    return "; ".join(
        f"{GROUP_TITLE[g]} ({fmt_ma(cur)}): {', '.join(vals)}" for g, (cur, vals) in groups.items()
    )


def rule_text(p: PairAnalysis) -> str:
    delayed = "yes" if p.up_delayed else "no"
    head = (
        f"upstream time-delayed: {delayed} · IΔn ratio {fmt_ratio(p.ratio)} "
        f"(needs {CASCADE_RATIO.value:g}:1 or more)"
    )
    if p.rule_ok:
        return head + " → met"
    return head + " → not met: " + "; ".join(p.rule_notes)


def ranges_text(p: PairAnalysis) -> str:
    if not p.ranges:
        return f"none: the bands do not overlap anywhere up to {fmt_ma(p.i_max_ma)}"
    return ", ".join(r.text() for r in p.ranges) + f" (largest fault current {fmt_ma(p.i_max_ma)})"


def measured_text(p: PairAnalysis, visit: str | None) -> str:
    if p.measured is None:
        if not p.ranges:
            return "not needed: the bands do not overlap"
        return "no visit recorded"
    where = f"visit {visit}: " if visit else ""
    return where + p.measured.explanation


class PairScreen(PairView):
    """Selectivity of an upstream and a downstream residual-current device."""

    def __init__(self, site: SiteFile, analysis: Analysis, up_id: str, down_id: str) -> None:
        super().__init__()
        self.site = site
        self.analysis = analysis
        self.up_id = up_id
        self.down_id = down_id
        self.index = site_index(site, analysis)
        self.pair: PairAnalysis | None = analysis.pair(up_id, down_id)
        self.chart: PairChart | None = None
        self.chart_error: str | None = None
        try:
            self.chart = pair_chart_data(site, analysis, up_id, down_id)
        except (KeyError, ValueError) as exc:
            self.chart_error = str(exc).strip("'")

    def rows(self) -> list[tuple[str, str, str]]:
        """(heading, text, css class) rows of the summary."""
        idx = self.index
        up, down = idx.node(self.up_id), idx.node(self.down_id)
        rows: list[tuple[str, str, str]] = []
        for role, nid, node in (("Upstream", self.up_id, up), ("Downstream", self.down_id, down)):
            desc = device_text(node) if hasattr(node, "delay") else str(node.kind)
            rows.append((role, f"{idx.label(nid)} ({nid}) · {desc} · {idx.board_label(nid)}", ""))
        p = self.pair
        if p is None:
            msg = f"NOT IN SERIES: {idx.label(self.down_id)} is not fed through {idx.label(self.up_id)}"
            if self.analysis.pair(self.down_id, self.up_id) is not None:
                msg += " (they are in series the other way round)"
            rows.append(("Pair", msg + "; there is no series pair to judge.", "-not-series"))
            return rows
        rows.append(("Rule", rule_text(p), "" if p.rule_ok else "-warn"))
        rows.append(("Not guaranteed", ranges_text(p), "-warn" if p.ranges else ""))
        rows.append(("Basis", CHART_SOURCE, "-muted"))
        visit = self.chart.visit if self.chart else None
        rows.append(("Measured", measured_text(p, visit), ""))
        rows.append(("Verdict", f"{VERDICT_TITLE[p.verdict]}: {p.explanation}", f"-{p.verdict}"))
        if p.action:
            rows.append(("To close the gap", p.action, ""))
        if self.chart is not None:
            for role, nid, pts in (
                ("Readings up", self.up_id, self.chart.up_points),
                ("Readings down", self.down_id, self.chart.down_points),
            ):
                if pts:
                    rows.append((role, f"{nid}: {points_text(pts)}", "-muted"))
            for note in self.chart.notes:
                rows.append(("Note", note, "-muted"))
        return rows

    def title_text(self) -> str:
        return f"Selectivity: {self.index.label(self.up_id)} above {self.index.label(self.down_id)}"

    def chart_widget(self) -> Widget:
        if self.chart is not None:
            return BandChart(id="pair-chart")
        return Static(f"No chart: {self.chart_error}", id="pair-no-chart", markup=False)

    def fill_chart(self) -> None:
        if self.chart is not None:
            self.query_one(BandChart).chart = self.chart
