"""Markdown renderings of the remedial-work list and the test sheet.

All text that comes from the site file (labels, places, notes, and the
finding texts that quote labels) is escaped, so a label such as
``<b>*x*</b>`` prints as those characters and never becomes markup.
"""

from __future__ import annotations

import re

from model.reports.heading import Heading
from model.reports.plan_part import REMAINING_TITLE, PlanPart
from model.reports.remedial import CHECK_IDS_TITLE, RemedialDoc
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

_SPECIAL = re.compile(r"([\\`*_\[\]<>|~#&!{}$])")


def esc(text: object) -> str:
    """Text with every character that Markdown could read as markup escaped."""
    return _SPECIAL.sub(r"\\\1", clean(text))


MARK_SIGN = {
    MARK_PASS: "✓",
    MARK_OUT: "✗ out of band",
    MARK_NOT_JUDGED: "(not judged)",
    MARK_FAIL: "✗ failed",
    "": "",
}


def _top(h: Heading) -> list[str]:
    return [
        f"> **{esc(h.statement)}**",
        ">",
        f"> {esc(h.generated_line())}",
        "",
        f"# {esc(h.title)}: {esc(h.site_name)}",
        "",
        *([f"**{esc(h.visit_note())}**", ""] if h.visit_note() else []),
        *[f"- **{esc(k)}:** {esc(v)}" for k, v in h.facts()],
        "",
    ]


def _bottom(h: Heading, caution: str) -> list[str]:
    return [
        "",
        "---",
        "",
        f"*{esc(caution)}*",
        "",
        f"**{esc(h.statement)}** {esc(h.generated_line())}",
        "",
    ]


def remedial_md(doc: RemedialDoc) -> bytes:
    h = doc.heading
    lines = _top(h)
    total = sum(doc.counts.values())
    summary = " · ".join(f"{n} {s}" for s, n in doc.counts.items())
    lines += [f"**{total} item(s) to act on:** {summary}", ""]
    if doc.plan is not None:
        lines += [esc(doc.plan.summary(total)), ""]
    if not total:
        lines += ["No work arises from the checks made on this visit.", ""]
    for g in doc.groups:
        place = f" ({esc(g.place)})" if g.place else ""
        lines += [f"## {esc(g.label)}{place}", ""]
        for i in g.items:
            lines += [f"### {i.number}. {i.severity.upper()}", ""]
            for label, where in zip(i.named_nodes, i.where, strict=True):
                lines.append(f"- **{esc(label)}**: {esc(where)}")
            for name, text, _ in i.rows("in the PDF"):
                lines.append(f"- **{esc(name)}:** {esc(text)}")
            lines += ["- [ ] Done. Notes: ______________________________________", ""]
    if doc.plan is not None:
        lines += plan_md(doc.plan)
    if doc.charts:
        lines += ["## Series pairs", ""]
        for c in doc.charts:
            lines.append(
                f"- Chart {c.number}: **{esc(c.up_label)}** ({esc(c.up_text)}) above "
                f"**{esc(c.down_label)}** ({esc(c.down_text)}): {esc(c.pair_text())}"
            )
        lines.append("")
    if doc.items:
        lines += [f"## {esc(CHECK_IDS_TITLE)}", ""]
        lines += [f"- {i.number}. `{i.rule}`" for i in doc.items]
        lines.append("")
    lines += _bottom(h, doc.closing_caution)
    return "\n".join(lines).encode("utf-8")


def plan_md(part: PlanPart) -> list[str]:
    """The plan's part of the remedial list: changes in order, then what remains and why."""
    lines = [f"## {esc(part.title)}", "", esc(part.lead), ""]
    for s in part.steps:
        clears = f" ({esc(s.items_text())})" if s.items else ""
        lines.append(f"{s.number}. **{esc(s.text)}**{clears}")
    if part.steps:
        lines.append("")
    if part.remaining:
        lines += [f"### {esc(REMAINING_TITLE)}", ""]
        for r in part.remaining:
            which = f"{esc(r.items_text().capitalize())}: " if r.items else ""
            lines.append(f"- {which}{esc(r.message)} *Why:* {esc(r.reason)}")
        lines.append("")
    lines += [f"*{esc(part.caution)}*", ""]
    return lines


def cell_md(c: SheetCell, unit: str = "ms") -> str:
    if c.value is None:
        return "—"
    sign = MARK_SIGN.get(c.mark, c.mark)
    return f"{esc(c.value_text(unit))} {sign} ({esc(c.band)})".replace("  ", " ")


def _row_md(r: SheetRow) -> str:
    device = f"**{esc(r.named)}** `{r.device_id}`"
    head = [device, esc(r.board), esc(r.type_text)]
    if not r.recorded:
        rest = ["no reading recorded on this visit"] + [""] * 9
    elif r.not_tested is not None:
        rest = [f"not tested: {esc(r.not_tested)}"] + [""] * 8 + [esc(r.note)]
    else:
        button = "—" if r.button is None else esc(r.button)
        if r.button_mark == MARK_FAIL:
            button += " ✗"
        rest = (
            [esc(r.test_waveform or "")]
            + [cell_md(c) for c in r.tests]
            + [cell_md(r.ramp, "mA"), button, esc(r.note)]
        )
    cells = head + rest
    return "| " + " | ".join(cells) + " |"


def sheet_md(doc: SheetDoc) -> bytes:
    h = doc.heading
    lines = _top(h)
    req = ", ".join(doc.required_groups)
    lines += [
        f"One row per residual-current device, in tree order. ✓ within its band; "
        f"✗ outside it; (not judged) where the product standard allows either outcome. "
        f"Required by the rule set: {esc(req)} ({esc(doc.rules_source)}); the other tests "
        f"are recorded as common practice.",
        "",
    ]
    titles = [c.title for c in doc.rows[0].tests] if doc.rows else []
    marked = []
    for i, t in enumerate(titles):
        req_mark = " (required)" if doc.rows[0].tests[i].required else ""
        marked.append(esc(t) + req_mark)
    header = ["Device", "Board", "Type", "Test current", *marked, "Ramp", "Button", "Note"]
    if not doc.rows:
        lines += ["No residual-current devices on this site.", ""]
    else:
        lines.append("| " + " | ".join(header) + " |")
        lines.append("|" + "---|" * len(header))
        lines += [_row_md(r) for r in doc.rows]
        lines.append("")
    lines += _bottom(h, doc.caution)
    return "\n".join(lines).encode("utf-8")
