"""Start a visit before the first reading: date (today by default), inspector, instrument."""

from __future__ import annotations

import datetime as dt

from pydantic import ValidationError
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.widgets import Input, Label, Static

from model.site.fields import errors_by_field
from model.site.history import new_visit_id
from model.site.models import Visit
from tui.screens.closing import Dialog


class StartVisitScreen(Dialog[Visit | None]):
    """Enter moves down the fields; Enter on the last starts the visit."""

    BINDINGS = [Binding("escape", "cancel", "Cancel")]

    def __init__(self, taken_ids: set[str], today: dt.date | None = None) -> None:
        super().__init__()
        self._taken = taken_ids
        self._today = today or dt.date.today()

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog"):
            yield Label("Start a visit", classes="dialog-title", markup=False)
            yield Static(
                "Readings are recorded on a visit. There is none yet.",
                classes="dialog-body",
                markup=False,
            )
            for name, title, value in (
                ("date", "Date (YYYY-MM-DD)", self._today.isoformat()),
                ("inspector", "Inspector", ""),
                ("instrument", "Instrument", ""),
            ):
                with Horizontal(classes="form-row"):
                    yield Label(title, classes="form-label", markup=False)
                    yield Input(value, id=f"v-{name}", compact=True)
            yield Static("", id="visit-error", classes="field-error", markup=False)
            yield Static(
                "Enter next field (on the last: start) · Esc cancel",
                id="visit-keys",
                classes="dialog-hint",
                markup=False,
            )

    def on_mount(self) -> None:
        self.query_one("#v-date", Input).focus()

    @on(Input.Submitted)
    def _submitted(self, event: Input.Submitted) -> None:
        event.stop()
        if event.input.id != "v-instrument":
            self.focus_next()
            return
        date = self.query_one("#v-date", Input).value.strip()
        try:
            visit = Visit(
                id=new_visit_id(date, self._taken),
                date=date,
                inspector=self.query_one("#v-inspector", Input).value,
                instrument=self.query_one("#v-instrument", Input).value,
            )
        except ValidationError as exc:
            msgs = errors_by_field(exc)
            self.query_one("#visit-error", Static).update("; ".join(msgs.values()))
            self.query_one("#v-date", Input).focus()
            return
        self.dismiss(visit)

    def action_cancel(self) -> None:
        self.dismiss(None)
