"""Selectivity verdicts, disconnection by Zs and breaking capacity, against published values.

Sources are named beside each check: IEC 60898-1 Table 7, IEC 60269-1 Tables 2, 3, 7 and
7.8, BS 7671 Table 41.1 / 411.4.4 / Appendix 3 and 434.5.1; values from memory say so.
"""

from __future__ import annotations

import json
from typing import Any

import pytest
from sitekit import build, circuit, node, rcd, rules_of, run

from model.rules.checks import analyse


def _pair(up: dict[str, Any], down: dict[str, Any], pscc_ka: float = 1.0):
    result = run(
        [node("u", "o", **up), node("b", "u", "board", pscc_ka=pscc_ka), node("d", "b", **down)]
    )
    (pair,) = result.oc_pairs
    return pair, result


def gg(rated: float) -> dict[str, Any]:
    return {"kind": "fuse", "fuse_type": "gG", "rated_a": float(rated)}


def mcb(curve: str, rated: float, **kw: Any) -> dict[str, Any]:
    return {"kind": "mcb", "curve": curve, "rated_a": float(rated), **kw}


def test_gg_100_over_32_is_selective() -> None:
    # IEC 60269-1 7.8 (clause from memory): gG links >= 16 A in the ratio 1.6:1 are selective
    pair, result = _pair(gg(100), gg(32), pscc_ka=16.0)
    assert pair.verdict == "selective" and pair.limit_a == pytest.approx(16_000)
    assert pair.ranges == () and not rules_of(result, "overcurrent.not-selective")


def test_gg_40_over_32_is_not_selective() -> None:
    # IEC 60269-1 Table 3 gates (from memory): 32 A may take 5 s at 150 A, 40 A may melt
    # in about 1.2 s there (estimate), so the upstream link may melt first
    pair, result = _pair(gg(40), gg(32))
    assert pair.verdict == "not-selective"
    bad = [r for r in pair.ranges if r.kind == "not-selective"]
    assert bad and bad[0].lo_a <= 150 <= bad[0].hi_a
    (f,) = rules_of(result, "overcurrent.not-selective")
    assert f.severity == "advisory" and f.nodes == ("u", "d") and "from memory" in f.source


def test_b16_under_a_20_a_fuse_is_never_called_selective() -> None:
    # common practice: a main 20 A fuse blows with a B16 downstream; at 70 A the fuse may
    # melt in 0.9 s (estimate between gates) while the B16 may take 23 s (IEC 60898-1 Table 7)
    pair, _ = _pair(gg(20), mcb("B", 16))
    assert pair.verdict == "not-selective"
    assert any(r.kind == "not-selective" and r.lo_a <= 70 <= r.hi_a for r in pair.ranges)


def test_b16_under_32_a_fuse_cannot_be_shown_near_5_in() -> None:
    # practice note 6.4 (derived): the worst corners overlap just below 5 In (about 68-80 A)
    pair, result = _pair(gg(32), mcb("B", 16))
    assert pair.verdict == "not-shown"
    assert any(r.lo_a <= 70 <= r.hi_a and r.kind == "not-shown" for r in pair.ranges)
    (f,) = rules_of(result, "overcurrent.selectivity-not-shown")
    assert f.severity == "investigate"


def test_b16_under_40_a_fuse_is_partial_up_to_the_fuses_fast_region() -> None:
    # practice note 6.4: shown by the estimated bands over the time-current region; above it
    # (towards Imin(0.1 s) = 260 A, IEC 60269-1 Table 3) only I²t data can decide
    pair, result = _pair(gg(40), mcb("B", 16))
    assert pair.verdict == "partial"
    assert pair.limit_a is not None and 150 < pair.limit_a <= 260
    assert all(r.kind == "not-shown" for r in pair.ranges)
    assert not rules_of(result, "overcurrent.not-selective")
    assert not rules_of(result, "overcurrent.selectivity-not-shown")


