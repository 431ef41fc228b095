"""Hand-worked plans: one small site for each kind of finding the planner clears.

Each case asserts the exact plan (device, field, from, to) and what it clears,
with the source of the remedy beside it, and that a re-check of the site with
the plan made leaves no circuit without the 30 mA additional protection
BS 7671 411.3.3/411.3.4 require.  Every site here is invented.
"""

from __future__ import annotations

from typing import Any

from sitekit import build, circuit, node, rcd, visit

from model.plan.changes import REMOVED, REPLACED, Plan, apply_changes
from model.plan.search import make_plan
from model.rules.checks import analyse
from model.site.models import SiteFile

BOARD = node("b", "o", "board")


def fields(plan: Plan) -> list[tuple[str, str, Any, Any]]:
    return [(fc.node, fc.field, fc.before, fc.after) for dc in plan.changes for fc in dc.fields]


def cleared_rules(plan: Plan) -> set[str]:
    return {rule for dc in plan.changes for rule, _ in dc.clears}


def after_rules(site: SiteFile, plan: Plan) -> set[str]:
    return {f.rule for f in analyse(apply_changes(site, plan.changes)).findings}


def assert_additional_kept(site: SiteFile, plan: Plan) -> None:
    # BS 7671 411.3.3 / 411.3.4: no circuit is left without its 30 mA RCD.
    assert "coverage.additional-protection" not in after_rules(site, plan)


def test_type_ac_on_sockets_becomes_type_a() -> None:
    site = build(
        [
            BOARD,
            rcd("rc", "b", 30, waveform="AC", rated_a=63.0),
            node("m", "rc", "mcb", rated_a=32.0, curve="B"),
            circuit("c", "m", "sockets", rated_a=32.0),
        ]
    )
    plan = make_plan(site)
    # BS 7671 531.3.3: Type AC only for fixed equipment without DC; Type A is the least change.
    assert fields(plan) == [("rc", "waveform", "AC", "A")]
    assert plan.changes[0].clears == (("type.ac-unsuitable", ("rc", "c")),)
    assert "30 mA Type A RCCB" in plan.changes[0].text
    assert_additional_kept(site, plan)


def test_socket_circuit_without_rcd_gets_an_rcbo_of_the_same_curve_and_rating() -> None:
    site = build(
        [
            BOARD,
            node("m", "b", "mcb", rated_a=32.0, curve="B", label="Studio sockets"),
            circuit("c", "m", "sockets", rated_a=32.0),
        ]
    )
    plan = make_plan(site)
    # BS 7671 411.3.3: sockets up to 32 A need an RCD of 30 mA or less; IEC 61009-1 RCBO.
    assert fields(plan) == [
        ("m", "kind", "mcb", "rcbo"),
        ("m", "idn_ma", None, 30.0),
        ("m", "waveform", None, "A"),
        ("m", "delay", None, "general"),
    ]
    assert plan.changes[0].text == ('change MCB "Studio sockets" (B32) to a 30 mA Type A RCBO B32')
    assert cleared_rules(plan) == {"coverage.additional-protection"}
    assert_additional_kept(site, plan)


