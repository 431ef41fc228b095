"""Bands for the readings taken on site, and the judgement of each value against them.

Used by the reading checks and by the app, which shows the band beside each
field and flags a value the moment it is entered.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache
from typing import Any, Literal

from model.rules.limits import (
    NON_OPERATING_SOURCE,
    operating_band,
    rule_set,
)
from model.rules.waveforms import WAVEFORM_TYPE_SOURCE, timed_limits, waveform_applies
from model.site.terms import DID_NOT_TRIP, TEST_NAMES, choices_of

TestGroup = Literal["half", "x1", "x5"]
GROUPS: tuple[TestGroup, ...] = choices_of(TestGroup)
GROUP_MULTIPLE: dict[str, float] = {"half": 0.5, "x1": 1.0, "x5": 5.0}
GROUP_TITLE: dict[str, str] = {"half": "½ × IΔn", "x1": "1 × IΔn", "x5": "5 × IΔn"}


_GROUP_OF: dict[str, TestGroup] = {t: t.split("_", 1)[0] for t in TEST_NAMES}  # type: ignore[misc]


def group_of(test: str) -> TestGroup:
    """'x1_180' -> 'x1'."""
    g = test.split("_", 1)[0]
    if g not in GROUP_MULTIPLE:
        raise ValueError(f"unknown test {test!r}")
    return g  # type: ignore[return-value]


@dataclass(frozen=True)
class Band:
    """What a timed test must show.

    ``must_trip`` False with ``may_trip`` False means the device must not trip;
    ``may_trip`` True means either outcome is within the product standard (so
    the value is recorded but not judged).  ``applies`` False means the test
    waveform is not a specified test of the device's type at all.
    """

    group: TestGroup
    must_trip: bool
    may_trip: bool
    min_ms: float | None
    max_ms: float | None
    text: str
    source: str
    basis: str
    required: bool
    applies: bool = True


#: Flags that record a failure of the device (as against a test that does not
#: apply to it): these stay outstanding until a later passing test clears them.
FAILURE_FLAGS: frozenset[str] = frozenset(
    {
        "reading.no-trip",
        "reading.too-slow",
        "reading.too-fast",
        "reading.half-tripped",
        "reading.ramp-out-of-band",
        "reading.button-failed",
    }
)
NOT_APPLICABLE = "reading.test-not-applicable"


def time_band(
    node: Any, group: TestGroup, waveform: str, rules: str, test_current: str | None = None
) -> Band:
    """The band for a timed test on this device, with the test waveform used.

    ``test_current`` says at which current a half-wave or smooth-DC test was
    made ('rated' or 'scaled', see :class:`model.site.models.Reading`); not
    recorded, the test is judged at the rated multiple, the smaller current.

    References
    ----------
    IEC 61008-1 Ed.3 Table 1 and IΔno = 0.5 IΔn; IEC 61009-1; BS 7671
    Appendix 3 Table 3A and 643.7.1; Type A half-wave band 0.35–1.4 IΔn and
    its break-time currents (IEC 61008-1); IEC 62423; BS 7671 531.3.3.
    """
    d = node.__dict__
    return _time_band(
        float(d["idn_ma"]),
        str(d.get("waveform", "A")),
        str(d.get("delay", "general")),
        d.get("delay_ms"),
        d.get("max_break_ms"),
        group,
        waveform,
        rules,
        test_current == "scaled",
    )


@lru_cache(maxsize=4096)
def _time_band(
    idn: float,
    dtype: str,
    delay: str,
    dms: float | None,
    bms: float | None,
    group: TestGroup,
    waveform: str,
    rules: str,
    scaled: bool,
) -> Band:
    rs = rule_set(rules)
    if not waveform_applies(dtype, waveform):
        return Band(
            group,
            False,
            True,
            None,
            None,
            f"not a specified test for Type {dtype} (a {waveform} test current)",
            WAVEFORM_TYPE_SOURCE,
            "standard",
            False,
            applies=False,
        )
    # The required test is the AC test (BS 7671 643.7.1 note).
    required = group in rs.required_tests and waveform == "AC"
    op = operating_band(waveform, idn)
    if group == "half":
        applied = 0.5 * (op.time_multiplier if scaled else 1.0)
        if applied <= op.low:
            src = NON_OPERATING_SOURCE if waveform == "AC" else op.source
            return Band(
                "half", False, False, None, None, "must not trip", src, "common-practice", required
            )
        return Band(
            "half",
            False,
            True,
            None,
            None,
            f"may trip ({waveform} band {op.low:g}–{op.high:g} × IΔn)",
            op.source,
            op.basis,
            required,
        )
    tl = timed_limits(
        GROUP_MULTIPLE[group],
        waveform,
        idn,
        delay,
        scaled=scaled,
        delay_ms=dms,
        declared_max_ms=bms,
    )
    at = "" if waveform == "AC" else f" at {tl.applied:g} × IΔn {waveform}"
    if not tl.must_trip:
        return Band(
            group,
            False,
            True,
            None,
            None,
            f"may trip, not judged: with {waveform} current at {tl.applied:g} × IΔn "
            f"(a trip is guaranteed only from {tl.factor:g} × IΔn)",
            tl.source,
            tl.basis,
            required,
        )
    text = _range_text(tl.min_ms, tl.max_ms) + at
    if delay == "set":
        text += " (declared setting)"
    source = tl.source + ("; " + rs.test_source if required else "")
    return Band(group, True, False, tl.min_ms, tl.max_ms, text, source, tl.basis, required)


def _range_text(lo: float | None, hi: float | None) -> str:
    if lo is not None and hi is not None:
        return f"{lo:g}–{hi:g} ms"
    if hi is not None:
        return f"≤ {hi:g} ms"
    if lo is not None:
        return f"≥ {lo:g} ms"
    return "trip (no declared limit)"


@dataclass(frozen=True)
class Judgement:
    """The verdict on one recorded value: ``flag`` is None when it is within its band."""

    flag: str | None
    text: str


def judge_time(band: Band, value: float | str | None) -> Judgement:
    """Judge one timed result against its band.  ``value`` is ms or 'did not trip'."""
    if value is None:
        return Judgement(None, "not recorded")
    if not band.applies:
        return Judgement(NOT_APPLICABLE, f"recorded, but {band.text}")
    if band.group != "half" and band.may_trip:
        return Judgement(None, f"{fmt_result(value)}: {band.text}")
    if band.group == "half":
        if band.may_trip:
            return Judgement(None, "recorded (not judged for this waveform)")
        if value == DID_NOT_TRIP:
            return Judgement(None, "did not trip, as it must not")
        return Judgement("reading.half-tripped", f"tripped in {value:g} ms; it must not trip")
    if value == DID_NOT_TRIP:
        return Judgement("reading.no-trip", f"did not trip; it must trip, {band.text}")
    assert isinstance(value, float | int)
    if band.max_ms is not None and value > band.max_ms:
        return Judgement("reading.too-slow", f"{value:g} ms is slower than {band.text}")
    if band.min_ms is not None and value < band.min_ms:
        return Judgement("reading.too-fast", f"{value:g} ms is faster than {band.text}")
    return Judgement(None, f"{value:g} ms within {band.text}")


def worse(a: float | str | None, b: float | str | None, group: str = "x1") -> float | str | None:
    """The worse of the 0° and 180° results.

    For a test that must trip: 'did not trip' over any time, else the longer
    time.  For the ½ IΔn test, which must not trip: any trip over 'did not
    trip' (the shorter time, the more sensitive).
    """
    vals = [v for v in (a, b) if v is not None]
    if not vals:
        return None
    times = [float(v) for v in vals if v != DID_NOT_TRIP]
    if group == "half":
        return min(times) if times else DID_NOT_TRIP
    if DID_NOT_TRIP in vals:
        return DID_NOT_TRIP
    return max(times)


@dataclass(frozen=True)
class RampBand:
    """Where a ramp test's trip current must fall: above ``low_ma`` and up to ``high_ma``."""

    low_ma: float
    high_ma: float
    source: str
    basis: str
    #: False when the test waveform is not a specified test of the device's type.
    applies: bool = True

    @property
    def text(self) -> str:
        """The band in words, as findings and judgements give it."""
        return ramp_band_text(self)


