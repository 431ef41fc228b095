"""Overcurrent checks: selectivity of fuses and breakers, disconnection by Zs, breaking capacity."""

from __future__ import annotations

from collections.abc import Iterator
from dataclasses import dataclass, field

from model.rules.checks.context import Context
from model.rules.findings import Finding
from model.rules.overcurrent.analysis import overcurrent_pairs
from model.rules.overcurrent.breaking import CONDITIONAL_SOURCE, SOURCE, Breaking, breaking_rows
from model.rules.overcurrent.disconnection import Disconnection, disconnections
from model.rules.overcurrent.faults import SiteValues
from model.rules.overcurrent.pairs import OcPair, fmt_a
from model.rules.overcurrent.tables import TABLE_41_1, ZS_RULES

SELECTIVITY_SOURCE = "BS 7671 536.4.1.2 (desk study of time-current characteristics)"
_LIST = 6


@dataclass
class OcAnalysis:
    """The overcurrent half of an analysis."""

    pairs: list[OcPair] = field(default_factory=list)
    disconnection: list[Disconnection] = field(default_factory=list)
    breaking: list[Breaking] = field(default_factory=list)


def overcurrent_analysis(ctx: Context) -> OcAnalysis:
    """Pairs, disconnection rows and breaking rows of the site (built once per analysis)."""
    if ctx.oc is None:
        info = ctx.site.site
        values = SiteValues.build(ctx.site, ctx.index)
        ctx.oc = OcAnalysis(
            pairs=overcurrent_pairs(ctx.index, values),
            disconnection=disconnections(
                ctx.index, values, ZS_RULES[ctx.rules.name], info.earthing, info.u0_v
            ),
            breaking=breaking_rows(ctx.index, values),
        )
    assert isinstance(ctx.oc, OcAnalysis)
    return ctx.oc


def _names(idx: object, ids: list[str]) -> str:
    label = idx.label  # type: ignore[attr-defined]
    shown = ", ".join(label(i) for i in ids[:_LIST])
    return shown + (f" and {len(ids) - _LIST} more" if len(ids) > _LIST else "")


