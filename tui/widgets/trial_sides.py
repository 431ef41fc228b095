"""The findings before and after a tried change, side by side, the new ones first.

Before: what the change clears, then what it keeps.  After: every NEW finding first
(shown in the alarm tone and announced above both sides), then the kept ones, then
the tests the changed devices need after installation.  Shows a
:class:`~model.plan.trial.Trial`; decides nothing.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

from rich.text import Text
from textual import events, on
from textual.app import ComposeResult
from textual.containers import Horizontal, Vertical
from textual.message import Message
from textual.widgets import DataTable, Static

from model.plan.choices import TrialChoice
from model.plan.trial import Trial
from model.rules.findings import SEVERITIES, Finding
from tui.format import SEVERITY_MARK
from tui.themes import tone

Row = tuple[str, Finding]


def counts_text(trial: Trial | None, before: Sequence[Finding]) -> Text:
    """'urgent 0→0 · required 4→2 · …', or the counts before only."""
    text = Text()
    b = {s: 0 for s in SEVERITIES}
    for f in before:
        b[f.severity] += 1
    a = trial.counts_after() if trial is not None else None
    for i, sev in enumerate(SEVERITIES):
        if i:
            text.append(" · ", style=tone("$tw-muted"))
        _, style = SEVERITY_MARK[sev]
        text.append(sev, style=tone(style))
        text.append(f" {b[sev]}")
        if a is not None:
            worse = a[sev] > b[sev]
            text.append("→")
            text.append(str(a[sev]), style=tone("bold $tw-bad") if worse else "bold")
    if trial is not None and trial.diff.to_test:
        text.append(f" · +{len(trial.diff.to_test)} to test", style=tone("$tw-investigate"))
    return text


def dropped_text(trial: Trial) -> str:
    """The readings a change leaves behind, by device ('' when none)."""
    by_device: dict[str, int] = {}
    for _visit, device in trial.readings_dropped:
        by_device[device] = by_device.get(device, 0) + 1
    if not by_device:
        return ""
    said = ", ".join(f"{d} ({n} visit{'s' if n > 1 else ''})" for d, n in by_device.items())
    return (
        f"Readings of {said} were of the old device: accepting moves them to the "
        "visit's notes, as text; the new device is to be tested."
    )


#: Where a choice comes from, as the list shows it.
SOURCE_WORDS = {"plan": "plan", "option": "option", "own": "yours"}


def choice_cells(c: TrialChoice) -> tuple[Text, Text, Text, Text]:
    """A row of the list of choices: from, clears (✓ when it clears the finding the view
    is for), new (findings it creates), the change in short.  A change of your own says
    '?' until it is tried."""
    unknown = c.source == "own"
    mark = "✓" if c.clears_target else " "
    return (
        Text(SOURCE_WORDS[c.source]),
        Text("?" if unknown else f"{mark} {c.clears}"),
        Text(
            "?" if unknown else (f"+{c.creates}" if c.creates else "0"),
            style=tone("bold $tw-bad") if c.creates else "",
        ),
        Text(c.summary, no_wrap=True),
    )


def created_question(trial: Trial) -> str:
    """The question before accepting a change that creates findings, naming them."""
    n = len(trial.diff.created)
    return (
        f"{n} finding(s) the site does not have now would appear:\n"
        + "\n".join(f"- {f.severity}: {f.message}" for f in trial.diff.created[:5])
        + ("\n…" if n > 5 else "")
        + "\n\nAccept it into the site anyway?"
    )


def _cells(f: Finding, status: str) -> tuple[Text, Text]:
    mark, style = SEVERITY_MARK[f.severity]
    status_style = {
        "NEW": tone("bold reverse $tw-bad"),
        "cleared": tone("$tw-ok"),
        "test": tone("$tw-investigate"),
    }.get(status, tone("$tw-muted"))
    cell = Text(mark, style=tone(style))
    cell.append(" ")
    cell.append(status, style=status_style)
    return cell, Text(f.message, no_wrap=True)


class TrialSides(Vertical):
    """The warning for new findings, the readings note, and the two lists."""

    @dataclass
    class Picked(Message):
        """The cursor is on this finding in one of the lists (shown in full elsewhere)."""

        finding: Finding

    def __init__(self, *, id: str | None = None) -> None:
        super().__init__(id=id)
        self.before_rows: list[Row] = []
        self.after_rows: list[Row] = []

    def compose(self) -> ComposeResult:
        yield Static("", id="wi-new", markup=False)
        yield Static("", id="wi-note", markup=False)
        with Horizontal(id="wi-sides"):
            with Vertical(classes="wi-side"):
                yield Static("Before", id="wi-before-title", classes="wi-head", markup=False)
                yield DataTable(id="wi-before", cursor_type="row", zebra_stripes=True)
            with Vertical(classes="wi-side"):
                yield Static("After", id="wi-after-title", classes="wi-head", markup=False)
                yield DataTable(id="wi-after", cursor_type="row", zebra_stripes=True)

    def on_mount(self) -> None:
        for side in ("#wi-before", "#wi-after"):
            t = self.query_one(side, DataTable)
            t.show_header = False
            t.add_column("", key="status", width=9)
            t.add_column("finding", key="message", width=400)

    def show(self, trial: Trial | None, before: Sequence[Finding]) -> None:
        """Show a trial (or, with None, the findings before only)."""
        if trial is None:
            rows_b: list[Row] = [("", f) for f in before]
            rows_a: list[Row] = []
        else:
            d = trial.diff
            rows_b = [("cleared", f) for f in d.cleared] + [("kept", f) for f in trial.kept_before]
            rows_a = (
                [("NEW", f) for f in d.created]
                + [("kept", f) for f in d.kept]
                + [("test", f) for f in d.to_test]
            )
        self.before_rows, self.after_rows = rows_b, rows_a
        for table_id, rows in (("#wi-before", rows_b), ("#wi-after", rows_a)):
            table = self.query_one(table_id, DataTable)
            table.clear()
            for i, (status, f) in enumerate(rows):
                table.add_row(*_cells(f, status), key=str(i))
        self.query_one("#wi-before-title", Static).update(
            f"Before: {len(rows_b)} finding(s)"
            + (f", {len(trial.diff.cleared)} cleared" if trial is not None else "")
        )
        self.query_one("#wi-after-title", Static).update(
            "After: choose a change and press Enter"
            if trial is None
            else f"After: {len(rows_a) - len(trial.diff.to_test)} finding(s), "
            f"{len(trial.diff.created)} new"
        )
        created = trial.diff.created if trial is not None else []
        new = self.query_one("#wi-new", Static)
        new.update(
            f"WARNING: this change CREATES {len(created)} NEW FINDING(S) (marked NEW, first)"
            if created
            else ""
        )
        new.display = bool(created)
        note = self.query_one("#wi-note", Static)
        said = dropped_text(trial) if trial is not None else ""
        note.update(said)
        note.display = bool(said)

    def _rows_of(self, table: DataTable[Text]) -> list[Row]:
        return self.before_rows if table.id == "wi-before" else self.after_rows

    @on(DataTable.RowHighlighted)
    def _row(self, event: DataTable.RowHighlighted) -> None:
        event.stop()
        rows = self._rows_of(event.data_table)
        if 0 <= event.cursor_row < len(rows) and event.data_table.has_focus:
            self.post_message(self.Picked(rows[event.cursor_row][1]))

    def on_descendant_focus(self, event: events.DescendantFocus) -> None:
        """A list took the focus: show its row under the cursor in full."""
        table = event.widget
        if isinstance(table, DataTable):
            rows = self._rows_of(table)
            if 0 <= table.cursor_row < len(rows):
                self.post_message(self.Picked(rows[table.cursor_row][1]))
