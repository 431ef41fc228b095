"""Selectivity of series pairs of fuses and breakers, from their bands (all pairs at once).

Over the current range from the downstream device's conventional
non-tripping current to the largest prospective fault current where it is
installed, each current is judged:

* **selective** where the upstream device cannot operate, or the staircase
  reading separates the bands (upstream minimum above downstream maximum), or
  the estimate separates them by at least :data:`MARGIN` in time (a 5 % shift
  of current changes a long-time point by about 1.6 times);
* **not selective** where the upstream estimated minimum is at most
  1 / :data:`OVERLAP` of the downstream estimated maximum while the downstream
  device is still on its time-current curve: the upstream device may operate
  first or together;
* **not shown** otherwise: the bands overlap only at their worst corners, or
  the downstream device is in its instantaneous or current-limiting region
  (its maximum at most 0.1 s) without the margin, where time-current bands
  cannot decide and only the makers' I²t or selectivity tables can.

gG links of 16 A or more in the ratio 1.6:1 are selective by the product
standard; a maker's selectivity limit makes the pair selective up to it and
not selective above it.

References
----------
IEC 60898-1 Table 7; IEC 60269-1 Tables 2, 3, 7 and 7.8; BS 7671 Part 2
(total and partial selectivity) and 536.4.1.2; IEC 60947-2 2.17.4 (limit current).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any, Literal

import numpy as np
import numpy.typing as npt

from model.rules.overcurrent import tables as T
from model.rules.overcurrent.bands import Band, PackedBands, evaluate

Verdict = Literal["selective", "partial", "not-selective", "not-shown"]
VERDICTS: tuple[Verdict, ...] = ("selective", "partial", "not-selective", "not-shown")
VERDICT_WORDS: dict[str, str] = {
    "selective": "selective over the whole range",
    "partial": "selective only up to a limit current",
    "not-selective": "not selective: the upstream device may operate first",
    "not-shown": "cannot be shown from the data held",
}

#: Separation in time the estimate needs before it is called selective.
MARGIN = 2.0
#: Overlap in time of the estimates before the pair is called not selective.
OVERLAP = 4.0
#: Below this time a device is in its instantaneous or current-limiting region. [s]
FAST_S = 0.1
LOG_POINTS = 24
S, N, U = 0, 1, 2
_KIND = {N: "not-selective", U: "not-shown"}


@dataclass(frozen=True, slots=True)
class OcRange:
    """A current range where the pair is not selective or not shown to be. [A]"""

    lo_a: float
    hi_a: float
    kind: Literal["not-selective", "not-shown"]

    def as_json(self) -> dict[str, Any]:
        return {"lo_a": self.lo_a, "hi_a": self.hi_a, "kind": self.kind}

    def text(self) -> str:
        return f"{fmt_a(self.lo_a)} to {fmt_a(self.hi_a)} ({self.kind})"


@dataclass(slots=True)
class OcPair:
    """A series pair of overcurrent devices (upstream above downstream) and its verdict.

    Treat as read-only (not frozen only because frozen construction is slow at scale).
    """

    up: str
    down: str
    verdict: Verdict
    limit_a: float | None
    lo_a: float
    i_max_a: float
    ranges: tuple[OcRange, ...]
    basis: Literal["standard", "maker"]
    explanation: str
    data: tuple[str, ...]

    def as_json(self) -> dict[str, Any]:
        return {
            "up": self.up,
            "down": self.down,
            "verdict": self.verdict,
            "limit_a": self.limit_a,
            "i_max_a": self.i_max_a,
            "ranges": [r.as_json() for r in self.ranges],
            "basis": self.basis,
            "explanation": self.explanation,
        }


def fmt_a(value_a: float) -> str:
    """A current for people: '23.2 A', '820 A', '1.45 kA'."""
    if value_a >= 1000:
        return f"{value_a / 1000:.3g} kA"
    return f"{value_a:.3g} A" if value_a < 100 else f"{value_a:.0f} A"


@dataclass(frozen=True)
class PairInput:
    """What the judgement of one pair needs."""

    up_band: Band
    down_band: Band
    i_max_a: float
    maker_limit_a: float | None = None
    gg_rule: bool = False


@dataclass(frozen=True)
class Judged:
    """Per-sample classes of every pair on a shared layout (rows = pairs)."""

    currents_a: npt.NDArray[np.float64]
    cls: npt.NDArray[np.int8]
    tail: npt.NDArray[np.bool_]
    staircase_ok: npt.NDArray[np.bool_]
    is_mid: npt.NDArray[np.bool_]
    lo_a: npt.NDArray[np.float64]
    hi_a: npt.NDArray[np.float64]


def judge(items: list[PairInput]) -> Judged:
    """Classify every pair at every sample current (numpy, no loop over pairs).

    Each pair's samples hold every point of both bands inside its range, a
    log grid and the geometric midpoint of every gap.
    """
    p = len(items)
    ups, dns = _packed([it.up_band for it in items]), _packed([it.down_band for it in items])
    lo = np.array([it.down_band.non_trip_a for it in items])
    hi = np.maximum(np.array([it.i_max_a for it in items]), lo * (1 + 1e-9))
    limit = np.array([it.maker_limit_a if it.maker_limit_a else np.nan for it in items])
    # a maker's curve may start at any current above zero: a span too wide for a float
    # is infinite here, and every sample is clipped back into [lo, hi] below
    with np.errstate(over="ignore"):
        span = hi / lo
    grid = lo[:, None] * span[:, None] ** np.linspace(0.0, 1.0, LOG_POINTS)[None, :]
    parts = [lo[:, None], hi[:, None], grid, np.where(np.isnan(limit), lo, limit)[:, None]]
    for packed in (ups, dns):
        for lx, _ in (packed.min_est, packed.max_est, packed.min_rig, packed.max_rig):
            parts.append(10.0**lx)
    pts = np.sort(np.clip(np.concatenate(parts, axis=1), lo[:, None], hi[:, None]), axis=1)
    n = pts.shape[1]
    cur = np.empty((p, 2 * n - 1))
    cur[:, 0::2] = pts
    cur[:, 1::2] = np.sqrt(pts[:, :-1] * pts[:, 1:])
    is_mid = np.zeros(2 * n - 1, dtype=bool)
    is_mid[1::2] = True
    u = evaluate(ups, cur)
    d = evaluate(dns, cur)
    umin_e, umin_r, dmax_e, dmax_r = u["min_est"], u["min_rig"], d["max_est"], d["max_rig"]
    up_cannot = np.isinf(umin_e)
    rig = up_cannot | (umin_r > dmax_r)
    sel = rig | (umin_e >= MARGIN * dmax_e)
    fast = (dmax_e <= FAST_S) & ~sel
    notsel = ~sel & ~fast & np.isfinite(dmax_e) & (umin_e * OVERLAP <= dmax_e)
    cls = np.full(cur.shape, U, dtype=np.int8)
    cls[notsel] = N
    cls[sel] = S
    gg = np.array([it.gg_rule for it in items])[:, None]
    cls = np.where(gg, S, cls).astype(np.int8)
    has_limit = ~np.isnan(limit)[:, None]
    lim = np.where(has_limit, limit[:, None], np.inf)
    cls = np.where(has_limit & (cur <= lim), S, cls)
    cls = np.where(has_limit & (cur > lim), N, cls).astype(np.int8)
    tail = fast | (has_limit & (cur > lim))
    staircase_ok = (rig | gg).all(axis=1)
    return Judged(cur, cls, tail, staircase_ok, is_mid, lo, hi)


def _packed(bands: list[Band]) -> PackedBands:
    """The bands packed once per distinct band, then spread to the rows."""
    index: dict[int, int] = {}
    unique: list[Band] = []
    rows = np.empty(len(bands), dtype=np.intp)
    for i, b in enumerate(bands):
        k = index.get(id(b))
        if k is None:
            k = index[id(b)] = len(unique)
            unique.append(b)
        rows[i] = k
    return PackedBands.build(unique).take(rows)


def ranges_of(j: Judged, row: int) -> list[OcRange]:
    """The runs of one pair's samples that are not selective, as current ranges. [A]"""
    c = j.cls[row]
    cur = j.currents_a[row]
    out: list[OcRange] = []
    bad = np.flatnonzero(c != S)
    if bad.size == 0:
        return out
    s = c.shape[0]
    i = 0
    starts = bad
    while i < starts.size:
        a = int(starts[i])
        kind = int(c[a])
        b = a
        while b + 1 < s and c[b + 1] == kind:
            b += 1
        lo = cur[a - 1] if (j.is_mid[a] and a > 0) else cur[a]
        hi = cur[b + 1] if (j.is_mid[b] and b + 1 < s) else cur[b]
        if hi > lo * (1 + 1e-4):
            if out and out[-1].kind == _KIND[kind] and abs(out[-1].hi_a - lo) <= 1e-9 * lo:
                out[-1] = OcRange(out[-1].lo_a, float(hi), out[-1].kind)
            else:
                out.append(OcRange(float(lo), float(hi), _KIND[kind]))  # type: ignore[arg-type]
        while i < starts.size and starts[i] <= b:
            i += 1
    return out


