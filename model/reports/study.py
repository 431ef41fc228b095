"""The coordination study as data: every series pair, its chart, verdict, ranges and data.

Residual-current pairs come with the step-function chart of
:mod:`model.reports.charts`; fuse and breaker pairs with the band chart of
:mod:`model.reports.oc_chart`.  The loop-impedance rows close the study.
"""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass, field, replace

from model.reports.charts import PairChart, pair_chart_data
from model.reports.heading import Heading, build_heading
from model.reports.oc_chart import OcChart, oc_chart_data
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


def build_study(
    site: SiteFile, analysis: Analysis, *, generated: dt.datetime | None = None
) -> StudyDoc:
    """The study of one site: residual-current pairs first, then overcurrent pairs."""
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
    return StudyDoc(heading, rcd, oc, build_zs_rows(site, analysis), analysis.caution)
