"""The PDF of the remedial-work list: summary tiles, items by board, then the pair charts."""

from __future__ import annotations

from model.reports.remedial import RemedialDoc, RemedialItem
from model.reports.render.pdf_base import (
    INK,
    MUTED,
    PANEL,
    RULE,
    SEVERITY_COLOUR,
    ReportPdf,
    caution_box,
)
from model.reports.render.pdf_chart import CHART_BLOCK_H, draw_chart
from model.reports.render.pdf_plan import draw_plan

LABEL_W = 20.0


def _item_rows(i: RemedialItem) -> list[tuple[str, str, bool]]:
    return i.rows("end of this document")


def _row_h(pdf: ReportPdf, w: float, lh: float, name: str, text: str, bold: bool) -> float:
    """A row's height: its text's, or its name's where the name wraps to more lines."""
    return max(pdf.para_h(w - LABEL_W, lh, text, 8.6, bold), pdf.para_h(LABEL_W, lh, name, 7.6))


def _draw_item(pdf: ReportPdf, i: RemedialItem, draw: bool) -> float:
    """Lay out one item; with ``draw`` False only measure it.  Returns its height."""
    x0 = pdf.l_margin + 4.5
    w = pdf.content_w - 4.5
    lh = 4.3
    h = 6.2
    node_lines: list[tuple[str, str]] = list(zip(i.named_nodes, i.where, strict=True))
    for label, where in node_lines:
        h += pdf.para_h(w, lh, label, 9.2, True)
        h += pdf.para_h(w, lh - 0.4, where, 7.8)
    h += 1.2
    for name, text, bold in _item_rows(i):
        h += _row_h(pdf, w, lh, name, text, bold) + 0.5
    h += 12.5
    if not draw:
        return h
    y0 = pdf.get_y()
    page = pdf.page
    colour = SEVERITY_COLOUR.get(i.severity, MUTED)
    pdf.font(10, True)
    pdf.ink(INK)
    num = f"{i.number}."
    pdf.text_line(x0, y0, pdf.text_w(num) + 2, 5.5, num)
    pdf.font(8.6, True)
    pdf.ink(colour)
    sev = i.severity.upper()
    pdf.text_line(pdf.get_x(), y0, pdf.text_w(sev) + 3, 5.5, sev)
    pdf.font(7.6)
    pdf.ink(MUTED)
    pdf.text_line(pdf.get_x(), y0, pdf.w - pdf.r_margin - pdf.get_x(), 5.5, i.rule, "R")
    pdf.set_y(y0 + 6.2)
    for label, where in node_lines:
        pdf.para(x0, w, lh, label, 9.2, True)
        pdf.para(x0, w, lh - 0.4, where, 7.8, False, MUTED)
    pdf.set_y(pdf.get_y() + 1.2)
    for name, text, bold in _item_rows(i):
        y = pdf.get_y()
        pdf.set_xy(x0, y)
        pdf.para(x0, LABEL_W, lh, name, 7.6, False, MUTED)  # a long name wraps in its column
        pdf.set_y(y)
        pdf.para(x0 + LABEL_W, w - LABEL_W, lh, text, 8.6, bold)
        pdf.set_y(y + _row_h(pdf, w, lh, name, text, bold) + 0.5)
    # the box to tick and the line for notes
    y = pdf.get_y() + 2.0
    pdf.pen(INK)
    pdf.set_line_width(0.3)
    pdf.rect(x0, y, 3.8, 3.8)
    pdf.font(8)
    pdf.ink(INK)
    pdf.text_line(x0 + 5.2, y - 0.2, 12, 4.2, "done")
    pdf.font(7.6)
    pdf.ink(MUTED)
    pdf.text_line(x0 + 17.2, y - 0.2, 11, 4.2, "notes")
    pdf.pen(RULE)
    pdf.set_line_width(0.25)
    pdf.line(x0 + 28, y + 3.8, pdf.w - pdf.r_margin, y + 3.8)
    pdf.line(x0 + 28, y + 9.0, pdf.w - pdf.r_margin, y + 9.0)
    if pdf.page == page:  # the item fitted on its page (it always does unless huge)
        pdf.fill(colour)
        pdf.rect(pdf.l_margin, y0 + 0.5, 1.6, h - 2.5, style="F")
        pdf.set_y(y0 + h)
    return h


