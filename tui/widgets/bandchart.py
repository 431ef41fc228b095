"""A terminal chart of two devices' time-current bands and their readings.

Log-log: residual current [mA] across, time [ms] up.  Drawn with plotext
through textual-plotext; both axes are plotted as log10 of the values with
ticks labelled in plain units, because plotext's own log scale does not
accept limits or ticks in data units.

Reading the chart: for each device the solid line is its maximum break time
(it must have tripped by then) and the dotted line its minimum non-actuating
time (it must not trip sooner).  A line along the top edge (∞) means "no
trip guaranteed" for the maximum, "cannot trip" for the minimum.  Shaded
columns are currents where selectivity is not guaranteed.  Readings of the
latest visit are marks at their test currents; "did not trip" is drawn as
a triangle on the top edge.
"""

from __future__ import annotations

import math

from rich.text import Text
from textual.app import ComposeResult
from textual.color import Color
from textual.reactive import reactive
from textual.widget import Widget
from textual.widgets import Static
from textual_plotext import PlotextPlot
from textual_plotext.plot import Plot

from model.reports.charts import PairChart
from model.rules.findings import fmt_ma
from model.site.terms import DID_NOT_TRIP
from tui.themes import tone

#: The chart's colours: theme variables (tui/themes.py), read when a chart is drawn.
UP = "$tw-chart-up"
DOWN = "$tw-chart-down"
SHADE = "$tw-chart-shade"
FAULT = "$tw-chart-fault"

#: The top edge sits this factor above the largest time shown; it stands for ∞.
TOP_FACTOR = 1.6


def _rgb(variable: str) -> tuple[int, int, int]:
    """A theme colour as plotext takes it."""
    return Color.parse(tone(variable)).rgb


def draw_pair(plt: Plot, chart: PairChart) -> None:
    """Put one pair's bands, shaded ranges and readings on a plotext figure."""
    log = math.log10
    x_lo, x_hi = chart.current_span_ma
    t_lo, t_hi = chart.time_span_ms
    top = t_hi * TOP_FACTOR

    def ty(value: float | str | None) -> float:
        if value is None or value == DID_NOT_TRIP:
            return log(top)
        assert isinstance(value, float | int)
        return log(min(max(float(value), t_lo), top))

    xs = [log(c) for c in chart.currents_ma]
    up_rgb, down_rgb, shade_rgb = _rgb(UP), _rgb(DOWN), _rgb(SHADE)
    plt.clear_data()
    plt.clear_figure()
    for lo, hi in chart.ranges:
        a, b = max(lo, x_lo), min(hi, x_hi)
        if b > a:
            plt.plot(
                [log(a), log(b)], [log(top), log(top)], fillx=True, marker="░", color=shade_rgb
            )
    if chart.i_max_ma is not None and x_lo < chart.i_max_ma < x_hi:
        plt.vline(log(chart.i_max_ma), _rgb(FAULT))
    for mins, maxs, rgb in (
        (chart.up_min, chart.up_max, up_rgb),
        (chart.down_min, chart.down_max, down_rgb),
    ):
        if any(v for v in mins if v is not None):  # a general device has no minimum
            plt.plot(xs, [ty(v) for v in mins], marker="dot", color=rgb)
        plt.plot(xs, [ty(v) for v in maxs], marker="braille", color=rgb)
    for points, mark, rgb in ((chart.up_points, "■", up_rgb), (chart.down_points, "●", down_rgb)):
        timed = [(c, t) for c, t, _ in points if t != DID_NOT_TRIP]
        silent = [c for c, t, _ in points if t == DID_NOT_TRIP]
        if timed:
            plt.scatter(
                [log(c) for c, _ in timed], [ty(t) for _, t in timed], marker=mark, color=rgb
            )
        if silent:
            plt.scatter([log(c) for c in silent], [log(top)] * len(silent), marker="▲", color=rgb)
    plt.xlim(log(x_lo), log(x_hi))
    plt.ylim(log(t_lo), log(top))
    x_dec = range(math.ceil(log(x_lo)), math.floor(log(x_hi)) + 1)
    plt.xticks([float(k) for k in x_dec], [fmt_ma(10.0**k) for k in x_dec])
    y_dec = [k for k in range(math.ceil(log(t_lo)), math.floor(log(t_hi)) + 1)]
    plt.yticks(
        [float(k) for k in y_dec] + [log(top)],
        [f"{10.0**k:g} ms" for k in y_dec] + ["∞"],
    )
    plt.xlabel("residual current")


def legend(chart: PairChart) -> Text:
    """The key to the chart, in the chart's colours."""
    up, down = tone(UP), tone(DOWN)
    text = Text()
    text.append("━ ", style=up)
    text.append(f"upstream {chart.up_label}   ")
    text.append("━ ", style=down)
    text.append(f"downstream {chart.down_label}")
    if chart.ranges:
        text.append("   ")
        text.append("░", style=tone(SHADE))
        text.append(" selectivity not guaranteed")
    text.append("\nsolid max break · dotted min non-actuating · ∞ top edge · ")
    text.append("■", style=up)
    text.append("●", style=down)
    text.append(f" readings{'' if chart.visit is None else ' ' + chart.visit} · ")
    text.append("▲", style=up)
    text.append("▲", style=down)
    text.append(" did not trip")
    lo, hi = chart.current_span_ma
    if chart.i_max_ma is not None and lo < chart.i_max_ma < hi:
        text.append(" · ")
        text.append("│", style=tone(FAULT))
        text.append(f" largest fault {fmt_ma(chart.i_max_ma)}")
    return text


class BandChart(Widget):
    """Two devices' time-current bands, log-log, with readings and unsafe ranges."""

    DEFAULT_CSS = """
    BandChart {
        height: 1fr;
        min-height: 10;
        layout: vertical;
    }
    BandChart > PlotextPlot {
        height: 1fr;
    }
    BandChart > .bandchart--legend {
        height: auto;
        color: $text-muted;
    }
    """

    chart: reactive[PairChart | None] = reactive(None)

    def compose(self) -> ComposeResult:
        yield PlotextPlot()
        yield Static(classes="bandchart--legend", markup=False)

    def watch_chart(self, chart: PairChart | None) -> None:
        if not self.is_mounted:
            return
        self._redraw(chart)

    def on_mount(self) -> None:
        self._redraw(self.chart)

    def _redraw(self, chart: PairChart | None) -> None:
        plot = self.query_one(PlotextPlot)
        key = self.query_one(".bandchart--legend", Static)
        if chart is None:
            plot.plt.clear_data()
            key.update("no chart")
        else:
            draw_pair(plot.plt, chart)
            key.update(legend(chart))
        plot.refresh()
