"""Checks of the readings taken on the latest visit, and failures still outstanding."""

from __future__ import annotations

from collections.abc import Iterator
from typing import Any

from model.rules.bands import (
    FAILURE_FLAGS,
    GROUP_TITLE,
    GROUPS,
    NOT_APPLICABLE,
    Band,
    Judgement,
    RampBand,
    fmt_result,
    judge_ramp,
    judge_time,
    ramp_band,
    worse,
)
from model.rules.checks.context import Context
from model.rules.findings import Finding, Severity
from model.rules.flags import GROUP_KEYS, time_flag
from model.rules.waveforms import WAVEFORM_TYPE_SOURCE, waveform_applies
from model.site.models import Reading, Visit
from model.site.terms import DID_NOT_TRIP

_SEVERITY: dict[str, Severity] = {
    "reading.no-trip": "urgent",
    "reading.too-slow": "required",
    "reading.too-fast": "required",
    "reading.half-tripped": "investigate",
    # A failed test button is common practice, not a limit of the standard the
    # installation is verified to: advice (README, severity).
    "reading.button-failed": "advisory",
    "reading.missing": "investigate",
    NOT_APPLICABLE: "investigate",
}

_ACTION = {
    "reading.no-trip": "Make the circuits safe and replace the device; re-test before use.",
    "reading.too-slow": "Re-test; if confirmed, replace the device.",
    "reading.too-fast": "Check the device is the delayed type recorded; replace if the delay "
    "has failed (selectivity is lost).",
    "reading.half-tripped": "Measure standing leakage with the circuits disconnected in turn; "
    "replace the device if it still trips at ½ IΔn.",
    "reading.button-failed": "Re-test with the instrument; replace the device if its integral "
    "test mechanism has failed (the user can no longer check it).",
}

#: The required test (BS 7671 643.7.1 note): an AC test at IΔn.
REQUIRED_WAVEFORM = "AC"


def check_readings(ctx: Context) -> Iterator[Finding]:
    """``reading.*``: every recorded value outside its published band, on the latest visit,
    and every failure of an earlier visit that no later test has cleared.

    For each test multiple and test waveform the worse of the 0° and 180°
    results is judged ('did not trip' being worst; for a too-fast check, the
    faster time).  A result taken with a waveform that is not a specified test
    of the device's type is reported as such and never judged; only an AC
    result at IΔn satisfies the required test.

    References
    ----------
    IEC 61008-1 Ed.3 Table 1 and IΔno = 0.5 IΔn; IEC 61009-1; BS 7671
    Appendix 3 Table 3A and 643.7.1 (note: one AC test at IΔn); Type A
    half-wave 0.35–1.4 IΔn and break times at 1.4/2.8/7 IΔn (IEC 61008-1);
    IEC 62423; BS 7671 531.3.3 (test waveform against device type).
    """
    idx = ctx.index
    visit = ctx.latest
    for dev in idx.rcds():
        node = idx.by_id[dev]
        board = idx.board_of[dev]
        reading = visit.readings.get(dev) if visit is not None else None
        now: list[Finding] = []
        if reading is None:
            where = f"on visit {visit.date}" if visit is not None else "(no visit recorded yet)"
            now.append(
                Finding(
                    rule="reading.missing",
                    severity="investigate",
                    nodes=(dev,),
                    board=board,
                    message=f"{idx.label(dev)} has no readings and no not-tested reason {where}.",
                    action="Test the device, or record why it was not tested.",
                    source=ctx.rules.test_source,
                    visit=None if visit is None else visit.id,
                )
            )
        elif reading.not_tested is None:
            assert visit is not None
            now.extend(reading_findings(ctx, dev, node, reading, visit.id))
        yield from now
        if visit is not None and not clears(node, reading, ctx.rules.name):
            yield from _outstanding(ctx, dev, node, visit, {f.rule for f in now})


def clears(node: Any, reading: Reading | None, rules: str) -> bool:
    """True when a reading is a test that can clear an earlier failure: it records
    values and the required AC test at IΔn (of a device for which that test applies)."""
    if reading is None or reading.not_tested is not None or not reading.has_values():
        return False
    ac = reading.results_for(REQUIRED_WAVEFORM)
    return ac is not None and (ac.x1_0 is not None or ac.x1_180 is not None)


def _outstanding(
    ctx: Context, dev: str, node: Any, latest: Visit, already: set[str]
) -> Iterator[Finding]:
    """The failures of the latest earlier reading with values, still on the record.

    References
    ----------
    Common practice: a failure stays outstanding until a later test shows the
    device (or its replacement) passing.
    """
    for v in ctx.earlier_visits():
        r = v.readings.get(dev)
        if r is None or r.not_tested is not None or not r.has_values():
            continue
        when = v.date if v.id == v.date else f"{v.date}, visit {v.id}"
        for f in reading_findings(ctx, dev, node, r, v.id):
            if f.rule in FAILURE_FLAGS and f.rule not in already:
                yield Finding(
                    rule=f.rule,
                    severity=f.severity,
                    nodes=f.nodes,
                    board=f.board,
                    message=f"Still outstanding (seen on {when}; not re-tested since): "
                    + f.message,
                    action=f.action + " The failure stays on the record until a later "
                    "test shows the device passing.",
                    source=f.source,
                    basis=f.basis,
                    measured=f.measured,
                    band=f.band,
                    visit=v.id,
                )
        return


