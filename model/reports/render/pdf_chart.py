"""The PDF pair chart: two devices' time-current bands on log-log axes, with the readings.

Drawn with the PDF's own lines and shapes: each band shaded from its minimum
non-actuating time to its maximum break time, the currents where both
devices may trip as red strips over them, and the readings as markers.
"""

from __future__ import annotations

import math
from collections.abc import Sequence

from model.reports.charts import PairChart
from model.reports.render.pdf_base import INK, MUTED, RGB, ReportPdf
from model.rules.findings import fmt_ma

UP_COLOUR: RGB = (31, 94, 170)
DOWN_COLOUR: RGB = (214, 120, 18)
CLASH_STRONG: RGB = (236, 120, 120)
CLASH_EDGE: RGB = (176, 36, 36)

CHART_PLOT_H = 62.0
CHART_BLOCK_H = 108.0


def _log_ticks(lo: float, hi: float) -> list[tuple[float, bool]]:
    """(value, is_decade) for 1-2-5 ticks between lo and hi."""
    out: list[tuple[float, bool]] = []
    k = math.floor(math.log10(lo))
    while 10**k <= hi * 1.0001:
        for m in (1, 2, 5):
            v = m * 10**k
            if lo * 0.9999 <= v <= hi * 1.0001:
                out.append((float(v), m == 1))
        k += 1
    return out


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
    px, pw = x + 16, width - 20
    py, ph = top, CHART_PLOT_H
    cur = list(c.currents_ma)
    xmin, xmax = cur[0], cur[-1]
    up_min, up_max = _times(c.up_min), _times(c.up_max)
    down_min, down_max = _times(c.down_min), _times(c.down_max)
    finite_t = [
        t for arr in (up_min, up_max, down_min, down_max) for t in arr if math.isfinite(t) and t > 0
    ]
    pts_t = [float(v) for _, v, _ in c.up_points + c.down_points if not isinstance(v, str)]
    ymin = min([5.0, *[t / 1.6 for t in pts_t]])
    ymax = max([1000.0, *[t * 1.6 for t in finite_t + pts_t]])
    lx0, lx1 = math.log10(xmin), math.log10(xmax)
    ly0, ly1 = math.log10(ymin), math.log10(ymax)

    def fx(v: float) -> float:
        return px + pw * (math.log10(v) - lx0) / (lx1 - lx0)

    def fy(t: float) -> float:
        t = min(max(t, ymin), ymax)
        return py + ph - ph * (math.log10(t) - ly0) / (ly1 - ly0)

    # grid
    pdf.set_line_width(0.15)
    pdf.font(6.4)
    pdf.ink(MUTED)
    for v, major in _log_ticks(xmin, xmax):
        pdf.set_draw_color(*((214, 219, 224) if major else (236, 239, 242)))
        pdf.line(fx(v), py, fx(v), py + ph)
        if major or (lx1 - lx0) < 2.5:
            pdf.set_xy(fx(v) - 8, py + ph + 0.8)
            pdf.cell(16, 3, fmt_ma(v), align="C")
    for t, major in _log_ticks(ymin, ymax):
        pdf.set_draw_color(*((214, 219, 224) if major else (236, 239, 242)))
        pdf.line(px, fy(t), px + pw, fy(t))
        pdf.set_xy(px - 15.5, fy(t) - 1.5)
        pdf.cell(15, 3, _fmt_ms(t), align="R")
    _band(pdf, cur, down_min, down_max, DOWN_COLOUR, fx, fy, ymin, ymax)
    _band(pdf, cur, up_min, up_max, UP_COLOUR, fx, fy, ymin, ymax)
    # non-selective ranges, over the bands
    for lo, hi in c.ranges:
        a, b = max(lo, xmin), min(hi, xmax)
        if b > a:
            with pdf.local_context(fill_opacity=0.45):
                pdf.set_fill_color(*CLASH_STRONG)
                pdf.rect(fx(a), py, max(fx(b) - fx(a), 0.3), ph, style="F")
            pdf.set_draw_color(*CLASH_EDGE)
            pdf.set_line_width(0.3)
            pdf.line(fx(a), py, fx(a), py + ph)
            pdf.line(fx(b), py, fx(b), py + ph)
            pdf.set_xy(fx(a) + 0.5, py + ph - 4)
            pdf.font(6)
            pdf.ink(CLASH_EDGE)
            pdf.cell(max(fx(b) - fx(a), 12), 3, "both may trip")
    # readings: upstream squares, downstream diamonds, 'did not trip' a triangle at the top
    for up, points in ((True, c.up_points), (False, c.down_points)):
        colour = UP_COLOUR if up else DOWN_COLOUR
        for current, value, _ in points:
            if not (xmin <= current <= xmax):
                continue
            cx = fx(current)
            pdf.set_fill_color(*colour)
            pdf.set_draw_color(*INK)
            pdf.set_line_width(0.25)
            if isinstance(value, str):  # did not trip
                tip = py + 0.8
                pdf.polygon([(cx, tip), (cx - 1.4, tip + 2.4), (cx + 1.4, tip + 2.4)], style="DF")
            elif up:
                cy = fy(value or ymin)
                pdf.rect(cx - 1.05, cy - 1.05, 2.1, 2.1, style="DF")
            else:
                cy = fy(value or ymin)
                pdf.polygon(
                    [(cx, cy - 1.4), (cx + 1.4, cy), (cx, cy + 1.4), (cx - 1.4, cy)], style="DF"
                )
    # frame and axis names
    pdf.set_draw_color(*MUTED)
    pdf.set_line_width(0.3)
    pdf.rect(px, py, pw, ph)
    pdf.font(6.8)
    pdf.ink(MUTED)
    pdf.set_xy(px, py + ph + 4.2)
    pdf.cell(pw, 3, "residual current", align="C")
    pdf.set_xy(x, py - 5.2)
    pdf.cell(15.5, 3, "time", align="R")
    # legend
    ly = py + ph + 8.5
    _legend(pdf, x, ly, UP_COLOUR, "upstream", f"{c.up_label} ({c.up_text}); square: reading")
    _legend(
        pdf,
        x,
        ly + 4.2,
        DOWN_COLOUR,
        "downstream",
        f"{c.down_label} ({c.down_text}); diamond: reading",
    )
    faults = "" if c.i_max_ma is None else f"; faults up to {fmt_ma(c.i_max_ma)}"
    _legend(
        pdf,
        x,
        ly + 8.4,
        CLASH_STRONG,
        "both may trip",
        f"selectivity not guaranteed; triangle at the top: did not trip{faults}",
    )
    pdf.set_y(ly + 15)


