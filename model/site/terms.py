"""The site file's vocabulary: format name, ids, choices and the kinds of node.

Glossary of field names used across the project: ``idn_ma`` rated residual
operating current [mA], ``rated_a`` rated current [A], ``trip_ms`` trip time
[ms], ``zs_ohm`` earth fault loop impedance [Ω], ``ra_ohm`` earth electrode
plus protective conductor resistance [Ω], ``ze_ohm`` external loop impedance
[Ω], ``u0_v`` nominal line-to-earth voltage [V], ``leakage_ma`` standing
protective-conductor current [mA].
"""

from __future__ import annotations

import math
from collections.abc import Iterable
from typing import Annotated, Any, Literal, get_args, get_origin

from pydantic import (
    BaseModel,
    ConfigDict,
    Field,
    StringConstraints,
)

FORMAT_NAME = "tripwise.site"
FORMAT_VERSION = 2

#: What a node or visit id may be, as a pattern and in words.
ID_PATTERN = r"^[A-Za-z0-9][A-Za-z0-9._-]{0,39}$"
ID_RULE = "letters, digits, dot, dash or underscore; up to 40, starting with a letter or digit"

NodeId = Annotated[
    str,
    StringConstraints(pattern=ID_PATTERN),
    Field(description="Short unique id chosen by the user (letters, digits, . _ -; max 40)."),
]

Earthing = Literal["TN-S", "TN-C-S", "TT", "IT"]
RuleSetName = Literal["uk-bs7671-2022", "iec-60364"]
Waveform = Literal["AC", "A", "F", "B"]
Delay = Literal["general", "S", "set"]
Curve = Literal["B", "C", "D"]
CircuitUse = Literal[
    "sockets",
    "lighting",
    "cooker",
    "shower",
    "water-heater",
    "heating",
    "ev-charger",
    "outdoor",
    "fixed-equipment",
    "other",
]
LoadFlag = Literal[
    "ev-no-dc-detect",
    "ev-dc-detect-6ma",
    "inverter",
    "drive-1ph",
    "drive-3ph",
    "it-equipment",
]
LocationFlag = Literal["bathroom", "outdoor", "agricultural", "swimming-pool", "sauna", "wet-area"]
TestWaveform = Literal["AC", "half-wave", "smooth-dc"]
#: The current a timed test with other than sinusoidal current was made at:
#: ``rated``, the marked multiple of IΔn (a half-wave "1×" test at IΔn), or
#: ``scaled``, that multiple times the waveform's factor (1.4 or 2 for half-wave,
#: 2 for smooth DC), as the product standards test break times.
TestCurrent = Literal["rated", "scaled"]
TestName = Literal["half_0", "half_180", "x1_0", "x1_180", "x5_0", "x5_180"]
ButtonResult = Literal["worked", "failed"]
#: Kinds that are residual-current *protective* devices (an RCM is not).
RcdKind = Literal["rccb", "rcbo", "srcd", "prcd", "cbr"]


def choices_of(literal: Any) -> tuple[Any, ...]:
    """The choices of a ``Literal`` type, in order: ``choices_of(Waveform)`` is
    ``("AC", "A", "F", "B")``.

    The one way to turn the vocabulary's choices into a list, so a list is
    never written out a second time.
    """
    if get_origin(literal) is not Literal:
        raise TypeError(f"{literal!r} is not a Literal type")
    return get_args(literal)


def or_list(items: Iterable[str]) -> str:
    """Items joined for a message: 'a', 'a or b', 'a, b or c'."""
    words = list(items)
    if len(words) < 2:
        return "".join(words)
    return ", ".join(words[:-1]) + " or " + words[-1]


#: The explicit "did not trip" state of a timed test.  Recorded as this string,
#: never as a number: an instrument that stops at its maximum test time has not
#: measured a trip time.
DID_NOT_TRIP = "did not trip"

TripResult = Annotated[float, Field(strict=True, gt=0, le=10_000)] | Literal["did not trip"]

TEST_NAMES: tuple[TestName, ...] = choices_of(TestName)
#: The keys of a reading that hold a test value (as against its waveform or notes).
TEST_VALUE_KEYS: tuple[str, ...] = (*TEST_NAMES, "ramp_ma", "button")

_GROUP_WORDS = {"half": "½ × IΔn", "x1": "1 × IΔn", "x5": "5 × IΔn"}
#: Every reading key in the trade's words, as printed for a client or shown on screen.
TEST_LABELS: dict[str, str] = {
    **{t: f"{_GROUP_WORDS[t.split('_')[0]]}, {t.split('_')[1]}°" for t in TEST_NAMES},
    "ramp_ma": "ramp test",
    "button": "test button",
    "waveform": "test waveform",
    "test_current": "test current",
    "further": "further test waveforms",
    "note": "note",
    "not_tested": "not tested",
}


def reading_label(key: str) -> str:
    """A reading key in the trade's words ('x1_180' -> '1 × IΔn, 180°'); unknown keys as given."""
    return TEST_LABELS.get(key, key)


RCD_KINDS: frozenset[str] = frozenset(choices_of(RcdKind))
#: Kinds that give overcurrent protection.
OVERCURRENT_KINDS = frozenset({"fuse", "mcb", "rcbo", "cbr"})

STRICT = ConfigDict(extra="forbid", strict=True, validate_default=True)


def finite(value: float | None, name: str) -> float | None:
    if value is not None and not math.isfinite(value):
        raise ValueError(f"{name} must be a finite number")
    return value


class StrictModel(BaseModel):
    model_config = STRICT
