"""The outcome of a merge: its plan, the user's choices applied, and the accounting.

:func:`model.visits.merge.merge_sites` lays out the merged site as a plan in
which each piece is either settled or the id of a :class:`Conflict`.
:meth:`MergeResult.resolve` fills in every conflict with the side the user
chose and validates the whole site; :meth:`MergeResult.accounting` lists every
recorded value of every reading of both inputs with where it went, so that
nothing is dropped silently.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import Any, Literal

from pydantic import ValidationError

from model.site.messages import describe_validation_error
from model.site.models import Reading, SiteFile, blank
from model.site.terms import FORMAT_NAME, FORMAT_VERSION, TEST_VALUE_KEYS
from model.visits.merge_conflicts import CHOICES, Accounted, Choice, Conflict, MergeError

#: The values of a reading, each merged on its own.
READING_KEYS: tuple[str, ...] = (*TEST_VALUE_KEYS, "test_current", "further", "note", "not_tested")


def recorded_keys(r: Reading) -> list[str]:
    """The keys of a reading that carry something: the test waveform, and every value set."""
    return [k for k in ("waveform", *READING_KEYS) if r.recorded(k)]


# --- the merge plan: each piece is a settled value or the id of a conflict ----


@dataclass
class Pick:
    """A settled value, or a conflict between two values."""

    ours: Any
    theirs: Any
    conflict: str | None = None

    def value(self, choices: Mapping[str, Choice]) -> Any:
        if self.conflict is None:
            return self.ours
        return self.ours if choices[self.conflict] == "ours" else self.theirs


@dataclass
class ReadingPlan:
    """One device's reading: taken whole (from one side, or a whole-reading
    conflict), or combined value by value under one test waveform."""

    whole: Pick | None = None
    keys: dict[str, Pick] = field(default_factory=dict)
    waveform: str = "AC"


@dataclass
class VisitPlan:
    id: str
    meta: Pick
    readings: dict[str, ReadingPlan] = field(default_factory=dict)


@dataclass
class MergeResult:
    """The outcome of :func:`~model.visits.merge.merge_sites`: the conflicts and how
    to resolve them."""

    base: SiteFile
    other: SiteFile
    conflicts: list[Conflict] = field(default_factory=list)
    site_plan: dict[str, Pick] = field(default_factory=dict, repr=False)
    node_plan: list[tuple[str, Pick]] = field(default_factory=list, repr=False)
    visit_plan: list[VisitPlan] = field(default_factory=list, repr=False)

    @property
    def clean(self) -> bool:
        """True when the copies merge with no conflict."""
        return not self.conflicts

    def conflict(self, conflict_id: str) -> Conflict:
        for c in self.conflicts:
            if c.id == conflict_id:
                return c
        raise KeyError(conflict_id)

    def merged(self) -> SiteFile:
        """The merged site; only when there are no conflicts (MergeError otherwise)."""
        if self.conflicts:
            raise MergeError(f"{len(self.conflicts)} conflict(s) need a choice first")
        return self.resolve({})

    def resolve(self, choices: Mapping[str, Choice] | Choice) -> SiteFile:
        """The merged site with each conflict settled by ``choices`` (conflict id -> side).

        A single ``"ours"`` or ``"theirs"`` settles every conflict that way.
        Raises :class:`MergeError` when a conflict has no valid choice or the
        chosen versions do not make a valid site.
        """
        if isinstance(choices, str):
            if choices not in CHOICES:
                raise MergeError(f"choice must be 'ours' or 'theirs', not {choices!r}")
            chosen: dict[str, Choice] = {c.id: choices for c in self.conflicts}
        else:
            chosen = dict(choices)
        missing = [c.id for c in self.conflicts if c.id not in chosen]
        if missing:
            raise MergeError(f"no choice for {len(missing)} conflict(s): {', '.join(missing)}")
        bad = [f"{k}={v!r}" for k, v in chosen.items() if v not in CHOICES]
        if bad:
            raise MergeError(f"choices must be 'ours' or 'theirs': {', '.join(bad)}")
        unknown = sorted(set(chosen) - {c.id for c in self.conflicts})
        if unknown:
            raise MergeError(f"no such conflict: {', '.join(unknown)}")
        doc = self._document(chosen)
        try:
            return SiteFile.model_validate(doc)
        except ValidationError as exc:
            raise MergeError(
                "the chosen versions do not make a valid site: "
                + describe_validation_error(exc, doc)
            ) from None

    def _document(self, chosen: Mapping[str, Choice]) -> dict[str, Any]:
        info = {k: p.value(chosen) for k, p in self.site_plan.items()}
        nodes = [n for _, p in self.node_plan if (n := p.value(chosen)) is not None]
        visits: list[dict[str, Any]] = []
        for vp in self.visit_plan:
            v: dict[str, Any] = {"id": vp.id, **vp.meta.value(chosen)}
            readings: dict[str, Any] = {}
            for dev, rp in vp.readings.items():
                if rp.whole is not None:
                    r = rp.whole.value(chosen)
                else:
                    r = {"waveform": rp.waveform}
                    for k, p in rp.keys.items():
                        val = p.value(chosen)
                        if not blank(val):
                            r[k] = val
                readings[dev] = r
            v["readings"] = readings
            visits.append(v)
        return {
            "format": FORMAT_NAME,
            "version": FORMAT_VERSION,
            "site": info,
            "nodes": nodes,
            "visits": visits,
        }

    def accounting(self) -> list[Accounted]:
        """Every recorded value of every reading of both inputs, with where it went."""
        plans = {vp.id: vp for vp in self.visit_plan}
        out: list[Accounted] = []
        sides: tuple[tuple[Choice, SiteFile], ...] = (("ours", self.base), ("theirs", self.other))
        for source, sf in sides:
            for v in sf.visits:
                vp = plans[v.id]
                for dev, r in v.readings.items():
                    rp = vp.readings[dev]
                    for k in recorded_keys(r):
                        cid = None
                        if rp.whole is not None:
                            cid = rp.whole.conflict
                        elif k in rp.keys:
                            cid = rp.keys[k].conflict
                        outcome: Literal["in result", "conflict"] = (
                            "in result" if cid is None else "conflict"
                        )
                        out.append(Accounted(source, v.id, dev, k, getattr(r, k), outcome, cid))
        return out

    def summary(self) -> dict[str, int]:
        """Counts of the accounting: values from each input, and how many are in conflicts."""
        acc = self.accounting()
        return {
            "ours_values": sum(a.source == "ours" for a in acc),
            "theirs_values": sum(a.source == "theirs" for a in acc),
            "in_result": sum(a.outcome == "in result" for a in acc),
            "in_conflicts": sum(a.outcome == "conflict" for a in acc),
            "conflicts": len(self.conflicts),
        }

    def as_json(self) -> dict[str, Any]:
        return {
            "clean": self.clean,
            "conflicts": [c.as_json() for c in self.conflicts],
            "summary": self.summary(),
        }
