"""Published limits as data, each row carrying its source.

A reviewer can hold every number here against the standard it names.  Checks
never write a limit inline: they read it from these tables.  Where a value is
common practice or only partly confirmed, the row says so in ``basis``, and
findings built on it are presented as guidance.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Literal

from model.site.terms import RuleSetName, TestWaveform

Basis = Literal["standard", "common-practice", "guidance"]

IEC_61008_T1 = "IEC 61008-1 Ed.3 Table 1 (same values IEC 61009-1)"


@dataclass(frozen=True)
class TimePoint:
    """One column of the product standard's break-time table.

    ``multiple`` is the residual current as a multiple of IΔn, or ``None`` when
    the column is an absolute current (``abs_a``).
    """

    multiple: float | None
    abs_a: float | None
    general_max_ms: float
    s_max_ms: float
    s_min_ms: float
    source: str = IEC_61008_T1

    def current_ma(self, idn_ma: float) -> float:
        """The residual current of this column for a device of ``idn_ma``. [mA]"""
        if self.multiple is not None:
            return self.multiple * idn_ma
        assert self.abs_a is not None
        return self.abs_a * 1000.0


#: Maximum break times and minimum non-actuating times for sinusoidal residual
#: current (IEC 61008-1 Ed.3 Table 1; IEC 61009-1 gives the same values).
BREAK_TIMES: tuple[TimePoint, ...] = (
    TimePoint(multiple=1.0, abs_a=None, general_max_ms=300, s_max_ms=500, s_min_ms=130),
    TimePoint(multiple=2.0, abs_a=None, general_max_ms=150, s_max_ms=200, s_min_ms=60),
    TimePoint(multiple=5.0, abs_a=None, general_max_ms=40, s_max_ms=150, s_min_ms=50),
    TimePoint(multiple=None, abs_a=5.0, general_max_ms=40, s_max_ms=150, s_min_ms=40),
    TimePoint(multiple=None, abs_a=500.0, general_max_ms=40, s_max_ms=150, s_min_ms=40),
)

#: For general-type devices with IΔn <= 30 mA the standard allows 0.25 A in
#: place of 5 IΔn for the 40 ms test (IEC 61008-1 Ed.3 Table 1, note).
ALT_5X_CURRENT_A = 0.25
ALT_5X_MAX_IDN_MA = 30.0

#: Residual non-operating current as a fraction of IΔn (IEC 61008-1 Ed.3, 3.4.x:
#: IΔno = 0.5 IΔn).  Sinusoidal current at or below this must not trip.
NON_OPERATING_FRACTION = 0.5
NON_OPERATING_SOURCE = "IEC 61008-1 Ed.3 (IΔno = 0.5 IΔn)"


@dataclass(frozen=True)
class OperatingBand:
    """Where a device must trip for a given test waveform, as fractions of IΔn."""

    waveform: TestWaveform
    idn_over_10ma: bool
    low: float
    high: float
    time_multiplier: float
    source: str
    basis: Basis


#: Operating-current bands by test waveform.  ``time_multiplier`` is the factor
#: applied to the break-time test currents for that waveform.
OPERATING_BANDS: tuple[OperatingBand, ...] = (
    OperatingBand("AC", True, 0.5, 1.0, 1.0, IEC_61008_T1 + "; IΔno = 0.5 IΔn", "standard"),
    OperatingBand("AC", False, 0.5, 1.0, 1.0, IEC_61008_T1 + "; IΔno = 0.5 IΔn", "standard"),
    OperatingBand(
        "half-wave", True, 0.35, 1.4, 1.4, "IEC 61008-1 Ed.3 Type A, half-wave 0°", "standard"
    ),
    OperatingBand(
        "half-wave", False, 0.35, 2.0, 2.0, "IEC 61008-1 Ed.3 Type A, half-wave 0°", "standard"
    ),
    OperatingBand(
        "smooth-dc",
        True,
        0.5,
        2.0,
        2.0,
        "IEC 62423 (smooth DC; lower bound only partly confirmed)",
        "guidance",
    ),
    OperatingBand(
        "smooth-dc",
        False,
        0.5,
        2.0,
        2.0,
        "IEC 62423 (smooth DC; lower bound only partly confirmed)",
        "guidance",
    ),
)


def operating_band(waveform: str, idn_ma: float) -> OperatingBand:
    """The operating band for this test waveform and rating."""
    over = idn_ma > 10
    for b in OPERATING_BANDS:
        if b.waveform == waveform and b.idn_over_10ma == over:
            return b
    raise KeyError(waveform)


@dataclass(frozen=True)
class Rule:
    """A published limit or rule of installation, with its source."""

    value: float
    unit: str
    source: str
    basis: Basis

    def text(self) -> str:
        """The limit with its unit, as messages write it: '50 V', '200 Ω'."""
        return f"{self.value:g} {self.unit}"


#: Touch-voltage limit for RCD fault protection in TT: RA × IΔn <= 50 V.
TT_TOUCH_V = Rule(50.0, "V", "BS 7671 411.5.3(ii); IEC 60364-4-41 411.5.3", "standard")
#: Zs limit for RCD-protected circuits: Zs <= 50 V / IΔn.
ZS_RCD_V = Rule(50.0, "V", "BS 7671 Table 41.5 (50 V / IΔn)", "standard")
#: Above this an earth electrode resistance may not be stable.
RA_STABLE_OHM = Rule(200.0, "Ω", "BS 7671 Table 41.5 Note 2", "standard")
#: Accumulated protective-conductor current downstream of an RCD <= 30 % of IΔn.
LEAKAGE_FRACTION = Rule(0.30, "× IΔn", "BS 7671 531.3.2(iii)", "standard")
#: Upstream IΔn at least three times downstream IΔn for series RCDs.
CASCADE_RATIO = Rule(
    3.0,
    "×",
    "BS 7671 536.4.1.4 (clause text not seen; common practice worldwide)",
    "common-practice",
)
#: Additional protection: RCD of IΔn not exceeding 30 mA.
ADDITIONAL_IDN_MA = Rule(30.0, "mA", "BS 7671 411.3.3", "standard")
#: Socket-outlets and outdoor mobile equipment up to this rating need it.
ADDITIONAL_MAX_A = Rule(32.0, "A", "BS 7671 411.3.3(a)/(b)", "standard")
#: Agricultural and horticultural premises: socket-outlets above 32 A need an
#: RCD of IΔn not exceeding 100 mA, all other circuits one not exceeding 300 mA
#: (socket-outlets up to 32 A: 30 mA).  Clause number from memory.
AGRI_LARGE_SOCKET_IDN_MA = Rule(
    100.0, "mA", "BS 7671 705.411.1(ii) (clause from memory)", "guidance"
)
AGRI_OTHER_IDN_MA = Rule(300.0, "mA", "BS 7671 705.411.1(iii) (clause from memory)", "guidance")


@dataclass(frozen=True)
class LocationRule:
    """Why circuits serving a special location need a 30 mA RCD, under each rule set."""

    reason: str
    uk_source: str
    iec_source: str
    uk_basis: Basis


#: Special locations whose circuits need additional protection by an RCD of
#: IΔn <= 30 mA.  Bathrooms rest on the clause text (BS 7671 701.411.3.3);
#: the other clause numbers are from memory, so those rules are guidance.
#: A sauna's heater is exempt (703.411.3.3); a swimming pool's zone 0 and 1
#: equipment is normally at SELV, which the site file does not record, so
#: the rule asks for RCD protection of every circuit serving the pool and
#: says that SELV circuits are the exception.  "Wet area" is not a location
#: of BS 7671 Part 7: it is read as a room containing a bath or shower.
LOCATION_RULES: dict[str, LocationRule] = {
    "bathroom": LocationRule(
        "serves a bathroom",
        "BS 7671 701.411.3.3",
        "IEC 60364-7-701 (clause from memory)",
        "standard",
    ),
    "wet-area": LocationRule(
        "serves a wet area (read as a room containing a bath or shower)",
        "BS 7671 701.411.3.3 where the wet area contains a bath or shower (guidance otherwise)",
        "IEC 60364-7-701 (clause from memory)",
        "guidance",
    ),
    "sauna": LocationRule(
        "serves a sauna (the sauna heater is exempt)",
        "BS 7671 703.411.3.3 (clause from memory)",
        "IEC 60364-7-703 (clause from memory)",
        "guidance",
    ),
    "swimming-pool": LocationRule(
        "serves a swimming pool's zones (SELV circuits excepted)",
        "BS 7671 Section 702, 702.411.3.3 (clause from memory)",
        "IEC 60364-7-702 (clause from memory)",
        "guidance",
    ),
    "agricultural": LocationRule(
        "socket-outlets up to 32 A in agricultural premises",
        "BS 7671 705.411.1(i) (clause from memory)",
        "IEC 60364-7-705 (clause from memory)",
        "guidance",
    ),
}
#: Default largest prospective earth-fault current where none is known.
DEFAULT_MAX_FAULT_A = Rule(500.0, "A", IEC_61008_T1 + " (upper test current)", "standard")


#: BS 7671 Table 41.5: maximum Zs for RCD-protected circuits, as tabulated. [Ω]
#: The table rounds 50 V / IΔn (300 mA: 166.7 → 167 Ω); the tabulated value is
#: the limit, so a Zs of exactly 167 Ω passes.
ZS_TABLE_41_5: dict[float, float] = {30.0: 1667.0, 100.0: 500.0, 300.0: 167.0, 500.0: 100.0}


def zs_limit_ohm(idn_ma: float) -> float:
    """Maximum Zs for a circuit whose fault protection is an RCD of ``idn_ma``. [Ω]

    The tabulated value for the ratings of Table 41.5, ``50 V / IΔn`` for any
    other rating.

    References
    ----------
    BS 7671:2018+A2:2022 Table 41.5 (30 mA 1667 Ω, 100 mA 500 Ω, 300 mA 167 Ω,
    500 mA 100 Ω).
    """
    tabulated = ZS_TABLE_41_5.get(float(idn_ma))
    if tabulated is not None:
        return tabulated
    return ZS_RCD_V.value / (idn_ma / 1000.0)


def tt_touch_voltage_v(ra_ohm: float, idn_ma: float) -> float:
    """RA × IΔn, the touch voltage at the rated residual current. [V]

    References
    ----------
    BS 7671 411.5.3(ii); IEC 60364-4-41 411.5.3.
    """
    return ra_ohm * idn_ma / 1000.0


def break_limits_ms(multiple: float, delay: str) -> tuple[float | None, float]:
    """(minimum non-actuating, maximum break) time for a test at ``multiple`` × IΔn.

    Only the tabulated multiples 1, 2 and 5 are accepted.  The minimum is
    ``None`` for a general-type device (no intentional delay).

    References
    ----------
    IEC 61008-1 Ed.3 Table 1; IEC 61009-1 Table 1; BS 7671 Appendix 3 Table 3A.
    """
    for p in BREAK_TIMES:
        if p.multiple == multiple:
            if delay == "S":
                return p.s_min_ms, p.s_max_ms
            return None, p.general_max_ms
    raise ValueError(f"no tabulated break time at {multiple} × IΔn")


@dataclass(frozen=True)
class RuleSet:
    """A selectable set of rules: which tests are required and how rules are presented."""

    name: RuleSetName
    title: str
    required_tests: tuple[str, ...]
    additional_basis: Basis
    additional_source: str
    domestic_lighting: bool
    type_ac_source: str
    test_source: str


#: One rule set for each choice of :data:`model.site.terms.RuleSetName`.
RULE_SETS: dict[str, RuleSet] = {
    "uk-bs7671-2022": RuleSet(
        name="uk-bs7671-2022",
        title="UK, BS 7671:2018+A2:2022",
        required_tests=("x1",),
        additional_basis="standard",
        additional_source="BS 7671 411.3.3",
        domestic_lighting=True,
        type_ac_source="BS 7671 531.3.3",
        test_source="BS 7671 643.7.1 (A2:2022 note: one AC test at IΔn required)",
    ),
    "iec-60364": RuleSet(
        name="iec-60364",
        title="Generic IEC 60364 (additional-protection rules as common practice)",
        required_tests=("x1",),
        additional_basis="common-practice",
        additional_source="IEC 60364-4-41 411.3.3 (common practice)",
        domestic_lighting=True,
        type_ac_source="IEC 60364-5-53 531.3.3 (common practice)",
        test_source="IEC 60364-6 (verification of RCD operation; common practice)",
    ),
}


#: Installation-rule sources quoted under the generic IEC rule set, by rule id.
#: BS 7671 follows the IEC 60364 clause numbering for these parts; the IEC
#: clause numbers are from memory (not checked against the IEC text), so they
#: are stated as such, and the rules keep the basis they have under BS 7671.
IEC_INSTALLATION_SOURCES: dict[str, str] = {
    "cascade.upstream-not-delayed": "IEC 60364-5-53 536.4 (clause from memory; common practice worldwide)",
    "cascade.ratio-below-3": "IEC 60364-5-53 536.4 (clause from memory; common practice worldwide)",
    "type.dc-load": "IEC 60364-5-53 531.3.3; IEC 60364-7-722 722.531.3.101 (clauses from memory)",
    "leakage.over-30pct": "IEC 60364-5-53 531.3.2 (clause from memory; BS 7671 531.3.2(iii) wording)",
    "resilience.lighting-single-rcd": "IEC 60364-3 314 (division of installation)",
    "earthing.zs-limit": "IEC 60364-4-41 411.5.3 (50 V / IΔn; tabulated as BS 7671 Table 41.5)",
    "earthing.ra-unstable": "BS 7671 Table 41.5 Note 2 (no IEC equivalent known; guidance)",
}


def rule_set(name: str) -> RuleSet:
    """The rule set of this name; a clear error for an unknown one."""
    try:
        return RULE_SETS[name]
    except KeyError:
        known = ", ".join(sorted(RULE_SETS))
        raise ValueError(f"unknown rule set {name!r}; known: {known}") from None
