"""Markdown rendering of the coordination study and of the test sheet's loop-impedance table."""

from __future__ import annotations

from model.reports.oc_chart import OcChart
from model.reports.render.md import _bottom, _top, esc
from model.reports.study import OC_METHOD, RCD_METHOD, StudyDoc
from model.reports.zs_sheet import COLUMNS, NOTE, TITLE, ZsRow
from model.rules.findings import fmt_ma
from model.rules.overcurrent.pairs import fmt_a


def zs_table_md(rows: list[ZsRow]) -> list[str]:
    """The loop-impedance section: a heading, the note and one row per circuit."""
    if not rows:
        return []
    out = [f"## {esc(TITLE)}", "", esc(NOTE), ""]
    out.append("| " + " | ".join(esc(c) for c in COLUMNS) + " |")
    out.append("|" + "---|" * len(COLUMNS))
    out.extend("| " + " | ".join(esc(c) for c in r.cells()) + " |" for r in rows)
    out.append("")
    return out


def _oc_md(c: OcChart) -> list[str]:
    out = [
        f"### {c.number}. {esc(c.up_label)} ({esc(c.up_name)}) over "
        f"{esc(c.down_label)} ({esc(c.down_name)})",
        "",
        f"**Verdict: {esc(c.verdict)}** — {esc(c.verdict_words)}.",
        "",
        esc(c.explanation) + ".",
        "",
    ]
    facts = []
    if c.limit_a is not None:
        facts.append(f"- Selective up to: {esc(fmt_a(c.limit_a))}")
    if c.i_max_a is not None:
        facts.append(f"- Largest fault current: {esc(fmt_a(c.i_max_a))}")
    for lo, hi, kind in c.ranges:
        facts.append(f"- {esc(kind)}: {esc(fmt_a(lo))} to {esc(fmt_a(hi))}")
    out.extend(facts)
    out.extend(["", "Rests on:", ""])
    out.extend(f"- {esc(line)}" for line in [*c.data, *c.notes])
    out.append("")
    return out


def study_md(doc: StudyDoc) -> bytes:
    h = doc.heading
    lines = _top(h)
    lines += ["## Residual-current pairs", "", esc(RCD_METHOD), ""]
    if not doc.rcd:
        lines += ["No series pairs of residual-current devices.", ""]
    for s in doc.rcd:
        c = s.chart
        lines += [
            f"### {c.number}. {esc(c.up_label)} ({esc(c.up_text)}) over "
            f"{esc(c.down_label)} ({esc(c.down_text)})",
            "",
            f"**Verdict: {esc(s.verdict)}** — {esc(c.explanation)}.",
            "",
        ]
        if c.ranges:
            lines.append("- Both may trip: " + esc(c.ranges_text()))
        if c.i_max_ma is not None:
            lines.append(f"- Largest earth-fault current: {esc(fmt_ma(c.i_max_ma))}")
        lines.extend(f"- {esc(n)}" for n in c.notes)
        lines.append("")
    lines += ["## Fuse and breaker pairs", "", esc(OC_METHOD), ""]
    if not doc.oc:
        lines += ["No series pairs of overcurrent devices.", ""]
    for oc in doc.oc:
        lines += _oc_md(oc)
    lines += zs_table_md(doc.zs_rows)
    lines += _bottom(h, doc.caution)
    return "\n".join(lines).encode("utf-8")
