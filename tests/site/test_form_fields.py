"""Form fields from the site models: kinds, units, choices, typed text and messages."""

from __future__ import annotations

from typing import Annotated

import pytest
from pydantic import Field

from model.site.fields import (
    annotation_choices,
    check_form,
    field_choices,
    field_specs,
    typed_value,
    unit_and_help,
)
from model.site.models import Reading, SiteInfo
from model.site.nodes import NODE_CLASSES
from model.site.terms import CircuitUse, Delay, Earthing, RuleSetName, TestWaveform, Waveform

RCCB = NODE_CLASSES["rccb"]
CIRCUIT = NODE_CLASSES["circuit"]


def test_choices_come_from_the_literal_types() -> None:
    assert annotation_choices(Earthing) == ("TN-S", "TN-C-S", "TT", "IT")
    assert annotation_choices(RuleSetName) == ("uk-bs7671-2022", "iec-60364")
    assert annotation_choices(Waveform) == ("AC", "A", "F", "B")
    assert annotation_choices(Delay) == ("general", "S", "set")
    assert annotation_choices(TestWaveform) == ("AC", "half-wave", "smooth-dc")
    assert annotation_choices(CircuitUse)[:2] == ("sockets", "lighting")
    assert annotation_choices(
        Annotated[Earthing, Field(description="x")] | None
    ) == annotation_choices(Earthing)
    assert annotation_choices(str) == ()
    assert annotation_choices(float | None) == ()


def test_field_choices_of_a_reading() -> None:
    assert field_choices(Reading, "button") == ("worked", "failed")
    assert field_choices(Reading, "waveform") == ("AC", "half-wave", "smooth-dc")
    assert field_choices(SiteInfo, "earthing") == ("TN-S", "TN-C-S", "TT", "IT")


def test_unit_and_help() -> None:
    assert unit_and_help("Rated current. [A]") == ("A", "Rated current.")
    assert unit_and_help("Measured earth fault loop impedance Zs. [Ω]  ") == (
        "Ω",
        "Measured earth fault loop impedance Zs.",
    )
    assert unit_and_help("Free notes.") == ("", "Free notes.")
    assert unit_and_help("") == ("", "")


def test_field_specs_of_an_rccb() -> None:
    specs = {s.name: s for s in field_specs(RCCB)}
    assert list(specs) == ["id", "label", "way", "idn_ma", "waveform", "delay", "rated_a", "notes"]
    assert specs["way"].kind == "text" and specs["way"].default == ""
    assert "parent" not in specs and "kind" not in specs  # set by the tree, never typed
    idn = specs["idn_ma"]
    assert (idn.title, idn.kind, idn.unit, idn.required, idn.optional) == (
        "IΔn",
        "number",
        "mA",
        True,
        False,
    )
    assert specs["waveform"].choices == annotation_choices(Waveform)
    assert specs["delay"].default == "general"
    assert specs["rated_a"].optional and specs["rated_a"].unit == "A"


def test_field_specs_of_a_circuit() -> None:
    specs = {s.name: s for s in field_specs(CIRCUIT)}
    assert specs["loads"].kind == "flags" and "inverter" in specs["loads"].choices
    assert specs["loads"].default == []
    assert specs["concealed_shallow"].kind == "flag"
    assert specs["zs_ohm"].title == "Zs" and specs["zs_ohm"].unit == "Ω"
    assert list(specs)[-1] == "notes"


def test_typed_value() -> None:
    specs = {s.name: s for s in field_specs(RCCB)}
    assert typed_value(specs["idn_ma"], "30") == 30.0
    assert typed_value(specs["idn_ma"], "0,5") == 0.5  # either decimal mark
    assert typed_value(specs["rated_a"], "") is None  # may be left empty
    with pytest.raises(ValueError, match="a value is needed"):
        typed_value(specs["idn_ma"], " ")
    with pytest.raises(ValueError, match="is not a number"):
        typed_value(specs["idn_ma"], "30mA")
    assert typed_value(specs["id"], " rc9 ") == "rc9"
    assert typed_value(specs["label"], " Hall ") == " Hall "


def test_check_form_keys_messages_by_field() -> None:
    data = {"kind": "rccb", "parent": "cu", "id": "rc9", "idn_ma": 30.0, "waveform": "A"}
    node, errors = check_form(RCCB, data, {})
    assert errors == {} and node is not None and node.model_dump()["idn_ma"] == 30.0
    # a rating given in amps is refused by the model at its field
    node, errors = check_form(RCCB, {**data, "idn_ma": 0.03}, {})
    assert node is None and "looks like amps" in errors["idn_ma"]
    # text that could not be read wins over the model's message for the same field
    node, errors = check_form(RCCB, {**data, "id": "bad id!"}, {"rated_a": "a value is needed"})
    assert node is None
    assert errors["rated_a"] == "a value is needed" and "id" in errors
    _, errors = check_form(RCCB, data, {"rated_a": "'x' is not a number"})
    assert errors == {"rated_a": "'x' is not a number"}
