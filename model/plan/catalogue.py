"""The standard choices a remedy is made of, as data with their sources.

The planner (:mod:`model.plan.search`) never invents a device: every change it
tries is one of the choices below, made on one device of the site.  Each list
says where it comes from; values from memory say so.  Makers' curves and
tables are never part of it: a change that needs them is left to the user.

What the planner may change, by kind of device:

* a residual-current device (RCCB, RCBO, CBR; socket and portable RCDs within
  their own, narrower choices): its IΔn along :data:`IDN_SERIES_MA`, its
  waveform type up :data:`WAVEFORM_ORDER` (never to Type AC: a new device is
  at least Type A, BS 7671 531.3.3), its delay (type S only where
  :func:`delay_s_allowed`), a like-for-like replacement of a device that failed
  its tests, and its removal where it only duplicates the protection of the
  residual-current device above it (:func:`duplicates_above`);
* an MCB: an RCBO of the same curve and rating (:data:`RCBO_FROM_MCB`), a
  larger rating or a slower curve where it feeds other devices, a higher
  breaking capacity (:data:`BREAKER_KA_SERIES`);
* a gG fuse: a larger rating along :data:`GG_RATINGS_A`, a higher breaking
  capacity (:data:`FUSE_KA_SERIES`).  The supply's own cut-out fuse (the fuse
  fed straight from the origin) belongs to the network operator and is never
  changed by a plan.

Ranking of changes (documented in README, "Planning a remedy"): a plan with
fewer changed devices wins; then fewer new devices (a removal or a setting of
an adjustable device is no new device); then the lower sum of
:attr:`Choice.cost`, our own rough order of price and work, not a price list.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from model.site.terms import RCD_KINDS

#: Rated residual operating currents a plan offers. [mA]
#: IEC 61008-1 / IEC 61009-1 preferred values of IΔn (from memory: 6, 10, 30,
#: 100, 300, 500 mA; 6 mA is left out, it is not a protective choice for a circuit).
IDN_SERIES_MA: tuple[float, ...] = (10.0, 30.0, 100.0, 300.0, 500.0)
IDN_SOURCE = "IEC 61008-1 / IEC 61009-1 preferred values of IΔn (from memory)"

#: Socket-outlet and portable RCDs are made for personal protection: 10 or 30 mA
#: (common practice; BS 7671 411.3.3 asks for 30 mA or less where they serve).
IDN_PERSONAL_MA: tuple[float, ...] = (10.0, 30.0)

#: Waveform types, each responding to everything the one before it does and more
#: (IEC 60755; IEC 62423 for F and B).
WAVEFORM_ORDER: tuple[str, ...] = ("AC", "A", "F", "B")
WAVEFORM_SOURCE = "IEC 60755; IEC 62423 (Types F and B)"
#: The least type a new device is given: BS 7671 531.3.3 allows Type AC only for
#: fixed equipment with no DC component, so a plan never fits a new Type AC device.
NEW_WAVEFORM_MIN = "A"
NEW_WAVEFORM_SOURCE = "BS 7671 531.3.3"

#: Type S (time-delayed) exists only above 30 mA and from 25 A rated current.
DELAY_S_MIN_IDN_MA = 30.0  # exclusive
DELAY_S_MIN_RATED_A = 25.0
DELAY_S_SOURCE = "IEC 61008-1 Ed.3 / IEC 61009-1 (type S: IΔn > 30 mA, In ≥ 25 A)"

#: Rated currents of circuit-breakers (IEC 60898-1 preferred values, from memory). [A]
BREAKER_RATINGS_A: tuple[float, ...] = (
    6.0, 10.0, 13.0, 16.0, 20.0, 25.0, 32.0, 40.0, 50.0, 63.0, 80.0, 100.0, 125.0
)  # fmt: skip
BREAKER_RATINGS_SOURCE = "IEC 60898-1 preferred rated currents (from memory)"

#: gG fuse-link ratings: the ratings whose gates IEC 60269-1 Table 3 gives (the
#: same as the checks use, :data:`model.rules.overcurrent.tables.GG_GATES`). [A]
GG_RATINGS_A: tuple[float, ...] = (
    2.0, 4.0, 6.0, 10.0, 16.0, 20.0, 25.0, 32.0, 40.0, 50.0, 63.0, 80.0, 100.0,
    125.0, 160.0, 200.0, 250.0, 315.0, 400.0, 500.0, 630.0, 800.0, 1000.0, 1250.0,
)  # fmt: skip
GG_RATINGS_SOURCE = "IEC 60269-1 Table 3 ratings (R10 series; gates from memory)"

#: Rated short-circuit capacities Icn of breakers offered. [kA]
BREAKER_KA_SERIES: tuple[float, ...] = (6.0, 10.0, 15.0, 25.0)
BREAKER_KA_SOURCE = "IEC 60898-1 standard values of Icn (6 and 10 kA; 15 and 25 kA from memory)"
#: Breaking capacities of gG fuse-links offered. [kA]
FUSE_KA_SERIES: tuple[float, ...] = (50.0, 80.0)
FUSE_KA_SOURCE = "IEC 60269-2 (BS 88-2) industrial gG links, 50 kA and 80 kA (from memory)"

#: How many steps up a series a larger upstream rating may go in one change.
RATING_STEPS = 2

#: The curves an upstream breaker may be moved to for selectivity, slowest last
#: (IEC 60898-1 instantaneous bands B 3-5 In, C 5-10 In, D 10-20 In).
CURVE_ORDER: tuple[str, ...] = ("B", "C", "D")
CURVE_SOURCE = "IEC 60898-1 Table 7 (instantaneous bands)"

#: Our own rough order of price and work of a change (not a price list).
COST = {
    "remove": 1,
    "setting": 1,
    "fuse-link": 1,
    "replace": 2,
    "delay-s": 1,
    "type-f": 1,
    "type-b": 3,
    "rcbo": 3,
    "breaking": 2,
}


@dataclass(frozen=True, slots=True)
class Choice:
    """One catalogue change of one device: the new field values (or a removal)."""

    node: str
    #: The fields to set on the device (``kind`` included when it changes kind).
    values: tuple[tuple[str, Any], ...]
    #: ``edit`` (fields set), ``remove`` (the device taken out), ``replace`` (like for like).
    action: str
    #: A new device is fitted (False: removal, or a setting of an adjustable device).
    new_device: bool
    cost: int
    #: Where the choice comes from.
    source: str
    #: What kind of change it is (``idn``, ``waveform``, ``delay``, ``rcbo``, ``rating``,
    #: ``curve``, ``breaking``, ``remove``, ``replace``): the planner tries a change only
    #: for findings it can bear on (:data:`RULE_ASPECTS`).
    aspects: frozenset[str] = frozenset()
    #: How far along the catalogue's series it moves (ties go to the smaller step).
    steps: int = 0


def waveform_rank(waveform: str) -> int:
    return WAVEFORM_ORDER.index(waveform)


def delay_s_allowed(idn_ma: float, rated_a: float | None) -> bool:
    """Whether a type S device of this rating exists (IEC 61008-1; In unknown: allowed).

    References
    ----------
    IEC 61008-1 Ed.3 and IEC 61009-1: type S for IΔn > 30 mA and In ≥ 25 A.
    """
    return idn_ma > DELAY_S_MIN_IDN_MA and (rated_a is None or rated_a >= DELAY_S_MIN_RATED_A)


def duplicates_above(node: Any, above: Any | None) -> bool:
    """Whether residual-current device ``node`` only repeats the protection of ``above``.

    ``above`` is the nearest residual-current protective device upstream.  It
    duplicates when ``above`` responds at least as soon (IΔn no larger) to at
    least the same waveforms, with no delay of its own, so taking ``node`` out
    leaves every circuit below it protected as before (common practice).
    """
    if above is None or getattr(above, "delay", "general") != "general":
        return False
    if node.kind == "cbr" or above.kind not in ("rccb", "rcbo", "cbr"):
        return False
    return above.idn_ma <= node.idn_ma and waveform_rank(above.waveform) >= waveform_rank(
        node.waveform
    )


def _idn_near(idn_ma: float, series: tuple[float, ...]) -> list[float]:
    """The device's own IΔn, one step down and two steps up the series."""
    below = [v for v in series if v < idn_ma][-1:]
    above = [v for v in series if v > idn_ma][:2]
    return [*below, idn_ma, *above]


