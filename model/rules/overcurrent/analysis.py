"""The overcurrent half of a site's analysis: every series pair of fuses and breakers.

:func:`overcurrent_pairs` enumerates the pairs (nearest first along each
path), builds each device's band once, judges all banded pairs together with
numpy (:func:`model.rules.overcurrent.pairs.judge`) and words each verdict.
"""

from __future__ import annotations

from typing import Any

from model.rules.overcurrent.bands import Band, band_of
from model.rules.overcurrent.faults import SiteValues
from model.rules.overcurrent.pairs import (
    OcPair,
    OcRange,
    PairInput,
    fmt_a,
    gg_rule_applies,
    judge,
    ranges_of,
    verdict_of,
)
from model.rules.overcurrent.tables import IEC_60269_SEL
from model.site.terms import OVERCURRENT_KINDS
from model.site.tree import SiteIndex

NEEDS_MAKER = (
    "the makers' selectivity table (maker_selectivity) or both devices' curves "
    "(maker_curve) would settle it"
)


def oc_devices(idx: SiteIndex) -> list[str]:
    """Overcurrent devices in tree order (the index's list: do not modify it)."""
    return idx.ocpds()


def series_oc_pairs(idx: SiteIndex, devices: list[str] | None = None) -> list[tuple[str, str]]:
    """Every (upstream, downstream) pair of overcurrent devices in series, in tree order."""
    above = idx.ocpd_above
    return [(up, dev) for dev in (devices or oc_devices(idx)) for up in above[dev]]


def _maker_limit(down: Any, up_id: str) -> tuple[float, str] | None:
    for row in down.__dict__["maker_selectivity"]:
        if row.upstream == up_id:
            return float(row.limit_a), row.source
    return None


def _band_line(role: str, label: str, band: Band | str) -> str:
    if isinstance(band, str):
        return f"{role} {label}: no band ({band})"
    kind = "maker's curve" if band.basis == "maker" else "standard band"
    return f"{role} {label}: {band.name}, {kind} — {band.source}"


def overcurrent_pairs(idx: SiteIndex, values: SiteValues) -> list[OcPair]:
    """The verdict of every series pair of overcurrent devices.

    Pairs that share both bands, the fault level and the maker's limit share
    one judgement: the distinct combinations are judged together with numpy.
    Each device's band, and the lines that describe it, are worked out once
    however many pairs it is in.
    """
    by_id = idx.by_id
    above = idx.ocpd_above
    bands: dict[str, Band | str] = {}
    up_lines: dict[str, str] = {}

    def band(n: str) -> Band | str:
        b = bands.get(n)
        if b is None:
            b = bands[n] = band_of(by_id[n])
        return b

    def label(n: str) -> str:
        return by_id[n].__dict__["label"] or n

    combos: dict[tuple[Any, ...], int] = {}
    inputs: list[PairInput] = []
    unbanded: dict[tuple[Any, ...], OcPair] = {}
    #: per pair: (up, down, fault level [A], maker's limit, judged row or the shared
    #: verdict of an unbanded pair, the down device's lines)
    plan: list[tuple[str, str, float, tuple[float, str] | None, int | OcPair, tuple[str, str]]]
    plan = []
    for d in oc_devices(idx):
        ups = above[d]
        if not ups:
            continue
        down = by_id[d]
        dd = down.__dict__
        level = values.at(d)
        i_max = level.ka * 1000.0
        db = band(d)
        lines = (
            _band_line("downstream", label(d), db),
            f"largest fault current {fmt_a(i_max)}: {level.note}",
        )
        has_limits = bool(dd["maker_selectivity"])
        down_banded = db.__class__ is Band
        #: what an unbanded pair's verdict reads of the downstream side
        down_key = (db if isinstance(db, str) else id(db), i_max, dd.get("rated_a"))
        down_gg = down_banded and db.name.startswith("gG")  # type: ignore[union-attr]
        for u in ups:
            limit = _maker_limit(down, u) if has_limits else None
            ub = band(u)
            if ub.__class__ is Band and down_banded:
                assert isinstance(ub, Band) and isinstance(db, Band)
                gg = down_gg and ub.name.startswith("gG") and gg_rule_applies(by_id[u], down)
                key = (id(ub), id(db), i_max, limit[0] if limit else None, gg)
                row = combos.get(key, -1)
                if row < 0:
                    row = combos[key] = len(inputs)
                    inputs.append(PairInput(ub, db, i_max, limit[0] if limit else None, gg))
                plan.append((u, d, i_max, limit, row, lines))
                continue
            ukey = (ub if isinstance(ub, str) else id(ub), down_key, limit)
            proto = unbanded.get(ukey)
            if proto is None:
                proto = unbanded[ukey] = _unbanded(u, d, down, ub, db, i_max, limit, ())
            plan.append((u, d, i_max, limit, proto, lines))
    if not plan:
        return []
    judged_rows: list[tuple[Any, ...]] = []
    if inputs:
        judged = judge(inputs)
        for row, it in enumerate(inputs):
            ranges = ranges_of(judged, row)
            verdict, sel_to = verdict_of(judged, row, ranges)
            maker = (
                it.up_band.basis == "maker"
                or it.down_band.basis == "maker"
                or bool(it.maker_limit_a)
            )
            expl = _explain(it, verdict, sel_to, ranges, bool(judged.staircase_ok[row]))
            judged_rows.append(
                (verdict, sel_to, float(judged.lo_a[row]), tuple(ranges), maker, expl)
            )
    out: list[OcPair] = []
    for u, d, i_max, limit, job, (down_line, level_line) in plan:
        up_line = up_lines.get(u)
        if up_line is None:
            up_line = up_lines[u] = _band_line("upstream", label(u), bands[u])
        data: tuple[str, ...] = (up_line, down_line, level_line)
        if limit is not None:
            data = (
                *data,
                f"maker's selectivity limit {fmt_a(limit[0])} ({limit[1] or 'source not given'})",
            )
        if isinstance(job, OcPair):
            p = job
            out.append(
                OcPair(u, d, p.verdict, p.limit_a, p.lo_a, i_max, p.ranges, p.basis,
                       p.explanation, data)
            )  # fmt: skip
            continue
        verdict, sel_to, lo, ranges, maker, expl = judged_rows[job]
        out.append(
            OcPair(u, d, verdict, sel_to, lo, i_max, ranges,
                   "maker" if maker else "standard", expl, data)
        )  # fmt: skip
    return out


