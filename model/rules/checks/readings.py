"""Checks of the readings taken on the latest visit."""

from __future__ import annotations

from collections.abc import Iterator
from typing import Any

from model.rules.bands import (
    GROUP_TITLE,
    GROUPS,
    fmt_result,
    judge_ramp,
    judge_time,
    ramp_band,
    time_band,
    worse,
)
from model.rules.checks.context import Context
from model.rules.findings import Finding, Severity
from model.site.terms import DID_NOT_TRIP

_SEVERITY: dict[str, Severity] = {
    "reading.no-trip": "urgent",
    "reading.too-slow": "required",
    "reading.too-fast": "required",
    "reading.half-tripped": "investigate",
    "reading.button-failed": "required",
    "reading.missing": "investigate",
}

_ACTION = {
    "reading.no-trip": "Make the circuits safe and replace the device; re-test before use.",
    "reading.too-slow": "Re-test; if confirmed, replace the device.",
    "reading.too-fast": "Check the device is the delayed type recorded; replace if the delay "
    "has failed (selectivity is lost).",
    "reading.half-tripped": "Measure standing leakage with the circuits disconnected in turn; "
    "replace the device if it still trips at ½ IΔn.",
    "reading.button-failed": "Replace the device; the integral test mechanism has failed.",
}


def check_readings(ctx: Context) -> Iterator[Finding]:
    """``reading.*``: every recorded value outside its published band, on the latest visit.

    For each test multiple the worse of the 0° and 180° results is judged
    ('did not trip' being worst; for a too-fast check, the faster time).

    References
    ----------
    IEC 61008-1 Ed.3 Table 1 and IΔno = 0.5 IΔn; IEC 61009-1; BS 7671
    Appendix 3 Table 3A and 643.7.1; Type A half-wave 0.35–1.4 IΔn.
    """
    idx = ctx.index
    visit = ctx.latest
    for dev in idx.rcds():
        node = idx.by_id[dev]
        board = idx.board_of[dev]
        reading = visit.readings.get(dev) if visit is not None else None
        if reading is None:
            where = f"on visit {visit.date}" if visit is not None else "(no visit recorded yet)"
            yield Finding(
                rule="reading.missing",
                severity="investigate",
                nodes=(dev,),
                board=board,
                message=f"{idx.label(dev)} has no readings and no not-tested reason {where}.",
                action="Test the device, or record why it was not tested.",
                source=ctx.rules.test_source,
                visit=None if visit is None else visit.id,
            )
            continue
        if reading.not_tested is not None:
            continue
        assert visit is not None
        yield from _reading_findings(ctx, dev, node, reading, board, visit.id)


def _reading_findings(
    ctx: Context, dev: str, node: Any, reading: Any, board: str, visit_id: str
) -> Iterator[Finding]:
    label = ctx.index.label(dev)
    missing_required: list[str] = []
    for group in GROUPS:
        band = time_band(node, group, reading.waveform, ctx.rules.name)
        v0, v180 = getattr(reading, f"{group}_0"), getattr(reading, f"{group}_180")
        if v0 is None and v180 is None:
            if band.required:
                missing_required.append(GROUP_TITLE[group])
            continue
        both = f"0°: {fmt_result(v0)}, 180°: {fmt_result(v180)}"
        w = worse(v0, v180, group)
        j = judge_time(band, w)
        if j.flag is None and band.min_ms is not None:
            # too fast is judged on the faster of the two
            times = [float(v) for v in (v0, v180) if v is not None and v != DID_NOT_TRIP]
            if times:
                j = judge_time(band, min(times))
        if j.flag is None:
            continue
        yield Finding(
            rule=j.flag,
            severity=_SEVERITY[j.flag],
            nodes=(dev,),
            board=board,
            message=f"{label}: {GROUP_TITLE[group]} test {j.text} ({both}).",
            action=_ACTION[j.flag],
            source=band.source,
            basis=band.basis,
            measured=both,
            band=band.text,
            visit=visit_id,
        )
    if missing_required:
        yield Finding(
            rule="reading.missing",
            severity="investigate",
            nodes=(dev,),
            board=board,
            message=f"{label}: the required {', '.join(missing_required)} test is not recorded.",
            action="Carry out and record the required test.",
            source=ctx.rules.test_source,
            visit=visit_id,
        )
    rb = ramp_band(node, reading.waveform)
    jr = judge_ramp(rb, reading.ramp_ma)
    if jr.flag is not None:
        high = reading.ramp_ma is not None and reading.ramp_ma > rb.high_ma
        yield Finding(
            rule=jr.flag,
            severity="required" if high else "investigate",
            nodes=(dev,),
            board=board,
            message=f"{label}: ramp test trip current {jr.text} "
            + (
                "(less sensitive than rated)." if high else "(over-sensitive, or standing leakage)."
            ),
            action="Re-test; replace the device if it trips above IΔn."
            if high
            else "Check standing leakage on the circuits below, then re-test.",
            source=rb.source,
            basis=rb.basis,
            measured=f"{reading.ramp_ma:g} mA",
            band=rb.text,
            visit=visit_id,
        )
    if reading.button == "failed":
        yield Finding(
            rule="reading.button-failed",
            severity="required",
            nodes=(dev,),
            board=board,
            message=f"{label}: the integral test button did not trip the device.",
            action=_ACTION["reading.button-failed"],
            source="IEC 61008-1 / IEC 61009-1 (test device); common practice",
            basis="common-practice",
            measured="failed",
            band="must trip",
            visit=visit_id,
        )
