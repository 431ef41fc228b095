"""The pair chart: plain data for drawing the time-current bands of two devices.

One builder, :func:`pair_chart_data`, serves the app's chart
(``tui.widgets.bandchart``) and the printed one (``model.reports.render.pdf_chart``):
numpy is used inside, plain lists and floats come out, so any drawing code
can use the result without knowing how the bands are computed.  The two
differ only in the span of currents they show and how densely they sample
it (:data:`Span`, :data:`GRID_POINTS`).

The bands are the step-function reading of the product standard's table
(see :mod:`model.rules.envelope`): the sample currents include every tabulated
current of both devices and a point just either side of it, so a renderer
that joins the samples with straight lines draws the steps as near-vertical
edges at the right currents.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from functools import lru_cache
from typing import Literal

import numpy as np

from model.reports.analysis_view import site_index
from model.rules.bands import GROUP_MULTIPLE, group_of
from model.rules.envelope import DeviceArrays, DeviceCurve, max_break_ms, min_nonactuating_ms
from model.rules.findings import Analysis, CurrentRange, PairAnalysis, device_text
from model.rules.limits import (
    ALT_5X_CURRENT_A,
    ALT_5X_MAX_IDN_MA,
    BREAK_TIMES,
    IEC_61008_T1,
    NON_OPERATING_FRACTION,
)
from model.site.models import SiteFile
from model.site.terms import RCD_KINDS, TEST_NAMES

#: A measured point: (test current [mA], trip time [ms] or "did not trip", test name).
MeasuredPoint = tuple[float, float | str, str]

#: The span of currents a chart shows: ``screen`` around both devices' ratings (the
#: app), ``page`` from the downstream rating up to the largest fault current (the PDF).
Span = Literal["screen", "page"]

#: Points of the plain log grid between the tabulated currents, for each span.
GRID_POINTS: dict[Span, int] = {"screen": 96, "page": 120}
#: Relative offset of the samples placed just either side of a step.
_EDGE = 1e-6

CHART_SOURCE = IEC_61008_T1 + "; step-function reading between tabulated currents"


@dataclass(frozen=True)
class PairChart:
    """Everything needed to draw one pair's bands and readings.

    Band lists run parallel to ``currents_ma``; ``None`` is an infinite time:
    in a minimum non-actuating curve it means the device cannot trip there
    (at or below 0.5 IΔn), in a maximum break curve that a trip is not
    guaranteed (below IΔn).  A minimum of 0 means no minimum (general type).
    """

    up_id: str
    down_id: str
    up_label: str
    down_label: str
    #: The devices' ratings ('30 mA, Type A, general').
    up_text: str
    down_text: str
    #: True when ``up`` is a protective RCD in the supply path of ``down``.
    in_series: bool
    #: Sample currents, ascending. [mA]
    currents_ma: list[float]
    up_min: list[float | None]
    up_max: list[float | None]
    down_min: list[float | None]
    down_max: list[float | None]
    #: Readings of the latest visit at ½, 1 and 5 × IΔn (AC test current only).
    up_points: list[MeasuredPoint] = field(default_factory=list)
    down_points: list[MeasuredPoint] = field(default_factory=list)
    #: Current ranges (lo, hi) where selectivity is not guaranteed. [mA]
    ranges: list[tuple[float, float]] = field(default_factory=list)
    #: Largest prospective earth-fault current used by the analysis. [mA]
    i_max_ma: float | None = None
    #: The analysis's explanation of the pair's verdict ('' when not a series pair).
    explanation: str = ""
    #: Id of the visit the points come from.
    visit: str | None = None
    #: Suggested axis spans: currents [mA] and times [ms] (both for log axes).
    current_span_ma: tuple[float, float] = (1.0, 10_000.0)
    time_span_ms: tuple[float, float] = (5.0, 1000.0)
    #: Remarks a reader needs (skipped readings, missing data).
    notes: list[str] = field(default_factory=list)
    source: str = CHART_SOURCE
    #: The chart's number in a printed document (0: not numbered).
    number: int = 0

    def ranges_text(self) -> str:
        """'50 mA to 150 mA' (ranges joined by commas); '' when there is none."""
        return ", ".join(CurrentRange(lo, hi).text() for lo, hi in self.ranges)

    def pair_text(self) -> str:
        """The pair's verdict for a document, naming its ranges once.

        'not guaranteed between 50 mA and 250 mA; confirm by testing both devices'
        as the analysis words it; otherwise the ranges, then the explanation.
        """
        if "not guaranteed" in self.explanation:
            return self.explanation
        ranges = self.ranges_text() or "none"
        return f"selectivity not guaranteed over {ranges}; {self.explanation}"


def _breakpoints_ma(idn_ma: float) -> list[float]:
    """The currents at which a device's bands may step. [mA]

    Includes 0.25 A, where the IEC 61008-1 Table 1 note puts the 40 ms step of
    a general device of IΔn <= 30 mA.
    """
    out = [NON_OPERATING_FRACTION * idn_ma]
    out.extend(p.current_ma(idn_ma) for p in BREAK_TIMES)
    if idn_ma <= ALT_5X_MAX_IDN_MA:
        out.append(ALT_5X_CURRENT_A * 1000.0)
    return out


def _span_ma(
    span: Span, idn_up: float, idn_dn: float, pair: PairAnalysis | None
) -> tuple[float, float]:
    """The lowest and highest current of the chart. [mA]"""
    if span == "page":
        # From below the downstream non-operating current to the largest fault
        # current (at least 10 × the upstream IΔn), never beyond 1 kA.
        lo = 0.4 * idn_dn
        i_max = 0.0 if pair is None else pair.i_max_ma
        return lo, min(max(i_max, 10.0 * idn_up, 2.0 * lo), 1.0e6)
    # From a quarter of the smaller IΔn (below every non-operating current) to
    # 20 × the larger one (4 × its last multiple column; nothing steps beyond
    # that for devices up to 1 A).
    return NON_OPERATING_FRACTION * min(idn_up, idn_dn) / 2.0, 20.0 * max(idn_up, idn_dn)


def _currents(span: Span, lo: float, hi: float, steps_ma: list[float]) -> np.ndarray:
    """The sample currents from ``lo`` to ``hi``: a log grid, every step and a point either side.

    A page chart runs its axis from its first sample to its last, so there
    both ends are sampled exactly; the screen chart takes its axis from
    ``current_span_ma``. [mA]
    """
    grid = lo * (hi / lo) ** np.linspace(0.0, 1.0, GRID_POINTS[span])
    steps = np.array(steps_ma)
    steps = steps[(steps > lo) & (steps < hi)]
    currents = np.unique(np.concatenate([grid, steps, steps * (1 - _EDGE), steps * (1 + _EDGE)]))
    currents = currents[(currents >= lo) & (currents <= hi)]
    if span == "page":
        currents = np.unique(np.concatenate([[lo, hi], currents]))
    return currents


@lru_cache(maxsize=256)
def _device_arrays(dev: DeviceCurve) -> DeviceArrays:
    """The tabulated band of one kind of device, worked out once (a site has few kinds)."""
    return DeviceArrays.build([dev])


def _band_curve(dev: DeviceCurve, currents_ma: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """(minimum non-actuating, maximum break) times of one device at given currents. [ms]

    As :func:`model.rules.envelope.band_curve`, with the device's table built once.
    """
    arr = _device_arrays(dev)
    i = np.asarray(currents_ma, dtype=np.float64).reshape(1, -1)
    return min_nonactuating_ms(arr, i)[0], max_break_ms(arr, i)[0]


def _plain(values: np.ndarray) -> list[float | None]:
    return [None if math.isinf(v) else float(v) for v in values.tolist()]


def _points(site: SiteFile, node: object, notes: list[str], label: str) -> list[MeasuredPoint]:
    visit = site.latest_visit()
    if visit is None:
        return []
    node_id = str(getattr(node, "id"))  # noqa: B009
    reading = visit.readings.get(node_id)
    if reading is None:
        notes.append(f"{label}: no reading on visit {visit.id}")
        return []
    if reading.not_tested is not None:
        notes.append(f"{label}: not tested on visit {visit.id} ({reading.not_tested})")
        return []
    if reading.waveform != "AC":
        notes.append(
            f"{label}: tested with {reading.waveform} current; the bands are for sinusoidal "
            "current, so its readings are not plotted"
        )
        return []
    idn = float(getattr(node, "idn_ma"))  # noqa: B009
    out: list[MeasuredPoint] = []
    for test in TEST_NAMES:
        value = getattr(reading, test)
        if value is None:
            continue
        current = GROUP_MULTIPLE[group_of(test)] * idn
        out.append((current, value if isinstance(value, str) else float(value), test))
    return out


def pair_chart_data(
    site: SiteFile,
    analysis: Analysis,
    up_id: str,
    down_id: str,
    *,
    span: Span = "screen",
) -> PairChart:
    """The bands of two residual-current devices, their readings and the unsafe ranges.

    Works for any two protective RCDs; ``in_series`` says whether they form a
    series pair (only then are ``ranges`` filled, from ``analysis``).  Raises
    ``KeyError`` for an unknown id and ``ValueError`` for a node that is not a
    protective residual-current device.

    References
    ----------
    IEC 61008-1 Ed.3 Table 1 (IEC 61009-1 same values), read as step functions;
    IΔno = 0.5 IΔn.
    """
    idx = site_index(site, analysis)
    nodes = []
    for nid in (up_id, down_id):
        node = idx.by_id[nid]
        if node.kind not in RCD_KINDS:
            raise ValueError(f"{nid} is a {node.kind}, not a residual-current protective device")
        nodes.append(node)
    up, down = nodes
    idn_up, idn_dn = float(up.idn_ma), float(down.idn_ma)
    pair = analysis.pair(up_id, down_id)
    in_series = up_id in idx.rcd_above.get(down_id, ())

    lo, hi = _span_ma(span, idn_up, idn_dn, pair)
    currents = _currents(span, lo, hi, _breakpoints_ma(idn_up) + _breakpoints_ma(idn_dn))
    u_min, u_max = _band_curve(DeviceCurve.of(up), currents)
    d_min, d_max = _band_curve(DeviceCurve.of(down), currents)

    notes: list[str] = []
    up_label, down_label = idx.label(up_id), idx.label(down_id)
    up_pts = _points(site, up, notes, up_label)
    down_pts = _points(site, down, notes, down_label)
    visit = site.latest_visit()
    if visit is None:
        notes.append("no visits recorded: no readings to plot")
    for label, node in ((up_label, up), (down_label, down)):
        if DeviceCurve.of(node).alt_5x:
            notes.append(
                f"{label}: 40 ms guaranteed only from {ALT_5X_CURRENT_A * 1000:g} mA "
                "(IEC 61008-1 Table 1 note: 0.25 A may replace 5 IΔn); a 5 IΔn test within "
                "40 ms confirms it from 5 IΔn"
            )
    if not in_series:
        notes.append(f"{up_label} is not upstream of {down_label}: they are not a series pair")

    finite = np.concatenate([a[np.isfinite(a) & (a > 0)] for a in (u_min, u_max, d_min, d_max)])
    times = [float(v) for v in finite.tolist()]
    times += [float(p[1]) for p in up_pts + down_pts if not isinstance(p[1], str)]
    t_lo = min([5.0] + [t / 1.5 for t in times])
    t_hi = max([1000.0] + [t * 1.5 for t in times])

    return PairChart(
        up_id=up_id,
        down_id=down_id,
        up_label=up_label,
        down_label=down_label,
        up_text=device_text(up),
        down_text=device_text(down),
        in_series=in_series,
        currents_ma=[float(c) for c in currents.tolist()],
        up_min=_plain(u_min),
        up_max=_plain(u_max),
        down_min=_plain(d_min),
        down_max=_plain(d_max),
        up_points=up_pts,
        down_points=down_pts,
        ranges=[] if pair is None else [(r.lo_ma, r.hi_ma) for r in pair.ranges],
        i_max_ma=None if pair is None else pair.i_max_ma,
        explanation="" if pair is None else pair.explanation,
        visit=None if visit is None else visit.id,
        current_span_ma=(float(lo), float(hi)),
        time_span_ms=(t_lo, t_hi),
        notes=notes,
    )
