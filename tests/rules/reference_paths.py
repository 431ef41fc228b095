"""Straightforward reference versions of the analysis's fast paths, kept for comparison.

Each function here does one pair or one value at a time, with the plain
per-item functions (one band evaluation per pair, ``judge_time`` on every
value, ``time_band`` per test, ``judge_reading`` on every reading) and none
of the sharing the fast paths use (bands per device class, flags judged once
per analysis, verdicts shared by alike pairs).  ``PATCHES`` says which fast
function each one stands in for; ``tests/rules/test_fast_paths.py`` runs the
whole analysis both ways and compares the results.
"""

from __future__ import annotations

from typing import Any

from model.rules.bands import (
    FAILURE_FLAGS,
    GROUPS,
    NOT_APPLICABLE,
    Band,
    Judgement,
    RampBand,
    group_of,
    judge_ramp,
    judge_reading,
    judge_time,
    numeric_value,
    ramp_band,
    time_band,
    worse,
)
from model.rules.checks.cascade import (
    _RATIO,
    largest_fault_ma,
    measured_margin,
    ratio_below,
    series_pairs,
)
from model.rules.checks.context import Context
from model.rules.checks.pair_verdict import (
    _remedy_texts,
    confirm_note,
    five_x_confirmed_ms,
    pair_verdict,
)
from model.rules.checks.trend import TREND_TESTS, grown_too_much
from model.rules.envelope import DeviceCurve, pair_bands, unsafe_ranges
from model.rules.findings import CurrentRange, PairAnalysis, fmt_ratio
from model.rules.overcurrent.analysis import (
    _band_line,
    _explain,
    _maker_limit,
    _unbanded,
    series_oc_pairs,
)
from model.rules.overcurrent.bands import Band as OcBand
from model.rules.overcurrent.bands import band_of
from model.rules.overcurrent.faults import SiteValues
from model.rules.overcurrent.pairs import (
    OcPair,
    PairInput,
    fmt_a,
    gg_rule_applies,
    judge,
    ranges_of,
    verdict_of,
)
from model.site.models import Reading, TrendSettings, Visit
from model.site.terms import DID_NOT_TRIP
from model.site.tree import SiteIndex

#: Calls made to each reference function (a comparison that never ran them proves nothing).
CALLS: dict[str, int] = {}


def _count(name: str) -> None:
    CALLS[name] = CALLS.get(name, 0) + 1


def analyse_pairs(ctx: Context) -> list[PairAnalysis]:
    """Every series pair of RCDs judged on its own, one band evaluation per pair."""
    _count("analyse_pairs")
    by_id = ctx.index.by_id
    faults = largest_fault_ma(ctx)
    out = []
    for u, d in series_pairs(ctx):
        up, down = by_id[u], by_id[d]
        cu, cd = DeviceCurve.of(up), DeviceCurve.of(down)
        i_max = faults[d]
        ranges = unsafe_ranges(pair_bands([cu], [cd], [i_max]), 0)
        judged, note, confirmed = ranges, "", False
        ms = five_x_confirmed_ms(ctx, down) if ranges else None
        if ms is not None:
            sure = DeviceCurve(cd.idn_ma, cd.delay, cd.delay_ms, cd.max_break_ms, True)
            judged = unsafe_ranges(pair_bands([cu], [sure], [i_max]), 0)
            note, confirmed = confirm_note(down, ms), True
        ratio = float(up.idn_ma) / float(down.idn_ma)
        delayed = str(up.delay) in ("S", "set")
        short = ratio_below(ratio)
        notes = []
        if not delayed:
            notes.append("upstream is not time-delayed")
        if short:
            notes.append(f"IΔn ratio {fmt_ratio(ratio)} is below {_RATIO}")
        margin = measured_margin(ctx, up, down, judged)
        v = pair_verdict(not notes, i_max, ranges, judged, margin, note)
        action = ""
        if v.verdict in ("not-guaranteed", "not-selective"):
            action = _remedy_texts([(cu, cd, i_max, delayed, short, confirmed)])[0]
        out.append(
            PairAnalysis(u, d, ratio, delayed, not notes, tuple(notes), float(i_max),
                         tuple(CurrentRange(lo, hi) for lo, hi in ranges), margin,
                         v.verdict, v.explanation, action)  # type: ignore[arg-type]
        )  # fmt: skip
    return out


