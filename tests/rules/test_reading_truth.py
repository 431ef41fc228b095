"""A reading is judged only against the limit of the test it records, and a failure
stays on the record until a later passing test clears it.

Each case fires, and its near miss stays silent, with the source beside it.
"""

from __future__ import annotations

from typing import Any

import numpy as np
import pytest
from sitekit import build, circuit, node, rcd, rules_of, run, visit

from model.reports.remedial import build_remedial
from model.rules.bands import time_band
from model.rules.checks import analyse
from model.rules.envelope import DeviceCurve, band_curve
from model.visits.compare import compare_visits


def nodes_for(waveform: str = "A", idn: float = 30, delay: str = "general", **kw: Any) -> list:
    return [
        rcd("r", "o", idn, waveform=waveform, delay=delay, rated_a=63, **kw),
        node("m", "r", "mcb", rated_a=16.0),
        circuit("c", "m", "fixed-equipment"),
    ]


def reading_rules(reading: dict[str, Any], **kw: Any) -> set[str]:
    res = run(nodes_for(**kw), [visit({"r": reading})])
    return {f.rule for f in res.findings if f.rule.startswith("reading.")}


# ------------------------------------------------- item 2: waveform against type
@pytest.mark.parametrize(
    ("dtype", "waveform", "applies"),
    [
        ("A", "smooth-dc", False),  # IEC 62423: smooth DC is a Type B test only
        ("F", "smooth-dc", False),  # IEC 62423
        ("AC", "smooth-dc", False),  # IEC 61008-1: Type AC is sinusoidal only
        ("AC", "half-wave", False),  # IEC 61008-1: half-wave is a Type A test
        ("B", "smooth-dc", True),  # IEC 62423 Type B
        ("A", "half-wave", True),  # IEC 61008-1 Type A
    ],
)
def test_test_waveform_must_suit_the_device_type(dtype: str, waveform: str, applies: bool) -> None:
    # BS 7671 531.3.3; IEC 61008-1; IEC 62423: a test the type is not specified for
    # is never judged: no reading.no-trip, and never the required test
    got = reading_rules(
        {"x1_0": 20.0, "further": [{"waveform": waveform, "x1_0": "did not trip"}]},
        waveform=dtype,
    )
    if applies:
        assert "reading.test-not-applicable" not in got
    else:
        assert got == {"reading.test-not-applicable"}
        assert "reading.no-trip" not in got


def test_not_applicable_test_is_investigate_and_does_not_count_as_required() -> None:
    # BS 7671 531.3.3 and 643.7.1 note: a smooth-DC test of a Type A device
    res = run(nodes_for("A"), [visit({"r": {"waveform": "smooth-dc", "x1_0": "did not trip"}})])
    (f,) = rules_of(res, "reading.test-not-applicable")
    assert f.severity == "investigate" and "531.3.3" in f.source
    assert not rules_of(res, "reading.no-trip")
    (m,) = rules_of(res, "reading.missing")
    assert "1 × IΔn AC test" in m.message and "smooth-dc" in m.message


# ------------------------------------------------- item 3: half-wave / smooth-DC currents
def test_half_wave_1x_at_rated_current_is_not_judged_against_300_ms() -> None:
    # IEC 61008-1 Type A: a trip with half-wave current is guaranteed only up to
    # 1.4 IΔn, so a "1×" half-wave test at IΔn need not trip
    got = reading_rules(
        {"x1_0": 25.0, "further": [{"waveform": "half-wave", "x1_0": "did not trip"}]}
    )
    assert got == set()
    got = reading_rules({"x1_0": 25.0, "further": [{"waveform": "half-wave", "x1_0": 450.0}]})
    assert got == set()


def test_half_wave_scaled_current_is_judged_at_1_4_idn() -> None:
    # IEC 61008-1 Type A break time at 1.4 IΔn: 300 ms (general)
    hw = {"waveform": "half-wave", "test_current": "scaled"}
    assert reading_rules({"x1_0": 25.0, "further": [{**hw, "x1_0": 300.0}]}) == set()
    assert reading_rules({"x1_0": 25.0, "further": [{**hw, "x1_0": 301.0}]}) == {"reading.too-slow"}
    assert reading_rules({"x1_0": 25.0, "further": [{**hw, "x1_0": "did not trip"}]}) == {
        "reading.no-trip"
    }


