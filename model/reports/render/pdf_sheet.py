"""The PDF of the test sheet: one table row pair per residual-current device, landscape.

Laid out by fpdf2's own table (``FPDF.table``): every cell wraps its text
inside its own column, the headings repeat at the top of every page, and a
device's two rows (values, then bands) stay together on one page.  No text
is set below :data:`MIN_PT`, so the sheet reads when printed at 100 %.

Columns are listed once in :data:`COLUMNS` (title, width); a new column is
one more entry there and one more cell in :func:`_value_row` and
:func:`_band_row`.
"""

from __future__ import annotations

from fpdf.enums import CellBordersLayout, TableBordersLayout, VAlign
from fpdf.fonts import FontFace
from fpdf.table import Table

from model.reports.render.pdf_base import (
    FAMILY,
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

#: The smallest type on the sheet [pt]: legible when printed at 100 %.
MIN_PT = 7.0
VALUE_PT = 8.0
BAND_PT = MIN_PT
HEAD_PT = 7.5
LINE_H = 3.3
PAD = (0.7, 1.0, 0.7, 1.0)

#: The fixed columns before the tests: (title, width [mm]).
LEAD_COLUMNS: tuple[tuple[str, float], ...] = (
    ("Device\nid", 30.0),
    ("Board", 21.0),
    ("Type", 22.0),
    ("Test\ncurrent", 16.5),
)
#: The device id, in the band row, spans the lead columns before the test current.
_ID_SPAN = len(LEAD_COLUMNS) - 1
TEST_W = 19.5
RAMP_W = 24.0
BUTTON_W = 13.5
#: Columns after the six tests: ramp and button (the note takes the rest of the width).
TAIL_COLUMNS: tuple[tuple[str, float], ...] = (("Ramp", RAMP_W), ("Button", BUTTON_W))
NOTE_MIN_W = 24.0

_VALUE = FontFace(family=FAMILY, size_pt=VALUE_PT, color=INK)
_VALUE_BOLD = FontFace(family=FAMILY, emphasis="B", size_pt=VALUE_PT, color=INK)
_OUT = FontFace(family=FAMILY, emphasis="B", size_pt=VALUE_PT, color=SEVERITY_COLOUR["urgent"])
_BAND = FontFace(family=FAMILY, size_pt=BAND_PT, color=MUTED)
_SPAN = FontFace(family=FAMILY, emphasis="B", size_pt=VALUE_PT, color=MUTED)
_HEAD = FontFace(
    family=FAMILY, emphasis="B", size_pt=HEAD_PT, color=(255, 255, 255), fill_color=INK
)


def column_widths(content_w: float, n_tests: int = 6) -> list[float]:
    """Widths of every column, in order [mm]; the note column takes what is left."""
    lead = [w for _, w in LEAD_COLUMNS]
    tail = [w for _, w in TAIL_COLUMNS]
    note = max(NOTE_MIN_W, content_w - sum(lead) - n_tests * TEST_W - sum(tail))
    return [*lead, *([TEST_W] * n_tests), *tail, note]


def _shade(face: FontFace, shade: bool) -> FontFace:
    return face.replace(fill_color=PANEL) if shade else face


def _headings(doc: SheetDoc) -> list[str]:
    titles = [t for t, _ in LEAD_COLUMNS]
    first = doc.rows[0].tests if doc.rows else ()
    titles += [c.title + ("\nrequired" if c.required else "") for c in first]
    titles += [t for t, _ in TAIL_COLUMNS]
    return [*titles, "Note"]


def _value_text(c: SheetCell, unit: str) -> str:
    if c.value is None:
        return "—"
    return f"{c.value_text(unit)} {MARK_PDF.get(c.mark, '')}".strip()


def _value_face(c: SheetCell) -> FontFace:
    if c.mark in (MARK_OUT, MARK_FAIL):
        return _OUT
    return _VALUE if c.value is not None else _BAND


def _value_row(table: Table, r: SheetRow, shade: bool, span: str) -> None:
    """The device's first row: label, board, type, then every recorded value."""
    row = table.row()
    top = CellBordersLayout.NONE
    row.cell(r.named, style=_shade(_VALUE_BOLD, shade), border=top)
    row.cell(r.board, style=_shade(_VALUE, shade), border=top)
    row.cell(r.type_text, style=_shade(_VALUE, shade), border=top)
    n_tests = len(r.tests)
    if span:
        row.cell(span, style=_shade(_SPAN, shade), colspan=_span_cols(n_tests), border=top)
    else:
        row.cell(r.test_waveform or "", style=_shade(_VALUE, shade), border=top)
        for c in r.tests:
            row.cell(_value_text(c, "ms"), style=_shade(_value_face(c), shade), border=top)
        row.cell(_value_text(r.ramp, "mA"), style=_shade(_value_face(r.ramp), shade), border=top)
        failed = r.button_mark == MARK_FAIL
        button = (r.button or "—") + (" ✗" if failed else "")
        face = _OUT if failed else (_VALUE if r.button else _BAND)
        row.cell(button, style=_shade(face, shade), border=top)
    row.cell(clean(r.note), style=_shade(_BAND, shade), rowspan=2, border=CellBordersLayout.BOTTOM)


def _band_row(table: Table, r: SheetRow, shade: bool, span: str) -> None:
    """The device's second row: its id (under device, board and type), then the band of
    each test (once for 0° and 180°)."""
    row = table.row()
    bottom = CellBordersLayout.BOTTOM
    row.cell(r.device_id, style=_shade(_BAND, shade), colspan=_ID_SPAN, border=bottom)
    n_tests = len(r.tests)
    if span:
        row.cell("", style=_shade(_BAND, shade), colspan=_span_cols(n_tests), border=bottom)
    else:
        row.cell("band:", style=_shade(_BAND, shade), border=bottom)
        i = 0
        while i < n_tests:
            c = r.tests[i]
            same = i + 1 < n_tests and r.tests[i + 1].band == c.band and _pair(c, r.tests[i + 1])
            row.cell(
                c.short or c.band,
                style=_shade(_BAND, shade),
                colspan=2 if same else 1,
                border=bottom,
            )
            i += 2 if same else 1
        row.cell(r.ramp.short or r.ramp.band, style=_shade(_BAND, shade), border=bottom)
        row.cell("", style=_shade(_BAND, shade), border=bottom)


def _span_cols(n_tests: int) -> int:
    """The columns a 'not tested' line spans: test current, the tests, ramp and button."""
    return 1 + n_tests + len(TAIL_COLUMNS)


def _pair(a: SheetCell, b: SheetCell) -> bool:
    """The 0° and 180° tests of one group (they share a band)."""
    return a.name.split("_")[0] == b.name.split("_")[0] and a.name.endswith("_0")


def _span_text(r: SheetRow) -> str:
    if r.not_tested is not None:
        return f"not tested: {r.not_tested}"
    if not r.recorded:
        return "no reading recorded on this visit"
    return ""


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
    if not doc.rows:
        pdf.para(pdf.l_margin, pdf.content_w, 5, "No residual-current devices on this site.", 9)
    else:
        pdf.room(24)
        widths = column_widths(pdf.content_w, len(doc.rows[0].tests))
        pdf.set_draw_color(*RULE)
        pdf.set_line_width(0.15)
        pdf.font(VALUE_PT)
        with pdf.table(
            col_widths=widths,
            width=sum(widths),
            align="LEFT",
            text_align="LEFT",
            v_align=VAlign.T,
            line_height=LINE_H,
            padding=PAD,
            borders_layout=TableBordersLayout.NONE,
            headings_style=_HEAD,
            repeat_headings=1,
            first_row_as_headings=True,
        ) as table:
            heading = table.row()
            for title in _headings(doc):
                heading.cell(title)
            for n, r in enumerate(doc.rows):
                span = _span_text(r)
                _value_row(table, r, n % 2 == 1, span)
                _band_row(table, r, n % 2 == 1, span)
    if doc.zs_rows:
        from model.reports.render.pdf_study import zs_table

        pdf.set_y(pdf.get_y() + 6)
        zs_table(pdf, list(doc.zs_rows))
    caution_box(pdf, doc.caution)
    pdf.stamp_pages()
    return bytes(pdf.output())
