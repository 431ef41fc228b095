"""The PDF of the coordination study: every series pair's chart, verdict, ranges and data.

Residual-current pairs are drawn by :func:`model.reports.render.pdf_chart.draw_chart`;
fuse and breaker pairs here, on log-log axes: the estimated band shaded, the
staircase reading as thin lines, the not-selective and not-shown currents as
strips, the largest fault current and the selectivity limit as marked lines.
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

from model.reports.oc_chart import OcChart
from model.reports.render.pdf_after import draw_after, draw_made, draw_plan_note
from model.reports.render.pdf_axes import (
    LogAxes,
    draw_band,
    draw_frame,
    draw_grid,
    draw_series,
    legend_row,
    times_array,
)
from model.reports.render.pdf_base import INK, MUTED, RGB, ReportPdf, caution_box
from model.reports.render.pdf_chart import (
    CHART_BLOCK_H,
    CLASH_EDGE,
    CLASH_STRONG,
    DOWN_COLOUR,
    UP_COLOUR,
    draw_chart,
)
from model.reports.study import OC_METHOD, RCD_METHOD, StudyDoc
from model.reports.zs_sheet import COLUMNS, NOTE, TITLE, ZsRow
from model.rules.overcurrent.pairs import fmt_a

UNSHOWN: RGB = (150, 150, 150)
LIMIT: RGB = (30, 130, 60)
OC_PLOT_H = 70.0
OC_BLOCK_H = 150.0


def _fmt_s(t: float) -> str:
    if t >= 3600:
        return f"{t / 3600:g} h"
    return f"{t:g} s" if t >= 0.01 else f"{t * 1000:g} ms"


def draw_oc_chart(
    pdf: ReportPdf, c: OcChart, x: float, y: float, width: float, title: str | None = None
) -> None:
    """One fuse or breaker pair: title (``title`` in place of the usual one), verdict,
    log-log plot, legend and the data it rests on."""
    pdf.set_y(y)
    title = title or (
        f"Pair {c.number}: {c.up_label} ({c.up_name}) over {c.down_label} ({c.down_name})"
    )
    pdf.para(x, width, 5, title, 10.5, True)
    pdf.para(x, width, 4.2, f"Verdict: {c.verdict} — {c.verdict_words}.", 9, True)
    pdf.para(x, width, 3.9, c.explanation + ".", 7.8, False, MUTED)
    top = pdf.get_y() + 5.5
    ax = LogAxes(x + 16, top, width - 20, OC_PLOT_H, *c.current_span_a, *c.time_span_s)
    px, py, pw, ph = ax.px, ax.py, ax.pw, ax.ph
    draw_grid(pdf, ax, fmt_a, _fmt_s, minor_times=False)
    cur = np.array(c.currents_a, dtype=float)
    for mins, maxs, rig_min, rig_max, rgb in (
        (c.down_min, c.down_max, c.down_min_rig, c.down_max_rig, DOWN_COLOUR),
        (c.up_min, c.up_max, c.up_min_rig, c.up_max_rig, UP_COLOUR),
    ):
        if not mins:
            continue
        draw_band(pdf, ax, cur, times_array(mins), times_array(maxs), rgb)
        pdf.pen(rgb)
        pdf.set_line_width(0.2)
        for series in (rig_min, rig_max):
            draw_series(pdf, ax, cur, times_array(series))
    strips = [
        (ax.x(max(lo, ax.x_lo)), ax.x(min(hi, ax.x_hi)), kind)
        for lo, hi, kind in c.ranges
        if min(hi, ax.x_hi) > max(lo, ax.x_lo)
    ]
    if strips:
        with pdf.local_context(fill_opacity=0.3):
            for xa, xb, kind in strips:
                pdf.fill(CLASH_STRONG if kind == "not-selective" else UNSHOWN)
                pdf.rect(xa, py, max(xb - xa, 0.3), ph, style="F")
    for value, rgb, text in (
        (c.i_max_a, CLASH_EDGE, "largest fault current"),
        (c.limit_a, LIMIT, "selective up to"),
    ):
        if value is None or not (ax.x_lo <= value <= ax.x_hi):
            continue
        xv = ax.x(value)
        pdf.pen(rgb)
        pdf.set_line_width(0.45)
        pdf.set_dash_pattern(dash=1.5, gap=1.0)
        pdf.line(xv, py, xv, py + ph)
        pdf.set_dash_pattern()
        pdf.font(6)
        pdf.ink(rgb)
        ty = py + 0.8 if rgb == LIMIT else py + 4
        if xv > px + pw - 32:
            pdf.text_line(xv - 31, ty, 30, 3, f"{text} {fmt_a(value)}", "R")
        else:
            pdf.text_line(xv + 0.6, ty, 30, 3, f"{text} {fmt_a(value)}")
    draw_frame(pdf, ax, x, "prospective current")
    ly = py + ph + 8.5
    legend_row(pdf, x, ly, UP_COLOUR, "upstream", f"{c.up_label} ({c.up_name})")
    legend_row(pdf, x, ly + 4.2, DOWN_COLOUR, "downstream", f"{c.down_label} ({c.down_name})")
    legend_row(
        pdf, x, ly + 8.4, CLASH_STRONG, "not selective", "the upstream device may operate first"
    )
    legend_row(pdf, x, ly + 12.6, UNSHOWN, "not shown", "the published bands cannot settle it")
    pdf.set_y(ly + 17.5)
    pdf.para(
        x, width, 3.8, "Shaded: estimate; thin lines: staircase (guaranteed).", 7.4, False, MUTED
    )
    for line in [*c.data, *c.notes]:
        pdf.para(x, width, 3.6, "• " + line, 7.2, False, MUTED)


def zs_table(pdf: ReportPdf, rows: list[ZsRow]) -> None:
    """The loop-impedance section (the study and the test sheet print it alike)."""
    widths = (0.14, 0.14, 0.11, 0.09, 0.17, 0.11, 0.24)
    w = pdf.content_w
    pdf.para(pdf.l_margin, w, 7, TITLE, 13, True)
    pdf.para(pdf.l_margin, w, 4, NOTE, 8, False, MUTED)
    pdf.set_y(pdf.get_y() + 2)

    def line(cells: Sequence[str], bold: bool) -> None:
        heights = [
            pdf.para_h(f * w - 1, 3.8, t, 7.6, bold) for f, t in zip(widths, cells, strict=True)
        ]
        h = max(heights) + 1.2
        if pdf.get_y() + h > pdf.bottom:
            pdf.add_page()
        y0 = pdf.get_y()
        x = pdf.l_margin
        for f, text in zip(widths, cells, strict=True):
            pdf.set_y(y0)
            pdf.para(x, f * w - 1, 3.8, text, 7.6, bold, INK)
            x += f * w
        pdf.set_y(y0 + h)
        pdf.pen((220, 224, 228))
        pdf.set_line_width(0.15)
        pdf.line(pdf.l_margin, y0 + h - 0.4, pdf.l_margin + w, y0 + h - 0.4)

    line(COLUMNS, True)
    for r in rows:
        line(r.cells(), False)


def study_pdf(doc: StudyDoc) -> bytes:
    pdf = ReportPdf(doc.heading, "portrait")
    pdf.add_page()
    count = len(doc.rcd) + len(doc.oc)
    lead = (
        f"{count} series pair(s): for each, the bands of both devices, the verdict, the currents "
        "where selectivity is not shown or not given, and the data it rests on."
    )
    pdf.title_block(doc.heading, lead)
    if doc.after is not None:
        draw_plan_note(pdf, doc.after)
    w = pdf.content_w
    pdf.para(pdf.l_margin, w, 7, "Residual-current pairs", 13, True)
    pdf.para(pdf.l_margin, w, 4, RCD_METHOD, 8, False, MUTED)
    if not doc.rcd:
        pdf.para(pdf.l_margin, w, 4.5, "No series pairs of residual-current devices.", 9)
    for s in doc.rcd:
        if pdf.get_y() + CHART_BLOCK_H > pdf.bottom:
            pdf.add_page()
        pdf.para(pdf.l_margin, w, 4.5, f"Verdict: {s.verdict}", 9, True)
        draw_chart(pdf, s.chart, pdf.l_margin, pdf.get_y(), w)
        draw_after(pdf, doc.after_of(s.chart.up_id, s.chart.down_id), draw_oc_chart)
    pdf.add_page()
    pdf.para(pdf.l_margin, w, 7, "Fuse and breaker pairs", 13, True)
    pdf.para(pdf.l_margin, w, 4, OC_METHOD, 8, False, MUTED)
    if not doc.oc:
        pdf.para(pdf.l_margin, w, 4.5, "No series pairs of overcurrent devices.", 9)
    for c in doc.oc:
        if pdf.get_y() + OC_BLOCK_H > pdf.bottom:
            pdf.add_page()
        draw_oc_chart(pdf, c, pdf.l_margin, pdf.get_y() + 3, w)
        draw_after(pdf, doc.after_of(c.up_id, c.down_id), draw_oc_chart)
    if doc.after is not None:
        draw_made(pdf, doc.after, draw_oc_chart)
    if doc.zs_rows:
        pdf.add_page()
        zs_table(pdf, doc.zs_rows)
    caution_box(pdf, doc.closing_caution)
    pdf.stamp_pages()
    return bytes(pdf.output())
