"""Disconnection by the overcurrent device: each circuit's Zs against its maximum.

Zs max = Cmin × U0 / Ia, where Ia operates the circuit's protective device
within the time Table 41.1 requires.  Ia is, in order: the user's table value
(``zs_max_ohm`` gives the maximum directly, ``ia_a`` the current); 5, 10 or 20
In for B, C and D breakers; for gG fuses and makers' curves the current at
which the upper boundary of the band reaches the required time (between gates
an estimate, log-log); for an industrial breaker 1.2 × its instantaneous (or
short-time, when its delay is within the time) setting.  A measured Zs taken
cold is compared with the cold factor × the maximum (0.8 in the UK).

References
----------
BS 7671 411.4.4, Table 41.1, Appendix 3; IEC 60364-4-41 411.4.4, Table 41.1;
IEC 60898-1 Table 7; IEC 60269-1 Table 3.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any, Literal

from model.rules.overcurrent import tables as T
from model.rules.overcurrent.bands import Band, band_of, device_name
from model.rules.overcurrent.faults import SiteValues
from model.rules.overcurrent.tables import ZsRule
from model.site.tree import SiteIndex

Mark = Literal["pass", "too high", "by RCD", "no Zs", "not known"]


@dataclass(slots=True, unsafe_hash=True)
class Disconnection:
    """One circuit's disconnection by its overcurrent device (treat as read-only)."""

    circuit: str
    device: str | None
    device_name: str
    required_s: float | None
    ia_a: float | None
    zs_max_ohm: float | None
    limit_ohm: float | None
    measured_ohm: float | None
    warm: bool
    mark: Mark
    rcd: str | None
    basis: str
    source: str
    note: str


def is_final(use: str, rated_a: float | None) -> bool:
    """Within Table 41.1's final circuits: up to 63 A with sockets, up to 32 A fixed only.

    An unknown rating is taken as within (the shorter time: the safe side).
    """
    if rated_a is None:
        return True
    return rated_a <= (63.0 if use == "sockets" else 32.0)


def _time_on_band(band: Band, t_s: float) -> float | None:
    """The current at which the band's upper boundary (estimate) reaches ``t_s``. [A]"""
    pts = band.max_est
    for (i0, t0), (i1, t1) in zip(pts, pts[1:], strict=False):
        if t0 >= t_s >= t1 and i1 > i0:
            if t0 == t1:
                return float(i0)
            frac = math.log(t_s / t0) / math.log(t1 / t0)
            return float(i0 * (i1 / i0) ** frac)
    return None


def ia_for(node: Any, t_s: float) -> tuple[float | None, str, str]:
    """(Ia, basis, source) of a device for a required time; Ia None when the data give none."""
    if node.ia_a is not None:
        return float(node.ia_a), "standard", "ia_a as recorded (wiring rules' table or maker)"
    kind = str(node.kind)
    if kind in ("mcb", "rcbo") and not node.maker_curve:
        if node.curve is None or node.rated_a is None:
            return None, "standard", "curve and rated current are needed"
        return T.IA_MULTIPLE[str(node.curve)] * float(node.rated_a), "standard", T.IA_SOURCE
    if kind == "cbr" and not node.maker_curve:
        if node.ii_a is not None:
            return T.CBR_TOLERANCE * node.ii_a, "guidance", T.IEC_60947_2 + " (1.2 × Ii)"
        if node.isd_a is not None and node.tsd_s is not None and node.tsd_s < t_s:
            return T.CBR_TOLERANCE * node.isd_a, "guidance", T.IEC_60947_2 + " (1.2 × Isd)"
        return None, "standard", "no instantaneous setting (ii_a) or maker's curve recorded"
    band = band_of(node)
    if isinstance(band, str):
        return None, "standard", band
    ia = _time_on_band(band, t_s)
    if ia is None:
        return None, band.basis, f"{band.name}: the band does not reach {t_s:g} s"
    if band.basis == "maker":
        return ia, "maker", "maker's curve as recorded (maker_curve)"
    return ia, "guidance", f"{band.source} (at {t_s:g} s, an estimate between gates)"


