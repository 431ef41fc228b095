"""What the residual-current protection covers: types, leakage, lighting."""

from __future__ import annotations

from collections.abc import Iterator
from typing import Any

from model.rules.checks.additional import EV_LOADS, is_ev_point
from model.rules.checks.cascade import DC_BLINDING_SOURCE
from model.rules.checks.context import Context
from model.rules.findings import Finding, Severity
from model.rules.limits import ADDITIONAL_IDN_MA, LEAKAGE_FRACTION

#: Loads that can put smooth DC on the residual current (need Type B or DC detection).
SMOOTH_DC_LOADS = frozenset({"ev-no-dc-detect", "drive-3ph", "inverter"})
#: Loads whose current has a DC component of some kind (Type AC unsuitable).
DC_COMPONENT_LOADS = frozenset(
    {"ev-no-dc-detect", "ev-dc-detect-6ma", "inverter", "drive-1ph", "drive-3ph", "it-equipment"}
)
#: Circuit uses that are fixed equipment by nature (heating water or space).
FIXED_HEATING_USES = frozenset({"shower", "water-heater", "heating"})
#: The leakage limit as messages write it: '30 %' (of IΔn).
_LEAKAGE_PCT = f"{100 * LEAKAGE_FRACTION.value:g} %"


def _is_general_30(node: Any) -> bool:
    return str(node.delay) == "general" and float(node.idn_ma) <= ADDITIONAL_IDN_MA.value


def check_ac_unsuitable(ctx: Context) -> Iterator[Finding]:
    """``type.ac-unsuitable``: Type AC protecting anything but fixed equipment with no DC component.

    Fixed equipment is a ``fixed-equipment`` circuit or a shower, water heater
    or heating circuit; with no DC-producing load recorded it has no DC
    component, and Type AC is allowed there.  One severity rule: required
    where the rule set applies 531.3.3 as a standard, advisory where the rule
    set presents it as common practice.

    References
    ----------
    BS 7671 531.3.3 (Type AC only for fixed equipment whose load current has no
    DC component); AS/NZS 3000:2018 2.6.2.2.2 (no new Type AC after 2023-04-30).
    """
    idx = ctx.index
    for dev in idx.rcds():
        node = idx.by_id[dev]
        if str(node.waveform) != "AC":
            continue
        unsuitable = []
        with_dc = []
        for c in idx.descendants(dev):
            cn = idx.by_id[c]
            if cn.kind != "circuit":
                continue
            if (cn.use == "fixed-equipment" or cn.use in FIXED_HEATING_USES) and not cn.loads:
                continue
            unsuitable.append(c)
            if DC_COMPONENT_LOADS.intersection(cn.loads):
                with_dc.append(c)
        if not unsuitable:
            continue
        basis = "standard" if ctx.rules.name == "uk-bs7671-2022" else "common-practice"
        severity: Severity = "required" if basis == "standard" else "advisory"
        names = ", ".join(idx.label(c) for c in unsuitable[:6])
        if len(unsuitable) > 6:
            names += f" and {len(unsuitable) - 6} more"
        dc_note = f" {len(with_dc)} of them feed loads with a DC component." if with_dc else ""
        yield Finding(
            rule="type.ac-unsuitable",
            severity=severity,
            nodes=(dev, *unsuitable),
            board=idx.board_of[dev],
            message=(
                f"{idx.label(dev)} is Type AC but protects circuits other than fixed equipment "
                f"with no DC component: {names}.{dc_note}"
            ),
            action="Replace with a Type A device (Type F or B where the loads need it).",
            source=ctx.rules.type_ac_source,
            basis=basis,
        )


