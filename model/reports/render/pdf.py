"""PDF renderings of the remedial-work list and the test sheet (fpdf2).

Text is set in the bundled DejaVu Sans (it covers Ω, Δ, µ, °, ×, ½ and ‑,
which the PDF core fonts do not).  Text is never read as markup, and control
characters are removed before it reaches the page (``model.reports.text.clean``).
Every page carries, in its header and footer, the document title and site,
the not-a-certificate statement, the page number of the whole, and the
generation time and tripwise version.  The pair charts are drawn with the
PDF's own lines and shapes on log-log axes.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from pathlib import Path

from fpdf import FPDF

from model.reports.heading import Heading
from model.reports.remedial import PairChart, RemedialDoc, RemedialItem
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
from model.rules.findings import fmt_ma

FONT_DIR = Path(__file__).with_name("fonts")
FAMILY = "tw-sans"

RGB = tuple[int, int, int]
INK: RGB = (34, 38, 46)
MUTED: RGB = (108, 116, 128)
RULE: RGB = (205, 211, 218)
PANEL: RGB = (243, 245, 247)
ACCENT: RGB = (0, 102, 110)
UP_COLOUR: RGB = (31, 94, 170)
DOWN_COLOUR: RGB = (214, 120, 18)
CLASH: RGB = (250, 222, 222)
CLASH_STRONG: RGB = (236, 120, 120)
CLASH_EDGE: RGB = (176, 36, 36)
SEVERITY_COLOUR: dict[str, RGB] = {
    "urgent": (180, 28, 40),
    "required": (200, 96, 0),
    "advisory": (36, 92, 160),
    "investigate": (104, 76, 148),
}
MARK_PDF = {MARK_PASS: "✓", MARK_OUT: "✗", MARK_NOT_JUDGED: "~", MARK_FAIL: "✗", "": ""}

HEAD_H = 18.0
FOOT_H = 22.0


class _Pdf(FPDF):
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
        self._widths: dict[tuple[str, str], float] = {}
        self.font(9)
        self.ink()

    # small helpers -------------------------------------------------------------
    def font(self, size: float, bold: bool = False) -> None:
        self.set_font(FAMILY, "B" if bold else "", size)

    def ink(self, rgb: RGB = INK) -> None:
        self.set_text_color(*rgb)

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

        Word widths are measured once per word and style (fpdf2's own line
        breaking re-measures each line character by character, which is slow
        for long documents).
        """
        key = "B" if bold else ""
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
        """Width of ``word`` at 1 pt in the given style. [mm]"""
        k = (style, word)
        got = self._widths.get(k)
        if got is None:
            self.set_font(FAMILY, style, 10)
            got = float(self.get_string_width(word)) / 10.0
            self._widths[k] = got
        return got

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
            self.set_xy(x, y)
            self.cell(w, lh, line, align=align)
            y += lh
        self.set_xy(self.l_margin, y)
        return lh * len(lines)

    # page furniture ------------------------------------------------------------
    def stamp_pages(self) -> None:
        """Draw header and footer on every page, now that the page count is known."""
        total = self.pages_count
        self.set_auto_page_break(False)
        h = self.heading
        for n in range(1, total + 1):
            self.page = n
            left, right = self.l_margin, self.w - self.r_margin
            self.set_draw_color(*ACCENT)
            self.set_line_width(0.6)
            self.line(left, 12.5, left + 18, 12.5)
            self.set_draw_color(*RULE)
            self.set_line_width(0.2)
            self.line(left + 18, 12.5, right, 12.5)
            self.set_xy(left, 7)
            self.font(8, True)
            self.ink(ACCENT)
            self.cell(0, 4.5, f"tripwise · {h.title}")
            self.font(8)
            self.ink(MUTED)
            self.set_xy(left, 7)
            visit = f" · visit {h.visit_date}" if h.visit_date else ""
            self.cell(self.content_w, 4.5, f"{h.site_name}{visit}", align="R")
            # footer
            top = self.h - FOOT_H + 2
            self.line(left, top, right, top)
            self.set_y(top + 1.6)
            self.para(left, self.content_w - 30, 3.4, h.statement, 7.2, True)
            self.font(7)
            self.ink(MUTED)
            self.set_x(left)
            self.cell(self.content_w - 30, 3.6, h.generated_line())
            self.font(8.5, True)
            self.ink(INK)
            self.set_xy(right - 30, top + 1.6)
            self.cell(30, 4, f"page {n} of {total}", align="R")
        self.page = total

    def title_block(self, h: Heading, lead: str) -> None:
        self.set_y(self.t_margin + 1)
        self.para(self.l_margin, self.content_w, 9, h.title, 20, True, INK)
        self.para(self.l_margin, self.content_w, 6, h.site_name, 12.5, True, ACCENT)
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
                self.set_xy(x, y)
                self.cell(key_w, 4.6, k)
                hv = self.para(x + key_w, col_w - key_w - 3, 4.6, v, 8.8)
                self.set_y(y + max(hv, 4.6))
            heights[ci] = self.get_y() - y0
        self.set_y(y0 + max(heights) + 2)
        if lead:
            self.para(self.l_margin, self.content_w, 4.4, lead, 8.4, False, MUTED)
            self.ln(1)