def _unbanded(
    u: str,
    d: str,
    down: Any,
    ub: Band | str,
    db: Band | str,
    i_max: float,
    limit: tuple[float, str] | None,
    data: tuple[str, ...],
) -> OcPair:
    lo = db.non_trip_a if isinstance(db, Band) else float(getattr(down, "rated_a", None) or 1.0)
    reasons = "; ".join(b for b in (ub, db) if isinstance(b, str))
    if limit is not None and limit[0] >= i_max:
        return OcPair(
            u, d, "selective", i_max, lo, i_max, (), "maker",
            f"selective up to {fmt_a(limit[0])} by the maker's selectivity table, above the "
            f"largest fault current {fmt_a(i_max)}",
            data,
        )  # fmt: skip
    if limit is not None and limit[0] > lo:
        return OcPair(
            u, d, "partial", limit[0], lo, i_max,
            (OcRange(limit[0], i_max, "not-selective"),), "maker",
            f"selective up to {fmt_a(limit[0])} by the maker's selectivity table; not selective "
            f"above it, up to the largest fault current {fmt_a(i_max)}",
            data,
        )  # fmt: skip
    return OcPair(
        u, d, "not-shown", None, lo, i_max, (OcRange(lo, max(i_max, lo), "not-shown"),),
        "standard",
        f"cannot be shown: {reasons}",
        data,
    )  # fmt: skip


def _explain(
    it: PairInput, verdict: str, sel_to: float | None, ranges: list[OcRange], staircase: bool
) -> str:
    pair = f"{it.down_band.name} under {it.up_band.name}"
    if it.gg_rule:
        return (
            f"{pair}: gG links of 16 A or more in the ratio 1.6:1 or more are selective "
            f"({IEC_60269_SEL})"
        )
    how = (
        "the staircase reading of the published points shows it"
        if staircase
        else "shown by the estimate (log-log between the published points), not by the "
        "staircase reading alone"
    )
    if verdict == "selective":
        return f"{pair}: selective up to the largest fault current {fmt_a(it.i_max_a)}; {how}"
    bad = ", ".join(r.text() for r in ranges)
    if verdict == "partial":
        assert sel_to is not None
        why = (
            "above it the maker's selectivity limit is passed"
            if it.maker_limit_a and sel_to >= it.maker_limit_a * (1 - 1e-9)
            else "above it the downstream device is in its instantaneous or current-limiting "
            "region, where time-current bands cannot decide; " + NEEDS_MAKER
        )
        return f"{pair}: selective up to {fmt_a(sel_to)} (estimate); {why}. Ranges: {bad}"
    if verdict == "not-selective":
        worst = ", ".join(
            f"{fmt_a(r.lo_a)} to {fmt_a(r.hi_a)}" for r in ranges if r.kind == "not-selective"
        )
        rest = [r.text() for r in ranges if r.kind != "not-selective"]
        return (
            f"{pair}: the upstream device may operate first or together from {worst} (its "
            "estimated fastest time is a quarter or less of the downstream device's slowest)"
            + (f"; not shown: {', '.join(rest)}" if rest else "")
        )
    return f"{pair}: the published bands cannot settle {bad}; {NEEDS_MAKER}"


def nearest_oc_pair(idx: SiteIndex, device_id: str) -> tuple[str, str] | None:
    """(upstream, downstream) for an overcurrent device and its nearest one above, else below."""
    if device_id not in idx.by_id or idx.by_id[device_id].kind not in OVERCURRENT_KINDS:
        return None
    above = idx.ocpd_above.get(device_id, ())
    if above:
        return above[0], device_id
    for nid in idx.descendants(device_id):
        if idx.by_id[nid].kind in OVERCURRENT_KINDS:
            return device_id, nid
    return None
