"""Series pairs of residual-current devices: the rule of thumb, the bands, DC blinding."""

from __future__ import annotations

from collections.abc import Iterator
from typing import Any

from model.rules.checks.context import Context
from model.rules.checks.pair_verdict import (
    confirm_note,
    five_x_confirmed_ms,
    open_ranges,
    pair_verdict,
    remedies,
    selective_verdict,
)
from model.rules.envelope import (
    DeviceCurve,
    curve_key,
)
from model.rules.findings import (
    CurrentRange,
    Finding,
    MeasuredMargin,
    PairAnalysis,
    Severity,
    device_text,
    fmt_ma,
    fmt_ratio,
)
from model.rules.limits import CASCADE_RATIO, DEFAULT_MAX_FAULT_A, IEC_61008_T1
from model.site.terms import DID_NOT_TRIP

#: The series-RCD ratio as messages write it: '3:1'.
_RATIO = f"{CASCADE_RATIO.value:g}:1"

DC_BLINDING_SOURCE = (
    "manufacturers' guidance derived from BS 7671 531.3.3; no regulation states it "
    "(medium confidence)"
)


def ratio_below(ratio: float) -> bool:
    """IΔn(up) / IΔn(down) below 3 (a ratio equal to 3 within rounding passes)."""
    return ratio < CASCADE_RATIO.value * (1 - 1e-9)


def series_pairs(ctx: Context) -> list[tuple[str, str]]:
    """Every (upstream, downstream) pair of protective RCDs in series, in tree order."""
    out: list[tuple[str, str]] = []
    idx = ctx.index
    for dev in idx.rcds():
        for up in idx.rcd_above[dev]:
            out.append((up, dev))
    return out


def largest_fault_ma(ctx: Context) -> dict[str, float]:
    """Largest prospective earth-fault current below each protective RCD. [mA]

    U0 / Zs of the lowest Zs measured on a circuit below; where none is
    measured, U0 / RA in TT, U0 / Ze otherwise, and 500 A where nothing is
    known.
    """
    idx = ctx.index
    info = ctx.site.site
    u0 = info.u0_v
    inf = float("inf")
    min_zs: dict[str, float] = dict.fromkeys(idx.rcds(), inf)
    for c in idx.circuits():
        zs = idx.by_id[c].zs_ohm
        if zs is not None:
            for r in idx.rcd_above[c]:
                if zs < min_zs[r]:
                    min_zs[r] = float(zs)
    if info.earthing == "TT" and info.ra_ohm is not None:
        fallback = u0 / info.ra_ohm * 1000.0
    elif info.earthing != "TT" and info.ze_ohm is not None:
        fallback = u0 / info.ze_ohm * 1000.0
    else:
        fallback = DEFAULT_MAX_FAULT_A.value * 1000.0
    return {r: (u0 / z * 1000.0 if z != inf else fallback) for r, z in min_zs.items()}


def _times(reading: Any, group: str) -> list[float | str]:
    vals = [getattr(reading, f"{group}_0"), getattr(reading, f"{group}_180")]
    return [v for v in vals if v is not None]


