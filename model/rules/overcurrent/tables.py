"""Published overcurrent limits as data, each table with its source and standing.

Values marked *from memory* were not read in the standard itself; checks
built on them present their result as guidance and let the user override it
with the maker's data (``maker_curve``, ``ia_a``, ``zs_max_ohm``).
"""

from __future__ import annotations

from dataclasses import dataclass

IEC_60898_T7 = "IEC 60898-1 Table 7 (time-current test points; IEC 61009-1 the same)"
IEC_60269_GATES = "IEC 60269-1 Table 3 gG gates (from memory; small ratings from the system sheets)"
IEC_60269_T7 = "IEC 60269-1 Table 7 (pre-arcing I²t at 0.01 s)"
IEC_60269_CONV = (
    "IEC 60269-1 Table 2 (conventional currents; 1.6 In confirmed, the rest from memory)"
)
IEC_60269_SEL = (
    "IEC 60269-1 7.8 (gG links in the ratio 1.6:1 from 16 A are selective; clause from memory)"
)
TABLE_41_1 = "BS 7671 Table 41.1; IEC 60364-4-41 Table 41.1"

#: Conventional time of an IEC 60898-1 breaker: 1 h up to 63 A, 2 h above. [s]
MCB_CONV_S = ((63.0, 3600.0), (float("inf"), 7200.0))


@dataclass(frozen=True)
class BreakerCurve:
    """The IEC 60898-1 Table 7 figures of one curve letter.

    ``lo``/``hi``: edges of the instantaneous band [× In]; ``d_max_s``: the
    longest time allowed at the lower edge (test d) for In up to 32 A and above.
    """

    lo: float
    hi: float
    d_max_small_s: float
    d_max_large_s: float
    source: str


#: Test a 1.13 In (no trip in the conventional time), test b 1.45 In (trip within
#: it), test c 2.55 In (1 s to 60 s up to 32 A, 1 s to 120 s above).
MCB_A, MCB_B, MCB_C = 1.13, 1.45, 2.55
MCB_C_MIN_S = 1.0
MCB_C_MAX_S = ((32.0, 60.0), (float("inf"), 120.0))
#: Below the lower edge of the instantaneous band no trip in under 0.1 s (test d);
#: above the upper edge a trip within 0.1 s (test e).
MCB_INSTANT_S = 0.1

BREAKER_CURVES: dict[str, BreakerCurve] = {
    "B": BreakerCurve(3.0, 5.0, 45.0, 90.0, IEC_60898_T7),
    "C": BreakerCurve(5.0, 10.0, 15.0, 30.0, IEC_60898_T7),
    "D": BreakerCurve(10.0, 20.0, 4.0, 8.0, IEC_60898_T7 + " (D-type test d times from memory)"),
}


@dataclass(frozen=True)
class Gate:
    """The gG gates of one rating: Imin(10 s), Imax(5 s), Imin(0.1 s), Imax(0.1 s). [A]

    At Imin(t) the link must not melt in less than t; at Imax(t) it must melt
    within t.
    """

    rated_a: float
    imin_10s: float
    imax_5s: float
    imin_01s: float
    imax_01s: float
    confidence: str


#: IEC 60269-1 Table 3 (16 A and up) and the small ratings of the system sheets.
GG_GATES: dict[float, Gate] = {
    g.rated_a: g
    for g in (
        Gate(2, 3.7, 9.2, 6.0, 23, "confirmed (public restatement)"),
        Gate(4, 7.8, 18.5, 14, 47, "from memory, medium-low"),
        Gate(6, 11, 28, 26, 72, "from memory, low-medium"),
        Gate(10, 22, 46.5, 58, 104, "from memory, low-medium"),
        Gate(16, 33, 65, 85, 150, "from memory, high"),
        Gate(20, 42, 85, 110, 200, "from memory, high"),
        Gate(25, 52, 110, 150, 260, "from memory, high"),
        Gate(32, 75, 150, 200, 350, "from memory, high"),
        Gate(40, 95, 190, 260, 450, "from memory, high"),
        Gate(50, 125, 250, 350, 610, "from memory, high"),
        Gate(63, 160, 320, 450, 820, "from memory, high"),
        Gate(80, 215, 425, 610, 1100, "from memory, high"),
        Gate(100, 290, 580, 820, 1450, "from memory, high"),
        Gate(125, 355, 715, 1100, 1910, "from memory, high"),
        Gate(160, 460, 950, 1450, 2590, "from memory, high"),
        Gate(200, 610, 1250, 1910, 3420, "from memory, high"),
        Gate(250, 750, 1650, 2590, 4500, "from memory, high"),
        Gate(315, 1050, 2200, 3420, 6000, "from memory, medium-high"),
        Gate(400, 1420, 2840, 4500, 8060, "from memory, medium-high"),
        Gate(500, 1780, 3800, 6000, 10600, "from memory, medium"),
        Gate(630, 2200, 5100, 8060, 14140, "from memory, medium"),
        Gate(800, 3060, 7000, 10600, 19000, "from memory, medium"),
        Gate(1000, 4000, 9500, 14140, 24000, "from memory, medium"),
        Gate(1250, 5000, 13000, 19000, 35000, "from memory, medium"),
    )
}

