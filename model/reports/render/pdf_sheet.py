"""The PDF of the test sheet: one table row pair per residual-current device, landscape.

The table is laid out here, row by row: every cell wraps its text inside its
own column, the headings repeat at the top of every page, and a device's two
rows (values, then bands) stay together on one page, with its note running
down both.  No text is set below :data:`MIN_PT`, so the sheet reads when
printed at 100 %.  (fpdf2's own table lays out the same, at several times
the work: it sets every cell twice, once to measure it.)

Columns are listed once in :data:`COLUMNS` (title, width); a new column is
one more entry there and one more cell in :func:`_value_row` and
:func:`_band_row`.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

from model.reports.render.pdf_base import (
    INK,
    MUTED,
    PANEL,
    RGB,
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
#: Space inside a cell's edges: top, right, bottom, left. [mm]
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


@dataclass(frozen=True)
class Face:
    """How a cell's text is set: size [pt], weight, colour."""

    size: float
    bold: bool
    rgb: RGB


_VALUE = Face(VALUE_PT, False, INK)
_VALUE_BOLD = Face(VALUE_PT, True, INK)
_OUT = Face(VALUE_PT, True, SEVERITY_COLOUR["urgent"])
_BAND = Face(BAND_PT, False, MUTED)
_SPAN = Face(VALUE_PT, True, MUTED)
_HEAD = Face(HEAD_PT, True, (255, 255, 255))


@dataclass(frozen=True)
class Cell:
    """One cell of the table: its text, face, the columns it spans and whether a rule
    runs along its bottom edge."""

    text: str
    face: Face
    span: int = 1
    rule: bool = False


def column_widths(content_w: float, n_tests: int = 6) -> list[float]:
    """Widths of every column, in order [mm]; the note column takes what is left."""
    lead = [w for _, w in LEAD_COLUMNS]
    tail = [w for _, w in TAIL_COLUMNS]
    note = max(NOTE_MIN_W, content_w - sum(lead) - n_tests * TEST_W - sum(tail))
    return [*lead, *([TEST_W] * n_tests), *tail, note]


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


def _value_face(c: SheetCell) -> Face:
    if c.mark in (MARK_OUT, MARK_FAIL):
        return _OUT
    return _VALUE if c.value is not None else _BAND


def _value_row(r: SheetRow, span: str) -> list[Cell]:
    """The device's first row: label, board, type, then every recorded value (the note,
    which runs down both rows, is not among them)."""
    row = [Cell(r.named, _VALUE_BOLD), Cell(r.board, _VALUE), Cell(r.type_text, _VALUE)]
    if span:
        row.append(Cell(span, _SPAN, span=_span_cols(len(r.tests))))
        return row
    row.append(Cell(r.test_waveform or "", _VALUE))
    row += [Cell(_value_text(c, "ms"), _value_face(c)) for c in r.tests]
    row.append(Cell(_value_text(r.ramp, "mA"), _value_face(r.ramp)))
    failed = r.button_mark == MARK_FAIL
    button = (r.button or "—") + (" ✗" if failed else "")
    row.append(Cell(button, _OUT if failed else (_VALUE if r.button else _BAND)))
    return row


def _note(r: SheetRow) -> Cell:
    """The device's note, down both its rows."""
    return Cell(clean(r.note), _BAND, rule=True)


def _band_row(r: SheetRow, span: str) -> list[Cell]:
    """The device's second row: its id (under device, board and type), then the band of
    each test (once for 0° and 180°)."""
    row = [Cell(r.device_id, _BAND, span=_ID_SPAN, rule=True)]
    n_tests = len(r.tests)
    if span:
        row.append(Cell("", _BAND, span=_span_cols(n_tests), rule=True))
        return row
    row.append(Cell("band:", _BAND, rule=True))
    i = 0
    while i < n_tests:
        c = r.tests[i]
        same = i + 1 < n_tests and r.tests[i + 1].band == c.band and _pair(c, r.tests[i + 1])
        row.append(Cell(c.short or c.band, _BAND, span=2 if same else 1, rule=True))
        i += 2 if same else 1
    row.append(Cell(r.ramp.short or r.ramp.band, _BAND, rule=True))
    row.append(Cell("", _BAND, rule=True))
    return row


