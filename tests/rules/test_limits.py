"""Every limit value held against the published table it comes from."""

from __future__ import annotations

import pytest
from numpy.testing import assert_allclose

from model.rules import limits
from model.rules.bands import ramp_band, time_band
from model.rules.limits import (
    break_limits_ms,
    operating_band,
    rule_set,
    tt_touch_voltage_v,
    zs_limit_ohm,
)

# IEC 61008-1 Ed.3 Table 1 (IEC 61009-1 gives the same values): general type
# maximum break times 0.30 s / 0.15 s / 0.04 s / 0.04 s at IΔn / 2 IΔn / 5 IΔn / 5-500 A;
# type S maximum break 0.50 / 0.20 / 0.15 / 0.15 s; type S minimum
# non-actuating 0.13 / 0.06 / 0.05 / 0.04 s.
TABLE_1 = [
    # multiple or abs A, general max, S max, S min  [ms]
    (1.0, None, 300, 500, 130),
    (2.0, None, 150, 200, 60),
    (5.0, None, 40, 150, 50),
    (None, 5.0, 40, 150, 40),
    (None, 500.0, 40, 150, 40),
]


def test_break_time_table_matches_iec_61008_table_1() -> None:
    got = [
        (p.multiple, p.abs_a, p.general_max_ms, p.s_max_ms, p.s_min_ms) for p in limits.BREAK_TIMES
    ]
    assert got == TABLE_1
    assert all("61008-1" in p.source for p in limits.BREAK_TIMES)


@pytest.mark.parametrize(
    ("multiple", "delay", "expected"),
    [
        (1.0, "general", (None, 300)),  # IEC 61008-1 Table 1
        (2.0, "general", (None, 150)),  # IEC 61008-1 Table 1
        (5.0, "general", (None, 40)),  # IEC 61008-1 Table 1
        (1.0, "S", (130, 500)),  # IEC 61008-1 Table 1; BS 7671 Table 3A 130-500 ms
        (2.0, "S", (60, 200)),  # IEC 61008-1 Table 1
        (5.0, "S", (50, 150)),  # IEC 61008-1 Table 1; BS 7671 Table 3A 50-150 ms
    ],
)
def test_break_limits(multiple: float, delay: str, expected: tuple[float | None, float]) -> None:
    assert break_limits_ms(multiple, delay) == expected


def test_untabulated_multiple_is_refused() -> None:
    with pytest.raises(ValueError, match="no tabulated"):
        break_limits_ms(3.0, "general")


def test_alternative_5x_current() -> None:
    # IEC 61008-1 Table 1 note: 0.25 A may replace 5 IΔn for general devices of IΔn <= 30 mA
    assert limits.ALT_5X_CURRENT_A == 0.25
    assert limits.ALT_5X_MAX_IDN_MA == 30


def test_non_operating_current_is_half_idn() -> None:
    # IEC 61008-1 Ed.3: IΔno = 0.5 IΔn
    assert limits.NON_OPERATING_FRACTION == 0.5


@pytest.mark.parametrize(
    ("waveform", "idn", "low", "high", "mult"),
    [
        ("AC", 30, 0.5, 1.0, 1.0),  # IEC 61008-1: trips above 0.5 IΔn, at or below IΔn
        ("half-wave", 30, 0.35, 1.4, 1.4),  # IEC 61008-1 Type A, IΔn > 10 mA
        ("half-wave", 10, 0.35, 2.0, 2.0),  # IEC 61008-1 Type A, IΔn <= 10 mA
        ("smooth-dc", 30, 0.5, 2.0, 2.0),  # IEC 62423 (upper bound; lower bound guidance)
    ],
)
def test_operating_bands(waveform: str, idn: float, low: float, high: float, mult: float) -> None:
    b = operating_band(waveform, idn)
    assert (b.low, b.high, b.time_multiplier) == (low, high, mult)