RampTextForm = Literal["words", "inequality", "span"]


def ramp_band_text(band: RampBand, form: RampTextForm = "words") -> str:
    """The band of a ramp test for people, in one of three forms.

    ``words``: 'above 15 and up to 30 mA' (findings, judgements, reports);
    ``inequality``: '15 < I ≤ 30 mA' (where room is short, e.g. a test sheet cell);
    ``span``: '15–30 mA' (beside a field while a value is typed).
    """
    lo, hi = band.low_ma, band.high_ma
    if form == "inequality":
        return f"{lo:g} < I ≤ {hi:g} mA"
    if form == "span":
        return f"{lo:g}–{hi:g} mA"
    return f"above {lo:g} and up to {hi:g} mA"


def ramp_band(node: Any, waveform: str) -> RampBand:
    """The band a ramp test's trip current must fall in: (low, high] mA.

    References
    ----------
    IEC 61008-1 Ed.3: sinusoidal 0.5–1.0 IΔn (IΔno = 0.5 IΔn); Type A half-wave
    0.35–1.4 IΔn (0.35–2 IΔn for IΔn <= 10 mA); IEC 62423 smooth DC up to 2 IΔn.
    """
    idn = float(node.idn_ma)
    op = operating_band(waveform, idn)
    if not waveform_applies(str(node.__dict__.get("waveform", "A")), waveform):
        return RampBand(
            op.low * idn, op.high * idn, WAVEFORM_TYPE_SOURCE, "standard", applies=False
        )
    return RampBand(op.low * idn, op.high * idn, op.source, op.basis)


