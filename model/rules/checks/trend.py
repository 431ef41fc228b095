"""Trends across visits: a trip time that has grown, a device that passed and now fails."""

from __future__ import annotations

from collections.abc import Iterator
from typing import Any

from model.rules.bands import (
    GROUP_TITLE,
    GROUPS,
    Band,
    fmt_value,
    group_of,
    judge_reading,
    numeric_value,
    ramp_band,
    time_band,
)
from model.rules.checks.context import Context
from model.rules.findings import Finding
from model.rules.flags import failing_keys
from model.site.models import Reading, TrendSettings, Visit
from model.site.terms import TEST_NAMES, reading_label

#: The tests a device must trip on; a growing trip time there means something.
#: The ½ IΔn tests are left out: the device must not trip there at all.
TREND_TESTS: tuple[str, ...] = tuple(t for t in TEST_NAMES if group_of(t) in ("x1", "x5"))
_GROUP_INDEX: dict[str, int] = {t: GROUPS.index(group_of(t)) for t in TREND_TESTS}

_SOURCE = (
    "Site trend thresholds (common practice: a trip time that grows markedly between "
    "visits, or a device that passed and now fails, points to a deteriorating mechanism; "
    "the thresholds are this site's own settings, not a published limit)"
)


def check_trend(ctx: Context) -> Iterator[Finding]:
    """``reading.trend``: change since the previous visit, on the latest visit.

    (a) A trip time at one test (same key, e.g. ``x1_180``, the same test
    waveform and test current) has grown since the latest earlier visit with
    that test by more than ``site.trend.min_ms``, and, judged against the
    test's band, either by more than ``limit_share_pct`` of the band's maximum
    time or into the top ``top_pct`` of the band (from its minimum, or 0 ms,
    to its maximum) from below it.  Where the band has no maximum, or both
    band settings are empty, the relative rule applies instead: more than
    ``growth_pct`` per cent and more than ``min_ms``.  (b) A device whose
    reading on the previous visit (the latest earlier one with values for it)
    was within every band now has a value outside one.

    References
    ----------
    Growth thresholds: common practice, the site's own settings (no standard
    sets them).  Bands: IEC 61008-1 Ed.3 Table 1 and IΔno = 0.5 IΔn; IEC
    61009-1; BS 7671 Appendix 3 Table 3A (through :func:`model.rules.bands.judge_reading`).
    """
    latest = ctx.latest
    if latest is None:
        return
    earlier = ctx.earlier_visits()
    if not earlier:
        return
    trend = ctx.site.site.trend
    idx = ctx.index
    for dev in idx.rcds():
        reading = latest.readings.get(dev)
        if reading is None or reading.not_tested is not None:
            continue
        node = idx.by_id[dev]
        for res in reading.result_sets():
            yield from _growth(ctx, dev, node, res, latest, earlier, trend)
        yield from _newly_failing(ctx, dev, node, reading, latest, earlier)


def _when(v: Visit) -> str:
    """A visit's date, with its id where that differs."""
    return v.date if v.id == v.date else f"{v.date}, visit {v.id}"


def grown_too_much(
    then: float, now: float, band_min: float | None, band_max: float | None, trend: TrendSettings
) -> bool:
    """True when a trip time's growth from ``then`` to ``now`` [ms] is worth flagging.

    References
    ----------
    Common practice (site settings, no published limit); the band from IEC
    61008-1 Ed.3 Table 1.
    """
    rise = now - then
    if rise <= trend.min_ms:
        return False
    if band_max is None or not trend.band_rule():
        return 100.0 * rise / then > trend.growth_pct
    if trend.limit_share_pct is not None and rise > trend.limit_share_pct / 100.0 * band_max:
        return True
    if trend.top_pct is not None:
        low = band_min or 0.0
        edge = band_max - trend.top_pct / 100.0 * (band_max - low)
        return now > edge >= then
    return False


def rule_text(trend: TrendSettings) -> str:
    """The site's growth rule in words, for findings and reports."""
    parts = []
    if trend.limit_share_pct is not None:
        parts.append(f"a rise over {trend.limit_share_pct:g} % of the band's maximum")
    if trend.top_pct is not None:
        parts.append(f"a rise into the top {trend.top_pct:g} % of the band")
    relative = f"growth over {trend.growth_pct:g} % and over {trend.min_ms:g} ms"
    if not parts:
        return f"{relative} is flagged (site setting)"
    return (
        f"{' or '.join(parts)}, by over {trend.min_ms:g} ms, is flagged; with no maximum, "
        f"{relative} (site setting)"
    )


