"""The remedial-work list as data: one item per finding, grouped by board, worst first.

:func:`build_remedial` turns an analysis into plain, cleaned data, with a
pair chart for every series pair a ``cascade.*`` finding names; the
renderers in ``model.reports.render`` only lay it out.
"""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass
from typing import Any, Literal

import numpy as np

from model.reports.check_text import findings_by_board
from model.reports.heading import Heading, build_heading
from model.reports.text import clean
from model.rules.bands import group_of
from model.rules.envelope import DeviceCurve, band_curve
from model.rules.findings import CAUTION, SEVERITIES, Analysis, CurrentRange, Finding, device_text
from model.rules.limits import BREAK_TIMES, NON_OPERATING_FRACTION
from model.site.models import SiteFile, Visit
from model.site.terms import DID_NOT_TRIP, TEST_NAMES
from model.site.tree import SiteIndex

TITLE = "Remedial work list"

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


@dataclass(frozen=True)
class BoardGroup:
    """The items of one board, worst first."""

    board_id: str
    label: str
    place: str
    items: tuple[RemedialItem, ...]


@dataclass(frozen=True)
class ChartPoint:
    """A reading drawn on a pair chart: time at the test current, or 'did not trip'."""

    device: Literal["up", "down"]
    test: str
    current_ma: float
    time_ms: float | None
    did_not_trip: bool


@dataclass(frozen=True)
class PairChart:
    """The two time-current bands of a series pair, with the measured points.

    Curves are sampled so that every step of the step-function reading is
    exact (each breakpoint appears just below and just above).  ``inf`` in a
    minimum means the device cannot trip there; in a maximum, a trip is not
    guaranteed.
    """

    number: int
    up_id: str
    down_id: str
    up_label: str
    down_label: str
    up_text: str
    down_text: str
    currents_ma: tuple[float, ...]
    up_min_ms: tuple[float, ...]
    up_max_ms: tuple[float, ...]
    down_min_ms: tuple[float, ...]
    down_max_ms: tuple[float, ...]
    ranges: tuple[CurrentRange, ...]
    points: tuple[ChartPoint, ...]
    i_max_ma: float
    verdict: str
    explanation: str


@dataclass(frozen=True)
class RemedialDoc:
    heading: Heading
    counts: dict[str, int]
    groups: tuple[BoardGroup, ...]
    charts: tuple[PairChart, ...]
    caution: str = CAUTION

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


def _chart_grid(lo_ma: float, hi_ma: float, breaks: list[float]) -> np.ndarray:
    grid = np.geomspace(lo_ma, hi_ma, 120)
    b = np.asarray([x for x in breaks if lo_ma < x < hi_ma], dtype=np.float64)
    pts = np.concatenate([grid, b * (1 - 1e-6), b * (1 + 1e-6)])
    return np.unique(np.clip(pts, lo_ma, hi_ma))


def _breakpoints(node: Any) -> list[float]:
    idn = float(node.idn_ma)
    out = [NON_OPERATING_FRACTION * idn]
    for p in BREAK_TIMES:
        out.append(p.current_ma(idn))
    return out


def _points(role: Literal["up", "down"], node: Any, visit: Visit | None) -> list[ChartPoint]:
    if visit is None:
        return []
    r = visit.readings.get(node.id)
    if r is None or r.not_tested is not None or r.waveform != "AC":
        return []
    out: list[ChartPoint] = []
    for t in TEST_NAMES:
        v = getattr(r, t)
        if v is None:
            continue
        mult = {"half": 0.5, "x1": 1.0, "x5": 5.0}[group_of(t)]
        cur = mult * float(node.idn_ma)
        if v == DID_NOT_TRIP:
            out.append(ChartPoint(role, t, cur, None, True))
        else:
            out.append(ChartPoint(role, t, cur, float(v), False))
    return out


def _tuple(a: np.ndarray) -> tuple[float, ...]:
    return tuple(float(x) for x in a)


def pair_chart(
    number: int, idx: SiteIndex, analysis: Analysis, up: str, down: str, visit: Visit | None
) -> PairChart:
    """The data of one pair chart (bands from :func:`model.rules.envelope.band_curve`)."""
    pa = analysis.pair(up, down)
    assert pa is not None
    un, dn = idx.node(up), idx.node(down)
    lo = 0.4 * float(dn.idn_ma)
    hi = max(pa.i_max_ma, 10.0 * float(un.idn_ma), 2.0 * lo)
    hi = min(hi, 1.0e6)
    grid = _chart_grid(lo, hi, _breakpoints(un) + _breakpoints(dn))
    u_min, u_max = band_curve(DeviceCurve.of(un), grid)
    d_min, d_max = band_curve(DeviceCurve.of(dn), grid)
    return PairChart(
        number=number,
        up_id=up,
        down_id=down,
        up_label=clean(idx.label(up)),
        down_label=clean(idx.label(down)),
        up_text=device_text(un),
        down_text=device_text(dn),
        currents_ma=_tuple(grid),
        up_min_ms=_tuple(u_min),
        up_max_ms=_tuple(u_max),
        down_min_ms=_tuple(d_min),
        down_max_ms=_tuple(d_max),
        ranges=pa.ranges,
        points=tuple(_points("up", un, visit) + _points("down", dn, visit)),
        i_max_ma=pa.i_max_ma,
        verdict=pa.verdict,
        explanation=clean(pa.explanation),
    )


def build_remedial(
    site: SiteFile, analysis: Analysis, *, generated: dt.datetime | None = None
) -> RemedialDoc:
    """The remedial-work list: one item per finding, grouped by board, worst first."""
    idx = SiteIndex.build(site)
    visit = site.latest_visit()
    pairs = _chart_pairs(analysis)
    charts = [pair_chart(n, idx, analysis, u, d, visit) for n, (u, d) in enumerate(pairs, start=1)]
    chart_of = {(c.up_id, c.down_id): c.number for c in charts}
    groups: list[BoardGroup] = []
    number = 0
    for board, fs in findings_by_board(site, analysis):
        items: list[RemedialItem] = []
        for f in fs:
            number += 1
            items.append(_item(number, idx, f, chart_of))
        bnode = idx.by_id.get(board)
        place = clean(getattr(bnode, "place", "")) if bnode is not None else ""
        label = clean(idx.label(board)) if bnode is not None else clean(board)
        groups.append(BoardGroup(board, label, place, tuple(items)))
    counts: dict[str, int] = {s: 0 for s in SEVERITIES}
    for f in analysis.findings:
        counts[f.severity] += 1
    return RemedialDoc(
        heading=build_heading(site, visit, TITLE, generated),
        counts=counts,
        groups=tuple(groups),
        charts=tuple(charts),
        caution=analysis.caution,
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
    )
