"""A device's results on one visit: the reading and its further test waveforms.

Part of the site file (:mod:`model.site.models` holds the visit and the file).
"""

from __future__ import annotations

from typing import Annotated

from pydantic import Field, StringConstraints, model_validator

from model.site.terms import (
    TEST_NAMES,
    TEST_VALUE_KEYS,
    ButtonResult,
    StrictModel,
    TestCurrent,
    TestWaveform,
    TripResult,
)

_TEST_CURRENT_TEXT = (
    "For a half-wave or smooth-DC test: the instrument applied the marked multiple of "
    "IΔn ('rated'), or that multiple times the waveform's factor, 1.4 or 2 for half-wave "
    "and 2 for smooth DC ('scaled'). Not recorded: judged as 'rated', the smaller current."
)


class WaveformResults(StrictModel):
    """The timed and ramp results of one device with a further test waveform, on one visit."""

    waveform: TestWaveform = Field(description="Test current waveform of these results.")
    test_current: TestCurrent | None = Field(default=None, description=_TEST_CURRENT_TEXT)
    half_0: TripResult | None = Field(default=None, description="½ IΔn at 0°.")
    half_180: TripResult | None = Field(default=None, description="½ IΔn at 180°.")
    x1_0: TripResult | None = Field(default=None, description="1 × IΔn at 0°.")
    x1_180: TripResult | None = Field(default=None, description="1 × IΔn at 180°.")
    x5_0: TripResult | None = Field(default=None, description="5 × IΔn at 0°.")
    x5_180: TripResult | None = Field(default=None, description="5 × IΔn at 180°.")
    ramp_ma: Annotated[float, Field(strict=True, gt=0, le=100_000)] | None = Field(
        default=None, description="Ramp test trip current. [mA]"
    )

    @model_validator(mode="after")
    def _some_value(self) -> WaveformResults:
        if not self.has_values():
            raise ValueError(f"the {self.waveform} results record no value")
        return self

    def has_values(self) -> bool:
        """True when any timed or ramp result is recorded."""
        return any(getattr(self, k) is not None for k in WAVEFORM_VALUE_KEYS)


#: The keys of a further waveform's results that hold a value.
WAVEFORM_VALUE_KEYS: tuple[str, ...] = (*TEST_NAMES, "ramp_ma")


class Reading(StrictModel):
    """One device's results on one visit.

    The values at the top level were taken with ``waveform``; results with
    other test waveforms on the same visit (an AC and a half-wave test, say)
    are in ``further``, one entry a waveform.
    """

    half_0: TripResult | None = Field(
        default=None, description="½ IΔn at 0°. [ms] or 'did not trip'"
    )
    half_180: TripResult | None = Field(default=None, description="½ IΔn at 180°.")
    x1_0: TripResult | None = Field(
        default=None, description="1 × IΔn at 0°. [ms] or 'did not trip'"
    )
    x1_180: TripResult | None = Field(default=None, description="1 × IΔn at 180°.")
    x5_0: TripResult | None = Field(
        default=None, description="5 × IΔn at 0°. [ms] or 'did not trip'"
    )
    x5_180: TripResult | None = Field(default=None, description="5 × IΔn at 180°.")
    ramp_ma: Annotated[float, Field(strict=True, gt=0, le=100_000)] | None = Field(
        default=None, description="Ramp test trip current. [mA]"
    )
    button: ButtonResult | None = Field(default=None, description="Integral test button.")
    waveform: TestWaveform = Field(default="AC", description="Test current waveform used.")
    test_current: TestCurrent | None = Field(default=None, description=_TEST_CURRENT_TEXT)
    further: list[WaveformResults] = Field(
        default_factory=list,
        description="Results with further test waveforms on the same visit, one entry a "
        "waveform, none the same as 'waveform'.",
    )
    note: Annotated[str, StringConstraints(max_length=2000)] = Field(default="", description="")
    not_tested: Annotated[str, StringConstraints(min_length=1, max_length=500)] | None = Field(
        default=None, description="Reason the device was not tested (instead of readings)."
    )

    @model_validator(mode="after")
    def _not_tested_excludes_values(self) -> Reading:
        if self.not_tested is not None and self.has_values():
            raise ValueError("a reading marked not_tested cannot also carry test values")
        seen = [self.waveform]
        for i, f in enumerate(self.further):
            if f.waveform in seen:
                raise ValueError(
                    f"further[{i}]: the {f.waveform} results are given twice; "
                    "one entry a test waveform"
                )
            seen.append(f.waveform)
        return self

    def has_values(self) -> bool:
        """True when any test value is recorded (with any test waveform)."""
        return bool(self.further) or any(getattr(self, k) is not None for k in TEST_VALUE_KEYS)

    def result_sets(self) -> list[WaveformResults | Reading]:
        """Every set of results by test waveform: this reading's own first, then ``further``.

        Each has ``waveform``, ``test_current``, the timed tests and ``ramp_ma``.
        """
        return [self, *self.further]

    def results_for(self, waveform: str) -> WaveformResults | Reading | None:
        """The results taken with this test waveform, or None."""
        for r in self.result_sets():
            if r.waveform == waveform:
                return r
        return None

    def recorded(self, key: str) -> bool:
        """True when this reading carries something under ``key``.

        The test waveform is always there (it has a default); any other key
        counts when it is set and not empty.
        """
        if key == "further":
            return bool(self.further)
        return key == "waveform" or not blank(getattr(self, key))


def blank(value: object) -> bool:
    """True for a value that records nothing: absent, or an empty text."""
    return value is None or value == ""
