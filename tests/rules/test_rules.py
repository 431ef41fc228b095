"""Each rule: a case that fires and a near miss that does not, with the source it rests on."""

from __future__ import annotations

from typing import Any

import pytest
from sitekit import SAMPLES, circuit, node, rcd, rules_of, run, visit

from model.rules.checks import analyse
from model.site.tree import SiteIndex
from model.storage.sites import load_site


# ---------------------------------------------------------------- cascades
def pair(up: dict[str, Any], down_idn: float = 30) -> list[dict[str, Any]]:
    return [up, rcd("dn", "up", down_idn, kind="rcbo", rated_a=20), circuit("c", "dn")]


def test_upstream_not_delayed_fires_and_s_type_passes() -> None:
    # BS 7671 536.4.1.4 (common practice): the upstream device must be time-delayed
    res = run(pair(rcd("up", "o", 100, rated_a=63)))
    (f,) = rules_of(res, "cascade.upstream-not-delayed")
    assert f.nodes == ("up", "dn") and f.basis == "common-practice"
    assert not rules_of(
        run(pair(rcd("up", "o", 100, delay="S", rated_a=63))), "cascade.upstream-not-delayed"
    )


@pytest.mark.parametrize(
    ("up_idn", "down_idn", "fires"),
    [
        (90, 30, False),  # exactly 3:1 passes (BS 7671 536.4.1.4, common practice)
        (87, 30, True),  # 2.9:1 fails
        (300, 100, False),  # 3:1
        (290, 100, True),  # 2.9:1
    ],
)
def test_ratio_below_3(up_idn: float, down_idn: float, fires: bool) -> None:
    res = run(pair(rcd("up", "o", up_idn, delay="S", rated_a=63), down_idn))
    assert bool(rules_of(res, "cascade.ratio-below-3")) is fires


def test_dc_blinding_pair_and_near_miss() -> None:
    # manufacturers' guidance from BS 7671 531.3.3 (advisory): Type A above Type B
    nodes = [
        rcd("up", "o", 300, delay="S", rated_a=63),
        rcd("dn", "up", 30, kind="rcbo", waveform="B"),
        circuit("c", "dn", "fixed-equipment", loads=["drive-3ph"]),
    ]
    (f,) = rules_of(run(nodes), "cascade.dc-blinding")
    assert f.severity == "advisory" and f.basis == "guidance"
    nodes[0]["waveform"] = "B"
    assert not rules_of(run(nodes), "cascade.dc-blinding")


def test_dc_blinding_of_other_circuits_by_a_dc_load() -> None:
    # a Type A device above a smooth-DC load also protecting another circuit
    nodes = [
        rcd("r", "o", 30, rated_a=63),
        node("m1", "r", "mcb", rated_a=20.0),
        circuit("pv", "m1", "fixed-equipment", loads=["inverter"]),
        node("m2", "r", "mcb", rated_a=20.0),
        circuit("s", "m2", "sockets"),
    ]
    res = run(nodes)
    (f,) = rules_of(res, "cascade.dc-blinding")
    assert f.nodes == ("r", "pv")
    # near miss: the device protects only the DC load
    assert not rules_of(run(nodes[:3]), "cascade.dc-blinding")


# ---------------------------------------------------------------- types
def test_type_ac_unsuitable_and_fixed_equipment_near_miss() -> None:
    # BS 7671 531.3.3: Type AC only for fixed equipment with no DC component
    nodes = [rcd("r", "o", 30, waveform="AC"), circuit("c", "r", "sockets", rated_a=32.0)]
    (f,) = rules_of(run(nodes), "type.ac-unsuitable")
    assert f.severity == "required"  # 531.3.3 applies: one severity, DC loads or not
    nodes[1] = circuit("c", "r", "sockets", rated_a=32.0, loads=["it-equipment"])
    assert rules_of(run(nodes), "type.ac-unsuitable")[0].severity == "required"
    nodes[1] = circuit("c", "r", "fixed-equipment")
    assert not rules_of(run(nodes), "type.ac-unsuitable")


@pytest.mark.parametrize(
    ("load", "path_waveform", "fires"),
    [
        ("ev-no-dc-detect", "A", True),  # BS 7671 722.531.3.101: Type B needed
        ("ev-no-dc-detect", "B", False),
        ("ev-dc-detect-6ma", "A", False),  # Type A with 6 mA DC detection in the charger
        ("drive-3ph", "F", True),  # smooth DC from a three-phase rectifier
        ("drive-1ph", "A", False),  # composite frequencies, not smooth DC
    ],
)
def test_type_dc_load(load: str, path_waveform: str, fires: bool) -> None:
    use = "ev-charger" if load.startswith("ev-") else "fixed-equipment"
    nodes = [
        rcd("r", "o", 30, kind="rcbo", waveform=path_waveform, rated_a=32.0),
        circuit("c", "r", use, rated_a=32.0, loads=[load]),
    ]
    assert bool(rules_of(run(nodes), "type.dc-load")) is fires


