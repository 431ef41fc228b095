"""The verdict on a series pair, in words that fit it, and what would close its gap.

* ``selective``: the product-standard bands do not overlap.
* ``selective-in-practice``: they overlap, but readings show a margin (or a
  downstream 5 IΔn test within 40 ms confirms the device where the 0.25 A
  note leaves it unguaranteed, and the bands then clear).
* ``not-guaranteed``: the pair meets the 3:1 and time-delay rule, but the
  bands leave a range unguaranteed: confirm by testing both devices.
* ``not-selective``: the pair fails the rule and the bands overlap.

References
----------
BS 7671 536.4.1.4 (3:1 and time delay; clause text not seen, common practice);
IEC 61008-1 Ed.3 Table 1 and its note on 0.25 A.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache
from typing import Any, Literal

from model.rules.checks.context import Context
from model.rules.envelope import (
    DeviceArrays,
    DeviceCurve,
    all_unsafe_ranges,
    class_pair_bands,
    has_unsafe,
    pair_bands,
)
from model.rules.findings import MeasuredMargin
from model.rules.findings import fmt_ma as _fmt_ma
from model.rules.limits import ALT_5X_CURRENT_A, BREAK_TIMES
from model.site.terms import DID_NOT_TRIP

#: :func:`model.rules.findings.fmt_ma`, remembered: the same few currents (table
#: columns, fault levels) are worded for thousands of pairs.
fmt_ma = lru_cache(maxsize=4096)(_fmt_ma)

#: Maximum break time of a general device at 5 IΔn. [ms]
FIVE_X_MAX_MS = next(p.general_max_ms for p in BREAK_TIMES if p.multiple == 5.0)
#: Upstream ratings tried when saying what would clear a pair's bands: the
#: usual IΔn ratings of RCCBs and RCBOs (IEC 61008-1 preferred values, from
#: memory; 1 A and 3 A from makers' ranges of time-delayed devices).
UPSTREAM_IDN_STEPS_MA = (100.0, 300.0, 500.0, 1000.0, 3000.0)


def five_x_confirmed_ms(ctx: Context, node: Any, curve: DeviceCurve | None = None) -> float | None:
    """The slowest 5 IΔn AC time of the latest visit where it confirms 40 ms, else None.

    Only for a general device of IΔn <= 30 mA (the devices the 0.25 A note
    applies to); every recorded 5 IΔn value must be a trip within 40 ms.
    ``curve``: the device's curve where the caller has it already.
    """
    if ctx.latest is None:
        return None
    r = ctx.latest.readings.get(node.id)
    if r is None or r.not_tested or r.waveform != "AC":
        return None
    vals = [v for v in (r.x5_0, r.x5_180) if v is not None]
    if not vals or DID_NOT_TRIP in vals:
        return None
    if not (curve or DeviceCurve.of(node)).alt_5x:
        return None
    slowest = max(float(v) for v in vals)
    return slowest if slowest <= FIVE_X_MAX_MS else None


@dataclass(frozen=True)
class Verdict:
    verdict: Literal["selective", "selective-in-practice", "not-guaranteed", "not-selective"]
    explanation: str
    #: The ranges still at issue after any site confirmation. [mA]
    judged: list[tuple[float, float]]


def ranges_words(ranges: list[tuple[float, float]]) -> str:
    return ", ".join(f"{fmt_ma(lo)} and {fmt_ma(hi)}" for lo, hi in ranges)


@lru_cache(maxsize=4096)
def selective_verdict(i_max_ma: float) -> Verdict:
    """The verdict on a pair whose bands do not overlap (shared by pairs of one fault level)."""
    return Verdict("selective", "the bands do not overlap anywhere up to " + fmt_ma(i_max_ma), [])


def pair_verdict(
    rule_ok: bool,
    i_max_ma: float,
    ranges: list[tuple[float, float]],
    judged: list[tuple[float, float]],
    margin: MeasuredMargin | None,
    confirm_note: str,
) -> Verdict:
    """The verdict and its explanation (see the module docstring)."""
    if not ranges:
        return selective_verdict(i_max_ma)
    if not judged:
        return Verdict(
            "selective-in-practice",
            confirm_note + "; the bands then do not overlap (an estimate from measurements)",
            [],
        )
    lead = confirm_note + "; " if confirm_note else ""
    if margin is not None and margin.selective:
        return Verdict(
            "selective-in-practice",
            lead + "bands overlap, but the readings show a margin: " + margin.explanation,
            judged,
        )
    if rule_ok:
        expl = f"not guaranteed between {ranges_words(judged)}; "
        if margin is not None and margin.selective is False:
            expl += "the readings show no margin: " + margin.explanation
        else:
            expl += "confirm by testing both devices"
            if margin is not None:
                expl += " (" + margin.explanation + ")"
        return Verdict("not-guaranteed", lead + expl, judged)
    expl = "selectivity not guaranteed from " + ", ".join(
        f"{fmt_ma(lo)} to {fmt_ma(hi)}" for lo, hi in judged
    )
    if margin is not None:
        expl += "; readings: " + margin.explanation
    return Verdict("not-selective", lead + expl, judged)


def confirm_note(down: Any, ms: float) -> str:
    """Why the downstream device's 5 IΔn test closes the gap the 0.25 A note leaves."""
    return _confirm_note(float(down.idn_ma), ms)


