"""The test-sheet PDF read back and measured: legible type, every text inside its own cell.

A sheet is printed and read at arm's length on site; text under about 7 pt
is hard to read at 100 % (common practice for printed forms), and text that
runs into the next cell can be read as the wrong test's value.
"""

from __future__ import annotations

from pathlib import Path

import pypdf
import pytest

from model.reports.render.pdf_sheet import (
    LEAD_COLUMNS,
    MIN_PT,
    TAIL_COLUMNS,
    VALUE_PT,
    column_widths,
)
from model.reports.writer import write_report
from model.storage.sites import load_site
from tests.reports.pdf_measure import PT_PER_MM, Piece, lines, pieces
from tests.reports.report_sites import SAMPLES, awkward_site, squash

A4_LANDSCAPE_W_MM = 297.0
MARGIN_MM = 14.0
#: Width of a rendered piece may differ from the font's advance widths by rounding. [pt]
TOL_PT = 0.6


def _edges() -> list[float]:
    """Left edges of the sheet's columns and the table's right edge. [pt]"""
    widths = column_widths(A4_LANDSCAPE_W_MM - 2 * MARGIN_MM)
    edges = [MARGIN_MM]
    for w in widths:
        edges.append(edges[-1] + w)
    return [e * PT_PER_MM for e in edges]


def _table_pieces(page: list[Piece]) -> list[list[Piece]]:
    """The lines of the table on one page: from the heading row to the caution box or the end."""
    out: list[list[Piece]] = []
    inside = False
    for line in lines(page):
        texts = [p.text for p in line]
        if "Board" in texts and "Ramp" in texts:
            inside = True
        if inside and any("do not replace" in t for t in texts):
            break
        if "Loop impedance and disconnection" in texts:  # the devices' table has ended
            break
        if any("NOT a certificate" in t for t in texts):  # the page's footer
            break
        if inside:
            out.append(line)
    return out


def _check_page(page: list[Piece], where: str) -> int:
    for p in page:
        assert p.size >= MIN_PT - 1e-6, f"{where}: {p.text!r} set at {p.size:.2f} pt"
    edges = _edges()
    n_lead = len(LEAD_COLUMNS)
    n_tests = len(edges) - 1 - n_lead - len(TAIL_COLUMNS) - 1
    checked = 0
    for line in _table_pieces(page):
        for a, b in zip(line, line[1:], strict=False):
            assert a.right <= b.x + TOL_PT, f"{where}: {a.text!r} runs into {b.text!r}"
        for p in line:
            col = max(i for i, e in enumerate(edges[:-1]) if e <= p.x + TOL_PT)
            end = col + 1
            test = col - n_lead
            if 0 <= test < n_tests and test % 2 == 0:
                end = col + 2  # the 0° column's band may span the 180° column too
            if col == 0 and not p.bold and p.size < VALUE_PT:
                end = n_lead - 1  # the device id spans the lead columns of its band row
            if p.text.startswith(("not tested", "no reading")):
                end = len(edges) - 2  # a spanned line runs up to the note
            assert p.right <= edges[end] + TOL_PT, (
                f"{where}: {p.text!r} ends at {p.right:.1f} pt past its cell's edge "
                f"{edges[end]:.1f} pt"
            )
            checked += 1
    return checked


@pytest.mark.parametrize("sample", SAMPLES, ids=lambda p: p.stem)
def test_every_sheet_cell_is_legible_and_inside_its_cell(sample: Path, tmp_path: Path) -> None:
    out = write_report(load_site(sample), "sheet", "pdf", tmp_path / "sheet.pdf")
    n_pages = len(pypdf.PdfReader(out).pages)
    checked = sum(_check_page(pieces(out, n), f"{sample.stem} p{n + 1}") for n in range(n_pages))
    assert checked > 40  # the table was found and measured


def test_awkward_sheet_is_legible_and_inside_its_cells(tmp_path: Path) -> None:
    out = write_report(awkward_site(), "sheet", "pdf", tmp_path / "sheet.pdf")
    assert _check_page(pieces(out, 0), "awkward") > 40


def test_set_delay_bands_print_whole_and_headings_repeat(tmp_path: Path) -> None:
    """The school's set-delay CBR: both declared bands printed in full, none overlapping."""
    site = load_site(next(p for p in SAMPLES if p.stem == "kestrel-hill-school"))
    out = write_report(site, "sheet", "pdf", tmp_path / "sheet.pdf")
    reader = pypdf.PdfReader(out)
    assert len(reader.pages) >= 2
    first = squash(reader.pages[0].extract_text())
    # IEC 60947-2 Annex B: a CBR's delay is its declared setting (150 ms; at most 500 ms),
    # the shortest time at every test current, so the 1 × and 5 × bands read alike
    assert first.count(squash("150–500 ms (declared setting)")) >= 2
    for n in range(len(reader.pages)):
        texts = [p.text for p in pieces(out, n)]
        loop = "Loop impedance and disconnection" in texts
        if loop and "Ramp" not in texts:
            break  # the circuits' loop-impedance table follows the devices' table
        assert "Board" in texts and "Ramp" in texts, f"headings missing on page {n + 1}"
        if loop:
            break
