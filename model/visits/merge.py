"""Merging two copies of one site that were edited apart (two laptops, one site).

There is no common ancestor: ``base`` ("ours") and ``other`` ("theirs") are
compared directly, so nothing is ever deleted by a merge; a node or visit
present in only one copy is taken from it.

- Nodes are matched by id.  Equal content: kept.  Different content: a
  conflict.  A node in one copy only is added when its parent is in the
  result, and is a conflict otherwise.
- Site information is compared field by field; a field that differs is a
  conflict.
- Visits are matched by id.  Differing metadata (date, inspector, instrument,
  notes) is one conflict for the visit.  Readings of the same visit are
  combined device by device and, within a device, value by value: a value
  recorded in one copy only is taken; the same key recorded differently is a
  conflict.  Two readings of one device taken with different test waveforms,
  or one marked not tested and the other with values, cannot be combined: the
  whole reading is one conflict.

This module is the walk over both copies that settles what it can and records
a :class:`~model.visits.merge_conflicts.Conflict` for the rest.  Nothing is
dropped silently: :meth:`~model.visits.merge_result.MergeResult.accounting`
lists every recorded value of every reading of both inputs with where it went
(into the result, or into a conflict), and
:meth:`~model.visits.merge_result.MergeResult.resolve` applies the user's
choice per conflict and validates the whole site.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

from model.site.models import Reading, SiteFile, Visit, blank
from model.visits.merge_conflicts import Conflict, differences
from model.visits.merge_result import READING_KEYS, MergeResult, Pick, ReadingPlan, VisitPlan

VISIT_META: tuple[str, ...] = ("date", "inspector", "instrument", "notes")

AddConflict = Callable[[Conflict], None]


def _dump(model: Any) -> dict[str, Any]:
    return dict(model.model_dump(mode="json", exclude_defaults=True))


def _reading_json(r: Reading) -> dict[str, Any]:
    d = _dump(r)
    d.setdefault("waveform", r.waveform)
    return d


def _fmt(v: Any) -> str:
    return "(absent)" if v is None else repr(v)


def merge_sites(base: SiteFile, other: SiteFile) -> MergeResult:
    """Merge two diverged copies of one site; ``base`` is "ours", ``other`` "theirs"."""
    res = MergeResult(base=base, other=other)
    _merge_site_info(res, base, other)
    _merge_nodes(res, base, other)
    _merge_visits(res, base, other)
    return res


def _merge_site_info(res: MergeResult, base: SiteFile, other: SiteFile) -> None:
    """Site information, field by field."""
    ours_info = base.site.model_dump(mode="json")
    theirs_info = other.site.model_dump(mode="json")
    for k, a in ours_info.items():
        b = theirs_info.get(k)
        if a == b:
            res.site_plan[k] = Pick(a, b)
        else:
            cid = f"site.{k}"
            res.conflicts.append(Conflict(cid, "site", f"site {k} differs", f"site.{k}", a, b))
            res.site_plan[k] = Pick(a, b, cid)


def _merge_nodes(res: MergeResult, base: SiteFile, other: SiteFile) -> None:
    """Nodes by id: ours in order, then theirs' new ones in order."""
    add = res.conflicts.append
    theirs_nodes = {n.id: n for n in other.nodes}
    ours_ids = {n.id for n in base.nodes}
    for n in base.nodes:
        t = theirs_nodes.get(n.id)
        if t is None or t == n:
            res.node_plan.append((n.id, Pick(_dump(n), _dump(n))))
        else:
            cid = f"node:{n.id}"
            a, b = _dump(n), _dump(t)
            fields = ", ".join(k for k, _, _ in differences(a, b))
            add(
                Conflict(
                    cid, "node", f"node {n.id} edited differently ({fields})", f"nodes {n.id}", a, b
                )
            )
            res.node_plan.append((n.id, Pick(a, b, cid)))
    result_ids = ours_ids | set(theirs_nodes)
    for t in other.nodes:
        if t.id in ours_ids:
            continue
        d = _dump(t)
        if t.parent is not None and t.parent not in result_ids:
            cid = f"node-parent:{t.id}"
            add(
                Conflict(
                    cid,
                    "node-parent",
                    f"node {t.id} (theirs only) is fed by {t.parent!r}, which is in neither copy",
                    f"nodes {t.id}",
                    None,
                    d,
                )
            )
            res.node_plan.append((t.id, Pick(None, d, cid)))
        else:
            res.node_plan.append((t.id, Pick(d, d)))


