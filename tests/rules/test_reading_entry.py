"""A reading field judged as it is typed, and the form's text to and from a Reading.

Devices from the invented Oak Lane sample: rc1 is 30 mA Type A general, rc2
30 mA Type AC general, rc3 100 mA Type A time-delayed (S).
"""

from __future__ import annotations

from pathlib import Path

import pytest

from model.rules.entry import (
    DEFAULT_TEST_WAVEFORM,
    ENTRY_FIELDS,
    ENTRY_ORDER,
    chosen_waveform,
    entry_texts,
    judge_entry,
    reading_from_texts,
    typed_value,
)
from model.site.models import Reading, SiteFile
from model.site.terms import DID_NOT_TRIP, TEST_NAMES
from model.storage.sites import load_site

SAMPLE = Path(__file__).resolve().parents[2] / "sample_sites" / "oak-lane-house.json"
UK = "uk-bs7671-2022"


@pytest.fixture(scope="module")
def site() -> SiteFile:
    return load_site(SAMPLE)


def test_fields_in_entry_order() -> None:
    assert (*TEST_NAMES, "ramp_ma", "button", "waveform", "test_current", "note") == ENTRY_ORDER
    assert (*ENTRY_ORDER, "not_tested") == ENTRY_FIELDS


def test_typed_value() -> None:
    assert typed_value("x1_0", "25") == 25.0
    assert typed_value("x1_0", DID_NOT_TRIP) == DID_NOT_TRIP
    assert typed_value("x1_0", "") is None
    assert typed_value("ramp_ma", "22,5") == 22.5
    assert typed_value("note", "by the door") == "by the door"
    assert typed_value("button", "") is None
    with pytest.raises(ValueError, match="not a number"):
        typed_value("x1_0", "fast")
    with pytest.raises(ValueError):
        typed_value("ramp_ma", DID_NOT_TRIP)  # only a timed test may not trip


def test_form_text_and_reading_round_trip() -> None:
    blank = entry_texts(None)
    assert set(blank) == set(ENTRY_FIELDS)
    assert blank["waveform"] == DEFAULT_TEST_WAVEFORM == "AC"  # the model's default test current
    assert {k: v for k, v in blank.items() if k != "waveform"} == dict.fromkeys(
        blank.keys() - {"waveform"}, ""
    )
    assert reading_from_texts(blank) is None  # nothing recorded
    reading = Reading(x1_0=25.0, x5_0=DID_NOT_TRIP, ramp_ma=22.5, button="worked", note="ok")
    texts = entry_texts(reading)
    assert (texts["x1_0"], texts["x5_0"], texts["ramp_ma"]) == ("25", DID_NOT_TRIP, "22.5")
    assert reading_from_texts(texts) == reading
    assert reading_from_texts({**blank, "note": "cover missing"}) == Reading(note="cover missing")


def test_a_value_the_format_refuses_is_not_turned_into_a_reading() -> None:
    texts = {**entry_texts(None), "x1_0": "20000"}
    # the site file allows trip times up to 10 000 ms; the reason is in plain words
    with pytest.raises(ValueError, match="at most 10000 ms"):
        reading_from_texts(texts)
    with pytest.raises(ValueError, match="not a number"):
        reading_from_texts({**texts, "x1_0": "2 5"})


def test_chosen_waveform() -> None:
    assert chosen_waveform({"waveform": "half-wave"}) == "half-wave"
    assert chosen_waveform({"waveform": ""}) == "AC"


def test_timed_tests_as_typed(site: SiteFile) -> None:
    rc1 = site.node("rc1")
    v = judge_entry(rc1, "x1_0", "320", "AC", UK)
    # IEC 61008-1 Table 1: general type, 1 × IΔn, maximum break time 300 ms
    assert (v.band, v.need, v.flag, v.mark) == (
        "≤ 300 ms",
        "required",
        "reading.too-slow",
        "flagged",
    )
    assert v.verdict == "320 ms is slower than ≤ 300 ms"
    v = judge_entry(rc1, "x1_0", "25", "AC", UK)
    assert (v.flag, v.mark, v.verdict) == (None, "in band", "25 ms within ≤ 300 ms")
    v = judge_entry(rc1, "x1_0", "", "AC", UK)
    assert (v.flag, v.mark, v.verdict) == (None, "", "not recorded")
    # BS 7671 643.7.1 requires the 1 × test only
    assert judge_entry(rc1, "x5_0", "", "AC", UK).need == "optional"
    # IEC 61008-1 Table 1: a device that does not trip at 5 × IΔn fails
    v = judge_entry(rc1, "x5_0", DID_NOT_TRIP, "AC", UK)
    assert (v.flag, v.mark) == ("reading.no-trip", "flagged")
    # IEC 61008-1 Table 1: S type at 1 × IΔn 130–500 ms, so 100 ms is too fast
    v = judge_entry(site.node("rc3"), "x1_0", "100", "AC", UK)
    assert (v.band, v.flag) == ("130–500 ms", "reading.too-fast")


def test_half_rated_test_depends_on_the_test_current(site: SiteFile) -> None:
    rc1 = site.node("rc1")
    # IΔno = 0.5 IΔn for a sinusoidal current (IEC 61008-1): it must not trip
    v = judge_entry(rc1, "half_0", DID_NOT_TRIP, "AC", UK)
    assert (v.band, v.flag, v.mark) == ("must not trip", None, "in band")
    assert judge_entry(rc1, "half_0", "20", "AC", UK).flag == "reading.half-tripped"
    # Type A half-wave band 0.35–1.4 IΔn (IEC 61008-1): a trip at ½ × is allowed
    v = judge_entry(rc1, "half_0", "20", "half-wave", UK)
    assert (v.flag, v.mark) == (None, "recorded")
    assert v.band.startswith("may trip")


