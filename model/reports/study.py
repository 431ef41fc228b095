"""The coordination study as data: every series pair, its chart, verdict, ranges and data.

Residual-current pairs come with the step-function chart of
:mod:`model.reports.charts`; fuse and breaker pairs with the band chart of
:mod:`model.reports.oc_chart`.  The loop-impedance rows close the study.
"""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass, field, replace

from model.plan.changes import PLAN_CAUTION, Plan
from model.reports.charts import PairChart, pair_chart_data
from model.reports.heading import Heading, build_heading
from model.reports.oc_chart import OcChart, oc_chart_data
from model.reports.study_after import AfterPair, AfterStudy, after_pairs, same_pair
from model.reports.zs_sheet import ZsRow, build_zs_rows
from model.rules.findings import CAUTION, Analysis
from model.rules.limits import IEC_61008_T1
from model.site.models import SiteFile

TITLE = "Coordination study"
OC_METHOD = (
    "Fuse and breaker bands are built from the published points only (IEC 60898-1 Table 7; "
    "IEC 60269-1 Tables 2, 3 and 7, the gG gates from memory). The shaded band is an estimate "
    "(straight lines between the points on log-log axes); the thin lines are the staircase "
    "reading, what the points alone guarantee. Makers' curves and selectivity tables, where "
    "recorded, replace the standard data and are named."
)
RCD_METHOD = IEC_61008_T1 + ", read as steps between the tabulated currents."


@dataclass(frozen=True)
class RcdSection:
    chart: PairChart
    verdict: str


@dataclass(frozen=True)
class StudyDoc:
    heading: Heading
    rcd: list[RcdSection] = field(default_factory=list)
    oc: list[OcChart] = field(default_factory=list)
    zs_rows: list[ZsRow] = field(default_factory=list)
    caution: str = CAUTION
    #: The pairs the planned changes touch, after them (None: no plan, or it changes nothing).
    after: AfterStudy | None = None

    def after_of(self, up: str, down: str) -> AfterPair | None:
        """The pair ``up``/``down`` after the planned changes, when a change touches it."""
        return None if self.after is None else self.after.touched.get((up, down))

    @property
    def closing_caution(self) -> str:
        """The plan's caution (when there is a plan) beside the general one."""
        return f"{PLAN_CAUTION} {self.caution}" if self.after is not None else self.caution


def build_study(
    site: SiteFile,
    analysis: Analysis,
    *,
    generated: dt.datetime | None = None,
    plan: Plan | None = None,
) -> StudyDoc:
    """The study of one site: residual-current pairs first, then overcurrent pairs.

    With ``plan``, each pair a planned change touches carries the pair after the
    change (:mod:`model.reports.study_after`), numbered as the pair it follows;
    the pairs the changes make follow the others, numbered on.
    """
    heading = build_heading(site, site.latest_visit(), TITLE, generated)
    number = 0
    rcd: list[RcdSection] = []
    for p in analysis.pairs:
        number += 1
        chart = pair_chart_data(site, analysis, p.up, p.down, span="page")
        rcd.append(RcdSection(replace(chart, number=number), p.verdict))
    oc: list[OcChart] = []
    for q in analysis.oc_pairs:
        number += 1
        oc.append(replace(oc_chart_data(site, analysis, q.up, q.down), number=number))
    after = after_pairs(site, analysis, plan)
    if after is not None:
        numbers = {(s.chart.up_id, s.chart.down_id): s.chart.number for s in rcd}
        numbers.update({(c.up_id, c.down_id): c.number for c in oc})
        charts: dict[tuple[str, str], PairChart | OcChart] = {
            (s.chart.up_id, s.chart.down_id): s.chart for s in rcd
        }
        charts.update({(c.up_id, c.down_id): c for c in oc})
        verdicts = {(p.up, p.down): p.verdict for p in analysis.pairs}
        touched = {
            k: _numbered(_same_or_after(a, charts[k], verdicts.get(k)), numbers[k])
            for k, a in after.touched.items()
        }
        made = tuple(_numbered(a, number + n) for n, a in enumerate(after.made, start=1))
        after = replace(after, touched=touched, made=made)
    zs = build_zs_rows(site, analysis)
    return StudyDoc(heading, rcd, oc, zs, analysis.caution, after)


def _same_or_after(a: AfterPair, before: PairChart | OcChart, verdict: str | None) -> AfterPair:
    """``a`` without its chart where the pair is the same after the change as now."""
    chart = a.rcd_chart or a.oc_chart
    if chart is None or not same_pair(before, chart):
        return a
    if a.rcd_chart is not None and verdict != a.verdict:
        return a
    return replace(a, unchanged=True, rcd_chart=None, oc_chart=None)


def _numbered(a: AfterPair, number: int) -> AfterPair:
    if a.rcd_chart is not None:
        return replace(a, rcd_chart=replace(a.rcd_chart, number=number))
    if a.oc_chart is not None:
        return replace(a, oc_chart=replace(a.oc_chart, number=number))
    return a