def judge_ramp(band: RampBand, ramp_ma: float | None) -> Judgement:
    if ramp_ma is None:
        return Judgement(None, "not recorded")
    if not band.applies:
        return Judgement(NOT_APPLICABLE, "recorded, but not a specified test for this type")
    if ramp_ma > band.high_ma:
        return Judgement("reading.ramp-out-of-band", f"{ramp_ma:g} mA is above {band.high_ma:g} mA")
    if ramp_ma <= band.low_ma:
        return Judgement(
            "reading.ramp-out-of-band", f"{ramp_ma:g} mA is at or below {band.low_ma:g} mA"
        )
    return Judgement(None, f"{ramp_ma:g} mA within {band.text}")


def fmt_result(value: float | str | None) -> str:
    """A recorded timed result for people."""
    if value is None:
        return "—"
    if value == DID_NOT_TRIP:
        return DID_NOT_TRIP
    assert isinstance(value, float | int)
    return f"{value:g} ms" if math.isfinite(value) else "—"


def numeric_value(value: float | str | None) -> float | None:
    """A recorded value as a number; None when absent or a text ('did not trip', 'worked')."""
    if value is None or isinstance(value, str):
        return None
    return float(value)


def value_unit(key: str) -> str:
    """The unit of a reading's value by its key: 'ms' (timed tests), 'mA' (ramp) or ''."""
    if key in TEST_NAMES:
        return "ms"
    return "mA" if key == "ramp_ma" else ""


def fmt_value(key: str, value: float | str | None) -> str:
    """Any recorded value of a reading for people, by its key: '24 ms', 'did not trip', '23 mA'."""
    if value is None:
        return "—"
    if key in TEST_NAMES:
        return fmt_result(value)
    if key == "ramp_ma" and not isinstance(value, str):
        return f"{value:g} mA"
    return str(value)


def judge_results(node: Any, results: Any, rules: str) -> dict[str, Judgement]:
    """One set of results (one test waveform) judged: keys the test names and 'ramp_ma'."""
    out: dict[str, Judgement] = {}
    tc = results.test_current
    bands = {g: time_band(node, g, results.waveform, rules, tc) for g in GROUPS}
    values = results.__dict__
    for t in TEST_NAMES:
        out[t] = judge_time(bands[_GROUP_OF[t]], values[t])
    out["ramp_ma"] = judge_ramp(ramp_band(node, results.waveform), results.ramp_ma)
    return out


def judge_reading(node: Any, reading: Any, rules: str) -> dict[str, Judgement]:
    """Every recorded value of one reading's own waveform judged against its band
    (keys: test names, 'ramp_ma', 'button'); the results in ``further`` are
    judged by :func:`judge_results`."""
    out = judge_results(node, reading, rules)
    out["button"] = judge_button(reading.button)
    return out


def judge_button(button: str | None) -> Judgement:
    """Judge the integral test button: it must trip the device (common practice)."""
    if button == "failed":
        return Judgement("reading.button-failed", "test button did not trip the device")
    return Judgement(None, button or "not recorded")