def _times(values: Sequence[float | None]) -> list[float]:
    """Band times as drawn: None (cannot trip, or no trip guaranteed) as infinity. [ms]"""
    return [math.inf if v is None else v for v in values]


def _legend(pdf: ReportPdf, x: float, y: float, rgb: RGB, name: str, text: str) -> None:
    pdf.set_fill_color(*rgb)
    pdf.rect(x + 16, y + 0.6, 4, 2.4, style="F")
    pdf.set_xy(x + 21.5, y)
    pdf.font(7.2, True)
    pdf.ink(INK)
    pdf.cell(23, 3.6, name)
    pdf.font(7.2)
    pdf.ink(MUTED)
    pdf.cell(pdf.w - pdf.r_margin - x - 45, 3.6, text)


def _band(
    pdf: ReportPdf,
    cur: Sequence[float],
    mins: Sequence[float],
    maxs: Sequence[float],
    rgb: RGB,
    fx: object,
    fy: object,
    ymin: float,
    ymax: float,
) -> None:
    """Shade one device's band and draw its edges (solid: max break; dashed: min hold)."""
    assert callable(fx) and callable(fy)
    can = [math.isfinite(m) for m in mins]
    runs: list[list[int]] = []
    for k, ok in enumerate(can):
        if ok:
            if runs and runs[-1][-1] == k - 1:
                runs[-1].append(k)
            else:
                runs.append([k])
    for run in runs:
        upper = [(fx(cur[k]), fy(maxs[k] if math.isfinite(maxs[k]) else ymax)) for k in run]
        lower = [(fx(cur[k]), fy(max(mins[k], ymin))) for k in reversed(run)]
        with pdf.local_context(fill_opacity=0.22):
            pdf.set_fill_color(*rgb)
            pdf.polygon(upper + lower, style="F")
        pdf.set_draw_color(*rgb)
        pdf.set_line_width(0.55)
        seg: list[tuple[float, float]] = []
        for k in run:
            if math.isfinite(maxs[k]):
                seg.append((fx(cur[k]), fy(maxs[k])))
            elif seg:
                pdf.polyline(seg)
                seg = []
        if len(seg) > 1:
            pdf.polyline(seg)
        hold = [(fx(cur[k]), fy(mins[k])) for k in run if mins[k] > ymin]
        if len(hold) > 1:
            pdf.set_line_width(0.35)
            pdf.set_dash_pattern(dash=1.2, gap=0.9)
            pdf.polyline(hold)
            pdf.set_dash_pattern()