def verdict_of(j: Judged, row: int, ranges: list[OcRange]) -> tuple[Verdict, float | None]:
    """The pair's verdict and the current up to which it is selective (None: not even at the start)."""
    c = j.cls[row]
    hi = float(j.hi_a[row])
    if not ranges:
        return "selective", hi
    first = ranges[0].lo_a
    limit = first if first > float(j.lo_a[row]) * (1 + 1e-9) else None
    bad = c != S
    if limit is not None and bool(j.tail[row][bad].all()):
        return "partial", limit
    if bool((c == N).any()):
        return "not-selective", limit
    return "not-shown", limit


def gg_rule_applies(up: Any, down: Any) -> bool:
    """Both gG links of 16 A or more, upstream at least 1.6 times downstream.

    References
    ----------
    IEC 60269-1 7.8 (clause from memory; the 1.6:1 ratio confirmed); the
    trade's 2:1 rule is the conservative form.
    """
    if up.kind != "fuse" or down.kind != "fuse" or up.maker_curve or down.maker_curve:
        return False
    if up.fuse_type != "gG" or down.fuse_type != "gG":
        return False
    if down.rated_a < T.GG_SELECTIVE_FROM_A:
        return False
    return float(up.rated_a) >= T.GG_SELECTIVE_RATIO * float(down.rated_a) - 1e-9
