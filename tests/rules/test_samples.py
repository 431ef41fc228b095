"""The bundled (invented) sample sites: their expected findings, and every rule covered.

The expectations were worked out by hand from the published rules named in
tests/model/test_rules.py; the sample data itself is invented for the demo.
"""

from __future__ import annotations

import pytest
from sitekit import SAMPLES

from model.rules.checks import analyse
from model.storage.sites import load_site

EXPECTED: dict[str, set[tuple[str, tuple[str, ...]]]] = {
    "oak-lane-house": {
        ("reading.trend", ("rc2",)),  # 180 -> 312 ms at 1× 180°, and a pass turned to a fail
        ("coverage.additional-protection", ("c-out",)),
        ("reading.too-slow", ("rc2",)),
        ("type.ac-unsuitable", ("rc2", "c-l2", "c-s2", "c-s3")),
        ("type.dc-load", ("c-ev", "rb3", "rc3")),
        ("cascade.dc-blinding", ("rc3", "c-ev")),
        ("cascade.band-overlap", ("rc3", "rb2")),
        ("reading.missing", ("rb2",)),
        # overcurrent (BS 7671 536.4.1.2 desk study): C40 over B20 and B32 RCBOs overlap
        # on their IEC 60898-1 Table 7 bands; the cut-out fuse has no fuse_type recorded
        ("overcurrent.not-selective", ("m9", "rb1")),
        ("overcurrent.not-selective", ("m9", "rb3")),
        (
            "overcurrent.selectivity-not-shown",
            ("cutout", "m1", "m2", "m3", "m4", "m5", "m6", "m7", "m8", "m9", "rb1", "rb2", "rb3"),
        ),
    },
    "hollowmere-farm": {
        ("reading.trend", ("h2",)),  # passed in 2022, did not trip in 2026
        ("earthing.tt-ra", ("dairy-rc", "c-ds", "c-mc")),
        ("earthing.tt-no-rcd", ("c-yl",)),
        ("reading.no-trip", ("h2",)),
        ("coverage.additional-protection", ("c-ds", "dairy-rc")),
        ("earthing.zs-limit", ("c-mc", "dairy-rc")),
        ("reading.button-failed", ("prcd1",)),
        ("reading.ramp-out-of-band", ("dairy-rc",)),
        ("type.ac-unsuitable", ("dairy-rc", "c-ds", "c-pw", "c-mc")),
        ("coverage.additional-protection", ("c-yl",)),
        ("cascade.band-overlap", ("dairy-rc", "prcd1")),
        ("cascade.upstream-not-delayed", ("dairy-rc", "prcd1")),
        ("cascade.band-overlap", ("rc-main", "h2")),
        ("earthing.ra-unstable", ("supply",)),
        ("reading.half-tripped", ("h3",)),
        # C40 sub-main over C32 and C16 (IEC 60898-1 Table 7 bands overlap); cut-out untyped
        ("overcurrent.not-selective", ("m-dairy", "dm1")),
        ("overcurrent.not-selective", ("m-dairy", "dm2")),
        (
            "overcurrent.selectivity-not-shown",
            ("cutout", "h1", "h2", "h3", "m-barn", "bm1", "bm2", "m-dairy", "dm1", "dm2", "m-yard"),
        ),
    },
    "kestrel-hill-school": {
        ("leakage.over-30pct", ("ict-rc",)),
        ("coverage.no-overcurrent", ("m-rc", "c-m1", "c-m2")),
        ("coverage.additional-protection", ("c-srv", "main-cbr")),
        ("reading.too-fast", ("s-rc",)),
        ("reading.too-fast", ("s-rc",)),
        ("type.dc-load", ("c-pv", "pv-rc", "main-cbr")),
        ("cascade.band-overlap", ("staff", "srcd1")),
        ("cascade.ratio-below-3", ("staff", "srcd1")),
        ("cascade.upstream-not-delayed", ("staff", "srcd1")),
        ("resilience.lighting-single-rcd", ("lt-rc", "c-lt1", "c-lt2", "c-lt3")),
        ("cascade.band-overlap", ("k-rc", "k1")),
        ("cascade.band-overlap", ("k-rc", "k2")),
        ("cascade.dc-blinding", ("k-rc", "k2")),
        ("cascade.dc-blinding", ("main-cbr", "k2")),
        ("cascade.upstream-not-delayed", ("k-rc", "k1", "k2")),
        ("cascade.dc-blinding", ("pv-rc", "c-pv")),
        ("cascade.dc-blinding", ("main-cbr", "c-pv")),
        ("reading.missing", ("srcd1",)),
        ("reading.ramp-out-of-band", ("m-rc",)),
        # a smooth-DC test of a Type A device (BS 7671 531.3.3; IEC 62423): not judged
        ("reading.test-not-applicable", ("ict-rc",)),
        # an IEC 60947-2 breaker has no standard band (no maker_curve recorded); untyped fuse
        (
            "overcurrent.selectivity-not-shown",
            (
                "main-cbr",
                "a1",
                "a2",
                "im1",
                "im2",
                "im3",
                "lm1",
                "lm2",
                "lm3",
                "staff",
                "k1",
                "k2",
                "s1",
                "pm1",
                "pm2",
                "sm1",
            ),
        ),
        (
            "overcurrent.selectivity-not-shown",
            (
                "fuse",
                "main-cbr",
                "a1",
                "a2",
                "im1",
                "im2",
                "im3",
                "lm1",
                "lm2",
                "lm3",
                "staff",
                "k1",
                "k2",
                "s1",
                "pm1",
                "pm2",
                "sm1",
            ),
        ),
    },
}