def _extra_cost(waveform: str, delay: str) -> int:
    return (
        (COST["type-f"] if waveform == "F" else 0)
        + (COST["type-b"] if waveform == "B" else 0)
        + (COST["delay-s"] if delay == "S" else 0)
    )


def _rcd_targets(node: Any, personal: bool) -> list[tuple[float, str, str]]:
    """The (IΔn, waveform, delay) a replacement of ``node`` may have: one thing changed at
    a time (IΔn, type or delay), and a larger IΔn with type S together (a selective
    upstream device).  A new device is at least Type A."""
    series = IDN_PERSONAL_MA if personal else IDN_SERIES_MA
    low = max(waveform_rank(node.waveform), waveform_rank(NEW_WAVEFORM_MIN))
    base_wf = WAVEFORM_ORDER[low]
    out: list[tuple[float, str, str]] = [(node.idn_ma, base_wf, node.delay)]
    out += [(node.idn_ma, wf, node.delay) for wf in ("F", "B") if waveform_rank(wf) > low]
    if waveform_rank("B") > low and not personal:
        # Type B upstream of Type B (BS 7671 531.3.3 guidance), with room for selectivity.
        out += [(idn, "B", node.delay) for idn in series if idn > node.idn_ma][:2]
    out += [(idn, base_wf, node.delay) for idn in _idn_near(node.idn_ma, series)]
    if not personal and node.delay != "set":
        other = "general" if node.delay == "S" else "S"
        out.append((node.idn_ma, base_wf, other))
        if other == "S":
            out += [(idn, base_wf, "S") for idn in series if idn > node.idn_ma]
    return list(dict.fromkeys(out))