def test_half_wave_5x_at_rated_current_uses_the_2_8_idn_column() -> None:
    # IEC 61008-1 Type A: 5 IΔn lies between 2.8 IΔn (150 ms) and 7 IΔn (40 ms);
    # the step reading keeps 150 ms, never the AC 40 ms
    hw = {"waveform": "half-wave"}
    assert reading_rules({"x1_0": 25.0, "further": [{**hw, "x5_0": 150.0}]}) == set()
    assert reading_rules({"x1_0": 25.0, "further": [{**hw, "x5_0": 151.0}]}) == {"reading.too-slow"}
    # scaled: 7 IΔn, 40 ms
    sc = {"waveform": "half-wave", "test_current": "scaled"}
    assert reading_rules({"x1_0": 25.0, "further": [{**sc, "x5_0": 41.0}]}) == {"reading.too-slow"}


def test_half_wave_small_rating_uses_factor_2() -> None:
    # IEC 61008-1 Type A, IΔn <= 10 mA: break times at 2, 4 and 10 IΔn
    node_ = build(nodes_for(idn=10)).node("r")
    band = time_band(node_, "x1", "half-wave", "uk-bs7671-2022", "scaled")
    assert band.max_ms == 300 and "2 × IΔn" in band.text
    rated = time_band(node_, "x5", "half-wave", "uk-bs7671-2022", "rated")
    assert rated.max_ms == 150  # 5 IΔn between 4 IΔn (150 ms) and 10 IΔn (40 ms)


def test_smooth_dc_on_type_b_at_2_4_10_idn() -> None:
    # IEC 62423 Type B smooth DC at 2, 4 and 10 IΔn (from memory: guidance)
    node_ = build(nodes_for("B")).node("r")
    rated = time_band(node_, "x1", "smooth-dc", "uk-bs7671-2022", None)
    assert rated.may_trip and not rated.must_trip  # IΔn < 2 IΔn: need not trip
    scaled = time_band(node_, "x1", "smooth-dc", "uk-bs7671-2022", "scaled")
    assert scaled.max_ms == 300 and scaled.basis == "guidance"
    x5 = time_band(node_, "x5", "smooth-dc", "uk-bs7671-2022", "scaled")
    assert x5.max_ms == 40


def test_ac_band_is_unchanged_by_the_test_current_convention() -> None:
    # IEC 61008-1 Table 1: AC at IΔn 300 ms, 5 IΔn 40 ms whatever the convention
    node_ = build(nodes_for()).node("r")
    for tc in (None, "rated", "scaled"):
        assert time_band(node_, "x1", "AC", "uk-bs7671-2022", tc).max_ms == 300
        assert time_band(node_, "x5", "AC", "uk-bs7671-2022", tc).max_ms == 40


# ------------------------------------------------- item 4: the required AC test
def test_half_wave_only_does_not_satisfy_the_required_ac_test() -> None:
    # BS 7671:2018+A2 643.7.1 note: the required test is an AC test at IΔn
    res = run(nodes_for(), [visit({"r": {"waveform": "half-wave", "x1_0": 25.0}})])
    (m,) = rules_of(res, "reading.missing")
    assert "AC" in m.message and "half-wave" in m.message
    # near miss: the AC result recorded beside it in the same visit
    res = run(
        nodes_for(),
        [
            visit(
                {
                    "r": {
                        "waveform": "half-wave",
                        "x1_0": 25.0,
                        "further": [{"waveform": "AC", "x1_0": 22.0}],
                    }
                }
            )
        ],
    )
    assert not rules_of(res, "reading.missing")


def test_further_waveforms_are_distinct() -> None:
    with pytest.raises(ValueError, match="given twice"):
        build(
            nodes_for(),
            [visit({"r": {"x1_0": 20.0, "further": [{"waveform": "AC", "x1_0": 1.0}]}})],
        )


