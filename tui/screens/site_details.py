"""Edit the facts about a site and its supply; dismiss with a validated SiteInfo."""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from pydantic import ValidationError
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.screen import ModalScreen
from textual.widget import Widget
from textual.widgets import Button, Checkbox, Input, Label, Select, Static, TextArea

from model.rules.limits import RULE_SETS
from model.site.messages import error_text
from model.site.models import SiteFile, SiteInfo, TrendSettings
from model.site.numbers import parse_number

EARTHING_CHOICES = ("TN-S", "TN-C-S", "TT", "IT")


@dataclass(frozen=True)
class NumberField:
    """A numeric form field: the SiteInfo field it fills and how it is shown."""

    key: str
    label: str
    unit: str
    required: bool
    help: str = ""


NUMBER_FIELDS: tuple[NumberField, ...] = (
    NumberField("u0_v", "U0", "V", True, "nominal line-to-earth voltage, e.g. 230"),
    NumberField("ze_ohm", "Ze", "Ω", False, "external earth fault loop impedance, measured"),
    NumberField(
        "ra_ohm",
        "RA",
        "Ω",
        False,
        "earth electrode + protective conductor; needed for RA × IΔn ≤ 50 V (BS 7671 411.5.3)",
    ),
    NumberField(
        "growth_pct", "Trend: growth flagged", "%", True, "trip time growth since last visit"
    ),
    NumberField("min_ms", "Trend: smallest growth", "ms", True, "growth below this is not flagged"),
)
_BY_KEY = {f.key: f for f in NUMBER_FIELDS}

#: Which earthing systems show which impedance field.
SHOWN_FOR: dict[str, frozenset[str]] = {
    "ze_ohm": frozenset({"TN-S", "TN-C-S", "IT"}),
    "ra_ohm": frozenset({"TT", "IT"}),
}

TEXT_LABELS = {"name": "Name", "address": "Address", "client": "Client", "notes": "Notes"}


def field_number(field: NumberField, text: str) -> float | None:
    """The number typed in a field, or None when left empty.  ValueError in plain words."""
    try:
        value = parse_number(text)
    except ValueError as exc:
        raise ValueError(f"{field.label}: {exc}") from None
    if value is None and field.required:
        raise ValueError(f"{field.label} is needed ({field.unit})")
    return value


def plain_message(err: Any, label: str, unit: str, given: Any) -> str:
    """A pydantic error on one field, in plain words."""
    kind = err.get("type", "")
    ctx = err.get("ctx") or {}
    u = f" {unit}" if unit else ""
    you = f" (you entered {given:g})" if isinstance(given, float) else ""
    if kind == "greater_than_equal":
        return f"{label} must be at least {ctx['ge']:g}{u}{you}"
    if kind == "greater_than":
        return f"{label} must be more than {ctx['gt']:g}{u}{you}"
    if kind == "less_than_equal":
        return f"{label} must be at most {ctx['le']:g}{u}{you}"
    if kind == "less_than":
        return f"{label} must be less than {ctx['lt']:g}{u}{you}"
    if kind == "string_too_short":
        return f"{label} must not be empty"
    if kind == "string_too_long":
        return f"{label} is too long (at most {ctx['max_length']} characters)"
    msg = error_text(err, "is not valid")
    return f"{label}: {msg}"


def _fmt(value: float | None) -> str:
    return "" if value is None else f"{value:g}"


