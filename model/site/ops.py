"""Edits of a site as data: the ops, and :func:`apply_op`, which makes each one.

Each edit is one small pydantic model (an *op*) with a JSON form, so the same
edit can be made on the site in memory and written as one line of the
recovery journal (:mod:`model.storage.journal`)::

    {"op": "set-reading", "visit": "2026-11-14", "device": "rc1", "reading": {"x1_0": 22.0}}
    {"op": "upsert-node", "node": {"id": "c9", "parent": "m3", "kind": "circuit", …}}
    {"op": "delete-nodes", "ids": ["m3", "c9"]}
    {"op": "set-site-info", "info": {…}}
    {"op": "upsert-visit", "visit": {…}}
    {"op": "rename-node", "old": "rcbo1-c1", "new": "kitchen-ring"}
    {"op": "replace-site", "site": {…whole site file…}}

:func:`apply_op` is the pure function that turns a site and an op into the
next site, validating the result; live edits and replay on open use the same
function, so a journal replays to exactly what the editor showed.
"""

from __future__ import annotations

import json
from typing import Annotated, Any, Literal

from pydantic import BaseModel, ConfigDict, Field, TypeAdapter, ValidationError

from model.site.messages import describe_validation_error, one_line
from model.site.models import Reading, SiteFile, SiteInfo, Visit, site_to_dict
from model.site.nodes import Node
from model.site.terms import RCD_KINDS, NodeId


class InvalidEdit(ValueError):
    """An edit that would make the site invalid; nothing was changed.  ``str()`` is one line."""

    def __init__(self, message: str) -> None:
        super().__init__(one_line(message))


_OP_CONFIG = ConfigDict(extra="forbid", strict=True)


class SetReading(BaseModel):
    """Set (or, with ``reading`` null, remove) one device's reading on one visit."""

    model_config = _OP_CONFIG
    op: Literal["set-reading"] = "set-reading"
    visit: NodeId = Field(description="Visit id.")
    device: NodeId = Field(description="Residual-current device id.")
    reading: Reading | None = Field(default=None, description="The reading; null removes it.")


class UpsertNode(BaseModel):
    """Add a node, or replace the node with the same id (keeping its place in the list)."""

    model_config = _OP_CONFIG
    op: Literal["upsert-node"] = "upsert-node"
    node: Node = Field(description="The node.")


class DeleteNodes(BaseModel):
    """Remove nodes (and their readings on every visit)."""

    model_config = _OP_CONFIG
    op: Literal["delete-nodes"] = "delete-nodes"
    ids: list[NodeId] = Field(min_length=1, description="Ids of the nodes to remove.")


class SetSiteInfo(BaseModel):
    """Replace the site's details."""

    model_config = _OP_CONFIG
    op: Literal["set-site-info"] = "set-site-info"
    info: SiteInfo = Field(description="The new details.")


class UpsertVisit(BaseModel):
    """Add a visit, or replace the visit with the same id (readings included)."""

    model_config = _OP_CONFIG
    op: Literal["upsert-visit"] = "upsert-visit"
    visit: Visit = Field(description="The visit.")


class RenameNode(BaseModel):
    """Give a node a new id: its children's parent and every visit's reading follow it."""

    model_config = _OP_CONFIG
    op: Literal["rename-node"] = "rename-node"
    old: NodeId = Field(description="The node's id now.")
    new: NodeId = Field(description="The id it is to have.")


class ReplaceSite(BaseModel):
    """Replace the whole site (moves, copies, undo: any other edit)."""

    model_config = _OP_CONFIG
    op: Literal["replace-site"] = "replace-site"
    site: SiteFile = Field(description="The whole new site.")


Op = Annotated[
    SetReading | UpsertNode | DeleteNodes | SetSiteInfo | UpsertVisit | RenameNode | ReplaceSite,
    Field(discriminator="op"),
]
_OP_ADAPTER: TypeAdapter[Op] = TypeAdapter(Op)


def op_to_dict(op: Op) -> dict[str, Any]:
    """The JSON-ready form of an op (defaults left out, like the site file)."""
    if isinstance(op, SetReading):
        reading = None if op.reading is None else op.reading.model_dump(exclude_defaults=True)
        return {"op": op.op, "visit": op.visit, "device": op.device, "reading": reading}
    if isinstance(op, ReplaceSite):
        return {"op": op.op, "site": site_to_dict(op.site)}
    return op.model_dump(mode="json", exclude_defaults=True) | {"op": op.op}


def op_from_dict(data: Any) -> Op:
    """Validate an op read from a journal line (``ValidationError`` when it is not one)."""
    return _OP_ADAPTER.validate_python(data)


def validated_op(op: Op) -> Op:
    """The op re-read from its JSON form: checks models that were built without validation."""
    try:
        return op_from_dict(json.loads(json.dumps(op_to_dict(op))))
    except ValidationError as exc:
        raise InvalidEdit(describe_validation_error(exc, op_to_dict(op))) from None
    except (TypeError, ValueError) as exc:
        raise InvalidEdit(f"not a valid edit: {exc}") from None


