"""``device_options``: the catalogue changes of one device, each checked on the whole site;
and how findings before and after a change are compared."""

from __future__ import annotations

import dataclasses

import pytest
from sitekit import SAMPLES, build, circuit, node, rcd

from model.plan.changes import apply_changes
from model.plan.evaluate import compare
from model.plan.search import device_options, make_plan
from model.rules.checks import analyse
from model.rules.findings import Finding
from model.storage.sites import load_site


def test_options_of_a_type_ac_rccb_say_what_each_clears_and_creates() -> None:
    site = load_site(SAMPLES / "oak-lane-house.json")
    options = device_options(site, "rc2")
    first = options[0]
    # BS 7671 531.3.3: Type A is the least change that clears the Type AC finding; the
    # device that tripped too slowly goes with the old one (IEC 61008-1 Table 1).
    assert [(fc.field, fc.before, fc.after) for fc in first.fields] == [("waveform", "AC", "A")]
    assert ("type.ac-unsuitable", ("rc2", "c-l2", "c-s2", "c-s3")) in first.clears
    assert ("reading.too-slow", ("rc2",)) in first.clears
    assert first.creates == ()
    # A trend is never claimed by a device change (it needs a test).
    assert all(rule != "reading.trend" for dc in options for rule, _ in dc.clears)
    # BS 7671 411.3.3: a 100 mA device takes the sockets' additional protection away.
    hundred = next(
        dc for dc in options if [(f.field, f.after) for f in dc.fields][:1] == [("idn_ma", 100.0)]
    )
    assert ("coverage.additional-protection", ("c-s2", "rc2")) in hundred.creates
    # Options that create nothing come first.
    flags = [bool(dc.creates) for dc in options]
    assert flags == sorted(flags)


def test_options_of_a_circuit_are_none_and_an_unknown_node_is_an_error() -> None:
    site = load_site(SAMPLES / "oak-lane-house.json")
    assert device_options(site, "c-s2") == []
    with pytest.raises(KeyError):
        device_options(site, "no-such-node")


def _f(rule: str, nodes: tuple[str, ...], severity: str = "required", msg: str = "m") -> Finding:
    return Finding(rule, severity, nodes, "b", msg, "a", "s")  # type: ignore[arg-type]


def test_compare_narrowed_worse_and_to_test() -> None:
    before = [
        _f("overcurrent.selectivity-not-shown", ("f", "m1", "m2"), "investigate"),
        _f("earthing.tt-ra", ("rc", "c1"), msg="RA × IΔn = 30 V"),
        _f("cascade.band-overlap", ("up", "down"), "advisory"),
    ]
    after = [
        _f("overcurrent.selectivity-not-shown", ("f", "m1"), "investigate"),  # narrowed
        _f("earthing.tt-ra", ("rc", "c1"), msg="RA × IΔn = 100 V"),  # a limit made worse
        _f("cascade.band-overlap", ("up", "down"), "required"),  # a worse severity
        _f("reading.missing", ("down",), "investigate"),  # the new device's test
    ]
    got = compare(before, after, ["down"])
    assert got.cleared == []
    assert [f.rule for f in got.created] == ["earthing.tt-ra", "cascade.band-overlap"]
    same = compare(before, [dataclasses.replace(before[1])], [])
    assert [f.rule for f in same.cleared] == [
        "overcurrent.selectivity-not-shown",
        "cascade.band-overlap",
    ]


def test_a_larger_idn_on_tt_is_seen_to_break_411_5_3() -> None:
    # TT with RA 150 Ω under a 300 mA type S RCD: 150 × 0.3 = 45 V meets 50 V; a
    # 500 mA device would give 75 V (BS 7671 411.5.3(ii)), so that option creates
    # earthing.tt-ra and the plan never takes it.
    site = build(
        [
            node("b", "o", "board"),
            rcd("up", "b", 300, delay="S", rated_a=63.0),
            node("m", "up", "mcb", rated_a=16.0, curve="B"),
            circuit("c", "m", "fixed-equipment", rated_a=16.0),
            rcd("rb", "up", 100, kind="rcbo", rated_a=16.0, curve="B"),
            circuit("c2", "rb", "fixed-equipment", rated_a=16.0),
        ],
        earthing="TT",
        ra_ohm=150.0,
    )
    five = [
        dc
        for dc in device_options(site, "up")
        if ("idn_ma", 500.0) in [(f.field, f.after) for f in dc.fields]
    ]
    assert five and all(("earthing.tt-ra", ("up", "c")) in dc.creates for dc in five)
    plan = make_plan(site)
    assert not [fc for dc in plan.changes for fc in dc.fields if fc.after == 500.0]


def test_a_move_the_whole_site_check_refuses_is_dropped(monkeypatch: pytest.MonkeyPatch) -> None:
    # Screening is only a guide: if it ever let through a change that creates a finding
    # on the whole site, the full check drops that move before the plan is offered.
    from model.plan import greedy
    from model.plan.moves import Move

    site = load_site(SAMPLES / "oak-lane-house.json")

    def bad_run(self: greedy.Search) -> None:
        good = next(c for c in self.choices("rc2") if c.values == (("waveform", "A"),))
        worse = next(c for c in self.choices("m8") if ("kind", "rcbo") in c.values)
        self.accept(Move((good,), frozenset(), 1, 2))
        # 100 mA on rc1: takes the 30 mA protection of BS 7671 411.3.3 from its sockets.
        bad = next(c for c in self.choices("rc1") if c.values == (("idn_ma", 100.0),))
        self.accept(Move((bad,), frozenset(), 1, 2))
        self.accept(Move((worse,), frozenset(), 1, 3))

    monkeypatch.setattr(greedy.Search, "run", bad_run)
    plan = make_plan(site)
    assert [dc.node for dc in plan.changes] == ["rc2", "m8"]
    after = analyse(apply_changes(site, plan.changes))
    assert not [f for f in after.findings if f.rule == "coverage.additional-protection"]


def test_which_way_an_idn_change_can_help() -> None:
    from model.plan.moves import idn_ways

    pair = _f("cascade.ratio-below-3", ("up", "down"), "advisory")
    # BS 7671 536.4.1.4 (common practice): IΔn(up) ≥ 3 × IΔn(down): up goes up, down goes down.
    assert idn_ways(pair, "up") == {"same", "up"}
    assert idn_ways(pair, "down") == {"same", "down"}
    # BS 7671 411.3.3: additional protection needs 30 mA or less; 531.3.2: leakage a larger IΔn.
    assert idn_ways(_f("coverage.additional-protection", ("c", "rc")), "rc") == {"same", "down"}
    assert idn_ways(_f("leakage.over-30pct", ("rc",)), "rc") == {"same", "up"}