def test_b16_under_100_a_fuse_is_selective_below_the_fuses_fast_region() -> None:
    # IEC 60269-1 Table 3 (from memory): 100 A gG Imin(0.1 s) = 820 A; B16 trips within 0.1 s
    # from 80 A (IEC 60898-1 Table 7 test e)
    pair, _ = _pair(gg(100), mcb("B", 16), pscc_ka=0.5)
    assert pair.verdict == "selective" and pair.basis == "standard"
    assert "not by the staircase" in pair.explanation


def test_makers_selectivity_limit_decides_above_the_bands() -> None:
    down = mcb("B", 16, maker_selectivity=[{"upstream": "u", "limit_a": 3000.0, "source": "T4"}])
    pair, _ = _pair(gg(40), down, pscc_ka=2.0)
    assert pair.verdict == "selective" and pair.basis == "maker"
    pair, _ = _pair(gg(40), down, pscc_ka=6.0)
    assert pair.verdict == "partial" and pair.limit_a == pytest.approx(3000.0)
    assert pair.ranges[-1].kind == "not-selective" and pair.ranges[-1].hi_a == pytest.approx(6000)


def test_unknown_family_is_not_shown_and_says_what_would_settle_it() -> None:
    pair, _ = _pair({"kind": "fuse", "fuse_type": "bs3036", "rated_a": 30.0}, mcb("B", 6))
    assert pair.verdict == "not-shown" and pair.limit_a is None
    assert "maker_curve" in pair.explanation


def test_range_runs_from_downstream_non_tripping_current_to_the_fault_level() -> None:
    # IEC 60898-1 Table 7 test a: 1.13 In; the fault level of the downstream device's board
    pair, _ = _pair(gg(40), mcb("B", 16), pscc_ka=1.5)
    assert pair.lo_a == pytest.approx(1.13 * 16) and pair.i_max_a == pytest.approx(1500)


def test_measured_fault_level_of_the_latest_visit_wins() -> None:
    nodes = [gg(63) | {"id": "u", "parent": "o"}, node("b", "u", "board", pscc_ka=1.0),
             node("d", "b", **mcb("B", 16))]  # fmt: skip
    visits = [
        {"id": "v1", "date": "2025-01-01", "measurements": {"b": {"pscc_ka": 4.0}}},
        {"id": "v2", "date": "2026-01-01", "measurements": {"b": {"pscc_ka": 2.5}}},
    ]
    (pair,) = analyse(build(nodes, visits)).oc_pairs
    assert pair.i_max_a == pytest.approx(2500)


def test_no_fault_level_uses_u0_over_ze_with_a_note() -> None:
    result = run([node("u", "o", **gg(63)), node("d", "u", **mcb("B", 16))], ze_ohm=0.23)
    (pair,) = result.oc_pairs
    assert pair.i_max_a == pytest.approx(1000.0)  # 230 V / 0.23 Ω
    assert any("U0 / Ze" in line for line in pair.data)


def test_check_json_carries_oc_pairs(tmp_path) -> None:
    _, result = _pair(gg(40), gg(32))
    doc = result.as_json()
    (p,) = doc["oc_pairs"]
    assert set(p) == {
        "up",
        "down",
        "verdict",
        "limit_a",
        "i_max_a",
        "ranges",
        "basis",
        "explanation",
    }
    assert {"lo_a", "hi_a", "kind"} == set(p["ranges"][0])
    json.dumps(doc)


# --- disconnection ---------------------------------------------------------------


def _zs(device: dict[str, Any], zs_ohm: float, use: str = "sockets", **info: Any):
    nodes = [node("d", "o", **device), circuit("c", "d", use, zs_ohm=zs_ohm)]
    result = run(nodes, **info)
    return result, result.oc.disconnection[0]


