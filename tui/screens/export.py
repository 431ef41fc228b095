"""Export a document of a visit (the latest by default): the remedial-work list or the test sheet."""

from __future__ import annotations

import asyncio
from pathlib import Path

from textual import on, work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.timer import Timer
from textual.widgets import Button, Input, Label, LoadingIndicator, Static

from model.reports.heading import STATEMENT
from model.reports.writer import (
    FORMAT_TITLE,
    FORMATS,
    KIND_TITLE,
    KINDS,
    ReportError,
    default_name,
    write_report,
)
from model.site.history import ordered_visits
from model.site.models import SiteFile
from model.storage.codec import SiteLoadError
from model.storage.sites import load_site
from tui.screens.closing import Dialog
from tui.widgets.choice_row import ChoiceRow

#: The keys of the dialog, shown in it.
KEYS_HINT = "Enter next (on File: write) · a letter picks · Ctrl+S write · Esc cancel"


class ExportScreen(Dialog[Path | None]):
    """Choose a document, a format and a visit, see the file name, write it; dismiss with the path.

    The visit list offers every visit, latest first; a document of an earlier
    visit shows the site as it stood then and says that a later visit exists.

    An existing file is replaced only after a second press of Write.  The
    document is written by :func:`model.reports.writer.write_report` in a worker, so a
    large site never blocks the screen.  The buttons stay in view at 80×24 (the
    fields scroll above them); the form starts on the first choice.
    """

    CSS_PATH = "export.tcss"
    BINDINGS = [
        Binding("escape", "cancel", "Cancel"),
        Binding("ctrl+s", "write", "Write"),
    ]

    def __init__(self, site_path: Path) -> None:
        super().__init__()
        self.site_path = Path(site_path)
        self.site: SiteFile | None = None
        self.kind: str = KINDS[0]
        self.fmt: str = FORMATS[0]
        #: The visit to report; None is the latest.
        self.visit: str | None = None
        self._auto_name = True
        self._last_auto = ""
        self._confirm: Path | None = None
        self._busy = False
        self._busy_timer: Timer | None = None
        self._busy_s = 0

    def compose(self) -> ComposeResult:
        with Vertical(id="export-box"):
            yield Label("Export a document", id="export-title", markup=False)
            with VerticalScroll(id="export-fields"):
                yield Static("", id="export-site", markup=False)
                with Horizontal(classes="export-line"):
                    yield Label("Document", classes="export-label", markup=False)
                    yield ChoiceRow([(KIND_TITLE[k], k) for k in KINDS], KINDS[0], id="export-kind")
                with Horizontal(classes="export-line"):
                    yield Label("Format", classes="export-label", markup=False)
                    yield ChoiceRow(
                        [(FORMAT_TITLE[f], f) for f in FORMATS], FORMATS[0], id="export-format"
                    )
                with Horizontal(classes="export-line"):
                    yield Label("Visit", classes="export-label", markup=False)
                    # filled once the site is read: every visit, latest first
                    yield ChoiceRow([], None, id="export-visit")
                with Horizontal(classes="export-line"):
                    yield Label("File", classes="export-label", markup=False)
                    # select_on_focus off: a key typed on arrival must not wipe the path
                    yield Input(id="export-target", compact=True, select_on_focus=False)
                yield Static("", id="export-status", markup=False)
                yield LoadingIndicator(id="export-busy")
                yield Static(STATEMENT, id="export-statement", markup=False)
            yield Static(KEYS_HINT, id="export-keys", markup=False)
            with Horizontal(id="export-buttons"):
                yield Button("Write (Ctrl+S)", id="export-write", variant="primary", compact=True)
                yield Button("Cancel (Esc)", id="export-cancel", compact=True)

    def on_mount(self) -> None:
        try:
            self.site = load_site(self.site_path)
        except SiteLoadError as exc:
            self._status(f"Cannot load the site: {exc}", error=True)
            self.query_one("#export-write", Button).disabled = True
            return
        self.query_one("#export-site", Static).update(
            f"{self.site.site.name}  ·  {self.site_path.name}"
        )
        visits = list(reversed(ordered_visits(self.site)))
        row = self.query_one("#export-visit", ChoiceRow)
        row.options = [(v.date if v.id == v.date else f"{v.date} · {v.id}", v.id) for v in visits]
        if visits:
            row.value = visits[0].id
        self._refresh_name()
        self.query_one("#export-kind", ChoiceRow).focus()

    # -------------------------------------------------------------- choices
    @property
    def target(self) -> Path:
        """The file that Write would produce (relative names are beside the site file)."""
        raw = self.query_one("#export-target", Input).value.strip()
        p = Path(raw).expanduser() if raw else self._default()
        return p if p.is_absolute() else self.site_path.parent / p

    def _default(self) -> Path:
        assert self.site is not None
        return default_name(self.site_path, self.site, self.kind, self.fmt, self.visit)

    def _refresh_name(self) -> None:
        if self.site is None:
            return
        if self._auto_name:
            self._last_auto = str(self._default())
            self.query_one("#export-target", Input).value = self._last_auto
        self._reset_confirm()

    def _reset_confirm(self) -> None:
        self._confirm = None
        self.query_one("#export-write", Button).label = "Write (Ctrl+S)"
        if self.target.exists():
            self._status(f"{self.target.name} exists; Write will ask before replacing it.")
        else:
            self._status("")

    @on(ChoiceRow.Changed, "#export-kind")
    def _kind_changed(self, event: ChoiceRow.Changed) -> None:
        self.kind = str(event.value)
        self._refresh_name()

    @on(ChoiceRow.Changed, "#export-format")
    def _format_changed(self, event: ChoiceRow.Changed) -> None:
        self.fmt = str(event.value)
        self._refresh_name()

    @on(ChoiceRow.Changed, "#export-visit")
    def _visit_changed(self, event: ChoiceRow.Changed) -> None:
        if self.site is None:
            return
        latest = self.site.latest_visit()
        value = event.value
        chosen = value if isinstance(value, str) else None
        self.visit = None if latest is not None and chosen == latest.id else chosen
        self._refresh_name()

    @on(Input.Changed, "#export-target")
    def _name_edited(self, event: Input.Changed) -> None:
        if event.value != self._last_auto:
            self._auto_name = False
        if self._confirm is None or self.target != self._confirm:
            self._reset_confirm()

    # -------------------------------------------------------------- actions
    @on(Button.Pressed, "#export-cancel")
    def _cancel_pressed(self) -> None:
        self.action_cancel()

    @on(Button.Pressed, "#export-write")
    def _write_pressed(self) -> None:
        self.action_write()

    @on(Input.Submitted, "#export-target")
    def _submitted(self) -> None:
        self.action_write()

    def action_cancel(self) -> None:
        if not self._busy:
            self.dismiss(None)

    def action_write(self) -> None:
        if self._busy or self.site is None:
            return
        target = self.target
        force = False
        if target.exists():
            if self._confirm != target:
                self._confirm = target
                self.query_one("#export-write", Button).label = "Replace (Ctrl+S)"
                self._status(
                    f"{target.name} already exists. Press Replace to overwrite it, "
                    "or change the name.",
                    error=True,
                )
                return
            force = True
        self._set_busy(True, target)
        self.query_one("#export-write", Button).disabled = True
        self._write(target, force)

    def _set_busy(self, busy: bool, target: Path | None = None) -> None:
        """While a document is written: a moving indicator and the seconds so far."""
        self._busy = busy
        self.query_one("#export-busy").display = busy
        if self._busy_timer is not None:
            self._busy_timer.stop()
            self._busy_timer = None
        if busy and target is not None:
            self._busy_s = 0
            name = target.name

            def tick() -> None:
                self._busy_s += 1
                self._status(f"Writing {name}… {self._busy_s} s (a large site takes a while)")

            self._status(f"Writing {name}…")
            self._busy_timer = self.set_interval(1.0, tick)

    @work(exclusive=True, group="export")
    async def _write(self, target: Path, force: bool) -> None:
        kind, fmt, visit = self.kind, self.fmt, self.visit
        try:
            site = await asyncio.to_thread(load_site, self.site_path)
            path = await asyncio.to_thread(
                write_report, site, kind, fmt, target, force=force, visit=visit
            )
        except (ReportError, SiteLoadError) as exc:
            self._failed(str(exc))
            return
        except OSError as exc:
            self._failed(f"{target}: {exc.strerror or exc}")
            return
        self._set_busy(False)
        self.app.notify(f"{KIND_TITLE[kind]} written to {path}", title="Export")
        self.dismiss(path)

    def _failed(self, message: str) -> None:
        self._set_busy(False)
        self._confirm = None
        button = self.query_one("#export-write", Button)
        button.disabled = False
        button.label = "Write (Ctrl+S)"
        self._status(f"Not written: {message}", error=True)

    def _status(self, text: str, error: bool = False) -> None:
        status = self.query_one("#export-status", Static)
        status.update(text)
        status.set_class(error, "export-error")