def test_ramp_button_and_the_other_fields(site: SiteFile) -> None:
    rc2 = site.node("rc2")
    # ramp: IΔno = 0.5 IΔn to IΔn (IEC 61008-1, sinusoidal), so (15, 30] mA for 30 mA
    v = judge_entry(rc2, "ramp_ma", "22", "AC", UK)
    assert (v.band, v.need, v.flag, v.mark) == ("15–30 mA", "optional", None, "in band")
    assert judge_entry(rc2, "ramp_ma", "40", "AC", UK).flag == "reading.ramp-out-of-band"
    assert judge_entry(rc2, "ramp_ma", "15", "AC", UK).flag == "reading.ramp-out-of-band"
    # common practice: a test button that does not trip the device is a failure
    v = judge_entry(rc2, "button", "failed", "AC", UK)
    assert (v.flag, v.verdict) == ("reading.button-failed", "test button did not trip the device")
    v = judge_entry(rc2, "button", "worked", "AC", UK)
    assert (v.band, v.flag, v.verdict, v.mark) == ("must trip it", None, "worked", "in band")
    assert judge_entry(rc2, "button", "", "AC", UK).verdict == ""
    assert judge_entry(rc2, "waveform", "AC", "AC", UK).band == "sets the bands above"
    assert judge_entry(rc2, "not_tested", "", "AC", UK).band == "reason, instead of values"
    v = judge_entry(rc2, "note", "anything", "AC", UK)
    assert (v.band, v.need, v.flag, v.verdict, v.mark) == ("", "", None, "", "")


def test_unreadable_text_is_said_in_plain_words(site: SiteFile) -> None:
    v = judge_entry(site.node("rc1"), "x1_180", "12..5", "AC", UK)
    assert v.mark == "unreadable" and v.flag is None
    assert v.verdict.startswith("'12..5' is not a number")
    assert v.band == "≤ 300 ms"  # the band is still shown beside it


@pytest.mark.parametrize(
    ("name", "text", "says"),
    [
        ("x1_0", "-5", "a trip time must be more than 0 ms (you entered -5)"),
        ("x1_0", "0", "a trip time must be more than 0 ms (you entered 0)"),
        # the site file keeps trip times up to 10 s; the digits are shown as typed
        (
            "x5_0",
            "99999999",
            "a trip time must be at most 10000 ms (you entered 99999999); a trip test never "
            "runs that long, so a device that did not trip is recorded as 'did not trip', "
            "not as a time",
        ),
        ("ramp_ma", "-1", "the ramp trip current must be more than 0 mA (you entered -1)"),
    ],
)
def test_a_value_the_file_would_refuse_is_refused_as_typed_never_judged(
    site: SiteFile, name: str, text: str, says: str
) -> None:
    """A refused value is never shown as 'in band' (-5 ms is not within 300 ms)."""
    v = judge_entry(site.node("rc1"), name, text, "AC", UK)
    assert (v.mark, v.flag, v.verdict) == ("unreadable", None, says)
    texts = entry_texts(None) | {name: text}
    with pytest.raises(ValueError, match="must be") as err:
        reading_from_texts(texts)
    assert str(err.value) == says


def test_the_largest_and_smallest_accepted_times_are_judged(site: SiteFile) -> None:
    # IEC 61008-1 Table 1: a general device must break within 300 ms at 1 × IΔn
    slow = judge_entry(site.node("rc1"), "x1_0", "10000", "AC", UK)
    assert (slow.mark, slow.flag) == ("flagged", "reading.too-slow")
    quick = judge_entry(site.node("rc1"), "x1_0", "0.5", "AC", UK)
    assert quick.mark == "in band"


def test_a_second_waveform_page_keeps_the_first() -> None:
    # an AC and a half-wave test on one visit (BS 7671 643.7.1 note: the AC test is the
    # required one; IEC 61008-1 Type A half-wave test at 1.4 IΔn when scaled)
    from model.site.models import Reading

    base = Reading.model_validate({"x1_0": 22.0, "button": "worked"})
    page = entry_texts(base, "half-wave")
    assert page["x1_0"] == "" and page["waveform"] == "half-wave" and page["button"] == "worked"
    page.update(x1_0="27", test_current="scaled")
    r = reading_from_texts(page, base, "half-wave")
    assert r is not None and r.x1_0 == 22.0 and r.button == "worked"
    assert r.results_for("half-wave").x1_0 == 27.0  # type: ignore[union-attr]
    assert r.results_for("half-wave").test_current == "scaled"  # type: ignore[union-attr]
    # the AC page again shows the AC values; editing it keeps the half-wave results
    ac = entry_texts(r, "AC")
    assert ac["x1_0"] == "22" and ac["test_current"] == ""
    ac["x5_0"] = "11"
    r2 = reading_from_texts(ac, r, "AC")
    assert r2 is not None and r2.x5_0 == 11.0 and r2.further == r.further
    # emptying the half-wave page removes those results
    empty = entry_texts(r2, "half-wave")
    empty.update(x1_0="", test_current="")
    r3 = reading_from_texts(empty, r2, "half-wave")
    assert r3 is not None and r3.further == []