def test_cascade_upstream_made_selective_keeps_30_ma_on_the_sockets_below() -> None:
    # A 30 mA Type AC RCCB over a 30 mA RCBO and a socket circuit on an MCB: the only
    # way to selectivity is a delayed upstream device of larger IΔn, which takes the
    # sockets' 30 mA protection away unless their MCB becomes a 30 mA RCBO.
    site = build(
        [
            BOARD,
            rcd("rcs", "b", 30, waveform="AC", rated_a=63.0, label="Studio RCCB"),
            node("ms", "rcs", "mcb", rated_a=32.0, curve="B", label="Studio sockets"),
            circuit("cs", "ms", "sockets", rated_a=32.0),
            rcd("rk", "rcs", 30, kind="rcbo", rated_a=32.0, curve="B", label="Kiln"),
            circuit("ck", "rk", "fixed-equipment", rated_a=32.0),
        ]
    )
    plan = make_plan(site)
    # BS 7671 536.4.1.4 (common practice): upstream type S and IΔn(up) ≥ 3 × IΔn(down);
    # IEC 61008-1 Table 1 with its 0.25 A note: only 500 mA S clears the 30 mA device's
    # band (no trip below 250 mA, where the 30 mA device breaks within 40 ms);
    # IEC 61008-1: type S for IΔn > 30 mA and In ≥ 25 A (63 A here).
    assert fields(plan) == [
        ("rcs", "idn_ma", 30.0, 500.0),
        ("rcs", "waveform", "AC", "A"),
        ("rcs", "delay", "general", "S"),
        ("ms", "kind", "mcb", "rcbo"),
        ("ms", "idn_ma", None, 30.0),
        ("ms", "waveform", None, "A"),
        ("ms", "delay", None, "general"),
    ]
    assert plan.changes[0].text == (
        'replace RCCB "Studio RCCB" (30 mA, Type AC, general) with a 500 mA Type A type S RCCB'
    )
    assert plan.changes[1].text.startswith(
        'change MCB "Studio sockets" (B32) to a 30 mA Type A RCBO B32; keeps the 30 mA'
    )
    assert cleared_rules(plan) == {
        "type.ac-unsuitable",
        "cascade.band-overlap",
        "cascade.ratio-below-3",
        "cascade.upstream-not-delayed",
    }
    # BS 7671 411.3.3: the sockets keep a 30 mA device (now their own RCBO).
    assert_additional_kept(site, plan)


def test_a_socket_rcd_that_only_repeats_the_rcd_above_is_removed() -> None:
    site = build(
        [
            BOARD,
            rcd("rc", "b", 30, rated_a=63.0),
            node("m", "rc", "mcb", rated_a=32.0, curve="B"),
            circuit("c", "m", "sockets", rated_a=32.0),
            rcd("sr", "c", 30, kind="srcd", label="Kettle point"),
            circuit("c2", "sr", "sockets"),
        ]
    )
    plan = make_plan(site)
    # Common practice: the 30 mA Type A RCCB above already gives the same protection; one
    # removal clears the three cascade findings and is no new device.
    assert fields(plan) == [("sr", REMOVED, "srcd", None)]
    assert cleared_rules(plan) == {
        "cascade.band-overlap",
        "cascade.ratio-below-3",
        "cascade.upstream-not-delayed",
    }
    assert_additional_kept(site, plan)


def test_gg_fuse_pair_below_1_6_to_1_gets_the_next_upstream_rating() -> None:
    site = build(
        [
            BOARD,
            node("f1", "b", "fuse", fuse_type="gG", rated_a=32.0, label="Sub-main fuse"),
            node("b2", "f1", "board"),
            node("f2", "b2", "fuse", fuse_type="gG", rated_a=25.0),
            circuit("c", "f2", "fixed-equipment", rated_a=25.0),
        ]
    )
    plan = make_plan(site)
    # IEC 60269-1 (gG links 1.6:1 or more are selective): 40 / 25 = 1.6; 32 / 25 = 1.28.
    assert fields(plan) == [("f1", "rated_a", 32.0, 40.0)]
    assert cleared_rules(plan) == {"overcurrent.not-selective"}
    # BS 7671 433.1: a larger fuse needs its cable checked; the change says so.
    assert "433.1" in plan.changes[0].text


def test_breaking_capacity_below_the_fault_level_gets_the_next_standard_value() -> None:
    site = build(
        [
            node("b", "o", "board", pscc_ka=8.0),
            node("m", "b", "mcb", rated_a=16.0, curve="B", breaking_ka=6.0),
            circuit("c", "m", "fixed-equipment", rated_a=16.0),
        ]
    )
    plan = make_plan(site)
    # BS 7671 434.5.1: breaking capacity at least the fault level (8 kA);
    # IEC 60898-1 standard Icn values: 6 kA, then 10 kA.
    assert fields(plan) == [("m", "breaking_ka", 6.0, 10.0)]
    assert cleared_rules(plan) == {"breaking-capacity.too-low"}


