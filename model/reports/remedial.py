"""The remedial-work list as data: one item per finding, grouped by board, worst first.

:func:`build_remedial` turns an analysis into plain, cleaned data, with a
pair chart for every series pair a ``cascade.*`` finding names; the
renderers in ``model.reports.render`` only lay it out.
"""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass, replace

from model.plan.changes import Plan, finding_key
from model.reports.analysis_view import findings_by_board, site_index
from model.reports.charts import PairChart, pair_chart_data
from model.reports.heading import Heading, build_heading
from model.reports.plan_part import ROW as PLANNED
from model.reports.plan_part import PlanPart, build_plan_part, planned_by_key, planned_row
from model.reports.text import clean, with_way
from model.rules.findings import CAUTION, Analysis, Finding
from model.site.models import SiteFile, Visit
from model.site.tree import SiteIndex

TITLE = "Remedial work list"

#: The names of an item's rows, in words a client and an electrician read without a glossary.
FOUND = "Found"
MEASURED = "Measured"
LIMIT = "Limit"
ACTION = "Action"
REFERENCE = "Reference"
CHART = "Chart"
#: The heading of the list of check ids (the appendix of Markdown and text; csv column ``rule``).
CHECK_IDS_TITLE = "Check ids (for reference; README lists what each check looks for)"

BASIS_TEXT = {
    "standard": "",
    "common-practice": "common practice, not a requirement of the standard",
    "guidance": "guidance, not a requirement",
}


@dataclass(frozen=True)
class RemedialItem:
    """One piece of work (or investigation) arising from one finding."""

    number: int
    rule: str
    severity: str
    node_ids: tuple[str, ...]
    node_labels: tuple[str, ...]
    where: tuple[str, ...]
    message: str
    measured: str | None
    band: str | None
    action: str
    source: str
    basis: str
    #: Numbers of the pair charts (PDF) that show this item's pairs.
    charts: tuple[int, ...] = ()
    #: The board's way of each node in ``node_labels`` ('' where none is given).
    node_ways: tuple[str, ...] = ()
    #: The planned change(s) that clear this item, in words ('' where the plan clears none).
    planned: str = ""

    @property
    def named_nodes(self) -> tuple[str, ...]:
        """Each node's label with its way in front ('way 3 · RCCB 1'), as printed."""
        ways = self.node_ways or ("",) * len(self.node_labels)
        return tuple(
            with_way(label, way) for label, way in zip(self.node_labels, ways, strict=True)
        )

    def charts_text(self) -> str:
        """'pair chart 3' or 'pair charts 3, 4, 5'; '' when there is none."""
        if not self.charts:
            return ""
        word = "pair chart" if len(self.charts) == 1 else "pair charts"
        return f"{word} {', '.join(str(n) for n in self.charts)}"

    @property
    def basis_note(self) -> str:
        """'' for a rule of the standard; otherwise what kind of advice it is."""
        return BASIS_TEXT.get(self.basis, self.basis)

    def source_text(self) -> str:
        note = self.basis_note
        return f"{self.source} ({note})" if note else self.source

    def rows(self, chart_where: str) -> list[tuple[str, str, bool]]:
        """(name, text, emphasised) rows of the item, in order; ``chart_where`` says where
        the charts are ('end of this document', 'in the PDF')."""
        out: list[tuple[str, str, bool]] = [(FOUND, self.message, False)]
        if self.measured or self.band:
            out.append((MEASURED, self.measured or "—", False))
            out.append((LIMIT, self.band or "—", False))
        out.append((ACTION, self.action, True))
        if self.planned:
            out.append((PLANNED, self.planned, True))
        out.append((REFERENCE, self.source_text(), False))
        if self.charts:
            out.append((CHART, f"{self.charts_text()} ({chart_where})", False))
        return out


@dataclass(frozen=True)
class BoardGroup:
    """The items of one board, worst first."""

    board_id: str
    label: str
    place: str
    items: tuple[RemedialItem, ...]