# --------------------------------------------------------------------------- remedial list


LABEL_W = 20.0


def _item_rows(i: RemedialItem) -> list[tuple[str, str, bool]]:
    rows: list[tuple[str, str, bool]] = [("Wrong", i.message, False)]
    if i.measured or i.band:
        rows.append(("Measured", i.measured or "—", False))
        rows.append(("Band", i.band or "—", False))
    rows.append(("To do", i.action, True))
    rows.append(("Rests on", i.source_text(), False))
    if i.charts:
        rows.append(("Chart", f"{i.charts_text()} (end of this document)", False))
    return rows


def _draw_item(pdf: _Pdf, i: RemedialItem, draw: bool) -> float:
    """Lay out one item; with ``draw`` False only measure it.  Returns its height."""
    x0 = pdf.l_margin + 4.5
    w = pdf.content_w - 4.5
    lh = 4.3
    h = 6.2
    node_lines: list[tuple[str, str]] = list(zip(i.node_labels, i.where, strict=True))
    for label, where in node_lines:
        h += pdf.para_h(w, lh, label, 9.2, True)
        h += pdf.para_h(w, lh - 0.4, where, 7.8)
    h += 1.2
    for _, text, bold in _item_rows(i):
        h += pdf.para_h(w - LABEL_W, lh, text, 8.6, bold) + 0.5
    h += 12.5
    if not draw:
        return h
    y0 = pdf.get_y()
    page = pdf.page
    colour = SEVERITY_COLOUR.get(i.severity, MUTED)
    pdf.set_xy(x0, y0)
    pdf.font(10, True)
    pdf.ink(INK)
    num = f"{i.number}."
    pdf.cell(pdf.get_string_width(num) + 2, 5.5, num)
    pdf.font(8.6, True)
    pdf.ink(colour)
    pdf.cell(pdf.get_string_width(i.severity.upper()) + 3, 5.5, i.severity.upper())
    pdf.font(7.6)
    pdf.ink(MUTED)
    pdf.cell(0, 5.5, i.rule, align="R")
    pdf.set_y(y0 + 6.2)
    for label, where in node_lines:
        pdf.para(x0, w, lh, label, 9.2, True)
        pdf.para(x0, w, lh - 0.4, where, 7.8, False, MUTED)
    pdf.set_y(pdf.get_y() + 1.2)
    for name, text, bold in _item_rows(i):
        y = pdf.get_y()
        pdf.set_xy(x0, y)
        pdf.font(7.6)
        pdf.ink(MUTED)
        pdf.cell(LABEL_W, lh, name)
        pdf.para(x0 + LABEL_W, w - LABEL_W, lh, text, 8.6, bold)
        pdf.set_y(pdf.get_y() + 0.5)
    # the box to tick and the line for notes
    y = pdf.get_y() + 2.0
    pdf.set_draw_color(*INK)
    pdf.set_line_width(0.3)
    pdf.rect(x0, y, 3.8, 3.8)
    pdf.set_xy(x0 + 5.2, y - 0.2)
    pdf.font(8)
    pdf.ink(INK)
    pdf.cell(12, 4.2, "done")
    pdf.font(7.6)
    pdf.ink(MUTED)
    pdf.cell(11, 4.2, "notes")
    pdf.set_draw_color(*RULE)
    pdf.set_line_width(0.25)
    pdf.line(x0 + 28, y + 3.8, pdf.w - pdf.r_margin, y + 3.8)
    pdf.line(x0 + 28, y + 9.0, pdf.w - pdf.r_margin, y + 9.0)
    if pdf.page == page:  # the item fitted on its page (it always does unless huge)
        pdf.set_fill_color(*colour)
        pdf.rect(pdf.l_margin, y0 + 0.5, 1.6, h - 2.5, style="F")
        pdf.set_y(y0 + h)
    return h


