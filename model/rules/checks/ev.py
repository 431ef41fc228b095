"""EV charging points: each on its own 30 mA RCD of a type that copes with the charger's DC."""

from __future__ import annotations

from collections.abc import Iterator
from typing import Any

from model.rules.checks.additional import is_ev_point, severity_of
from model.rules.checks.context import Context
from model.rules.findings import Finding, device_text
from model.rules.limits import ADDITIONAL_IDN_MA, Basis

EV_SOURCE_UK = "BS 7671 722.531.3.101"
EV_SOURCE_IEC = "IEC 60364-7-722 722.531.3.101 (clause from memory)"


def own_device(ctx: Context, circuit_id: str) -> str | None:
    """The nearest RCD of a circuit, where it protects nothing but that circuit.

    Equipment recorded below the circuit (its own child circuits) belongs to it.
    """
    idx = ctx.index
    path = idx.rcd_above[circuit_id]
    if not path:
        return None
    dev = path[0]
    mine = {circuit_id, *idx.descendants(circuit_id)}
    for n in idx.descendants(dev):
        if idx.kind(n) == "circuit" and n not in mine:
            return None
    return dev


def _dc_detection(circuit: Any) -> bool | None:
    """Whether the charger has 6 mA DC detection: True, False, or None where not recorded."""
    if "ev-dc-detect-6ma" in circuit.loads:
        return True
    if "ev-no-dc-detect" in circuit.loads:
        return False
    return None


def check_ev(ctx: Context) -> Iterator[Finding]:
    """EV charging points, under ``coverage.additional-protection`` and ``type.dc-load``.

    Each charging point needs its own RCD (one that protects no other
    circuit) of IΔn <= 30 mA without delay; a device shared with other
    circuits, or no such device, is ``coverage.additional-protection``.  The
    charging point's nearest RCD must be Type B, or Type A/F where the charger
    has 6 mA DC detection; a Type B device further upstream does not satisfy
    this.  Otherwise ``type.dc-load`` (required), or investigate where the
    charger's DC detection is not recorded.

    References
    ----------
    BS 7671 722.531.3.101 (each charging point protected individually by its
    own RCD of at least Type A and IΔn not exceeding 30 mA; Type B, or Type A
    or F with DC fault current detection of 6 mA in the charging equipment).
    """
    idx = ctx.index
    uk = ctx.rules.name == "uk-bs7671-2022"
    source = EV_SOURCE_UK if uk else EV_SOURCE_IEC
    basis: Basis = "standard" if uk else "guidance"
    severity, basis = severity_of([basis])
    for c in idx.circuits():
        cn = idx.by_id[c]
        if not is_ev_point(cn):
            continue
        path = idx.rcd_above[c]
        own = own_device(ctx, c)
        own_node = idx.by_id[own] if own is not None else None
        if (
            own_node is None
            or float(own_node.idn_ma) > ADDITIONAL_IDN_MA.value
            or str(own_node.delay) != "general"
        ):
            if not path:
                have = "it has no residual-current protection"
            elif own_node is None:
                have = f"its nearest RCD, {idx.label(path[0])}, also protects other circuits"
            else:
                have = f"its own RCD, {idx.label(own or '')}, is {device_text(own_node)}"
            yield Finding(
                rule="coverage.additional-protection",
                severity=severity,
                nodes=(c, *path),
                board=idx.board_of[c],
                message=(
                    f"{idx.label(c)} is an EV charging point and needs its own RCD of "
                    f"{ADDITIONAL_IDN_MA.text()} or less without delay; {have}."
                ),
                action="Protect the charging point individually by its own general-type RCD or "
                f"RCBO of IΔn ≤ {ADDITIONAL_IDN_MA.text()} (Type B, or Type A with 6 mA DC "
                "detection in the charger).",
                source=source,
                basis=basis,
            )
        if not path:
            continue
        near = path[0]
        node = idx.by_id[near]
        wave = str(node.waveform)
        detect = _dc_detection(cn)
        if wave == "B" or (wave in ("A", "F") and detect):
            continue
        if wave in ("A", "F") and detect is None:
            yield Finding(
                rule="type.dc-load",
                severity="investigate",
                nodes=(c, near),
                board=idx.board_of[c],
                message=(
                    f"{idx.label(c)} is an EV charging point on Type {wave} {idx.label(near)}; "
                    "whether the charger has 6 mA DC detection is not recorded."
                ),
                action="Check the charger's documents: with 6 mA DC detection Type A is enough; "
                "without it the charging point needs its own Type B RCD. Record the answer "
                "in the circuit's loads.",
                source=source,
                basis=basis,
            )
            continue
        upstream_b = [r for r in path[1:] if str(idx.by_id[r].waveform) == "B"]
        also = (
            f" A Type B device further upstream ({idx.label(upstream_b[0])}) does not satisfy "
            "this: the charging point's own device must be."
            if upstream_b
            else ""
        )
        why = (
            "Type AC is never allowed for a charging point"
            if wave == "AC"
            else "the charger has no 6 mA DC detection"
        )
        yield Finding(
            rule="type.dc-load",
            severity=severity,
            nodes=(c, *path),
            board=idx.board_of[c],
            message=(
                f"{idx.label(c)} is an EV charging point whose RCD {idx.label(near)} is "
                f"Type {wave}: {why}.{also}"
            ),
            action="Give the charging point its own Type B RCD, or fit a charger with 6 mA DC "
            "detection and protect it by its own Type A RCD.",
            source=source,
            basis=basis,
        )