@dataclass(frozen=True)
class RemedialDoc:
    heading: Heading
    counts: dict[str, int]
    groups: tuple[BoardGroup, ...]
    charts: tuple[PairChart, ...]
    caution: str = CAUTION
    #: The planned remedy (None: no plan was asked for, or it has nothing to say).
    plan: PlanPart | None = None

    @property
    def closing_caution(self) -> str:
        """The closing caution: the plan's (when there is a plan) beside the general one."""
        return f"{self.plan.caution} {self.caution}" if self.plan is not None else self.caution

    @property
    def items(self) -> list[RemedialItem]:
        return [i for g in self.groups for i in g.items]


def _chart_pairs(analysis: Analysis) -> list[tuple[str, str]]:
    """Series pairs named by a ``cascade.*`` finding, in order of first mention."""
    out: list[tuple[str, str]] = []
    for f in analysis.findings:
        if not f.rule.startswith("cascade.") or len(f.nodes) < 2:
            continue
        up = f.nodes[0]
        for down in f.nodes[1:]:
            key = (up, down)
            if key not in out and analysis.pair(up, down) is not None:
                out.append(key)
    return out


def _printed_chart(
    site: SiteFile, analysis: Analysis, number: int, up: str, down: str
) -> PairChart:
    """Pair chart ``number`` of the document, its texts cleaned for print."""
    c = pair_chart_data(site, analysis, up, down, span="page")
    return replace(
        c,
        number=number,
        up_label=clean(c.up_label),
        down_label=clean(c.down_label),
        explanation=clean(c.explanation),
    )


def build_remedial(
    site: SiteFile,
    analysis: Analysis,
    *,
    generated: dt.datetime | None = None,
    later: Visit | None = None,
    plan: Plan | None = None,
) -> RemedialDoc:
    """The remedial-work list: one item per finding, grouped by board, worst first.

    ``plan`` (made for this site and ``analysis``): each item it clears shows the
    change under its Action, and the document gains the plan's part (changes in
    order, what remains and why) and its caution.
    """
    idx = site_index(site, analysis)
    visit = site.latest_visit()
    pairs = _chart_pairs(analysis)
    charts = [_printed_chart(site, analysis, n, u, d) for n, (u, d) in enumerate(pairs, start=1)]
    chart_of = {(c.up_id, c.down_id): c.number for c in charts}
    planned = planned_by_key(plan)
    total = len(plan.changes) if plan is not None else 0
    item_of: dict[tuple[str, tuple[str, ...]], list[int]] = {}
    groups: list[BoardGroup] = []
    number = 0
    for board, fs in findings_by_board(idx, analysis):
        items: list[RemedialItem] = []
        for f in fs:
            number += 1
            item = _item(number, idx, f, chart_of)
            key = finding_key(f)
            item_of.setdefault(key, []).append(number)
            if key in planned:
                item = replace(item, planned=planned_row(planned[key], total))
            items.append(item)
        bnode = idx.by_id.get(board)
        place = clean(getattr(bnode, "place", "")) if bnode is not None else ""
        label = clean(idx.label(board)) if bnode is not None else clean(board)
        groups.append(BoardGroup(board, label, place, tuple(items)))
    return RemedialDoc(
        heading=build_heading(site, visit, TITLE, generated, later),
        counts=analysis.counts(),
        groups=tuple(groups),
        charts=tuple(charts),
        caution=analysis.caution,
        plan=build_plan_part(plan, item_of),
    )


def _item(
    number: int, idx: SiteIndex, f: Finding, chart_of: dict[tuple[str, str], int]
) -> RemedialItem:
    known = [n for n in f.nodes if n in idx.by_id]
    charts: tuple[int, ...] = ()
    if f.rule.startswith("cascade.") and len(f.nodes) >= 2:
        found = (chart_of.get((f.nodes[0], d)) for d in f.nodes[1:])
        charts = tuple(n for n in found if n is not None)
    return RemedialItem(
        number=number,
        rule=f.rule,
        severity=f.severity,
        node_ids=f.nodes,
        node_labels=tuple(clean(idx.label(n)) for n in known),
        where=tuple(clean(idx.path_text(n)) for n in known),
        message=clean(f.message),
        measured=None if f.measured is None else clean(f.measured),
        band=None if f.band is None else clean(f.band),
        action=clean(f.action),
        source=clean(f.source),
        basis=f.basis,
        charts=charts,
        node_ways=tuple(clean(getattr(idx.by_id[n], "way", "")) for n in known),
    )
