"""'What if…': try a device change on a scratch copy and see the findings before and after.

Opened from a finding or from a device.  The choices (the plan's change, each device's
options, a change of your own) come from :mod:`model.plan.choices`; each is tried on a
scratch copy by :func:`model.plan.trial.run_trial`, in a worker, and shown side by side:
new findings first and unmistakable, then what is cleared and kept, the tests the changed
devices need after installation, and the counts by severity.  Nothing here changes the
site: Accept hands the trial to the app, which makes it through the journal as one undo
step; Drop and Escape leave the site as it was.
"""

from __future__ import annotations

import datetime as dt
from collections.abc import Callable

from rich.text import Text
from textual import events, on, work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.widgets import DataTable, Static

from model.plan.choices import TrialChoice, merge_choices
from model.plan.trial import Trial, TrialRefused, device_name, run_trial
from model.rules.checks import analyse
from model.rules.findings import Analysis, Finding
from model.site.models import SiteFile
from tui.format import PLAN_CAUTION_SHORT, plan_caution_for_width
from tui.screens.closing import Dialog
from tui.screens.confirm import ConfirmScreen
from tui.screens.what_if_form import ScratchNodeForm
from tui.themes import tone
from tui.widgets.caution_bar import CautionBar
from tui.widgets.key_bar import KeyBar
from tui.widgets.trial_sides import TrialSides, choice_cells, counts_text, created_question

#: Finds the choices to try from the site's analysis (run in a worker: it may take a
#: moment on a large site).
ChoiceMaker = Callable[[Analysis], list[TrialChoice]]


#: Said while the options are found (the first list the view shows).
FINDING = "finding the changes to try…"


