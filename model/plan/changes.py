"""A planned remedy as data: device changes, and how they are made on a site.

A :class:`DeviceChange` is one line of a remedial plan as an electrician
would quote it ("replace RCCB rc2 (30 mA, Type AC, general) with a 100 mA
Type A type S RCCB"): one device, one or more :class:`FieldChange`, and the
findings the change clears.  :func:`change_ops` turns changes into the site's
own edit ops (:mod:`model.site.ops`), so the same change is made by the plan
command (on a copy), by the app (through the journal, undoable) and by the
tests; :func:`apply_changes` folds them over a site.

A replaced device is a new device: the readings taken of the old one do not
belong to it, so the ops remove the replaced device's readings from the copy
(the original site keeps them), and the new device needs its own tests.

A finding is named across two analyses by :func:`finding_key`: its rule and
the nodes it names (message texts may change with the data; the key does not).
"""

from __future__ import annotations

import json
from collections.abc import Iterable, Sequence
from dataclasses import dataclass, field
from typing import Any

from pydantic import ValidationError

from model.rules.findings import Finding, device_text
from model.site.messages import describe_validation_error
from model.site.models import SiteFile
from model.site.nodes import NODE_CLASSES, Node
from model.site.ops import (
    DeleteNodes,
    InvalidEdit,
    Op,
    SetReading,
    UpsertNode,
    UpsertVisit,
    apply_op,
)
from model.site.terms import RCD_KINDS

#: ``field`` of a :class:`FieldChange` that removes the device (its children move up
#: to its parent); ``before`` is the device's kind, ``after`` is None.
REMOVED = "removed"

#: ``field`` of a :class:`FieldChange` that replaces a device like for like (one that
#: failed its tests): no field of the node changes; ``before`` and ``after`` are its
#: rating in words.  Its readings go with the old device, as for any changed device.
REPLACED = "replaced"

FindingKey = tuple[str, tuple[str, ...]]


def finding_key(f: Finding) -> FindingKey:
    """What names a finding across analyses: its rule and the nodes it names."""
    return (f.rule, f.nodes)


@dataclass(frozen=True, slots=True)
class FieldChange:
    """One field of one device, from one value to another (JSON values; None = absent)."""

    node: str
    field: str
    before: Any
    after: Any

    def as_json(self) -> dict[str, Any]:
        return {"node": self.node, "field": self.field, "from": self.before, "to": self.after}


@dataclass(frozen=True, slots=True)
class DeviceChange:
    """One device changed (or removed), as a line of the remedial plan."""

    node: str
    fields: tuple[FieldChange, ...]
    #: The findings this change clears (keys of findings of the site before the plan).
    clears: tuple[FindingKey, ...] = ()
    #: The change in words: "replace RCCB "Studio RCCB" (30 mA, Type AC, general) with ...".
    text: str = ""
    #: Findings the change would create (keys of findings after it); a plan's changes
    #: create none, the options of one device (``device_options``) may.
    creates: tuple[FindingKey, ...] = ()

    @property
    def removes(self) -> bool:
        return any(fc.field == REMOVED for fc in self.fields)


@dataclass(frozen=True, slots=True)
class Unresolved:
    """A finding the plan leaves, and why no device change clears it."""

    finding: Finding
    reason: str


@dataclass
class Plan:
    """A set of device changes for a site, with what they clear and what remains."""

    changes: list[DeviceChange] = field(default_factory=list)
    remaining: list[Unresolved] = field(default_factory=list)

    def as_json(self) -> dict[str, Any]:
        """The ``plan --json`` form: one entry a field changed, with the findings it clears."""
        from model.rules.findings import CAUTION

        rows: list[dict[str, Any]] = []
        for dc in self.changes:
            clears = [{"rule": r, "nodes": list(n)} for r, n in dc.clears]
            for fc in dc.fields:
                rows.append({**fc.as_json(), "clears": clears, "text": dc.text})
        return {
            "changes": rows,
            "remaining": [{**u.finding.as_json(), "reason": u.reason} for u in self.remaining],
            "caution": PLAN_CAUTION + " " + CAUTION,
        }


#: Said with every plan, in every output, beside the general caution.
PLAN_CAUTION = (
    "A plan supports, and does not replace, a competent person's design to the local "
    "wiring rules: check each change against the installation, the makers' data and "
    "the loads before any work, isolate and prove dead before working, and test every "
    "new or changed device after installation."
)


