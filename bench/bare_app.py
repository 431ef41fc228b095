"""The yardstick app of the start-up benchmarks: one Tree and one DataTable filled
from a site file, importing only Textual and the core's loader and index (never the
tripwise app), so a whole-process start of it costs what the libraries cost.

Run alone (``python bench/bare_app.py SITE``) it opens the app; the benchmarks
start it that way or build it in-process.
"""

from __future__ import annotations

import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from textual.app import App, ComposeResult  # noqa: E402
from textual.widgets import DataTable, Tree  # noqa: E402

from model.site.tree import SiteIndex  # noqa: E402
from model.storage.sites import load_site  # noqa: E402


class BareApp(App[None]):
    """The yardstick: one Tree and one DataTable filled from the same site file."""

    def __init__(self, path: Path) -> None:
        super().__init__()
        self.path = path

    def compose(self) -> ComposeResult:
        yield Tree("site", id="t")
        yield DataTable(id="d")

    def on_mount(self) -> None:
        site = load_site(self.path)
        idx = SiteIndex.build(site)
        tree: Tree[str] = self.query_one(Tree)
        table: DataTable[str] = self.query_one(DataTable)
        table.add_columns("id", "kind", "label")
        nodes = {idx.root: tree.root}
        for nid in idx.order[1:]:
            n = idx.by_id[nid]
            parent = nodes[n.parent]
            nodes[nid] = parent.add(f"{n.label or nid}  {n.kind}", data=nid, expand=True)
            table.add_row(nid, n.kind, n.label)
        tree.root.expand()


if __name__ == "__main__":
    BareApp(Path(sys.argv[1])).run()
