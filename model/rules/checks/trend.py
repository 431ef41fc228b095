"""Trends across visits: a trip time that has grown, a device that passed and now fails."""

from __future__ import annotations

from collections.abc import Iterator
from typing import Any

from model.rules.bands import (
    GROUP_TITLE,
    fmt_value,
    group_of,
    judge_reading,
    numeric_value,
    ramp_band,
    time_band,
)
from model.rules.checks.context import Context
from model.rules.findings import Finding
from model.site.history import visits_before
from model.site.models import Reading, Visit
from model.site.terms import TEST_NAMES, reading_label

#: The tests a device must trip on; a growing trip time there means something.
#: The ½ IΔn tests are left out: the device must not trip there at all.
TREND_TESTS: tuple[str, ...] = tuple(t for t in TEST_NAMES if group_of(t) in ("x1", "x5"))

_SOURCE = (
    "Site trend thresholds (common practice: a trip time that grows markedly between "
    "visits, or a device that passed and now fails, points to a deteriorating mechanism; "
    "the thresholds are this site's own settings, not a published limit)"
)


def check_trend(ctx: Context) -> Iterator[Finding]:
    """``reading.trend``: change since the previous visit, on the latest visit.

    (a) A trip time at one test (same key, e.g. ``x1_180``, and the same test
    waveform) has grown since the latest earlier visit with that test by more
    than ``site.trend.growth_pct`` per cent *and* more than
    ``site.trend.min_ms``.  (b) A device whose reading on the previous visit
    (the latest earlier one with values for it) was within every band now
    has a value outside one.

    References
    ----------
    Growth thresholds: common practice, the site's own settings (no standard
    sets them).  Bands: IEC 61008-1 Ed.3 Table 1 and IΔno = 0.5 IΔn; IEC
    61009-1; BS 7671 Appendix 3 Table 3A (through :func:`model.rules.bands.judge_reading`).
    """
    latest = ctx.latest
    if latest is None:
        return
    earlier = visits_before(ctx.site, latest.id)
    if not earlier:
        return
    trend = ctx.site.site.trend
    idx = ctx.index
    for dev in idx.rcds():
        reading = latest.readings.get(dev)
        if reading is None or reading.not_tested is not None:
            continue
        node = idx.by_id[dev]
        yield from _growth(ctx, dev, node, reading, latest, earlier, trend.growth_pct, trend.min_ms)
        yield from _newly_failing(ctx, dev, node, reading, latest, earlier)


def _when(v: Visit) -> str:
    """A visit's date, with its id where that differs."""
    return v.date if v.id == v.date else f"{v.date}, visit {v.id}"


def _growth(
    ctx: Context,
    dev: str,
    node: Any,
    reading: Reading,
    latest: Visit,
    earlier: list[Visit],
    growth_pct: float,
    min_ms: float,
) -> Iterator[Finding]:
    grown: list[tuple[str, Visit, float, float]] = []
    for key in TREND_TESTS:
        now = numeric_value(getattr(reading, key))
        if now is None:
            continue
        for prev_visit in earlier:
            prev = prev_visit.readings.get(dev)
            if prev is None or prev.waveform != reading.waveform:
                continue
            then = numeric_value(getattr(prev, key))
            if then is None:
                continue
            grown_ms = now - then
            if 100.0 * grown_ms / then > growth_pct and grown_ms > min_ms:
                grown.append((key, prev_visit, then, now))
            break  # only the latest earlier visit with this test counts
    if not grown:
        return
    items = [
        f"{reading_label(key)} {then:g} ms ({_when(pv)}) → {now:g} ms, +{now - then:g} ms "
        f"(+{100.0 * (now - then) / then:.0f} %)"
        for key, pv, then, now in grown
    ]
    bands = sorted(
        {
            f"{GROUP_TITLE[group_of(k)]} "
            + time_band(node, group_of(k), reading.waveform, ctx.rules.name).text
            for k, _, _, _ in grown
        }
    )
    yield Finding(
        rule="reading.trend",
        severity="investigate",
        nodes=(dev,),
        board=ctx.index.board_of[dev],
        message=(
            f"{ctx.index.label(dev)}: trip time grown since the previous visit "
            f"({reading.waveform} test current; now {_when(latest)}): "
            + "; ".join(items)
            + f". The site flags growth over {growth_pct:g} % and over {min_ms:g} ms "
            f"(bands: {', '.join(bands)})."
        ),
        action="Re-test; a device that is slowing down may be failing. Consider replacing it "
        "before it falls outside its band.",
        source=_SOURCE,
        basis="common-practice",
        measured="; ".join(
            f"{reading_label(k)}: {then:g} ms ({pv.date}) → {now:g} ms ({latest.date})"
            for k, pv, then, now in grown
        ),
        band=f"growth over {growth_pct:g} % and over {min_ms:g} ms is flagged (site setting)",
        visit=latest.id,
    )


def _newly_failing(
    ctx: Context, dev: str, node: Any, reading: Reading, latest: Visit, earlier: list[Visit]
) -> Iterator[Finding]:
    prev_visit: Visit | None = None
    prev: Reading | None = None
    for v in earlier:
        r = v.readings.get(dev)
        if r is not None and r.not_tested is None and r.has_values():
            prev_visit, prev = v, r
            break
    if prev is None or prev_visit is None:
        return
    rules = ctx.rules.name
    now = judge_reading(node, reading, rules)
    failing = [(k, j) for k, j in now.items() if j.flag is not None]
    if not failing:
        return
    before = judge_reading(node, prev, rules)
    if any(j.flag for j in before.values()):
        return
    label = ctx.index.label(dev)
    keys = [k for k, _ in failing]
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
        return "button: must trip"
    if key == "ramp_ma":
        return f"ramp: {ramp_band(node, reading.waveform).text}"
    return f"{reading_label(key)}: {time_band(node, group_of(key), reading.waveform, ctx.rules.name).text}"
