"""Additional protection by RCD: which circuits need a 30 mA device (or, on farms, 100 or
300 mA), including special locations and EV charging points."""

from __future__ import annotations

from collections.abc import Iterator
from dataclasses import dataclass
from typing import Any

from model.rules.checks.context import Context
from model.rules.findings import Finding, Severity
from model.rules.limits import (
    ADDITIONAL_IDN_MA,
    ADDITIONAL_MAX_A,
    AGRI_LARGE_SOCKET_IDN_MA,
    AGRI_OTHER_IDN_MA,
    LOCATION_RULES,
    Basis,
)

#: Load flags that mark an EV charging point.
EV_LOADS = frozenset({"ev-no-dc-detect", "ev-dc-detect-6ma"})
#: What a circuit may use that is a sauna's heater (exempt from 703.411.3.3).
SAUNA_HEATER_USES = frozenset({"heating"})


@dataclass(frozen=True)
class Need:
    """One reason a circuit needs residual-current protection of at most ``max_idn_ma``.

    ``general``: only a device without intentional delay counts (additional
    protection); otherwise any protective RCD of small enough IΔn does.
    """

    reason: str
    source: str
    basis: Basis
    max_idn_ma: float = ADDITIONAL_IDN_MA.value
    general: bool = True

    def met_by(self, node: Any) -> bool:
        if float(node.idn_ma) > self.max_idn_ma:
            return False
        return not self.general or str(node.delay) == "general"


def is_ev_point(circuit: Any) -> bool:
    """A circuit that supplies an EV charging point (by its use or its loads)."""
    return circuit.use == "ev-charger" or bool(EV_LOADS.intersection(circuit.loads))


def sockets_all_srcd(ctx: Context, circuit_id: str) -> bool:
    """Every outlet of a socket circuit is an SRCD of IΔn <= 30 mA without delay.

    The outlets are the circuit's children in the tree; a circuit with no
    recorded outlets is not covered.
    """
    kids = ctx.index.children.get(circuit_id, [])
    if not kids:
        return False
    return all(
        ctx.index.kind(k) == "srcd"
        and float(ctx.index.by_id[k].idn_ma) <= ADDITIONAL_IDN_MA.value
        and str(ctx.index.by_id[k].delay) == "general"
        for k in kids
    )


def additional_needs(ctx: Context, circuit_id: str) -> list[Need]:
    """Why a circuit needs residual-current protection, strictest first.

    EV charging points are judged on their own (:mod:`model.rules.checks.ev`)
    and are not listed here.

    References
    ----------
    BS 7671 411.3.3 (sockets <= 32 A; mobile equipment outdoors <= 32 A);
    411.3.4 (domestic lighting); 522.6.202/203 (concealed cables);
    701.411.3.3 (bathrooms); 702, 703.411.3.3, 705.411.1 (swimming pools,
    saunas, agricultural premises: clause numbers from memory).
    """
    circuit = ctx.index.by_id[circuit_id]
    uk = ctx.rules.name == "uk-bs7671-2022"
    iec_basis: Basis = ctx.rules.additional_basis

    def need(reason: str, uk_src: str, iec_src: str) -> Need:
        if uk:
            return Need(reason, uk_src, "standard")
        return Need(reason, iec_src + " (common practice)", iec_basis)

    out: list[Need] = []
    rated = circuit.rated_a
    small = rated is None or rated <= ADDITIONAL_MAX_A.value
    locations = set(circuit.location)
    if circuit.use == "sockets" and small and not sockets_all_srcd(ctx, circuit_id):
        out.append(
            need(
                f"socket-outlets up to {ADDITIONAL_MAX_A.text()}",
                "BS 7671 411.3.3(a)",
                "IEC 60364-4-41 411.3.3",
            )
        )
    outdoor = circuit.use == "outdoor" or (
        "outdoor" in locations and circuit.use not in ("fixed-equipment", "lighting")
    )
    if outdoor and small:
        out.append(
            need("mobile equipment used outdoors", "BS 7671 411.3.3(b)", "IEC 60364-4-41 411.3.3")
        )
    if circuit.use == "lighting" and ctx.site.site.domestic and ctx.rules.domestic_lighting:
        out.append(need("lighting in a dwelling", "BS 7671 411.3.4", "IEC 60364-4-41 411.3.4"))
    if circuit.concealed_shallow:
        out.append(
            need(
                "cables concealed less than 50 mm deep without protection",
                "BS 7671 522.6.202/522.6.203",
                "IEC 60364-5-52 522.6",
            )
        )
    for loc in ("bathroom", "wet-area", "sauna", "swimming-pool"):
        if loc not in locations:
            continue
        if loc == "sauna" and circuit.use in SAUNA_HEATER_USES:
            continue
        rule = LOCATION_RULES[loc]
        if uk:
            out.append(Need(rule.reason, rule.uk_source, rule.uk_basis))
        else:
            out.append(Need(rule.reason, rule.iec_source, "guidance"))
    if "agricultural" in locations:
        out.extend(_agricultural(ctx, circuit, small))
    return out


