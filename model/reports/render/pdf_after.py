"""The study PDF's pairs after the planned changes: each under the pair as it stands.

Every block is marked by a band in the accent colour that reads "After the
planned change (not yet made)", names the change, and gives the verdict and
chart the pair would have; a pair the change dissolves says why.  The fuse
and breaker chart is drawn by the study's own function, passed in (the study
module imports this one).
"""

from __future__ import annotations

from collections.abc import Callable

from model.reports.oc_chart import OcChart
from model.reports.render.pdf_base import ACCENT, MUTED, PANEL, ReportPdf, accent_panel
from model.reports.render.pdf_chart import CHART_BLOCK_H, draw_chart
from model.reports.study_after import (
    AFTER_LABEL,
    MADE_LEAD,
    MADE_TITLE,
    PLAN_NOTE,
    UNCHANGED,
    AfterPair,
    AfterStudy,
)

DrawOc = Callable[..., None]
#: Height kept free for a fuse or breaker chart with its data (as the study keeps).
OC_AFTER_H = 150.0
WHITE = (255, 255, 255)


def _band(pdf: ReportPdf, text: str) -> None:
    """The accent band that marks what follows as the state after the plan."""
    y = pdf.get_y() + 3
    pdf.set_fill_color(*ACCENT)
    pdf.rect(pdf.l_margin, y, pdf.content_w, 6, style="F")
    pdf.set_fill_color(*PANEL)  # text set in the fill colour prints in the page's last one
    pdf.set_xy(pdf.l_margin + 2.5, y + 0.8)
    pdf.font(9.4, True)
    pdf.ink(WHITE)
    pdf.cell(pdf.content_w - 5, 4.4, text)
    pdf.set_y(y + 7.5)


def _end(pdf: ReportPdf) -> None:
    """A thin accent rule that closes the after block, so the next pair reads as now."""
    y = pdf.get_y() + 2
    if y < pdf.bottom:
        pdf.set_draw_color(*ACCENT)
        pdf.set_line_width(0.5)
        pdf.line(pdf.l_margin, y, pdf.l_margin + pdf.content_w, y)
    pdf.set_y(y + 4)


def _lead(pdf: ReportPdf, a: AfterPair, word: str) -> None:
    w = pdf.content_w
    pdf.para(pdf.l_margin, w, 4, f"{word}: {a.changes_text}", 8.4, False, MUTED)


def draw_after(pdf: ReportPdf, a: AfterPair | None, draw_oc: DrawOc) -> None:
    """The pair ``a`` after the planned changes (nothing when no change touches it)."""
    if a is None:
        return
    w = pdf.content_w
    x = pdf.l_margin
    if a.gone or a.unchanged:
        pdf.room(26)
        _band(pdf, AFTER_LABEL)
        _lead(pdf, a, "Change")
        words = f"none — {a.gone}" if a.gone else f"{a.verdict} — {UNCHANGED}"
        pdf.para(x, w, 4.5, f"Verdict after: {words}.", 9, True)
        _end(pdf)
        return
    if a.rcd_chart is not None:
        c = a.rcd_chart
        pdf.room(CHART_BLOCK_H + 24)
        _band(pdf, AFTER_LABEL)
        _lead(pdf, a, "Change")
        pdf.para(x, w, 4.5, f"Verdict after: {a.verdict}", 9, True)
        title = f"Pair chart {c.number} after: {c.up_label} above {c.down_label}"
        draw_chart(pdf, c, x, pdf.get_y(), w, title=title)
        _end(pdf)
    elif a.oc_chart is not None:
        oc: OcChart = a.oc_chart
        pdf.room(OC_AFTER_H + 20)
        _band(pdf, AFTER_LABEL)
        _lead(pdf, a, "Change")
        title = (
            f"Pair {oc.number} after: {oc.up_label} ({oc.up_name}) over "
            f"{oc.down_label} ({oc.down_name})"
        )
        draw_oc(pdf, oc, x, pdf.get_y() + 2, w, title=title)
        _end(pdf)


def draw_made(pdf: ReportPdf, after: AfterStudy, draw_oc: DrawOc) -> None:
    """The series pairs the planned changes would make, after all the pairs of the site."""
    if not after.made:
        return
    w = pdf.content_w
    x = pdf.l_margin
    pdf.add_page()
    pdf.para(x, w, 7, MADE_TITLE, 13, True)
    pdf.para(x, w, 4, MADE_LEAD, 8, False, MUTED)
    for a in after.made:
        if a.rcd_chart is not None:
            c = a.rcd_chart
            pdf.room(CHART_BLOCK_H + 24)
            _band(pdf, AFTER_LABEL)
            _lead(pdf, a, "Made by")
            pdf.para(x, w, 4.5, f"Verdict after: {a.verdict}", 9, True)
            draw_chart(pdf, c, x, pdf.get_y(), w)
        elif a.oc_chart is not None:
            pdf.room(OC_AFTER_H + 20)
            _band(pdf, AFTER_LABEL)
            _lead(pdf, a, "Made by")
            draw_oc(pdf, a.oc_chart, x, pdf.get_y() + 2, w)


def draw_plan_note(pdf: ReportPdf, after: AfterStudy) -> None:
    """Under the title: that the study shows the pairs after the plan, and the changes."""
    w = pdf.content_w
    x = pdf.l_margin
    lines = [f"{n}. {t}" for n, t in enumerate(after.changes, start=1)]
    h = pdf.para_h(w - 8, 4, PLAN_NOTE, 8.4, True)
    h += sum(pdf.para_h(w - 12, 3.9, t, 8.2) for t in lines) + 5
    pdf.room(h + 4)
    y = pdf.get_y() + 1
    accent_panel(pdf, x, y, w, h)
    pdf.set_y(y + 2.5)
    pdf.para(x + 4, w - 8, 4, PLAN_NOTE, 8.4, True)
    for t in lines:
        pdf.para(x + 8, w - 12, 3.9, t, 8.2)
    pdf.set_y(y + h + 4)