def check_dc_load(ctx: Context) -> Iterator[Finding]:
    """Smooth-DC loads: ``type.dc-load`` and the blinding of the devices above them.

    ``type.dc-load``: a load that can produce smooth DC residual current with
    no Type B device in its path (DC detection in the equipment, flag
    ``ev-dc-detect-6ma``, is not a smooth-DC load).  ``cascade.dc-blinding``
    (load form): a non-Type-B device above such a load that also protects
    other circuits, which it may then fail to protect.

    References
    ----------
    BS 7671 531.3.3; BS 7671 722.531.3.101 (EV: Type B, or Type A with 6 mA DC
    detection); manufacturers' guidance on DC blinding (medium confidence).
    """
    idx = ctx.index
    circuits_below: dict[str, int] = {}
    for c in idx.circuits():
        for r in idx.rcd_above[c]:
            circuits_below[r] = circuits_below.get(r, 0) + 1
    blinded: dict[str, list[str]] = {}
    for c in idx.circuits():
        cn = idx.by_id[c]
        dc = sorted(SMOOTH_DC_LOADS.intersection(cn.loads))
        if not dc:
            continue
        path = idx.rcd_above[c]
        # an EV charger's own DC is judged by the EV rule (its own device must cope)
        judged = [d for d in dc if not (d in EV_LOADS and is_ev_point(cn))]
        if judged and not any(str(idx.by_id[r].waveform) == "B" for r in path):
            yield Finding(
                rule="type.dc-load",
                severity="required",
                nodes=(c, *path),
                board=idx.board_of[c],
                message=(
                    f"{idx.label(c)} feeds loads that can produce smooth DC residual current "
                    f"({', '.join(judged)}) with no Type B device in its path."
                ),
                action="Protect the circuit with a Type B RCD, or use equipment with its own "
                "6 mA DC detection feeding from a Type A device.",
                source="BS 7671 531.3.3; BS 7671 722.531.3.101",
                basis="standard",
            )
        for r in path:
            if str(idx.by_id[r].waveform) == "B":
                break  # the pair form of the finding covers devices above a Type B one
            if circuits_below.get(r, 0) > 1:
                blinded.setdefault(r, []).append(c)
    for r, loads in blinded.items():
        others = circuits_below[r] - len(loads)
        if others <= 0:
            continue
        node = idx.by_id[r]
        yield Finding(
            rule="cascade.dc-blinding",
            severity="advisory",
            nodes=(r, *loads),
            board=idx.board_of[r],
            message=(
                f"{idx.label(r)} (Type {node.waveform}) is upstream of smooth-DC loads on "
                f"{', '.join(idx.label(c) for c in loads)}; DC may blind it and leave the other "
                f"{others} circuit(s) it protects without effective protection."
            ),
            action="Feed the DC-producing loads through a Type B device that is not downstream "
            "of this one, or make this device Type B.",
            source=DC_BLINDING_SOURCE,
            basis="guidance",
        )


def check_no_overcurrent(ctx: Context) -> Iterator[Finding]:
    """``coverage.no-overcurrent``: an RCCB with no overcurrent device upstream or on every circuit.

    References
    ----------
    IEC 61008-1 (an RCCB has no overcurrent protection and relies on a
    fuse or circuit-breaker in its supply or in every circuit it feeds).
    """
    idx = ctx.index
    for dev in idx.rcds():
        if idx.kind(dev) != "rccb" or idx.ocpd_above[dev]:
            continue
        circuits = [c for c in idx.descendants(dev) if idx.kind(c) == "circuit"]
        bare = [c for c in circuits if not idx.ocpd_above[c]]
        if not bare:
            continue
        yield Finding(
            rule="coverage.no-overcurrent",
            severity="required",
            nodes=(dev, *bare),
            board=idx.board_of[dev],
            message=(
                f"{idx.label(dev)} is an RCCB with no fuse or circuit-breaker upstream, and "
                f"{len(bare)} circuit(s) below it have none either: "
                + ", ".join(idx.label(c) for c in bare[:6])
                + "."
            ),
            action="Add overcurrent protection on the supply side of the RCCB or on each circuit "
            "(and record the supply fuse in the tree if it exists).",
            source="IEC 61008-1 (RCCB without integral overcurrent protection)",
            basis="standard",
        )


def leakage_below(ctx: Context) -> dict[str, float]:
    """Sum of the circuits' estimated standing leakage below each protective RCD. [mA]

    Leakage below a downstream device passes through every device above it too.
    """
    idx = ctx.index
    total: dict[str, float] = dict.fromkeys(idx.rcds(), 0.0)
    for c in idx.circuits():
        leak = idx.by_id[c].leakage_ma
        if leak:
            for r in idx.rcd_above[c]:
                total[r] += float(leak)
    return total


