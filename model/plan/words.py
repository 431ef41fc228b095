"""A planned change in the trade's words, and why a finding is left to other work.

``change_text`` words one catalogue change as a line of a remedial list
("replace RCCB "Studio RCCB" (30 mA, Type AC, general) with a 100 mA Type A
type S RCCB"); :data:`LEFT_REASONS` says, for each rule a device change never
clears, what does.
"""

from __future__ import annotations

from typing import Any

from model.plan.catalogue import Choice
from model.rules.findings import device_text
from model.rules.overcurrent.bands import device_name

KIND_WORDS = {
    "rccb": "RCCB",
    "rcbo": "RCBO",
    "srcd": "socket-outlet RCD",
    "prcd": "portable RCD",
    "cbr": "CBR",
    "mcb": "MCB",
    "fuse": "fuse",
}

#: Rules whose findings a device change never clears, and what does instead.
LEFT_REASONS: dict[str, str] = {
    "reading.missing": "needs a test: test the device and record the result",
    "reading.trend": "needs a test: a trend is settled by testing again and watching it; "
    "where the plan replaces the device, test the new one after installation",
    "reading.half-tripped": "needs a test: a trip at ½ IΔn points to standing leakage or an "
    "over-sensitive device; measure the protective-conductor current before replacing anything",
    "reading.test-not-applicable": "needs a test with a waveform the device type is specified "
    "for (BS 7671 531.3.3)",
    "disconnection.zs-too-high": "needs a wiring change: a Zs above the limit points to the "
    "circuit (length, conductor size, a poor joint); find and put right the cause rather "
    "than hide it with a device",
    "disconnection.zs-not-shown": "needs data: the Ia or maximum Zs of the device from the "
    "wiring rules' table or the maker",
    "earthing.tt-ra": "needs a wiring change: lower the earth electrode resistance RA "
    "(BS 7671 411.5.3)",
    "earthing.zs-limit": "needs a wiring change: lower the loop impedance or the earth "
    "electrode resistance (BS 7671 Table 41.5)",
    "earthing.ra-unstable": "needs a wiring change: an electrode above 200 Ω may not be "
    "stable (BS 7671 Table 41.5 Note 2)",
    "earthing.ra-missing": "needs a test: measure RA and record it",
    "overcurrent.selectivity-not-shown": "needs the maker's data: the published bands cannot "
    "settle this range; enter the maker's selectivity table or curves",
}

#: What a finding a device could clear needs instead, where no catalogue change clears it
#: without creating another one.
DESIGN_REASONS: dict[str, str] = {
    "leakage.over-30pct": "needs the circuits split over more RCDs (a board change), or the "
    "standing leakage found and reduced (BS 7671 531.3.2)",
    "resilience.lighting-single-rcd": "needs a lighting circuit moved to an RCD or RCBO not "
    "behind this device (a board change, BS 7671 314.1)",
    "coverage.no-overcurrent": "needs an overcurrent device added on the supply side of the "
    "RCCB or in each circuit it feeds (IEC 61008-1)",
    "overcurrent.not-selective": "no larger upstream rating (up to two steps) or slower curve "
    "clears it without another finding: it needs the makers' selectivity tables or a "
    "different arrangement (BS 7671 536.4.1.2)",
}

#: Said of a finding no catalogue change clears without creating another one.
NO_CHANGE_REASON = (
    "no change from the catalogue clears it without creating another finding; "
    "it needs a design decision"
)
#: Said of a finding the changes of the plan would have to leave to the network operator.
CUTOUT_REASON = (
    "the upstream device is the supply's cut-out fuse, which belongs to the network operator "
    "(ask them about its rating); no change of the device below clears it without creating "
    "another finding"
)


def _name(node: Any) -> str:
    label = node.label or node.id
    return f'{KIND_WORDS.get(node.kind, node.kind)} "{label}"'