class WhatIfScreen(Dialog[Trial | None]):
    """Try changes on a scratch copy; dismisses with the trial to accept, or None."""

    CSS_PATH = "what_if.tcss"

    BINDINGS = [
        Binding("enter", "try_choice", "Try", tooltip="try the highlighted change"),
        Binding("e", "own_change", "Your change", tooltip="edit the device's fields and try"),
        Binding("a", "accept", "Accept", tooltip="make the tried change in the site (undoable)"),
        Binding("d", "drop", "Drop", tooltip="leave the site unchanged and close"),
        Binding("escape", "drop", "Leave", show=False, tooltip="leave the site unchanged"),
    ]

    def __init__(
        self,
        site: SiteFile,
        analysis: Analysis | None,
        make_options: ChoiceMaker,
        make_planned: ChoiceMaker | None = None,
        *,
        finding: Finding | None = None,
        device: str | None = None,
        read_only: bool = False,
    ) -> None:
        super().__init__()
        self.site = site
        self.analysis = analysis
        self.finding = finding
        #: The device a change of your own is made to (the one the view is opened for, or
        #: the first device the finding names).
        self.device = device
        self.read_only = read_only
        self._make_options = make_options
        self._make_planned = make_planned
        #: True while the plan of the whole site is being made (its change is added then).
        self.planning = False
        self.choices: list[TrialChoice] = []
        #: The trial shown now (None while none is chosen or while it is checked).
        self.trial: Trial | None = None
        #: The choice the trial shown (or being checked) is of.
        self.tried: TrialChoice | None = None
        self._gen = 0
        self.busy = ""

    # ------------------------------------------------------------ layout
    def _subject(self) -> tuple[str, str]:
        if self.finding is not None:
            f = self.finding
            where = ", ".join(f.nodes[:4]) + ("…" if len(f.nodes) > 4 else "")
            return f"What if… finding {f.rule} ({where})", f.message
        if self.device is not None:
            return f"What if… {device_name(self.site.node(self.device))}", ""
        return "What if…", ""

    def compose(self) -> ComposeResult:
        title, subject = self._subject()
        with Vertical(id="wi-box"):
            yield Static(Text(title, style="bold"), id="wi-title", markup=False)
            yield Static(subject, id="wi-subject", markup=False).set_class(not subject, "-empty")
            yield DataTable(id="wi-choices", cursor_type="row", zebra_stripes=True)
            yield Static("", id="wi-counts", markup=False)
            yield TrialSides(id="wi-trial")
            yield Static("", id="wi-detail", markup=False)
            yield Static(PLAN_CAUTION_SHORT, id="wi-plan-caution", markup=False)
        yield CautionBar(id="caution")
        yield KeyBar(id="key-bar")

    def on_mount(self) -> None:
        choices = self.query_one("#wi-choices", DataTable)
        choices.add_column("from", key="from", width=6)
        choices.add_column("clears", key="clears", width=6)
        choices.add_column("new", key="new", width=4)
        choices.add_column("change", key="change", width=400)
        self._fill_sides()
        self._set_busy(FINDING)
        choices.focus()
        self._load_choices()

    def on_resize(self, event: events.Resize) -> None:
        self.query_one("#wi-plan-caution", Static).update(plan_caution_for_width(event.size.width))

    # ------------------------------------------------------------ choices
    @work(thread=True, exclusive=True, group="what-if-choices", exit_on_error=False)
    def _load_choices(self) -> None:
        analysis = self.analysis
        try:
            if analysis is None:  # the app's last one was of an older site: made afresh
                analysis = analyse(self.site)
            result: list[TrialChoice] | str = self._make_options(analysis)
        except Exception as exc:  # noqa: BLE001 - said on screen, never a traceback
            result = f"the changes to try could not be found: {exc}"
        self.app.call_from_thread(self._choices_ready, result, analysis)

    def _choices_ready(self, result: list[TrialChoice] | str, analysis: Analysis | None) -> None:
        if self.dismissed:
            return
        if self.analysis is None and analysis is not None:
            self.analysis = analysis
            if self.trial is None:
                self._fill_sides()
        if analysis is not None and self._make_planned is not None:
            self.planning = True
            self._show_title()
            self._load_plan(analysis)
        if isinstance(result, str):
            if self.busy == FINDING:
                self._set_busy("")
            self._say(result)
            return
        self.choices = merge_choices(self.choices, result)
        self._show_choices()
        if self.busy == FINDING:  # (a trial being checked meanwhile still is)
            self._set_busy("")
        if not self.choices and not self.planning:
            self._say(
                "No standard change of a device clears this; press e for a change of your own."
                if self.device is not None
                else "No device change to try: this finding names no device that can be changed."
            )

    @work(thread=True, exclusive=True, group="what-if-plan", exit_on_error=False)
    def _load_plan(self, analysis: Analysis) -> None:
        assert self._make_planned is not None
        try:
            result: list[TrialChoice] | str = self._make_planned(analysis)
        except Exception as exc:  # noqa: BLE001 - said on screen, never a traceback
            result = f"the plan could not be made: {exc}"
        self.app.call_from_thread(self._planned_ready, result)

    def _planned_ready(self, result: list[TrialChoice] | str) -> None:
        """The plan's change arrives after the options: put it first, keep the cursor on
        the choice it was on (a trial shown stays shown)."""
        if self.dismissed:
            return
        self.planning = False
        self._show_title(None if isinstance(result, str) else len(result))
        if isinstance(result, str):
            self._say(result, error=True)
            return
        here = self.highlighted_choice()
        self.choices = merge_choices(result, self.choices)
        self._show_choices(keep=here)

    def _show_title(self, planned: int | None = 0) -> None:
        title, _ = self._subject()
        text = Text(title, style="bold")
        if self.planning:
            text.append("  · making the plan of the whole site…", style=tone("$tw-muted"))
        elif planned is None:
            text.append("  · no plan", style=tone("$tw-muted"))
        self.query_one("#wi-title", Static).update(text)

    def _show_choices(self, keep: TrialChoice | None = None) -> None:
        table = self.query_one("#wi-choices", DataTable)
        table.clear()
        for i, c in enumerate(self.choices):
            table.add_row(*choice_cells(c), key=str(i))
        if keep is None:
            return
        same = [i for i, c in enumerate(self.choices) if c is keep] or [
            i for i, c in enumerate(self.choices) if c.summary == keep.summary
        ]
        if same:
            if self.tried is keep:
                self.tried = self.choices[same[0]]  # the same changes, now from the plan
            table.move_cursor(row=same[0])

    def add_choice(self, choice: TrialChoice) -> None:
        """Add a choice (a change of your own) at the end, highlight and try it."""
        self.choices.append(choice)
        self._show_choices()
        table = self.query_one("#wi-choices", DataTable)
        table.move_cursor(row=len(self.choices) - 1)
        table.focus()
        self.try_choice(choice)

    def highlighted_choice(self) -> TrialChoice | None:
        row = self.query_one("#wi-choices", DataTable).cursor_row
        return self.choices[row] if 0 <= row < len(self.choices) else None

    @on(DataTable.RowSelected, "#wi-choices")
    def _chosen(self, event: DataTable.RowSelected) -> None:
        event.stop()
        self.action_try_choice()

    def action_try_choice(self) -> None:
        choice = self.highlighted_choice()
        if choice is None:
            self.app.bell()
            return
        self.try_choice(choice)

    # ------------------------------------------------------------ trials
    def try_choice(self, choice: TrialChoice) -> None:
        """Try one choice on a scratch copy (in a worker); the sides show it when done."""
        self._gen += 1
        self.trial = None
        self.tried = choice
        self._fill_sides()
        self._set_busy("checking the change on a scratch copy…")
        self._run(choice, self._gen)

    @work(thread=True, exclusive=True, group="what-if-trial", exit_on_error=False)
    def _run(self, choice: TrialChoice, gen: int) -> None:
        try:
            when = dt.datetime.now(dt.UTC).strftime("%Y-%m-%d %H:%M UTC")
            result: Trial | str = run_trial(self.site, choice.changes, self.analysis, record=when)
        except TrialRefused as exc:
            result = f"This change cannot be made: {exc}"
        except Exception as exc:  # noqa: BLE001 - said on screen, never a traceback
            result = f"The checks failed on this change: {exc}"
        self.app.call_from_thread(self._trial_done, result, gen)

    def _trial_done(self, result: Trial | str, gen: int) -> None:
        if gen != self._gen or self.dismissed:
            return  # another choice was tried since
        self._set_busy("")
        if isinstance(result, str):
            self.trial = None
            self._fill_sides()
            self._say(result, error=True)
            return
        if self.analysis is None:
            self.analysis = result.before
        self.trial = result
        self._fill_sides()

    # ------------------------------------------------------------ the two sides
    @property
    def before_rows(self) -> list[tuple[str, Finding]]:
        """The rows before: (status, finding), status '' (nothing tried), 'cleared', 'kept'."""
        return self.query_one(TrialSides).before_rows

    @property
    def after_rows(self) -> list[tuple[str, Finding]]:
        """The rows after: (status, finding), status 'NEW', 'kept' or 'test' (after
        installation), the new ones first."""
        return self.query_one(TrialSides).after_rows

    def _before_findings(self) -> list[Finding]:
        if self.trial is not None:
            return list(self.trial.before.findings)
        return [] if self.analysis is None else list(self.analysis.findings)

    def _fill_sides(self) -> None:
        self.query_one(TrialSides).show(self.trial, self._before_findings())
        self.query_one("#wi-counts", Static).update(
            counts_text(self.trial, self._before_findings())
        )
        self._show_detail(None)

    @on(TrialSides.Picked)
    def _picked(self, event: TrialSides.Picked) -> None:
        event.stop()
        self._show_detail(event.finding)

    def _show_detail(self, f: Finding | None) -> None:
        detail = self.query_one("#wi-detail", Static)
        if f is None:
            choice = self.highlighted_choice()
            if self.trial is not None and self.tried is not None:
                detail.update(f"Tried: {self.tried.text}")
            elif choice is not None:
                detail.update(f"Enter tries: {choice.text}")
            else:
                detail.update("")
            return
        detail.update(f"{f.severity} · {f.rule} · {', '.join(f.nodes)}: {f.message}")

    @on(DataTable.RowHighlighted, "#wi-choices")
    def _choice_row(self, event: DataTable.RowHighlighted) -> None:
        """Another choice under the cursor: the trial shown is not of it, so it goes (Accept
        makes only what is shown); Enter tries the new one."""
        event.stop()
        if self.tried is not None and self.highlighted_choice() is not self.tried:
            self._gen += 1  # a trial still being checked is of the old choice: not shown
            self.tried = None
            self.trial = None
            self._set_busy("")
            self._fill_sides()
        self._show_detail(None)

    def _set_busy(self, text: str) -> None:
        """Say what is being worked on; with '' the counts are shown again."""
        was, self.busy = self.busy, text
        if text:
            self._say(text)
        elif was:
            self.query_one("#wi-counts", Static).update(
                counts_text(self.trial, self._before_findings())
            )

    def _say(self, text: str, *, error: bool = False) -> None:
        counts = self.query_one("#wi-counts", Static)
        counts.update(Text(text, style=tone("bold $tw-bad") if error else tone("$tw-muted")))

    # ------------------------------------------------------------ your own change
    def action_own_change(self) -> None:
        choice = self.highlighted_choice()
        # the device of the change under the cursor, else the one the view is for
        device = choice.changes[0].node if choice is not None else self.device
        if device is None or not any(n.id == device for n in self.site.nodes):
            self._say("This finding names no device to change.", error=True)
            self.app.bell()
            return
        values = self.site.node(device).model_dump()

        def done(node_id: str | None) -> None:
            if node_id is not None and form.change is not None:
                self.add_choice(TrialChoice("own", (form.change,)))

        form = ScratchNodeForm(self.site, values)
        self.app.push_screen(form, done)

    # ------------------------------------------------------------ accept / drop
    def action_accept(self) -> None:
        if self.read_only:
            self._say("The site is open read-only; nothing can be accepted.", error=True)
            self.app.bell()
            return
        trial = self.trial
        if trial is None:
            self._say(
                "Still checking the change…" if self.busy else "Try a change first (Enter).",
                error=not self.busy,
            )
            self.app.bell()
            return
        if not trial.creates:
            self.dismiss(trial)
            return

        def answered(yes: bool | None) -> None:
            if yes:
                self.dismiss(trial)

        self.app.push_screen(
            ConfirmScreen(
                "This change creates new findings",
                created_question(trial),
                yes="Accept anyway",
                no="Back",
            ),
            answered,
        )

    def action_drop(self) -> None:
        self.dismiss(None)


__all__ = ["WhatIfScreen"]