def check_leakage(ctx: Context) -> Iterator[Finding]:
    """``leakage.over-30pct``: standing leakage below a device over 30 % of its IΔn.

    Exactly 30 % passes.

    References
    ----------
    BS 7671 531.3.2(iii).
    """
    idx = ctx.index
    total = leakage_below(ctx)
    for dev in idx.rcds():
        node = idx.by_id[dev]
        limit = LEAKAGE_FRACTION.value * float(node.idn_ma)
        got = total[dev]
        if got > limit + 1e-9:
            yield Finding(
                rule="leakage.over-30pct",
                severity="required",
                nodes=(dev,),
                board=idx.board_of[dev],
                message=(
                    f"Standing leakage below {idx.label(dev)} is about {got:.3g} mA, "
                    f"over {_LEAKAGE_PCT} of "
                    f"its {node.idn_ma:g} mA rating ({limit:.3g} mA): nuisance trips are likely."
                ),
                action="Split the circuits over more devices so each carries no more than "
                f"{_LEAKAGE_PCT} of its IΔn in standing leakage.",
                source=LEAKAGE_FRACTION.source,
                basis="standard",
                measured=f"{got:.3g} mA",
                band=f"≤ {limit:.3g} mA",
            )


#: Pair verdicts under which a fault below the downstream device cannot trip the upstream one.
_DISCRIMINATES = frozenset({"selective", "selective-in-practice"})


def lighting_trip_devices(ctx: Context) -> tuple[list[str], list[str]]:
    """(devices whose one trip can put out every lighting circuit, the lighting circuits).

    A device counts where it is above every lighting circuit (two or more)
    and, for each of them, is either the circuit's nearest RCD or is not
    shown selective with that nearest RCD (so a fault there may trip it too).
    Devices nearest first.
    """
    idx = ctx.index
    lights = [c for c in idx.circuits() if idx.by_id[c].use == "lighting"]
    if len(lights) < 2 or not all(idx.rcd_above[c] for c in lights):
        return [], lights
    common = set(idx.rcd_above[lights[0]]).intersection(*(idx.rcd_above[c] for c in lights[1:]))
    if not common:
        return [], lights
    verdict = {(p.up, p.down): p.verdict for p in ctx.pairs}
    devices = []
    for dev in idx.rcd_above[lights[0]]:  # nearest first
        if dev not in common:
            continue
        if all(
            idx.rcd_above[c][0] == dev
            or verdict.get((dev, idx.rcd_above[c][0])) not in _DISCRIMINATES
            for c in lights
        ):
            devices.append(dev)
    return devices, lights


def check_lighting(ctx: Context) -> Iterator[Finding]:
    """``resilience.lighting-single-rcd``: one device's trip can put out all the lighting.

    Fires on the devices that are above every lighting circuit (two or more)
    and are either each circuit's nearest RCD or not selective with it: a
    fault on one lighting circuit, or elsewhere below such a device, can then
    leave the site without lighting (for example a 30 mA general RCCB feeding
    one lighting circuit directly and another through a sub-board's own 30 mA
    RCCB).  Selectivity is the pair analysis's verdict.

    References
    ----------
    BS 7671 314.1 / 314.2; IEC 60364-3 (divide the installation to avoid
    danger and inconvenience in the event of a fault).
    """
    idx = ctx.index
    devices, lights = lighting_trip_devices(ctx)
    if not devices:
        return
    names = " or ".join(idx.label(d) for d in devices)
    direct = all(idx.rcd_above[c][0] in devices for c in lights)
    how = "" if direct else " (a fault below its downstream devices may trip it too: not selective)"
    yield Finding(
        rule="resilience.lighting-single-rcd",
        severity="advisory",
        nodes=(*devices, *lights),
        board=idx.board_of[devices[0]],
        message=(
            f"All {len(lights)} lighting circuits depend on {names}: one trip can leave the "
            f"whole site without lighting{how}."
        ),
        action="Move a lighting circuit to an RCD or RCBO that is not behind this one, or make "
        "the devices in series selective, so some lighting stays on.",
        source="BS 7671 314.1/314.2; IEC 60364-3",
        basis="standard",
    )