@pytest.mark.parametrize(
    "curve, rated, zs_max, cold",
    [
        # practice note 3.4 (derived: 0.95 × 230 / (k In)); BS 7671:2018 Table 41.3 as remembered
        ("B", 16, 2.73, 2.19),
        ("C", 32, 0.68, 0.55),
        ("D", 32, 0.34, 0.27),
    ],
)
def test_zs_maxima_and_their_cold_values(
    curve: str, rated: float, zs_max: float, cold: float
) -> None:
    _, row = _zs(mcb(curve, rated), 0.1)
    assert row.zs_max_ohm == pytest.approx(zs_max, abs=0.005)
    # BS 7671 Appendix 3, common practice: a cold reading against 0.8 × the maximum
    assert row.limit_ohm == pytest.approx(cold, abs=0.006)
    assert row.required_s == 0.4  # Table 41.1: TN, 230 V, final circuit


@pytest.mark.parametrize(
    "curve, rated, near_miss, fires",
    [("B", 16, 2.18, 2.20), ("C", 32, 0.54, 0.56), ("D", 32, 0.27, 0.28)],
)
def test_zs_fires_and_near_miss_per_curve(
    curve: str, rated: float, near_miss: float, fires: float
) -> None:
    # 0.8 × Cmin × U0 / Ia with Ia = 5/10/20 In (IEC 60898-1 Table 7 test e; BS 7671 411.4.4)
    ok, _ = _zs(mcb(curve, rated), near_miss)
    assert not rules_of(ok, "disconnection.zs-too-high")
    bad, _ = _zs(mcb(curve, rated), fires)
    (f,) = rules_of(bad, "disconnection.zs-too-high")
    assert f.severity == "required" and f.nodes == ("c", "d")
    assert f.basis == "common-practice" and "0.8" in f.message


def test_warm_measurement_is_compared_with_the_full_maximum() -> None:
    nodes = [node("d", "o", **mcb("B", 16)), circuit("c", "d", "sockets")]
    visits = [
        {"id": "v", "date": "2026-01-01", "measurements": {"c": {"zs_ohm": 2.5, "warm": True}}}
    ]
    result = analyse(build(nodes, visits))
    assert not rules_of(result, "disconnection.zs-too-high")  # 2.5 < 2.73 Ω
    assert result.oc.disconnection[0].mark == "pass"


def test_an_rcd_giving_disconnection_is_said_so_not_failed() -> None:
    nodes = [
        rcd("r", "o", 30, kind="rcbo", curve="B", rated_a=16.0),
        circuit("c", "r", "sockets", zs_ohm=5.0),
    ]
    result = run(nodes)
    assert not rules_of(result, "disconnection.zs-too-high")
    row = result.oc.disconnection[0]
    assert row.mark == "by RCD" and "residual-current" in row.note


def test_table_41_1_times() -> None:
    # BS 7671 Table 41.1: 0.2 s TT at 230 V; 5 s TN for circuits outside the final-circuit scope
    _, row = _zs(mcb("B", 16), 0.5, earthing="TT")
    assert row.required_s == 0.2
    _, row = _zs(mcb("C", 40), 0.2, use="fixed-equipment")
    assert row.required_s == 5.0


def test_gg_fuse_ia_from_the_gates_and_5_s_gate() -> None:
    # IEC 60269-1 Table 3 (from memory): at 5 s Ia is the Imax(5 s) gate, 65 A for 16 A
    _, row = _zs(gg(16), 0.5)
    assert 65 < row.ia_a < 150  # 0.4 s lies between the 5 s and 0.1 s gates
    # a 16 A fuse on a 5 s circuit would need an unusual use; test the function directly
    from model.rules.overcurrent.disconnection import ia_for
    from model.site.nodes import FuseNode

    fuse = FuseNode(id="f", parent="o", kind="fuse", fuse_type="gG", rated_a=16.0)
    assert ia_for(fuse, 5.0)[0] == pytest.approx(65.0)
    assert ia_for(fuse, 0.1)[0] == pytest.approx(150.0)
    # BS 7671 (2011) BS 88-2 16 A 0.4 s: 2.56 Ω, Ia 90 A; the gate estimate is on the safe side
    assert ia_for(fuse, 0.4)[0] > 90.0