# ------------------------------------------------- item 9: set-delay CBR
def test_set_delay_5x_faster_than_declared_delay_is_too_fast() -> None:
    # IEC 60947-2 Annex B (from memory): the declared non-actuating time holds at
    # every test current, so 5× faster than it is too fast, as at 1×
    kw = {"delay": "set", "idn": 300, "delay_ms": 200.0, "max_break_ms": 800.0, "kind": "cbr"}
    assert reading_rules({"x1_0": 300.0, "x5_0": 199.0}, **kw) == {"reading.too-fast"}
    assert reading_rules({"x1_0": 300.0, "x5_0": 200.0}, **kw) == set()
    # the envelope reads the same minimum at 5 IΔn
    lo, hi = band_curve(DeviceCurve(300.0, "set", 200.0, 800.0), np.array([300.0, 1500.0]))
    assert list(lo) == [200.0, 200.0] and list(hi) == [800.0, 800.0]


# ------------------------------------------------- item 13: IΔn above 1 A
@pytest.mark.parametrize("idn_ma", [1000.0, 3000.0, 10_000.0, 30_000.0])
@pytest.mark.parametrize("delay", ["general", "S"])
def test_band_never_faster_at_lower_current(idn_ma: float, delay: str) -> None:
    # IEC 61008-1 Table 1: the 5 A … 500 A columns apply only above 5 IΔn
    i = np.geomspace(idn_ma, 600_000.0, 400)
    lo, hi = band_curve(DeviceCurve(idn_ma, delay), i)
    assert np.all(np.diff(hi) <= 0) and np.all(np.diff(lo) <= 0)
    # between 2 IΔn and 5 IΔn the 2 IΔn value holds (150 ms general, 200 ms S)
    _, at = band_curve(DeviceCurve(idn_ma, delay), np.array([3.0 * idn_ma]))
    assert at[0] == (150.0 if delay == "general" else 200.0)


# ------------------------------------------------- item 14: button basis and severity
def test_button_failed_is_advice_on_common_practice() -> None:
    # common practice (no standard sets a site limit): advice, not required
    (f,) = rules_of(
        run(nodes_for(), [visit({"r": {"x1_0": 20.0, "button": "failed"}})]),
        "reading.button-failed",
    )
    assert f.basis == "common-practice" and f.severity == "advisory"
    assert not rules_of(
        run(nodes_for(), [visit({"r": {"x1_0": 20.0, "button": "worked"}})]),
        "reading.button-failed",
    )


# ------------------------------------------------- item 15: failures carry forward
def _history(later: dict[str, Any] | None) -> Any:
    first = visit({"r": {"x1_0": "did not trip", "button": "failed"}}, id="a", date="2025-01-10")
    readings = {} if later is None else {"r": later}
    return build(nodes_for(), [first, visit(readings, id="b", date="2026-01-10")])


@pytest.mark.parametrize("later", [None, {"not_tested": "locked"}, {"button": "worked"}])
def test_failure_stays_outstanding_until_a_passing_test(later: dict[str, Any] | None) -> None:
    # common practice: a failure stays on the record until a later passing test
    site = _history(later)
    res = analyse(site)
    (f,) = rules_of(res, "reading.no-trip")
    assert f.severity == "urgent" and f.visit == "a" and "Still outstanding" in f.message
    assert "2025-01-10" in f.message
    cmp = compare_visits(site)
    assert "reading.no-trip" not in {g.rule for g in cmp.findings_gone}
    assert "reading.no-trip" in {g.rule for g in cmp.findings_unchanged}
    doc = build_remedial(site, res)
    assert "reading.no-trip" in {i.rule for i in doc.items}


def test_passing_test_clears_the_outstanding_failure() -> None:
    # near miss: a later AC test at IΔn that passes clears it
    site = _history({"x1_0": 24.0, "button": "worked"})
    res = analyse(site)
    assert not rules_of(res, "reading.no-trip") and not rules_of(res, "reading.button-failed")
    assert "reading.no-trip" in {g.rule for g in compare_visits(site).findings_gone}
