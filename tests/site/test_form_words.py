"""Forms offer only what a kind allows, and speak of fields by their names, not the file's keys."""

from __future__ import annotations

from model.site.fields import check_form, field_specs, in_words
from model.site.models import Visit
from model.site.nodes import NODE_CLASSES
from model.site.terms import ID_RULE


def _spec(kind: str, name: str):  # type: ignore[no-untyped-def]
    return next(s for s in field_specs(NODE_CLASSES[kind]) if s.name == name)


def test_only_a_cbr_is_offered_a_set_delay() -> None:
    # a declared ("set") delay is a CBR's adjustable relay setting (IEC 60947-2 Annex B);
    # an RCCB or RCBO is general or type S only (IEC 61008-1 / IEC 61009-1)
    for kind in ("rccb", "rcbo", "srcd", "prcd"):
        assert _spec(kind, "delay").choices == ("general", "S")
    assert _spec("cbr", "delay").choices == ("general", "S", "set")


def test_every_offered_choice_is_accepted() -> None:
    for kind in ("rccb", "rcbo", "cbr"):
        for delay in _spec(kind, "delay").choices:
            data = {"id": "r1", "parent": "o", "kind": kind, "idn_ma": 300.0}
            data |= {"waveform": "A", "delay": delay, "rated_a": 63.0}
            if delay == "set":
                data["delay_ms"] = 150.0
            node, errors = check_form(NODE_CLASSES[kind], data, {})
            assert node is not None, (kind, delay, errors)


def test_a_bad_id_is_told_the_rule_in_words() -> None:
    data = {"id": "bad id!", "parent": "o", "kind": "board"}
    _node, errors = check_form(NODE_CLASSES["board"], data, {})
    assert errors["id"] == f"Id: {ID_RULE}"
    assert "^[" not in errors["id"] and "letters, digits, dot, dash or underscore" in ID_RULE


def test_idn_in_amps_names_the_field_by_its_symbol() -> None:
    data = {"id": "r1", "parent": "o", "kind": "rccb", "idn_ma": 0.03, "waveform": "A"}
    _node, errors = check_form(NODE_CLASSES["rccb"], data, {})
    assert "idn_ma" not in errors["idn_ma"]
    assert errors["idn_ma"].startswith("IΔn 0.03 looks like amps")


def test_a_range_names_the_field_and_unit() -> None:
    data = {"id": "c1", "parent": "o", "kind": "circuit", "use": "other", "zs_ohm": -1.0}
    _node, errors = check_form(NODE_CLASSES["circuit"], data, {})
    assert errors["zs_ohm"] == "Zs must be more than 0 Ω (you entered -1)"


def test_model_messages_name_fields_in_words() -> None:
    assert in_words("delay_ms and max_break_ms apply only when delay is 'set'") == (
        "Set delay and Max break time apply only when delay is 'set'"
    )
    _v, errors = check_form(Visit, {"id": "v 1", "date": "2026-12-01"}, {})
    assert errors["id"] == f"Id: {ID_RULE}"