class SiteDetailsScreen(ModalScreen[SiteInfo | None]):
    """A form for the site's name, client, supply and rule set."""

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
                    Select(
                        [(e, e) for e in EARTHING_CHOICES],
                        value=info.earthing,
                        allow_blank=False,
                        id="f-earthing",
                        compact=True,
                    ),
                )
                values = {
                    "u0_v": info.u0_v,
                    "ze_ohm": info.ze_ohm,
                    "ra_ohm": info.ra_ohm,
                    "growth_pct": info.trend.growth_pct,
                    "min_ms": info.trend.min_ms,
                }
                for f in NUMBER_FIELDS[:3]:
                    yield from self._row(
                        f.key,
                        f"{f.label} [{f.unit}]",
                        Input(_fmt(values[f.key]), id=f"f-{f.key}", compact=True),
                        f.help,
                    )
                yield from self._row(
                    "rules",
                    "Rule set",
                    Select(
                        [(rs.title, name) for name, rs in RULE_SETS.items()],
                        value=info.rules,
                        allow_blank=False,
                        id="f-rules",
                        compact=True,
                    ),
                )
                yield from self._row(
                    "domestic",
                    "Dwelling",
                    Checkbox(
                        "domestic (lighting rule BS 7671 411.3.4)",
                        info.domestic,
                        id="f-domestic",
                        compact=True,
                    ),
                )
                for f in NUMBER_FIELDS[3:]:
                    yield from self._row(
                        f.key,
                        f"{f.label} [{f.unit}]",
                        Input(_fmt(values[f.key]), id=f"f-{f.key}", compact=True),
                        f.help,
                    )
                yield from self._row(
                    "notes", "Notes", TextArea(info.notes, id="f-notes", compact=True)
                )
            with Horizontal(id="site-buttons"):
                yield Button("Save (Ctrl+S)", id="site-save", variant="primary", compact=True)
                yield Button("Cancel (Esc)", id="site-cancel", compact=True)

    def on_mount(self) -> None:
        self._show_for_earthing(self.info.earthing)
        self.query_one("#f-name", Input).focus()

    def _show_for_earthing(self, earthing: str) -> None:
        for key, shown in SHOWN_FOR.items():
            self.query_one(f"#row-{key}").display = earthing in shown

    @on(Select.Changed, "#f-earthing")
    def _earthing_changed(self, event: Select.Changed) -> None:
        if isinstance(event.value, str):
            self._show_for_earthing(event.value)

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
        errors: dict[str, str] = {}
        numbers: dict[str, float | None] = {}
        for f in NUMBER_FIELDS:
            try:
                numbers[f.key] = field_number(f, self.query_one(f"#f-{f.key}", Input).value)
            except ValueError as exc:
                errors[f.key] = str(exc)
        if errors:
            return None, errors
        data: dict[str, Any] = {
            "name": self.query_one("#f-name", Input).value.strip(),
            "address": self.query_one("#f-address", Input).value.strip(),
            "client": self.query_one("#f-client", Input).value.strip(),
            "earthing": self.query_one("#f-earthing", Select).value,
            "u0_v": numbers["u0_v"],
            "ze_ohm": numbers["ze_ohm"],
            "ra_ohm": numbers["ra_ohm"],
            "rules": self.query_one("#f-rules", Select).value,
            "domestic": self.query_one("#f-domestic", Checkbox).value,
            "trend": {"growth_pct": numbers["growth_pct"], "min_ms": numbers["min_ms"]},
            "notes": self.query_one("#f-notes", TextArea).text,
        }
        try:
            data["trend"] = TrendSettings.model_validate(data["trend"])
        except ValidationError as exc:
            for err in exc.errors():
                key = str(err["loc"][0])
                f = _BY_KEY[key]
                errors.setdefault(key, plain_message(err, f.label, f.unit, numbers[key]))
            return None, errors
        try:
            return SiteInfo.model_validate(data), {}
        except ValidationError as exc:
            for err in exc.errors():
                key = str(err["loc"][0]) if err["loc"] else "name"
                if key in _BY_KEY:
                    f = _BY_KEY[key]
                    msg = plain_message(err, f.label, f.unit, numbers[key])
                else:
                    label = TEXT_LABELS.get(key, key.replace("_", " ").capitalize())
                    msg = plain_message(err, label, "", None)
                errors.setdefault(key, msg)
            return None, errors

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
