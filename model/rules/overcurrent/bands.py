"""Time-current bands of fuses and breakers, built from the published test points.

Each device's band has a lower boundary (it will not have operated by then)
and an upper one (it will have operated by then), read two ways:

* the **estimate**: straight lines between the points on log-log axes (what a
  designer does by eye on a printed band; not guaranteed by the standard);
* the **staircase**: only monotonicity assumed (more current never operates
  more slowly), so between two points the guaranteed minimum is the time of
  the next point above in current and the guaranteed maximum that of the next
  point below.

Below a device's conventional non-tripping (non-fusing) current its lower
boundary is infinite (it does not operate); below its conventional tripping
(fusing) current its upper boundary is infinite (operation not guaranteed).
A lower boundary of :data:`FLOOR_S` means "no lower limit" (it may operate at
once).  Families without public points are never guessed: :func:`band_of`
gives the reason instead of a band.

Everything is evaluated with numpy over all pairs at once (:func:`evaluate`).

References
----------
IEC 60898-1 Table 7; IEC 60269-1 Tables 2, 3 and 7; IEC 60947-2 (conventional
currents); practice note sections 6.1 to 6.3 (how bands are built from points).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache
from typing import Any

import numpy as np
import numpy.typing as npt

from model.rules.overcurrent import tables as T

FloatArray = npt.NDArray[np.float64]

#: "No lower limit": a lower boundary drawn at 1 ms. [s]
FLOOR_S = 1e-3
#: The current at which every band is closed off. [A]
BIG_A = 1e7
Points = tuple[tuple[float, float], ...]


@dataclass(frozen=True)
class Band:
    """One device's band as points of (current [A], time [s])."""

    name: str
    basis: str  # "standard" or "maker"
    source: str
    non_trip_a: float
    trip_a: float
    min_est: Points
    max_est: Points
    min_rig: Points
    max_rig: Points


def _conv_s(rated_a: float) -> float:
    return next(t for lim, t in T.MCB_CONV_S if rated_a <= lim)


@lru_cache(maxsize=512)
def breaker_band(curve: str, rated_a: float) -> Band:
    """The band of an IEC 60898-1 breaker (or the overcurrent part of an IEC 61009-1 RCBO).

    Between the lower and upper edge of the instantaneous band the standard
    fixes no upper boundary; the estimate carries on the slope between
    2.55 In and the lower edge (a derived assumption), the staircase keeps the
    test-d time.

    References
    ----------
    IEC 60898-1 Table 7 (tests a to e).
    """
    c = T.BREAKER_CURVES[curve]
    n = rated_a
    conv = _conv_s(n)
    c_max = next(t for lim, t in T.MCB_C_MAX_S if n <= lim)
    d_max = c.d_max_small_s if n <= 32 else c.d_max_large_s
    slope = math.log(d_max / c_max) / math.log(c.lo / T.MCB_C)
    t_ext = d_max * (c.hi / c.lo) ** slope
    lo_a, hi_a = c.lo * n, c.hi * n
    mins: Points = (
        (T.MCB_A * n, conv),
        (T.MCB_C * n, T.MCB_C_MIN_S),
        (lo_a, T.MCB_INSTANT_S),
        (lo_a * (1 + 1e-6), FLOOR_S),
        (BIG_A, FLOOR_S),
    )
    max_rig: Points = (
        (T.MCB_B * n, conv),
        (T.MCB_C * n, c_max),
        (lo_a, d_max),
        (hi_a, T.MCB_INSTANT_S),
        (BIG_A, T.MCB_INSTANT_S),
    )
    max_est = (*max_rig[:3], (hi_a * (1 - 1e-6), t_ext), *max_rig[3:])
    return Band(
        name=f"{curve}{n:g}",
        basis="standard",
        source=c.source,
        non_trip_a=T.MCB_A * n,
        trip_a=T.MCB_B * n,
        min_est=mins,
        max_est=max_est,
        min_rig=mins,
        max_rig=max_rig,
    )


