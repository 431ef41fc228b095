"""The PDF of the test sheet: one table row per residual-current device, landscape."""

from __future__ import annotations

from model.reports.render.pdf_base import (
    INK,
    MUTED,
    PANEL,
    RULE,
    SEVERITY_COLOUR,
    ReportPdf,
    caution_box,
)
from model.reports.sheet import (
    MARK_FAIL,
    MARK_NOT_JUDGED,
    MARK_OUT,
    MARK_PASS,
    SheetCell,
    SheetDoc,
    SheetRow,
)
from model.reports.text import clean

MARK_PDF = {MARK_PASS: "✓", MARK_OUT: "✗", MARK_NOT_JUDGED: "~", MARK_FAIL: "✗", "": ""}

SHEET_COLS: tuple[tuple[str, float], ...] = (
    ("Device", 36.0),
    ("Board", 22.0),
    ("Type", 24.0),
    ("Test", 10.5),
)
TEST_W = 19.0
RAMP_W = 20.0
BUTTON_W = 12.0
LH = 3.5


def _sheet_header(pdf: ReportPdf, doc: SheetDoc, note_w: float) -> None:
    y = pdf.get_y()
    pdf.set_fill_color(*INK)
    pdf.rect(pdf.l_margin, y, pdf.content_w, 9.5, style="F")
    pdf.ink((255, 255, 255))
    x = pdf.l_margin
    titles = [(t, w, "current" if t == "Test" else "") for t, w in SHEET_COLS]
    first = doc.rows[0].tests if doc.rows else ()
    for c in first:
        titles.append((c.title, TEST_W, "required" if c.required else ""))
    titles += [("Ramp", RAMP_W, ""), ("Button", BUTTON_W, ""), ("Note", note_w, "")]
    for t, w, sub in titles:
        pdf.set_xy(x + 0.6, y + 1.2)
        pdf.font(6.8, True)
        pdf.cell(w - 1.2, 3.4, t)
        if sub:
            pdf.set_xy(x + 0.6, y + 4.8)
            pdf.font(6)
            pdf.cell(w - 1.2, 3.2, sub)
        x += w
    pdf.ink(INK)
    pdf.set_y(y + 10.5)


def _test_cell(pdf: ReportPdf, c: SheetCell, x: float, y: float, w: float, unit: str) -> None:
    out = c.mark in (MARK_OUT, MARK_FAIL)
    pdf.set_xy(x + 0.6, y)
    pdf.font(7.4, out)
    pdf.ink(SEVERITY_COLOUR["urgent"] if out else INK)
    if c.value is None:
        pdf.ink(MUTED)
        pdf.cell(w - 1.2, LH, "—")
    else:
        text = f"{c.value_text(unit)} {MARK_PDF.get(c.mark, '')}".strip()
        room = w - 1.2 - 2 * pdf.c_margin
        width = pdf.get_string_width(text)
        if width > room:  # 'did not trip ✗' in bold: shrink to fit rather than overflow
            pdf.font(7.4 * room / width, out)
        pdf.cell(w - 1.2, LH, text)
    pdf.set_xy(x + 0.6, y + LH)
    pdf.font(5.9)
    pdf.ink(MUTED)
    pdf.cell(w - 1.2, LH - 0.4, c.short or c.band)