def test_user_table_value_wins_and_unknown_device_is_investigated() -> None:
    res, row = _zs(mcb("B", 16, zs_max_ohm=2.0), 1.7)
    assert row.zs_max_ohm == 2.0 and row.mark == "too high"
    res, row = _zs({"kind": "fuse", "fuse_type": "bs3036", "rated_a": 30.0}, 1.0)
    assert row.mark == "not known"
    (f,) = rules_of(res, "disconnection.zs-not-shown")
    assert f.severity == "investigate"


def test_iec_rule_set_uses_cmin_1_and_two_thirds() -> None:
    _, row = _zs(mcb("B", 16), 0.1, rules="iec-60364")
    assert row.zs_max_ohm == pytest.approx(230 / 80)
    assert row.limit_ohm == pytest.approx(230 / 80 * 2 / 3)


# --- breaking capacity -------------------------------------------------------------


def _breaking(board: dict[str, Any], device: dict[str, Any]):
    return run(
        [
            node("cut", "o", **gg(100)),
            node("cu", "cut", "board", **board),
            node("m", "cu", **device),
        ]
    )


def test_breaking_capacity_below_fault_level_fires_and_near_miss() -> None:
    # BS 7671 434.5.1: Icn 6 kA at a 6.5 kA fault level is too low; 6 kA at 6 kA is not
    (f,) = rules_of(
        _breaking({"pscc_ka": 6.5}, mcb("B", 16, breaking_ka=6.0)), "breaking-capacity.too-low"
    )
    assert f.severity == "required" and f.nodes == ("m",)
    assert not rules_of(
        _breaking({"pscc_ka": 6.0}, mcb("B", 16, breaking_ka=6.0)), "breaking-capacity.too-low"
    )


def test_conditional_rating_or_backup_covers_it() -> None:
    # BS 7671 536.4.201 / BS EN 61439-3 Annex ZB: a consumer unit's 16 kA conditional rating
    res = _breaking({"pscc_ka": 12.0, "conditional_ka": 16.0}, mcb("B", 16, breaking_ka=6.0))
    assert not rules_of(res, "breaking-capacity.too-low")
    assert res.oc.breaking[0].mark == "covered"
    backup = [{"upstream": "cut", "up_to_ka": 16.0, "source": "maker's table"}]
    res = _breaking({"pscc_ka": 12.0}, mcb("B", 16, breaking_ka=6.0, maker_backup=backup))
    assert not rules_of(res, "breaking-capacity.too-low")
    res = _breaking({"pscc_ka": 20.0, "conditional_ka": 16.0}, mcb("B", 16, breaking_ka=6.0))
    assert rules_of(res, "breaking-capacity.too-low")


def test_a_breaker_rating_typed_as_almost_zero_gets_no_band_and_no_numeric_warning() -> None:
    # Found by the command fuzz: rated_a 1e-320 on an MCB made the pair's current span
    # overflow (a numpy warning on stderr). No breaker is rated so low (IEC 60898-1 sets
    # only the upper end, 125 A; makers start near 0.5 A, from memory): not shown, said why.
    import warnings

    with warnings.catch_warnings():
        warnings.simplefilter("error")
        pair, _ = _pair(gg(63), mcb("B", 1e-320))
    assert pair.verdict == "not-shown"
    assert "below any breaker" in pair.explanation


def test_a_makers_curve_from_a_tiny_current_is_judged_without_numeric_warnings() -> None:
    import warnings

    curve = [
        {"i_a": 1e-300, "min_s": 100.0, "max_s": 200.0},
        {"i_a": 100.0, "min_s": 0.01, "max_s": 0.02},
    ]
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        pair, _ = _pair(gg(63), mcb("B", 16, maker_curve=curve))
    assert pair.verdict in {"selective", "partial", "not-selective", "not-shown"}
