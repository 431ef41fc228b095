"""The plan's part of the remedial-list PDF: the changes in order, what remains, its caution."""

from __future__ import annotations

from model.reports.plan_part import REMAINING_TITLE, PlanPart
from model.reports.render.pdf_base import ACCENT, INK, MUTED, ReportPdf, accent_panel

NUM_W = 8.0
LH = 4.3


def _step_h(pdf: ReportPdf, w: float, text: str, note: str) -> float:
    h = pdf.para_h(w - NUM_W, LH, text, 8.8, True)
    return h + (pdf.para_h(w - NUM_W, LH - 0.4, note, 7.8) if note else 0.0) + 1.6


def draw_plan(pdf: ReportPdf, part: PlanPart) -> None:
    """The planned changes, numbered as the items' "Planned change" rows name them."""
    w = pdf.content_w
    x = pdf.l_margin
    lead_h = pdf.para_h(w, 4.1, part.lead, 8.2)
    box_h = pdf.para_h(w - 8, 4.1, part.caution, 8.2) + 5
    first = part.steps[0] if part.steps else None
    step_h = _step_h(pdf, w, first.text, first.items_text()) if first else 0.0
    pdf.room(12 + lead_h + box_h + 4 + step_h)
    pdf.set_y(pdf.get_y() + 4)
    pdf.para(x, w, 7, part.title, 13, True, ACCENT)
    pdf.para(x, w, 4.1, part.lead, 8.2, False, MUTED)
    _caution(pdf, part.caution, box_h)
    for s in part.steps:
        note = s.items_text()
        pdf.room(_step_h(pdf, w, s.text, note))
        y = pdf.get_y()
        pdf.set_xy(x, y)
        pdf.font(8.8, True)
        pdf.ink(INK)
        pdf.cell(NUM_W, LH, f"{s.number}.")
        pdf.set_y(y)
        pdf.para(x + NUM_W, w - NUM_W, LH, s.text, 8.8, True)
        if note:
            pdf.para(x + NUM_W, w - NUM_W, LH - 0.4, note, 7.8, False, MUTED)
        pdf.set_y(pdf.get_y() + 1.6)
    for n, r in enumerate(part.remaining):
        head = f"{r.items_text().capitalize()}: " if r.items else ""
        text = head + r.message
        why = "Why: " + r.reason
        h = pdf.para_h(w - NUM_W, LH, text, 8.4) + pdf.para_h(w - NUM_W, LH, why, 8.2) + 1.5
        if n == 0:  # the heading never stands alone at the foot of a page
            pdf.room(h + 9.5)
            pdf.set_y(pdf.get_y() + 2)
            pdf.para(x, w, 5.5, REMAINING_TITLE, 10.5, True)
        else:
            pdf.room(h)
        pdf.para(x + NUM_W, w - NUM_W, LH, text, 8.4)
        pdf.para(x + NUM_W, w - NUM_W, LH, why, 8.2, False, MUTED)
        pdf.set_y(pdf.get_y() + 1.5)


def _caution(pdf: ReportPdf, caution: str, h: float) -> None:
    """The plan's caution, in a shaded box with an accent edge, before its changes."""
    x, w = pdf.l_margin, pdf.content_w
    y = pdf.get_y() + 2
    accent_panel(pdf, x, y, w, h)
    pdf.set_y(y + 2.5)
    pdf.para(x + 4, w - 8, 4.1, caution, 8.2, True)
    pdf.set_y(y + h + 3)
