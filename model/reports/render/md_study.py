"""Markdown rendering of the coordination study and of the test sheet's loop-impedance table."""

from __future__ import annotations

from model.reports.charts import PairChart
from model.reports.oc_chart import OcChart
from model.reports.render.md import _bottom, _top, esc
from model.reports.study import OC_METHOD, RCD_METHOD, StudyDoc
from model.reports.study_after import (
    AFTER_LABEL,
    MADE_LEAD,
    MADE_TITLE,
    PLAN_NOTE,
    UNCHANGED,
    AfterPair,
    AfterStudy,
)
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


def _rcd_title(c: PairChart) -> str:
    return (
        f"### {c.number}. {esc(c.up_label)} ({esc(c.up_text)}) over "
        f"{esc(c.down_label)} ({esc(c.down_text)})"
    )


def _rcd_md(c: PairChart, verdict: str) -> list[str]:
    lines = [f"**Verdict: {esc(verdict)}** — {esc(c.explanation)}.", ""]
    if c.ranges:
        lines.append("- Both may trip: " + esc(c.ranges_text()))
    if c.i_max_ma is not None:
        lines.append(f"- Largest earth-fault current: {esc(fmt_ma(c.i_max_ma))}")
    lines.extend(f"- {esc(n)}" for n in c.notes)
    lines.append("")
    return lines


def _plan_intro_md(after: AfterStudy) -> list[str]:
    lines = [f"**{esc(PLAN_NOTE)}**", ""]
    lines += [f"{n}. {esc(t)}" for n, t in enumerate(after.changes, start=1)]
    return lines + [""]


def _after_md(a: AfterPair | None) -> list[str]:
    """The pair after the planned changes that touch it, under the pair as it stands."""
    if a is None:
        return []
    lines = [f"#### {esc(AFTER_LABEL)}", "", f"Change: {esc(a.changes_text)}", ""]
    if a.gone:
        return lines + [f"**Verdict after: none** — {esc(a.gone)}.", ""]
    if a.unchanged:
        return lines + [f"**Verdict after: {esc(a.verdict)}** — {esc(UNCHANGED)}.", ""]
    if a.rcd_chart is not None:
        return lines + _rcd_md(a.rcd_chart, a.verdict)
    if a.oc_chart is not None:
        return lines + _oc_md(a.oc_chart)[2:]
    return lines


def study_md(doc: StudyDoc) -> bytes:
    h = doc.heading
    lines = _top(h)
    lines += ["## Residual-current pairs", "", esc(RCD_METHOD), ""]
    if not doc.rcd:
        lines += ["No series pairs of residual-current devices.", ""]
    if doc.after is not None:
        lines += _plan_intro_md(doc.after)
    for s in doc.rcd:
        c = s.chart
        lines += [_rcd_title(c), "", *_rcd_md(c, s.verdict)]
        lines += _after_md(doc.after_of(c.up_id, c.down_id))
    lines += ["## Fuse and breaker pairs", "", esc(OC_METHOD), ""]
    if not doc.oc:
        lines += ["No series pairs of overcurrent devices.", ""]
    for oc in doc.oc:
        lines += _oc_md(oc)
        lines += _after_md(doc.after_of(oc.up_id, oc.down_id))
    if doc.after is not None and doc.after.made:
        lines += [f"## {esc(MADE_TITLE)}", "", esc(MADE_LEAD), ""]
        for a in doc.after.made:
            if a.rcd_chart is not None:
                lines += [_rcd_title(a.rcd_chart), "", f"Made by: {esc(a.changes_text)}", ""]
                lines += _rcd_md(a.rcd_chart, a.verdict)
            elif a.oc_chart is not None:
                oc_lines = _oc_md(a.oc_chart)
                lines += [*oc_lines[:2], f"Made by: {esc(a.changes_text)}", "", *oc_lines[2:]]
    lines += zs_table_md(doc.zs_rows)
    lines += _bottom(h, doc.closing_caution)
    return "\n".join(lines).encode("utf-8")