def reading_findings(
    ctx: Context, dev: str, node: Any, reading: Reading, visit_id: str
) -> Iterator[Finding]:
    """Every finding on one device's reading of one visit (all its test waveforms)."""
    board = ctx.index.board_of[dev]
    label = ctx.index.label(dev)
    required_seen = False
    for res in reading.result_sets():
        wf = res.waveform
        if not waveform_applies(str(node.waveform), wf):
            yield Finding(
                rule=NOT_APPLICABLE,
                severity="investigate",
                nodes=(dev,),
                board=board,
                message=f"{label}: results taken with {wf} test current, which is not a "
                f"specified test for a Type {node.waveform} device; they are not judged and "
                "do not count as the required test.",
                action=f"Check the device type and the instrument setting; test with a "
                f"current the Type {node.waveform} device is specified for.",
                source=WAVEFORM_TYPE_SOURCE,
                measured=f"{wf} test current",
                band=f"Type {node.waveform}: not specified for {wf}",
                visit=visit_id,
            )
            continue
        title = "" if wf == REQUIRED_WAVEFORM else f" {wf}"
        values = res.__dict__
        bands = ctx.judged(node, res)[0]
        for g, (band, (group, k0, k180)) in enumerate(zip(bands, GROUP_KEYS, strict=True)):
            v0, v180 = values[k0], values[k180]
            if v0 is None and v180 is None:
                continue
            if band.required:
                required_seen = True
            j = judge_group(ctx, node, res, g, band)
            if j is None or j.flag is None:
                continue  # within its band
            flag = j.flag
            both = f"0°: {fmt_result(v0)}, 180°: {fmt_result(v180)}"
            yield Finding(
                rule=flag,
                severity=_SEVERITY[flag],
                nodes=(dev,),
                board=board,
                message=f"{label}: {GROUP_TITLE[group]}{title} test {j.text} ({both}).",
                action=_ACTION[flag],
                source=band.source,
                basis=band.basis,
                measured=both,
                band=band.text,
                visit=visit_id,
            )
        yield from _ramp(ctx, dev, node, res, visit_id)
    if not required_seen and any(g in ctx.rules.required_tests for g in GROUPS):
        others = [r.waveform for r in reading.result_sets() if r.waveform != REQUIRED_WAVEFORM]
        extra = (
            f" (results with {', '.join(others)} test current do not satisfy it)" if others else ""
        )
        yield Finding(
            rule="reading.missing",
            severity="investigate",
            nodes=(dev,),
            board=board,
            message=f"{label}: the required 1 × IΔn AC test is not recorded{extra}.",
            action="Carry out and record the 1 × IΔn test with sinusoidal (AC) test current.",
            source=ctx.rules.test_source,
            visit=visit_id,
        )
    if reading.button == "failed":
        yield Finding(
            rule="reading.button-failed",
            severity=_SEVERITY["reading.button-failed"],
            nodes=(dev,),
            board=board,
            message=f"{label}: the integral test button did not trip the device.",
            action=_ACTION["reading.button-failed"],
            source="IEC 61008-1 / IEC 61009-1 (the device carries a test device); that it "
            "must work at each inspection is common practice",
            basis="common-practice",
            measured="failed",
            band="must trip",
            visit=visit_id,
        )


def judge_group(ctx: Context, node: Any, res: Any, g: int, band: Band) -> Judgement | None:
    """The judgement of test group ``g`` (index in ``GROUPS``) of one set of results
    against its band, where one of its values is flagged; else None (no words built).

    The worse of the 0° and 180° results is judged; a too-fast check is made on
    the faster of the two.
    """
    flags = ctx.value_flags(node, res)
    if flags[2 * g] is None and flags[2 * g + 1] is None:
        return None  # neither value is flagged: neither is the worse of the two
    group, k0, k180 = GROUP_KEYS[g]
    values = res.__dict__
    v0, v180 = values[k0], values[k180]
    judged = worse(v0, v180, group)
    flag = time_flag(band, judged)
    if flag is None and band.min_ms is not None:
        times = [float(v) for v in (v0, v180) if v is not None and v != DID_NOT_TRIP]
        if times:
            judged = min(times)
            flag = time_flag(band, judged)
    return None if flag is None else judge_time(band, judged)


def judge_ramp_result(ctx: Context, node: Any, res: Any) -> tuple[RampBand, Judgement] | None:
    """The band and judgement of a ramp result outside its band; else None."""
    flag = ctx.value_flags(node, res)[-1]  # the ramp value's flag
    if flag is None or flag == NOT_APPLICABLE:
        return None  # within its band (or not recorded, or not judged)
    rb = ramp_band(node, res.waveform)
    return rb, judge_ramp(rb, res.ramp_ma)


def _ramp(ctx: Context, dev: str, node: Any, res: Any, visit_id: str) -> Iterator[Finding]:
    judged = judge_ramp_result(ctx, node, res)
    if judged is None:
        return
    rb, jr = judged
    assert jr.flag is not None
    label = ctx.index.label(dev)
    high = res.ramp_ma is not None and res.ramp_ma > rb.high_ma
    wf = "" if res.waveform == REQUIRED_WAVEFORM else f" ({res.waveform})"
    yield Finding(
        rule=jr.flag,
        severity="required" if high else "investigate",
        nodes=(dev,),
        board=ctx.index.board_of[dev],
        message=f"{label}: ramp test{wf} trip current {jr.text} "
        + ("(less sensitive than rated)." if high else "(over-sensitive, or standing leakage)."),
        action="Re-test; replace the device if it trips above IΔn."
        if high
        else "Check standing leakage on the circuits below, then re-test.",
        source=rb.source,
        basis=rb.basis,
        measured=f"{res.ramp_ma:g} mA",
        band=rb.text,
        visit=visit_id,
    )
