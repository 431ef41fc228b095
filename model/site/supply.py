"""The site details form: which supply fields an earthing system shows, and reading the form.

The numbers of the form (U0, Ze, RA and the trend thresholds) take their unit
and whether they may be left empty from :class:`~model.site.models.SiteInfo`;
what a form holds is turned into a validated ``SiteInfo`` or into messages in
plain words, keyed by the field they concern.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any

from pydantic import BaseModel, ValidationError

from model.site.fields import field_specs
from model.site.messages import plain_message
from model.site.models import SiteInfo, TrendSettings
from model.site.numbers import parse_number


@dataclass(frozen=True)
class NumberField:
    """A number of the site details form: the field it fills and how it is named."""

    key: str
    label: str
    unit: str
    required: bool
    help: str = ""


def _number(model: type[BaseModel], key: str, label: str, help_text: str) -> NumberField:
    spec = next(s for s in field_specs(model) if s.name == key)
    return NumberField(key, label, spec.unit, not spec.optional, help_text)


#: The supply's numbers, in form order.
SUPPLY_NUMBERS: tuple[NumberField, ...] = (
    _number(SiteInfo, "u0_v", "U0", "nominal line-to-earth voltage, e.g. 230"),
    _number(SiteInfo, "ze_ohm", "Ze", "external earth fault loop impedance, measured"),
    _number(
        SiteInfo,
        "ra_ohm",
        "RA",
        "earth electrode + protective conductor; needed for RA × IΔn ≤ 50 V (BS 7671 411.5.3)",
    ),
)
#: The trend thresholds, in form order.
TREND_NUMBERS: tuple[NumberField, ...] = (
    _number(
        TrendSettings, "growth_pct", "Trend: growth flagged", "trip time growth since last visit"
    ),
    _number(TrendSettings, "min_ms", "Trend: smallest growth", "growth below this is not flagged"),
    _number(
        TrendSettings,
        "limit_share_pct",
        "Trend: rise vs limit",
        "rise over this share of the band's maximum is flagged; empty: off",
    ),
    _number(
        TrendSettings,
        "top_pct",
        "Trend: top of band",
        "a time rising into this top part of the band is flagged; empty: off",
    ),
)
NUMBER_FIELDS: tuple[NumberField, ...] = SUPPLY_NUMBERS + TREND_NUMBERS
_BY_KEY = {f.key: f for f in NUMBER_FIELDS}

#: The earthing systems for which each impedance field applies (the others hide it).
SHOWN_FOR: dict[str, frozenset[str]] = {
    "ze_ohm": frozenset({"TN-S", "TN-C-S", "IT"}),
    "ra_ohm": frozenset({"TT", "IT"}),
}

#: The text fields of the form, by name.
TEXT_LABELS = {"name": "Name", "address": "Address", "client": "Client", "notes": "Notes"}


def shown_fields(earthing: str) -> dict[str, bool]:
    """Whether each earthing-dependent field applies under this earthing system."""
    return {key: earthing in systems for key, systems in SHOWN_FOR.items()}


def field_number(field: NumberField, text: str) -> float | None:
    """The number typed in a field, or None when left empty.  ValueError in plain words."""
    try:
        value = parse_number(text)
    except ValueError as exc:
        raise ValueError(f"{field.label}: {exc}") from None
    if value is None and field.required:
        raise ValueError(f"{field.label} is needed ({field.unit})")
    return value


def site_info_from_form(form: Mapping[str, Any]) -> tuple[SiteInfo | None, dict[str, str]]:
    """The ``SiteInfo`` a filled-in form describes, or the problems by field key.

    ``form`` holds the text typed in each number field (by key) and the form's
    other values as they are: ``name``, ``address``, ``client`` and ``notes``
    text, the ``earthing`` and ``rules`` chosen and the ``domestic`` flag.
    Names and the like are taken without surrounding spaces, notes as typed.
    """
    errors: dict[str, str] = {}
    numbers: dict[str, float | None] = {}
    for f in NUMBER_FIELDS:
        try:
            numbers[f.key] = field_number(f, form[f.key])
        except ValueError as exc:
            errors[f.key] = str(exc)
    if errors:
        return None, errors
    data: dict[str, Any] = {
        "name": form["name"].strip(),
        "address": form["address"].strip(),
        "client": form["client"].strip(),
        "earthing": form["earthing"],
        "u0_v": numbers["u0_v"],
        "ze_ohm": numbers["ze_ohm"],
        "ra_ohm": numbers["ra_ohm"],
        "rules": form["rules"],
        "domestic": form["domestic"],
        "trend": {f.key: numbers[f.key] for f in TREND_NUMBERS},
        "notes": form["notes"],
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
