"""Settle the conflicts of a merge one by one, then hand back the merged site."""

from __future__ import annotations

from rich.text import Text
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.widgets import DataTable, Static

from model.site.models import SiteFile
from model.visits.merge_conflicts import Choice, Conflict, MergeError, version_text
from model.visits.merge_result import MergeResult
from tui.screens.closing import Dialog


class MergeScreen(Dialog[SiteFile | None]):
    """Walk the conflicts of ``result``; choose ours or theirs for each; apply.

    Dismisses with the resolved site, or None when cancelled.
    """

    BINDINGS = [
        Binding("o", "choose('ours')", "Ours"),
        Binding("t", "choose('theirs')", "Theirs"),
        Binding("O", "choose_all('ours')", "All ours", show=False),
        Binding("T", "choose_all('theirs')", "All theirs", show=False),
        Binding("a", "apply", "Apply"),
        Binding("ctrl+s", "apply", "Apply", show=False),
        Binding("escape", "cancel", "Cancel"),
    ]
    CSS_PATH = "merge.tcss"

    def __init__(self, result: MergeResult) -> None:
        super().__init__()
        self.result = result
        self.choices: dict[str, Choice] = {}

    def compose(self) -> ComposeResult:
        n = len(self.result.conflicts)
        title = (
            f"Merge: {n} conflict(s). Ours = the site open here, theirs = the other copy."
            if n
            else "Merge: no conflicts. Press a to apply."
        )
        with Vertical(id="merge-box"):
            yield Static(title, id="merge-title", markup=False)
            yield DataTable(id="merge-conflicts", cursor_type="row", zebra_stripes=True)
            yield Static("", id="merge-detail", markup=False)
            yield Static("", id="merge-status", markup=False)
            yield Static(
                "o ours · t theirs · O / T all ours / theirs · a apply · Esc cancel",
                id="merge-keys",
                markup=False,
            )

    def on_mount(self) -> None:
        table = self.query_one("#merge-conflicts", DataTable)
        table.add_columns("choice", "conflict", "where")
        for c in self.result.conflicts:
            table.add_row(Text("—"), Text(c.what), Text(c.where), key=c.id)
        self._show_detail()
        self._update_status()
        table.focus()

    def _current(self) -> Conflict | None:
        table = self.query_one("#merge-conflicts", DataTable)
        if not self.result.conflicts or table.row_count == 0:
            return None
        row = max(0, min(table.cursor_row, len(self.result.conflicts) - 1))
        return self.result.conflicts[row]

    def _show_detail(self) -> None:
        c = self._current()
        detail = self.query_one("#merge-detail", Static)
        if c is None:
            detail.update("")
            return
        lines = [f"{c.what}", f"where: {c.where}"]
        for name, a, b in c.differences():
            lines.append(f"{name}:  ours {version_text(a, 60)}   |   theirs {version_text(b, 60)}")
        detail.update("\n".join(lines))

    def _update_status(self, message: str | None = None) -> None:
        left = len(self.result.conflicts) - len(self.choices)
        text = message or (
            f"{left} conflict(s) still need a choice." if left else "All chosen: press a to apply."
        )
        self.query_one("#merge-status", Static).update(text)

    @on(DataTable.RowHighlighted, "#merge-conflicts")
    def _highlighted(self, event: DataTable.RowHighlighted) -> None:
        self._show_detail()

    def _set(self, conflict_id: str, choice: Choice) -> None:
        self.choices[conflict_id] = choice
        table = self.query_one("#merge-conflicts", DataTable)
        table.update_cell(conflict_id, table.ordered_columns[0].key, Text(choice))

    def action_choose(self, choice: Choice) -> None:
        c = self._current()
        if c is None:
            return
        self._set(c.id, choice)
        table = self.query_one("#merge-conflicts", DataTable)
        if table.cursor_row < table.row_count - 1:
            table.move_cursor(row=table.cursor_row + 1)
        self._update_status()

    def action_choose_all(self, choice: Choice) -> None:
        for c in self.result.conflicts:
            self._set(c.id, choice)
        self._update_status()

    def action_apply(self) -> None:
        try:
            site = self.result.resolve(self.choices)
        except MergeError as exc:
            self._update_status(f"Cannot apply yet: {exc}")
            return
        self.dismiss(site)

    def action_cancel(self) -> None:
        self.dismiss(None)