def disconnections(
    idx: SiteIndex, values: SiteValues, rule: ZsRule, earthing: str, u0_v: float
) -> list[Disconnection]:
    """One row per circuit fed through an overcurrent device."""
    out: list[Disconnection] = []
    by_id, ocpd_above, rcd_above = idx.by_id, idx.ocpd_above, idx.rcd_above
    times = {final: T.max_disconnection_s(earthing, u0_v, final) for final in (True, False)}
    known: dict[tuple[str, str, float], tuple[float | None, str, str]] = {}
    names: dict[str, str] = {}  # a device feeds many circuits: named once
    for c in idx.circuits():
        above = ocpd_above[c]
        if not above:
            continue
        cd = by_id[c].__dict__
        dev_id = above[0]
        dev = by_id[dev_id]
        dd = dev.__dict__
        rated = dd.get("rated_a") or dd.get("ir_a") or cd["rated_a"]
        final = is_final(str(cd["use"]), rated)
        required = times[final]
        name = names.get(dev_id) or names.setdefault(dev_id, device_name(dev))
        zs = values.zs.get(c)
        measured = zs.ohm if zs else None
        warm = zs.warm if zs else False
        rcds = rcd_above[c]
        rcd = rcds[0] if rcds else None
        if required is None:
            out.append(
                Disconnection(c, dev_id, name, None, None, None, None, measured, warm,
                              "not known", rcd, "standard", T.TABLE_41_1,
                              "Table 41.1 gives no time for this system here (IT or U0 ≤ 50 V)")
            )  # fmt: skip
            continue
        if dd["zs_max_ohm"] is not None:
            ia, basis, source = None, "standard", "zs_max_ohm as recorded (table or maker)"
            zs_max: float | None = float(dd["zs_max_ohm"])
        else:
            plain = dd["kind"] != "cbr" and not dd["maker_curve"] and dd["ia_a"] is None
            key = (str(dd["kind"]), name, required)
            got = known.get(key) if plain else None
            if got is None:
                got = ia_for(dev, required)
                if plain:
                    known[key] = got
            ia, basis, source = got
            zs_max = rule.cmin * u0_v / ia if ia else None
        limit = None
        if zs_max is not None:
            limit = zs_max if warm else zs_max * rule.cold_factor
        mark: Mark
        note = ""
        if zs_max is None:
            mark, note = "not known", source
        elif measured is None:
            mark = "no Zs"
        elif limit is not None and measured <= limit + 1e-9:
            mark = "pass"
        elif rcd is not None:
            mark = "by RCD"
            note = f"disconnection relies on {idx.label(rcd)} (residual-current device)"
        else:
            mark = "too high"
        out.append(
            Disconnection(c, dev_id, name, required, ia, zs_max, limit, measured, warm, mark,
                          rcd, basis, source, note)
        )  # fmt: skip
    return out


def device_summary(rows: list[Disconnection], device_id: str) -> str:
    """The Zs maximum and required time of a device's circuits, in words ('' when none).

    For the node form: 'Zs max 2.73 Ω (cold reading ≤ 2.19 Ω) to disconnect in 0.4 s
    (Table 41.1) — 1 circuit'.
    """
    mine = [r for r in rows if r.device == device_id]
    if not mine:
        return ""
    parts: list[str] = []
    seen: set[tuple[float | None, float | None]] = set()
    for r in mine:
        key = (r.required_s, r.zs_max_ohm)
        if key in seen:
            continue
        seen.add(key)
        if r.required_s is None:
            parts.append("no required time (IT system or U0 ≤ 50 V)")
        elif r.zs_max_ohm is None:
            parts.append(f"to disconnect in {r.required_s:g} s: Zs maximum not known ({r.source})")
        else:
            cold = "" if r.limit_ohm is None else f" (cold reading ≤ {r.limit_ohm:.3g} Ω)"
            parts.append(
                f"Zs max {r.zs_max_ohm:.3g} Ω{cold} to disconnect in {r.required_s:g} s "
                f"(Table 41.1)"
            )
    return "; ".join(parts) + f" — {len(mine)} circuit(s)"
