"""Earthing checks: TT electrode limits and Zs limits for RCD-protected circuits."""

from __future__ import annotations

from collections.abc import Iterator

from model.rules.checks.context import Context
from model.rules.findings import Finding
from model.rules.limits import (
    RA_STABLE_OHM,
    TT_TOUCH_V,
    ZS_RCD_V,
    tt_touch_voltage_v,
    zs_limit_ohm,
)


def _most_sensitive(ctx: Context, circuit: str) -> str | None:
    path = ctx.index.rcd_above[circuit]
    if not path:
        return None
    return min(path, key=lambda r: float(ctx.index.by_id[r].idn_ma))


def check_earthing(ctx: Context) -> Iterator[Finding]:
    """``earthing.tt-ra``, ``earthing.zs-limit``, ``earthing.ra-unstable``,
    ``earthing.tt-no-rcd``, ``earthing.ra-missing``.

    * TT: RA × IΔn <= 50 V for the device giving each circuit fault protection
      (the most sensitive in its path); exactly 50 V passes.  Urgent where
      U0 / RA is below IΔn (an earth fault may never reach the current that
      operates the device); required for any smaller excess.
    * Zs <= 50 V / IΔn (Table 41.5, tabulated values) where the RCD gives fault
      protection: on TT, and elsewhere only for a circuit with no overcurrent
      device in its path.  In TN the circuit's limit is that of its overcurrent
      device, and Table 41.5 is not applied.
    * TT: RA above 200 Ω may not be stable.
    * TT: every circuit needs residual-current protection for fault protection.

    References
    ----------
    BS 7671 411.5.3(ii); IEC 60364-4-41 411.5.3; BS 7671 Table 41.5 and its
    Note 2.
    """
    idx = ctx.index
    info = ctx.site.site
    tt = info.earthing == "TT"
    root = idx.root
    if tt and info.ra_ohm is None:
        yield Finding(
            rule="earthing.ra-missing",
            severity="investigate",
            nodes=(root,),
            board=root,
            message="TT site with no earth electrode resistance RA recorded: the "
            f"{TT_TOUCH_V.text()} limit cannot be checked.",
            action="Measure RA and record it in the site details.",
            source=TT_TOUCH_V.source,
        )
    if tt and info.ra_ohm is not None and info.ra_ohm > RA_STABLE_OHM.value:
        yield Finding(
            rule="earthing.ra-unstable",
            severity="advisory",
            nodes=(root,),
            board=root,
            message=f"Earth electrode resistance RA {info.ra_ohm:g} Ω is above "
            f"{RA_STABLE_OHM.text()} and may not be stable (soil drying or freezing).",
            action="Improve the electrode (deeper or additional rods) and re-measure.",
            source=RA_STABLE_OHM.source,
            measured=f"{info.ra_ohm:g} Ω",
            band=f"≤ {RA_STABLE_OHM.text()}",
        )
    ra_fail: dict[str, list[str]] = {}
    best_of: dict[tuple[str, ...], str | None] = {}  # circuits below one path share it
    for c in idx.circuits():
        path = idx.rcd_above[c]
        if path in best_of:
            best = best_of[path]
        else:
            best = best_of[path] = _most_sensitive(ctx, c)
        if best is None:
            if tt and (idx.parent(c) is None or idx.kind(idx.parent(c) or "") != "circuit"):
                yield Finding(
                    rule="earthing.tt-no-rcd",
                    severity="urgent",
                    nodes=(c,),
                    board=idx.board_of[c],
                    message=f"{idx.label(c)} is on a TT system with no residual-current device in "
                    "its path: fault protection is unlikely to be achieved by a fuse or breaker.",
                    action="Protect the circuit with an RCD; until then treat it as without fault "
                    "protection.",
                    source="BS 7671 411.5.2/411.5.3; IEC 60364-4-41 411.5",
                )
            continue
        dev = idx.by_id[best]
        idn = float(dev.idn_ma)
        if (
            tt
            and info.ra_ohm is not None
            and tt_touch_voltage_v(info.ra_ohm, idn) > TT_TOUCH_V.value + 1e-9
        ):
            ra_fail.setdefault(best, []).append(c)
        cn = idx.by_id[c]
        rcd_fault_protection = tt or not idx.ocpd_above[c]
        if cn.zs_ohm is not None and rcd_fault_protection:
            limit = zs_limit_ohm(idn)
            if cn.zs_ohm > limit + 1e-9:
                yield Finding(
                    rule="earthing.zs-limit",
                    severity="required",
                    nodes=(c, best),
                    board=idx.board_of[c],
                    message=f"{idx.label(c)}: measured Zs {cn.zs_ohm:g} Ω exceeds "
                    f"{ZS_RCD_V.text()} / IΔn "
                    f"= {limit:.4g} Ω for {idx.label(best)} ({idn:g} mA), which gives the "
                    "circuit its fault protection.",
                    action="Find and reduce the high loop impedance (connections, protective "
                    "conductor, electrode) and re-test.",
                    source=ZS_RCD_V.source,
                    measured=f"{cn.zs_ohm:g} Ω",
                    band=f"≤ {limit:.4g} Ω",
                )
    for dev_id, circuits in ra_fail.items():
        dev = idx.by_id[dev_id]
        assert info.ra_ohm is not None
        idn = float(dev.idn_ma)
        volts = tt_touch_voltage_v(info.ra_ohm, idn)
        fault_ma = info.u0_v / info.ra_ohm * 1000.0
        never = fault_ma < idn
        why = (
            f" U0 / RA = {fault_ma:.3g} mA is below its IΔn: an earth fault may never operate it."
            if never
            else f" An earth fault (about {fault_ma:.3g} mA at U0 / RA) still operates it."
        )
        yield Finding(
            rule="earthing.tt-ra",
            severity="urgent" if never else "required",
            nodes=(dev_id, *circuits),
            board=idx.board_of[dev_id],
            message=(
                f"RA × IΔn = {info.ra_ohm:g} Ω × {dev.idn_ma:g} mA = {volts:.3g} V, "
                f"over {TT_TOUCH_V.text()}, "
                f"for {idx.label(dev_id)}, which gives fault protection to {len(circuits)} "
                f"circuit(s).{why}"
            ),
            action="Lower RA or protect these circuits with a more sensitive RCD so that "
            f"RA × IΔn ≤ {TT_TOUCH_V.text()}.",
            source=TT_TOUCH_V.source,
            measured=f"{volts:.3g} V",
            band=f"≤ {TT_TOUCH_V.text()}",
        )