ALL_RULES = {
    "cascade.upstream-not-delayed",
    "cascade.ratio-below-3",
    "cascade.band-overlap",
    "cascade.dc-blinding",
    "type.ac-unsuitable",
    "type.dc-load",
    "coverage.additional-protection",
    "coverage.no-overcurrent",
    "earthing.tt-ra",
    "earthing.zs-limit",
    "earthing.ra-unstable",
    "earthing.tt-no-rcd",
    "leakage.over-30pct",
    "resilience.lighting-single-rcd",
    "reading.half-tripped",
    "reading.no-trip",
    "reading.too-slow",
    "reading.too-fast",
    "reading.ramp-out-of-band",
    "reading.button-failed",
    "reading.missing",
    "reading.trend",
    "reading.test-not-applicable",
}


@pytest.mark.parametrize("name", sorted(EXPECTED))
def test_sample_findings(name: str) -> None:
    result = analyse(load_site(SAMPLES / f"{name}.json"))
    got = {(f.rule, f.nodes) for f in result.findings}
    assert got == EXPECTED[name]


def test_samples_cover_every_rule() -> None:
    fired = {rule for fs in EXPECTED.values() for rule, _ in fs}
    assert fired >= ALL_RULES


def test_samples_differ_in_earthing_and_size() -> None:
    sites = [load_site(SAMPLES / f"{n}.json") for n in sorted(EXPECTED)]
    assert {s.site.earthing for s in sites} == {"TN-C-S", "TT", "TN-S"}
    assert len({len(s.nodes) for s in sites}) == 3
    # one multi-board site with a sub-main to an outbuilding
    assert any(sum(n.kind == "board" for n in s.nodes) >= 3 for s in sites)


def test_a_correct_cascade_triggers_nothing() -> None:
    # 300 mA set-delay CBR (150 ms) over 30 mA RCBOs: delayed, 10:1, bands clear
    result = analyse(load_site(SAMPLES / "kestrel-hill-school.json"))
    p = result.pair("main-cbr", "a1")
    assert p is not None and p.verdict == "selective" and p.rule_ok
    # the overcurrent half of the same devices is judged separately (no maker's curve for the cbr)
    rcd_side = [f for f in result.findings if not f.rule.startswith("overcurrent.")]
    assert not [f for f in rcd_side if set(f.nodes) >= {"main-cbr", "a1"}]


#: Severities the samples pin because the rule behind them was read anew:
#: (rule, nodes) -> (severity, basis).
EXPECTED_SEVERITY: dict[str, dict[tuple[str, tuple[str, ...]], tuple[str, str]]] = {
    "oak-lane-house": {
        # 100 mA S over 30 mA meets 3:1 and a delay (BS 7671 536.4.1.4, common
        # practice); IEC 61008-1 Table 1 and its 0.25 A note leave 50-250 mA open and
        # rb2 is untested: not guaranteed, investigate
        ("cascade.band-overlap", ("rc3", "rb2")): ("investigate", "standard"),
        # BS 7671 531.3.3 applies: one severity, required
        ("type.ac-unsuitable", ("rc2", "c-l2", "c-s2", "c-s3")): ("required", "standard"),
        # BS 7671 722.531.3.101: own 30 mA Type A RCBO, charger without DC detection
        ("type.dc-load", ("c-ev", "rb3", "rc3")): ("required", "standard"),
    },
    "hollowmere-farm": {
        # BS 7671 411.5.3(ii): RA × 300 mA over 50 V, but U0 / RA still exceeds
        # 300 mA, so the RCD operates: required, not urgent
        ("earthing.tt-ra", ("dairy-rc", "c-ds", "c-mc")): ("required", "standard"),
        # 100 mA S over 30 mA with h2 failing to trip: no margin in the readings
        ("cascade.band-overlap", ("rc-main", "h2")): ("advisory", "standard"),
    },
    "kestrel-hill-school": {
        # IEC rule set: clauses quoted from memory are guidance, so advice only
        ("leakage.over-30pct", ("ict-rc",)): ("advisory", "guidance"),
        ("type.dc-load", ("c-pv", "pv-rc", "main-cbr")): ("advisory", "guidance"),
        # IEC rule set: additional protection presented as common practice
        ("coverage.additional-protection", ("c-srv", "main-cbr")): (
            "advisory",
            "common-practice",
        ),
    },
}


@pytest.mark.parametrize("name", sorted(EXPECTED_SEVERITY))
def test_sample_severities(name: str) -> None:
    result = analyse(load_site(SAMPLES / f"{name}.json"))
    got = {(f.rule, f.nodes): (f.severity, f.basis) for f in result.findings}
    for key, want in EXPECTED_SEVERITY[name].items():
        assert got[key] == want, key
