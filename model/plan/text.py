"""A plan in words: as ``tripwise plan`` prints it, and as it is recorded in a site's notes."""

from __future__ import annotations

import textwrap
from collections.abc import Sequence

from model.plan.changes import PLAN_CAUTION, DeviceChange, FindingKey, Plan
from model.rules.findings import CAUTION, Finding
from model.site.models import SiteFile

#: The longest a site's notes may be (:class:`model.site.models.SiteInfo`).
NOTES_MAX = 20_000


def key_text(key: FindingKey) -> str:
    """A finding named for people: 'type.ac-unsuitable (rc2, c-l2)'."""
    rule, nodes = key
    shown = ", ".join(nodes[:6]) + (f" and {len(nodes) - 6} more" if len(nodes) > 6 else "")
    return f"{rule} ({shown})"


def _finding_text(f: Finding) -> str:
    return f"{f.severity} {key_text((f.rule, f.nodes))}"


def change_lines(changes: Sequence[DeviceChange], wrap: textwrap.TextWrapper) -> list[str]:
    """The changes as a numbered list, each with the findings it clears."""
    out: list[str] = []
    for i, dc in enumerate(changes, 1):
        out.extend(textwrap.wrap(f"{i}. {dc.text}", width=wrap.width, subsequent_indent="   "))
        if dc.clears:
            out.extend(wrap.wrap("clears: " + "; ".join(key_text(k) for k in dc.clears)))
    return out


def plan_text(site: SiteFile, plan: Plan, width: int = 100) -> str:
    """The plan for people: the changes, what remains and why, then the cautions."""
    wrap = textwrap.TextWrapper(width=width, initial_indent="   ", subsequent_indent="   ")
    lines = [f"{site.site.name}: remedy plan"]
    if plan.changes:
        devices = len({dc.node for dc in plan.changes})
        cleared = sum(len(dc.clears) for dc in plan.changes)
        lines.append(f"{devices} device(s) to change, clearing {cleared} finding(s):")
        lines.append("")
        lines.extend(change_lines(plan.changes, wrap))
    else:
        lines.append("No device change from the catalogue clears a finding of this site.")
    if plan.remaining:
        lines.append("")
        lines.append(f"Remaining ({len(plan.remaining)}), and what they need:")
        for u in plan.remaining:
            lines.extend(
                textwrap.wrap(f"- {_finding_text(u.finding)}", width=width, subsequent_indent="  ")
            )
            lines.extend(wrap.wrap(u.reason))
    lines.append("")
    lines.append("Caution: " + PLAN_CAUTION + " " + CAUTION)
    return "\n".join(lines) + "\n"


def plan_notes(site: SiteFile, plan: Plan, made_from: str, when: str) -> str:
    """The site's notes with the plan recorded at their end (kept within NOTES_MAX)."""
    head = f"Remedy plan made by tripwise on {when} from {made_from} (changes made in this file):"
    tail = "Caution: " + PLAN_CAUTION
    wrap = textwrap.TextWrapper(width=100, initial_indent="   ", subsequent_indent="   ")
    full = change_lines(plan.changes, wrap)
    before = site.site.notes.rstrip()
    sep = "\n\n" if before else ""
    more = "   ... (the rest of the plan: run tripwise plan on the original file)"
    keep = len(full)
    while True:
        body = full if keep == len(full) else [*full[:keep], more]
        text = "\n".join([head, *body, tail])
        if len(before) + len(sep) + len(text) <= NOTES_MAX or keep == 0:
            break
        keep = max(0, keep - 10)
    out = before + sep + text
    return out[:NOTES_MAX]


__all__ = ["NOTES_MAX", "change_lines", "key_text", "plan_notes", "plan_text"]