def describe_op(op: Op) -> str:
    """One plain line saying what an op did ("reading for rc1 on visit 2026-11-14")."""
    if isinstance(op, SetReading):
        if op.reading is None:
            return f"removal of the reading for {op.device} on visit {op.visit}"
        return f"reading for {op.device} on visit {op.visit}"
    if isinstance(op, UpsertNode):
        return f"{op.node.kind} {op.node.id}"
    if isinstance(op, DeleteNodes):
        shown = ", ".join(op.ids[:5]) + (f" and {len(op.ids) - 5} more" if len(op.ids) > 5 else "")
        return f"deletion of {shown}"
    if isinstance(op, SetSiteInfo):
        return "site details"
    if isinstance(op, UpsertVisit):
        return f"visit {op.visit.id}"
    if isinstance(op, RenameNode):
        return f"renaming of {op.old} to {op.new}"
    return "whole-site edit"


def _revalidate(site: SiteFile, **changes: Any) -> SiteFile:
    """A new site with ``changes``, checked as a whole (the parts are already valid models)."""
    doc: dict[str, Any] = {
        "format": site.format,
        "version": site.version,
        "site": site.site,
        "nodes": site.nodes,
        "visits": site.visits,
    }
    doc.update(changes)
    try:
        return SiteFile.model_validate(doc)
    except ValidationError as exc:
        raise InvalidEdit(describe_validation_error(exc, site_to_dict(site))) from None


def apply_op(site: SiteFile, op: Op) -> SiteFile:
    """The site after ``op``; ``site`` itself is never changed.

    Raises :class:`InvalidEdit` (a ``ValueError``) with a one-line message
    when the result would not be a valid site.
    """
    if isinstance(op, SetReading):
        return _set_reading(site, op)
    if isinstance(op, UpsertNode):
        nodes = list(site.nodes)
        for i, n in enumerate(nodes):
            if n.id == op.node.id:
                nodes[i] = op.node
                break
        else:
            nodes.append(op.node)
        return _revalidate(site, nodes=nodes)
    if isinstance(op, DeleteNodes):
        return _delete_nodes(site, op)
    if isinstance(op, SetSiteInfo):
        return site.model_copy(update={"site": op.info})
    if isinstance(op, UpsertVisit):
        visits = list(site.visits)
        for i, v in enumerate(visits):
            if v.id == op.visit.id:
                visits[i] = op.visit
                break
        else:
            visits.append(op.visit)
        return _revalidate(site, visits=visits)
    if isinstance(op, RenameNode):
        return _rename_node(site, op)
    return op.site


def _rename_node(site: SiteFile, op: RenameNode) -> SiteFile:
    """The node under its new id, with its children and every reading of it following."""
    known = {n.id for n in site.nodes}
    if op.old not in known:
        raise InvalidEdit(f"cannot rename {op.old}: no such node")
    if op.new != op.old and op.new in known:
        raise InvalidEdit(f"cannot rename {op.old} to {op.new}: {op.new} is already used")
    if op.new == op.old:
        return site
    nodes = [
        n.model_copy(update={"id": op.new})
        if n.id == op.old
        else n.model_copy(update={"parent": op.new})
        if n.parent == op.old
        else n
        for n in site.nodes
    ]
    visits = [
        v
        if op.old not in v.readings
        else v.model_copy(
            update={"readings": {(op.new if k == op.old else k): r for k, r in v.readings.items()}}
        )
        for v in site.visits
    ]
    return _revalidate(site, nodes=nodes, visits=visits)


def _delete_nodes(site: SiteFile, op: DeleteNodes) -> SiteFile:
    """The nodes removed with their readings; refused when a child would be left behind."""
    gone = set(op.ids)
    known = {n.id for n in site.nodes}
    missing = [i for i in op.ids if i not in known]
    if missing:
        raise InvalidEdit(f"cannot delete {', '.join(missing[:5])}: no such node")
    nodes = [n for n in site.nodes if n.id not in gone]
    orphans = [n.id for n in nodes if n.parent in gone]
    if orphans:
        raise InvalidEdit(
            f"cannot delete {', '.join(sorted(gone & {n.parent for n in nodes if n.parent}))}: "
            f"{', '.join(orphans[:5])} would be left without a parent (delete them too, "
            "or move them first)"
        )
    visits = [
        v
        if not gone & v.readings.keys()
        else v.model_copy(
            update={"readings": {k: r for k, r in v.readings.items() if k not in gone}}
        )
        for v in site.visits
    ]
    return _revalidate(site, nodes=nodes, visits=visits)


def _set_reading(site: SiteFile, op: SetReading) -> SiteFile:
    """Fast path: only what a reading can break is checked (visit and device exist, device is an RCD)."""
    vi = next((i for i, v in enumerate(site.visits) if v.id == op.visit), -1)
    if vi < 0:
        raise InvalidEdit(f"no visit {op.visit!r} in this site")
    visit = site.visits[vi]
    if op.reading is not None:
        for n in site.nodes:
            if n.id == op.device:
                if n.kind not in RCD_KINDS:
                    raise InvalidEdit(
                        f"{op.device} is a {n.kind}; readings are for residual-current devices"
                    )
                break
        else:
            raise InvalidEdit(f"no device {op.device!r} in this site")
    readings = dict(visit.readings)
    if op.reading is None:
        if op.device not in readings:
            return site
        del readings[op.device]
    else:
        readings[op.device] = op.reading
    visits = list(site.visits)
    visits[vi] = visit.model_copy(update={"readings": readings})
    return site.model_copy(update={"visits": visits})
