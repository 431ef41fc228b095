"""An index over a site's protection tree: parents, children, paths, boards.

Built once per analysis in linear time; every check reads from it instead of
walking the node list again.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

from model.site.models import SiteFile
from model.site.terms import OVERCURRENT_KINDS, RCD_KINDS


@dataclass
class SiteIndex:
    """Lookups over one site's nodes.  Node order is tree order (depth first)."""

    site: SiteFile
    by_id: dict[str, Any] = field(default_factory=dict)
    children: dict[str, list[str]] = field(default_factory=dict)
    order: list[str] = field(default_factory=list)
    #: Protective residual-current devices above each node, nearest first (RCMs excluded).
    rcd_above: dict[str, tuple[str, ...]] = field(default_factory=dict)
    #: The nearest board above (or at) each node; the origin where there is none.
    board_of: dict[str, str] = field(default_factory=dict)
    #: Overcurrent devices above each node, nearest first.
    ocpd_above: dict[str, tuple[str, ...]] = field(default_factory=dict)
    _rcds: list[str] = field(default_factory=list)
    _circuits: list[str] = field(default_factory=list)
    _ocpds: list[str] = field(default_factory=list)

    @classmethod
    def build(cls, site: SiteFile) -> SiteIndex:
        idx = cls(site=site)
        idx.by_id = {n.id: n for n in site.nodes}
        idx.children = {n.id: [] for n in site.nodes}
        kids: dict[str, list[Any]] = {}
        root: Any = None
        for n in site.nodes:
            if n.parent is None:
                root = n
            else:
                idx.children[n.parent].append(n.id)
                kids.setdefault(n.parent, []).append(n)
        if root is None:
            return idx
        order, rcd_list, circuit_list, ocpd_list = idx.order, idx._rcds, idx._circuits, idx._ocpds
        rcd_above, ocpd_above, board_of = idx.rcd_above, idx.ocpd_above, idx.board_of
        stack: list[tuple[Any, tuple[str, ...], tuple[str, ...], str]] = [(root, (), (), root.id)]
        while stack:
            node, rcds, ocpds, board = stack.pop()
            nid, kind = node.id, node.kind
            order.append(nid)
            rcd_above[nid] = rcds
            ocpd_above[nid] = ocpds
            if kind in RCD_KINDS:
                rcd_list.append(nid)
                rcds = (nid, *rcds)
            elif kind == "circuit":
                circuit_list.append(nid)
            elif kind == "board":
                board = nid
            board_of[nid] = board
            if kind in OVERCURRENT_KINDS:
                ocpd_list.append(nid)
                ocpds = (nid, *ocpds)
            below = kids.get(nid)
            if below:
                for c in reversed(below):
                    stack.append((c, rcds, ocpds, board))
        return idx

    @property
    def root(self) -> str:
        return self.order[0]

    def node(self, node_id: str) -> Any:
        return self.by_id[node_id]

    def kind(self, node_id: str) -> str:
        return str(self.by_id[node_id].kind)

    def parent(self, node_id: str) -> str | None:
        p = self.by_id[node_id].parent
        return None if p is None else str(p)

    def descendants(self, node_id: str) -> list[str]:
        """Ids below this node in tree order (the node itself excluded)."""
        out: list[str] = []
        stack = list(reversed(self.children.get(node_id, [])))
        while stack:
            nid = stack.pop()
            out.append(nid)
            stack.extend(reversed(self.children[nid]))
        return out

    def rcds(self) -> list[str]:
        """Protective residual-current devices in tree order (do not modify the list)."""
        return self._rcds

    def circuits(self) -> list[str]:
        """Circuits in tree order (do not modify the list)."""
        return self._circuits

    def ocpds(self) -> list[str]:
        """Overcurrent devices in tree order (do not modify the list)."""
        return self._ocpds

    def label(self, node_id: str) -> str:
        """The node's label, or its id where it has none."""
        n = self.by_id[node_id]
        return str(n.label) if n.label else node_id

    def board_label(self, node_id: str) -> str:
        b = self.board_of.get(node_id, self.root)
        return self.label(b)

    def path_text(self, node_id: str) -> str:
        """'Board › device › circuit' from the nearest board down to this node."""
        board = self.board_of.get(node_id, self.root)
        chain = [node_id]
        cur = self.parent(node_id)
        while cur is not None and chain[-1] != board:
            chain.append(cur)
            cur = self.parent(cur)
        return " › ".join(self.label(i) for i in reversed(chain))