def grown_tests(
    ctx: Context, dev: str, node: Any, res: Any, earlier: list[Visit], trend: TrendSettings
) -> list[tuple[str, Visit, float, float]]:
    """(test, earlier visit, then [ms], now [ms]) of each test of one set of results whose
    trip time has grown too much since the latest earlier visit with that test."""
    grown: list[tuple[str, Visit, float, float]] = []
    wf = res.waveform
    values = res.__dict__
    tc = values["test_current"]
    bands: tuple[Band, ...] | None = None
    #: earlier results with this test waveform and test current, most recent first
    prevs: list[tuple[Visit, dict[str, Any]]] | None = None
    for key in TREND_TESTS:
        now = numeric_value(values[key])
        if now is None:
            continue
        if bands is None:
            bands = ctx.judged(node, res)[0]
        band = bands[_GROUP_INDEX[key]]
        if not band.applies:
            continue
        if prevs is None:
            prevs = []
            for prev_visit in earlier:
                r = prev_visit.readings.get(dev)
                prev = None if r is None else r.results_for(wf)
                if prev is not None and prev.test_current == tc:
                    prevs.append((prev_visit, prev.__dict__))
        for prev_visit, prev_values in prevs:
            then = numeric_value(prev_values[key])
            if then is None:
                continue
            if grown_too_much(then, now, band.min_ms, band.max_ms, trend):
                grown.append((key, prev_visit, then, now))
            break  # only the latest earlier visit with this test counts
    return grown


def _growth(
    ctx: Context,
    dev: str,
    node: Any,
    res: Any,
    latest: Visit,
    earlier: list[Visit],
    trend: TrendSettings,
) -> Iterator[Finding]:
    grown = grown_tests(ctx, dev, node, res, earlier, trend)
    if not grown:
        return
    wf = res.waveform
    items = [
        f"{reading_label(key)} {then:g} ms ({_when(pv)}) → {now:g} ms, +{now - then:g} ms "
        f"(+{100.0 * (now - then) / then:.0f} %)"
        for key, pv, then, now in grown
    ]
    band_texts = sorted(
        {
            f"{GROUP_TITLE[group_of(k)]} "
            + time_band(node, group_of(k), wf, ctx.rules.name, res.test_current).text
            for k, _, _, _ in grown
        }
    )
    rule = rule_text(trend)
    yield Finding(
        rule="reading.trend",
        severity="investigate",
        nodes=(dev,),
        board=ctx.index.board_of[dev],
        message=(
            f"{ctx.index.label(dev)}: trip time grown since the previous visit "
            f"({wf} test current; now {_when(latest)}): "
            + "; ".join(items)
            + f". The site flags {rule.removesuffix(' (site setting)')} "
            f"(bands: {', '.join(band_texts)})."
        ),
        action="Re-test; a device that is slowing down may be failing. Consider replacing it "
        "before it falls outside its band.",
        source=_SOURCE,
        basis="common-practice",
        measured="; ".join(
            f"{reading_label(k)}: {then:g} ms ({pv.date}) → {now:g} ms ({latest.date})"
            for k, pv, then, now in grown
        ),
        band=rule,
        visit=latest.id,
    )


def failing_since(
    ctx: Context, dev: str, node: Any, reading: Reading, earlier: list[Visit]
) -> tuple[Visit, Reading, list[str]] | None:
    """(previous visit, its reading, the keys now failing) where a device within every
    band on the previous visit with values now fails one; else None."""
    keys = failing_keys(ctx.value_flags(node, reading), reading.button)
    if not keys:
        return None  # nothing fails now: no earlier reading need be looked at
    for v in earlier:
        r = v.readings.get(dev)
        if r is not None and r.not_tested is None and r.has_values():
            if failing_keys(ctx.value_flags(node, r), r.button):
                return None
            return v, r, keys
    return None


def _newly_failing(
    ctx: Context, dev: str, node: Any, reading: Reading, latest: Visit, earlier: list[Visit]
) -> Iterator[Finding]:
    found = failing_since(ctx, dev, node, reading, earlier)
    if found is None:
        return
    prev_visit, prev, keys = found
    now = judge_reading(node, reading, ctx.rules.name)  # the words, for the failing values
    failing = [(k, now[k]) for k in keys]
    label = ctx.index.label(dev)
    then_vals = ", ".join(f"{reading_label(k)} {fmt_value(k, getattr(prev, k))}" for k in keys)
    now_vals = ", ".join(f"{reading_label(k)} {fmt_value(k, getattr(reading, k))}" for k in keys)
    yield Finding(
        rule="reading.trend",
        severity="investigate",
        nodes=(dev,),
        board=ctx.index.board_of[dev],
        message=(
            f"{label} was within its bands on {_when(prev_visit)} ({then_vals}) "
            f"and now fails ({_when(latest)}: " + "; ".join(j.text for _, j in failing) + ")."
        ),
        action="Re-test to confirm; a device that has begun to fail should be replaced. "
        "The reading finding for this visit gives the band it misses.",
        source=_SOURCE + "; bands: IEC 61008-1 Ed.3 Table 1, IEC 61009-1",
        basis="common-practice",
        measured=f"{prev_visit.date}: {then_vals} → {latest.date}: {now_vals}",
        band="; ".join(_band_text(ctx, node, reading, k) for k in keys),
        visit=latest.id,
    )


def _band_text(ctx: Context, node: Any, reading: Reading, key: str) -> str:
    if key == "button":
        return f"{reading_label(key)}: must trip"
    if key == "ramp_ma":
        return f"{reading_label(key)}: {ramp_band(node, reading.waveform).text}"
    return f"{reading_label(key)}: {time_band(node, group_of(key), reading.waveform, ctx.rules.name).text}"
