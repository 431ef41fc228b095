"""Export a document of the latest visit: the remedial-work list or the test sheet."""

from __future__ import annotations

import asyncio
from pathlib import Path

from textual import on, work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.screen import ModalScreen
from textual.timer import Timer
from textual.widgets import Button, Input, Label, LoadingIndicator, RadioButton, RadioSet, Static

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
from model.site.models import SiteFile
from model.storage.codec import SiteLoadError
from model.storage.sites import load_site


class ExportScreen(ModalScreen[Path | None]):
    """Choose a document and a format, see the file name, write it; dismiss with the path.

    An existing file is replaced only after a second press of Write.  The
    document is written by :func:`model.reports.writer.write_report` in a worker, so a
    large site never blocks the screen.
    """

    CSS_PATH = "export.tcss"
    BINDINGS = [
        Binding("escape", "cancel", "Cancel"),
        Binding("ctrl+s", "write", "Write", show=False),
    ]

    def __init__(self, site_path: Path) -> None:
        super().__init__()
        self.site_path = Path(site_path)
        self.site: SiteFile | None = None
        self.kind: str = KINDS[0]
        self.fmt: str = FORMATS[0]
        self._auto_name = True
        self._last_auto = ""
        self._confirm: Path | None = None
        self._busy = False
        self._busy_timer: Timer | None = None
        self._busy_s = 0

    def compose(self) -> ComposeResult:
        with Vertical(id="export-box"):
            yield Label("Export a document", id="export-title", markup=False)
            yield Static("", id="export-site", markup=False)
            with Horizontal(id="export-choices"):
                with Vertical(classes="export-column"):
                    yield Label("Document", classes="export-label", markup=False)
                    with RadioSet(id="export-kind"):
                        for i, k in enumerate(KINDS):
                            yield RadioButton(KIND_TITLE[k], value=i == 0, id=f"kind-{k}")
                with Vertical(classes="export-column"):
                    yield Label("Format", classes="export-label", markup=False)
                    with RadioSet(id="export-format"):
                        for i, f in enumerate(FORMATS):
                            yield RadioButton(FORMAT_TITLE[f], value=i == 0, id=f"format-{f}")
            yield Label("File", classes="export-label", markup=False)
            yield Input(id="export-target")
            yield Static("", id="export-status", markup=False)
            yield LoadingIndicator(id="export-busy")
            yield Static(STATEMENT, id="export-statement", markup=False)
            with Horizontal(id="export-buttons"):
                yield Button("Write", id="export-write", variant="primary")
                yield Button("Cancel", id="export-cancel")

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
        self._refresh_name()
        self.query_one("#export-write", Button).focus()

    # -------------------------------------------------------------- choices
    @property
    def target(self) -> Path:
        """The file that Write would produce (relative names are beside the site file)."""
        raw = self.query_one("#export-target", Input).value.strip()
        p = Path(raw).expanduser() if raw else self._default()
        return p if p.is_absolute() else self.site_path.parent / p

    def _default(self) -> Path:
        assert self.site is not None
        return default_name(self.site_path, self.site, self.kind, self.fmt)

    def _refresh_name(self) -> None:
        if self.site is None:
            return
        if self._auto_name:
            self._last_auto = str(self._default())
            self.query_one("#export-target", Input).value = self._last_auto
        self._reset_confirm()

    def _reset_confirm(self) -> None:
        self._confirm = None
        self.query_one("#export-write", Button).label = "Write"
        if self.target.exists():
            self._status(f"{self.target.name} exists; Write will ask before replacing it.")
        else:
            self._status("")

    @on(RadioSet.Changed, "#export-kind")
    def _kind_changed(self, event: RadioSet.Changed) -> None:
        self.kind = KINDS[event.index]
        self._refresh_name()

    @on(RadioSet.Changed, "#export-format")
    def _format_changed(self, event: RadioSet.Changed) -> None:
        self.fmt = FORMATS[event.index]
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
                self.query_one("#export-write", Button).label = "Replace"
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
        kind, fmt = self.kind, self.fmt
        try:
            site = await asyncio.to_thread(load_site, self.site_path)
            path = await asyncio.to_thread(write_report, site, kind, fmt, target, force=force)
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
        button.label = "Write"
        self._status(f"Not written: {message}", error=True)

    def _status(self, text: str, error: bool = False) -> None:
        status = self.query_one("#export-status", Static)
        status.update(text)
        status.set_class(error, "export-error")