def change_ops(
    site: SiteFile, changes: Sequence[DeviceChange], *, record: str | None = None
) -> list[Op]:
    """The site's own edit ops that make ``changes`` (in order) on ``site``.

    A field change sets the field on the node (a ``kind`` change makes the node
    a different kind, keeping id, parent, label, way and notes, plus the fields
    given, and only the fields the new kind has); a like-for-like replacement
    (:data:`REPLACED`) changes no field; a removal moves the node's children to its parent and deletes it.
    Readings of a changed residual-current device are removed (they were taken
    of the device that is being replaced).  ``record``: when the change is made
    on the site itself (the time, in words), each visit that held such readings
    keeps them in its notes, as text, with the old device's rating (an
    outstanding failure never leaves the record); without it (a scratch copy,
    the planner's search) they are only removed.  Raises :class:`InvalidEdit` (one
    line, naming the device) for an unknown node or a device the change would
    make invalid; an invalid site is refused by :func:`model.site.ops.apply_op`.
    """
    nodes: dict[str, Node] = {n.id: n for n in site.nodes}
    ops: list[Op] = []
    for dc in changes:
        node = nodes.get(dc.node)
        if node is None:
            raise InvalidEdit(f"cannot change {dc.node}: no such node")
        if dc.removes:
            for child in [n for n in nodes.values() if n.parent == dc.node]:
                moved = type(child).model_validate({**child.model_dump(), "parent": node.parent})
                nodes[child.id] = moved
                ops.append(UpsertNode(node=moved))
            ops.extend(_drop_readings(site, dc.node))
            ops.append(DeleteNodes(ids=[dc.node]))
            del nodes[dc.node]
            continue
        data = node.model_dump(exclude_unset=False)
        for fc in dc.fields:
            if fc.field == REPLACED:
                continue
            if fc.after is None:
                data.pop(fc.field, None)
            else:
                data[fc.field] = fc.after
        if data["kind"] != node.kind:
            keep = NODE_CLASSES[data["kind"]].model_fields
            data = {k: v for k, v in data.items() if k in keep}
        try:
            new = UpsertNode.model_validate({"node": data}).node
        except ValidationError as exc:
            raise InvalidEdit(
                f"cannot change {dc.node}: {describe_validation_error(exc, {'node': data})}"
            ) from None
        nodes[dc.node] = new
        if node.kind in RCD_KINDS:
            ops.extend(_drop_readings(site, dc.node))
        ops.append(UpsertNode(node=new))
    if record is not None:
        ops.extend(_record_ops(site, ops, record))
    return ops


def _notes_max() -> int:
    """How many characters a visit's notes may hold, as the site model says."""
    from model.site.models import Visit

    return int(next(m.max_length for m in Visit.model_fields["notes"].metadata))


def _record_ops(site: SiteFile, ops: Sequence[Op], when: str) -> Iterable[Op]:
    """Each visit whose readings ``ops`` remove, with those readings kept in its notes."""
    gone: dict[str, list[str]] = {}
    for op in ops:
        if isinstance(op, SetReading) and op.reading is None:
            gone.setdefault(op.visit, []).append(op.device)
    old = {n.id: n for n in site.nodes}
    for v in site.visits:
        devices = gone.get(v.id)
        if not devices:
            continue
        lines = []
        for d in devices:
            node = old[d]
            rating = device_text(node) if hasattr(node, "delay") else str(node.kind)
            values = json.dumps(
                v.readings[d].model_dump(mode="json", exclude_defaults=True), ensure_ascii=False
            )
            lines.append(
                f"{when}: {d} ({node.label or d}; {rating}) changed by the plan; "
                f"its readings of this visit, of the earlier device: {values}"
            )
        notes = "\n".join(x for x in (v.notes, *lines) if x)
        if len(notes) > (most := _notes_max()):
            tail = " … (cut to fit the visit's notes)"
            notes = notes[: most - len(tail)] + tail
        readings = {k: r for k, r in v.readings.items() if k not in devices}
        yield UpsertVisit(visit=v.model_copy(update={"notes": notes, "readings": readings}))


def _drop_readings(site: SiteFile, device: str) -> Iterable[Op]:
    for v in site.visits:
        if device in v.readings:
            yield SetReading(visit=v.id, device=device, reading=None)


@dataclass
class FindingDiff:
    """Findings before and after changes, matched by :func:`finding_key`."""

    cleared: list[Finding] = field(default_factory=list)
    created: list[Finding] = field(default_factory=list)
    kept: list[Finding] = field(default_factory=list)
    #: ``reading.missing`` of a changed device: the new device is to be tested after
    #: installation; expected of every change, never counted as a finding it creates.
    to_test: list[Finding] = field(default_factory=list)


def diff_findings(
    before: Iterable[Finding], after: Iterable[Finding], changed: Iterable[str] = ()
) -> FindingDiff:
    """What ``after`` cleared, created and kept of ``before``.

    A key found n times before and m times after keeps min(n, m), clears or
    creates the rest.  ``changed``: the ids of the changed devices, whose new
    ``reading.missing`` findings go to ``to_test``.
    """
    changed_ids = set(changed)
    left: dict[FindingKey, list[Finding]] = {}
    for f in before:
        left.setdefault(finding_key(f), []).append(f)
    out = FindingDiff()
    for f in after:
        same = left.get(finding_key(f))
        if same:
            same.pop(0)
            out.kept.append(f)
        elif f.rule == "reading.missing" and set(f.nodes) <= changed_ids:
            out.to_test.append(f)
        else:
            out.created.append(f)
    for rest in left.values():
        out.cleared.extend(rest)
    return out


def apply_changes(
    site: SiteFile, changes: Sequence[DeviceChange], *, record: str | None = None
) -> SiteFile:
    """The site after ``changes``; ``site`` itself is never changed (``record``: see
    :func:`change_ops`)."""
    out = site
    for op in change_ops(site, changes, record=record):
        out = apply_op(out, op)
    return out


__all__ = [
    "REMOVED",
    "REPLACED",
    "DeviceChange",
    "FieldChange",
    "FindingDiff",
    "FindingKey",
    "Plan",
    "PLAN_CAUTION",
    "Unresolved",
    "apply_changes",
    "change_ops",
    "diff_findings",
    "finding_key",
]