def measured_margin(
    ctx: Context, up: Any, down: Any, ranges: list[tuple[float, float]]
) -> MeasuredMargin | None:
    """Selectivity in practice from the latest visit's readings.

    Assumes a device trips no slower at a higher current: over each range
    where the bands overlap, the downstream device is no slower than its
    slowest time measured at a test current at or below the range's lower
    end, and the upstream device no faster than its fastest time measured at a
    test current at or above the range's upper end.  Only sinusoidal (AC)
    tests at IΔn and 5 IΔn are used.  An estimate from measurements.
    """
    if not ranges or ctx.latest is None:
        return None
    r_up = ctx.latest.readings.get(up.id)
    r_dn = ctx.latest.readings.get(down.id)
    if r_up is None or r_dn is None or r_up.not_tested or r_dn.not_tested:
        return MeasuredMargin(None, None, None, None, "not both devices have readings")
    if r_up.waveform != "AC" or r_dn.waveform != "AC":
        return MeasuredMargin(
            None, None, None, None, "readings were not taken with AC test current"
        )
    worst_margin: float | None = None
    d_slow_all: float | None = None
    u_fast_all: float | None = None
    for lo, hi in ranges:
        d_vals: list[float | str] = []
        u_vals: list[float | str] = []
        for group, mult in (("x1", 1.0), ("x5", 5.0)):
            if mult * down.idn_ma <= lo * (1 + 1e-9):
                d_vals.extend(_times(r_dn, group))
            if mult * up.idn_ma >= hi * (1 - 1e-9):
                u_vals.extend(_times(r_up, group))
        if not d_vals or not u_vals:
            return MeasuredMargin(
                None,
                None,
                None,
                None,
                f"no readings bracket {fmt_ma(lo)} to {fmt_ma(hi)} "
                "(need the downstream tested at or below it and the upstream at or above it)",
            )
        if DID_NOT_TRIP in d_vals:
            return MeasuredMargin(
                False, None, None, None, "the downstream device did not trip on a test"
            )
        d_slow = max(float(v) for v in d_vals)
        u_times = [float(v) for v in u_vals if v != DID_NOT_TRIP]
        if not u_times:
            return MeasuredMargin(
                None, d_slow, None, None, "the upstream device did not trip on its tests"
            )
        u_fast = min(u_times)
        margin = u_fast - d_slow
        if worst_margin is None or margin < worst_margin:
            worst_margin, d_slow_all, u_fast_all = margin, d_slow, u_fast
    assert worst_margin is not None
    ok = worst_margin > 0
    text = (
        f"downstream slowest {d_slow_all:g} ms, upstream fastest {u_fast_all:g} ms: "
        f"margin {worst_margin:g} ms "
        + ("(selective in practice; an estimate from measurements)" if ok else "(no margin)")
    )
    return MeasuredMargin(ok, d_slow_all, u_fast_all, worst_margin, text)


