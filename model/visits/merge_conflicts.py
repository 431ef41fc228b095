"""What two copies of a site disagree on, and the user's side for each.

A :class:`Conflict` holds both versions as JSON values; the user settles it by
choosing ``"ours"`` (the base copy) or ``"theirs"`` (the other copy).
:class:`Accounted` says where one recorded value of one input went.
:func:`version_text` writes one version short enough for one line.
"""

from __future__ import annotations

import json
from dataclasses import dataclass
from typing import Any, Literal

from model.site.terms import choices_of

Choice = Literal["ours", "theirs"]
CHOICES: tuple[Choice, ...] = choices_of(Choice)
ConflictKind = Literal["site", "node", "node-parent", "visit", "reading"]


class MergeError(ValueError):
    """The merge cannot be completed as asked; ``str()`` is one line for a user."""


@dataclass(frozen=True, slots=True)
class Conflict:
    """One thing the two copies disagree on.

    ``id`` is unique within a merge and is the key of the user's choice.
    ``ours`` and ``theirs`` are the two versions as JSON values (None where a
    copy has nothing).
    """

    id: str
    kind: ConflictKind
    what: str
    where: str
    ours: Any
    theirs: Any

    def differences(self) -> list[tuple[str, Any, Any]]:
        """(field, ours, theirs) for each field that differs, when both sides are objects."""
        return differences(self.ours, self.theirs)

    def as_json(self) -> dict[str, Any]:
        return {
            "id": self.id,
            "kind": self.kind,
            "what": self.what,
            "where": self.where,
            "ours": self.ours,
            "theirs": self.theirs,
        }


def differences(ours: Any, theirs: Any) -> list[tuple[str, Any, Any]]:
    """(field, ours, theirs) for each field that differs between two JSON objects.

    Fields in ``ours``' order, then those only ``theirs`` has.  Anything but
    two objects is one difference named ``value``.
    """
    if not isinstance(ours, dict) or not isinstance(theirs, dict):
        return [("value", ours, theirs)]
    names = list(ours) + [k for k in theirs if k not in ours]
    return [(k, ours.get(k), theirs.get(k)) for k in names if ours.get(k) != theirs.get(k)]


@dataclass(frozen=True, slots=True)
class Accounted:
    """Where one recorded value of one input's reading went."""

    source: Choice
    visit: str
    device: str
    key: str
    value: Any
    outcome: Literal["in result", "conflict"]
    conflict: str | None = None

    def as_json(self) -> dict[str, Any]:
        return {
            "source": self.source,
            "visit": self.visit,
            "device": self.device,
            "key": self.key,
            "value": self.value,
            "outcome": self.outcome,
            "conflict": self.conflict,
        }


def version_text(value: Any, width: int) -> str:
    """One version of a conflict for one line: its JSON, cut to ``width`` with '...'."""
    text = "(absent)" if value is None else json.dumps(value, ensure_ascii=False)
    return text if len(text) <= width else text[: width - 3] + "..."
