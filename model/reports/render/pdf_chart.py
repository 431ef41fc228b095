"""The PDF pair chart: two devices' time-current bands on log-log axes, with the readings.

Drawn with the PDF's own lines and shapes: each band shaded from its minimum
non-actuating time to its maximum break time, the currents where both
devices may trip as red strips over them, and the readings as markers.
"""

from __future__ import annotations

import numpy as np

from model.reports.charts import PairChart
from model.reports.render.pdf_axes import (
    LogAxes,
    draw_band,
    draw_frame,
    draw_grid,
    legend_row,
    times_array,
)
from model.reports.render.pdf_base import INK, MUTED, RGB, ReportPdf
from model.rules.findings import fmt_ma

UP_COLOUR: RGB = (31, 94, 170)
DOWN_COLOUR: RGB = (214, 120, 18)
CLASH_STRONG: RGB = (236, 120, 120)
CLASH_EDGE: RGB = (176, 36, 36)

CHART_PLOT_H = 62.0
CHART_BLOCK_H = 108.0


def _fmt_ms(v: float) -> str:
    return f"{v / 1000:g} s" if v >= 1000 else f"{v:g} ms"


def draw_chart(
    pdf: ReportPdf, c: PairChart, x: float, y: float, width: float, title: str | None = None
) -> None:
    """One pair chart: title (``title`` in place of the usual one), log-log plot of both
    bands with readings, legend."""
    pdf.set_y(y)
    title = title or f"Pair chart {c.number}: {c.up_label} above {c.down_label}"
    pdf.para(x, width, 5, title, 10.5, True)
    expl = c.explanation[:1].upper() + c.explanation[1:]
    pdf.para(x, width, 3.9, expl + ".", 7.8, False, MUTED)
    top = pdf.get_y() + 5.5
    cur = np.array(c.currents_ma, dtype=float)
    bands = [times_array(v) for v in (c.up_min, c.up_max, c.down_min, c.down_max)]
    finite_t = np.concatenate([t[np.isfinite(t) & (t > 0)] for t in bands]).tolist()
    pts_t = [float(v) for _, v, _ in c.up_points + c.down_points if not isinstance(v, str)]
    ymin = min([5.0, *[t / 1.6 for t in pts_t]])
    ymax = max([1000.0, *[t * 1.6 for t in finite_t + pts_t]])
    ax = LogAxes(x + 16, top, width - 20, CHART_PLOT_H, float(cur[0]), float(cur[-1]), ymin, ymax)
    py, ph = ax.py, ax.ph
    draw_grid(pdf, ax, fmt_ma, _fmt_ms, minor_times=True)
    up_min, up_max, down_min, down_max = bands
    draw_band(pdf, ax, cur, down_min, down_max, DOWN_COLOUR)
    draw_band(pdf, ax, cur, up_min, up_max, UP_COLOUR)
    # non-selective ranges, over the bands
    for lo, hi in c.ranges:
        a, b = max(lo, ax.x_lo), min(hi, ax.x_hi)
        if b > a:
            xa, xb = ax.x(a), ax.x(b)
            with pdf.local_context(fill_opacity=0.45):
                pdf.fill(CLASH_STRONG)
                pdf.rect(xa, py, max(xb - xa, 0.3), ph, style="F")
            pdf.pen(CLASH_EDGE)
            pdf.set_line_width(0.3)
            pdf.line(xa, py, xa, py + ph)
            pdf.line(xb, py, xb, py + ph)
            pdf.font(6)
            pdf.ink(CLASH_EDGE)
            pdf.text_line(xa + 0.5, py + ph - 4, max(xb - xa, 12), 3, "both may trip")
    # readings: upstream squares, downstream diamonds, 'did not trip' a triangle at the top
    pdf.pen(INK)
    pdf.set_line_width(0.25)
    for up, points in ((True, c.up_points), (False, c.down_points)):
        pdf.fill(UP_COLOUR if up else DOWN_COLOUR)
        for current, value, _ in points:
            if not (ax.x_lo <= current <= ax.x_hi):
                continue
            cx = ax.x(current)
            if isinstance(value, str):  # did not trip
                tip = py + 0.8
                pdf.polygon([(cx, tip), (cx - 1.4, tip + 2.4), (cx + 1.4, tip + 2.4)], style="DF")
            elif up:
                cy = ax.y(value or ymin)
                pdf.rect(cx - 1.05, cy - 1.05, 2.1, 2.1, style="DF")
            else:
                cy = ax.y(value or ymin)
                pdf.polygon(
                    [(cx, cy - 1.4), (cx + 1.4, cy), (cx, cy + 1.4), (cx - 1.4, cy)], style="DF"
                )
    draw_frame(pdf, ax, x, "residual current")
    # legend
    ly = py + ph + 8.5
    legend_row(pdf, x, ly, UP_COLOUR, "upstream", f"{c.up_label} ({c.up_text}); square: reading")
    legend_row(
        pdf,
        x,
        ly + 4.2,
        DOWN_COLOUR,
        "downstream",
        f"{c.down_label} ({c.down_text}); diamond: reading",
    )
    faults = "" if c.i_max_ma is None else f"; faults up to {fmt_ma(c.i_max_ma)}"
    legend_row(
        pdf,
        x,
        ly + 8.4,
        CLASH_STRONG,
        "both may trip",
        f"selectivity not guaranteed; triangle at the top: did not trip{faults}",
    )
    pdf.set_y(ly + 15)