def analyse_pairs(ctx: Context) -> list[PairAnalysis]:
    """Rule verdict, non-selective current ranges and measured margin of every series pair.

    The bands of each distinct device curve are built once; every pair is
    judged in one numpy pass (:func:`model.rules.envelope.class_pair_bands`);
    the words are built per pair only where its verdict needs them.
    """
    pairs = series_pairs(ctx)
    if not pairs:
        return []
    by_id = ctx.index.by_id
    faults = largest_fault_ma(ctx)
    # one curve per device class; each device points at its class's row
    class_of: dict[tuple[float, str, float | None, float | None], int] = {}
    curves: list[DeviceCurve] = []
    row_of: dict[str, int] = {}
    for r in ctx.index.rcds():
        key = curve_key(by_id[r])
        k = class_of.get(key)
        if k is None:
            k = class_of[key] = len(curves)
            curves.append(DeviceCurve(*key))
        row_of[r] = k
    up_rows = [row_of[u] for u, _ in pairs]
    dn_rows = [row_of[d] for _, d in pairs]
    imax = [faults[d] for _, d in pairs]
    # pairs of the same two curves and fault level have the same ranges: judged once
    combo_of: dict[tuple[int, int, float], int] = {}
    combo = [
        combo_of.setdefault(key, len(combo_of)) for key in zip(up_rows, dn_rows, imax, strict=True)
    ]
    by_combo = open_ranges(curves, list(combo_of))
    std_ranges = [by_combo[c] for c in combo]
    # a downstream 5 IΔn test within 40 ms matters only where the bands leave a range
    confirmed: dict[str, float | None] = {}
    conf_rows: list[int] = []
    for row, (_, d) in enumerate(pairs):
        if std_ranges[row]:
            if d not in confirmed:
                confirmed[d] = five_x_confirmed_ms(ctx, by_id[d], curves[row_of[d]])
            if confirmed[d] is not None:
                conf_rows.append(row)
    conf_ranges: dict[int, list[tuple[float, float]]] = {}
    if conf_rows:
        conf_of: dict[tuple[int, int, float], int] = {}
        conf_combo = [
            conf_of.setdefault((up_rows[row], dn_rows[row], imax[row]), len(conf_of))
            for row in conf_rows
        ]
        conf_by = open_ranges(curves, list(conf_of), down_confirmed=True)
        conf_ranges = {row: conf_by[c] for row, c in zip(conf_rows, conf_combo, strict=True)}
    # the 3:1 and time-delay rule reads only the two curves: once per pair of classes
    rule_of: dict[tuple[int, int], tuple[float, bool, bool, tuple[str, ...]]] = {}
    out: list[PairAnalysis | None] = []
    open_rows: list[tuple[int, float, bool, tuple[str, ...], Any, Any]] = []
    for row, (u, d) in enumerate(pairs):
        classes = (up_rows[row], dn_rows[row])
        rule = rule_of.get(classes)
        if rule is None:
            rule = rule_of[classes] = _rule(curves[classes[0]], curves[classes[1]])
        ratio, delayed, short, notes = rule
        ranges = std_ranges[row]
        if not ranges:  # selective by the bands: nothing measured is needed
            v = selective_verdict(imax[row])
            out.append(
                PairAnalysis(u, d, ratio, delayed, not notes, notes, float(imax[row]), (),
                             None, v.verdict, v.explanation)
            )  # fmt: skip
            continue
        up, down = by_id[u], by_id[d]
        judged = conf_ranges.get(row, ranges)
        ms = confirmed[d]
        note = confirm_note(down, ms) if ms is not None and row in conf_ranges else ""
        margin = measured_margin(ctx, up, down, judged)
        v = pair_verdict(not notes, imax[row], ranges, judged, margin, note)
        open_rows.append((row, ratio, delayed, notes, margin, v))
        out.append(None)  # filled in below, once the remedies are known
    gaps = [r for r in open_rows if r[5].verdict in ("not-guaranteed", "not-selective")]
    actions = remedies(
        [
            (
                curves[up_rows[row]],
                curves[dn_rows[row]],
                imax[row],
                delayed,
                ratio_below(ratio),
                row in conf_ranges,
            )
            for row, ratio, delayed, _, _, _ in gaps
        ]
    )
    action_of = {r[0]: a for r, a in zip(gaps, actions, strict=True)}
    for row, ratio, delayed, notes, margin, v in open_rows:
        u, d = pairs[row]
        out[row] = PairAnalysis(
            up=u,
            down=d,
            ratio=ratio,
            up_delayed=delayed,
            rule_ok=not notes,
            rule_notes=notes,
            i_max_ma=float(imax[row]),
            ranges=tuple(CurrentRange(lo, hi) for lo, hi in std_ranges[row]),
            measured=margin,
            verdict=v.verdict,
            explanation=v.explanation,
            action=action_of.get(row, ""),
        )
    done = [p for p in out if p is not None]
    assert len(done) == len(pairs)
    return done


def _rule(up: DeviceCurve, down: DeviceCurve) -> tuple[float, bool, bool, tuple[str, ...]]:
    """(IΔn ratio, upstream delayed, ratio below 3, the notes) of a pair of curves."""
    ratio = up.idn_ma / down.idn_ma
    notes: list[str] = []
    delayed = up.delay in ("S", "set")
    if not delayed:
        notes.append("upstream is not time-delayed")
    short = ratio_below(ratio)
    if short:
        notes.append(f"IΔn ratio {fmt_ratio(ratio)} is below {_RATIO}")
    return ratio, delayed, short, tuple(notes)