def test_smooth_dc_band_is_guidance() -> None:
    # practice note: the 0.5-2 IΔn smooth-DC range is only partly confirmed
    assert operating_band("smooth-dc", 30).basis == "guidance"


@pytest.mark.parametrize(
    ("idn_ma", "table_ohm"),
    [(30, 1667), (100, 500), (300, 167), (500, 100)],  # BS 7671 Table 41.5
)
def test_zs_limits_table_41_5(idn_ma: float, table_ohm: float) -> None:
    # Table 41.5 rounds 50 V / IΔn to whole ohms: tolerance half an ohm
    assert_allclose(zs_limit_ohm(idn_ma), table_ohm, rtol=0, atol=0.5)


def test_tt_touch_voltage() -> None:
    # BS 7671 411.5.3(ii): RA × IΔn <= 50 V; 1667 Ω × 30 mA is 50 V
    assert limits.TT_TOUCH_V.value == 50.0
    assert_allclose(tt_touch_voltage_v(1666.67, 30), 50.0, rtol=1e-4)
    assert_allclose(tt_touch_voltage_v(200, 300), 60.0, rtol=1e-12)


def test_other_rules() -> None:
    assert limits.RA_STABLE_OHM.value == 200.0  # BS 7671 Table 41.5 Note 2
    assert limits.LEAKAGE_FRACTION.value == 0.30  # BS 7671 531.3.2(iii)
    assert limits.CASCADE_RATIO.value == 3.0  # BS 7671 536.4.1.4 (common practice)
    assert limits.CASCADE_RATIO.basis == "common-practice"
    assert limits.ADDITIONAL_IDN_MA.value == 30.0  # BS 7671 411.3.3
    assert limits.ADDITIONAL_MAX_A.value == 32.0  # BS 7671 411.3.3(a)/(b)


def test_rule_sets_and_unknown() -> None:
    # BS 7671 643.7.1 (A2:2022): one AC test at IΔn is the required test
    assert rule_set("uk-bs7671-2022").required_tests == ("x1",)
    assert rule_set("iec-60364").additional_basis == "common-practice"
    with pytest.raises(ValueError, match="unknown rule set 'nz-2010'"):
        rule_set("nz-2010")


class _Dev:
    def __init__(self, idn_ma: float, delay: str = "general") -> None:
        self.idn_ma = idn_ma
        self.delay = delay


def test_site_bands_match_bs7671_table_3a() -> None:
    # BS 7671 Appendix 3 Table 3A: general <= 300 ms at IΔn, <= 40 ms at 5 IΔn;
    # type S 130-500 ms at IΔn, 50-150 ms at 5 IΔn
    g, s = _Dev(30), _Dev(100, "S")
    assert time_band(g, "x1", "AC", "uk-bs7671-2022").text == "≤ 300 ms"
    assert time_band(g, "x5", "AC", "uk-bs7671-2022").text == "≤ 40 ms"
    assert time_band(s, "x1", "AC", "uk-bs7671-2022").text == "130–500 ms"
    assert time_band(s, "x5", "AC", "uk-bs7671-2022").text == "50–150 ms"
    assert time_band(g, "half", "AC", "uk-bs7671-2022").text == "must not trip"
    assert time_band(g, "x1", "AC", "uk-bs7671-2022").required
    assert not time_band(g, "x5", "AC", "uk-bs7671-2022").required


def test_trade_fact_30ma_device_trips_between_15_and_30_ma() -> None:
    # common practice, consistent with IEC 61008-1 (IΔno = 0.5 IΔn): a 30 mA
    # device may trip anywhere from just over 15 mA to 30 mA
    b = ramp_band(_Dev(30), "AC")
    assert (b.low_ma, b.high_ma) == (15.0, 30.0)
    b100 = ramp_band(_Dev(100), "AC")
    assert (b100.low_ma, b100.high_ma) == (50.0, 100.0)
