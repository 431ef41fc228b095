"""Edit the facts about a site and its supply; dismiss with a validated SiteInfo."""

from __future__ import annotations

from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.widget import Widget
from textual.widgets import Button, Input, Label, Static, TextArea

from model.rules.limits import RULE_SETS
from model.site.models import SiteFile, SiteInfo
from model.site.numbers import number_text
from model.site.supply import (
    NUMBER_FIELDS,
    SUPPLY_NUMBERS,
    TEXT_LABELS,
    TREND_NUMBERS,
    NumberField,
    shown_fields,
    site_info_from_form,
)
from model.site.terms import Earthing, RuleSetName, choices_of
from tui.screens.closing import Dialog
from tui.widgets.choice_row import ChoiceRow
from tui.widgets.tick_box import TickBox


def _fmt(value: float | None) -> str:
    return "" if value is None else number_text(value)


class SiteDetailsScreen(Dialog[SiteInfo | None]):
    """A form for the site's name, client, supply and rule set.

    Enter moves to the next field (in the notes it starts a new line); Ctrl+S saves.
    """

    BINDINGS = [
        Binding("ctrl+s", "save", "Save"),
        Binding("escape", "cancel", "Cancel"),
    ]

    CSS_PATH = "site_details.tcss"

    def __init__(self, site: SiteFile) -> None:
        super().__init__()
        self.site = site
        self.info: SiteInfo = site.site

    def _row(self, key: str, label: str, widget: Widget, help_text: str = "") -> ComposeResult:
        with Vertical(id=f"row-{key}", classes="field-row"):
            with Horizontal(classes="field-line"):
                yield Label(label, classes="field-label", markup=False)
                yield widget
            if help_text:
                yield Static(help_text, classes="field-help", markup=False)
            yield Static("", id=f"err-{key}", classes="field-error", markup=False)

    def _numbers(
        self, fields: tuple[NumberField, ...], values: dict[str, float | None]
    ) -> ComposeResult:
        for f in fields:
            yield from self._row(
                f.key,
                f"{f.label} [{f.unit}]",
                Input(_fmt(values[f.key]), id=f"f-{f.key}", compact=True),
                f.help,
            )

    def compose(self) -> ComposeResult:
        info = self.info
        with Vertical(id="site-box"):
            yield Static("Site details", id="site-title", markup=False)
            with VerticalScroll(id="site-form"):
                for key in ("name", "address", "client"):
                    yield from self._row(
                        key,
                        TEXT_LABELS[key],
                        Input(getattr(info, key), id=f"f-{key}", compact=True),
                    )
                yield from self._row(
                    "earthing",
                    "Earthing",
                    ChoiceRow(
                        [(e, e) for e in choices_of(Earthing)], info.earthing, id="f-earthing"
                    ),
                    "a letter picks (t again: the next T…); ← → step",
                )
                values = {
                    "u0_v": info.u0_v,
                    "ze_ohm": info.ze_ohm,
                    "ra_ohm": info.ra_ohm,
                    "growth_pct": info.trend.growth_pct,
                    "min_ms": info.trend.min_ms,
                    "limit_share_pct": info.trend.limit_share_pct,
                    "top_pct": info.trend.top_pct,
                }
                yield from self._numbers(SUPPLY_NUMBERS, values)
                yield from self._row(
                    "rules",
                    "Rule set",
                    ChoiceRow(
                        [(RULE_SETS[name].title, name) for name in choices_of(RuleSetName)],
                        info.rules,
                        id="f-rules",
                    ),
                )
                yield from self._row(
                    "domestic",
                    "Dwelling",
                    TickBox(
                        "domestic (lighting rule BS 7671 411.3.4)",
                        info.domestic,
                        id="f-domestic",
                        compact=True,
                    ),
                    "Space ticks or clears",
                )
                yield from self._numbers(TREND_NUMBERS, values)
                yield from self._row(
                    "notes",
                    "Notes",
                    TextArea(info.notes, id="f-notes", compact=True),
                    "Enter starts a new line here; Tab leaves, Ctrl+S saves",
                )
            with Horizontal(id="site-buttons"):
                yield Button("Save (Ctrl+S)", id="site-save", variant="primary", compact=True)
                yield Button("Cancel (Esc)", id="site-cancel", compact=True)

    def on_mount(self) -> None:
        self._show_for_earthing(self.info.earthing)
        self.query_one("#f-name", Input).focus()

    def _show_for_earthing(self, earthing: str) -> None:
        for key, shown in shown_fields(earthing).items():
            self.query_one(f"#row-{key}").display = shown

    @on(ChoiceRow.Changed, "#f-earthing")
    def _earthing_changed(self, event: ChoiceRow.Changed) -> None:
        if isinstance(event.value, str):
            self._show_for_earthing(event.value)

    @on(Input.Submitted)
    def _submitted(self, event: Input.Submitted) -> None:
        """Enter moves to the next field shown (the rows of another earthing are hidden)."""
        event.stop()
        self.focus_next()

    def _clear_errors(self) -> None:
        for err in self.query(".field-error").results(Static):
            err.update("")
        for w in self.query(".-invalid"):
            w.remove_class("-invalid")

    def _show_error(self, key: str, message: str) -> None:
        self.query_one(f"#err-{key}", Static).update(message)
        widget = self.query_one(f"#f-{key}")
        widget.add_class("-invalid")
        row = self.query_one(f"#row-{key}")
        row.display = True

    def collect(self) -> tuple[SiteInfo | None, dict[str, str]]:
        """The SiteInfo the form describes, or the problems by field key."""
        form: dict[str, object] = {
            key: self.query_one(f"#f-{key}", Input).value
            for key in ("name", "address", "client", *(f.key for f in NUMBER_FIELDS))
        }
        form["earthing"] = self.query_one("#f-earthing", ChoiceRow).value
        form["rules"] = self.query_one("#f-rules", ChoiceRow).value
        form["domestic"] = self.query_one("#f-domestic", TickBox).value
        form["notes"] = self.query_one("#f-notes", TextArea).text
        return site_info_from_form(form)

    def action_save(self) -> None:
        self._clear_errors()
        info, errors = self.collect()
        if info is None:
            for key, message in errors.items():
                self._show_error(key, message)
            first = next(iter(errors))
            self.query_one(f"#f-{first}").focus()
            return
        self.dismiss(info)

    def action_cancel(self) -> None:
        self.dismiss(None)

    @on(Button.Pressed, "#site-save")
    def _save_pressed(self) -> None:
        self.action_save()

    @on(Button.Pressed, "#site-cancel")
    def _cancel_pressed(self) -> None:
        self.action_cancel()
