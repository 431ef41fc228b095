"""A terminal chart of a fuse or breaker pair: both bands on log-log axes.

Current [A] across, time [s] up, plotted as log10 with ticks in plain units.
For each device the band between its solid line (it will have operated by
then) and its dotted line (it will not have operated sooner) is the
estimate, log-log between the published points, filled with light dots;
columns of ░ along the top are currents where the pair is not selective,
▒ where it is not shown to be; │ lines mark the largest fault current and
the current up to which the pair is selective.
"""

from __future__ import annotations

import math

from rich.text import Text
from textual.app import ComposeResult
from textual.reactive import reactive
from textual.widget import Widget
from textual.widgets import Static
from textual_plotext import PlotextPlot
from textual_plotext.plot import Plot

from model.reports.oc_chart import OcChart
from model.rules.overcurrent.pairs import fmt_a
from tui.themes import tone
from tui.widgets.bandchart import DOWN, FAULT, SHADE, TOP_FACTOR, UP, _rgb

#: Theme variables (tui/themes.py) of the marks only this chart has.
LIMIT = "$tw-chart-limit"
UNSHOWN = "$tw-chart-unshown"


def _fmt_s(t: float) -> str:
    return f"{t / 3600:g} h" if t >= 3600 else (f"{t:g} s" if t >= 0.01 else f"{t * 1000:g} ms")


def draw_oc_pair(plt: Plot, chart: OcChart) -> None:
    """Put one overcurrent pair's bands, ranges and marks on a plotext figure."""
    log = math.log10
    x_lo, x_hi = chart.current_span_a
    t_lo, t_hi = chart.time_span_s
    top = t_hi * TOP_FACTOR

    def ty(value: float | None) -> float:
        return log(top) if value is None else log(min(max(value, t_lo), top))

    xs = [log(c) for c in chart.currents_a]
    plt.clear_data()
    plt.clear_figure()
    for lo, hi, kind in chart.ranges:
        a, b = max(lo, x_lo), min(hi, x_hi)
        if b > a:
            rgb, mark = (_rgb(SHADE), "░") if kind == "not-selective" else (_rgb(UNSHOWN), "▒")
            plt.plot([log(a), log(b)], [log(top), log(top)], fillx=True, marker=mark, color=rgb)
    for mins, maxs, rgb in (
        (chart.up_min, chart.up_max, _rgb(UP)),
        (chart.down_min, chart.down_max, _rgb(DOWN)),
    ):
        if not mins:
            continue
        lows = [ty(v) for v in mins]
        highs = [ty(v) for v in maxs]
        # the estimate shaded: a light column of dots between the two boundaries
        for k in range(0, len(xs), max(1, len(xs) // 40)):
            if lows[k] < highs[k]:
                plt.plot([xs[k], xs[k]], [lows[k], highs[k]], marker="·", color=rgb)
        plt.plot(xs, lows, marker="dot", color=rgb)
        plt.plot(xs, highs, marker="braille", color=rgb)
    if chart.i_max_a is not None and x_lo < chart.i_max_a < x_hi:
        plt.vline(log(chart.i_max_a), _rgb(FAULT))
    if chart.limit_a is not None and x_lo < chart.limit_a < x_hi:
        plt.vline(log(chart.limit_a), _rgb(LIMIT))
    plt.xlim(log(x_lo), log(x_hi))
    plt.ylim(log(t_lo), log(top))
    x_dec = range(math.ceil(log(x_lo)), math.floor(log(x_hi)) + 1)
    plt.xticks([float(k) for k in x_dec], [fmt_a(10.0**k) for k in x_dec])
    y_dec = list(range(math.ceil(log(t_lo)), math.floor(log(t_hi)) + 1))
    plt.yticks([float(k) for k in y_dec] + [log(top)], [_fmt_s(10.0**k) for k in y_dec] + ["∞"])
    plt.xlabel("prospective current")


def oc_legend(chart: OcChart) -> Text:
    """The key to the chart, in the chart's colours."""
    text = Text()
    text.append("━ ", style=tone(UP))
    text.append(f"upstream {chart.up_label} ({chart.up_name})   ")
    text.append("━ ", style=tone(DOWN))
    text.append(f"downstream {chart.down_label} ({chart.down_name})")
    text.append("\nsolid: operated by · dotted: not before · dots between: estimate · ")
    text.append("░", style=tone(SHADE))
    text.append(" not selective ")
    text.append("▒", style=tone(UNSHOWN))
    text.append(" not shown")
    if chart.i_max_a is not None:
        text.append(" · ")
        text.append("│", style=tone(FAULT))
        text.append(f" largest fault {fmt_a(chart.i_max_a)}")
    if chart.limit_a is not None:
        text.append(" · ")
        text.append("│", style=tone(LIMIT))
        text.append(f" selective up to {fmt_a(chart.limit_a)}")
    return text


class OcBandChart(Widget):
    """Two overcurrent devices' bands, log-log, with the pair's ranges and marks."""

    DEFAULT_CSS = """
    OcBandChart {
        height: 1fr;
        min-height: 10;
        layout: vertical;
    }
    OcBandChart > PlotextPlot {
        height: 1fr;
    }
    OcBandChart > .occhart--legend {
        height: auto;
        color: $text-muted;
    }
    """

    chart: reactive[OcChart | None] = reactive(None)

    def compose(self) -> ComposeResult:
        yield PlotextPlot()
        yield Static(classes="occhart--legend", markup=False)

    def watch_chart(self, chart: OcChart | None) -> None:
        if self.is_mounted:
            self._redraw(chart)

    def on_mount(self) -> None:
        self._redraw(self.chart)

    def _redraw(self, chart: OcChart | None) -> None:
        plot = self.query_one(PlotextPlot)
        key = self.query_one(".occhart--legend", Static)
        if chart is None:
            plot.plt.clear_data()
            key.update("no chart")
        else:
            draw_oc_pair(plot.plt, chart)
            key.update(oc_legend(chart))
        plot.refresh()
