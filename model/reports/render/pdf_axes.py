"""Log-log plots on a PDF page, shared by the pair charts and the coordination study.

:class:`LogAxes` maps currents and times to the page for a whole array at
once; :func:`draw_grid` draws the 1-2-5 grid with its labels, :func:`draw_band`
one device's shaded band with its edges, :func:`draw_frame` the frame and
axis names, :func:`legend_row` one line of a legend.  Lines are drawn as one
polyline each, with the points that lie on a straight run between their
neighbours left out (the page shows the same line).
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from model.reports.render.pdf_base import INK, MUTED, RGB, ReportPdf

GRID_MAJOR: RGB = (214, 219, 224)
GRID_MINOR: RGB = (236, 239, 242)
#: A point this close to the straight line through its neighbours is left out. [mm]
STRAIGHT_MM = 1e-6
#: ... when both neighbours stand at least this far from it. [mm]
APART_MM = 0.05


@dataclass(frozen=True)
class LogAxes:
    """A plot box on the page [mm] and the spans it shows, both on log scales."""

    px: float
    py: float
    pw: float
    ph: float
    #: Lowest and highest current shown, in the chart's unit.
    x_lo: float
    x_hi: float
    #: Shortest and longest time shown, in the chart's unit.
    y_lo: float
    y_hi: float

    @property
    def decades_x(self) -> float:
        return math.log10(self.x_hi) - math.log10(self.x_lo)

    def xs(self, values: np.ndarray) -> np.ndarray:
        """Page x of each current (held to the span). [mm]"""
        lx0, lx1 = math.log10(self.x_lo), math.log10(self.x_hi)
        v = np.log10(np.clip(values, self.x_lo, self.x_hi))
        out: np.ndarray = self.px + self.pw * (v - lx0) / (lx1 - lx0)
        return out

    def ys(self, values: np.ndarray) -> np.ndarray:
        """Page y of each time (held to the span; infinity at the top). [mm]"""
        ly0, ly1 = math.log10(self.y_lo), math.log10(self.y_hi)
        v = np.log10(np.clip(values, self.y_lo, self.y_hi))
        out: np.ndarray = self.py + self.ph - self.ph * (v - ly0) / (ly1 - ly0)
        return out

    def x(self, value: float) -> float:
        """Page x of one current (held to the span). [mm]"""
        lx0, lx1 = math.log10(self.x_lo), math.log10(self.x_hi)
        v = math.log10(min(max(value, self.x_lo), self.x_hi))
        return self.px + self.pw * (v - lx0) / (lx1 - lx0)

    def y(self, value: float) -> float:
        """Page y of one time (held to the span). [mm]"""
        ly0, ly1 = math.log10(self.y_lo), math.log10(self.y_hi)
        v = math.log10(min(max(value, self.y_lo), self.y_hi))
        return self.py + self.ph - self.ph * (v - ly0) / (ly1 - ly0)


def log_ticks(lo: float, hi: float) -> list[tuple[float, bool]]:
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


def draw_grid(
    pdf: ReportPdf,
    ax: LogAxes,
    x_text: Callable[[float], str],
    y_text: Callable[[float], str],
    *,
    minor_times: bool,
) -> None:
    """Grid lines at 1-2-5 currents and times, with their values beside the axes.

    Every current line is drawn; its value is printed at each decade, and at
    every line when the span is under 2.5 decades.  Time lines at 2 and 5 are
    drawn (and labelled) only with ``minor_times``.
    """
    px, py, pw, ph = ax.px, ax.py, ax.pw, ax.ph
    pdf.set_line_width(0.15)
    every_label = ax.decades_x < 2.5
    x_ticks = log_ticks(ax.x_lo, ax.x_hi)
    y_ticks = [(t, major) for t, major in log_ticks(ax.y_lo, ax.y_hi) if major or minor_times]
    # lines of one shade together: currents first, times over them, as drawn tick by tick
    for major in (False, True):
        pdf.pen(GRID_MAJOR if major else GRID_MINOR)
        for v, _ in (tick for tick in x_ticks if tick[1] == major):
            x = ax.x(v)
            pdf.line(x, py, x, py + ph)
    for major in (False, True):
        pdf.pen(GRID_MAJOR if major else GRID_MINOR)
        for t, _ in (tick for tick in y_ticks if tick[1] == major):
            y = ax.y(t)
            pdf.line(px, y, px + pw, y)
    pdf.font(6.4)
    pdf.ink(MUTED)
    for v, major in x_ticks:
        if major or every_label:
            pdf.text_line(ax.x(v) - 8, py + ph + 0.8, 16, 3, x_text(v), "C")
    for t, _ in y_ticks:
        pdf.text_line(px - 15.5, ax.y(t) - 1.5, 15, 3, y_text(t), "R")


def draw_frame(pdf: ReportPdf, ax: LogAxes, x: float, current_name: str) -> None:
    """The frame round the plot and the names of its axes (``x``: the chart's left edge)."""
    pdf.pen(MUTED)
    pdf.set_line_width(0.3)
    pdf.rect(ax.px, ax.py, ax.pw, ax.ph)
    pdf.font(6.8)
    pdf.ink(MUTED)
    pdf.text_line(ax.px, ax.py + ax.ph + 4.2, ax.pw, 3, current_name, "C")
    pdf.text_line(x, ax.py - 5.2, 15.5, 3, "time", "R")


def legend_row(pdf: ReportPdf, x: float, y: float, rgb: RGB, name: str, text: str) -> None:
    """A swatch of ``rgb``, the ``name`` in bold and what it stands for."""
    pdf.fill(rgb)
    pdf.rect(x + 16, y + 0.6, 4, 2.4, style="F")
    pdf.font(7.2, True)
    pdf.ink(INK)
    pdf.text_line(x + 21.5, y, 23, 3.6, name)
    pdf.font(7.2)
    pdf.ink(MUTED)
    pdf.text_line(x + 44.5, y, pdf.w - pdf.r_margin - x - 45, 3.6, text)


def times_array(values: list[float | None]) -> np.ndarray:
    """Band times as drawn: None (cannot trip, or no trip guaranteed) as infinity."""
    return np.array([math.inf if v is None else v for v in values], dtype=float)


def draw_band(
    pdf: ReportPdf,
    ax: LogAxes,
    currents: np.ndarray,
    mins: np.ndarray,
    maxs: np.ndarray,
    rgb: RGB,
) -> None:
    """Shade one device's band and draw its edges (solid: max break; dashed: min hold).

    ``mins`` and ``maxs`` run parallel to ``currents``, infinity where the
    device cannot trip (mins) or a trip is not guaranteed (maxs).  The band is
    shaded where the device can trip, from its hold time (or the bottom) to its
    break time (or the top).
    """
    for a, b in _runs(np.isfinite(mins)):
        xs = ax.xs(currents[a:b])
        lo, hi = mins[a:b], maxs[a:b]
        upper = ax.ys(hi)
        lower = ax.ys(np.maximum(lo, ax.y_lo))
        with pdf.local_context(fill_opacity=0.22):
            pdf.fill(rgb)
            polyline(pdf, np.concatenate([xs, xs[::-1]]), np.concatenate([upper, lower[::-1]]), "F")
        pdf.pen(rgb)
        pdf.set_line_width(0.55)
        for c, d in _runs(np.isfinite(hi)):
            if d - c > 1:
                polyline(pdf, xs[c:d], upper[c:d])
        hold = lo > ax.y_lo
        if np.count_nonzero(hold) > 1:
            pdf.set_line_width(0.35)
            pdf.set_dash_pattern(dash=1.2, gap=0.9)
            polyline(pdf, xs[hold], ax.ys(lo[hold]))
            pdf.set_dash_pattern()


def draw_series(pdf: ReportPdf, ax: LogAxes, currents: np.ndarray, times: np.ndarray) -> None:
    """A thin line through the points with a time (NaN or infinity: left out, the line joined
    across them)."""
    known = np.isfinite(times)
    if np.count_nonzero(known) > 1:
        polyline(pdf, ax.xs(currents[known]), ax.ys(times[known]))


def polyline(pdf: ReportPdf, xs: np.ndarray, ys: np.ndarray, style: str = "D") -> None:
    """One path through the points (closed and filled with ``style`` 'F')."""
    keep = _bends(xs, ys)
    points = list(zip(xs[keep].tolist(), ys[keep].tolist(), strict=True))
    if style == "F":
        pdf.polygon(points, style="F")
    else:
        pdf.polyline(points)


def _bends(xs: np.ndarray, ys: np.ndarray) -> np.ndarray:
    """Which points to keep: the ends, and each point that is not on a straight run
    between its neighbours.

    A point is left out when it and both neighbours share a y (or an x) and it
    lies between them, or when both neighbours stand at least :data:`APART_MM`
    from it and it lies within :data:`STRAIGHT_MM` of the line joining them.
    (Points closer than that, as at either side of a step, are kept: two
    near-twins would each seem to lie on the other's line.)
    """
    keep = np.ones(len(xs), dtype=bool)
    if len(xs) < 3:
        return keep
    x0, x1, x2 = xs[:-2], xs[1:-1], xs[2:]
    y0, y1, y2 = ys[:-2], ys[1:-1], ys[2:]
    flat = (y0 == y1) & (y1 == y2) & ((x1 - x0) * (x2 - x1) >= 0)
    upright = (x0 == x1) & (x1 == x2) & ((y1 - y0) * (y2 - y1) >= 0)
    ax, ay, bx, by = x1 - x0, y1 - y0, x2 - x0, y2 - y0
    chord = np.hypot(bx, by)
    apart = (np.hypot(ax, ay) >= APART_MM) & (np.hypot(x2 - x1, y2 - y1) >= APART_MM)
    with np.errstate(invalid="ignore", divide="ignore"):
        off = np.abs(ax * by - ay * bx) / chord
        along = (ax * bx + ay * by) / (chord * chord)
    sloped = apart & (off <= STRAIGHT_MM) & (along >= 0) & (along <= 1)
    keep[1:-1] = ~(flat | upright | sloped)
    return keep


def _runs(mask: np.ndarray) -> list[tuple[int, int]]:
    """(start, end) of each run of True in ``mask`` (end exclusive)."""
    edges = np.flatnonzero(np.diff(np.concatenate([[False], mask, [False]]).astype(np.int8)))
    return list(zip(edges[::2].tolist(), edges[1::2].tolist(), strict=True))
