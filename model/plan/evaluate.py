"""Re-checking a site with changes: changes made, zones cut, findings compared.

The planner tries many single changes.  On a large site it first screens each
one on a *zone* of the site: the part of the tree a change can reach (the
subtree of the device's highest ancestor with at most :data:`ZONE_MAX` nodes
below it, plus the chain of devices up to the origin), re-checked with the
real :func:`model.rules.checks.analyse`.  Screening only chooses what to try;
every plan is then verified by a full analysis of the whole site, and the
plan's claims come from that analysis alone (:mod:`model.plan.search`).

Findings are compared by :func:`compare`: as :func:`model.plan.changes.diff_findings`,
and a finding that lists fewer nodes after a change (same rule, same first
node, the nodes a subset of a finding before) is *narrowed*: it is neither
cleared nor new (a list of pairs under one device, where one pair is settled).
"""

from __future__ import annotations

from collections.abc import Iterable, Sequence
from collections.abc import Set as AbstractSet
from dataclasses import dataclass, field
from typing import Any

from model.plan.catalogue import Choice
from model.plan.changes import (
    REMOVED,
    REPLACED,
    DeviceChange,
    FieldChange,
    change_ops,
    diff_findings,
    finding_key,
)
from model.rules.checks import analyse
from model.rules.findings import SEVERITY_RANK, Finding, device_text
from model.site.models import SiteFile
from model.site.ops import DeleteNodes, SetReading, UpsertNode
from model.site.tree import SiteIndex

#: Rules that compare a measured value with a limit set by a device's rating: a change
#: that alters what one of them says (RA × IΔn 60 V to 100 V) makes it worse or better,
#: and is never taken as harmless.
LIMIT_RULES = frozenset(
    {
        "earthing.tt-ra",
        "earthing.zs-limit",
        "leakage.over-30pct",
        "disconnection.zs-too-high",
        "breaking-capacity.too-low",
    }
)

#: Rules whose finding a like-for-like replacement may raise only because the new
#: device is not yet tested (the pair's margin was shown by the old one's readings).
UNTESTED_RULES = frozenset({"cascade.band-overlap"})

#: Largest subtree a zone is grown to (nodes); a site no larger is screened whole.
ZONE_MAX = 30


@dataclass
class Compared:
    """Findings cleared and created by changes (narrowed findings are in neither)."""

    cleared: list[Finding] = field(default_factory=list)
    created: list[Finding] = field(default_factory=list)


def compare(
    before: Iterable[Finding],
    after: Iterable[Finding],
    changed: Iterable[str],
    replaced: Iterable[str] = (),
) -> Compared:
    """What ``after`` cleared and created of ``before`` (narrowed findings are neither).

    A changed device's ``reading.missing`` is a test to make after installation,
    never a created finding (:func:`model.plan.changes.diff_findings`).  A
    finding kept but made worse counts as created: a worse severity, or, for a
    measured limit (:data:`LIMIT_RULES`), any change in what it says.
    ``replaced``: devices replaced like for like; a pair of one of them whose
    selectivity rested on the old device's readings is, until the new one is
    tested, "not guaranteed" (:data:`UNTESTED_RULES`, investigate): a test to
    make after installation, not a finding the change creates.
    """
    before = list(before)
    new_ones = set(replaced)
    d = diff_findings(before, after, changed)
    cleared = list(d.cleared)
    created: list[Finding] = []
    for f in d.created:
        wider = next(
            (
                g
                for g in cleared
                if g.rule == f.rule and g.nodes[:1] == f.nodes[:1] and set(f.nodes) <= set(g.nodes)
            ),
            None,
        )
        if wider is not None:
            cleared.remove(wider)
        elif not (
            f.rule in UNTESTED_RULES and f.severity == "investigate" and set(f.nodes) & new_ones
        ):
            created.append(f)
    was: dict[tuple[str, tuple[str, ...]], list[Finding]] = {}
    for g in before:
        was.setdefault(finding_key(g), []).append(g)
    for f in d.kept:
        same = was[finding_key(f)]
        g = same.pop(0) if same else f
        worse = SEVERITY_RANK[f.severity] < SEVERITY_RANK[g.severity]
        if worse or (f.rule in LIMIT_RULES and f.message != g.message):
            created.append(f)
    return Compared(cleared, created)


def device_change(node: Any, choice: Choice, text: str) -> DeviceChange:
    """The :class:`DeviceChange` of one catalogue choice on ``node``."""
    if choice.action == "remove":
        fields: tuple[FieldChange, ...] = (FieldChange(node.id, REMOVED, node.kind, None),)
    elif choice.action == "replace":
        rating = device_text(node)
        fields = (FieldChange(node.id, REPLACED, rating, rating),)
    else:
        fields = tuple(
            FieldChange(node.id, name, getattr(node, name, None), value)
            for name, value in choice.values
        )
    return DeviceChange(node=node.id, fields=fields, text=text)


def fast_apply(site: SiteFile, changes: Sequence[DeviceChange]) -> SiteFile:
    """``changes`` made on a copy of ``site`` for screening.

    The same edit ops as :func:`model.plan.changes.apply_changes` (each new node
    validated), without re-validating the whole site at each op; a plan is
    always made for real by ``apply_changes`` before it is offered.
    """
    nodes = {n.id: n for n in site.nodes}
    drop: set[str] = set()
    for op in change_ops(site, changes):
        if isinstance(op, UpsertNode):
            nodes[op.node.id] = op.node
        elif isinstance(op, DeleteNodes):
            for i in op.ids:
                nodes.pop(i, None)
                drop.add(i)
        elif isinstance(op, SetReading) and op.reading is None:
            drop.add(op.device)
    visits = [
        v
        if not drop & v.readings.keys()
        else v.model_copy(
            update={"readings": {k: r for k, r in v.readings.items() if k not in drop}}
        )
        for v in site.visits
    ]
    return site.model_copy(update={"nodes": list(nodes.values()), "visits": visits})


def zone_root(index: SiteIndex, node_id: str, sizes: dict[str, int]) -> str:
    """The highest ancestor of ``node_id`` (or itself) with at most ZONE_MAX nodes below."""
    cur = node_id
    while True:
        up = index.parent(cur)
        if up is None or sizes[up] > ZONE_MAX:
            return cur
        cur = up


def subtree_sizes(index: SiteIndex) -> dict[str, int]:
    """Nodes in each node's subtree (itself included)."""
    sizes = {n: 1 for n in index.order}
    for n in reversed(index.order):
        p = index.parent(n)
        if p is not None:
            sizes[p] += sizes[n]
    return sizes


def zone_nodes(index: SiteIndex, root: str) -> set[str]:
    """A zone: the subtree of ``root`` and the chain of nodes above it."""
    keep = {root, *index.descendants(root)}
    cur = index.parent(root)
    while cur is not None:
        keep.add(cur)
        cur = index.parent(cur)
    return keep


def restrict(site: SiteFile, keep: AbstractSet[str]) -> SiteFile:
    """The part of ``site`` made of the nodes in ``keep`` (and their readings)."""
    nodes = [n for n in site.nodes if n.id in keep]
    visits = [
        v.model_copy(update={"readings": {k: r for k, r in v.readings.items() if k in keep}})
        for v in site.visits
    ]
    return site.model_copy(update={"nodes": nodes, "visits": visits})


def findings_of(site: SiteFile) -> list[Finding]:
    return analyse(site).findings


__all__ = [
    "Compared",
    "ZONE_MAX",
    "compare",
    "device_change",
    "fast_apply",
    "findings_of",
    "restrict",
    "subtree_sizes",
    "zone_nodes",
    "zone_root",
]