def _summary(pdf: _Pdf, counts: dict[str, int]) -> None:
    pdf.room(22)
    y = pdf.get_y() + 1
    gap = 3.0
    tile_w = (pdf.content_w - 3 * gap) / 4
    for n, (sev, count) in enumerate(counts.items()):
        x = pdf.l_margin + n * (tile_w + gap)
        colour = SEVERITY_COLOUR.get(sev, MUTED)
        pdf.set_fill_color(*PANEL)
        pdf.rect(x, y, tile_w, 15, style="F")
        pdf.set_fill_color(*colour)
        pdf.rect(x, y, tile_w, 1.2, style="F")
        pdf.set_xy(x + 3, y + 2.6)
        pdf.font(15, True)
        pdf.ink(colour if count else MUTED)
        pdf.cell(tile_w - 6, 7, str(count))
        pdf.set_xy(x + 3, y + 9.4)
        pdf.font(8)
        pdf.ink(INK)
        pdf.cell(tile_w - 6, 4, sev)
    pdf.set_y(y + 19)


def _board_heading(pdf: _Pdf, label: str, place: str) -> None:
    pdf.room(26)
    y = pdf.get_y() + 1.5
    pdf.set_fill_color(*PANEL)
    pdf.rect(pdf.l_margin, y, pdf.content_w, 7.5, style="F")
    pdf.set_xy(pdf.l_margin + 2.5, y + 1.3)
    pdf.font(10.5, True)
    pdf.ink(INK)
    lw = min(pdf.get_string_width(label) + 3, pdf.content_w * 0.6)
    pdf.cell(lw, 5, label)
    if place:
        pdf.font(8.4)
        pdf.ink(MUTED)
        pdf.cell(pdf.content_w - lw - 5, 5, place)
    pdf.set_y(y + 10)


def remedial_pdf(doc: RemedialDoc) -> bytes:
    pdf = _Pdf(doc.heading, "portrait")
    pdf.add_page()
    total = sum(doc.counts.values())
    lead = (
        f"{total} item(s) below, grouped by board and worst first. Tick each one when the work "
        "is done and note what was found. Items that rest on common practice or guidance are "
        "advice, not requirements."
        if total
        else "No work arises from the checks made on this visit."
    )
    pdf.title_block(doc.heading, lead)
    _summary(pdf, doc.counts)
    for g in doc.groups:
        _board_heading(pdf, g.label, g.place)
        for i in g.items:
            h = _draw_item(pdf, i, draw=False)
            if pdf.get_y() + h > pdf.bottom:
                pdf.add_page()
            _draw_item(pdf, i, draw=True)
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
    _caution(pdf, doc.caution)
    pdf.stamp_pages()
    return bytes(pdf.output())


def _caution(pdf: _Pdf, caution: str) -> None:
    h = pdf.para_h(pdf.content_w - 8, 4.2, caution, 8.4) + 6
    pdf.room(h + 4)
    y = pdf.get_y() + 3
    pdf.set_draw_color(*ACCENT)
    pdf.set_line_width(0.4)
    pdf.rect(pdf.l_margin, y, pdf.content_w, h)
    pdf.set_y(y + 3)
    pdf.para(pdf.l_margin + 4, pdf.content_w - 8, 4.2, caution, 8.4)
    pdf.set_y(y + h + 2)


# --------------------------------------------------------------------------- pair chart


CHART_PLOT_H = 62.0
CHART_BLOCK_H = 108.0


def _log_ticks(lo: float, hi: float) -> list[tuple[float, bool]]:
    """(value, is_decade) for 1-2-5 ticks between lo and hi."""
    out: list[tuple[float, bool]] = []
    k = math.floor(math.log10(lo))
    while 10**k <= hi * 1.0001:
        for m in (1, 2, 5):
            v = m * 10**k
            if lo * 0.9999 <= v <= hi * 1.0001:
                out.append((float(v), m == 1))
        k += 1
    return out


def _fmt_current(v_ma: float) -> str:
    return f"{v_ma / 1000:.3g} A" if v_ma >= 1000 else f"{v_ma:.3g} mA"


def _fmt_ms(v: float) -> str:
    return f"{v / 1000:g} s" if v >= 1000 else f"{v:g} ms"


