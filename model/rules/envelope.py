"""Time-current bands of residual-current devices and the selectivity of series pairs.

The product standard tabulates times only at IΔn, 2 IΔn, 5 IΔn and the
absolute currents 5 A and 500 A.  Between those columns it gives nothing, so
the bands are read conservatively as step functions (and every output says
so):

* maximum break time at IΔ: the value of the largest tabulated current <= IΔ;
  below IΔn a trip is not guaranteed at all (infinite);
* minimum non-actuating time at IΔ: the value of the smallest tabulated current
  >= IΔ; below IΔn the value at IΔn (an assumption); where two columns fall at
  one current (5 IΔn = 5 A for IΔn = 1 A) the shorter time; at or below the
  non-operating current 0.5 IΔn the device cannot trip (infinite).  A general
  device has no minimum (zero).

The 40 ms column is taken at 5 IΔn, except for general devices of
IΔn <= 30 mA: for them the standard allows 0.25 A in place of 5 IΔn for that
test (Table 1, note), so it guarantees 40 ms only from 250 mA, and below
250 mA the 2 IΔn value (150 ms) holds.  That is the reading here.  Where a site
test at 5 IΔn has confirmed the device within 40 ms, the caller may say so
(``DeviceCurve.five_x_confirmed``) and the 40 ms step is taken at 5 IΔn.

The range a pair is judged over starts at half the smaller IΔn of the two:
below it neither device can trip.  Where the upstream device is the more
sensitive one it can trip alone from half its own IΔn.

Everything here is vectorised with numpy over all pairs at once.

References
----------
IEC 61008-1 Ed.3 Table 1; IEC 61009-1 Table 1 (same values);
IEC 61008-1 Ed.3 IΔno = 0.5 IΔn.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import numpy.typing as npt

from model.rules.limits import (
    ALT_5X_CURRENT_A,
    ALT_5X_MAX_IDN_MA,
    BREAK_TIMES,
    NON_OPERATING_FRACTION,
)
from model.rules.waveforms import set_delay_times_ms

FloatArray = npt.NDArray[np.float64]

#: Delay codes used in the arrays.
GENERAL, S_TYPE, SET = 0, 1, 2
_DELAY_CODE = {"general": GENERAL, "S": S_TYPE, "set": SET}

#: Points of the plain log grid added to the exact breakpoints of each pair.
LOG_POINTS = 16


@dataclass(frozen=True)
class DeviceCurve:
    """What the band computation needs of one device."""

    idn_ma: float
    delay: str = "general"
    delay_ms: float | None = None
    max_break_ms: float | None = None
    #: A site test at 5 IΔn within 40 ms confirms the 40 ms step at 5 IΔn
    #: (otherwise a general device of IΔn <= 30 mA is read at 250 mA).
    five_x_confirmed: bool = False

    @property
    def alt_5x(self) -> bool:
        """The 0.25 A note applies and is not overridden by a site test."""
        return (
            self.delay == "general"
            and self.idn_ma <= ALT_5X_MAX_IDN_MA
            and not self.five_x_confirmed
        )

    @classmethod
    def of(cls, node: object) -> DeviceCurve:
        """The curve parameters of a residual-current device node."""
        return cls(*curve_key(node))


def curve_key(node: object) -> tuple[float, str, float | None, float | None]:
    """What :meth:`DeviceCurve.of` reads of a node: devices with one key share one curve."""
    d = node.__dict__  # plain field access: pydantic's fallback getattr is slow
    return (
        float(d["idn_ma"]),
        str(d.get("delay", "general")),
        d.get("delay_ms"),
        d.get("max_break_ms"),
    )


@dataclass(frozen=True)
class DeviceArrays:
    """Column arrays for many devices: tabulated currents and times, sorted by current."""

    idn_ma: FloatArray  # (P,)
    tab_ma: FloatArray  # (P, T)
    tab_max_ms: FloatArray  # (P, T) maximum break time at each tabulated current
    tab_min_ms: FloatArray  # (P, T) minimum non-actuating time at each tabulated current

    @classmethod
    def build(cls, devices: list[DeviceCurve]) -> DeviceArrays:
        p = len(devices)
        t = len(BREAK_TIMES)
        idn = np.array([d.idn_ma for d in devices], dtype=np.float64).reshape(p)
        code = np.array([_DELAY_CODE[d.delay] for d in devices], dtype=np.int64).reshape(p)
        mult = np.array([b.multiple if b.multiple is not None else np.nan for b in BREAK_TIMES])
        absolute = np.array(
            [b.abs_a * 1000.0 if b.abs_a is not None else np.nan for b in BREAK_TIMES]
        )
        # The absolute 5 A … 500 A columns apply only above 5 IΔn: for IΔn over
        # 1 A a column below 5 IΔn is read at 5 IΔn, so the band is never
        # faster at a lower current than at a higher one.
        top = max(b.multiple for b in BREAK_TIMES if b.multiple is not None)
        floor = (top * idn)[:, None]
        tab = np.where(
            np.isnan(mult)[None, :],
            np.maximum(absolute[None, :], floor),
            mult[None, :] * idn[:, None],
        )
        # IEC 61008-1 Table 1 note: 0.25 A in place of 5 IΔn (general, IΔn <= 30 mA)
        alt = np.array([d.alt_5x for d in devices], dtype=bool).reshape(p)
        if alt.any():
            five = mult == 5.0
            tab = np.where(alt[:, None] & five[None, :], ALT_5X_CURRENT_A * 1000.0, tab)
        gen_max = np.array([b.general_max_ms for b in BREAK_TIMES], dtype=np.float64)
        s_max = np.array([b.s_max_ms for b in BREAK_TIMES], dtype=np.float64)
        s_min = np.array([b.s_min_ms for b in BREAK_TIMES], dtype=np.float64)
        tmax = np.where((code == S_TYPE)[:, None], s_max[None, :], gen_max[None, :])
        tmin = np.where((code == S_TYPE)[:, None], s_min[None, :], 0.0)
        set_rows = code == SET
        if set_rows.any():
            # The declared setting, read as the reading check reads it.
            declared = [set_delay_times_ms(d.delay_ms, d.max_break_ms) for d in devices]
            dms = np.array([lo or 0.0 for lo, _ in declared])
            bms = np.array([hi if hi else np.inf for _, hi in declared])
            tmin = np.where(set_rows[:, None], dms[:, None], tmin)
            tmax = np.where(set_rows[:, None], bms[:, None], tmax)
        order = np.argsort(tab, axis=1, kind="stable")
        tab = np.take_along_axis(tab, order, axis=1)
        tmax = np.take_along_axis(tmax, order, axis=1).reshape(p, t)
        tmin = np.take_along_axis(tmin, order, axis=1).reshape(p, t)
        # Two columns at one current (5 IΔn = 5 A for IΔn = 1 A): read the
        # conservative value, the shorter minimum and the longer maximum.
        for j in range(t):
            for k in range(t):
                if j != k:
                    tie = tab[:, j] == tab[:, k]
                    tmin[:, j] = np.where(tie, np.minimum(tmin[:, j], tmin[:, k]), tmin[:, j])
                    tmax[:, j] = np.where(tie, np.maximum(tmax[:, j], tmax[:, k]), tmax[:, j])
        return cls(idn_ma=idn, tab_ma=tab.reshape(p, t), tab_max_ms=tmax, tab_min_ms=tmin)

    def take(self, rows: npt.NDArray[np.intp]) -> DeviceArrays:
        """The arrays of the devices at these rows (a row may be taken many times)."""
        return DeviceArrays(
            self.idn_ma[rows], self.tab_ma[rows], self.tab_max_ms[rows], self.tab_min_ms[rows]
        )


def _count(tab_ma: FloatArray, i_ma: FloatArray, *, strict: bool) -> npt.NDArray[np.int64]:
    """How many tabulated currents of each row lie below (or at) each current.

    One pass per table column over (P, G) arrays keeps memory traffic low.
    """
    out = np.zeros(i_ma.shape, dtype=np.int64)
    for k in range(tab_ma.shape[1]):
        col = tab_ma[:, k : k + 1]
        out += (col < i_ma) if strict else (col <= i_ma)
    return out


def max_break_ms(dev: DeviceArrays, i_ma: FloatArray) -> FloatArray:
    """Maximum break time of each device (rows) at each residual current (columns). [ms]

    Infinite where a trip is not guaranteed (below IΔn).

    References
    ----------
    IEC 61008-1 Ed.3 Table 1 (step-function reading between columns).
    """
    idx = _count(dev.tab_ma, i_ma, strict=False) - 1
    safe = np.clip(idx, 0, dev.tab_ma.shape[1] - 1)
    out = np.take_along_axis(dev.tab_max_ms, safe, axis=1)
    return np.where(idx < 0, np.inf, out)


def min_nonactuating_ms(dev: DeviceArrays, i_ma: FloatArray) -> FloatArray:
    """Minimum non-actuating time of each device at each residual current. [ms]

    Infinite at or below the non-operating current 0.5 IΔn (the device cannot
    trip); zero for a general device above it.

    References
    ----------
    IEC 61008-1 Ed.3 Table 1 (step-function reading; below IΔn the value at
    IΔn, an assumption); IΔno = 0.5 IΔn.
    """
    idx = np.clip(_count(dev.tab_ma, i_ma, strict=True), 0, dev.tab_ma.shape[1] - 1)
    out = np.take_along_axis(dev.tab_min_ms, idx, axis=1)
    cannot_trip = i_ma <= NON_OPERATING_FRACTION * dev.idn_ma[:, None]
    return np.where(cannot_trip, np.inf, out)


@dataclass(frozen=True)
class PairBands:
    """Selectivity of many pairs on a shared sample layout."""

    currents_ma: FloatArray  # (P, S) sorted sample currents per pair
    down_max_ms: FloatArray  # (P, S)
    up_min_ms: FloatArray  # (P, S)
    selective: npt.NDArray[np.bool_]  # (P, S)
    is_midpoint: npt.NDArray[np.bool_]  # (S,) odd samples lie inside open intervals


def pair_bands(
    ups: list[DeviceCurve], downs: list[DeviceCurve], i_max_ma: list[float]
) -> PairBands:
    """Evaluate every pair on its own grid from half the smaller IΔn to its largest fault current.

    The devices' tabulated bands are built once per distinct curve (see
    :func:`class_pair_bands`).
    """
    classes: dict[DeviceCurve, int] = {}
    up_rows = [classes.setdefault(c, len(classes)) for c in ups]
    dn_rows = [classes.setdefault(c, len(classes)) for c in downs]
    return class_pair_bands(DeviceArrays.build(list(classes)), up_rows, dn_rows, i_max_ma)


def class_pair_bands(
    table: DeviceArrays, up_rows: list[int], dn_rows: list[int], i_max_ma: list[float]
) -> PairBands:
    """Evaluate every pair on its own grid from half the smaller IΔn to its largest fault current.

    ``table`` holds the bands of each distinct device curve once; pair ``k``
    is the curve at ``up_rows[k]`` above the one at ``dn_rows[k]``, with the
    largest fault current ``i_max_ma[k]`` [mA].  One numpy pass over a
    (pairs × samples) array, no Python work per pair.

    Each pair's grid holds every breakpoint of both step functions plus a log
    grid, and the geometric midpoint of every gap; as the bands are constant
    between breakpoints, the result is exact, not sampled.

    A pair is selective at IΔ where the upstream device cannot trip or its
    minimum non-actuating time is at least the downstream maximum break time
    (equal times count as selective).

    References
    ----------
    IEC 61008-1 Ed.3 Table 1; practice note section 5 (current and time selectivity).
    """
    p = len(up_rows)
    up = table.take(np.asarray(up_rows, dtype=np.intp).reshape(p))
    dn = table.take(np.asarray(dn_rows, dtype=np.intp).reshape(p))
    lo = NON_OPERATING_FRACTION * np.minimum(dn.idn_ma, up.idn_ma)
    hi = np.maximum(np.asarray(i_max_ma, dtype=np.float64).reshape(p), lo)
    log = lo[:, None] * (hi / lo)[:, None] ** np.linspace(0.0, 1.0, LOG_POINTS)[None, :]
    pts = np.concatenate(
        [
            lo[:, None],
            hi[:, None],
            (NON_OPERATING_FRACTION * up.idn_ma)[:, None],
            up.tab_ma,
            dn.tab_ma,
            log,
        ],
        axis=1,
    )
    pts = np.sort(np.clip(pts, lo[:, None], hi[:, None]), axis=1)
    mids = np.sqrt(pts[:, :-1] * pts[:, 1:])
    n = pts.shape[1]
    samples = np.empty((p, 2 * n - 1), dtype=np.float64)
    samples[:, 0::2] = pts
    samples[:, 1::2] = mids
    is_mid = np.zeros(2 * n - 1, dtype=bool)
    is_mid[1::2] = True
    d_max = max_break_ms(dn, samples)
    u_min = min_nonactuating_ms(up, samples)
    selective = np.isinf(u_min) | (u_min >= d_max)
    return PairBands(samples, d_max, u_min, selective, is_mid)


def unsafe_ranges(bands: PairBands, row: int) -> list[tuple[float, float]]:
    """The current ranges of one pair where selectivity is not guaranteed. [mA]

    A range (lo, hi) means: somewhere strictly inside it, or at a closed end,
    both devices may trip.  Ends are exact breakpoints.
    """
    bad = ~bands.selective[row]
    if not bad.any():
        return []
    cur = bands.currents_ma[row]
    mid = bands.is_midpoint
    s = bad.shape[0]
    # runs of consecutive non-selective samples: [start, stop) pairs
    edges = np.flatnonzero(np.diff(np.concatenate(([0], bad.astype(np.int8), [0]))))
    out: list[tuple[float, float]] = []
    for i, stop in zip(edges[0::2].tolist(), edges[1::2].tolist(), strict=True):
        j = stop - 1
        lo = cur[i - 1] if (mid[i] and i > 0) else cur[i]
        hi = cur[j + 1] if (mid[j] and j + 1 < s) else cur[j]
        if hi > lo:
            if out and abs(out[-1][1] - lo) <= 1e-9 * max(1.0, lo):
                out[-1] = (out[-1][0], float(hi))
            else:
                out.append((float(lo), float(hi)))
    return out


def all_unsafe_ranges(bands: PairBands) -> list[list[tuple[float, float]]]:
    """:func:`unsafe_ranges` of every pair at once (the same ranges, vectorised). [mA]"""
    bad = ~bands.selective
    p, s = bad.shape
    out: list[list[tuple[float, float]]] = [[] for _ in range(p)]
    if not bad.any():
        return out
    padded = np.zeros((p, s + 2), dtype=np.int8)
    padded[:, 1:-1] = bad
    step = np.diff(padded, axis=1)
    rows, starts = np.nonzero(step == 1)
    _, stops = np.nonzero(step == -1)  # row-major order: pairs up with the starts
    ends = stops - 1
    cur = bands.currents_ma
    mid = bands.is_midpoint
    lo = np.where(
        mid[starts] & (starts > 0), cur[rows, np.maximum(starts - 1, 0)], cur[rows, starts]
    )
    hi = np.where(
        mid[ends] & (ends + 1 < s), cur[rows, np.minimum(ends + 1, s - 1)], cur[rows, ends]
    )
    for r, a, b in zip(rows.tolist(), lo.tolist(), hi.tolist(), strict=True):
        if b > a:
            got = out[r]
            if got and abs(got[-1][1] - a) <= 1e-9 * max(1.0, a):
                got[-1] = (got[-1][0], b)
            else:
                got.append((a, b))
    return out


def has_unsafe(bands: PairBands) -> npt.NDArray[np.bool_]:
    """For each pair, whether :func:`unsafe_ranges` finds any range (vectorised).

    A range of positive width always contains a midpoint sample that is not
    selective; a lone breakpoint that is not selective between selective
    neighbours is not a range.
    """
    cur = bands.currents_ma
    bad_mid = ~bands.selective[:, 1::2]
    wide = cur[:, 2::2] > cur[:, 0:-1:2]
    return np.asarray((bad_mid & wide).any(axis=1), dtype=bool)


def band_curve(dev: DeviceCurve, currents_ma: FloatArray) -> tuple[FloatArray, FloatArray]:
    """(minimum non-actuating, maximum break) times of one device at given currents. [ms]

    For plotting.  Infinite values mean 'cannot trip' and 'trip not guaranteed'.
    """
    arr = DeviceArrays.build([dev])
    i = np.asarray(currents_ma, dtype=np.float64).reshape(1, -1)
    return min_nonactuating_ms(arr, i)[0], max_break_ms(arr, i)[0]