def _agricultural(ctx: Context, circuit: Any, small: bool) -> list[Need]:
    """BS 7671 705.411.1: sockets <= 32 A 30 mA, larger sockets 100 mA, all else 300 mA."""
    rule = LOCATION_RULES["agricultural"]
    src = rule.uk_source if ctx.rules.name == "uk-bs7671-2022" else rule.iec_source
    if circuit.use == "sockets" and small:
        return [Need(rule.reason, src, "guidance")]
    if circuit.use == "sockets":
        return [
            Need(
                f"socket-outlets above {ADDITIONAL_MAX_A.text()} in agricultural premises",
                AGRI_LARGE_SOCKET_IDN_MA.source,
                AGRI_LARGE_SOCKET_IDN_MA.basis,
                AGRI_LARGE_SOCKET_IDN_MA.value,
                general=False,
            )
        ]
    return [
        Need(
            "a circuit in agricultural premises",
            AGRI_OTHER_IDN_MA.source,
            AGRI_OTHER_IDN_MA.basis,
            AGRI_OTHER_IDN_MA.value,
            general=False,
        )
    ]


def severity_of(bases: list[Basis]) -> tuple[Severity, Basis]:
    """Required only where a reason rests on a standard's text; advice otherwise."""
    if "standard" in bases:
        return "required", "standard"
    return "advisory", ("guidance" if "guidance" in bases else "common-practice")


def check_additional_protection(ctx: Context) -> Iterator[Finding]:
    """``coverage.additional-protection``: circuits without the RCD protection they need.

    For additional protection only a general-type (not time-delayed) device
    of IΔn <= 30 mA in the circuit's path counts; an RCM never does.  A socket
    circuit whose outlets are all SRCDs of 30 mA or less has it at each
    outlet.  In agricultural premises larger socket-outlets need 100 mA and
    every other circuit 300 mA (any protective RCD of that IΔn or less).  One
    finding per circuit, for the strictest need that is not met.  Required
    where a reason rests on a standard's text; advisory where every reason is
    common practice or guidance (clause numbers from memory).

    References
    ----------
    BS 7671 411.3.3, 411.3.4, 522.6.202, 522.6.203, 701.411.3.3;
    703.411.3.3, 702, 705.411.1 (from memory).
    """
    idx = ctx.index
    for c in idx.circuits():
        cn = idx.by_id[c]
        if is_ev_point(cn):
            continue
        needs = additional_needs(ctx, c)
        if not needs:
            continue
        path = idx.rcd_above[c]
        unmet = [n for n in needs if not any(n.met_by(idx.by_id[r]) for r in path)]
        if not unmet:
            continue
        strictest = min(n.max_idn_ma for n in unmet)
        group = [n for n in unmet if n.max_idn_ma == strictest]
        severity, basis = severity_of([n.basis for n in group])
        why = "; ".join(n.reason for n in group)
        sources = "; ".join(dict.fromkeys(n.source for n in group))
        have = (
            "its only residual-current protection is "
            + ", ".join(
                f"{idx.label(r)} ({idx.by_id[r].idn_ma:g} mA {idx.by_id[r].delay})" for r in path
            )
            if path
            else "it has no residual-current protection"
        )
        general = any(n.general for n in group)
        kind = "a general-type RCD or RCBO" if general else "an RCD or RCBO"
        limit = f"{strictest:g} mA"
        yield Finding(
            rule="coverage.additional-protection",
            severity=severity,
            nodes=(c, *path),
            board=idx.board_of[c],
            message=(
                f"{idx.label(c)} needs {'additional ' if general else ''}protection by an RCD "
                f"of {limit} or less ({why}); {have}."
            ),
            action=f"Provide {kind} of IΔn ≤ {limit} for this circuit.",
            source=sources,
            basis=basis,
        )
