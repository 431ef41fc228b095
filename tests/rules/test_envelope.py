"""Band-overlap computation against hand-computed expectations from IEC 61008-1 Table 1.

Step-function reading of Table 1 (practice note section 2): maximum break time
at IΔ is the value at the largest tabulated current <= IΔ (no trip guaranteed
below IΔn); minimum non-actuating time at IΔ is the value at the smallest
tabulated current >= IΔ (below IΔn the IΔn value: an assumption); at or below
0.5 IΔn a device cannot trip (IΔno).
"""

from __future__ import annotations

import numpy as np
import pytest
from numpy.testing import assert_allclose
from sitekit import rcd, rules_of, run, visit

from model.rules.envelope import (
    DeviceCurve,
    all_unsafe_ranges,
    band_curve,
    has_unsafe,
    pair_bands,
    unsafe_ranges,
)

FULL = 500_000.0  # 500 A, the upper current of IEC 61008-1 Table 1, in mA


def ranges(up: DeviceCurve, down: DeviceCurve, imax: float = FULL) -> list[tuple[float, float]]:
    return unsafe_ranges(pair_bands([up], [down], [imax]), 0)


def test_100_s_over_30_general_overlaps_50_to_250_ma() -> None:
    # Hand computation (IEC 61008-1 Table 1 and its note): the 100 mA S device
    # cannot trip up to 50 mA; from 50 to 60 mA the 30 mA device may take 300 ms
    # while the S device may trip after 130 ms; from 60 mA the 30 mA device may
    # take 150 ms until 250 mA (the note lets 0.25 A replace 5 IΔn = 150 mA, so
    # 40 ms is guaranteed only from 250 mA) against 130 / 60 / 50 ms; from 250 mA
    # 40 ms against >= 50 / 40 ms: selective (equal counts).
    got = ranges(DeviceCurve(100, "S"), DeviceCurve(30))
    assert_allclose(got, [(50.0, 250.0)], rtol=1e-12)


def test_300_s_over_30_general_unguaranteed_150_to_250_ma() -> None:
    # IEC 61008-1 Table 1 note read conservatively: 300 mA S can trip after
    # 130 ms from 150 mA, the 30 mA device may take 150 ms up to 250 mA
    assert_allclose(ranges(DeviceCurve(300, "S"), DeviceCurve(30)), [(150.0, 250.0)], rtol=1e-12)
    # near miss: 500 mA S cannot trip up to 250 mA, where the 30 mA device clears in 40 ms
    assert ranges(DeviceCurve(500, "S"), DeviceCurve(30)) == []


def test_five_x_confirmed_downstream_uses_the_5_idn_step() -> None:
    # IEC 61008-1 Table 1: with a site test at 5 IΔn within 40 ms the 40 ms step
    # is at 150 mA, and 100 mA S over 30 mA is unguaranteed only 50-150 mA
    confirmed = DeviceCurve(30, five_x_confirmed=True)
    assert_allclose(ranges(DeviceCurve(100, "S"), confirmed), [(50.0, 150.0)], rtol=1e-12)
    assert ranges(DeviceCurve(300, "S"), confirmed) == []


def test_more_sensitive_upstream_starts_at_half_its_own_idn() -> None:
    # IEC 61008-1 IΔno = 0.5 IΔn: a 30 mA general device above a 100 mA S one may
    # trip from 15 mA, where the downstream device cannot trip at all
    got = ranges(DeviceCurve(30), DeviceCurve(100, "S"))
    assert_allclose(got, [(15.0, FULL)], rtol=1e-12)
    # near miss: a 300 mA upstream general device is unguaranteed only from 150 mA
    assert ranges(DeviceCurve(300), DeviceCurve(100, "S"))[0][0] == 150.0


def test_300_general_over_100_s_overlaps_from_150_ma_up() -> None:
    # A general upstream device has no minimum time: from 0.5 × 300 = 150 mA up
    # to the largest fault current both may trip.
    got = ranges(DeviceCurve(300), DeviceCurve(100, "S"))
    assert_allclose(got, [(150.0, FULL)], rtol=1e-12)


def test_range_is_clipped_to_the_prospective_fault_current() -> None:
    # TT, U0 / RA = 230 V / 1000 Ω = 230 mA: the 150 mA-and-up range stops there
    got = ranges(DeviceCurve(300), DeviceCurve(100, "S"), imax=230.0)
    assert_allclose(got, [(150.0, 230.0)], rtol=1e-12)


def test_trade_fact_100ma_upstream_cannot_trip_at_30ma() -> None:
    # common practice (IEC 61008-1 IΔno = 0.5 IΔn): at 30 mA residual current a
    # 100 mA device is in its no-trip zone
    lo, hi = band_curve(DeviceCurve(100, "S"), np.array([30.0, 50.0, 50.0001]))
    assert np.isinf(lo[0]) and np.isinf(lo[1])
    assert lo[2] == 130.0