def overcurrent_pairs(idx: SiteIndex, values: SiteValues) -> list[OcPair]:
    """Every series pair of overcurrent devices with its own bands and its own judgement row."""
    _count("overcurrent_pairs")

    def label(n: str) -> str:
        return str(idx.by_id[n].label or n)

    rows: list[tuple[str, str, Any, float, Any, tuple[str, ...]]] = []
    inputs: list[PairInput] = []
    for u, d in series_oc_pairs(idx):
        up, down = idx.by_id[u], idx.by_id[d]
        ub, db = band_of(up), band_of(down)
        level = values.at(d)
        i_max = level.ka * 1000.0
        limit = _maker_limit(down, u)
        data: tuple[str, ...] = (
            _band_line("upstream", label(u), ub),
            _band_line("downstream", label(d), db),
            f"largest fault current {fmt_a(i_max)}: {level.note}",
        )
        if limit is not None:
            data += (
                f"maker's selectivity limit {fmt_a(limit[0])} ({limit[1] or 'source not given'})",
            )
        if isinstance(ub, OcBand) and isinstance(db, OcBand):
            gg = ub.name.startswith("gG") and db.name.startswith("gG") and gg_rule_applies(up, down)
            rows.append((u, d, len(inputs), i_max, None, data))
            inputs.append(PairInput(ub, db, i_max, limit[0] if limit else None, gg))
        else:
            rows.append(
                (u, d, None, i_max, _unbanded(u, d, down, ub, db, i_max, limit, data), data)
            )
    judged = judge(inputs) if inputs else None
    out = []
    for u, d, row, i_max, unbanded, data in rows:
        if row is None:
            out.append(unbanded)
            continue
        assert judged is not None
        it = inputs[row]
        ranges = ranges_of(judged, row)
        verdict, sel_to = verdict_of(judged, row, ranges)
        maker = (
            it.up_band.basis == "maker" or it.down_band.basis == "maker" or bool(it.maker_limit_a)
        )
        expl = _explain(it, verdict, sel_to, ranges, bool(judged.staircase_ok[row]))
        out.append(
            OcPair(u, d, verdict, sel_to, float(judged.lo_a[row]), i_max, tuple(ranges),
                   "maker" if maker else "standard", expl, data)
        )  # fmt: skip
    return out


def judge_group(ctx: Context, node: Any, res: Any, g: int, band: Band) -> Judgement | None:
    """Both values of a test group judged with ``judge_time``, whatever they are."""
    _count("judge_group")
    group = GROUPS[g]
    assert band == time_band(node, group, res.waveform, ctx.rules.name, res.test_current)
    v0, v180 = getattr(res, f"{group}_0"), getattr(res, f"{group}_180")
    j = judge_time(band, worse(v0, v180, group))
    if j.flag is None and band.min_ms is not None:
        times = [float(v) for v in (v0, v180) if v is not None and v != DID_NOT_TRIP]
        if times:
            j = judge_time(band, min(times))
    return j if j.flag is not None else None


def judge_ramp_result(ctx: Context, node: Any, res: Any) -> tuple[RampBand, Judgement] | None:
    """Every ramp value judged with ``judge_ramp``."""
    _count("judge_ramp_result")
    rb = ramp_band(node, res.waveform)
    jr = judge_ramp(rb, res.ramp_ma)
    if jr.flag is None or jr.flag == NOT_APPLICABLE:
        return None
    return rb, jr


def grown_tests(
    ctx: Context, dev: str, node: Any, res: Any, earlier: list[Visit], trend: TrendSettings
) -> list[tuple[str, Visit, float, float]]:
    """Each test's band by ``time_band`` and each earlier visit searched afresh."""
    _count("grown_tests")
    grown = []
    for key in TREND_TESTS:
        now = numeric_value(getattr(res, key))
        if now is None:
            continue
        band = time_band(node, group_of(key), res.waveform, ctx.rules.name, res.test_current)
        if not band.applies:
            continue
        for prev_visit in earlier:
            r = prev_visit.readings.get(dev)
            prev = None if r is None else r.results_for(res.waveform)
            if prev is None or prev.test_current != res.test_current:
                continue
            then = numeric_value(getattr(prev, key))
            if then is None:
                continue
            if grown_too_much(then, now, band.min_ms, band.max_ms, trend):
                grown.append((key, prev_visit, then, now))
            break
    return grown


def failing_since(
    ctx: Context, dev: str, node: Any, reading: Reading, earlier: list[Visit]
) -> tuple[Visit, Reading, list[str]] | None:
    """Both readings judged in full with ``judge_reading``."""
    _count("failing_since")
    for v in earlier:
        r = v.readings.get(dev)
        if r is not None and r.not_tested is None and r.has_values():
            now = judge_reading(node, reading, ctx.rules.name)
            keys = [k for k, j in now.items() if j.flag in FAILURE_FLAGS]
            before = judge_reading(node, r, ctx.rules.name)
            if not keys or any(j.flag in FAILURE_FLAGS for j in before.values()):
                return None
            return v, r, keys
    return None


#: (module, name) of each fast function and the reference that stands in for it.
PATCHES: list[tuple[str, str, Any]] = [
    ("model.rules.checks", "analyse_pairs", analyse_pairs),
    ("model.rules.checks.overcurrent", "overcurrent_pairs", overcurrent_pairs),
    ("model.rules.checks.readings", "judge_group", judge_group),
    ("model.rules.checks.readings", "judge_ramp_result", judge_ramp_result),
    ("model.rules.checks.trend", "grown_tests", grown_tests),
    ("model.rules.checks.trend", "failing_since", failing_since),
]
