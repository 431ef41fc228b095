"""What a "what if" offers to try: the plan's changes and each device's own options.

The plan of the whole site takes far longer than one device's options, so each part is
offered on its own (``options_for_*``, ``planned_for_*``) for a view that shows the
options first; ``choices_for_*`` give both, merged.

From a finding: the planned change(s) that clear it (:func:`model.plan.search.make_plan`),
then the options of each device the finding names (:func:`model.plan.search.device_options`),
those that clear the finding first.  From a device: the plan's change of that device,
then its options.  (The planner is imported where it is used: it is the heavy part.)
Each choice is tried on a scratch copy by
:func:`model.plan.trial.run_trial`; none is made on the site here.
"""

from __future__ import annotations

from collections.abc import Iterable, Sequence
from dataclasses import dataclass
from typing import Literal

from model.plan.changes import DeviceChange, Plan, finding_key
from model.plan.trial import field_change_text
from model.rules.findings import Analysis, Finding
from model.site.models import SiteFile
from model.site.terms import OVERCURRENT_KINDS, RCD_KINDS

ChoiceSource = Literal["plan", "option", "own"]

#: The kinds of node a device change can be made to.
DEVICE_KINDS: frozenset[str] = RCD_KINDS | OVERCURRENT_KINDS


@dataclass(frozen=True)
class TrialChoice:
    """One thing to try: one or more device changes, where they come from, and what for."""

    source: ChoiceSource
    changes: tuple[DeviceChange, ...]
    #: True when the changes are said to clear the finding the view was opened from.
    clears_target: bool = False

    @property
    def text(self) -> str:
        """The changes in words, one after another."""
        return "; then ".join(dc.text or dc.node for dc in self.changes)

    @property
    def summary(self) -> str:
        """The changes in short: 'rc2: Type (waveform) AC → A' (what differs, by field)."""
        return "; ".join(
            f"{dc.node}: " + ", ".join(field_change_text(fc) for fc in dc.fields)
            for dc in self.changes
        )

    @property
    def clears(self) -> int:
        """How many findings the changes are said to clear (each finding once)."""
        return len({k for dc in self.changes for k in dc.clears})

    @property
    def creates(self) -> int:
        """How many findings the changes are said to create (each finding once; a trial
        shows them all)."""
        return len({k for dc in self.changes for k in dc.creates})


def plan_changes_for(plan: Plan, finding: Finding) -> tuple[DeviceChange, ...]:
    """The plan's changes that clear ``finding``, in the plan's order."""
    key = finding_key(finding)
    return tuple(dc for dc in plan.changes if key in dc.clears)


def finding_devices(site: SiteFile, finding: Finding) -> list[str]:
    """The nodes a finding names that are devices a change can be made to, in its order."""
    kinds = {n.id: n.kind for n in site.nodes}
    return [n for n in finding.nodes if kinds.get(n) in DEVICE_KINDS]


def merge_choices(*groups: Iterable[TrialChoice]) -> list[TrialChoice]:
    """The choices of every group in order, each set of changes once (the first kept)."""
    seen: set[tuple[tuple[str, tuple[tuple[str, str], ...]], ...]] = set()
    out: list[TrialChoice] = []
    for c in (c for g in groups for c in g):
        key = tuple(
            (dc.node, tuple((fc.field, repr(fc.after)) for fc in dc.fields)) for dc in c.changes
        )
        if key not in seen:
            seen.add(key)
            out.append(c)
    return out


def _options(
    site: SiteFile, analysis: Analysis | None, devices: Sequence[str], target: Finding | None
) -> list[TrialChoice]:
    from model.plan.search import device_options

    key = finding_key(target) if target is not None else None
    out: list[TrialChoice] = []
    for node in devices:
        for dc in device_options(site, node, analysis):
            out.append(TrialChoice("option", (dc,), clears_target=key in dc.clears))
    out.sort(key=lambda c: not c.clears_target)  # stable: the planner's order within each
    return out


def options_for_finding(
    site: SiteFile, analysis: Analysis | None, finding: Finding
) -> list[TrialChoice]:
    """The options of the devices a finding names, those that clear it first."""
    return merge_choices(_options(site, analysis, finding_devices(site, finding), finding))


def options_for_device(
    site: SiteFile, analysis: Analysis | None, node_id: str
) -> list[TrialChoice]:
    """The options of one device (none for a node that is no device)."""
    kinds = {n.id: n.kind for n in site.nodes}
    if kinds.get(node_id) not in DEVICE_KINDS:
        return []
    return merge_choices(_options(site, analysis, [node_id], None))


def planned_for_finding(plan: Plan, finding: Finding) -> list[TrialChoice]:
    """The plan's change(s) that clear a finding, as one choice (none when it has none)."""
    planned = plan_changes_for(plan, finding)
    return [TrialChoice("plan", planned, clears_target=True)] if planned else []


def planned_for_device(plan: Plan, node_id: str) -> list[TrialChoice]:
    """The plan's change of one device (none when the plan leaves it)."""
    return [TrialChoice("plan", (dc,)) for dc in plan.changes if dc.node == node_id]


def choices_for_finding(
    site: SiteFile, analysis: Analysis | None, finding: Finding, plan: Plan | None = None
) -> list[TrialChoice]:
    """What to try for one finding: the plan's changes that clear it, then the options of
    the devices it names (those that clear it first).  ``plan``: the site's plan where the
    caller has it (made here otherwise)."""
    from model.plan.search import make_plan

    if plan is None:
        plan = make_plan(site, analysis)
    return merge_choices(
        planned_for_finding(plan, finding), options_for_finding(site, analysis, finding)
    )


def choices_for_device(
    site: SiteFile, analysis: Analysis | None, node_id: str, plan: Plan | None = None
) -> list[TrialChoice]:
    """What to try for one device: the plan's change of it, then its options."""
    from model.plan.search import make_plan

    if plan is None:
        plan = make_plan(site, analysis)
    return merge_choices(
        planned_for_device(plan, node_id), options_for_device(site, analysis, node_id)
    )


__all__ = [
    "DEVICE_KINDS",
    "TrialChoice",
    "choices_for_device",
    "choices_for_finding",
    "finding_devices",
    "merge_choices",
    "options_for_device",
    "options_for_finding",
    "planned_for_device",
    "planned_for_finding",
    "plan_changes_for",
]