def check_overcurrent(ctx: Context) -> Iterator[Finding]:
    """``overcurrent.not-selective``, ``overcurrent.selectivity-not-shown``,
    ``disconnection.zs-too-high``, ``disconnection.zs-not-shown``,
    ``breaking-capacity.too-low``.

    * A pair is not selective where the bands show the upstream device may
      operate first or together (advisory: a design quality); where the
      published bands cannot settle it the pairs are listed under their
      upstream device (investigate).  Partial selectivity is reported in the
      pair list and the study, not as a finding.
    * A circuit's measured Zs above the limit for its overcurrent device and
      required time (required), unless a residual-current device in its path
      gives the disconnection; a measured Zs whose device has no known Ia
      (investigate).
    * A breaking capacity below the fault level where the device is installed
      (required), unless the board's conditional rating or a recorded back-up
      combination covers it.

    References
    ----------
    BS 7671 536.4.1.2, 411.4.4, Table 41.1, 434.5.1, 536.4.201; IEC 60898-1
    Table 7; IEC 60269-1 Tables 2, 3, 7 and 7.8; IEC 60364-4-41 411.4.4.
    """
    oc = overcurrent_analysis(ctx)
    idx = ctx.index
    unshown: dict[str, list[OcPair]] = {}
    for p in oc.pairs:
        if p.verdict == "not-selective":
            gg = any("gG" in line for line in p.data[:2])
            yield Finding(
                rule="overcurrent.not-selective",
                severity="advisory",
                nodes=(p.up, p.down),
                board=idx.board_of[p.down],
                message=f"{idx.label(p.up)} and {idx.label(p.down)}: {p.explanation}.",
                action="Choose an upstream device whose band clears the downstream one (a "
                "larger rating or another characteristic), or confirm selectivity from the "
                "makers' tables (maker_selectivity).",
                source=SELECTIVITY_SOURCE + "; bands: IEC 60898-1 Table 7 / IEC 60269-1 "
                "Tables 2, 3, 7" + (" (gG gates from memory)" if gg else ""),
                basis="guidance" if gg else "standard",
                band=", ".join(r.text() for r in p.ranges),
            )
        elif p.verdict == "not-shown":
            unshown.setdefault(p.up, []).append(p)
    for up, group in unshown.items():
        downs = [p.down for p in group]
        reason = group[0].explanation
        more = "" if len(group) == 1 else f" (first of {len(group)}; each pair in the study)"
        yield Finding(
            rule="overcurrent.selectivity-not-shown",
            severity="investigate",
            nodes=(up, *downs),
            board=idx.board_of[up],
            message=f"Selectivity of {idx.label(up)} over {_names(idx, downs)} cannot be shown "
            f"from the published bands: {reason}{more}.",
            action="Record the makers' selectivity limits (maker_selectivity) or curves "
            "(maker_curve), and the fuse type where it is missing.",
            source=SELECTIVITY_SOURCE,
            basis="guidance",
        )
    rule = ZS_RULES[ctx.rules.name]
    for row in oc.disconnection:
        if row.mark == "too high":
            assert row.limit_ohm is not None and row.measured_ohm is not None
            assert row.zs_max_ohm is not None and row.required_s is not None
            cold = not row.warm
            compare = (
                f"{rule.cold_factor:.3g} × {row.zs_max_ohm:.3g} Ω = {row.limit_ohm:.3g} Ω "
                "(a cold reading)"
                if cold
                else f"{row.zs_max_ohm:.3g} Ω (measured warm)"
            )
            yield Finding(
                rule="disconnection.zs-too-high",
                severity="required",
                nodes=(row.circuit, row.device or row.circuit),
                board=idx.board_of[row.circuit],
                message=f"{idx.label(row.circuit)}: measured Zs {row.measured_ohm:g} Ω is above "
                f"{compare} for {row.device_name} to disconnect within {row.required_s:g} s.",
                action="Find and reduce the loop impedance (connections, conductor sizes), or "
                "change the protective device, or add RCD protection; then re-test.",
                source=f"{TABLE_41_1}; {rule.cmin_source}; {row.source}"
                + (f"; {rule.cold_source}" if cold else ""),
                basis=_worst(row.basis, rule.cold_basis if cold else "standard"),
                measured=f"{row.measured_ohm:g} Ω",
                band=f"≤ {row.limit_ohm:.3g} Ω",
            )
        elif row.mark == "not known" and row.measured_ohm is not None and row.required_s:
            yield Finding(
                rule="disconnection.zs-not-shown",
                severity="investigate",
                nodes=(row.circuit, row.device or row.circuit),
                board=idx.board_of[row.circuit],
                message=f"{idx.label(row.circuit)}: measured Zs {row.measured_ohm:g} Ω cannot be "
                f"judged for {row.device_name}: {row.note}.",
                action="Record the device's maximum Zs (zs_max_ohm) or Ia (ia_a) from the wiring "
                "rules' table or the maker.",
                source=TABLE_41_1,
                basis="guidance",
                measured=f"{row.measured_ohm:g} Ω",
            )
    for b in oc.breaking:
        if b.mark == "too low":
            yield Finding(
                rule="breaking-capacity.too-low",
                severity="required",
                nodes=(b.device,),
                board=idx.board_of[b.device],
                message=f"{idx.label(b.device)} ({b.name}) breaks {b.breaking_ka:g} kA, below the "
                f"prospective fault current {b.pscc_ka:g} kA where it is installed ({b.level_note}).",
                action="Fit a device of adequate breaking capacity, or record the board's "
                "conditional rating (conditional_ka) or the maker's back-up combination "
                "(maker_backup) that covers it.",
                source=f"{SOURCE}; {CONDITIONAL_SOURCE}",
                measured=f"{b.pscc_ka:g} kA",
                band=f"≤ {b.breaking_ka:g} kA",
            )


def _worst(a: str, b: str) -> str:
    order = ("standard", "common-practice", "guidance")
    return max(a, b, key=order.index)


__all__ = ["OcAnalysis", "check_overcurrent", "overcurrent_analysis", "fmt_a"]
