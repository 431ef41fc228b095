"""Every finding of the last analysis, worst first, filterable by severity and board."""

from __future__ import annotations

from dataclasses import dataclass

from rich.text import Text
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.message import Message
from textual.timer import Timer
from textual.widgets import DataTable, LoadingIndicator, Static

from model.rules.findings import SEVERITIES, SEVERITY_RANK, Analysis, Finding
from model.site.tree import SiteIndex
from tui.format import SEVERITY_MARK
from tui.themes import tone

#: Cells of the message column (a longer message is cut; the node's details show it all).
MESSAGE_W = 240
#: Seconds a check may run before the findings show a loading indicator.
LOADING_AFTER_S = 0.4


class FindingsTable(DataTable[Text]):
    """The table of findings; Enter jumps to the finding's node."""

    BINDINGS = [
        Binding("enter", "jump", "Go to node"),
        Binding("1", "filter('severity')", "Severity filter"),
        Binding("exclamation_mark", "filter('or-worse')", "Only / or worse"),
        Binding("2", "filter('board')", "Board filter"),
        Binding("w", "app.what_if", "What if", tooltip="try a change that clears this finding"),
    ]

    def _panel(self) -> FindingsPanel | None:
        panel = self.parent
        while panel is not None and not isinstance(panel, FindingsPanel):
            panel = panel.parent
        return panel

    def action_filter(self, which: str) -> None:
        panel = self._panel()
        if panel is not None:
            panel.cycle_filter(which)

    def on_focus(self) -> None:
        panel = self._panel()
        if panel is not None:
            panel.highlight_cursor()

    def action_jump(self) -> None:
        panel = self._panel()
        if panel is not None:
            panel.jump_to_cursor()


