"""The vectorised bands agree with a plain scalar reading of IEC 61008-1 Table 1.

The scalar functions below are written from the table directly (practice note
section 2, step-function reading), independent of model/envelope.py.
"""

from __future__ import annotations

import math

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st

from model.rules.envelope import DeviceCurve, band_curve, pair_bands, unsafe_ranges

# IEC 61008-1 Ed.3 Table 1: (current as multiple of IΔn or absolute mA, general max, S max, S min) [ms]
COLUMNS = [
    ("x", 1, 300, 500, 130),
    ("x", 2, 150, 200, 60),
    ("x", 5, 40, 150, 50),
    ("a", 5000, 40, 150, 40),
    ("a", 500000, 40, 150, 40),
]


def cols(idn: float, delay: str = "S") -> list[tuple[float, float, float, float]]:
    out = [(v * idn if kind == "x" else v, g, smax, smin) for kind, v, g, smax, smin in COLUMNS]
    if delay != "S" and idn <= 30:
        # IEC 61008-1 Table 1 note: general devices of IΔn <= 30 mA may be tested
        # at 0.25 A instead of 5 IΔn, so 40 ms is guaranteed only from 250 mA
        out = [(250.0 if c[0] == 5 * idn else c[0], *c[1:]) for c in out]
    return sorted(out)


def scalar_max_break(idn: float, delay: str, i: float) -> float:
    ok = [c for c in cols(idn, delay) if c[0] <= i]
    if not ok:
        return math.inf
    at = [c for c in ok if c[0] == ok[-1][0]]  # columns tied at one current: the longer time
    return max(c[2] if delay == "S" else c[1] for c in at)


def scalar_min_nonact(idn: float, delay: str, i: float) -> float:
    if i <= 0.5 * idn:
        return math.inf
    if delay != "S":
        return 0.0
    ge = [c for c in cols(idn) if c[0] >= i] or cols(idn)[-1:]
    at = [c for c in ge if c[0] == ge[0][0]]  # columns tied at one current: the shorter time
    return min(c[3] for c in at)


IDN = st.sampled_from([10.0, 30.0, 100.0, 300.0, 500.0, 1000.0])


@settings(max_examples=300, deadline=None)
@given(idn=IDN, s_type=st.booleans(), i=st.floats(min_value=1.0, max_value=600_000.0))
def test_band_curve_matches_scalar_table_reading(idn: float, s_type: bool, i: float) -> None:
    delay = "S" if (s_type and idn > 30) else "general"
    lo, hi = band_curve(DeviceCurve(idn, delay), np.array([i]))
    assert lo[0] == scalar_min_nonact(idn, delay, i)
    assert hi[0] == scalar_max_break(idn, delay, i)


@settings(max_examples=150, deadline=None)
@given(
    up=IDN,
    up_s=st.booleans(),
    down=IDN,
    imax=st.floats(min_value=50.0, max_value=600_000.0),
    probe=st.floats(min_value=0.0, max_value=1.0),
)
def test_unsafe_ranges_match_pointwise_definition(
    up: float, up_s: bool, down: float, imax: float, probe: float
) -> None:
    ud = "S" if (up_s and up > 30) else "general"
    lo_ma = 0.5 * min(up, down)  # below half the smaller IΔn neither device can trip
    if imax <= lo_ma:
        return
    ranges = unsafe_ranges(pair_bands([DeviceCurve(up, ud)], [DeviceCurve(down)], [imax]), 0)
    # a current strictly inside the grid: selective by definition iff the upstream
    # cannot trip or its minimum time is at least the downstream maximum time
    i = lo_ma * (imax / lo_ma) ** probe
    u, d = scalar_min_nonact(up, ud, i), scalar_max_break(down, "general", i)
    selective = math.isinf(u) or u >= d
    inside = any(a < i < b for a, b in ranges)
    at_edge = any(math.isclose(i, a) or math.isclose(i, b) for a, b in ranges)
    if not at_edge:
        assert inside is (not selective)
