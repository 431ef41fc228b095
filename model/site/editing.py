"""Changes to the protection tree, and which device to test next, as pure functions.

What a new node starts with, which kinds may be added or moved where, copying a
subtree with fresh ids, and the untested devices of a visit.  These build new
values and node lists; the editing session validates and records them.
"""

from __future__ import annotations

from typing import Any

from model.site.models import SiteFile, Visit
from model.site.nodes import ALLOWED_CHILDREN, NODE_CLASSES
from model.site.terms import RCD_KINDS
from model.site.tree import SiteIndex

#: Starting values for a new node of each kind (the inspector changes them).
NEW_NODE_DEFAULTS: dict[str, dict[str, Any]] = {
    "board": {"label": "Board"},
    "switch": {"label": "Main switch", "rated_a": 100.0},
    "fuse": {"label": "Fuse", "rated_a": 60.0},
    "mcb": {"label": "MCB", "rated_a": 32.0, "curve": "B"},
    "rccb": {"label": "RCCB", "idn_ma": 30.0, "waveform": "A", "rated_a": 63.0},
    "rcbo": {"label": "RCBO", "idn_ma": 30.0, "waveform": "A", "rated_a": 32.0, "curve": "B"},
    "srcd": {"label": "RCD socket", "idn_ma": 30.0, "waveform": "A", "rated_a": 13.0},
    "prcd": {"label": "Portable RCD", "idn_ma": 30.0, "waveform": "A", "rated_a": 13.0},
    "cbr": {"label": "CBR", "idn_ma": 300.0, "waveform": "A", "rated_a": 100.0},
    "rcm": {"label": "RCM", "idn_ma": 30.0, "waveform": "A"},
    "circuit": {"label": "Circuit", "use": "sockets", "rated_a": 32.0},
}


#: The order kinds are offered in when adding a node.
KIND_ORDER = (
    "board",
    "rccb",
    "rcbo",
    "mcb",
    "circuit",
    "switch",
    "fuse",
    "srcd",
    "prcd",
    "cbr",
    "rcm",
)


def unique_id(prefix: str, taken: set[str]) -> str:
    """``prefix1``, ``prefix2`` ... the first not in ``taken``."""
    base = prefix[:36] or "n"
    n = 1
    while f"{base}{n}" in taken:
        n += 1
    return f"{base}{n}"


def child_kinds(parent_kind: str) -> list[str]:
    """Kinds that may be added under a node of this kind, in offer order."""
    allowed = ALLOWED_CHILDREN.get(parent_kind, frozenset())
    return [k for k in KIND_ORDER if k in allowed]


def new_node_values(kind: str, parent: str, site: SiteFile) -> dict[str, Any]:
    """A complete set of starting values for a new node under ``parent``."""
    taken = {n.id for n in site.nodes}
    values: dict[str, Any] = {"id": unique_id(kind, taken), "parent": parent, "kind": kind}
    values.update(NEW_NODE_DEFAULTS.get(kind, {}))
    return values


def subtree_ids(idx: SiteIndex, node_id: str) -> list[str]:
    """The node and everything below it, in tree order."""
    return [node_id, *idx.descendants(node_id)]


def copy_subtree(site: SiteFile, idx: SiteIndex, node_id: str) -> tuple[list[Any], str]:
    """Copies of a node and its subtree, with new unique ids, as a sibling of the original.

    Returns the new node list (the whole site's nodes) and the id of the copy's top.
    """
    taken = {n.id for n in site.nodes}
    new_ids: dict[str, str] = {}
    for old in subtree_ids(idx, node_id):
        base = f"{old[:33]}-c"
        nid = unique_id(base, taken)
        taken.add(nid)
        new_ids[old] = nid
    copies: list[Any] = []
    for old, nid in new_ids.items():
        node = idx.by_id[old]
        data = node.model_dump()
        data["id"] = nid
        if old == node_id:
            if data.get("label"):
                data["label"] = f"{data['label']} (copy)"[:200]
        else:
            data["parent"] = new_ids[node.parent]
        copies.append(NODE_CLASSES[node.kind].model_validate(data))
    return [*site.nodes, *copies], new_ids[node_id]


def move_targets(idx: SiteIndex, node_id: str) -> list[str]:
    """Nodes that could feed ``node_id`` (tree order): not itself, not below it, kind allowed."""
    below = set(subtree_ids(idx, node_id))
    kind = idx.kind(node_id)
    current = idx.parent(node_id)
    return [
        nid
        for nid in idx.order
        if nid not in below and nid != current and kind in ALLOWED_CHILDREN[idx.kind(nid)]
    ]


def moved_node(node: Any, parent: str) -> Any:
    """A copy of ``node`` fed from ``parent`` instead, validated as a node of its kind."""
    return NODE_CLASSES[node.kind].model_validate({**node.model_dump(), "parent": parent})


def is_untested(visit: Visit | None, device_id: str) -> bool:
    """No reading with values and no not-tested reason for this device on the visit."""
    if visit is None:
        return True
    r = visit.readings.get(device_id)
    return r is None or (r.not_tested is None and not r.has_values())


def next_untested(idx: SiteIndex, visit: Visit | None, after: str | None) -> str | None:
    """The next untested residual-current device after ``after`` in tree order (wrapping)."""
    rcds = idx.rcds()
    if not rcds:
        return None
    start = rcds.index(after) + 1 if after in rcds else 0
    for dev in rcds[start:] + rcds[:start]:
        if dev != after and is_untested(visit, dev):
            return dev
    return None


def nearest_pair(idx: SiteIndex, device_id: str) -> tuple[str, str] | None:
    """(upstream, downstream) for a device and its nearest RCD above, else below."""
    if device_id not in idx.by_id:
        return None
    above = idx.rcd_above.get(device_id, ())
    is_rcd = idx.kind(device_id) in RCD_KINDS
    if is_rcd and above:
        return above[0], device_id
    for nid in idx.descendants(device_id):
        if idx.kind(nid) in RCD_KINDS:
            return (device_id, nid) if is_rcd else None
    return None