def _rating(node: Any) -> str:
    """The device's rating in brackets: '(30 mA, Type AC, general)', '(B32)', '(gG 32 A)'."""
    parts: list[str] = []
    if node.kind in ("rccb", "rcbo", "srcd", "prcd", "cbr"):
        parts.append(device_text(node))
    if node.kind in ("mcb", "rcbo", "fuse"):
        parts.append(_oc_name(node.kind, getattr(node, "curve", None), node.rated_a, node))
    ka = getattr(node, "breaking_ka", None)
    if ka is not None:
        parts.append(f"{ka:g} kA")
    return "(" + ", ".join(parts) + ")" if parts else ""


def _new_rcd(values: dict[str, Any], node: Any, kind: str) -> str:
    idn = values.get("idn_ma", getattr(node, "idn_ma", None))
    wf = values.get("waveform", getattr(node, "waveform", None))
    delay = values.get("delay", getattr(node, "delay", "general"))
    words = f"{idn:g} mA Type {wf}"
    if delay == "S":
        words += " type S"
    elif delay == "set":
        words += " (the same delay setting)"
    words += f" {KIND_WORDS[kind]}"
    if kind in ("rcbo",):
        curve = values.get("curve", node.curve)
        words += " " + _oc_name("rcbo", curve, values.get("rated_a", node.rated_a), node)
    return words


def _oc_name(kind: str, curve: str | None, rated_a: float | None, node: Any) -> str:
    """'B32'; a breaker of unknown curve 'In 32 A'; a fuse 'gG 32 A'."""
    if kind == "fuse":
        return device_name(node)
    if rated_a is None:
        return curve or "rating not recorded"
    return f"{curve}{rated_a:g}" if curve else f"In {rated_a:g} A"


def change_text(node: Any, choice: Choice, above: Any | None = None) -> str:
    """One catalogue change of ``node`` in the trade's words."""
    name, rating = _name(node), _rating(node)
    values = dict(choice.values)
    if choice.action == "remove":
        by = f" {_name(above)}" if above is not None else " the RCD above"
        return f"remove {name} {rating}:{by} already gives the same protection"
    if choice.action == "replace":
        return f"replace {name} {rating} like for like: it failed its tests"
    kind = values.get("kind", node.kind)
    if kind != node.kind:
        if kind == "rcbo":
            return f"change {name} {rating} to a {_new_rcd(values, node, 'rcbo')}"
        curve = node.curve or "?"
        above_words = f" ({_name(above)} above already protects it)" if above is not None else ""
        return f"change {name} {rating} to an MCB {curve}{node.rated_a:g}{above_words}"
    if node.kind == "cbr" and not choice.new_device:
        return f"set {name} {rating} to {_new_rcd(values, node, 'cbr').removesuffix(' CBR')}"
    if "breaking_ka" in values and len(values) == 1:
        return f"replace {name} {rating} with one of {values['breaking_ka']:g} kA breaking capacity"
    if set(values) & {"idn_ma", "waveform", "delay"}:
        return f"replace {name} {rating} with a {_new_rcd(values, node, node.kind)}"
    if node.kind == "fuse":
        return (
            f"replace {name} {rating} with a gG {values['rated_a']:g} A fuse-link "
            "(check the cable it protects: In no more than Iz, BS 7671 433.1)"
        )
    curve = values.get("curve", getattr(node, "curve", None))
    rated = values.get("rated_a", node.rated_a)
    new = _oc_name("mcb", curve, rated, node)
    check = (
        "check the cable it protects: In no more than Iz, BS 7671 433.1"
        if "rated_a" in values
        else "check Zs and inrush against the new curve, BS 7671 411.4.4"
    )
    return f"replace {name} {rating} with a {new} ({check})"


__all__ = [
    "CUTOUT_REASON",
    "DESIGN_REASONS",
    "KIND_WORDS",
    "LEFT_REASONS",
    "NO_CHANGE_REASON",
    "change_text",
]