class SheetTable:
    """The devices' table on the page: column edges, headings, and the row pairs."""

    def __init__(self, pdf: ReportPdf, widths: Sequence[float], headings: Sequence[str]) -> None:
        self.pdf = pdf
        self.widths = list(widths)
        self.edges = [pdf.l_margin]
        for w in self.widths:
            self.edges.append(self.edges[-1] + w)
        self.heading = [Cell(t, _HEAD) for t in headings]
        self.heading_h = self._row_h(self.heading)

    def _lines(self, c: Cell, col: int) -> list[str]:
        width = self.edges[col + c.span] - self.edges[col] - PAD[1] - PAD[3]
        return self.pdf.wrap(c.text, width, c.face.size, c.face.bold)

    def _cell_h(self, c: Cell, col: int) -> float:
        """Height of a cell's text with the padding; 0 for an empty cell. [mm]"""
        if not c.text:
            return 0.0
        return len(self._lines(c, col)) * LINE_H + PAD[0] + PAD[2]

    def _row_h(self, row: Sequence[Cell]) -> float:
        col, tallest = 0, 0.0
        for c in row:
            tallest = max(tallest, self._cell_h(c, col))
            col += c.span
        return tallest or LINE_H

    def draw_heading(self) -> None:
        y = self.pdf.get_y()
        self.pdf.fill(INK)
        self._draw_row(self.heading, y, self.heading_h, fill=True)
        self.pdf.set_y(y + self.heading_h)

    def heights(self, top: list[Cell], under: list[Cell], note: Cell) -> tuple[float, float]:
        """Heights of a device's two rows: each its tallest cell, and a note taller than
        both shared out between them. [mm]"""
        top_h, under_h = self._row_h(top), self._row_h(under)
        note_h = self._cell_h(note, len(self.widths) - 1)
        if note_h > top_h + under_h:
            extra = (note_h - top_h - under_h) / 2
            top_h, under_h = top_h + extra, under_h + extra
        return top_h, under_h

    def device(self, top: list[Cell], under: list[Cell], note: Cell, shade: bool) -> None:
        """One device's two rows and its note down the last column, on one page."""
        pdf = self.pdf
        top_h, under_h = self.heights(top, under, note)
        note_col = len(self.widths) - 1
        if pdf.get_y() + top_h + under_h > pdf.bottom:
            pdf.add_page()
            self.draw_heading()
        y = pdf.get_y()
        if shade:
            pdf.fill(PANEL)
        self._draw_row([*top, note], y, top_h, fill=shade, tall={note_col: top_h + under_h})
        self._draw_row(under, y + top_h, under_h, fill=shade)
        pdf.set_y(y + top_h + under_h)

    def _draw_row(
        self,
        row: Sequence[Cell],
        y: float,
        h: float,
        *,
        fill: bool,
        tall: dict[int, float] | None = None,
    ) -> None:
        """Fill, rule and text of each cell; ``tall``: cells running down further rows."""
        pdf = self.pdf
        col = 0
        for c in row:
            x, x2 = self.edges[col], self.edges[col + c.span]
            ch = (tall or {}).get(col, h)
            if fill:
                pdf.rect(x, y, x2 - x, ch, style="F")
            if c.rule:
                pdf.line(x, y + ch, x2, y + ch)
            if c.text:
                pdf.font(c.face.size, c.face.bold)
                pdf.ink(c.face.rgb)
                top = y + PAD[0]
                for n, line in enumerate(self._lines(c, col)):
                    pdf.text_line(x, top + n * LINE_H, x2 - x, LINE_H, line, inset=PAD[3])
            col += c.span


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
        pdf.pen(RULE)
        pdf.set_line_width(0.15)
        table = SheetTable(pdf, widths, _headings(doc))
        devices = [
            (_value_row(r, _span_text(r)), _band_row(r, _span_text(r)), _note(r)) for r in doc.rows
        ]
        # never the headings alone at the foot of a page
        pdf.room(table.heading_h + sum(table.heights(*devices[0])))
        table.draw_heading()
        for n, (top, under, note) in enumerate(devices):
            table.device(top, under, note, n % 2 == 1)
    if doc.zs_rows:
        from model.reports.render.pdf_study import zs_table

        pdf.set_y(pdf.get_y() + 6)
        zs_table(pdf, list(doc.zs_rows))
    caution_box(pdf, doc.caution)
    pdf.stamp_pages()
    return bytes(pdf.output())