def _sheet_row(pdf: ReportPdf, r: SheetRow, note_w: float, shade: bool, draw: bool) -> float:
    texts = [r.named, r.board, r.type_text]
    widths = [w for _, w in SHEET_COLS]
    hs = [pdf.para_h(widths[0] - 1.2, LH, r.named, 7.4, True) + LH]
    hs += [pdf.para_h(w - 1.2, LH, t, 7.4) for t, w in zip(texts[1:], widths[1:3], strict=True)]
    note = clean(r.note)
    if r.not_tested is not None or not r.recorded:
        span_text = (
            f"not tested: {r.not_tested}"
            if r.not_tested is not None
            else "no reading recorded on this visit"
        )
        span_w = widths[3] + 6 * TEST_W + RAMP_W + BUTTON_W
        hs.append(pdf.para_h(span_w - 1.2, LH, span_text, 7.4, True))
    else:
        span_text = ""
        span_w = 0.0
        hs.append(2 * LH)
    if note:
        hs.append(pdf.para_h(note_w - 1.2, LH, note, 7))
    h = max(hs) + 1.6
    if not draw:
        return h
    y = pdf.get_y()
    if shade:
        pdf.set_fill_color(*PANEL)
        pdf.rect(pdf.l_margin, y, pdf.content_w, h, style="F")
    x = pdf.l_margin
    pdf.set_y(y + 0.8)
    pdf.para(x + 0.6, widths[0] - 1.2, LH, r.named, 7.4, True)
    pdf.para(x + 0.6, widths[0] - 1.2, LH, r.device_id, 6.4, False, MUTED)
    x += widths[0]
    for t, w in zip(texts[1:], widths[1:3], strict=True):
        pdf.set_y(y + 0.8)
        pdf.para(x + 0.6, w - 1.2, LH, t, 7.4)
        x += w
    if span_text:
        pdf.set_y(y + 0.8)
        pdf.para(x + 0.6, span_w - 1.2, LH, span_text, 7.4, True, MUTED)
        x += span_w
    else:
        pdf.set_y(y + 0.8)
        pdf.para(x + 0.6, widths[3] - 1.2, LH, r.test_waveform or "", 7.4)
        x += widths[3]
        for c in r.tests:
            _test_cell(pdf, c, x, y + 0.8, TEST_W, "ms")
            x += TEST_W
        _test_cell(pdf, r.ramp, x, y + 0.8, RAMP_W, "mA")
        x += RAMP_W
        pdf.set_xy(x + 0.6, y + 0.8)
        failed = r.button_mark == MARK_FAIL
        pdf.font(7.4, failed)
        pdf.ink(SEVERITY_COLOUR["urgent"] if failed else INK)
        pdf.cell(BUTTON_W - 1.2, LH, (r.button or "—") + (" ✗" if failed else ""))
        x += BUTTON_W
    if note:
        pdf.set_y(y + 0.8)
        pdf.para(x + 0.6, note_w - 1.2, LH, note, 7)
    pdf.set_draw_color(*RULE)
    pdf.set_line_width(0.15)
    pdf.line(pdf.l_margin, y + h, pdf.w - pdf.r_margin, y + h)
    pdf.set_y(y + h)
    return h


def sheet_pdf(doc: SheetDoc) -> bytes:
    pdf = ReportPdf(doc.heading, "landscape")
    pdf.add_page()
    req = ", ".join(doc.required_groups)
    lead = (
        f"{len(doc.rows)} residual-current device(s), in tree order. Each value shows ✓ within "
        "the band printed beneath it, ✗ outside it, ~ not judged (the product standard allows "
        f"either outcome). Required by the rule set: {req} ({doc.rules_source}); the other "
        "tests are recorded as common practice."
    )
    pdf.title_block(doc.heading, lead)
    fixed = sum(w for _, w in SHEET_COLS) + 6 * TEST_W + RAMP_W + BUTTON_W
    note_w = pdf.content_w - fixed
    if not doc.rows:
        pdf.para(pdf.l_margin, pdf.content_w, 5, "No residual-current devices on this site.", 9)
    else:
        pdf.room(22)
        _sheet_header(pdf, doc, note_w)
        for n, r in enumerate(doc.rows):
            h = _sheet_row(pdf, r, note_w, n % 2 == 1, draw=False)
            if pdf.get_y() + h > pdf.bottom:
                pdf.add_page()
                _sheet_header(pdf, doc, note_w)
            _sheet_row(pdf, r, note_w, n % 2 == 1, draw=True)
    caution_box(pdf, doc.caution)
    pdf.stamp_pages()
    return bytes(pdf.output())