def _summary(pdf: ReportPdf, counts: dict[str, int]) -> None:
    pdf.room(22)
    y = pdf.get_y() + 1
    gap = 3.0
    tile_w = (pdf.content_w - 3 * gap) / 4
    for n, (sev, count) in enumerate(counts.items()):
        x = pdf.l_margin + n * (tile_w + gap)
        colour = SEVERITY_COLOUR.get(sev, MUTED)
        pdf.fill(PANEL)
        pdf.rect(x, y, tile_w, 15, style="F")
        pdf.fill(colour)
        pdf.rect(x, y, tile_w, 1.2, style="F")
        pdf.font(15, True)
        pdf.ink(colour if count else MUTED)
        pdf.text_line(x + 3, y + 2.6, tile_w - 6, 7, str(count))
        pdf.font(8)
        pdf.ink(INK)
        pdf.text_line(x + 3, y + 9.4, tile_w - 6, 4, sev)
    pdf.set_y(y + 19)


def _board_heading(pdf: ReportPdf, label: str, place: str) -> None:
    pdf.room(26)
    y = pdf.get_y() + 1.5
    pdf.fill(PANEL)
    pdf.rect(pdf.l_margin, y, pdf.content_w, 7.5, style="F")
    pdf.font(10.5, True)
    pdf.ink(INK)
    lw = min(pdf.text_w(label) + 3, pdf.content_w * 0.6)
    pdf.text_line(pdf.l_margin + 2.5, y + 1.3, lw, 5, label)
    if place:
        pdf.font(8.4)
        pdf.ink(MUTED)
        pdf.text_line(pdf.l_margin + 2.5 + lw, y + 1.3, pdf.content_w - lw - 5, 5, place)
    pdf.set_y(y + 10)


def remedial_pdf(doc: RemedialDoc) -> bytes:
    pdf = ReportPdf(doc.heading, "portrait")
    pdf.add_page()
    total = sum(doc.counts.values())
    lead = (
        f"{total} item(s) below, grouped by board and worst first. Tick each one when the work "
        "is done and note what was found. Items that rest on common practice or guidance are "
        "advice, not requirements."
        if total
        else "No work arises from the checks made on this visit."
    )
    if doc.plan is not None:
        lead += " " + doc.plan.summary(total)
    pdf.title_block(doc.heading, lead)
    _summary(pdf, doc.counts)
    for g in doc.groups:
        _board_heading(pdf, g.label, g.place)
        for i in g.items:
            h = _draw_item(pdf, i, draw=False)
            if pdf.get_y() + h > pdf.bottom:
                pdf.add_page()
            _draw_item(pdf, i, draw=True)
    if doc.plan is not None:
        draw_plan(pdf, doc.plan)
    if doc.charts:
        pdf.add_page()
        pdf.para(pdf.l_margin, pdf.content_w, 7, "Series pairs", 14, True)
        pdf.para(
            pdf.l_margin,
            pdf.content_w,
            4.2,
            "Each chart shows the time-current bands of a device and the device upstream of it, "
            "read from IEC 61008-1 Table 1 as steps between the tabulated currents. A shaded band "
            "runs from the shortest time the device must hold (non-actuating) to the longest it "
            "may take to break; open to the top where a trip is not guaranteed. Red strips: "
            "currents where both may trip. Markers: the readings of this visit (AC test current).",
            8.2,
            False,
            MUTED,
        )
        pdf.ln(2)
        for c in doc.charts:
            pdf.room(CHART_BLOCK_H)
            draw_chart(pdf, c, pdf.l_margin, pdf.get_y(), pdf.content_w)
    caution_box(pdf, doc.closing_caution)
    pdf.stamp_pages()
    return bytes(pdf.output())