def test_tt_circuit_without_rcd_gets_a_30_ma_rcbo() -> None:
    site = build(
        [
            BOARD,
            node("m", "b", "mcb", rated_a=16.0, curve="B"),
            circuit("c", "m", "fixed-equipment", rated_a=16.0),
        ],
        earthing="TT",
        ra_ohm=20.0,
    )
    plan = make_plan(site)
    # BS 7671 411.5: TT circuits need an RCD; 20 Ω × 30 mA = 0.6 V ≤ 50 V (411.5.3).
    assert fields(plan) == [
        ("m", "kind", "mcb", "rcbo"),
        ("m", "idn_ma", None, 30.0),
        ("m", "waveform", None, "A"),
        ("m", "delay", None, "general"),
    ]
    assert cleared_rules(plan) == {"earthing.tt-no-rcd"}
    assert "earthing.tt-ra" not in after_rules(site, plan)


def test_ev_charger_without_dc_detection_gets_a_type_b_rcbo() -> None:
    site = build(
        [
            BOARD,
            rcd("rb", "b", 30, kind="rcbo", rated_a=32.0, curve="B"),
            circuit("c", "rb", "ev-charger", rated_a=32.0, loads=["ev-no-dc-detect"]),
        ]
    )
    plan = make_plan(site)
    # BS 7671 722.531.3.101: without 6 mA DC detection in the charger, Type B.
    assert fields(plan) == [("rb", "waveform", "A", "B")]
    assert cleared_rules(plan) == {"type.dc-load"}
    assert_additional_kept(site, plan)


def test_a_device_that_did_not_trip_is_replaced_like_for_like() -> None:
    site = build(
        [
            BOARD,
            rcd("rb", "b", 30, kind="rcbo", rated_a=32.0, curve="B"),
            circuit("c", "rb", "sockets", rated_a=32.0),
        ],
        [visit({"rb": {"x1_0": "did not trip", "x1_180": "did not trip"}})],
    )
    plan = make_plan(site)
    # IEC 61008-1 Table 1: a device must trip at IΔn; one that did not is replaced
    # (common practice), and the new one tested after installation.
    assert fields(plan) == [("rb", REPLACED, "30 mA, Type A, general", "30 mA, Type A, general")]
    assert cleared_rules(plan) == {"reading.no-trip"}
    assert "like for like" in plan.changes[0].text
    assert_additional_kept(site, plan)


def test_findings_a_device_cannot_clear_remain_with_their_reason() -> None:
    site = build(
        [
            BOARD,
            node("m", "b", "mcb", rated_a=32.0, curve="B"),
            circuit("c", "m", "fixed-equipment", rated_a=32.0, zs_ohm=3.0),
        ]
    )
    before = {f.rule for f in analyse(site).findings}
    assert "disconnection.zs-too-high" in before  # BS 7671 Table 41.3: B32 limit 1.37 Ω
    plan = make_plan(site)
    # A Zs too high is a wiring matter: never cleared by a device (not even an RCBO).
    assert plan.changes == []
    left = {u.finding.rule: u.reason for u in plan.remaining}
    assert left["disconnection.zs-too-high"].startswith("needs a wiring change")


def test_the_supply_cutout_is_never_changed_and_the_reason_says_whose_it_is() -> None:
    site = build(
        [
            node("cut", "o", "fuse", fuse_type="gG", rated_a=63.0),
            node("b", "cut", "board"),
            node("m", "b", "mcb", rated_a=63.0, curve="B"),
            circuit("c", "m", "fixed-equipment", rated_a=63.0),
        ]
    )
    plan = make_plan(site)
    # Common practice: the cut-out fuse is the network operator's; a B63 under a 63 A
    # gG fuse is not selective (IEC 60269-1 gates against IEC 60898-1 Table 7).
    assert plan.changes == []
    [left] = plan.remaining
    assert left.finding.rule == "overcurrent.not-selective"
    assert "network operator" in left.reason


