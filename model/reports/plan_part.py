"""The planned remedy as printed: each change in order, the items it clears, what remains.

:func:`build_plan_part` turns a :class:`model.plan.changes.Plan` into plain,
cleaned data for the remedial list, naming the list's items by their numbers
(a finding is matched to its item by :func:`model.plan.changes.finding_key`).
:func:`planned_by_key` gives the words each item shows under its Action.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from dataclasses import dataclass

from model.plan.changes import PLAN_CAUTION, DeviceChange, FindingKey, Plan, finding_key
from model.reports.text import clean

TITLE = "Planned changes"
#: The row of an item that a planned change clears (printed under "Action").
ROW = "Planned change"
LEAD = (
    "Device changes that clear the items named beside each, in the order listed. The plan "
    "was checked against every rule on a copy of the site: no change creates a finding the "
    "site did not have, other than the tests a new device needs before its selectivity can "
    "be shown again. Nothing here has been done: each change is a proposal for the "
    "electrician to quote and for a competent person to confirm, and every new or changed "
    "device needs its own tests after installation."
)
NONE_CLEARED = "No device change clears any of the items: each needs other work (below)."
REMAINING_TITLE = "Not cleared by a device change"


@dataclass(frozen=True)
class PlanStep:
    """One change of the plan, numbered in the plan's order."""

    number: int
    node: str
    text: str
    #: Numbers of the remedial items this change clears.
    items: tuple[int, ...]

    def items_text(self) -> str:
        """'clears item 3' or 'clears items 3, 5'; '' when it names none of the list's items."""
        if not self.items:
            return ""
        word = "item" if len(self.items) == 1 else "items"
        return f"clears {word} {', '.join(str(n) for n in self.items)}"


@dataclass(frozen=True)
class PlanLeft:
    """A finding the plan does not clear, and why no device change does."""

    items: tuple[int, ...]
    message: str
    reason: str

    def items_text(self) -> str:
        if not self.items:
            return ""
        word = "item" if len(self.items) == 1 else "items"
        return f"{word} {', '.join(str(n) for n in self.items)}"


@dataclass(frozen=True)
class PlanPart:
    """The plan as the remedial list prints it."""

    steps: tuple[PlanStep, ...]
    remaining: tuple[PlanLeft, ...]
    caution: str = PLAN_CAUTION
    title: str = TITLE

    @property
    def lead(self) -> str:
        return LEAD if self.steps else NONE_CLEARED

    def summary(self, total: int) -> str:
        """One line for the top of the list: how many items the planned changes clear."""
        cleared = len({n for s in self.steps for n in s.items})
        changes = len(self.steps)
        if not changes:
            return f"No device change clears any of the {total} item(s) (see {self.title})."
        words = "change clears" if changes == 1 else "changes clear"
        return (
            f"{changes} planned device {words} {cleared} of the {total} item(s) "
            f"(see {self.title}; not yet made)."
        )


def change_words(dc: DeviceChange) -> str:
    """The change as printed: its own words, or its fields where it has none."""
    if dc.text:
        return clean(dc.text)
    if dc.removes:
        return clean(f"remove {dc.node} (its circuits stay under the device above it)")
    parts = [f"{fc.field} {_value(fc.before)} → {_value(fc.after)}" for fc in dc.fields]
    return clean(f"change {dc.node}: " + ", ".join(parts))


def _value(v: object) -> str:
    return "none" if v is None else str(v)


def _numbers(keys: Iterable[FindingKey], item_of: Mapping[FindingKey, list[int]]) -> list[int]:
    out: list[int] = []
    for k in keys:
        for n in item_of.get(k, ()):
            if n not in out:
                out.append(n)
    return sorted(out)


def planned_by_key(plan: Plan | None) -> dict[FindingKey, list[tuple[int, str]]]:
    """For each finding the plan clears: (change number, words) of each change that clears it."""
    out: dict[FindingKey, list[tuple[int, str]]] = {}
    if plan is None:
        return out
    for n, dc in enumerate(plan.changes, start=1):
        words = change_words(dc)
        for key in dc.clears:
            entry = (n, words)
            if entry not in out.setdefault(key, []):
                out[key].append(entry)
    return out


def planned_row(entries: list[tuple[int, str]], total: int) -> str:
    """An item's "Planned change" text: each change's words and its place in the plan."""
    return "; ".join(f"{words} (change {n} of {total} in the plan)" for n, words in entries)


def build_plan_part(plan: Plan | None, item_of: Mapping[FindingKey, list[int]]) -> PlanPart | None:
    """The printed plan, or None when there is no plan or nothing to say (no change, nothing left).

    ``item_of``: the remedial item numbers of each finding key.
    """
    if plan is None or (not plan.changes and not plan.remaining):
        return None
    steps = tuple(
        PlanStep(n, dc.node, change_words(dc), tuple(_numbers(dc.clears, item_of)))
        for n, dc in enumerate(plan.changes, start=1)
    )
    used: dict[FindingKey, int] = {}
    left: list[PlanLeft] = []
    for u in plan.remaining:
        key = finding_key(u.finding)
        numbers = sorted(item_of.get(key, ()))
        k = used.get(key, 0)
        used[key] = k + 1
        # findings with the same rule and nodes: the k-th one left is the k-th item
        mine = (numbers[k],) if k < len(numbers) else ()
        text = clean(u.finding.message)
        left.append(PlanLeft(mine, short(text) if mine else text, clean(u.reason)))
    left.sort(key=lambda r: r.items[0] if r.items else 1 << 30)  # in the list's order
    return PlanPart(steps, tuple(left))


#: The longest finding text the plan repeats where it names the item (the item has it all).
SHORT_MAX = 150


def short(text: str, limit: int = SHORT_MAX) -> str:
    """``text`` cut at a word before ``limit`` characters, with '…' where it was cut."""
    if len(text) <= limit:
        return text
    cut = text.rfind(" ", 0, limit)
    return text[: cut if cut > limit // 2 else limit].rstrip(" ,;:(") + " …"


__all__ = [
    "LEAD",
    "NONE_CLEARED",
    "REMAINING_TITLE",
    "ROW",
    "TITLE",
    "PlanLeft",
    "PlanPart",
    "PlanStep",
    "build_plan_part",
    "change_words",
    "planned_by_key",
    "planned_row",
    "short",
]