def check_cascade(ctx: Context) -> Iterator[Finding]:
    """Series pairs that cannot discriminate.

    ``cascade.upstream-not-delayed`` and ``cascade.ratio-below-3``: RCDs in
    series need the upstream one time-delayed and IΔn(up) >= 3 × IΔn(down).
    ``cascade.band-overlap``: the time-current bands overlap (step-function
    reading of the product standard) and the readings do not show a margin.
    ``cascade.dc-blinding``: Type AC/A/F upstream of a Type B device.

    References
    ----------
    BS 7671 536.4.1.4 (clause text not seen; common practice);
    IEC 61008-1 Ed.3 Table 1; manufacturers' guidance on DC blinding.
    """
    idx = ctx.index
    by_up: dict[str, list[str]] = {}
    for p in ctx.pairs:
        if not p.up_delayed:
            by_up.setdefault(p.up, []).append(p.down)
    for u, downs in by_up.items():
        up = idx.by_id[u]
        names = ", ".join(idx.label(d) for d in downs)
        yield Finding(
            rule="cascade.upstream-not-delayed",
            severity="advisory",
            nodes=(u, *downs),
            board=idx.board_of[u],
            message=(
                f"{idx.label(u)} ({device_text(up)}) has residual-current devices downstream "
                f"({names}) but is not time-delayed: a fault below them may trip it too."
            ),
            action="Replace the upstream device with a time-delayed (type S) one of suitable IΔn, "
            "or rearrange so the devices are not in series.",
            source=CASCADE_RATIO.source,
            basis="common-practice",
        )
    for p in ctx.pairs:
        up, down = idx.by_id[p.up], idx.by_id[p.down]
        if ratio_below(p.ratio):
            yield Finding(
                rule="cascade.ratio-below-3",
                severity="advisory",
                nodes=(p.up, p.down),
                board=idx.board_of[p.down],
                message=(
                    f"{idx.label(p.up)} ({up.idn_ma:g} mA) is upstream of {idx.label(p.down)} "
                    f"({down.idn_ma:g} mA): ratio {fmt_ratio(p.ratio)}, below {_RATIO}."
                ),
                action="Use an upstream device of at least three times the downstream IΔn.",
                source=CASCADE_RATIO.source,
                basis="common-practice",
                measured=fmt_ratio(p.ratio),
                band=f"≥ {_RATIO}",
            )
        if p.verdict in ("not-selective", "not-guaranteed"):
            ranges = ", ".join(r.text() for r in p.ranges)
            pair_words = (
                f"{idx.label(p.up)} ({device_text(up)}) and {idx.label(p.down)} "
                f"({device_text(down)})"
            )
            if p.verdict == "not-guaranteed":
                untested = p.measured is None or p.measured.selective is None
                severity: Severity = "investigate" if untested else "advisory"
                message = (
                    f"{pair_words} meet the {_RATIO} and time-delay rule, but selectivity is "
                    f"{p.explanation}."
                )
            else:
                severity = "advisory"
                message = f"{pair_words}: time-current bands overlap from {ranges}; both may trip."
            yield Finding(
                rule="cascade.band-overlap",
                severity=severity,
                nodes=(p.up, p.down),
                board=idx.board_of[p.down],
                message=message,
                action=p.action,
                source=IEC_61008_T1 + " (step-function reading between tabulated currents)",
                basis="standard",
                measured=p.measured.explanation if p.measured else None,
                band=ranges,
            )
        if str(up.waveform) in ("AC", "A", "F") and str(down.waveform) == "B":
            yield Finding(
                rule="cascade.dc-blinding",
                severity="advisory",
                nodes=(p.up, p.down),
                board=idx.board_of[p.down],
                message=(
                    f"{idx.label(p.up)} is Type {up.waveform} upstream of Type B "
                    f"{idx.label(p.down)}: smooth DC residual current that the Type B device "
                    "is there for may blind the upstream device."
                ),
                action="Make the upstream device Type B, or feed the Type B circuit so it is "
                "not downstream of a Type AC/A/F device.",
                source=DC_BLINDING_SOURCE,
                basis="guidance",
            )
