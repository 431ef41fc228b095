"""Pair verdicts in words that fit the pair: the 0.25 A note, a more sensitive upstream
device, "not guaranteed" against "not selective", and ratios printed without rounding up."""

from __future__ import annotations

from typing import Any

import pytest
from sitekit import circuit, rcd, rules_of, run, visit

from model.rules.findings import fmt_ratio


def pair(
    up_idn: float, up_delay: str = "S", down_idn: float = 30, down_delay: str = "general"
) -> list[dict[str, Any]]:
    return [
        rcd("up", "o", up_idn, delay=up_delay, rated_a=63),
        rcd("dn", "up", down_idn, kind="rcbo", rated_a=40, delay=down_delay),
        circuit("c", "dn"),
    ]


def test_five_x_reading_confirms_the_downstream_device() -> None:
    # IEC 61008-1 Table 1 note: 300 mA S over 30 mA general is unguaranteed from
    # 150 mA (the S device may trip after 130 ms) to 250 mA (the 30 mA device is
    # held to 40 ms only from 0.25 A).  A downstream 5 IΔn test within 40 ms
    # confirms the 30 mA device from 150 mA, and the bands then clear.
    untested = run(pair(300))
    (p,) = untested.pairs
    assert [(r.lo_ma, r.hi_ma) for r in p.ranges] == [(150.0, 250.0)]
    assert p.verdict == "not-guaranteed"
    (f,) = rules_of(untested, "cascade.band-overlap")
    assert f.severity == "investigate"
    assert (
        "5 IΔn test of the downstream device (150 mA) within 40 ms would close the gap" in f.action
    )
    confirmed = run(pair(300), [visit({"dn": {"x1_0": 20.0, "x5_0": 12.0, "x5_180": 14.0}})])
    (p,) = confirmed.pairs
    assert p.verdict == "selective-in-practice"
    assert "5 IΔn test (14 ms at 150 mA)" in p.explanation
    assert not rules_of(confirmed, "cascade.band-overlap")
    # near miss: a 5 IΔn reading over 40 ms confirms nothing (IEC 61008-1 Table 1: 40 ms)
    slow = run(pair(300), [visit({"dn": {"x1_0": 20.0, "x5_0": 41.0}})])
    assert slow.pairs[0].verdict != "selective-in-practice"


def test_note_does_not_apply_above_30_ma() -> None:
    # IEC 61008-1 Table 1 note applies to IΔn <= 30 mA only: 1000 mA S over 100 mA
    # general is read at 5 IΔn = 500 mA as tabulated; the bands clear
    (p,) = run(pair(1000, down_idn=100)).pairs
    assert p.verdict == "selective" and p.ranges == ()


def test_more_sensitive_upstream_from_half_its_own_idn() -> None:
    # IEC 61008-1 IΔno = 0.5 IΔn: 30 mA general above 100 mA S may trip from 15 mA
    res = run(pair(30, up_delay="general", down_idn=100, down_delay="S"))
    (p,) = res.pairs
    assert p.ranges[0].lo_ma == 15.0
    (f,) = rules_of(res, "cascade.band-overlap")
    assert "15 mA" in f.message and f.severity == "advisory"
    # the rule fails (not delayed, ratio 0.3:1): the action asks for both, fitted to the pair
    assert f.action.startswith("Use a time-delayed (type S) upstream device of at least three")
    # near miss: 300 mA general above 100 mA S starts at half the upstream's own 300 mA
    (q,) = run(pair(300, up_delay="general", down_idn=100, down_delay="S")).pairs
    assert q.ranges[0].lo_ma == 150.0


def test_rule_met_but_bands_open_is_not_guaranteed_not_not_selective() -> None:
    # BS 7671 536.4.1.4 (3:1 and a delay; common practice) met by 100 mA S over 30 mA,
    # but IEC 61008-1 Table 1 leaves 50-250 mA unguaranteed
    res = run(pair(100))
    (p,) = res.pairs
    assert p.rule_ok and p.verdict == "not-guaranteed"
    assert (
        p.explanation == "not guaranteed between 50 mA and 250 mA; confirm by testing both devices"
    )
    # the action never asks a delayed 3:1 upstream device for a delay and a greater IΔn
    assert "time-delayed" not in p.action and "three times" not in p.action
    assert "upstream device of 500 mA type S would clear the bands" in p.action
    # near miss: an undelayed upstream device fails the rule and stays "not selective"
    (q,) = run(pair(100, up_delay="general")).pairs
    assert q.verdict == "not-selective" and q.action.startswith("Use a time-delayed")
    assert "three times" not in q.action  # its ratio 3.33:1 already meets 3:1


@pytest.mark.parametrize(
    ("ratio", "text"),
    [
        (2.996, "2.99:1"),  # below 3 never prints as 3:1 (BS 7671 536.4.1.4, common practice)
        (3.0, "3:1"),
        (100 / 30, "3.33:1"),
        (10.0, "10:1"),
        (0.3, "0.3:1"),
    ],
)
def test_ratio_is_rounded_down(ratio: float, text: str) -> None:
    assert fmt_ratio(ratio) == text


def test_ratio_just_below_three_fires_and_prints_below_three() -> None:
    # 89.88 mA / 30 mA = 2.996:1, below 3:1 (BS 7671 536.4.1.4, common practice)
    res = run(pair(89.88))
    (f,) = rules_of(res, "cascade.ratio-below-3")
    assert "2.99:1" in f.message and "3:1, below" not in f.message and f.measured == "2.99:1"
