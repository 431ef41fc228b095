"""The protection tree: every node with its key rating and a mark for its worst finding."""

from __future__ import annotations

from rich.cells import cell_len
from rich.text import Text
from textual.binding import Binding
from textual.widgets import Tree
from textual.widgets.tree import TreeNode

from model.site.tree import SiteIndex
from tui.format import NO_MARK, SEVERITY_MARK, node_summary, node_title
from tui.themes import tone


class SiteTree(Tree[str]):
    """A tree whose node data is the site node id."""

    BINDINGS = [
        Binding("a", "app.add_node", "Add"),
        Binding("e,enter", "app.edit_node", "Edit"),
        Binding("m", "app.move_node", "Move"),
        Binding("c", "app.copy_node", "Copy"),
        Binding("d,delete", "app.delete_node", "Delete"),
        Binding("r", "app.readings", "Readings"),
        Binding("i", "app.impact", "Impact"),
        Binding("p", "app.pair", "Pair"),
        Binding("w", "app.what_if", "What if", tooltip="try a change of this device on a copy"),
    ]

    def __init__(self, *, id: str | None = None) -> None:
        super().__init__("site", id=id)
        self.show_root = True
        self.guide_depth = 2
        self._by_id: dict[str, TreeNode[str]] = {}
        self._worst: dict[str, str] = {}
        self._index: SiteIndex | None = None

    def node_label(self, idx: SiteIndex, node_id: str) -> Text:
        node = idx.by_id[node_id]
        mark, style = SEVERITY_MARK.get(self._worst.get(node_id, ""), NO_MARK)
        style = tone(style)
        text = Text(no_wrap=True, overflow="ellipsis")
        text.append(mark, style=style)
        text.append(" ")
        way = getattr(node, "way", "")
        if way:  # the board's way, as numbered on site
            text.append(f"[{way}] ", style=tone("bold $tw-value"))
        text.append(node_title(node), style="bold" if node.kind in ("board", "origin") else "")
        text.append("  ")
        text.append(node_summary(node), style=tone("$tw-muted"))
        return text

    def get_label_width(self, node: TreeNode[str]) -> int:
        """Width of a line's label, without rendering it (the tree asks for every line)."""
        prefix = cell_len(self.ICON_NODE_EXPANDED) if node.allow_expand else 0
        return prefix + node.label.cell_len

    def rebuild(self, idx: SiteIndex, worst: dict[str, str], keep: str | None = None) -> None:
        """Show the whole tree again (after a change of structure), keeping the cursor."""
        self._index = idx
        self._worst = dict(worst)
        self.clear()
        self._by_id.clear()
        if not idx.order:
            return
        root_id = idx.root
        self.root.set_label(self.node_label(idx, root_id))
        self.root.data = root_id
        self._by_id[root_id] = self.root
        stack = [(root_id, self.root)]
        while stack:
            nid, tnode = stack.pop()
            for child in idx.children[nid]:
                if idx.children[child]:
                    t = tnode.add(self.node_label(idx, child), data=child, expand=True)
                else:
                    t = tnode.add_leaf(self.node_label(idx, child), data=child)
                self._by_id[child] = t
                stack.append((child, t))
        self.root.expand()
        if keep is not None:
            self.select_id(keep)

    def set_worst(self, worst: dict[str, str]) -> None:
        """Update the marks after a new analysis (labels only, no rebuild)."""
        if self._index is None:
            return
        changed = {k for k in set(worst) | set(self._worst) if worst.get(k) != self._worst.get(k)}
        self._worst = dict(worst)
        for nid in changed:
            t = self._by_id.get(nid)
            if t is not None and nid in self._index.by_id:
                t.set_label(self.node_label(self._index, nid))

    def selected_id(self) -> str | None:
        node = self.cursor_node
        return None if node is None else node.data

    def select_id(self, node_id: str) -> bool:
        """Move the cursor to a node (opening its parents)."""
        t = self._by_id.get(node_id)
        if t is None:
            return False
        p = t.parent
        while p is not None:
            p.expand()
            p = p.parent
        _ = self._tree_lines  # lay out the lines so the node knows its line
        self.move_cursor(t)
        return True