def draw_chart(pdf: _Pdf, c: PairChart, x: float, y: float, width: float) -> None:
    """One pair chart: title, log-log plot of both bands with readings, legend."""
    pdf.set_y(y)
    pdf.para(x, width, 5, f"Pair chart {c.number}: {c.up_label} above {c.down_label}", 10.5, True)
    expl = c.explanation[:1].upper() + c.explanation[1:]
    pdf.para(x, width, 3.9, expl + ".", 7.8, False, MUTED)
    top = pdf.get_y() + 5.5
    px, pw = x + 16, width - 20
    py, ph = top, CHART_PLOT_H
    cur = list(c.currents_ma)
    xmin, xmax = cur[0], cur[-1]
    finite_t = [
        t
        for arr in (c.up_min_ms, c.up_max_ms, c.down_min_ms, c.down_max_ms)
        for t in arr
        if math.isfinite(t) and t > 0
    ]
    pts_t = [p.time_ms for p in c.points if p.time_ms is not None]
    ymin = min([5.0, *[t / 1.6 for t in pts_t]])
    ymax = max([1000.0, *[t * 1.6 for t in finite_t + pts_t]])
    lx0, lx1 = math.log10(xmin), math.log10(xmax)
    ly0, ly1 = math.log10(ymin), math.log10(ymax)

    def fx(v: float) -> float:
        return px + pw * (math.log10(v) - lx0) / (lx1 - lx0)

    def fy(t: float) -> float:
        t = min(max(t, ymin), ymax)
        return py + ph - ph * (math.log10(t) - ly0) / (ly1 - ly0)

    # grid
    pdf.set_line_width(0.15)
    pdf.font(6.4)
    pdf.ink(MUTED)
    for v, major in _log_ticks(xmin, xmax):
        pdf.set_draw_color(*((214, 219, 224) if major else (236, 239, 242)))
        pdf.line(fx(v), py, fx(v), py + ph)
        if major or (lx1 - lx0) < 2.5:
            pdf.set_xy(fx(v) - 8, py + ph + 0.8)
            pdf.cell(16, 3, fmt_ma(v), align="C")
    for t, major in _log_ticks(ymin, ymax):
        pdf.set_draw_color(*((214, 219, 224) if major else (236, 239, 242)))
        pdf.line(px, fy(t), px + pw, fy(t))
        pdf.set_xy(px - 15.5, fy(t) - 1.5)
        pdf.cell(15, 3, _fmt_ms(t), align="R")
    _band(pdf, cur, c.down_min_ms, c.down_max_ms, DOWN_COLOUR, fx, fy, ymin, ymax)
    _band(pdf, cur, c.up_min_ms, c.up_max_ms, UP_COLOUR, fx, fy, ymin, ymax)
    # non-selective ranges, over the bands
    for r in c.ranges:
        a, b = max(r.lo_ma, xmin), min(r.hi_ma, xmax)
        if b > a:
            with pdf.local_context(fill_opacity=0.45):
                pdf.set_fill_color(*CLASH_STRONG)
                pdf.rect(fx(a), py, max(fx(b) - fx(a), 0.3), ph, style="F")
            pdf.set_draw_color(*CLASH_EDGE)
            pdf.set_line_width(0.3)
            pdf.line(fx(a), py, fx(a), py + ph)
            pdf.line(fx(b), py, fx(b), py + ph)
            pdf.set_xy(fx(a) + 0.5, py + ph - 4)
            pdf.font(6)
            pdf.ink(CLASH_EDGE)
            pdf.cell(max(fx(b) - fx(a), 12), 3, "both may trip")
    # readings
    for p in c.points:
        colour = UP_COLOUR if p.device == "up" else DOWN_COLOUR
        if not (xmin <= p.current_ma <= xmax):
            continue
        cx = fx(p.current_ma)
        pdf.set_fill_color(*colour)
        pdf.set_draw_color(*INK)
        pdf.set_line_width(0.25)
        if p.did_not_trip:
            tip = py + 0.8
            pdf.polygon([(cx, tip), (cx - 1.4, tip + 2.4), (cx + 1.4, tip + 2.4)], style="DF")
        elif p.device == "up":
            cy = fy(p.time_ms or ymin)
            pdf.rect(cx - 1.05, cy - 1.05, 2.1, 2.1, style="DF")
        else:
            cy = fy(p.time_ms or ymin)
            pdf.polygon(
                [(cx, cy - 1.4), (cx + 1.4, cy), (cx, cy + 1.4), (cx - 1.4, cy)], style="DF"
            )
    # frame and axis names
    pdf.set_draw_color(*MUTED)
    pdf.set_line_width(0.3)
    pdf.rect(px, py, pw, ph)
    pdf.font(6.8)
    pdf.ink(MUTED)
    pdf.set_xy(px, py + ph + 4.2)
    pdf.cell(pw, 3, "residual current", align="C")
    pdf.set_xy(x, py - 5.2)
    pdf.cell(15.5, 3, "time", align="R")
    # legend
    ly = py + ph + 8.5
    _legend(pdf, x, ly, UP_COLOUR, "upstream", f"{c.up_label} ({c.up_text}); square: reading")
    _legend(
        pdf,
        x,
        ly + 4.2,
        DOWN_COLOUR,
        "downstream",
        f"{c.down_label} ({c.down_text}); diamond: reading",
    )
    _legend(
        pdf,
        x,
        ly + 8.4,
        CLASH_STRONG,
        "both may trip",
        f"selectivity not guaranteed; triangle at the top: did not trip; faults up to "
        f"{_fmt_current(c.i_max_ma)}",
    )
    pdf.set_y(ly + 15)