def rcd_choices(node: Any, above: Any | None, failed: bool) -> list[Choice]:
    """The catalogue changes of a residual-current device (never to Type AC).

    ``above``: the nearest residual-current device upstream (for removal);
    ``failed``: the device failed a test, so a like-for-like replacement is offered
    (a Type AC device is replaced by a Type A one instead, BS 7671 531.3.3).
    """
    out: list[Choice] = []
    personal = node.kind in ("srcd", "prcd")
    rated = getattr(node, "rated_a", None)
    series = IDN_PERSONAL_MA if personal else IDN_SERIES_MA
    for idn, wf, delay in _rcd_targets(node, personal):
        if (idn, wf, delay) == (node.idn_ma, node.waveform, node.delay):
            continue
        if delay == "S" and not delay_s_allowed(idn, rated):
            continue
        values: list[tuple[str, Any]] = []
        aspects: set[str] = set()
        steps = 0
        if idn != node.idn_ma:
            values.append(("idn_ma", idn))
            aspects.add("idn")
            steps += abs(_series_pos(series, idn) - _series_pos(series, node.idn_ma))
        if wf != node.waveform:
            values.append(("waveform", wf))
            steps += waveform_rank(wf) - waveform_rank(node.waveform)
            # Type AC to Type A with another change is what any new device is, not a choice.
            forced = wf == NEW_WAVEFORM_MIN and (idn, delay) != (node.idn_ma, node.delay)
            if not forced:
                aspects.add("waveform")
        if delay != node.delay:
            values.append(("delay", delay))
            aspects.add("delay")
            steps += 1
        # An adjustable cbr takes a new IΔn or delay as a setting; a new type is a new relay.
        adjust = node.kind == "cbr" and wf == node.waveform
        cost = COST["setting"] if adjust else COST["replace"] + _extra_cost(wf, delay)
        source = f"{IDN_SOURCE}; {WAVEFORM_SOURCE}; {DELAY_S_SOURCE}; {NEW_WAVEFORM_SOURCE}"
        out.append(
            Choice(
                node.id, tuple(values), "edit", not adjust, cost, source, frozenset(aspects), steps
            )
        )
    if failed and node.waveform != "AC":
        out.append(_one(node, (), "replace", "a device that failed its tests", "replace"))
    if duplicates_above(node, above):
        if node.kind == "rcbo":
            out.append(_one(node, (("kind", "mcb"),), "remove", "common practice"))
        elif node.kind in ("rccb", "srcd", "prcd"):
            out.append(_one(node, (), "remove", "common practice", "remove", cost=COST["remove"]))
    return out