#: Pre-arcing I²t at 0.01 s, (minimum, maximum) [A²s] (IEC 60269-1 Table 7,
#: confirmed from a public national adoption).
GG_I2T: dict[float, tuple[float, float]] = {
    16: (300, 1_000),
    20: (500, 1_800),
    25: (1_000, 3_000),
    32: (1_800, 5_000),
    40: (3_000, 9_000),
    50: (5_000, 16_000),
    63: (9_000, 27_000),
    80: (16_000, 46_000),
    100: (27_000, 86_000),
    125: (46_000, 140_000),
    160: (86_000, 250_000),
    200: (140_000, 400_000),
    250: (250_000, 760_000),
    315: (400_000, 1_300_000),
    400: (760_000, 2_250_000),
    500: (1_300_000, 3_800_000),
    630: (2_250_000, 7_500_000),
    800: (3_800_000, 13_600_000),
    1000: (7_840_000, 25_000_000),
    1250: (13_700_000, 47_000_000),
}
I2T_TIME_S = 0.01


def gg_conventional(rated_a: float) -> tuple[float, float, float]:
    """(non-fusing current Inf, fusing current If, conventional time) of a gG link. [A, A, s]

    References
    ----------
    IEC 60269-1 Table 2 (If = 1.6 In from 16 A confirmed; the rest from memory).
    """
    if rated_a <= 4:
        inf, i_f = 1.5, 2.1
    elif rated_a < 16:
        inf, i_f = 1.5, 1.9
    else:
        inf, i_f = 1.25, 1.6
    if rated_a <= 63:
        conv = 3600.0
    elif rated_a <= 160:
        conv = 7200.0
    elif rated_a <= 400:
        conv = 10800.0
    else:
        conv = 14400.0
    return inf * rated_a, i_f * rated_a, conv


#: gG links in this ratio or more, both of 16 A or more, are selective.
GG_SELECTIVE_RATIO = 1.6
GG_SELECTIVE_FROM_A = 16.0

#: IEC 60947-2: conventional non-tripping 1.05 Ir, tripping 1.30 Ir; release
#: accuracy ±20 % (trips by 1.2 × setting; from memory).
CBR_NON_TRIP, CBR_TRIP, CBR_TOLERANCE = 1.05, 1.30, 1.2
IEC_60947_2 = "IEC 60947-2 (1.05/1.30 Ir; release tolerance ±20 % from memory)"


# --- disconnection (Table 41.1) -------------------------------------------------


def max_disconnection_s(earthing: str, u0_v: float, final: bool) -> float | None:
    """Maximum disconnection time for a circuit, or None where the table gives none. [s]

    ``final``: a final circuit up to 63 A with socket-outlets or up to 32 A
    supplying only fixed equipment; other circuits (distribution circuits and
    larger final circuits) have 5 s in TN and 1 s in TT.  IT systems are not
    covered (the second-fault rules differ).

    References
    ----------
    BS 7671 Table 41.1 and 411.3.2.3/411.3.2.4; IEC 60364-4-41 Table 41.1.
    """
    if earthing == "IT":
        return None
    tt = earthing == "TT"
    if not final:
        return 1.0 if tt else 5.0
    if u0_v <= 50:
        return None
    if u0_v <= 120:
        return 0.3 if tt else 0.8
    if u0_v <= 230:
        return 0.2 if tt else 0.4
    if u0_v <= 400:
        return 0.07 if tt else 0.2
    return 0.04 if tt else 0.1


#: Ia as a multiple of In for IEC 60898-1 breakers: the top of the instantaneous
#: band (valid for any required time from 0.1 s to 5 s).
IA_MULTIPLE = {"B": 5.0, "C": 10.0, "D": 20.0}
IA_SOURCE = "IEC 60898-1 Table 7 test e (Ia = 5/10/20 In; BS 7671 Appendix 3 convention)"


@dataclass(frozen=True)
class ZsRule:
    """How a rule set judges Zs: the voltage factor and the comparison for a cold reading."""

    cmin: float
    cmin_source: str
    cold_factor: float
    cold_source: str
    cold_basis: str


ZS_RULES: dict[str, ZsRule] = {
    "uk-bs7671-2022": ZsRule(
        0.95,
        "BS 7671 411.4.4 (Zs × Ia ≤ U0 × Cmin, Cmin 0.95)",
        0.8,
        "BS 7671 Appendix 3 (measured Zs at ambient compared with 0.8 × the maximum; "
        "common practice, UK)",
        "common-practice",
    ),
    "iec-60364": ZsRule(
        1.0,
        "IEC 60364-4-41 411.4.4 (Zs × Ia ≤ U0)",
        2.0 / 3.0,
        "IEC 60364-6 informative annex (measured Zs ≤ 2/3 × U0 / Ia; from memory)",
        "guidance",
    ),
}
