"""Which IΔn ratings are standard, and which changes to a device re-judge its readings.

A rating that is not a standard value is accepted (the device's marking is what it
is) but said to be unusual, so a slip of the keys (7 for 30) is seen at once.  A
change to a device's rating, type or delay moves the bands its readings were judged
against, so a screen asks before making it.
"""

from __future__ import annotations

from typing import Any

#: Preferred values of the rated residual operating current IΔn for RCCBs, RCBOs and
#: socket or portable RCDs (IEC 61008-1 5.3.3 and IEC 61009-1 5.3.3; values from
#: memory, not checked against the text: guidance).  [mA]
PREFERRED_IDN_MA: tuple[float, ...] = (6.0, 10.0, 30.0, 100.0, 300.0, 500.0)
PREFERRED_IDN_SOURCE = "IEC 61008-1 / IEC 61009-1 5.3.3 preferred values (from memory)"

#: Circuit-breakers with residual-current protection add the larger settings of
#: IEC 60947-2 Annex B (values from memory: guidance).  [mA]
CBR_PREFERRED_IDN_MA: tuple[float, ...] = (
    *PREFERRED_IDN_MA,
    1_000.0,
    3_000.0,
    5_000.0,
    10_000.0,
    30_000.0,
)
CBR_PREFERRED_SOURCE = "IEC 60947-2 Annex B preferred values (from memory)"

#: Node fields whose change moves the bands a device's readings are judged against.
REJUDGING_FIELDS: tuple[str, ...] = ("idn_ma", "waveform", "delay", "delay_ms", "max_break_ms")


def _ma_text(value: float) -> str:
    return f"{value:g} mA" if value < 1000 else f"{value / 1000:g} A"


def standard_ratings(kind: str) -> tuple[float, ...]:
    """The standard IΔn values for a kind of residual-current device. [mA]"""
    return CBR_PREFERRED_IDN_MA if kind == "cbr" else PREFERRED_IDN_MA


def rating_note(kind: str, idn_ma: float) -> str | None:
    """None for a standard IΔn; else a plain note that it is not one, with the standard values.

    References
    ----------
    IEC 61008-1 and IEC 61009-1, 5.3.3 (preferred values of IΔn); IEC 60947-2
    Annex B for CBRs.  Values from memory.
    """
    values = standard_ratings(kind)
    if any(abs(idn_ma - v) < 1e-9 for v in values):
        return None
    source = CBR_PREFERRED_SOURCE if kind == "cbr" else PREFERRED_IDN_SOURCE
    listed = ", ".join(_ma_text(v) for v in values)
    return (
        f"IΔn {idn_ma:g} mA is not a standard rating ({listed}; {source}). "
        "Kept as typed: check the device's marking."
    )


def rejudging_changes(old: Any, new: Any) -> list[str]:
    """The fields changed from ``old`` to ``new`` that move its reading bands, in order."""
    return [
        name
        for name in REJUDGING_FIELDS
        if getattr(old, name, None) != getattr(new, name, None)
        and (hasattr(old, name) or hasattr(new, name))
    ]