def _legend(pdf: _Pdf, x: float, y: float, rgb: RGB, name: str, text: str) -> None:
    pdf.set_fill_color(*rgb)
    pdf.rect(x + 16, y + 0.6, 4, 2.4, style="F")
    pdf.set_xy(x + 21.5, y)
    pdf.font(7.2, True)
    pdf.ink(INK)
    pdf.cell(23, 3.6, name)
    pdf.font(7.2)
    pdf.ink(MUTED)
    pdf.cell(pdf.w - pdf.r_margin - x - 45, 3.6, text)


def _band(
    pdf: _Pdf,
    cur: Sequence[float],
    mins: Sequence[float],
    maxs: Sequence[float],
    rgb: RGB,
    fx: object,
    fy: object,
    ymin: float,
    ymax: float,
) -> None:
    """Shade one device's band and draw its edges (solid: max break; dashed: min hold)."""
    assert callable(fx) and callable(fy)
    can = [math.isfinite(m) for m in mins]
    runs: list[list[int]] = []
    for k, ok in enumerate(can):
        if ok:
            if runs and runs[-1][-1] == k - 1:
                runs[-1].append(k)
            else:
                runs.append([k])
    for run in runs:
        upper = [(fx(cur[k]), fy(maxs[k] if math.isfinite(maxs[k]) else ymax)) for k in run]
        lower = [(fx(cur[k]), fy(max(mins[k], ymin))) for k in reversed(run)]
        with pdf.local_context(fill_opacity=0.22):
            pdf.set_fill_color(*rgb)
            pdf.polygon(upper + lower, style="F")
        pdf.set_draw_color(*rgb)
        pdf.set_line_width(0.55)
        seg: list[tuple[float, float]] = []
        for k in run:
            if math.isfinite(maxs[k]):
                seg.append((fx(cur[k]), fy(maxs[k])))
            elif seg:
                pdf.polyline(seg)
                seg = []
        if len(seg) > 1:
            pdf.polyline(seg)
        hold = [(fx(cur[k]), fy(mins[k])) for k in run if mins[k] > ymin]
        if len(hold) > 1:
            pdf.set_line_width(0.35)
            pdf.set_dash_pattern(dash=1.2, gap=0.9)
            pdf.polyline(hold)
            pdf.set_dash_pattern()


# --------------------------------------------------------------------------- test sheet


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


def _sheet_header(pdf: _Pdf, doc: SheetDoc, note_w: float) -> None:
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


def _test_cell(pdf: _Pdf, c: SheetCell, x: float, y: float, w: float, unit: str) -> None:
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


def _sheet_row(pdf: _Pdf, r: SheetRow, note_w: float, shade: bool, draw: bool) -> float:
    texts = [r.label, r.board, r.type_text]
    widths = [w for _, w in SHEET_COLS]
    hs = [pdf.para_h(widths[0] - 1.2, LH, r.label, 7.4, True) + LH]
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
    pdf.para(x + 0.6, widths[0] - 1.2, LH, r.label, 7.4, True)
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
    pdf = _Pdf(doc.heading, "landscape")
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
    _caution(pdf, doc.caution)
    pdf.stamp_pages()
    return bytes(pdf.output())
