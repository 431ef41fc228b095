"""Every check of a site, run by :func:`analyse`.

Each check is a pure function ``(Context) -> Iterable[Finding]`` listed in
:data:`CHECKS`.  To add a rule: write the function in the module of its area,
cite its source in the docstring, add it to ``CHECKS``, and give it a firing
case and a near miss in ``tests/model``.
"""

from __future__ import annotations

import dataclasses
import gc
from collections.abc import Callable, Iterable

from model.rules.checks.additional import check_additional_protection
from model.rules.checks.cascade import analyse_pairs, check_cascade
from model.rules.checks.context import Context
from model.rules.checks.coverage import (
    check_ac_unsuitable,
    check_dc_load,
    check_leakage,
    check_lighting,
    check_no_overcurrent,
)
from model.rules.checks.earthing import check_earthing
from model.rules.checks.ev import check_ev
from model.rules.checks.overcurrent import check_overcurrent
from model.rules.checks.readings import check_readings
from model.rules.checks.trend import check_trend
from model.rules.findings import Analysis, Finding
from model.rules.limits import IEC_INSTALLATION_SOURCES
from model.site.models import SiteFile
from model.site.tree import SiteIndex

Check = Callable[[Context], Iterable[Finding]]

CHECKS: list[Check] = [
    check_cascade,
    check_ac_unsuitable,
    check_dc_load,
    check_additional_protection,
    check_ev,
    check_no_overcurrent,
    check_earthing,
    check_leakage,
    check_lighting,
    check_readings,
    check_trend,
    check_overcurrent,
]


def analyse(site: SiteFile, index: SiteIndex | None = None) -> Analysis:
    """Run every check on a site; findings worst first, then by board.

    ``index``: the site's tree index where the caller has already built it
    (it must be built from this very ``site``); otherwise it is built here.
    Either way it is the one index of the analysis (``Analysis.index``).

    The cyclic garbage collector is paused for the run: the analysis builds
    many small acyclic objects, and on large sites repeated full collections
    over the loaded site would make the time grow faster than the site.
    """
    paused = gc.isenabled()
    gc.disable()
    try:
        ctx = Context.build(site, index)
        ctx.pairs = analyse_pairs(ctx)
        findings: list[Finding] = []
        for check in CHECKS:
            findings.extend(check(ctx))
        if ctx.rules.name == "iec-60364":
            findings = [_iec_source(f) for f in findings]
        findings.sort(key=Finding.sort_key)
        return Analysis(
            rules=site.site.rules,
            findings=findings,
            pairs=ctx.pairs,
            index=ctx.index,
            oc_pairs=ctx.oc.pairs if ctx.oc is not None else [],
            oc=ctx.oc,
        )
    finally:
        if paused:
            gc.enable()


def _iec_source(f: Finding) -> Finding:
    """The finding with the IEC 60364 source of its installation rule, where one is known.

    A clause quoted from memory is guidance: a finding resting on it alone is
    advice (advisory), never required or urgent.
    """
    src = IEC_INSTALLATION_SOURCES.get(f.rule)
    if src is None:
        return f
    if f.rule == "earthing.ra-unstable" or "from memory" in src:
        severity = "advisory" if f.severity in ("urgent", "required") else f.severity
        return dataclasses.replace(f, source=src, basis="guidance", severity=severity)
    return dataclasses.replace(f, source=src)


__all__ = ["analyse", "CHECKS", "Context"]
