"""The PDF page every document shares (fpdf2): fonts, colours, text wrapping, page furniture.

Text is set in the bundled DejaVu Sans (it covers Ω, Δ, µ, °, ×, ½ and ‑,
which the PDF core fonts do not).  Text is never read as markup, and control
characters are removed before it reaches the page (``model.reports.text.clean``).
A character the font has no glyph for (an emoji, a full-width ``＝``) is never
dropped in silence: it is printed as ``[U+FF1D]`` and the document ends with a
note that lists each one with its Unicode name (:attr:`ReportPdf.missing_glyphs`).
Every page carries, in its header and footer, the document title and site,
the not-a-certificate statement, the page number of the whole, and the
generation time and tripwise version.
"""

from __future__ import annotations

import unicodedata
from pathlib import Path
from typing import Any

from fpdf import FPDF

from model.reports.heading import Heading

FONT_DIR = Path(__file__).with_name("fonts")
FAMILY = "tw-sans"

RGB = tuple[int, int, int]
INK: RGB = (34, 38, 46)
MUTED: RGB = (108, 116, 128)
RULE: RGB = (205, 211, 218)
PANEL: RGB = (243, 245, 247)
ACCENT: RGB = (0, 102, 110)
#: The line that says a document is of an earlier visit.
EARLIER: RGB = (150, 60, 0)
SEVERITY_COLOUR: dict[str, RGB] = {
    "urgent": (180, 28, 40),
    "required": (200, 96, 0),
    "advisory": (36, 92, 160),
    "investigate": (104, 76, 148),
}

HEAD_H = 18.0
FOOT_H = 22.0


#: Line breaks and tabs lay text out; they are never glyphs to stand in for.
_LAYOUT = frozenset("\n\r\t")


