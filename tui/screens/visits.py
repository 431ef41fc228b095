"""Previous visits of a site, and the start of a new one."""

from __future__ import annotations

import datetime as dt

from pydantic import ValidationError
from rich.text import Text
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.widgets import Button, DataTable, Input, Label, Static

from model.site.history import new_visit_id
from model.site.messages import error_text
from model.site.models import SiteFile, Visit
from tui.screens.closing import Dialog

FIELD_LABELS = {"date": "Date", "inspector": "Inspector", "instrument": "Instrument"}


class VisitsScreen(Dialog[Visit | None]):
    """Lists the site's visits and starts a new one (with no readings yet)."""

    BINDINGS = [
        Binding("ctrl+s,ctrl+n", "start", "Start visit"),
        Binding("escape", "cancel", "Cancel"),
    ]

    CSS_PATH = "visits.tcss"

    def __init__(self, site: SiteFile) -> None:
        super().__init__()
        self.site = site
        self.last = site.latest_visit()

    def compose(self) -> ComposeResult:
        last = self.last
        with Vertical(id="visits-box"):
            yield Static("Visits", id="visits-title", markup=False)
            if self.site.visits:
                yield DataTable(id="visits-table", cursor_type="row", zebra_stripes=True)
            else:
                yield Static("No visits recorded yet.", id="visits-none", markup=False)
            yield Static(
                "Start a new visit: it begins with no readings; earlier visits keep theirs "
                "for comparison.",
                id="visits-new-title",
                markup=False,
            )
            defaults = {
                "date": dt.date.today().isoformat(),
                "inspector": last.inspector if last else "",
                "instrument": last.instrument if last else "",
            }
            for key, label in FIELD_LABELS.items():
                with Horizontal(classes="visit-line"):
                    yield Label(label, classes="visit-label", markup=False)
                    yield Input(defaults[key], id=f"v-{key}", compact=True)
                yield Static("", id=f"verr-{key}", classes="visit-error", markup=False)
                if key == "date":
                    yield Static(self._id_hint(defaults["date"]), id="visits-id-hint", markup=False)
            with Horizontal(id="visits-buttons"):
                yield Button(
                    "Start visit (Ctrl+S)", id="visits-start", variant="primary", compact=True
                )
                yield Button("Cancel (Esc)", id="visits-cancel", compact=True)

    def on_mount(self) -> None:
        if self.site.visits:
            table = self.query_one("#visits-table", DataTable)
            table.add_columns("date", "id", "readings", "inspector", "instrument")
            for v in self.site.visits:
                table.add_row(
                    *(
                        Text(x)
                        for x in (v.date, v.id, str(len(v.readings)), v.inspector, v.instrument)
                    ),
                    key=v.id,
                )
        self.query_one("#v-date", Input).focus()

    def _id_hint(self, date: str) -> str:
        vid = new_visit_id(date.strip(), (v.id for v in self.site.visits))
        return f"saved as visit {vid}" if date.strip() else ""

    @on(Input.Changed, "#v-date")
    def _date_changed(self, event: Input.Changed) -> None:
        self.query_one("#visits-id-hint", Static).update(self._id_hint(event.value))

    def build_visit(self) -> tuple[Visit | None, dict[str, str]]:
        """The new visit the form describes, or the problems by field."""
        values = {k: self.query_one(f"#v-{k}", Input).value.strip() for k in FIELD_LABELS}
        if not values["date"]:
            return None, {"date": "Date is needed (YYYY-MM-DD)"}
        vid = new_visit_id(values["date"], (v.id for v in self.site.visits))
        try:
            return Visit.model_validate({"id": vid, **values, "readings": {}}), {}
        except ValidationError as exc:
            errors: dict[str, str] = {}
            for err in exc.errors():
                key = str(err["loc"][0]) if err["loc"] else "date"
                key = key if key in FIELD_LABELS else "date"
                msg = error_text(err, "is not valid")
                errors.setdefault(key, f"{FIELD_LABELS[key]}: {msg}")
            return None, errors

    def action_start(self) -> None:
        for err in self.query(".visit-error").results(Static):
            err.update("")
        visit, errors = self.build_visit()
        if visit is None:
            for key, msg in errors.items():
                self.query_one(f"#verr-{key}", Static).update(msg)
            self.query_one(f"#v-{next(iter(errors))}", Input).focus()
            return
        self.dismiss(visit)

    def action_cancel(self) -> None:
        self.dismiss(None)

    @on(Input.Submitted)
    def _submitted(self, event: Input.Submitted) -> None:
        """Enter moves to the next field; on the last (the instrument) it starts the visit."""
        event.stop()
        if event.input.id == f"v-{list(FIELD_LABELS)[-1]}":
            self.action_start()
        else:
            self.focus_next()

    @on(Button.Pressed, "#visits-start")
    def _start_pressed(self) -> None:
        self.action_start()

    @on(Button.Pressed, "#visits-cancel")
    def _cancel_pressed(self) -> None:
        self.action_cancel()