# ---------------------------------------------------------------- coverage
@pytest.mark.parametrize(
    ("kw", "fires"),
    [
        ({"use": "sockets", "rated_a": 32.0}, True),  # BS 7671 411.3.3(a): sockets <= 32 A
        ({"use": "sockets", "rated_a": 40.0}, False),  # above 32 A: not required by 411.3.3(a)
        ({"use": "lighting"}, True),  # BS 7671 411.3.4: domestic lighting
        ({"use": "cooker", "concealed_shallow": True}, True),  # BS 7671 522.6.202
        ({"use": "cooker"}, False),
        ({"use": "shower", "location": ["bathroom"]}, True),  # BS 7671 701.411.3.3
        ({"use": "outdoor", "rated_a": 16.0}, True),  # BS 7671 411.3.3(b)
        ({"use": "ev-charger"}, True),  # BS 7671 722.531.3.101
    ],
)
def test_additional_protection_without_rcd(kw: dict[str, Any], fires: bool) -> None:
    nodes = [node("m", "o", "mcb", rated_a=63.0), circuit("c", "m", **kw)]
    assert bool(rules_of(run(nodes), "coverage.additional-protection")) is fires


def test_additional_protection_counts_only_general_30ma() -> None:
    base = [circuit("c", "r", "sockets", rated_a=20.0)]
    # 30 mA general: satisfied (BS 7671 411.3.3, IΔn not exceeding 30 mA)
    assert not rules_of(run([rcd("r", "o", 30), *base]), "coverage.additional-protection")
    # 100 mA S: not additional protection
    assert rules_of(
        run([rcd("r", "o", 100, delay="S", rated_a=63), *base]), "coverage.additional-protection"
    )
    # an RCM gives no protection (IEC 62020 monitors only warn)
    rcm = node("r", "o", "rcm", idn_ma=30.0, waveform="A")
    assert rules_of(run([rcm, *base]), "coverage.additional-protection")


def test_lighting_rule_only_in_dwellings() -> None:
    nodes = [node("m", "o", "mcb", rated_a=6.0), circuit("c", "m", "lighting")]
    assert rules_of(run(nodes, domestic=True), "coverage.additional-protection")
    assert not rules_of(run(nodes, domestic=False), "coverage.additional-protection")


def test_iec_rule_set_presents_additional_protection_as_common_practice() -> None:
    nodes = [node("m", "o", "mcb", rated_a=20.0), circuit("c", "m", "sockets", rated_a=20.0)]
    (f,) = rules_of(run(nodes, rules="iec-60364"), "coverage.additional-protection")
    assert f.basis == "common-practice" and "common practice" in f.source


def test_no_overcurrent() -> None:
    # IEC 61008-1: an RCCB needs an overcurrent device upstream or on every circuit
    bare = [rcd("r", "o", 30), circuit("c1", "r", "heating")]
    assert rules_of(run(bare), "coverage.no-overcurrent")
    assert not rules_of(
        run(
            [
                node("f", "o", "fuse", rated_a=100.0),
                rcd("r", "f", 30),
                circuit("c1", "r", "heating"),
            ]
        ),
        "coverage.no-overcurrent",
    )
    assert not rules_of(
        run(
            [rcd("r", "o", 30), node("m", "r", "mcb", rated_a=16.0), circuit("c1", "m", "heating")]
        ),
        "coverage.no-overcurrent",
    )


# ---------------------------------------------------------------- earthing
def tt(ra: float | None, idn: float = 100, zs: float | None = None) -> Any:
    c = circuit("c", "r", "heating") if zs is None else circuit("c", "r", "heating", zs_ohm=zs)
    extra = {} if ra is None else {"ra_ohm": ra}
    return run(
        [rcd("r", "o", idn, delay="S" if idn > 30 else "general", rated_a=63), c],
        earthing="TT",
        **extra,
    )


def test_tt_ra_exactly_50_v_passes() -> None:
    # BS 7671 411.5.3(ii): RA × IΔn <= 50 V; 500 Ω × 100 mA = 50 V passes, 501 Ω fails
    assert not rules_of(tt(500.0), "earthing.tt-ra")
    (f,) = rules_of(tt(501.0), "earthing.tt-ra")
    # U0 / RA = 230 V / 501 Ω = 459 mA still operates a 100 mA device: required, not urgent
    assert f.severity == "required" and f.measured == "50.1 V"