class ReportPdf(FPDF):
    """An FPDF with our fonts and the page furniture drawn once the content is laid out."""

    def __init__(self, heading: Heading, orientation: str) -> None:
        super().__init__(orientation=orientation, unit="mm", format="A4")
        self.heading = heading
        self.add_font(FAMILY, "", str(FONT_DIR / "DejaVuSans.ttf"))
        self.add_font(FAMILY, "B", str(FONT_DIR / "DejaVuSans-Bold.ttf"))
        self.set_margins(14, HEAD_H + 4, 14)
        self.set_auto_page_break(True, margin=FOOT_H + 4)
        self.set_title(f"{heading.title}: {heading.site_name}")
        self.set_subject(heading.statement)
        self.set_creator(f"tripwise {heading.version}")
        self.set_author(heading.inspector or "tripwise")
        self.c_margin = 0.8
        #: Width of a text at 1 pt [mm], by style and text (as shown, stand-ins included).
        self._widths: dict[tuple[str, str], float] = {}
        #: Each text as shown in each font: stand-ins in place of missing glyphs.
        self._shown: dict[tuple[str, str], str] = {}
        #: Wrapped paragraphs, by text, width, size and weight (measured, then drawn).
        self._wrapped: dict[tuple[str, float, float, bool], list[str]] = {}
        #: fpdf2's colour objects, made once for each colour used.
        self._colours: dict[RGB, object] = {}
        #: Characters the font cannot show, each printed as ``[U+XXXX]`` instead.
        self.missing_glyphs: set[str] = set()
        self.font(9)
        self.ink()

    def normalize_text(self, text: str) -> str:
        """``text`` with every character the current font lacks shown as ``[U+XXXX]``.

        fpdf2 calls this for every text it sets or measures; without it a
        character the font has no glyph for would be left out of the page.
        The answer is kept for each font and text, so a text repeated on every
        page or in every row is looked at once.
        """
        font = self.current_font
        key = ("" if font is None else font.fontkey, text)
        shown = self._shown.get(key)
        if shown is None:
            shown = super().normalize_text(self._stand_ins(text))
            self._shown[key] = shown
        return shown

    def _stand_ins(self, text: str) -> str:
        cmap = getattr(self.current_font, "cmap", None)
        if not cmap or all(ord(c) in cmap or c in _LAYOUT for c in text):
            return text
        out: list[str] = []
        for c in text:
            if ord(c) in cmap or c in _LAYOUT:
                out.append(c)
            else:
                self.missing_glyphs.add(c)
                out.append(glyph_stand_in(c))
        return "".join(out)

    def missing_glyphs_note(self) -> str:
        """The note that lists the characters printed as stand-ins ('' when none)."""
        if not self.missing_glyphs:
            return ""
        listed = "; ".join(
            f"{glyph_stand_in(c)} {unicodedata.name(c, 'unnamed character')}"
            for c in sorted(self.missing_glyphs)
        )
        return (
            "Characters this document's font cannot show are printed as their Unicode "
            f"code point: {listed}."
        )

    # small helpers -------------------------------------------------------------
    def font(self, size: float, bold: bool = False) -> None:
        style = "B" if bold else ""
        if self.font_size_pt != size or self.font_style != style or self.font_family != FAMILY:
            self.set_font(FAMILY, style, size)

    def ink(self, rgb: RGB = INK) -> None:
        """Text colour."""
        self.set_text_color(self._colour(rgb, self.set_text_color, "text_color"))

    def pen(self, rgb: RGB) -> None:
        """Line colour."""
        self.set_draw_color(self._colour(rgb, self.set_draw_color, "draw_color"))

    def fill(self, rgb: RGB) -> None:
        """Fill colour."""
        self.set_fill_color(self._colour(rgb, self.set_fill_color, "fill_color"))

    def _colour(self, rgb: RGB, setter: Any, attr: str) -> Any:
        """fpdf2's colour for ``rgb``, made by fpdf2 the first time it is asked for."""
        got = self._colours.get(rgb)
        if got is None:
            setter(*rgb)
            got = self._colours[rgb] = getattr(self, attr)
        return got

    @property
    def content_w(self) -> float:
        return float(self.w - self.l_margin - self.r_margin)

    @property
    def bottom(self) -> float:
        return float(self.page_break_trigger)

    def room(self, h: float) -> None:
        """Start a new page unless ``h`` mm fit below the current position."""
        if self.get_y() + h > self.bottom:
            self.add_page()

    def wrap(self, text: str, w: float, size: float, bold: bool = False) -> list[str]:
        """Greedy word wrap of ``text`` into lines no wider than ``w`` mm.

        A line break in ``text`` starts a new line.  Word widths are measured
        once per word and style (fpdf2's own line breaking re-measures each
        line character by character, which is slow for long documents).
        """
        wkey = (text, w, size, bold)
        got = self._wrapped.get(wkey)
        if got is None:
            if "\n" in text:
                got = [ln for part in text.split("\n") for ln in self.wrap(part, w, size, bold)]
            else:
                got = self._wrap_line(text, w, size, "B" if bold else "")
            self._wrapped[wkey] = got
        return list(got)

    def _wrap_line(self, text: str, w: float, size: float, key: str) -> list[str]:
        space = self._word_w(key, " ") * size
        lines: list[str] = []
        cur: list[str] = []
        cur_w = 0.0
        for word in text.split(" "):
            if not word:
                continue
            ww = self._word_w(key, word) * size
            if ww > w:  # a word longer than the line: break it by characters
                if cur:
                    lines.append(" ".join(cur))
                    cur, cur_w = [], 0.0
                piece = ""
                for ch in word:
                    if piece and self._word_w(key, piece + ch) * size > w:
                        lines.append(piece)
                        piece = ""
                    piece += ch
                cur, cur_w = [piece], self._word_w(key, piece) * size
                continue
            extra = ww if not cur else space + ww
            if cur and cur_w + extra > w:
                lines.append(" ".join(cur))
                cur, cur_w = [word], ww
            else:
                cur.append(word)
                cur_w += extra
        if cur:
            lines.append(" ".join(cur))
        return lines or [""]

    def _word_w(self, style: str, word: str) -> float:
        """Width of ``word`` at 1 pt in the given style, as fpdf2 measures it. [mm]"""
        k = (style, word)
        got = self._widths.get(k)
        if got is None:
            font: Any = self.fonts[FAMILY + style]  # the bundled TrueType font
            shown = self._shown.get((font.fontkey, word))
            if shown is None:
                was = self.current_font
                self.current_font = font
                shown = self.normalize_text(word)
                self.current_font = was
            got = sum(font.cw[ord(c)] for c in shown) * 0.001 / self.k
            self._widths[k] = got
        return got

    def text_w(self, text: str) -> float:
        """Width of ``text`` in the current font and size. [mm]"""
        return self._word_w(self.font_style, text) * self.font_size_pt

    def text_line(
        self,
        x: float,
        y: float,
        w: float,
        h: float,
        text: str,
        align: str = "L",
        inset: float | None = None,
    ) -> None:
        """One line of ``text`` in the box at (``x``, ``y``), ``w`` × ``h`` mm, placed as
        fpdf2's ``cell`` places it (``c_margin`` inside the edge, centred on the box's
        middle line; ``inset`` in place of ``c_margin`` for a left-aligned line);
        leaves the position at the box's right edge.

        Measured with the cached widths and set with ``text``: ``cell`` builds
        styled fragments and copies the graphics state on every call, several
        times the work for the same marks on the page.
        """
        if text:
            if align == "L":
                dx = self.c_margin if inset is None else inset
            else:
                tw = self.text_w(text)
                dx = w - self.c_margin - tw if align == "R" else (w - tw) / 2
            self.text(x + dx, y + 0.5 * h + 0.3 * self.font_size, text)
        self.x, self.y = x + w, y

    def para_h(self, w: float, lh: float, text: str, size: float, bold: bool = False) -> float:
        return lh * len(self.wrap(text, w - 2 * self.c_margin, size, bold))

    def para(
        self,
        x: float,
        w: float,
        lh: float,
        text: str,
        size: float,
        bold: bool = False,
        rgb: RGB = INK,
        align: str = "L",
    ) -> float:
        """Write wrapped text at (x, current y); return its height."""
        lines = self.wrap(text, w - 2 * self.c_margin, size, bold)
        self.font(size, bold)
        self.ink(rgb)
        y = self.get_y()
        for line in lines:
            if y + lh > self.bottom and self.auto_page_break:
                self.add_page()
                self.font(size, bold)
                self.ink(rgb)
                y = self.t_margin
            self.text_line(x, y, w, lh, line, align)
            y += lh
        self.set_xy(self.l_margin, y)
        return lh * len(lines)

    # page furniture ------------------------------------------------------------
    def stamp_pages(self) -> None:
        """Draw header and footer on every page, now that the page count is known.

        First, after the content, the note listing any character printed as a
        stand-in (the header and footer texts are checked for them too).
        """
        self.font(8)
        for text in (self.heading.site_name, self.heading.statement, self.heading.generated_line()):
            self.get_string_width(text)
        self.font(8, True)
        self.get_string_width(self.heading.title)
        note = self.missing_glyphs_note()
        if note:
            self.room(self.para_h(self.content_w, 4, note, 8) + 3)
            self.ln(2)
            self.para(self.l_margin, self.content_w, 4, note, 8, False, MUTED)
        total = self.pages_count
        self.set_auto_page_break(False)
        h = self.heading
        for n in range(1, total + 1):
            self.page = n
            # The page's content may end with any fill colour, and fpdf2 leaves a text
            # colour out when it equals the fill colour it last set: set the fill on
            # this page so the header and footer texts get their own colours.
            self.set_fill_color(255, 255, 255)
            left, right = self.l_margin, self.w - self.r_margin
            self.pen(ACCENT)
            self.set_line_width(0.6)
            self.line(left, 12.5, left + 18, 12.5)
            self.pen(RULE)
            self.set_line_width(0.2)
            self.line(left + 18, 12.5, right, 12.5)
            self.font(8, True)
            self.ink(ACCENT)
            self.text_line(left, 7, self.content_w, 4.5, f"tripwise · {h.title}")
            self.font(8)
            self.ink(MUTED)
            visit = f" · visit {h.visit_date}" if h.visit_date else ""
            if h.later_visit_id is not None:
                visit += f" (a later visit {h.later_visit_id} exists)"
            self.text_line(left, 7, self.content_w, 4.5, f"{h.site_name}{visit}", "R")
            # footer
            top = self.h - FOOT_H + 2
            self.line(left, top, right, top)
            self.set_y(top + 1.6)
            self.para(left, self.content_w - 30, 3.4, h.statement, 7.2, True)
            self.font(7)
            self.ink(MUTED)
            self.text_line(left, self.get_y(), self.content_w - 30, 3.6, h.generated_line())
            self.font(8.5, True)
            self.ink(INK)
            self.text_line(right - 30, top + 1.6, 30, 4, f"page {n} of {total}", "R")
        self.page = total

    def title_block(self, h: Heading, lead: str) -> None:
        self.set_y(self.t_margin + 1)
        self.para(self.l_margin, self.content_w, 9, h.title, 20, True, INK)
        self.para(self.l_margin, self.content_w, 6, h.site_name, 12.5, True, ACCENT)
        if h.visit_note():
            self.ln(0.8)
            self.para(self.l_margin, self.content_w, 4.6, h.visit_note(), 9.4, True, EARLIER)
        self.ln(1.5)
        facts = [(k, v) for k, v in h.facts() if k != "Site"]
        col_w = self.content_w / 2
        key_w = 22.0
        y0 = self.get_y()
        half = (len(facts) + 1) // 2
        heights = [0.0, 0.0]
        for ci, chunk in enumerate((facts[:half], facts[half:])):
            self.set_y(y0)
            x = self.l_margin + ci * col_w
            for k, v in chunk:
                y = self.get_y()
                self.font(8)
                self.ink(MUTED)
                self.text_line(x, y, key_w, 4.6, k)
                hv = self.para(x + key_w, col_w - key_w - 3, 4.6, v, 8.8)
                self.set_y(y + max(hv, 4.6))
            heights[ci] = self.get_y() - y0
        self.set_y(y0 + max(heights) + 2)
        if lead:
            self.para(self.l_margin, self.content_w, 4.4, lead, 8.4, False, MUTED)
            self.ln(1)


def glyph_stand_in(char: str) -> str:
    """What is printed for a character the font cannot show: its code point."""
    return f"[U+{ord(char):04X}]"


def accent_panel(pdf: ReportPdf, x: float, y: float, w: float, h: float) -> None:
    """A shaded box with an accent edge at the left, for the text set in it next."""
    pdf.set_fill_color(*PANEL)
    pdf.rect(x, y, w, h, style="F")
    pdf.set_fill_color(*ACCENT)
    pdf.rect(x, y, 1.4, h, style="F")
    pdf.set_fill_color(*PANEL)  # text set in the fill colour prints in the page's last one


def caution_box(pdf: ReportPdf, caution: str) -> None:
    """The caution of the analysis, boxed, after the last item or row."""
    h = pdf.para_h(pdf.content_w - 8, 4.2, caution, 8.4) + 6
    pdf.room(h + 4)
    y = pdf.get_y() + 3
    pdf.pen(ACCENT)
    pdf.set_line_width(0.4)
    pdf.rect(pdf.l_margin, y, pdf.content_w, h)
    pdf.set_y(y + 3)
    pdf.para(pdf.l_margin + 4, pdf.content_w - 8, 4.2, caution, 8.4)
    pdf.set_y(y + h + 2)
