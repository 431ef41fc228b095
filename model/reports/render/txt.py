"""Plain-text renderings of the remedial-work list and the test sheet (UTF-8, 100 columns)."""

from __future__ import annotations

import textwrap

from model.reports.heading import Heading
from model.reports.plan_part import REMAINING_TITLE, PlanPart
from model.reports.remedial import CHECK_IDS_TITLE, RemedialDoc
from model.reports.sheet import MARK_FAIL, MARK_NOT_JUDGED, MARK_OUT, MARK_PASS, SheetCell, SheetDoc
from model.reports.text import clean, with_way
from model.reports.zs_sheet import NOTE as ZS_NOTE
from model.reports.zs_sheet import TITLE as ZS_TITLE

WIDTH = 100
_IND = " " * 17
MARK_TXT = {MARK_PASS: "ok", MARK_OUT: "OUT", MARK_NOT_JUDGED: "n/j", MARK_FAIL: "FAIL", "": ""}


def _wrap(text: str, indent: str = "", first: str | None = None) -> list[str]:
    w = textwrap.TextWrapper(
        width=WIDTH,
        initial_indent=indent if first is None else first,
        subsequent_indent=indent,
        break_on_hyphens=False,
    )
    return w.wrap(clean(text)) or [indent]


def _top(h: Heading) -> list[str]:
    rule = "=" * WIDTH
    lines = [rule, *_wrap(h.statement), h.generated_line(), rule, "", h.title.upper(), ""]
    if h.visit_note():
        lines += [*_wrap(h.visit_note()), ""]
    width = max(len(k) for k, _ in h.facts())
    for k, v in h.facts():
        lines += _wrap(v, " " * (width + 2), f"{k:<{width}}  ")
    return lines + [""]


def _bottom(h: Heading, caution: str) -> list[str]:
    rule = "=" * WIDTH
    return [
        "",
        *_wrap("Caution: " + caution),
        "",
        rule,
        *_wrap(h.statement),
        h.generated_line(),
        rule,
    ]


def remedial_txt(doc: RemedialDoc) -> bytes:
    h = doc.heading
    lines = _top(h)
    total = sum(doc.counts.values())
    lines.append(f"{total} item(s): " + ", ".join(f"{n} {s}" for s, n in doc.counts.items()))
    if doc.plan is not None:
        lines += _wrap(doc.plan.summary(total))
    if not total:
        lines.append("No work arises from the checks made on this visit.")
    for g in doc.groups:
        title = g.label + (f" ({g.place})" if g.place else "")
        lines += ["", *_wrap(title), "-" * min(WIDTH, len(title))]
        for i in g.items:
            lines += ["", f"[ ] {i.number}. {i.severity.upper()}"]
            for label, where in zip(i.named_nodes, i.where, strict=True):
                lines += _wrap(f"{label}: {where}", "      ")
            for name, text, _ in i.rows("in the PDF"):
                lines += _wrap(text, _IND, f"      {name + ':':<10} ")
            lines.append("      Notes: " + "_" * 60)
    if doc.plan is not None:
        lines += _plan_txt(doc.plan)
    if doc.charts:
        lines += ["", "Series pairs", "------------"]
        for c in doc.charts:
            lines += _wrap(
                f"Chart {c.number}: {c.up_label} ({c.up_text}) above {c.down_label} "
                f"({c.down_text}): {c.pair_text()}",
                "  ",
                "- ",
            )
    if doc.items:
        lines += ["", CHECK_IDS_TITLE, "-" * min(WIDTH, len(CHECK_IDS_TITLE))]
        lines += [f"{i.number:>4}  {i.rule}" for i in doc.items]
    lines += _bottom(h, doc.closing_caution)
    return ("\n".join(lines) + "\n").encode("utf-8")


def _plan_txt(part: PlanPart) -> list[str]:
    """The plan's part: changes in order, then what remains and why, then its caution."""
    lines = ["", part.title.upper(), "-" * len(part.title), *_wrap(part.lead)]
    for s in part.steps:
        clears = f" ({s.items_text()})" if s.items else ""
        lines += ["", *_wrap(s.text + clears, "    ", f"{s.number:>2}. ")]
    if part.remaining:
        lines += ["", REMAINING_TITLE, "-" * len(REMAINING_TITLE)]
        for r in part.remaining:
            which = f"{r.items_text().capitalize()}: " if r.items else ""
            lines += _wrap(f"{which}{r.message} Why: {r.reason}", "    ", "  - ")
    return lines + ["", *_wrap("Caution: " + part.caution)]


def _cell(c: SheetCell, unit: str = "ms") -> str:
    if c.value is None:
        return "—"
    return f"{c.value_text(unit)} {MARK_TXT[c.mark]}".strip()


def sheet_txt(doc: SheetDoc) -> bytes:
    h = doc.heading
    lines = _top(h)
    lines += _wrap(
        "One block per residual-current device, in tree order. ok = within its band, "
        "OUT = outside it, n/j = not judged (either outcome allowed). Required by the rule set: "
        + ", ".join(doc.required_groups)
        + f" ({doc.rules_source}); the other tests are "
        "recorded as common practice."
    )
    for r in doc.rows:
        lines += ["", f"{r.named} [{r.device_id}]  {r.board}  {r.type_text}"]
        if not r.recorded:
            lines.append("    no reading recorded on this visit")
            continue
        if r.not_tested is not None:
            lines += _wrap("not tested: " + r.not_tested, "    ")
        else:
            lines.append(f"    test current {r.test_waveform}")
            for c in r.tests:
                req = " (required)" if c.required else ""
                lines.append(f"    {c.title + req:<26}{_cell(c):<22}band {c.band}")
            lines.append(f"    {'Ramp':<26}{_cell(r.ramp, 'mA'):<22}band {r.ramp.band}")
            button = (r.button or "—") + (" FAIL" if r.button_mark == MARK_FAIL else "")
            lines.append(f"    {'Test button':<26}{button}")
        if r.note:
            lines += _wrap(r.note, "          ", "    Note: ")
    if doc.zs_rows:
        lines += ["", ZS_TITLE, "-" * len(ZS_TITLE), *_wrap(ZS_NOTE)]
        for z in doc.zs_rows:
            lines += ["", *_wrap(f"{with_way(z.circuit, z.way)}, {z.device}", "    ")]
            lines.append(f"    required time {z.required}; Zs maximum {z.zs_max}")
            lines += _wrap(f"measured {z.measured or '—'}: {z.mark}", "      ", "    ")
    lines += _bottom(h, doc.caution)
    return ("\n".join(lines) + "\n").encode("utf-8")
