"""Which test waveforms suit which device type, and the limits of a timed test at
the current the instrument applied.

The product standards test a device with the waveforms of its type only, and
test break times with other than sinusoidal current at their own currents
(IΔn times the waveform's ``time_multiplier`` in :mod:`model.rules.limits`).
The reading bands (:mod:`model.rules.bands`) and the band envelope
(:mod:`model.rules.envelope`) read their limits from here.
"""

from __future__ import annotations

from dataclasses import dataclass

from model.rules.limits import (
    BREAK_TIMES,
    IEC_61008_T1,
    Basis,
    operating_band,
)
from model.site.terms import TestWaveform

#: The test waveforms specified for each device type.  A Type AC device is
#: specified for sinusoidal current only; Type A adds half-wave pulsating DC;
#: Type F as A (plus composite frequencies); Type B adds smooth DC.  Any other
#: test is not a specified test of that type and says nothing about it.
SPECIFIED_TEST_WAVEFORMS: dict[str, tuple[TestWaveform, ...]] = {
    "AC": ("AC",),
    "A": ("AC", "half-wave"),
    "F": ("AC", "half-wave"),
    "B": ("AC", "half-wave", "smooth-dc"),
}
WAVEFORM_TYPE_SOURCE = (
    "BS 7671 531.3.3; IEC 61008-1 / IEC 61009-1 (Types AC and A); IEC 62423 (Types F and B)"
)


def waveform_applies(device_type: str, test_waveform: str) -> bool:
    """True when ``test_waveform`` is a specified test of a device of ``device_type``.

    References
    ----------
    IEC 61008-1 / IEC 61009-1 (Type AC: sinusoidal only; Type A: also
    half-wave pulsating DC); IEC 62423 (Type F as A; Type B also smooth DC);
    BS 7671 531.3.3.
    """
    return test_waveform in SPECIFIED_TEST_WAVEFORMS.get(device_type, ("AC",))


#: Where the timed tests with other than sinusoidal current come from.  The
#: smooth-DC break-time currents (2, 4, 10 IΔn) are from memory of IEC 62423.
SCALED_TEST_SOURCE: dict[str, str] = {
    "AC": IEC_61008_T1,
    "half-wave": "IEC 61008-1 Ed.3 Type A, half-wave break times at 1.4, 2.8 and 7 IΔn "
    "(2, 4 and 10 IΔn for IΔn <= 10 mA)",
    "smooth-dc": "IEC 62423 Type B, smooth-DC break times at 2, 4 and 10 IΔn (from memory)",
}


@dataclass(frozen=True)
class TimedLimits:
    """The limits of one timed test at the current the instrument applied.

    ``applied`` is that current as a multiple of IΔn.  ``max_ms`` is None where
    the product standard does not guarantee a trip at that current (below its
    first test current for the waveform): the result is recorded, not judged.
    ``min_ms`` is None for a device with no intentional delay.
    """

    applied: float
    min_ms: float | None
    max_ms: float | None
    source: str
    basis: Basis
    #: False below the waveform's first test current: a trip is not guaranteed.
    must_trip: bool = True
    #: The waveform's factor on the test currents (``time_multiplier``).
    factor: float = 1.0


def timed_limits(
    multiple: float,
    waveform: str,
    idn_ma: float,
    delay: str,
    *,
    scaled: bool,
    delay_ms: float | None = None,
    declared_max_ms: float | None = None,
) -> TimedLimits:
    """The limits of a timed test at ``multiple`` × IΔn with ``waveform`` test current.

    The product standard tests break times at IΔn, 2 IΔn and 5 IΔn times the
    waveform's ``time_multiplier`` (1 for sinusoidal current; 1.4, or 2 for
    IΔn <= 10 mA, for half-wave; 2 for smooth DC).  ``scaled`` says whether
    the instrument applied that multiplied current (a half-wave "1×" test at
    1.4 IΔn) or the plain multiple of IΔn (a half-wave "1×" test at IΔn).
    Between the tabulated currents the step reading applies: the maximum is
    the value at the largest tabulated current at or below the applied one,
    the minimum the value at the smallest at or above it.

    A set-delay device uses its declared setting (:func:`set_delay_times_ms`).

    References
    ----------
    IEC 61008-1 Ed.3 Table 1 and the Type A half-wave test currents; IEC 61009-1;
    IEC 62423 (smooth DC, from memory); IEC 60947-2 Annex B (declared settings).
    """
    op = operating_band(waveform, idn_ma)
    factor = op.time_multiplier
    applied = multiple * factor if scaled else multiple
    source = SCALED_TEST_SOURCE.get(waveform, IEC_61008_T1)
    basis: Basis = op.basis
    columns = [(p.multiple * factor, p) for p in BREAK_TIMES if p.multiple is not None]
    below = [p for m, p in columns if m <= applied * (1 + 1e-9)]
    above = [p for m, p in columns if m >= applied * (1 - 1e-9)]
    if not below:
        return TimedLimits(applied, None, None, source, basis, False, factor)
    if delay == "set":
        lo, hi = set_delay_times_ms(delay_ms, declared_max_ms)
        return TimedLimits(applied, lo, hi, SET_DELAY_SOURCE, "guidance", True, factor)
    hi_p, lo_p = below[-1], (above[0] if above else columns[-1][1])
    if delay == "S":
        return TimedLimits(applied, lo_p.s_min_ms, hi_p.s_max_ms, source, basis, True, factor)
    return TimedLimits(applied, None, hi_p.general_max_ms, source, basis, True, factor)


SET_DELAY_SOURCE = (
    "IEC 60947-2 Annex B (declared setting; the non-actuating time is declared at 2 IΔn, "
    "from memory, and read as the minimum at every test current)"
)


def set_delay_times_ms(
    delay_ms: float | None, declared_max_ms: float | None
) -> tuple[float | None, float | None]:
    """(minimum non-actuating, maximum break) times of a set-delay device. [ms]

    The declared delay is the limiting non-actuating time, declared at 2 IΔn
    (from memory).  A settable delay is a definite-time delay, so it is read
    as the minimum at every current at which the device may trip (IΔn, 2 IΔn,
    5 IΔn and above): a trip faster than it at 1× or 5× is too fast.  The band
    envelope and the reading check both read it through this function.

    References
    ----------
    IEC 60947-2 Annex B (time-delay type, declared settings; from memory).
    """
    return delay_ms, declared_max_ms