def test_band_curve_values_follow_table_1() -> None:
    # IEC 61008-1 Table 1, general 30 mA: no guaranteed trip below 30 mA;
    # 300 ms at 30-59 mA, 150 ms at 60-249 mA, 40 ms from 250 mA (Table 1 note:
    # 0.25 A may replace 5 IΔn for IΔn <= 30 mA)
    i = np.array([29.0, 30.0, 59.0, 60.0, 149.0, 150.0, 249.0, 250.0, 5000.0])
    _, hi = band_curve(DeviceCurve(30), i)
    assert np.isinf(hi[0])
    assert_allclose(hi[1:], [300, 300, 150, 150, 150, 150, 40, 40])
    # near miss: a 100 mA general device is read at 5 IΔn = 500 mA as tabulated
    _, hi100 = band_curve(DeviceCurve(100), np.array([499.0, 500.0]))
    assert_allclose(hi100, [150, 40])


def test_vectorised_over_many_pairs_equals_one_by_one() -> None:
    rng = np.random.default_rng(7)
    idns = [10, 30, 100, 300, 500, 1000]
    ups = [
        DeviceCurve(float(rng.choice(idns[1:])), str(rng.choice(["general", "S"])))
        for _ in range(40)
    ]
    downs = [DeviceCurve(float(rng.choice(idns[:4]))) for _ in range(40)]
    ups = [u if (u.delay != "S" or u.idn_ma > 30) else DeviceCurve(u.idn_ma) for u in ups]
    imax = [float(x) for x in rng.uniform(100, 600_000, 40)]
    many = pair_bands(ups, downs, imax)
    any_open = has_unsafe(many)
    every = all_unsafe_ranges(many)
    for i in range(40):
        assert every[i] == unsafe_ranges(many, i)
        assert unsafe_ranges(many, i) == ranges(ups[i], downs[i], imax[i])
        assert bool(any_open[i]) is bool(unsafe_ranges(many, i))


@pytest.fixture
def s_over_30() -> list[dict]:
    return [
        rcd("up", "o", 100, delay="S", rated_a=63),
        rcd("dn", "up", 30, kind="rcbo", rated_a=20),
        {"id": "c", "parent": "dn", "kind": "circuit", "use": "other"},
    ]


def test_band_overlap_finding_and_its_near_miss(s_over_30: list[dict]) -> None:
    # 100 mA S over 30 mA: passes the 3:1 rule yet the bands overlap (50-150 mA)
    res = run(s_over_30)
    assert not rules_of(res, "cascade.ratio-below-3")
    assert not rules_of(res, "cascade.upstream-not-delayed")  # common practice: 3:1 with S passes
    (f,) = rules_of(res, "cascade.band-overlap")
    # the pair meets BS 7671 536.4.1.4 (3:1 and a delay): not "not selective", but
    # not guaranteed by IEC 61008-1 Table 1 (and its 0.25 A note); untested: investigate
    assert f.nodes == ("up", "dn") and f.severity == "investigate"
    assert "not guaranteed between 50 mA and 250 mA; confirm by testing both devices" in f.message
    assert res.pairs[0].verdict == "not-guaranteed"
    # the action fits a delayed upstream device with 3:1: no "add a time delay"
    assert "time delay" not in f.action and "time-delayed" not in f.action
    assert "upstream device of 500 mA type S would clear the bands" in f.action
    # near miss: 500 mA S over 30 mA is selective across the whole range
    s_over_30[0]["idn_ma"] = 500.0
    assert not rules_of(run(s_over_30), "cascade.band-overlap")


def test_readings_show_selectivity_in_practice(s_over_30: list[dict]) -> None:
    # downstream slowest at <= 50 mA (its 1× test at 30 mA): 28 ms; upstream
    # fastest at >= 150 mA (its 5× test at 500 mA): 60 ms -> margin 32 ms
    v = visit(
        {
            "up": {"x1_0": 250.0, "x1_180": 260.0, "x5_0": 60.0, "x5_180": 64.0},
            "dn": {"x1_0": 25.0, "x1_180": 28.0, "x5_0": 10.0},
        }
    )
    res = run(s_over_30, [v])
    assert not rules_of(res, "cascade.band-overlap")
    (p,) = res.pairs
    assert p.verdict == "selective-in-practice"
    assert p.measured is not None and p.measured.margin_ms == 32.0
    assert (p.measured.down_slowest_ms, p.measured.up_fastest_ms) == (28.0, 60.0)


def test_readings_without_margin_keep_the_finding(s_over_30: list[dict]) -> None:
    v = visit(
        {
            "up": {"x1_0": 250.0, "x5_0": 60.0},
            "dn": {"x1_0": 60.0, "x1_180": 61.0},  # slower than the upstream at 5×
        }
    )
    res = run(s_over_30, [v])
    (f,) = rules_of(res, "cascade.band-overlap")
    assert res.pairs[0].measured is not None and res.pairs[0].measured.selective is False
    # rule met, bands open, readings show no margin: advisory, not "not selective"
    assert res.pairs[0].verdict == "not-guaranteed" and f.severity == "advisory"
    assert "the readings show no margin" in f.message


def test_did_not_trip_downstream_is_never_selective_in_practice(s_over_30: list[dict]) -> None:
    v = visit({"up": {"x1_0": 250.0, "x5_0": 60.0}, "dn": {"x1_0": "did not trip"}})
    res = run(s_over_30, [v])
    assert res.pairs[0].verdict == "not-guaranteed"
