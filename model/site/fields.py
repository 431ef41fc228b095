"""Form fields derived from the site models: what a form shows and how typed text is read.

A form shows exactly the fields a model has: the unit comes from the field's
description (``"Rated current. [A]"``), the choices from its ``Literal`` type,
and validation messages are keyed back to the field they concern.  The one
home of every choice list is the model's ``Literal`` types (see :func:`annotation_choices`).
"""

from __future__ import annotations

import re
import types
import typing
from dataclasses import dataclass
from typing import Any, Literal, Union

from pydantic import BaseModel, ValidationError

from model.site.messages import error_text, plain_message
from model.site.numbers import parse_number
from model.site.terms import ID_RULE, choices_of

FieldKind = Literal["text", "number", "choice", "flag", "flags"]

#: Shared optional fields (fault level, maker's and table data) shown after a node's own.
LATE_FIELDS = frozenset({"pscc_ka", "conditional_ka", "breaking_ka", "ia_a", "zs_max_ohm"})

#: Fields a form never shows (set by the tree, not typed).
HIDDEN_FIELDS = frozenset({"parent", "kind"})

#: The name of each node field as the inspector knows it.
FIELD_TITLES: dict[str, str] = {
    "id": "Id",
    "label": "Label",
    "way": "Way",
    "notes": "Notes",
    "place": "Place",
    "rated_a": "Rated current In",
    "curve": "Curve",
    "idn_ma": "IΔn",
    "waveform": "Type (waveform)",
    "delay": "Delay",
    "delay_ms": "Set delay",
    "max_break_ms": "Max break time",
    "use": "Use",
    "loads": "Loads",
    "location": "Special locations",
    "concealed_shallow": "Concealed < 50 mm",
    "leakage_ma": "Standing leakage",
    "zs_ohm": "Zs",
    "date": "Date",
    "inspector": "Inspector",
    "instrument": "Instrument",
    "fuse_type": "Fuse type",
    "breaking_ka": "Breaking capacity",
    "ia_a": "Ia (operates in time)",
    "zs_max_ohm": "Zs maximum (table)",
    "pscc_ka": "Prospective fault current",
    "conditional_ka": "Conditional rating",
    "ir_a": "Ir",
    "isd_a": "Isd",
    "tsd_s": "tsd",
    "ii_a": "Ii",
}

#: Internal field names as they may appear inside a model's own message.
_NAME_RE = re.compile(r"\b(" + "|".join(sorted(FIELD_TITLES, key=len, reverse=True)) + r")\b")
#: Names that are also plain words and are left alone inside a message.
_PLAIN_WORDS = frozenset({"id", "label", "notes", "place", "curve", "delay", "use", "loads"})
_BOUND_ERRORS = frozenset({"greater_than", "greater_than_equal", "less_than", "less_than_equal"})

_UNIT_RE = re.compile(r"\[([^\]]+)\]\s*$")


@dataclass(frozen=True)
class FieldSpec:
    """One field of a form."""

    name: str
    title: str
    kind: FieldKind
    optional: bool
    required: bool
    choices: tuple[str, ...]
    unit: str
    help: str
    default: Any


def unit_and_help(description: str) -> tuple[str, str]:
    """A field description split into its unit and its help text.

    ``"Rated current. [A]"`` gives ``("A", "Rated current.")``; a description
    without a trailing ``[unit]`` has no unit.
    """
    m = _UNIT_RE.search(description)
    return (m.group(1) if m else ""), _UNIT_RE.sub("", description).strip()


def _strip_annotated(tp: Any) -> Any:
    while typing.get_origin(tp) is typing.Annotated:
        tp = typing.get_args(tp)[0]
    return tp


def _unwrap(tp: Any) -> tuple[Any, bool]:
    """(inner type, allows None)."""
    tp = _strip_annotated(tp)
    origin = typing.get_origin(tp)
    if origin in (Union, types.UnionType):
        args = [a for a in typing.get_args(tp) if a is not type(None)]
        optional = len(args) != len(typing.get_args(tp))
        if len(args) == 1:
            return _strip_annotated(args[0]), optional
        return tp, optional
    return tp, False


def annotation_choices(tp: Any) -> tuple[str, ...]:
    """The choices of a field's type annotation (``()`` when it is not a choice).

    ``Annotated`` wrappers and ``None`` are looked through, so an optional choice
    field gives its choices too; the choices themselves come from
    :func:`model.site.terms.choices_of`.
    """
    inner, _ = _unwrap(tp)
    if typing.get_origin(inner) is not Literal:
        return ()
    return tuple(str(a) for a in choices_of(inner))


def field_choices(cls: type[BaseModel], name: str) -> tuple[str, ...]:
    """The choices of one field of a model (e.g. a reading's test button)."""
    return annotation_choices(cls.model_fields[name].annotation)


