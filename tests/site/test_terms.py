"""The vocabulary's choices come from its Literal types, and the lists made from them agree."""

from __future__ import annotations

from typing import get_args

import pytest

from model.site.models import Reading
from model.site.nodes import NODE_CLASSES
from model.site.terms import (
    RCD_KINDS,
    TEST_NAMES,
    TEST_VALUE_KEYS,
    RcdKind,
    TestName,
    TestWaveform,
    Waveform,
    choices_of,
    or_list,
)


def test_choices_of_a_literal_in_order() -> None:
    assert choices_of(Waveform) == ("AC", "A", "F", "B")
    assert choices_of(TestWaveform) == ("AC", "half-wave", "smooth-dc")
    assert TEST_NAMES == choices_of(TestName) == get_args(TestName)


def test_choices_of_refuses_anything_but_a_literal() -> None:
    with pytest.raises(TypeError, match="not a Literal"):
        choices_of(str)


def test_rcd_kinds_are_the_residual_current_device_nodes() -> None:
    assert set(choices_of(RcdKind)) == RCD_KINDS
    rcd_classes = {k for k, cls in NODE_CLASSES.items() if "delay" in cls.model_fields}
    assert rcd_classes == RCD_KINDS  # an RCM has a rating but no delay: it is not protective


def test_a_reading_has_values_exactly_under_the_test_value_keys() -> None:
    value = {**dict.fromkeys(TEST_NAMES, 20.0), "ramp_ma": 25.0, "button": "worked"}
    assert set(value) == set(TEST_VALUE_KEYS)
    for key in TEST_VALUE_KEYS:
        reading = Reading.model_validate({key: value[key]})
        assert reading.has_values() and reading.recorded(key)
    bare = Reading(note="", waveform="half-wave")
    assert not bare.has_values()
    assert bare.recorded("waveform") and not bare.recorded("note")
    assert Reading(not_tested="no access").recorded("not_tested")


@pytest.mark.parametrize(
    ("items", "text"),
    [([], ""), (["a"], "a"), (["a", "b"], "a or b"), (["a", "b", "c"], "a, b or c")],
)
def test_or_list(items: list[str], text: str) -> None:
    assert or_list(items) == text


def test_reading_keys_have_the_trades_names() -> None:
    from model.site.terms import TEST_NAMES, reading_label

    # Common practice: tests are named by multiple of IΔn and the phase angle of
    # the test current, as on any RCD test sheet.
    assert reading_label("x1_180") == "1 × IΔn, 180°"
    assert reading_label("half_0") == "½ × IΔn, 0°"
    assert reading_label("ramp_ma") == "ramp test"
    assert all("_" not in reading_label(k) for k in TEST_NAMES)
    assert reading_label("unknown_key") == "unknown_key"