def test_zs_limit_table_41_5() -> None:
    # BS 7671 Table 41.5: 100 mA -> 500 Ω
    assert not rules_of(tt(20.0, zs=500.0), "earthing.zs-limit")
    assert rules_of(tt(20.0, zs=501.0), "earthing.zs-limit")


def test_ra_unstable_over_200_ohm() -> None:
    # BS 7671 Table 41.5 Note 2
    assert not rules_of(tt(200.0), "earthing.ra-unstable")
    assert rules_of(tt(201.0), "earthing.ra-unstable")


def test_tt_no_rcd_and_ra_missing() -> None:
    nodes = [node("m", "o", "mcb", rated_a=16.0), circuit("c", "m", "heating")]
    assert rules_of(run(nodes, earthing="TT", ra_ohm=20.0), "earthing.tt-no-rcd")
    assert not rules_of(run(nodes, earthing="TN-S"), "earthing.tt-no-rcd")
    assert rules_of(tt(None), "earthing.ra-missing")
    assert not rules_of(tt(20.0), "earthing.ra-missing")


# ---------------------------------------------------------------- leakage, resilience
def test_leakage_exactly_30pct_passes() -> None:
    # BS 7671 531.3.2(iii): <= 30 % of IΔn, 9 mA for 30 mA
    def with_leak(a: float, b: float) -> Any:
        return run(
            [
                rcd("r", "o", 30, rated_a=63),
                node("m", "r", "mcb", rated_a=20.0),
                circuit("c1", "m", "fixed-equipment", leakage_ma=a),
                circuit("c2", "m", "fixed-equipment", leakage_ma=b),
            ]
        )

    assert not rules_of(with_leak(4.5, 4.5), "leakage.over-30pct")
    (f,) = rules_of(with_leak(4.5, 4.6), "leakage.over-30pct")
    assert f.nodes == ("r",)


def test_leakage_accumulates_through_downstream_devices() -> None:
    nodes = [
        rcd("up", "o", 100, delay="S", rated_a=63),
        rcd("dn", "up", 30, kind="rcbo"),
        circuit("c1", "dn", "fixed-equipment", leakage_ma=8.0),
        node("m", "up", "mcb", rated_a=20.0),
        circuit("c2", "m", "fixed-equipment", leakage_ma=23.0),
    ]
    # 31 mA through the 100 mA device (limit 30 mA); 8 mA through the 30 mA (limit 9 mA)
    (f,) = rules_of(run(nodes), "leakage.over-30pct")
    assert f.nodes == ("up",)


def test_lighting_on_one_rcd() -> None:
    # BS 7671 314.1/314.2: one fault should not put out all the lighting
    one = [
        rcd("r", "o", 30, rated_a=63),
        circuit("l1", "r", "lighting"),
        circuit("l2", "r", "lighting"),
    ]
    assert rules_of(run(one), "resilience.lighting-single-rcd")
    split = [
        rcd("r", "o", 30, rated_a=63),
        circuit("l1", "r", "lighting"),
        rcd("r2", "o", 30, rated_a=63),
        circuit("l2", "r2", "lighting"),
    ]
    assert not rules_of(run(split), "resilience.lighting-single-rcd")
    assert not rules_of(run(one[:2]), "resilience.lighting-single-rcd")  # only one lighting circuit


# ---------------------------------------------------------------- readings
def reading_run(reading: dict[str, Any], idn: float = 30, delay: str = "general") -> Any:
    nodes = [
        rcd("r", "o", idn, delay=delay, rated_a=63),
        node("m", "r", "mcb", rated_a=16.0),
        circuit("c", "m", "fixed-equipment"),
    ]
    return run(nodes, [visit({"r": reading})])


@pytest.mark.parametrize(
    ("reading", "rule"),
    [
        ({"x1_0": 300.0}, None),  # IEC 61008-1 Table 1: 300 ms at IΔn passes
        ({"x1_0": 300.5}, "reading.too-slow"),
        ({"x1_0": 20.0, "x1_180": 301.0}, "reading.too-slow"),  # worse of 0° / 180°
        ({"x1_0": 20.0, "x5_0": 40.0}, None),  # 40 ms at 5 IΔn passes
        ({"x1_0": 20.0, "x5_0": 41.0}, "reading.too-slow"),
        ({"x1_0": "did not trip"}, "reading.no-trip"),
        ({"x1_0": 20.0, "x5_180": "did not trip"}, "reading.no-trip"),
        ({"x1_0": 20.0, "half_0": "did not trip", "half_180": 150.0}, "reading.half-tripped"),
        ({"x1_0": 20.0, "half_0": "did not trip"}, None),
        ({"x1_0": 20.0, "ramp_ma": 30.0}, None),  # 30 mA device trips at or below 30 mA
        ({"x1_0": 20.0, "ramp_ma": 31.0}, "reading.ramp-out-of-band"),
        ({"x1_0": 20.0, "ramp_ma": 15.0}, "reading.ramp-out-of-band"),  # at IΔno = 0.5 IΔn
        ({"x1_0": 20.0, "ramp_ma": 15.5}, None),
        ({"x1_0": 20.0, "button": "failed"}, "reading.button-failed"),
        ({"x5_0": 20.0}, "reading.missing"),  # BS 7671 643.7.1: the 1× test is the required one
        ({"not_tested": "occupied"}, None),
    ],
)
def test_reading_rules_general(reading: dict[str, Any], rule: str | None) -> None:
    res = reading_run(reading)
    got = {f.rule for f in res.findings if f.rule.startswith("reading.")}
    assert got == ({rule} if rule else set())


