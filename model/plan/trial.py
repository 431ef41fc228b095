"""A trial of device changes on a scratch copy: the findings before and after, side by side.

:func:`run_trial` makes changes on a copy of a site (:func:`model.plan.changes.change_ops`,
the ops the app would journal), checks the copy with every check and matches the
findings before and after (:func:`model.plan.changes.diff_findings`).  The site itself
is never changed; a change the site's own ops refuse is refused here with the reason
(:class:`TrialRefused`), before anything is shown as its result.

:func:`own_change` turns a device as edited on a form into a :class:`DeviceChange`, one
field at a time, so a change of the user's own is tried, shown and accepted exactly as a
planned one.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import Any

from pydantic import BaseModel, ValidationError

from model.plan.changes import REMOVED, REPLACED, DeviceChange, FieldChange, FindingDiff, change_ops
from model.plan.changes import diff_findings as _diff
from model.rules.checks import analyse
from model.rules.findings import SEVERITIES, Analysis, Finding
from model.site.fields import FIELD_TITLES, field_title, in_words
from model.site.messages import error_text
from model.site.models import SiteFile
from model.site.numbers import number_text
from model.site.ops import Op, SetReading, apply_op

#: Fields that describe where a device is and what it is called, not the device: a change
#: of these alone is an edit of the record (in the tree), not a change of device.
DESCRIPTIVE_FIELDS: frozenset[str] = frozenset({"label", "way", "notes", "place"})


class TrialRefused(ValueError):
    """A change that cannot be made on the site (the message says what and why)."""


@dataclass(frozen=True)
class Trial:
    """Changes tried on a scratch copy of a site, with the findings before and after."""

    changes: tuple[DeviceChange, ...]
    #: The site's own edit ops that make the changes (what Accept journals, in order).
    ops: tuple[Op, ...]
    #: The scratch copy with the changes made (the site itself is untouched).
    site_after: SiteFile
    before: Analysis
    after: Analysis
    diff: FindingDiff
    #: (visit id, device id) of each reading the change removes: taken of a device that
    #: is replaced, it does not belong to the new one (the site before keeps it).
    readings_dropped: tuple[tuple[str, str], ...]

    @property
    def changed(self) -> tuple[str, ...]:
        """The ids of the devices changed or removed, in order."""
        return tuple(dict.fromkeys(dc.node for dc in self.changes))

    @property
    def creates(self) -> bool:
        """True when the change leaves a finding the site did not have."""
        return bool(self.diff.created)

    @property
    def kept_before(self) -> list[Finding]:
        """The findings before the change that it does not clear, in their order."""
        cleared = {id(f) for f in self.diff.cleared}
        return [f for f in self.before.findings if id(f) not in cleared]

    def counts_before(self) -> dict[str, int]:
        """Findings before the change, by severity (every severity, worst first)."""
        return severity_counts(self.before.findings)

    def counts_after(self) -> dict[str, int]:
        """Findings after the change, by severity: the kept and the new ones.  The tests a
        changed device needs after installation are counted apart (:attr:`diff` ``to_test``)."""
        return severity_counts([*self.diff.created, *self.diff.kept])


def severity_counts(findings: Sequence[Finding]) -> dict[str, int]:
    """How many findings of each severity, worst first, every severity present."""
    out: dict[str, int] = {s: 0 for s in SEVERITIES}
    for f in findings:
        out[f.severity] += 1
    return out


def _refusal(exc: BaseException) -> str:
    """A refused change in plain words, naming fields by their titles."""
    if isinstance(exc, ValidationError):
        parts = []
        for err in exc.errors()[:3]:
            names = [str(p) for p in err.get("loc", ()) if str(p) in FIELD_TITLES]
            said = in_words(error_text(err))
            title = field_title(names[-1]) if names else ""
            parts.append(f"{title}: {said}" if title and not said.startswith(title) else said)
        return "; ".join(parts)
    if isinstance(exc, KeyError):
        return f"there is no node {exc.args[0]!s} in the site"
    return in_words(str(exc))


def scratch_site(
    site: SiteFile, changes: Sequence[DeviceChange], *, record: str | None = None
) -> tuple[SiteFile, list[Op]]:
    """The scratch copy after ``changes`` and the ops that made it.

    Raises :class:`TrialRefused` with the reason when a change cannot be made (an
    unknown device, a value the model refuses, a tree the site would not accept).
    """
    if not changes:
        raise TrialRefused("no change to try")
    try:
        ops = change_ops(site, changes, record=record)
        out = site
        for op in ops:
            out = apply_op(out, op)
    except (KeyError, ValueError, TypeError) as exc:  # ValidationError is a ValueError
        raise TrialRefused(_refusal(exc)) from None
    return out, ops


def run_trial(
    site: SiteFile,
    changes: Sequence[DeviceChange],
    before: Analysis | None = None,
    *,
    record: str | None = None,
) -> Trial:
    """Try ``changes`` on a scratch copy of ``site`` and check the copy with every check.

    ``before``: the site's own analysis where the caller has it (it must be of this
    very ``site``); otherwise it is made here.  Raises :class:`TrialRefused` when a
    change cannot be made.
    """
    after_site, ops = scratch_site(site, changes, record=record)
    if before is None:
        before = analyse(site)
    after = analyse(after_site)
    changed = {dc.node for dc in changes}
    dropped = tuple(
        (op.visit, op.device) for op in ops if isinstance(op, SetReading) and op.reading is None
    )
    return Trial(
        changes=tuple(changes),
        ops=tuple(ops),
        site_after=after_site,
        before=before,
        after=after,
        diff=_diff(before.findings, after.findings, changed),
        readings_dropped=dropped,
    )


def _shown(value: Any) -> str:
    if value is None:
        return "none"
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, float | int):
        return number_text(float(value))
    if isinstance(value, list | tuple):
        return ", ".join(str(v) for v in value) or "none"
    return str(value)


def field_change_text(fc: FieldChange) -> str:
    """One field change in words: 'IΔn 30 → 100', 'Type (waveform) AC → A'."""
    if fc.field == REMOVED:
        return f"remove the {fc.before}"
    if fc.field == REPLACED:
        return f"replace like for like ({_shown(fc.before)})"
    return f"{field_title(fc.field)} {_shown(fc.before)} → {_shown(fc.after)}"


def device_name(node: Any) -> str:
    """'RCCB "Studio RCCB" (rc2)': the kind as the trade writes it, the label, the id."""
    kind = str(node.kind)
    shown = kind.upper() if kind in ("rccb", "rcbo", "mcb", "rcm", "cbr") else kind
    label = getattr(node, "label", "") or ""
    return f'{shown} "{label}" ({node.id})' if label else f"{shown} {node.id}"


def _json(node: BaseModel) -> dict[str, Any]:
    return dict(node.model_dump(mode="json", exclude_none=False))


def own_change(site: SiteFile, edited: BaseModel) -> DeviceChange | None:
    """The change from a site's device to ``edited`` (the same device as edited on a form).

    One :class:`FieldChange` for each field whose value differs, values as the model
    holds them (exactly as typed once the form accepted them); None when nothing
    differs.  A change of the label, way, notes or place alone is refused: it is the
    same device (a replaced one has its readings taken off, see
    :func:`~model.plan.changes.change_ops`).  The id and the kind stay: a device is renamed or changed into another
    kind in the tree, not in a trial.  Raises :class:`TrialRefused` otherwise.
    """
    node_id = str(getattr(edited, "id", ""))
    old = site.node(node_id) if any(n.id == node_id for n in site.nodes) else None
    if old is None:
        raise TrialRefused(f"there is no node {node_id} in the site (the id cannot change here)")
    if getattr(edited, "kind", None) != old.kind:
        raise TrialRefused("the kind of a device cannot change in a trial; add a new node instead")
    if getattr(edited, "parent", None) != old.parent:
        raise TrialRefused("a trial changes a device, not where it is fed from; move it instead")
    before, after = _json(old), _json(edited)
    fields = tuple(
        FieldChange(node_id, name, before.get(name), after.get(name))
        for name in _field_order(before, after)
        if before.get(name) != after.get(name)
    )
    if not fields:
        return None
    if all(f.field in DESCRIPTIVE_FIELDS for f in fields):
        raise TrialRefused(
            "only the "
            + ", ".join(field_title(f.field).lower() for f in fields)
            + " changed: that edits the record of the same device (e in the tree), it "
            "does not change the device"
        )
    return DeviceChange(
        node=node_id,
        fields=fields,
        text=f"change {device_name(old)}: " + "; ".join(field_change_text(f) for f in fields),
    )


def _field_order(before: Mapping[str, Any], after: Mapping[str, Any]) -> list[str]:
    return list(dict.fromkeys([*before, *after]))


__all__ = [
    "DESCRIPTIVE_FIELDS",
    "Trial",
    "TrialRefused",
    "device_name",
    "field_change_text",
    "own_change",
    "run_trial",
    "scratch_site",
    "severity_counts",
]