def _merge_visits(res: MergeResult, base: SiteFile, other: SiteFile) -> None:
    """Visits by id: ours in order, then theirs' new ones in order."""
    add = res.conflicts.append
    theirs_visits = {v.id: v for v in other.visits}
    ours_visit_ids = {v.id for v in base.visits}
    for v in base.visits:
        res.visit_plan.append(_merge_visit(v, theirs_visits.get(v.id), add))
    for tv in other.visits:
        if tv.id not in ours_visit_ids:
            res.visit_plan.append(_merge_visit(tv, None, add))


def _meta(v: Visit) -> dict[str, Any]:
    return {k: getattr(v, k) for k in VISIT_META}


def _merge_visit(ours: Visit, theirs: Visit | None, add: AddConflict) -> VisitPlan:
    if theirs is None:
        plan = VisitPlan(ours.id, Pick(_meta(ours), _meta(ours)))
        for dev, r in ours.readings.items():
            plan.readings[dev] = ReadingPlan(whole=Pick(_dump(r), _dump(r)))
        return plan
    a, b = _meta(ours), _meta(theirs)
    if a == b:
        meta = Pick(a, b)
    else:
        cid = f"visit:{ours.id}"
        names = ", ".join(k for k in VISIT_META if a[k] != b[k])
        add(
            Conflict(
                cid, "visit", f"visit {ours.id} details differ ({names})", f"visits {ours.id}", a, b
            )
        )
        meta = Pick(a, b, cid)
    plan = VisitPlan(ours.id, meta)
    devices = list(ours.readings) + [d for d in theirs.readings if d not in ours.readings]
    for dev in devices:
        ra, rb = ours.readings.get(dev), theirs.readings.get(dev)
        plan.readings[dev] = _merge_reading(ours.id, dev, ra, rb, add)
    return plan


def _merge_reading(
    visit_id: str, dev: str, ra: Reading | None, rb: Reading | None, add: AddConflict
) -> ReadingPlan:
    if ra is None or rb is None:
        r = ra if ra is not None else rb
        assert r is not None
        return ReadingPlan(whole=Pick(_dump(r), _dump(r)))
    if ra == rb:
        return ReadingPlan(whole=Pick(_dump(ra), _dump(ra)))
    where = f"visits {visit_id} readings {dev}"
    if (
        ra.waveform != rb.waveform
        or ra.test_current != rb.test_current
        or ra.further != rb.further
        or (ra.not_tested is None) != (rb.not_tested is None)
    ):
        cid = f"reading:{visit_id}/{dev}"
        if ra.waveform != rb.waveform:
            why = f"test waveform {ra.waveform} / {rb.waveform}"
        elif ra.test_current != rb.test_current:
            why = f"test current {ra.test_current} / {rb.test_current}"
        elif ra.further != rb.further:
            why = "results with further test waveforms differ"
        else:
            why = "not tested in one copy, tested in the other"
        add(
            Conflict(
                cid,
                "reading",
                f"{dev} on visit {visit_id} recorded differently ({why}); the whole reading "
                "must come from one copy",
                where,
                _reading_json(ra),
                _reading_json(rb),
            )
        )
        return ReadingPlan(whole=Pick(_dump(ra), _dump(rb), cid))
    plan = ReadingPlan(waveform=ra.waveform)
    for k in READING_KEYS:
        va, vb = getattr(ra, k), getattr(rb, k)
        if k == "further":  # equal on both sides here (else a whole-reading conflict)
            if va:
                dumped = [_dump(f) for f in va]
                plan.keys[k] = Pick(dumped, dumped)
            continue
        if va == vb or blank(vb):
            plan.keys[k] = Pick(va, va)
        elif blank(va):
            plan.keys[k] = Pick(vb, vb)
        else:
            cid = f"reading:{visit_id}/{dev}/{k}"
            add(
                Conflict(
                    cid,
                    "reading",
                    f"{dev} {k} on visit {visit_id}: {_fmt(va)} / {_fmt(vb)}",
                    f"{where} {k}",
                    va,
                    vb,
                )
            )
            plan.keys[k] = Pick(va, vb, cid)
    return plan