def field_specs(cls: type[BaseModel]) -> list[FieldSpec]:
    """The editable fields of a model, in model order (the way just after the label, notes last)."""
    out: list[FieldSpec] = []
    for name, info in cls.model_fields.items():
        if name in HIDDEN_FIELDS:
            continue
        inner, optional = _unwrap(info.annotation)
        origin = typing.get_origin(inner)
        options: tuple[str, ...] = ()
        kind: FieldKind
        if origin is Literal:
            kind, options = "choice", annotation_choices(inner)
            options = _limited(cls, name, options)
        elif origin is list:
            item = typing.get_args(inner)[0]
            if isinstance(item, type) and issubclass(item, BaseModel):
                continue  # a table of rows (maker's data): kept as it is, not a form field
            kind, options = "flags", annotation_choices(item)
        elif inner is bool:
            kind = "flag"
        elif inner in (float, int):
            kind = "number"
        else:
            kind = "text"
        unit, help_text = unit_and_help(info.description or "")
        default = None if info.is_required() else info.get_default(call_default_factory=True)
        out.append(
            FieldSpec(
                name=name,
                title=field_title(name),
                kind=kind,
                optional=optional,
                required=info.is_required(),
                choices=options,
                unit=unit,
                help=help_text,
                default=default,
            )
        )
    out.sort(
        key=lambda f: (
            f.name == "notes",
            f.name in LATE_FIELDS,
            0 if f.name in ("id", "label", "way") else 1,
        )
    )
    return out


def _limited(cls: type[BaseModel], name: str, options: tuple[str, ...]) -> tuple[str, ...]:
    """The choices a kind of node allows for one field (its ``CHOICE_LIMITS``), in order."""
    limits: dict[str, tuple[str, ...]] = getattr(cls, "CHOICE_LIMITS", {})
    allowed = limits.get(name)
    return options if allowed is None else tuple(o for o in options if o in allowed)


def field_title(name: str) -> str:
    """The name of a field as the inspector knows it ('idn_ma' -> 'IΔn')."""
    return FIELD_TITLES.get(name, name.replace("_", " ").capitalize())


def in_words(message: str) -> str:
    """A model's message with its internal field names put as their titles.

    ``"idn_ma 0.03 looks like amps"`` becomes ``"IΔn 0.03 looks like amps"``;
    names that are plain words already ("delay", "use") are left as they are.
    """

    def title(m: re.Match[str]) -> str:
        word = m.group(1)
        return word if word in _PLAIN_WORDS else FIELD_TITLES[word]

    return _NAME_RE.sub(title, message)


def form_message(err: Any, cls: type[BaseModel] | None = None) -> str:
    """One validation problem of a form field in plain words, naming the field by its title.

    An id that does not fit is told the rule in words (never the pattern); a number
    out of its range is told the range with its unit and what was typed.
    """
    loc = err.get("loc", ())
    name = str(loc[0]) if loc else ""
    kind = err.get("type", "")
    title = field_title(name)
    if kind == "string_pattern_mismatch" and name in ("id", "parent"):
        return f"{title}: {ID_RULE}"
    if kind in _BOUND_ERRORS and cls is not None and name in cls.model_fields:
        unit, _ = unit_and_help(cls.model_fields[name].description or "")
        return plain_message(err, title, unit, err.get("input"))
    return in_words(error_text(err))


def typed_value(spec: FieldSpec, text: str) -> Any:
    """The value typed into a text or number field; ValueError, in plain words, when unusable.

    A number is read by :func:`model.site.numbers.parse_number`; an empty
    number is None where the field allows it and refused where it does not.
    An id is taken without surrounding spaces; other text exactly as typed.
    """
    if spec.kind == "number":
        number = parse_number(text)
        if number is None and not spec.optional:
            raise ValueError("a value is needed")
        return number
    return text.strip() if spec.name == "id" else text


def errors_by_field(exc: ValidationError, cls: type[BaseModel] | None = None) -> dict[str, str]:
    """Validation messages in plain words (:func:`form_message`), keyed by the first field
    name of their location ('' for the whole)."""
    out: dict[str, str] = {}
    for err in exc.errors():
        loc = err.get("loc", ())
        key = str(loc[0]) if loc else ""
        out.setdefault(key, form_message(err, cls))
    return out


def check_form(
    cls: type[BaseModel], data: dict[str, Any], unreadable: dict[str, str]
) -> tuple[BaseModel | None, dict[str, str]]:
    """Validate a form's data with its model: the model, or every message by field.

    ``unreadable`` holds the fields whose text could not be read at all; their
    messages come first and win over the model's for the same field.  The
    model is returned only when there is no message at all.
    """
    errors = dict(unreadable)
    try:
        value = cls.model_validate(data)
    except ValidationError as exc:
        for key, message in errors_by_field(exc, cls).items():
            errors.setdefault(key, message)
        return None, errors
    return (value, {}) if not errors else (None, errors)
