"""Form descriptions derived from the site models (no Textual here).

The node editor builds one field per model field of the node's kind, so the
form shows exactly the fields that kind has, with the unit taken from the
field's description and choices taken from its ``Literal`` type.
"""

from __future__ import annotations

import re
import types
import typing
from dataclasses import dataclass
from typing import Any, Literal, Union

from pydantic import BaseModel, ValidationError

from model.site.messages import error_text

FieldKind = Literal["text", "number", "choice", "flag", "flags"]

#: Fields the editor never shows (set by the tree, not typed).
HIDDEN_FIELDS = frozenset({"parent", "kind"})

TITLES: dict[str, str] = {
    "id": "Id",
    "label": "Label",
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
}

_UNIT_RE = re.compile(r"\[([^\]]+)\]\s*$")


@dataclass(frozen=True)
class FieldSpec:
    """One field of a node form."""

    name: str
    title: str
    kind: FieldKind
    optional: bool
    required: bool
    choices: tuple[str, ...]
    unit: str
    help: str
    default: Any


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


def field_specs(cls: type[BaseModel]) -> list[FieldSpec]:
    """The editable fields of a node class, in model order (id first)."""
    out: list[FieldSpec] = []
    for name, info in cls.model_fields.items():
        if name in HIDDEN_FIELDS:
            continue
        inner, optional = _unwrap(info.annotation)
        origin = typing.get_origin(inner)
        choices: tuple[str, ...] = ()
        kind: FieldKind
        if origin is Literal:
            kind, choices = "choice", tuple(str(a) for a in typing.get_args(inner))
        elif origin is list:
            kind = "flags"
            item = _strip_annotated(typing.get_args(inner)[0])
            choices = tuple(str(a) for a in typing.get_args(item))
        elif inner is bool:
            kind = "flag"
        elif inner in (float, int):
            kind = "number"
        else:
            kind = "text"
        desc = info.description or ""
        m = _UNIT_RE.search(desc)
        unit = m.group(1) if m else ""
        help_text = _UNIT_RE.sub("", desc).strip()
        default = None if info.is_required() else info.get_default(call_default_factory=True)
        out.append(
            FieldSpec(
                name=name,
                title=TITLES.get(name, name.replace("_", " ").capitalize()),
                kind=kind,
                optional=optional,
                required=info.is_required(),
                choices=choices,
                unit=unit,
                help=help_text,
                default=default,
            )
        )
    out.sort(key=lambda f: f.name == "notes")
    return out


def errors_by_field(exc: ValidationError) -> dict[str, str]:
    """Validation messages keyed by the first field name of their location ('' for the whole)."""
    out: dict[str, str] = {}
    for err in exc.errors():
        loc = err.get("loc", ())
        key = str(loc[0]) if loc else ""
        msg = error_text(err)
        out.setdefault(key, msg)
    return out