class FindingsPanel(Vertical):
    """Filters on top, the table below."""

    @dataclass
    class JumpTo(Message):
        """The user chose a finding; go to this node."""

        node_id: str

    @dataclass
    class Highlighted(Message):
        """The cursor is on this finding (shown in full elsewhere)."""

        finding: Finding

    def __init__(self, *, id: str | None = None) -> None:
        super().__init__(id=id)
        self._findings: list[Finding] = []
        self._shown: list[Finding] = []
        self._index: SiteIndex | None = None
        #: The filters now: a severity and a board id, or None for all.
        self.severity: str | None = None
        #: With a severity: True shows it and every worse one, False that one only.
        self.or_worse = False
        self.board: str | None = None
        self._boards: list[str] = []
        #: True while the checks run (the count says so; a long run shows an indicator).
        self.checking = False
        self._count_text = ""
        self._loading_timer: Timer | None = None

    def compose(self) -> ComposeResult:
        with Horizontal(id="findings-bar"):
            yield Static("Findings", id="findings-title", markup=False)
            yield Static("", id="filter-severity", classes="filter-chip", markup=False)
            yield Static("", id="filter-board", classes="filter-chip", markup=False)
            yield LoadingIndicator(id="findings-busy")
            yield Static("", id="findings-count", markup=False)
        table = FindingsTable(id="findings-table", cursor_type="row", zebra_stripes=True)
        yield table

    def on_mount(self) -> None:
        table = self.query_one(FindingsTable)
        table.add_column("", key="mark", width=2)
        table.add_column("severity", key="severity", width=11)
        table.add_column("board", key="board", width=14)
        table.add_column("node", key="node", width=16)
        # a fixed width: the table never waits on its own sizing to show a message in full
        table.add_column("finding", key="message", width=MESSAGE_W)

    @property
    def shown(self) -> list[Finding]:
        """The findings in the table now, in table order."""
        return list(self._shown)

    def show(self, analysis: Analysis | None, idx: SiteIndex) -> None:
        """Show a new analysis (keeps the filters)."""
        self._index = idx
        self._findings = [] if analysis is None else list(analysis.findings)
        self._boards = sorted({f.board for f in self._findings if f.board})
        if self.board not in self._boards:
            self.board = None
        self._refill()

    def cycle_filter(self, which: str) -> None:
        """Step a filter to its next value (all, then each severity or board).

        ``or-worse`` switches the severity filter between "this one only" and
        "this or worse" (kept while the severity steps on).
        """
        if which == "or-worse":
            self.or_worse = not self.or_worse
        elif which == "severity":
            order: list[str | None] = [None, *SEVERITIES]
            self.severity = order[(order.index(self.severity) + 1) % len(order)]
        else:
            boards: list[str | None] = [None, *self._boards]
            i = boards.index(self.board) if self.board in boards else 0
            self.board = boards[(i + 1) % len(boards)]
        self._refill()

    def on_click(self, event: object) -> None:
        widget = getattr(event, "widget", None)
        if widget is not None and widget.id in ("filter-severity", "filter-board"):
            self.cycle_filter(widget.id.removeprefix("filter-"))

    def severity_words(self) -> str:
        """The severity filter in words: 'all', 'required only', 'required or worse'."""
        sev = self.severity
        if sev is None:
            return "all"
        if sev == SEVERITIES[0]:
            return sev  # nothing is worse: both modes show the same
        return f"{sev} or worse" if self.or_worse else f"{sev} only"

    def _passes(self, f: Finding) -> bool:
        sev = self.severity
        if sev is not None:
            if self.or_worse:
                if SEVERITY_RANK[f.severity] > SEVERITY_RANK[sev]:
                    return False
            elif f.severity != sev:
                return False
        return self.board is None or f.board == self.board

    def _refill(self) -> None:
        board = self.board
        shown = [f for f in self._findings if self._passes(f)]
        self._shown = shown
        table = self.query_one(FindingsTable)
        row = table.cursor_row
        table.clear()
        idx = self._index
        for i, f in enumerate(shown):
            mark, style = SEVERITY_MARK[f.severity]
            style = tone(style)
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
        board_name = idx.label(board) if idx is not None and board in idx.by_id else board
        self.query_one("#filter-severity", Static).update(f"1 ! severity: {self.severity_words()}")
        self.query_one("#filter-board", Static).update(f"2 board: {board_name or 'all'}")
        total = len(self._findings)
        self._count_text = f"{len(shown)} of {total}" if len(shown) != total else f"{total}"
        self._show_count()
        # a short list leaves the rest of a tall screen to the tree (border, bar, header)
        self.styles.max_height = max(6, len(shown) + 5)

    def set_checking(self, on: bool) -> None:
        """The checks started (True) or finished (False).  A run longer than
        :data:`LOADING_AFTER_S` shows a moving indicator beside the count, so a large
        site's check never looks like a frozen screen (the table stays as it was)."""
        if on == self.checking:
            return
        self.checking = on
        if self._loading_timer is not None:
            self._loading_timer.stop()
            self._loading_timer = None
        if on:
            self._loading_timer = self.set_timer(LOADING_AFTER_S, self._long_check)
        else:
            self.query_one("#findings-busy").display = False
        self._show_count()

    def _long_check(self) -> None:
        self._loading_timer = None
        if self.checking:
            self.query_one("#findings-busy").display = True

    def _show_count(self) -> None:
        text = f"checking…  {self._count_text}" if self.checking else self._count_text
        # the count's box is as wide as the bar leaves it and one line high: no layout
        self.query_one("#findings-count", Static).update(text, layout=False)

    @on(DataTable.RowHighlighted, "#findings-table")
    def _row_highlighted(self, event: DataTable.RowHighlighted) -> None:
        event.stop()
        table = self.query_one(FindingsTable)
        if table.has_focus and 0 <= event.cursor_row < len(self._shown):
            self.post_message(self.Highlighted(self._shown[event.cursor_row]))

    @on(DataTable.RowSelected, "#findings-table")
    def _row_chosen(self, event: DataTable.RowSelected) -> None:
        event.stop()
        self.jump_to_cursor()

    def highlight_cursor(self) -> None:
        table = self.query_one(FindingsTable)
        if 0 <= table.cursor_row < len(self._shown):
            self.post_message(self.Highlighted(self._shown[table.cursor_row]))

    def jump_to_cursor(self) -> None:
        table = self.query_one(FindingsTable)
        if not self._shown or table.cursor_row < 0 or table.cursor_row >= len(self._shown):
            return
        f = self._shown[table.cursor_row]
        if f.nodes:
            self.post_message(self.JumpTo(f.nodes[0]))
