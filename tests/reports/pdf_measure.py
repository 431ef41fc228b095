"""Text of a PDF page read back with pypdf, each piece with its position, size and width.

Widths are measured from the bundled DejaVu fonts' own advance widths
(fontTools), so a test can tell where each piece of text ends on the page
without trusting the code that laid it out.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cache
from pathlib import Path

import pypdf
from fontTools.ttLib import TTFont

FONT_DIR = Path(__file__).resolve().parents[2] / "model" / "reports" / "render" / "fonts"
PT_PER_MM = 72 / 25.4


@dataclass(frozen=True)
class Piece:
    """One piece of text as drawn: left edge and baseline [pt], size [pt], width [pt]."""

    text: str
    x: float
    y: float
    size: float
    bold: bool
    width: float

    @property
    def right(self) -> float:
        return self.x + self.width


@cache
def _font(bold: bool) -> tuple[dict[int, str], dict[str, tuple[int, int]], int]:
    f = TTFont(FONT_DIR / ("DejaVuSans-Bold.ttf" if bold else "DejaVuSans.ttf"))
    return f.getBestCmap(), dict(f["hmtx"].metrics), int(f["head"].unitsPerEm)


def text_width(text: str, size: float, bold: bool) -> float:
    """Width of ``text`` set in DejaVu Sans at ``size`` pt. [pt]"""
    cmap, hmtx, em = _font(bold)
    units = sum(hmtx[cmap.get(ord(ch), ".notdef")][0] for ch in text)
    return units * size / em


def pieces(path: Path, page: int) -> list[Piece]:
    """Every non-blank piece of text on one page (0-based), in drawing order."""
    out: list[Piece] = []

    def visit(text: str, cm: list[float], tm: list[float], font: object, size: float) -> None:
        stripped = text.strip()
        if not stripped or font is None:
            return
        name = str(font.get("/BaseFont", ""))  # type: ignore[attr-defined]
        bold = "Bold" in name
        scale = cm[0] * tm[0] or 1.0
        pt = size * scale
        x = tm[4] * cm[0] + cm[4]
        y = tm[5] * cm[3] + cm[5]
        out.append(Piece(stripped, x, y, pt, bold, text_width(stripped, pt, bold)))

    pypdf.PdfReader(path).pages[page].extract_text(visitor_text=visit)
    return out


def lines(ps: list[Piece], tol: float = 0.5) -> list[list[Piece]]:
    """Pieces grouped by baseline (within ``tol`` pt), top line first, each left to right."""
    rows: list[list[Piece]] = []
    for p in sorted(ps, key=lambda p: (-p.y, p.x)):
        if rows and abs(rows[-1][0].y - p.y) <= tol:
            rows[-1].append(p)
        else:
            rows.append([p])
    return [sorted(r, key=lambda p: p.x) for r in rows]