def _one(
    node: Any,
    values: tuple[tuple[str, Any], ...],
    aspect: str,
    source: str,
    action: str = "edit",
    *,
    cost: int = COST["replace"],
    steps: int = 0,
) -> Choice:
    """A choice of one aspect: a new device unless it only takes one out."""
    new = action != "remove"
    return Choice(node.id, values, action, new, cost, source, frozenset({aspect}), steps)


def _series_pos(series: tuple[float, ...], value: float) -> int:
    """Where ``value`` sits in ``series`` (a value between two steps counts as the lower)."""
    return sum(1 for v in series if v <= value)


def _steps_up(series: tuple[float, ...], value: float | None) -> list[float]:
    if value is None:
        return []
    return [v for v in series if v > value][:RATING_STEPS]


def breaker_choices(node: Any, feeds_devices: bool) -> list[Choice]:
    """The catalogue changes of an MCB: an RCBO of the same curve and rating, and,
    for a breaker feeding other devices, a larger rating or a slower curve; a
    higher breaking capacity where one is recorded."""
    out: list[Choice] = []
    if node.kind == "mcb" and node.curve is not None:
        for idn, wf in RCBO_FROM_MCB:
            values = (("kind", "rcbo"), ("idn_ma", idn), ("waveform", wf), ("delay", "general"))
            out.append(
                Choice(
                    node.id,
                    values,
                    "edit",
                    True,
                    COST["rcbo"] + _extra_cost(wf, "general"),
                    "IEC 61009-1 (RCBO of the same curve and rating)",
                    frozenset({"rcbo"} | ({"waveform"} if wf != "A" else set())),
                    waveform_rank(wf),
                )
            )
    if feeds_devices and node.kind == "mcb":
        for rated in _steps_up(BREAKER_RATINGS_A, node.rated_a):
            steps = BREAKER_RATINGS_A.index(rated)
            out.append(
                _one(node, (("rated_a", rated),), "rating", BREAKER_RATINGS_SOURCE, steps=steps)
            )
        if node.curve in CURVE_ORDER:
            for curve in CURVE_ORDER[CURVE_ORDER.index(node.curve) + 1 :]:
                steps = CURVE_ORDER.index(curve) - CURVE_ORDER.index(node.curve)
                out.append(_one(node, (("curve", curve),), "curve", CURVE_SOURCE, steps=steps))
    out.extend(_breaking(node, BREAKER_KA_SERIES, BREAKER_KA_SOURCE))
    return out


def fuse_choices(node: Any, feeds_devices: bool) -> list[Choice]:
    """The catalogue changes of a gG fuse: a larger rating (for a fuse feeding other
    devices) and a higher breaking capacity where one is recorded."""
    if node.fuse_type != "gG":
        return []
    out: list[Choice] = []
    if feeds_devices:
        for rated in _steps_up(GG_RATINGS_A, node.rated_a):
            values = (("rated_a", rated),)
            steps = GG_RATINGS_A.index(rated)
            cost = COST["fuse-link"]
            out.append(_one(node, values, "rating", GG_RATINGS_SOURCE, cost=cost, steps=steps))
    out.extend(_breaking(node, FUSE_KA_SERIES, FUSE_KA_SOURCE))
    return out


