"""The overcurrent pair chart as plain data: two fuse or breaker bands on log-log axes.

One builder, :func:`oc_chart_data`, serves the app's pair screen and the
printed study.  Each band comes as its estimate (log-log between the
published points, the shaded part) and its staircase reading (what the
points alone guarantee); ``None`` is an infinite time (the device does not
operate, or operation is not guaranteed).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from functools import lru_cache

import numpy as np

from model.reports.analysis_view import site_index
from model.rules.findings import Analysis
from model.rules.overcurrent.bands import Band, PackedBands, band_of, device_name, evaluate
from model.rules.overcurrent.pairs import VERDICT_WORDS, OcPair
from model.site.models import SiteFile
from model.site.terms import OVERCURRENT_KINDS

GRID = 160


@dataclass(frozen=True)
class OcChart:
    """Everything needed to draw one overcurrent pair."""

    up_id: str
    down_id: str
    up_label: str
    down_label: str
    up_name: str
    down_name: str
    #: Sample currents, ascending. [A]
    currents_a: list[float]
    #: Boundaries [s] parallel to ``currents_a``; empty lists where a device has no band.
    up_min: list[float | None]
    up_max: list[float | None]
    down_min: list[float | None]
    down_max: list[float | None]
    up_min_rig: list[float | None]
    up_max_rig: list[float | None]
    down_min_rig: list[float | None]
    down_max_rig: list[float | None]
    verdict: str
    verdict_words: str
    explanation: str
    #: Ranges (lo, hi, kind) where the pair is not selective or not shown. [A]
    ranges: list[tuple[float, float, str]] = field(default_factory=list)
    i_max_a: float | None = None
    limit_a: float | None = None
    data: list[str] = field(default_factory=list)
    notes: list[str] = field(default_factory=list)
    current_span_a: tuple[float, float] = (1.0, 10_000.0)
    time_span_s: tuple[float, float] = (0.001, 10_000.0)
    number: int = 0


def _plain(values: np.ndarray) -> list[float | None]:
    return [None if math.isinf(v) else float(v) for v in values.tolist()]


@lru_cache(maxsize=256)
def _packed(band: Band) -> PackedBands:
    """One band packed for evaluation, once per band (a site uses few)."""
    return PackedBands.build([band])


def _curves(band: Band | str, cur: np.ndarray) -> tuple[list[list[float | None]], str | None]:
    """The band's four boundaries at ``cur``, as ``band_at`` gives them. [s]"""
    if isinstance(band, str):
        return [[], [], [], []], band
    b = {k: v[0] for k, v in evaluate(_packed(band), cur.reshape(1, -1)).items()}
    return [_plain(b[k]) for k in ("min_est", "max_est", "min_rig", "max_rig")], None


def find_oc_pair(analysis: Analysis, up: str, down: str) -> OcPair | None:
    for p in analysis.oc_pairs:
        if p.up == up and p.down == down:
            return p  # type: ignore[no-any-return]
    return None


def oc_chart_data(site: SiteFile, analysis: Analysis, up_id: str, down_id: str) -> OcChart:
    """Both devices' bands from below the downstream rating up to the largest fault current.

    Raises ``KeyError`` for an unknown id and ``ValueError`` for a node that is
    not an overcurrent device.
    """
    idx = site_index(site, analysis)
    nodes = []
    for nid in (up_id, down_id):
        node = idx.by_id[nid]
        if node.kind not in OVERCURRENT_KINDS:
            raise ValueError(f"{nid} is a {node.kind}, not an overcurrent device")
        nodes.append(node)
    up, down = nodes
    pair = find_oc_pair(analysis, up_id, down_id)
    ub, db = band_of(up), band_of(down)
    starts = [b.non_trip_a for b in (ub, db) if isinstance(b, Band)]
    lo = 0.8 * min(starts) if starts else float(getattr(down, "rated_a", None) or 1.0)
    i_max = pair.i_max_a if pair is not None else 0.0
    hi = max(i_max * 1.25, 30.0 * lo)
    cur = lo * (hi / lo) ** np.linspace(0.0, 1.0, GRID)
    edges = [p[0] for b in (ub, db) if isinstance(b, Band) for p in (*b.min_est, *b.max_est)]
    extra = np.array([e for e in edges if lo < e < hi])
    cur = np.unique(np.concatenate([cur, extra * (1 - 1e-6), extra, extra * (1 + 1e-6)]))
    (u_min, u_max, u_min_r, u_max_r), u_note = _curves(ub, cur)
    (d_min, d_max, d_min_r, d_max_r), d_note = _curves(db, cur)
    notes = [n for n in (u_note, d_note) if n]
    if pair is None:
        notes.append(f"{idx.label(up_id)} is not upstream of {idx.label(down_id)}: not a pair")
    times = [
        t
        for arr in (u_min, u_max, d_min, d_max)
        for t in arr
        if t is not None and t > 0 and t < 1e5
    ]
    t_lo = max(min([0.01, *times]), 0.001)
    t_hi = max([1000.0, *[t * 1.5 for t in times]])
    verdict = pair.verdict if pair is not None else "not a pair"
    return OcChart(
        up_id=up_id,
        down_id=down_id,
        up_label=idx.label(up_id),
        down_label=idx.label(down_id),
        up_name=device_name(up),
        down_name=device_name(down),
        currents_a=[float(c) for c in cur.tolist()],
        up_min=u_min,
        up_max=u_max,
        down_min=d_min,
        down_max=d_max,
        up_min_rig=u_min_r,
        up_max_rig=u_max_r,
        down_min_rig=d_min_r,
        down_max_rig=d_max_r,
        verdict=verdict,
        verdict_words=VERDICT_WORDS.get(verdict, verdict),
        explanation="" if pair is None else pair.explanation,
        ranges=[] if pair is None else [(r.lo_a, r.hi_a, r.kind) for r in pair.ranges],
        i_max_a=None if pair is None else pair.i_max_a,
        limit_a=None if pair is None else pair.limit_a,
        data=[] if pair is None else list(pair.data),
        notes=notes,
        current_span_a=(float(cur[0]), float(cur[-1])),
        time_span_s=(t_lo, min(t_hi, 100_000.0)),
    )
