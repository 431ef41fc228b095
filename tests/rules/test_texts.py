"""The texts of limits and bands: each written by one function, in the forms the outputs use."""

from __future__ import annotations

from model.rules import limits
from model.rules.bands import ramp_band, ramp_band_text, value_unit
from model.rules.limits import RULE_SETS
from model.site.terms import RuleSetName, choices_of


class _Dev:
    def __init__(self, idn_ma: float) -> None:
        self.idn_ma = idn_ma


def test_ramp_band_text_forms() -> None:
    # IEC 61008-1 Ed.3 (IΔno = 0.5 IΔn): a 30 mA device trips above 15 and up to 30 mA
    band = ramp_band(_Dev(30), "AC")
    assert band.text == ramp_band_text(band) == "above 15 and up to 30 mA"
    assert ramp_band_text(band, "inequality") == "15 < I ≤ 30 mA"
    assert ramp_band_text(band, "span") == "15–30 mA"


def test_value_units() -> None:
    assert value_unit("x1_180") == "ms"
    assert value_unit("ramp_ma") == "mA"
    assert value_unit("button") == ""


def test_rule_text() -> None:
    assert limits.TT_TOUCH_V.text() == "50 V"  # BS 7671 411.5.3(ii)
    assert limits.RA_STABLE_OHM.text() == "200 Ω"  # BS 7671 Table 41.5 Note 2
    assert limits.ADDITIONAL_IDN_MA.text() == "30 mA"  # BS 7671 411.3.3


def test_a_rule_set_for_every_choice() -> None:
    assert sorted(RULE_SETS) == sorted(choices_of(RuleSetName))
    assert all(name == rs.name for name, rs in RULE_SETS.items())