@lru_cache(maxsize=1024)
def _confirm_note(idn_ma: float, ms: float) -> str:
    return (
        f"the downstream 5 IΔn test ({ms:g} ms at {fmt_ma(5 * idn_ma)}) confirms "
        f"it within {FIVE_X_MAX_MS:g} ms from there (the standard guarantees that only from "
        f"{fmt_ma(ALT_5X_CURRENT_A * 1000)})"
    )


def open_ranges(
    curves: list[DeviceCurve],
    keys: list[tuple[int, int, float]],
    *,
    down_confirmed: bool = False,
) -> list[list[tuple[float, float]]]:
    """The ranges where selectivity is not guaranteed, for each key. [mA]

    Each key is (upstream curve's index in ``curves``, downstream curve's
    index, largest fault current [mA]).  ``down_confirmed``: read every
    downstream device as confirmed within 40 ms at 5 IΔn by a site test.
    All keys are judged in one numpy pass.
    """
    devices = curves
    offset = 0
    if down_confirmed:
        offset = len(curves)
        devices = curves + [
            DeviceCurve(c.idn_ma, c.delay, c.delay_ms, c.max_break_ms, True) for c in curves
        ]
    bands = class_pair_bands(
        DeviceArrays.build(devices),
        [k[0] for k in keys],
        [k[1] + offset for k in keys],
        [k[2] for k in keys],
    )
    return all_unsafe_ranges(bands)


def remedies(
    rows: list[tuple[DeviceCurve, DeviceCurve, float, bool, bool, bool]],
) -> list[str]:
    """What would close each pair's gap: one sentence per row (see :func:`_remedy_texts`).

    Rows alike in all but the confirmation flag, which the sentence does not
    read, share one sentence, worked out once.
    """
    index: dict[tuple[Any, ...], int] = {}
    alike = [index.setdefault(r[:5], len(index)) for r in rows]
    texts = _remedy_texts([(*key, False) for key in index])
    return [texts[k] for k in alike]


def _remedy_texts(
    rows: list[tuple[DeviceCurve, DeviceCurve, float, bool, bool, bool]],
) -> list[str]:
    """What would close each pair's gap: one sentence per row.

    Each row: (upstream curve, downstream curve, largest fault current [mA],
    upstream delayed, ratio below 3, downstream 5 IΔn already confirmed).
    Suggestions fit the pair: a time delay only where the upstream device
    lacks one, a greater IΔn only where the ratio is short or a larger
    rating is shown to clear the bands, and readings in every case.
    """
    out = [""] * len(rows)
    clears: dict[int, float] = {}
    open_rows = [i for i, r in enumerate(rows) if r[3] and not r[4]]
    for step in UPSTREAM_IDN_STEPS_MA:
        todo = [i for i in open_rows if i not in clears and rows[i][0].idn_ma < step]
        if not todo:
            continue
        ups = []
        for i in todo:
            u = rows[i][0]
            ups.append(DeviceCurve(step, u.delay, u.delay_ms, u.max_break_ms))
        still = has_unsafe(pair_bands(ups, [rows[i][1] for i in todo], [rows[i][2] for i in todo]))
        for k, i in enumerate(todo):
            if not still[k]:
                clears[i] = step
    by_test: set[int] = set()
    testable = [i for i in open_rows if rows[i][1].alt_5x]
    if testable:
        downs = []
        for i in testable:
            d = rows[i][1]
            downs.append(DeviceCurve(d.idn_ma, d.delay, d.delay_ms, d.max_break_ms, True))
        still = has_unsafe(
            pair_bands([rows[i][0] for i in testable], downs, [rows[i][2] for i in testable])
        )
        by_test = {i for k, i in enumerate(testable) if not still[k]}
    for i, (up, down, _imax, delayed, short, _confirmed) in enumerate(rows):
        readings = "or test both devices (AC, at IΔn and 5 IΔn) to show a margin in practice"
        if not delayed and short:
            out[i] = (
                "Use a time-delayed (type S) upstream device of at least three times the "
                f"downstream IΔn, {readings}."
            )
        elif not delayed:
            out[i] = f"Use a time-delayed (type S) upstream device, {readings}."
        elif short:
            out[i] = (
                f"Use an upstream device of at least three times the downstream IΔn, {readings}."
            )
        else:
            parts = []
            if i in by_test:
                parts.append(
                    f"a 5 IΔn test of the downstream device ({fmt_ma(5 * down.idn_ma)}) within "
                    f"{FIVE_X_MAX_MS:g} ms would close the gap"
                )
            if i in clears:
                kind = "type S" if up.delay == "S" else "with the same set delay"
                parts.append(f"an upstream device of {clears[i]:g} mA {kind} would clear the bands")
            lead = "; ".join(parts)
            out[i] = (
                lead[:1].upper() + lead[1:] + "; or test" if lead else "Test"
            ) + " both devices (AC, at IΔn and 5 IΔn) to confirm a margin in practice."
    return out