def test_leakage_over_30_percent_needs_a_board_change() -> None:
    site = build(
        [
            BOARD,
            rcd("ict", "b", 30, rated_a=63.0),
            node("m1", "ict", "mcb", rated_a=20.0, curve="B"),
            circuit("c1", "m1", "sockets", rated_a=20.0, leakage_ma=5.0),
            node("m2", "ict", "mcb", rated_a=20.0, curve="B"),
            circuit("c2", "m2", "sockets", rated_a=20.0, leakage_ma=5.0),
        ]
    )
    plan = make_plan(site)
    # BS 7671 531.3.2: 10 mA over 30 % of 30 mA (9 mA); a larger IΔn would take the
    # sockets' 30 mA protection (411.3.3), so no device change is offered.
    assert plan.changes == []
    reasons = {u.finding.rule: u.reason for u in plan.remaining}
    assert "split over more RCDs" in reasons["leakage.over-30pct"]


def test_type_a_upstream_of_a_type_b_becomes_type_b_and_selective() -> None:
    site = build(
        [
            BOARD,
            rcd("up", "b", 100, delay="S", rated_a=63.0),
            node("m", "up", "mcb", rated_a=16.0, curve="B"),
            circuit("c", "m", "fixed-equipment", rated_a=16.0),
            rcd("rb", "up", 30, kind="rcbo", waveform="B", rated_a=32.0, curve="B"),
            circuit("ev", "rb", "ev-charger", rated_a=32.0, loads=["ev-no-dc-detect"]),
        ]
    )
    plan = make_plan(site)
    # Makers' guidance from BS 7671 531.3.3: upstream of a Type B RCD, Type B (advisory);
    # IEC 61008-1 Table 1 with its 0.25 A note: a 500 mA type S device cannot trip below
    # 250 mA, where the 30 mA device is sure to break within 40 ms: one device clears both.
    assert fields(plan) == [("up", "idn_ma", 100.0, 500.0), ("up", "waveform", "A", "B")]
    assert cleared_rules(plan) == {"cascade.dc-blinding", "cascade.band-overlap"}
    assert_additional_kept(site, plan)


def test_a_failed_test_button_means_a_new_device_of_the_same_rating() -> None:
    site = build(
        [
            BOARD,
            rcd("rb", "b", 30, kind="rcbo", rated_a=32.0, curve="B"),
            circuit("c", "rb", "sockets", rated_a=32.0),
        ],
        [visit({"rb": {"x1_0": 25.0, "x1_180": 28.0, "button": "failed"}})],
    )
    plan = make_plan(site)
    # Common practice: a device whose test button does not trip it is replaced.
    assert fields(plan) == [("rb", REPLACED, "30 mA, Type A, general", "30 mA, Type A, general")]
    assert cleared_rules(plan) == {"reading.button-failed"}


def test_breaker_over_breaker_left_for_the_makers_tables() -> None:
    site = build(
        [
            BOARD,
            node("mm", "b", "mcb", rated_a=40.0, curve="B"),
            node("b2", "mm", "board"),
            node("m", "b2", "mcb", rated_a=32.0, curve="B"),
            circuit("c", "m", "fixed-equipment", rated_a=32.0),
        ]
    )
    plan = make_plan(site)
    # MCB under MCB: at best partial up to the upstream magnetic threshold (common
    # practice); neither B50/B63 nor a C or D curve shows it from IEC 60898-1 Table 7.
    assert plan.changes == []
    [left] = plan.remaining
    assert "selectivity tables" in left.reason