@pytest.mark.parametrize(
    ("reading", "rule"),
    [
        ({"x1_0": 130.0, "x5_0": 50.0}, None),  # IEC 61008-1 Table 1: S 130 ms / 50 ms minimum
        ({"x1_0": 129.0}, "reading.too-fast"),
        ({"x1_0": 200.0, "x5_0": 49.0}, "reading.too-fast"),
        ({"x1_0": 500.0}, None),  # S: 500 ms maximum at IΔn
        ({"x1_0": 501.0}, "reading.too-slow"),
        ({"x1_0": 200.0, "x5_0": 151.0}, "reading.too-slow"),  # S: 150 ms at 5 IΔn
    ],
)
def test_reading_rules_type_s(reading: dict[str, Any], rule: str | None) -> None:
    res = reading_run(reading, idn=100, delay="S")
    got = {f.rule for f in res.findings if f.rule.startswith("reading.")}
    assert got == ({rule} if rule else set())


def test_half_wave_ramp_band_for_type_a() -> None:
    # IEC 61008-1 Type A, half-wave: 0.35-1.4 IΔn -> 10.5-42 mA for 30 mA; the
    # half-wave results alone leave the required AC test missing (BS 7671 643.7.1 note)
    assert {
        f.rule
        for f in reading_run({"x1_0": 20.0, "ramp_ma": 40.0, "waveform": "half-wave"}).findings
        if f.rule.startswith("reading.")
    } == {"reading.missing"}
    assert rules_of(
        reading_run({"x1_0": 20.0, "ramp_ma": 43.0, "waveform": "half-wave"}),
        "reading.ramp-out-of-band",
    )


def test_missing_reading_for_untested_device() -> None:
    res = run([rcd("r", "o", 30), circuit("c", "r", "fixed-equipment")], [visit({})])
    (f,) = rules_of(res, "reading.missing")
    assert f.nodes == ("r",) and f.visit == "v1"


def test_latest_visit_is_judged() -> None:
    nodes = [
        rcd("r", "o", 30, rated_a=63),
        node("m", "r", "mcb", rated_a=16.0),
        circuit("c", "m", "fixed-equipment"),
    ]
    old = visit({"r": {"x1_0": "did not trip"}}, id="a", date="2020-01-01")
    new = visit({"r": {"x1_0": 25.0}}, id="b", date="2026-01-01")
    assert not rules_of(run(nodes, [new, old]), "reading.no-trip")
    assert rules_of(
        run(nodes, [old, visit({"r": {"x1_0": "did not trip"}}, id="c", date="2026-02-02")]),
        "reading.no-trip",
    )


def test_iec_rule_set_quotes_iec_60364_for_installation_rules() -> None:
    nodes = [
        rcd("r", "o", 30, rated_a=63),
        node("m", "r", "mcb", rated_a=20.0),
        circuit("c1", "m", "fixed-equipment", leakage_ma=10.0),
    ]
    # BS 7671 531.3.2(iii) under the UK rule set; IEC 60364-5-53 531.3.2 (clause from memory) under IEC
    (uk,) = rules_of(run(nodes), "leakage.over-30pct")
    (iec,) = rules_of(run(nodes, rules="iec-60364"), "leakage.over-30pct")
    assert uk.source == "BS 7671 531.3.2(iii)"
    assert iec.source.startswith("IEC 60364-5-53 531.3.2") and "from memory" in iec.source


def test_analyse_uses_the_index_it_is_handed_and_refuses_one_of_another_site() -> None:
    """One tree index per analysis: the caller's, when it was built from the same site."""
    site = load_site(SAMPLES / "oak-lane-house.json")
    idx = SiteIndex.build(site)
    result = analyse(site, idx)
    assert result.index is idx
    assert [f.rule for f in result.findings] == [f.rule for f in analyse(site).findings]
    other = site.model_copy()
    with pytest.raises(ValueError, match="another version of the site"):
        analyse(other, idx)
