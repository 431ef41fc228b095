"""The one number parser: a value is taken exactly as typed, or refused with the reason.

Every form field, the site-details screen and the CSV importer read numbers
through ``model.site.numbers.parse_number``, so they agree on what "0,5" and
"1e3" mean.
"""

from __future__ import annotations

import pytest
from hypothesis import given
from hypothesis import strategies as st

from model.site.numbers import number_text, parse_number


@pytest.mark.parametrize(
    ("text", "value"),
    [
        ("24", 24.0),
        ("  24  ", 24.0),
        ("0.5", 0.5),
        (".5", 0.5),
        ("5.", 5.0),
        # a decimal comma is usual on site in much of Europe (common practice)
        ("0,5", 0.5),
        ("1,25", 1.25),
        ("-3", -3.0),  # the field's own rule refuses it, in its own words
        ("1500", 1500.0),
    ],
)
def test_plain_numbers_are_read_as_typed(text: str, value: float) -> None:
    assert parse_number(text) == value


def test_empty_is_none() -> None:
    assert parse_number("") is None
    assert parse_number("   ") is None


@pytest.mark.parametrize(
    "text",
    ["1e3", "1E+03", "inf", "nan", "NaN", "0x1f", "1_000", "1 000", "2..5", "1.2.3", "30mA", "abc"],
)
def test_anything_else_is_refused_with_the_text(text: str) -> None:
    with pytest.raises(ValueError) as err:
        parse_number(text)
    assert repr(text.strip()) in str(err.value)
    assert "not a number" in str(err.value)


@pytest.mark.parametrize("text", ["1,000", "12,500", "-1,000"])
def test_a_comma_before_three_digits_is_refused_as_ambiguous(text: str) -> None:
    """'1,000' may mean one thousand or one: never guess (a value is never changed)."""
    with pytest.raises(ValueError, match="ambiguous"):
        parse_number(text)


def test_a_comma_before_other_digit_counts_is_a_decimal_mark() -> None:
    assert parse_number("1,0") == 1.0
    assert parse_number("1,0000") == 1.0


@pytest.mark.parametrize(
    ("value", "text"),
    [
        (30.0, "30"),
        (0.5, "0.5"),
        (1.2345678, "1.2345678"),  # never rounded to six figures
        (0.00001, "0.00001"),  # never an exponent, which the parser refuses
        (99999999.0, "99999999"),
        (1e22, "10000000000000000000000"),
        (-5.0, "-5"),
    ],
)
def test_a_stored_number_is_edited_as_all_its_digits(value: float, text: str) -> None:
    assert number_text(value) == text
    assert parse_number(number_text(value)) == value  # saving the form unchanged keeps it


@given(st.floats(allow_nan=False, allow_infinity=False, min_value=-1e30, max_value=1e30))
def test_number_text_reads_back_exactly(value: float) -> None:
    assert parse_number(number_text(value)) == value
