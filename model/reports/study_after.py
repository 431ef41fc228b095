"""The study's pairs after the planned changes: the site with the changes made, analysed again.

For every series pair a planned change touches (either device changed or
removed), :func:`after_pairs` gives the pair as it would stand after the plan:
its verdict and chart on the changed site, or the reason it is no longer a
pair; and the series pairs the changes make that the site did not have (an
MCB replaced by an RCBO under an RCCB makes a new residual-current pair).
Nothing here changes the site: the changes are made on a copy
(:func:`model.plan.changes.apply_changes`).
"""

from __future__ import annotations

from dataclasses import dataclass

from model.plan.changes import Plan, apply_changes
from model.reports.charts import PairChart, pair_chart_data
from model.reports.oc_chart import OcChart, oc_chart_data
from model.reports.plan_part import change_words
from model.reports.text import clean
from model.rules.checks import analyse
from model.rules.findings import Analysis
from model.site.models import SiteFile

#: How every after-chart and after-verdict is labelled.
AFTER_LABEL = "After the planned change (not yet made)"

#: What the study says of the plan before its pairs.
PLAN_NOTE = (
    "This study also shows each pair a planned change touches as it would stand after the "
    'change, labelled "after the planned change (not yet made)". The planned changes:'
)
MADE_TITLE = "Pairs the planned changes make"
MADE_LEAD = (
    "Series pairs the site does not have now that the planned changes would make "
    "(after the planned changes, not yet made)."
)

PairKey = tuple[str, str]


@dataclass(frozen=True)
class AfterPair:
    """One pair after the planned changes that touch it."""

    up: str
    down: str
    #: "rcd" or "oc".
    family: str
    #: The planned changes that touch the pair, in words, in the plan's order.
    changes: tuple[str, ...]
    #: The verdict after the changes ('' when it is no longer a pair).
    verdict: str = ""
    rcd_chart: PairChart | None = None
    oc_chart: OcChart | None = None
    #: Why the pair is no longer a pair after the changes ('' while it still is).
    gone: str = ""
    #: True when the pair's bands, ranges and verdict are the same after the changes
    #: (the change is elsewhere in the devices: a waveform type under a fuse pair); then
    #: no chart is repeated.
    unchanged: bool = False

    @property
    def changes_text(self) -> str:
        return "; ".join(self.changes)


@dataclass(frozen=True)
class AfterStudy:
    """Touched pairs after the plan (by their key before), and the pairs the plan makes."""

    touched: dict[PairKey, AfterPair]
    made: tuple[AfterPair, ...]
    #: Every change of the plan, in words, in order.
    changes: tuple[str, ...]


def _changes_of(plan: Plan, up: str, down: str) -> tuple[str, ...]:
    return tuple(change_words(dc) for dc in plan.changes if dc.node in (up, down))


def after_pairs(site: SiteFile, analysis: Analysis, plan: Plan | None) -> AfterStudy | None:
    """The pairs the plan touches, after it; None where the plan changes nothing."""
    if plan is None or not plan.changes:
        return None
    touched_ids = {dc.node for dc in plan.changes}
    removed = {dc.node for dc in plan.changes if dc.removes}
    after_site = apply_changes(site, plan.changes)
    after = analyse(after_site)
    labels = {n.id: n.label for n in site.nodes}
    out: dict[PairKey, AfterPair] = {}
    before_keys: set[tuple[str, PairKey]] = set()

    def gone_text(up: str, down: str, what: str) -> str:
        gone = [clean(labels.get(n, n)) for n in (up, down) if n in removed]
        if gone:
            return f"no longer a pair: {' and '.join(gone)} is removed by the plan"
        return f"no longer a series pair of {what} after the change"

    kinds = (
        ("rcd", analysis.pairs, _rcd_after, "residual-current devices"),
        ("oc", analysis.oc_pairs, _oc_after, "overcurrent devices"),
    )
    for kind, pairs, after_of, what in kinds:
        for p in pairs:
            before_keys.add((kind, (p.up, p.down)))
            if not touched_ids & {p.up, p.down}:
                continue
            out[(p.up, p.down)] = after_of(after_site, after, plan, p.up, p.down) or AfterPair(
                p.up,
                p.down,
                kind,
                _changes_of(plan, p.up, p.down),
                gone=gone_text(p.up, p.down, what),
            )
    made: list[AfterPair] = []
    for p in after.pairs:
        if ("rcd", (p.up, p.down)) not in before_keys:
            made.extend(_some(_rcd_after(after_site, after, plan, p.up, p.down)))
    for q in after.oc_pairs:
        if ("oc", (q.up, q.down)) not in before_keys:
            made.extend(_some(_oc_after(after_site, after, plan, q.up, q.down)))
    return AfterStudy(out, tuple(made), tuple(change_words(dc) for dc in plan.changes))


UNCHANGED = "the same bands and verdict as now: the change does not alter this pair's selectivity"


def same_pair(before: PairChart | OcChart, after: PairChart | OcChart) -> bool:
    """Whether two charts of one pair have the same bands, ranges and verdict."""
    names = ["up_min", "up_max", "down_min", "down_max", "ranges"]
    if isinstance(before, OcChart):
        names += ["verdict", "up_min_rig", "up_max_rig", "down_min_rig", "down_max_rig"]
    else:
        names += ["explanation", "currents_ma"]
    return all(getattr(before, n) == getattr(after, n) for n in names)


def _some(a: AfterPair | None) -> list[AfterPair]:
    return [] if a is None else [a]


def _rcd_after(site: SiteFile, after: Analysis, plan: Plan, up: str, down: str) -> AfterPair | None:
    pair = after.pair(up, down)
    if pair is None:
        return None
    chart = pair_chart_data(site, after, up, down, span="page")
    return AfterPair(up, down, "rcd", _changes_of(plan, up, down), pair.verdict, rcd_chart=chart)


def _oc_after(site: SiteFile, after: Analysis, plan: Plan, up: str, down: str) -> AfterPair | None:
    q = next((q for q in after.oc_pairs if q.up == up and q.down == down), None)
    if q is None:
        return None
    chart = oc_chart_data(site, after, up, down)
    return AfterPair(up, down, "oc", _changes_of(plan, up, down), q.verdict, oc_chart=chart)