@lru_cache(maxsize=512)
def gg_band(rated_a: float) -> Band | None:
    """The pre-arcing band of a gG fuse-link from its gates, or None for a rating without gates.

    Lower boundary: (Inf, conventional time), (Imin 10 s), (Imin 0.1 s) and the
    current of the Table 7 minimum I²t at 0.01 s; upper boundary the same with
    If, Imax 5 s, Imax 0.1 s and the maximum I²t.  Beyond 0.01 s the estimate
    keeps I²t constant (adiabatic); the staircase has no lower limit there.

    References
    ----------
    IEC 60269-1 Table 2 (conventional currents), Table 3 (gates), Table 7 (I²t).
    """
    g = T.GG_GATES.get(float(rated_a))
    if g is None:
        return None
    inf, i_f, conv = T.gg_conventional(rated_a)
    min_pts: list[tuple[float, float]] = [(inf, conv), (g.imin_10s, 10.0), (g.imin_01s, 0.1)]
    max_pts: list[tuple[float, float]] = [(i_f, conv), (g.imax_5s, 5.0), (g.imax_01s, 0.1)]
    i2t = T.GG_I2T.get(float(rated_a))
    source = T.IEC_60269_GATES + f" ({g.confidence}); " + T.IEC_60269_CONV
    min_est = list(min_pts)
    max_tail: list[tuple[float, float]] = []
    if i2t is not None:
        lo2, hi2 = i2t
        i_lo, i_hi = math.sqrt(lo2 / T.I2T_TIME_S), math.sqrt(hi2 / T.I2T_TIME_S)
        min_pts.append((i_lo, T.I2T_TIME_S))
        min_est = [*min_pts, (BIG_A, lo2 / BIG_A**2)]
        max_pts.append((i_hi, T.I2T_TIME_S))
        max_tail = [(BIG_A, hi2 / BIG_A**2)]
        source += "; " + T.IEC_60269_T7
    last = min_pts[-1][0]
    min_rig = [*min_pts, (last * (1 + 1e-6), FLOOR_S), (BIG_A, FLOOR_S)]
    if i2t is None:
        min_est = min_rig
    return Band(
        name=f"gG {rated_a:g} A",
        basis="standard",
        source=source,
        non_trip_a=inf,
        trip_a=i_f,
        min_est=tuple(min_est),
        max_est=tuple([*max_pts, *max_tail] if max_tail else [*max_pts, (BIG_A, max_pts[-1][1])]),
        min_rig=tuple(min_rig),
        max_rig=tuple([*max_pts, (BIG_A, max_pts[-1][1])]),
    )


def maker_band(node: Any, name: str) -> Band:
    """The band typed in from the maker's data (it replaces the standard band).

    Below its first point the device is no faster than there (monotonicity);
    beyond its last point it has no lower limit and is no slower than there.
    """
    pts = node.maker_curve
    first, last = pts[0], pts[-1]
    mins = ((first.i_a * 1e-3, first.min_s), *((p.i_a, p.min_s) for p in pts))
    mins = (*mins, (last.i_a * (1 + 1e-6), FLOOR_S), (BIG_A, FLOOR_S))
    maxs = (*((p.i_a, p.max_s) for p in pts), (BIG_A, last.max_s))
    return Band(
        name=name,
        basis="maker",
        source="maker's curve as recorded (maker_curve)",
        non_trip_a=first.i_a,
        trip_a=first.i_a,
        min_est=mins,
        max_est=maxs,
        min_rig=mins,
        max_rig=maxs,
    )


def device_name(node: Any) -> str:
    """A device's rating for people: 'B16', 'gG 100 A', 'fuse 60 A', 'cbr Ir 250 A'."""
    d = node.__dict__  # plain field access: pydantic's fallback getattr is slow
    kind = d["kind"]
    if kind in ("mcb", "rcbo"):
        rated = f"{d['rated_a']:g}" if d["rated_a"] is not None else "?"
        return f"{d['curve'] or '?'}{rated}" + (" RCBO" if kind == "rcbo" else "")
    if kind == "fuse":
        return f"{d['fuse_type'] or 'fuse'} {d['rated_a']:g} A"
    if kind == "cbr":
        return f"cbr Ir {d['ir_a']:g} A" if d["ir_a"] is not None else "cbr"
    return str(kind)


#: The smallest breaker rating makers list (from memory; IEC 60898-1 sets only the
#: upper end, 125 A).  A smaller value is a typing slip, never given a band.
BREAKER_MIN_A = 0.5


def band_of(node: Any) -> Band | str:
    """The band of an overcurrent device, or the reason why the published data give none.

    Standard bands are shared between devices of the same rating (cached).
    """
    d = node.__dict__
    if d["maker_curve"]:
        return maker_band(node, device_name(node))
    kind = d["kind"]
    if kind == "mcb" or kind == "rcbo":
        curve, rated = d["curve"], d["rated_a"]
        if curve is not None and rated is not None and BREAKER_MIN_A <= rated <= 125:
            return breaker_band(str(curve), float(rated))
    return _band_reason_or_band(node, device_name(node), kind)


def _band_reason_or_band(node: Any, name: str, kind: str) -> Band | str:
    if kind == "fuse":
        if node.fuse_type is None:
            return f"{name}: the fuse type is not recorded (fuse_type)"
        if node.fuse_type != "gG":
            return (
                f"{name}: no public time-current points for {node.fuse_type} fuses; "
                "record the maker's curve (maker_curve)"
            )
        band = gg_band(float(node.rated_a))
        if band is None:
            return f"{name}: no published gates for a {node.rated_a:g} A gG link (maker_curve)"
        return band
    if kind in ("mcb", "rcbo"):
        if node.curve is None or node.rated_a is None:
            return f"{name}: curve and rated current are needed (curve, rated_a)"
        if node.rated_a > 125:
            return f"{name}: IEC 60898-1 covers breakers up to 125 A (maker_curve)"
        if node.rated_a < BREAKER_MIN_A:
            return (
                f"{name}: a rated current of {node.rated_a:g} A is below any breaker's "
                f"({BREAKER_MIN_A:g} A, from memory); check the rating or record the "
                "maker's curve (maker_curve)"
            )
        return breaker_band(str(node.curve), float(node.rated_a))
    return (
        f"{name}: IEC 60947-2 fixes no band shape for an industrial breaker; "
        "record the maker's curve for its settings (maker_curve)"
    )


