"""Every finding of the last analysis, worst first, filterable by severity and board."""

from __future__ import annotations

from dataclasses import dataclass

from rich.text import Text
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.message import Message
from textual.widgets import DataTable, Select, Static

from model.findings import SEVERITIES, Analysis, Finding
from model.tree import SiteIndex
from tui.format import SEVERITY_MARK

ALL = "all"


class FindingsTable(DataTable[Text]):
    """The table of findings; Enter jumps to the finding's node."""

    BINDINGS = [
        Binding("enter", "jump", "Go to node"),
        Binding("1", "filter('severity')", "Severity filter"),
        Binding("2", "filter('board')", "Board filter"),
    ]

    def action_filter(self, which: str) -> None:
        self.screen.query_one(f"#filter-{which}", Select).focus()

    def action_jump(self) -> None:
        panel = self.parent
        while panel is not None and not isinstance(panel, FindingsPanel):
            panel = panel.parent
        if panel is not None:
            panel.jump_to_cursor()


class FindingsPanel(Vertical):
    """Filters on top, the table below."""

    @dataclass
    class JumpTo(Message):
        """The user chose a finding; go to this node."""

        node_id: str

    def __init__(self, *, id: str | None = None) -> None:
        super().__init__(id=id)
        self._findings: list[Finding] = []
        self._shown: list[Finding] = []
        self._index: SiteIndex | None = None

    def compose(self) -> ComposeResult:
        with Horizontal(id="findings-bar"):
            yield Static("Findings", id="findings-title")
            yield Select(
                [(s, s) for s in SEVERITIES],
                prompt="all severities",
                allow_blank=True,
                compact=True,
                id="filter-severity",
            )
            yield Select([], prompt="all boards", allow_blank=True, compact=True, id="filter-board")
            yield Static("", id="findings-count")
        table = FindingsTable(id="findings-table", cursor_type="row", zebra_stripes=True)
        yield table

    def on_mount(self) -> None:
        table = self.query_one(FindingsTable)
        table.add_column("", key="mark", width=2)
        table.add_column("severity", key="severity", width=11)
        table.add_column("board", key="board", width=14)
        table.add_column("node", key="node", width=16)
        table.add_column("finding", key="message")

    @property
    def shown(self) -> list[Finding]:
        """The findings in the table now, in table order."""
        return list(self._shown)

    def show(self, analysis: Analysis | None, idx: SiteIndex) -> None:
        """Show a new analysis (keeps the filters)."""
        self._index = idx
        self._findings = [] if analysis is None else list(analysis.findings)
        boards = sorted({f.board for f in self._findings if f.board})
        board_select: Select[str] = self.query_one("#filter-board", Select)
        current = board_select.value
        options = [(idx.label(b) if b in idx.by_id else b, b) for b in boards]
        board_select.set_options(options)
        if current in boards:
            board_select.value = current
        self._refill()

    def _refill(self) -> None:
        sev = self.query_one("#filter-severity", Select).value
        board = self.query_one("#filter-board", Select).value
        shown = [
            f
            for f in self._findings
            if (sev is Select.NULL or f.severity == sev)
            and (board is Select.NULL or f.board == board)
        ]
        self._shown = shown
        table = self.query_one(FindingsTable)
        row = table.cursor_row
        table.clear()
        idx = self._index
        for i, f in enumerate(shown):
            mark, style = SEVERITY_MARK[f.severity]
            node = f.nodes[0] if f.nodes else ""
            node_text = idx.label(node) if idx is not None and node in idx.by_id else node
            board_text = idx.label(f.board) if idx is not None and f.board in idx.by_id else f.board
            table.add_row(
                Text(mark, style=style),
                Text(f.severity, style=style),
                Text(board_text, overflow="ellipsis", no_wrap=True),
                Text(node_text, overflow="ellipsis", no_wrap=True),
                Text(f.message, no_wrap=True),
                key=str(i),
            )
        if shown:
            table.move_cursor(row=min(max(row, 0), len(shown) - 1))
        total = len(self._findings)
        count = f"{len(shown)} of {total}" if len(shown) != total else f"{total}"
        self.query_one("#findings-count", Static).update(count)

    @on(Select.Changed)
    def _filter_changed(self, event: Select.Changed) -> None:
        event.stop()
        self._refill()

    @on(DataTable.RowSelected, "#findings-table")
    def _row_chosen(self, event: DataTable.RowSelected) -> None:
        event.stop()
        self.jump_to_cursor()

    def jump_to_cursor(self) -> None:
        table = self.query_one(FindingsTable)
        if not self._shown or table.cursor_row < 0 or table.cursor_row >= len(self._shown):
            return
        f = self._shown[table.cursor_row]
        if f.nodes:
            self.post_message(self.JumpTo(f.nodes[0]))