def _breaking(node: Any, series: tuple[float, ...], source: str) -> list[Choice]:
    ka = getattr(node, "breaking_ka", None)
    if ka is None:
        return []
    cost = COST["breaking"]
    return [
        _one(node, (("breaking_ka", v),), "breaking", source, cost=cost, steps=i)
        for i, v in enumerate(series)
        if v > ka
    ]


#: An MCB becomes an RCBO of the same curve and rating with one of these ratings
#: (IΔn, waveform): 30 mA for additional protection (BS 7671 411.3.3), Type A by
#: default, Type B where smooth DC needs it (BS 7671 531.3.3, 722.531.3.101).
RCBO_FROM_MCB: tuple[tuple[float, str], ...] = ((30.0, "A"), (30.0, "B"))


#: The kinds of change that can bear on each rule's findings.
RULE_ASPECTS: dict[str, frozenset[str]] = {
    "type.ac-unsuitable": frozenset({"waveform", "rcbo"}),
    "type.dc-load": frozenset({"waveform", "rcbo"}),
    "cascade.dc-blinding": frozenset({"waveform", "rcbo", "remove"}),
    "cascade.upstream-not-delayed": frozenset({"idn", "delay", "remove"}),
    "cascade.ratio-below-3": frozenset({"idn", "delay", "remove"}),
    "cascade.band-overlap": frozenset({"idn", "delay", "remove"}),
    "coverage.additional-protection": frozenset({"idn", "rcbo"}),
    "earthing.tt-no-rcd": frozenset({"idn", "rcbo"}),
    "leakage.over-30pct": frozenset({"idn", "rcbo"}),
    "resilience.lighting-single-rcd": frozenset({"idn", "delay", "rcbo"}),
    "overcurrent.not-selective": frozenset({"rating", "curve"}),
    "breaking-capacity.too-low": frozenset({"breaking"}),
    "reading.no-trip": frozenset({"replace", "waveform", "idn", "delay"}),
    "reading.too-slow": frozenset({"replace", "waveform", "idn", "delay"}),
    "reading.too-fast": frozenset({"replace", "waveform", "idn", "delay"}),
    "reading.button-failed": frozenset({"replace", "waveform", "idn", "delay"}),
    "reading.ramp-out-of-band": frozenset({"replace", "waveform", "idn", "delay"}),
}
#: A rule missing from RULE_ASPECTS may be borne on by any change.
ANY_ASPECT = frozenset(
    {"idn", "waveform", "delay", "rcbo", "rating", "curve", "breaking", "remove", "replace"}
)


def choices_for(node: Any, above: Any | None, failed: bool, feeds_devices: bool) -> list[Choice]:
    """Every catalogue change of one device (none for boards, switches, circuits)."""
    if node.kind in RCD_KINDS:
        out = rcd_choices(node, above, failed)
        if node.kind == "rcbo":
            out.extend(_breaking(node, BREAKER_KA_SERIES, BREAKER_KA_SOURCE))
        return out
    if node.kind == "mcb":
        return breaker_choices(node, feeds_devices)
    if node.kind == "fuse":
        return fuse_choices(node, feeds_devices)
    return []


__all__ = [
    "BREAKER_KA_SERIES",
    "BREAKER_RATINGS_A",
    "Choice",
    "FUSE_KA_SERIES",
    "GG_RATINGS_A",
    "IDN_SERIES_MA",
    "RCBO_FROM_MCB",
    "WAVEFORM_ORDER",
    "choices_for",
    "delay_s_allowed",
    "duplicates_above",
]