# --- vectorised evaluation ------------------------------------------------------


def _pack(rows: list[Points]) -> tuple[FloatArray, FloatArray]:
    """(log10 current, log10 time) arrays (N, K), each row padded with its last point."""
    k = max(len(r) for r in rows)
    x = np.empty((len(rows), k))
    y = np.empty((len(rows), k))
    for i, r in enumerate(rows):
        pts = list(r) + [r[-1]] * (k - len(r))
        x[i] = [p[0] for p in pts]
        y[i] = [p[1] for p in pts]
    return np.log10(x), np.log10(y)


@dataclass(frozen=True)
class PackedBands:
    """The four boundaries of many bands, packed as log10 arrays."""

    min_est: tuple[FloatArray, FloatArray]
    max_est: tuple[FloatArray, FloatArray]
    min_rig: tuple[FloatArray, FloatArray]
    max_rig: tuple[FloatArray, FloatArray]

    @classmethod
    def build(cls, bands: list[Band]) -> PackedBands:
        return cls(
            _pack([b.min_est for b in bands]),
            _pack([b.max_est for b in bands]),
            _pack([b.min_rig for b in bands]),
            _pack([b.max_rig for b in bands]),
        )

    def take(self, rows: npt.NDArray[np.intp]) -> PackedBands:
        return PackedBands(
            *(
                (x[rows], y[rows])
                for x, y in (self.min_est, self.max_est, self.min_rig, self.max_rig)
            )
        )


def _count(px: FloatArray, x: FloatArray, *, strict: bool) -> npt.NDArray[np.intp]:
    out = np.zeros(x.shape, dtype=np.intp)
    for j in range(px.shape[1]):
        col = px[:, j : j + 1]
        out += (col < x) if strict else (col <= x)
    return out


def _loglog(pts: tuple[FloatArray, FloatArray], lx: FloatArray) -> FloatArray:
    """Straight-line interpolation on log-log axes, held flat beyond the last point. [log10 s]"""
    px, py = pts
    k = px.shape[1]
    seg = np.clip(_count(px, lx, strict=False) - 1, 0, k - 2)
    x0 = np.take_along_axis(px, seg, axis=1)
    x1 = np.take_along_axis(px, seg + 1, axis=1)
    y0 = np.take_along_axis(py, seg, axis=1)
    y1 = np.take_along_axis(py, seg + 1, axis=1)
    dx = x1 - x0
    frac = np.clip(np.where(dx > 0, (lx - x0) / np.where(dx > 0, dx, 1.0), 0.0), 0.0, 1.0)
    return y0 + frac * (y1 - y0)


def evaluate(bands: PackedBands, i_a: FloatArray) -> dict[str, FloatArray]:
    """The four boundaries of each band (rows) at each current (columns). [s]

    ``min_*`` is infinite below the first point of the lower boundary (the
    device does not operate); ``max_*`` infinite below the first point of the
    upper boundary (operation not guaranteed).
    """
    # a current of 0 (a sample under the smallest float) reads as "below every band":
    # log10 gives -inf there, which the comparisons below handle
    with np.errstate(divide="ignore"):
        lx = np.log10(i_a)
    below_min = lx < bands.min_est[0][:, :1]
    below_max = lx < bands.max_est[0][:, :1]
    min_est = np.where(below_min, np.inf, 10.0 ** _loglog(bands.min_est, lx))
    max_est = np.where(below_max, np.inf, 10.0 ** _loglog(bands.max_est, lx))
    px, py = bands.min_rig
    first_above = np.clip(_count(px, lx, strict=True), 0, px.shape[1] - 1)
    min_rig = np.where(below_min, np.inf, 10.0 ** np.take_along_axis(py, first_above, axis=1))
    px, py = bands.max_rig
    idx = _count(px, lx, strict=False) - 1
    last_below = np.clip(idx, 0, px.shape[1] - 1)
    max_rig = np.where(idx < 0, np.inf, 10.0 ** np.take_along_axis(py, last_below, axis=1))
    return {"min_est": min_est, "max_est": max_est, "min_rig": min_rig, "max_rig": max_rig}


def band_at(band: Band, i_a: list[float] | FloatArray) -> dict[str, FloatArray]:
    """The four boundaries of one band at the given currents (for plots and tests). [s]"""
    cur = np.asarray(i_a, dtype=np.float64).reshape(1, -1)
    return {k: v[0] for k, v in evaluate(PackedBands.build([band]), cur).items()}
