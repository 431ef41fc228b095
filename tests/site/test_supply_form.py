"""The site details form: fields by earthing system, and the form read into SiteInfo.

U0 limits (50 to 1000 V) are the SiteInfo model's; 230 V is the common
nominal line-to-earth voltage of European low-voltage supplies (IEC 60038).
"""

from __future__ import annotations

from pathlib import Path
from typing import Any

import pytest

from model.site.models import SiteInfo
from model.site.supply import NUMBER_FIELDS, shown_fields, site_info_from_form
from model.storage.sites import load_site

SAMPLE = Path(__file__).resolve().parents[2] / "sample_sites" / "oak-lane-house.json"


def form_of(info: SiteInfo, **typed: Any) -> dict[str, Any]:
    """The form as the screen fills it from ``info``, with some fields retyped."""

    def fmt(v: float | None) -> str:
        return "" if v is None else f"{v:g}"

    form: dict[str, Any] = {
        "name": info.name,
        "address": info.address,
        "client": info.client,
        "earthing": info.earthing,
        "u0_v": fmt(info.u0_v),
        "ze_ohm": fmt(info.ze_ohm),
        "ra_ohm": fmt(info.ra_ohm),
        "rules": info.rules,
        "domestic": info.domestic,
        "growth_pct": fmt(info.trend.growth_pct),
        "min_ms": fmt(info.trend.min_ms),
        "limit_share_pct": fmt(info.trend.limit_share_pct),
        "top_pct": fmt(info.trend.top_pct),
        "notes": info.notes,
    }
    form.update(typed)
    return form


@pytest.fixture(scope="module")
def info() -> SiteInfo:
    return load_site(SAMPLE).site


def test_which_impedance_each_earthing_system_shows() -> None:
    # TT: the electrode resistance RA (BS 7671 411.5.3); TN: the external loop impedance Ze
    assert shown_fields("TT") == {"ze_ohm": False, "ra_ohm": True}
    assert shown_fields("TN-S") == {"ze_ohm": True, "ra_ohm": False}
    assert shown_fields("TN-C-S") == {"ze_ohm": True, "ra_ohm": False}
    assert shown_fields("IT") == {"ze_ohm": True, "ra_ohm": True}


def test_number_fields_take_unit_and_need_from_the_model() -> None:
    fields = {f.key: f for f in NUMBER_FIELDS}
    assert list(fields) == [
        "u0_v",
        "ze_ohm",
        "ra_ohm",
        "growth_pct",
        "min_ms",
        "limit_share_pct",
        "top_pct",
    ]
    assert [(f.label, f.unit, f.required) for f in NUMBER_FIELDS] == [
        ("U0", "V", True),
        ("Ze", "Ω", False),
        ("RA", "Ω", False),
        ("Trend: growth flagged", "%", True),
        ("Trend: smallest growth", "ms", True),
        ("Trend: rise vs limit", "%", False),
        ("Trend: top of band", "%", False),
    ]


def test_unchanged_form_gives_the_same_site_info(info: SiteInfo) -> None:
    assert site_info_from_form(form_of(info)) == (info, {})


def test_a_valid_edit(info: SiteInfo) -> None:
    got, errors = site_info_from_form(
        form_of(info, name=" Oak Lane House ", earthing="TT", ra_ohm="21,5", growth_pct="25")
    )
    assert errors == {}
    assert got == info.model_copy(
        update={
            "name": "Oak Lane House",
            "earthing": "TT",
            "ra_ohm": 21.5,
            "trend": info.trend.model_copy(update={"growth_pct": 25.0}),
        }
    )


def test_refusals_are_keyed_by_field(info: SiteInfo) -> None:
    cases = [
        ("u0_v", "abc", "U0: 'abc' is not a number"),
        ("u0_v", "0.23", "U0 must be at least 50 V (you entered 0.23)"),
        ("u0_v", "", "U0 is needed (V)"),
        ("u0_v", "2000", "U0 must be at most 1000 V (you entered 2000)"),
        ("ze_ohm", "-1", "Ze must be more than 0 Ω (you entered -1)"),
        ("growth_pct", "0", "Trend: growth flagged must be more than 0 % (you entered 0)"),
        ("name", "  ", "Name must not be empty"),
    ]
    for key, text, expected in cases:
        got, errors = site_info_from_form(form_of(info, **{key: text}))
        assert got is None, key
        assert list(errors) == [key], key
        assert errors[key].startswith(expected), (key, errors[key])


def test_an_empty_optional_number_is_none(info: SiteInfo) -> None:
    got, errors = site_info_from_form(form_of(info, ze_ohm=" "))
    assert errors == {} and got is not None and got.ze_ohm is None
