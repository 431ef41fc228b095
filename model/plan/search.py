"""The remedy planner: device changes that clear findings, fewest devices first.

:func:`make_plan` searches the catalogue (:mod:`model.plan.catalogue`) for a
set of changes that clears the findings a device can clear, re-checking every
candidate with the real checks, and never keeps a change that creates a
finding the site did not have.  A change that would create findings is kept
only with the further changes that clear them again (a *repair*: the RCD
above made type S for selectivity, with the socket circuits that lose their
30 mA protection given their own 30 mA RCBOs); it counts every device it
changes.

The search is greedy: each round takes the move (one change, or one change
with its repairs) that clears the most findings per changed device; ties go
to fewer new devices, then to the lower cost (:data:`model.plan.catalogue.COST`).
Candidates are screened on zones of the site (:mod:`model.plan.evaluate`) and
re-screened lazily, only when they reach the top again.  The plan found is
then made for real on a copy of the site and checked whole; its claims (what
each change clears) come from that full analysis only.

:func:`device_options` lists the catalogue changes of one device, each checked
on the whole site, with what it clears and creates.
"""

from __future__ import annotations

from collections import Counter
from dataclasses import replace

from model.plan.changes import (
    DeviceChange,
    FindingKey,
    Plan,
    Unresolved,
    apply_changes,
    finding_key,
)
from model.plan.evaluate import compare
from model.plan.greedy import Search
from model.plan.words import CUTOUT_REASON, DESIGN_REASONS, LEFT_REASONS, NO_CHANGE_REASON
from model.rules.checks import analyse
from model.rules.findings import Analysis, Finding
from model.site.models import SiteFile
from model.site.ops import InvalidEdit


def make_plan(site: SiteFile, analysis: Analysis | None = None) -> Plan:
    """A set of device changes that clears the findings it can, fewest devices first.

    ``analysis``: the site's analysis where the caller has it (it must be of
    this very ``site``).  The plan's changes are in the order they were
    chosen; each says which findings of ``site`` it clears.  Every finding
    not cleared is in ``remaining`` with the reason in words.
    """
    analysis = analyse(site) if analysis is None else analysis
    search = Search(site, analysis)
    search.run()
    while True:
        after = analyse(apply_changes(site, search.changes)).findings if search.changes else []
        changed = [dc.node for dc in search.changes]
        got = compare(analysis.findings, after, changed, search.replaced())
        if not got.created or not search.chosen:
            break
        search.drop_last_touching(got.created)
    return _claims(search, analysis, got.cleared if search.changes else [])


def _claims(search: Search, analysis: Analysis, cleared: list[Finding]) -> Plan:
    """The plan with each change's claims taken from the full analysis.

    A finding listed twice before (two results of one device) and cleared twice
    is claimed twice; one cleared once of two stays once in ``remaining``.
    """
    times = Counter(finding_key(f) for f in cleared if finding_key(f) in search.targets)
    changes: list[DeviceChange] = []
    claimed: set[FindingKey] = set()
    for mv in search.chosen:
        group = mv.made
        mine = [k for k in search.targets if k in mv.gain and k in times]
        claimed |= set(mine)
        changes.append(replace(group[0], clears=tuple(k for k in mine for _ in range(times[k]))))
        changes.extend(group[1:])
    for k in [k for k in search.targets if k in times and k not in claimed]:
        j = _owner(search, changes, k)
        changes[j] = replace(changes[j], clears=(*changes[j].clears, *[k] * times[k]))
    left = Counter(times)
    remaining: list[Unresolved] = []
    for f in analysis.findings:
        k = finding_key(f)
        if left[k] > 0:
            left[k] -= 1
        else:
            reason = LEFT_REASONS.get(f.rule) or DESIGN_REASONS.get(f.rule, NO_CHANGE_REASON)
            if f.rule == "overcurrent.not-selective" and f.nodes and search.is_cutout(f.nodes[0]):
                reason = CUTOUT_REASON
            remaining.append(Unresolved(f, reason))
    return Plan(changes=changes, remaining=remaining)


def _owner(search: Search, changes: list[DeviceChange], key: FindingKey) -> int:
    """The change a cleared finding belongs to: one naming its nodes, or above or below them."""
    idx = search.index0
    names = set(key[1])
    for j, dc in enumerate(changes):
        if dc.node in names:
            return j
    for j, dc in enumerate(changes):
        around = set(idx.rcd_above.get(dc.node, ())) | set(idx.ocpd_above.get(dc.node, ()))
        around |= set(idx.descendants(dc.node))
        if around & names:
            return j
    return 0


def device_options(
    site: SiteFile, node_id: str, analysis: Analysis | None = None
) -> list[DeviceChange]:
    """The catalogue changes of one device, each checked on the whole site.

    Each change says which findings of ``site`` it clears (``clears``) and
    which it would create (``creates``); the changes that create nothing come
    first, then by findings cleared, new devices and cost.  An unknown node
    raises ``KeyError``; a node that is no device has no options.
    """
    analysis = analyse(site) if analysis is None else analysis
    search = Search(site, analysis)
    if node_id not in search.index0.by_id:
        raise KeyError(node_id)
    rows: list[tuple[tuple[int, int, int, int], DeviceChange]] = []
    for choice in search.choices(node_id):
        dc = search.to_change(choice)
        try:
            after = analyse(apply_changes(site, [dc])).findings
        except (InvalidEdit, ValueError):
            continue
        replaced = [node_id] if choice.action == "replace" else []
        got = compare(analysis.findings, after, [node_id], replaced)
        clears = tuple(k for k in (finding_key(f) for f in got.cleared) if k in search.targets)
        creates = tuple(finding_key(f) for f in got.created)
        dc = replace(dc, clears=clears, creates=creates)
        rank = (bool(creates), -len(clears), int(choice.new_device), choice.cost)
        rows.append((rank, dc))
    rows.sort(key=lambda r: r[0])
    return [dc for _, dc in rows]


__all__ = ["device_options", "make_plan"]
