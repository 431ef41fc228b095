"""Re-judging one device after one of its readings changed, from the analysis before.

A reading bears on a small part of the checks: the device's own reading
findings (its bands, outstanding failures, the required test), its trend
across visits, and the selectivity of every series pair it is in (the
measured margin and the 5 IΔn confirmation read the readings).  Nothing else
in :func:`model.rules.checks.analyse` reads residual-current readings, so the
rest of the analysis before still holds.  :func:`rejudge_reading` runs those
parts again, with the very checks the full analysis runs, and keeps the rest:
its result equals a full analysis of the new site (a test holds it to that on
the sample sites and on generated ones).

It is used where the answer is needed at once (the app, after each value); a
full analysis may still follow and replace it.
"""

from __future__ import annotations

import dataclasses
from bisect import insort

from model.rules.checks import _iec_source
from model.rules.checks.cascade import analyse_pairs, check_cascade
from model.rules.checks.context import Context
from model.rules.checks.readings import check_readings
from model.rules.checks.trend import check_trend
from model.rules.findings import Analysis, Finding
from model.rules.limits import rule_set
from model.site.models import SiteFile, Visit
from model.site.terms import RCD_KINDS
from model.site.tree import SiteIndex

#: Rule ids of the pair finding that rests on readings (the other pair rules read ratings only).
_PAIR_RULE = "cascade.band-overlap"
#: Every rule id of the reading and trend checks starts so (and no other check's does).
_READING_RULES = "reading."


def rejudge_reading(site: SiteFile, before: Analysis, device_id: str) -> Analysis | None:
    """The analysis of ``site``, where ``before`` is the analysis of the site as it was
    before the readings of ``device_id`` changed, and nothing else changed.

    Returns None when that cannot be shown cheaply (another part of the site changed,
    ``before`` has no index, the device is not a residual-current device): the
    caller then runs the full analysis.  Pure: neither argument is changed.
    """
    old_index = before.index
    if old_index is None or not _only_readings_of(old_index.site, site, device_id):
        return None
    node = old_index.by_id.get(device_id)
    if node is None or node.kind not in RCD_KINDS:
        return None
    # the same nodes, so the same tree: the index carries over to the new site
    index = dataclasses.replace(old_index, site=site)
    rules = rule_set(site.site.rules)
    latest = site.latest_visit()

    # the device's own reading and trend findings: the checks run on this device alone
    alone = Context(site, dataclasses.replace(index, _rcds=[device_id]), rules, latest)
    fresh: list[Finding] = [*check_readings(alone), *check_trend(alone)]

    # the pairs it is in: the pair checks run on the devices in series with it
    ups = index.rcd_above[device_id]
    top = ups[-1] if ups else device_id
    in_series = {device_id, *ups}
    in_series.update(
        d
        for d in index.descendants(device_id)
        if index.by_id[d].kind in RCD_KINDS and device_id in index.rcd_above[d]
    )
    pair_ctx = Context(site, _with_rcds_only(index, top, in_series), rules, latest)
    new_pairs = {(p.up, p.down): p for p in analyse_pairs(pair_ctx) if device_id in (p.up, p.down)}
    pair_ctx.pairs = list(new_pairs.values())
    fresh.extend(f for f in check_cascade(pair_ctx) if f.rule == _PAIR_RULE)
    if rules.name == "iec-60364":
        fresh = [_iec_source(f) for f in fresh]

    own = (device_id,)
    kept = [
        f
        for f in before.findings
        if not (f.nodes == own and f.rule.startswith(_READING_RULES))
        and not (f.rule == _PAIR_RULE and f.nodes in new_pairs)
    ]
    # ``kept`` is in order already; no fresh finding has the key of a kept one (both
    # rule and nodes differ), so placing each after its equals keeps the full order
    for f in fresh:
        insort(kept, f, key=Finding.sort_key)
    return Analysis(
        rules=site.site.rules,
        findings=kept,
        pairs=[new_pairs.get((p.up, p.down), p) for p in before.pairs],
        caution=before.caution,
        oc_pairs=before.oc_pairs,
        oc=before.oc,
        index=index,
    )


def _only_readings_of(old: SiteFile, new: SiteFile, device_id: str) -> bool:
    """True when ``new`` differs from ``old`` at most in the readings of one device.

    The editing session shares what an edit leaves alone, so the nodes and the
    site's details are the very same objects; the visits are compared field by
    field.
    """
    if old is new:
        return True
    if old.nodes is not new.nodes or old.site is not new.site:
        return False
    if _fields_except(old, "visits") != _fields_except(new, "visits"):
        return False
    if len(old.visits) != len(new.visits):
        return False
    return all(
        _same_visit_but(a, b, device_id) for a, b in zip(old.visits, new.visits, strict=True)
    )


def _same_visit_but(a: Visit, b: Visit, device_id: str) -> bool:
    if a is b:
        return True
    if _fields_except(a, "readings") != _fields_except(b, "readings"):
        return False
    ra, rb = dict(a.readings), dict(b.readings)
    ra.pop(device_id, None)
    rb.pop(device_id, None)
    return ra == rb  # the session keeps the other readings: the same objects, compared at once


def _fields_except(model: object, name: str) -> dict[str, object]:
    return {k: v for k, v in vars(model).items() if k != name}


def _with_rcds_only(index: SiteIndex, top: str, keep: set[str]) -> SiteIndex:
    """The index as if only the devices in ``keep`` were residual-current devices.

    Every device in ``keep`` is ``top`` or below it, so only the nodes below ``top``
    can have one of them above; the others have none (and need no entry).
    """
    below = [top, *index.descendants(top)]
    above = _NoneAbove({n: tuple(r for r in index.rcd_above[n] if r in keep) for n in below})
    return dataclasses.replace(
        index,
        rcd_above=above,
        _rcds=[r for r in below if r in keep],
        _circuits=[c for c in below if index.by_id[c].kind == "circuit"],
    )


class _NoneAbove(dict[str, tuple[str, ...]]):
    """Devices above each node; a node not listed has none."""

    def __missing__(self, key: str) -> tuple[str, ...]:
        return ()


__all__ = ["rejudge_reading"]
