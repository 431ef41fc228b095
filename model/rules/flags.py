"""The flag a recorded value earns against its band, without the words.

The checks judge every value of every reading on every visit; most are within
their bands and need no text.  These functions give the same flag as
:func:`model.rules.bands.judge_time`, :func:`~model.rules.bands.judge_ramp`
and :func:`~model.rules.bands.judge_reading` (tests hold them to it), and the
checks ask those for the words only where a flag is raised.

The bands of one device class (IΔn, type, delay and declared times) are
worked out once and shared by every device of that class.
"""

from __future__ import annotations

from functools import lru_cache
from typing import Any

from model.rules.bands import (
    FAILURE_FLAGS,
    GROUPS,
    NOT_APPLICABLE,
    Band,
    RampBand,
    _time_band,
    ramp_band,
)
from model.site.terms import DID_NOT_TRIP

#: (test group, its 0° key, its 180° key) in the order of :data:`GROUPS`.
GROUP_KEYS: tuple[tuple[str, str, str], ...] = tuple((g, f"{g}_0", f"{g}_180") for g in GROUPS)


def group_bands(
    node: Any, waveform: str, rules: str, test_current: str | None = None
) -> tuple[Band, ...]:
    """The band of each test group (order of :data:`GROUPS`) for this device and test waveform.

    The same bands as :func:`model.rules.bands.time_band` gives group by group.
    """
    d = node.__dict__  # plain field access: pydantic's fallback getattr is slow
    return _group_bands(
        float(d["idn_ma"]),
        str(d.get("waveform", "A")),
        str(d.get("delay", "general")),
        d.get("delay_ms"),
        d.get("max_break_ms"),
        waveform,
        rules,
        test_current == "scaled",
    )


@lru_cache(maxsize=4096)
def _group_bands(
    idn: float,
    dtype: str,
    delay: str,
    dms: float | None,
    bms: float | None,
    waveform: str,
    rules: str,
    scaled: bool,
) -> tuple[Band, ...]:
    return tuple(
        _time_band(idn, dtype, delay, dms, bms, g, waveform, rules, scaled) for g in GROUPS
    )


def time_flag(band: Band, value: float | str | None) -> str | None:
    """The flag :func:`model.rules.bands.judge_time` raises for this value, or None."""
    if value is None:
        return None
    if not band.applies:
        return NOT_APPLICABLE
    if band.group == "half":
        if band.may_trip or value == DID_NOT_TRIP:
            return None
        return "reading.half-tripped"
    if band.may_trip:
        return None
    if value == DID_NOT_TRIP:
        return "reading.no-trip"
    if band.max_ms is not None and value > band.max_ms:  # type: ignore[operator]
        return "reading.too-slow"
    if band.min_ms is not None and value < band.min_ms:  # type: ignore[operator]
        return "reading.too-fast"
    return None


def ramp_flag(node: Any, waveform: str, ramp_ma: float | None) -> str | None:
    """The flag :func:`model.rules.bands.judge_ramp` raises for a ramp result, or None."""
    if ramp_ma is None:
        return None
    d = node.__dict__
    band = _ramp_band(float(d["idn_ma"]), str(d.get("waveform", "A")), waveform)
    if not band.applies:
        return NOT_APPLICABLE
    if ramp_ma > band.high_ma or ramp_ma <= band.low_ma:
        return "reading.ramp-out-of-band"
    return None


@lru_cache(maxsize=1024)
def _ramp_band(idn_ma: float, dtype: str, waveform: str) -> RampBand:
    """:func:`model.rules.bands.ramp_band` of a device class (it reads only these fields)."""
    return ramp_band(_RampNode(idn_ma, dtype), waveform)


class _RampNode:
    """The fields :func:`model.rules.bands.ramp_band` reads of a device node."""

    def __init__(self, idn_ma: float, waveform: str) -> None:
        self.idn_ma = idn_ma
        self.waveform = waveform


def value_flags(node: Any, res: Any, rules: str) -> tuple[str | None, ...]:
    """The flag of each timed value of one set of results (order of ``TEST_NAMES``), then
    the flag of its ramp value: what :func:`model.rules.bands.judge_results` flags."""
    return judge_values(node, res, rules)[1]


def judge_values(
    node: Any, res: Any, rules: str
) -> tuple[tuple[Band, ...], tuple[str | None, ...]]:
    """(:func:`group_bands`, :func:`value_flags`) of one set of results."""
    values = res.__dict__
    waveform = values["waveform"]
    bands = group_bands(node, waveform, rules, values["test_current"])
    out: list[str | None] = []
    for band, (_, k0, k180) in zip(bands, GROUP_KEYS, strict=True):
        out.append(time_flag(band, values[k0]))
        out.append(time_flag(band, values[k180]))
    out.append(ramp_flag(node, waveform, values["ramp_ma"]))
    return bands, tuple(out)


#: The keys of :func:`value_flags`, in its order.
FLAG_KEYS: tuple[str, ...] = (*(k for _, k0, k180 in GROUP_KEYS for k in (k0, k180)), "ramp_ma")


def failing_keys(flags: tuple[str | None, ...], button: str | None) -> list[str]:
    """The keys whose judgement by :func:`model.rules.bands.judge_reading` is a failure flag.

    ``flags``: :func:`value_flags` of the reading; ``button``: its test button result.
    In the order ``judge_reading`` gives them (test names, 'ramp_ma', 'button').
    """
    out = [k for k, f in zip(FLAG_KEYS, flags, strict=True) if f in FAILURE_FLAGS]
    if button == "failed":
        out.append("button")
    return out
