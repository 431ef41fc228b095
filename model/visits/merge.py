"""Merging two copies of one site that were edited apart (two laptops, one site).

There is no common ancestor: ``base`` ("ours") and ``other`` ("theirs") are
compared directly, so nothing is ever deleted by a merge; a node or visit
present in only one copy is taken from it.

- Nodes are matched by id.  Equal content: kept.  Different content: a
  conflict.  A node in one copy only is added when its parent is in the
  result, and is a conflict otherwise.
- Site information is compared field by field; a field that differs is a
  conflict.
- Visits are matched by id.  Differing metadata (date, inspector, instrument,
  notes) is one conflict for the visit.  Readings of the same visit are
  combined device by device and, within a device, value by value: a value
  recorded in one copy only is taken; the same key recorded differently is a
  conflict.  Two readings of one device taken with different test waveforms,
  or one marked not tested and the other with values, cannot be combined: the
  whole reading is one conflict.

Nothing is dropped silently: :meth:`MergeResult.accounting` lists every
recorded value of every reading of both inputs with where it went (into the
result, or into a conflict), and :meth:`MergeResult.resolve` applies the
user's choice per conflict and validates the whole site.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import Any, Literal

from pydantic import ValidationError

from model.site.messages import describe_validation_error
from model.site.models import Reading, SiteFile, Visit
from model.site.terms import TEST_NAMES

Choice = Literal["ours", "theirs"]
CHOICES: tuple[Choice, ...] = ("ours", "theirs")
ConflictKind = Literal["site", "node", "node-parent", "visit", "reading"]

#: The values of a reading, each merged on its own.
READING_KEYS: tuple[str, ...] = (*TEST_NAMES, "ramp_ma", "button", "note", "not_tested")
VISIT_META: tuple[str, ...] = ("date", "inspector", "instrument", "notes")


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
        if not isinstance(self.ours, dict) or not isinstance(self.theirs, dict):
            return [("value", self.ours, self.theirs)]
        names = list(self.ours) + [k for k in self.theirs if k not in self.ours]
        return [
            (k, self.ours.get(k), self.theirs.get(k))
            for k in names
            if self.ours.get(k) != self.theirs.get(k)
        ]

    def as_json(self) -> dict[str, Any]:
        return {
            "id": self.id,
            "kind": self.kind,
            "what": self.what,
            "where": self.where,
            "ours": self.ours,
            "theirs": self.theirs,
        }


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


# --- the merge plan: each piece is a settled value or the id of a conflict ----


@dataclass
class _Pick:
    """A settled value, or a conflict between two values."""

    ours: Any
    theirs: Any
    conflict: str | None = None

    def value(self, choices: Mapping[str, Choice]) -> Any:
        if self.conflict is None:
            return self.ours
        return self.ours if choices[self.conflict] == "ours" else self.theirs


@dataclass
class _ReadingPlan:
    whole: _Pick | None = None  # a whole-reading conflict (or a reading from one side)
    keys: dict[str, _Pick] = field(default_factory=dict)
    waveform: str = "AC"


@dataclass
class _VisitPlan:
    id: str
    meta: _Pick
    readings: dict[str, _ReadingPlan] = field(default_factory=dict)


def _dump(model: Any) -> dict[str, Any]:
    return dict(model.model_dump(mode="json", exclude_defaults=True))


def _reading_json(r: Reading) -> dict[str, Any]:
    d = _dump(r)
    d.setdefault("waveform", r.waveform)
    return d


def recorded_keys(r: Reading) -> list[str]:
    """The keys of a reading that carry something: the test waveform, and every value set."""
    out = ["waveform"]
    for k in READING_KEYS:
        v = getattr(r, k)
        if v is not None and v != "":
            out.append(k)
    return out


def _empty(v: Any) -> bool:
    return v is None or v == ""


@dataclass
class MergeResult:
    """The outcome of :func:`merge_sites`: the conflicts and how to resolve them."""

    base: SiteFile
    other: SiteFile
    conflicts: list[Conflict] = field(default_factory=list)
    _site: dict[str, _Pick] = field(default_factory=dict, repr=False)
    _nodes: list[tuple[str, _Pick]] = field(default_factory=list, repr=False)
    _visits: list[_VisitPlan] = field(default_factory=list, repr=False)

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
        info = {k: p.value(chosen) for k, p in self._site.items()}
        nodes = [n for _, p in self._nodes if (n := p.value(chosen)) is not None]
        visits: list[dict[str, Any]] = []
        for vp in self._visits:
            v: dict[str, Any] = {"id": vp.id, **vp.meta.value(chosen)}
            readings: dict[str, Any] = {}
            for dev, rp in vp.readings.items():
                if rp.whole is not None:
                    r = rp.whole.value(chosen)
                else:
                    r = {"waveform": rp.waveform}
                    for k, p in rp.keys.items():
                        val = p.value(chosen)
                        if not _empty(val):
                            r[k] = val
                readings[dev] = r
            v["readings"] = readings
            visits.append(v)
        return {
            "format": "tripwise.site",
            "version": 1,
            "site": info,
            "nodes": nodes,
            "visits": visits,
        }

    def accounting(self) -> list[Accounted]:
        """Every recorded value of every reading of both inputs, with where it went."""
        plans = {vp.id: vp for vp in self._visits}
        out: list[Accounted] = []
        for source, sf in (("ours", self.base), ("theirs", self.other)):
            for v in sf.visits:
                vp = plans[v.id]
                for dev, r in v.readings.items():
                    rp = vp.readings[dev]
                    for k in recorded_keys(r):
                        value = getattr(r, k)
                        cid = None
                        if rp.whole is not None:
                            cid = rp.whole.conflict
                        elif k in rp.keys:
                            cid = rp.keys[k].conflict
                        out.append(
                            Accounted(
                                source,  # type: ignore[arg-type]
                                v.id,
                                dev,
                                k,
                                value,
                                "in result" if cid is None else "conflict",
                                cid,
                            )
                        )
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


def _fmt(v: Any) -> str:
    return "(absent)" if v is None else repr(v)


def merge_sites(base: SiteFile, other: SiteFile) -> MergeResult:
    """Merge two diverged copies of one site; ``base`` is "ours", ``other`` "theirs"."""
    res = MergeResult(base=base, other=other)
    add = res.conflicts.append

    # site information, field by field
    ours_info = base.site.model_dump(mode="json")
    theirs_info = other.site.model_dump(mode="json")
    for k, a in ours_info.items():
        b = theirs_info.get(k)
        if a == b:
            res._site[k] = _Pick(a, b)
        else:
            cid = f"site.{k}"
            add(Conflict(cid, "site", f"site {k} differs", f"site.{k}", a, b))
            res._site[k] = _Pick(a, b, cid)

    # nodes by id: ours in order, then theirs' new ones in order
    theirs_nodes = {n.id: n for n in other.nodes}
    ours_ids = {n.id for n in base.nodes}
    for n in base.nodes:
        t = theirs_nodes.get(n.id)
        if t is None or t == n:
            res._nodes.append((n.id, _Pick(_dump(n), _dump(n))))
        else:
            cid = f"node:{n.id}"
            a, b = _dump(n), _dump(t)
            fields = ", ".join(k for k, _, _ in Conflict(cid, "node", "", "", a, b).differences())
            add(
                Conflict(
                    cid, "node", f"node {n.id} edited differently ({fields})", f"nodes {n.id}", a, b
                )
            )
            res._nodes.append((n.id, _Pick(a, b, cid)))
    result_ids = ours_ids | set(theirs_nodes)
    for t in other.nodes:
        if t.id in ours_ids:
            continue
        d = _dump(t)
        if t.parent is not None and t.parent not in result_ids:
            cid = f"node-parent:{t.id}"
            add(
                Conflict(
                    cid,
                    "node-parent",
                    f"node {t.id} (theirs only) is fed by {t.parent!r}, which is in neither copy",
                    f"nodes {t.id}",
                    None,
                    d,
                )
            )
            res._nodes.append((t.id, _Pick(None, d, cid)))
        else:
            res._nodes.append((t.id, _Pick(d, d)))

    # visits by id
    theirs_visits = {v.id: v for v in other.visits}
    ours_visit_ids = {v.id for v in base.visits}
    for v in base.visits:
        res._visits.append(_merge_visit(v, theirs_visits.get(v.id), add))
    for tv in other.visits:
        if tv.id not in ours_visit_ids:
            res._visits.append(_merge_visit(tv, None, add))
    return res


def _meta(v: Visit) -> dict[str, Any]:
    return {k: getattr(v, k) for k in VISIT_META}


def _merge_visit(ours: Visit, theirs: Visit | None, add: Any) -> _VisitPlan:
    if theirs is None:
        plan = _VisitPlan(ours.id, _Pick(_meta(ours), _meta(ours)))
        for dev, r in ours.readings.items():
            plan.readings[dev] = _ReadingPlan(whole=_Pick(_dump(r), _dump(r)))
        return plan
    a, b = _meta(ours), _meta(theirs)
    if a == b:
        meta = _Pick(a, b)
    else:
        cid = f"visit:{ours.id}"
        names = ", ".join(k for k in VISIT_META if a[k] != b[k])
        add(
            Conflict(
                cid, "visit", f"visit {ours.id} details differ ({names})", f"visits {ours.id}", a, b
            )
        )
        meta = _Pick(a, b, cid)
    plan = _VisitPlan(ours.id, meta)
    devices = list(ours.readings) + [d for d in theirs.readings if d not in ours.readings]
    for dev in devices:
        ra, rb = ours.readings.get(dev), theirs.readings.get(dev)
        plan.readings[dev] = _merge_reading(ours.id, dev, ra, rb, add)
    return plan


def _merge_reading(
    visit_id: str, dev: str, ra: Reading | None, rb: Reading | None, add: Any
) -> _ReadingPlan:
    if ra is None or rb is None:
        r = ra if ra is not None else rb
        assert r is not None
        return _ReadingPlan(whole=_Pick(_dump(r), _dump(r)))
    if ra == rb:
        return _ReadingPlan(whole=_Pick(_dump(ra), _dump(ra)))
    where = f"visits {visit_id} readings {dev}"
    if ra.waveform != rb.waveform or (ra.not_tested is None) != (rb.not_tested is None):
        cid = f"reading:{visit_id}/{dev}"
        why = (
            f"test waveform {ra.waveform} / {rb.waveform}"
            if ra.waveform != rb.waveform
            else "not tested in one copy, tested in the other"
        )
        add(
            Conflict(
                cid,
                "reading",
                f"{dev} on visit {visit_id} recorded differently ({why}); the whole reading "
                "must come from one copy",
                where,
                _reading_json(ra),
                _reading_json(rb),
            )
        )
        return _ReadingPlan(whole=_Pick(_dump(ra), _dump(rb), cid))
    plan = _ReadingPlan(waveform=ra.waveform)
    for k in READING_KEYS:
        va, vb = getattr(ra, k), getattr(rb, k)
        if va == vb or _empty(vb):
            plan.keys[k] = _Pick(va, va)
        elif _empty(va):
            plan.keys[k] = _Pick(vb, vb)
        else:
            cid = f"reading:{visit_id}/{dev}/{k}"
            add(
                Conflict(
                    cid,
                    "reading",
                    f"{dev} {k} on visit {visit_id}: {_fmt(va)} / {_fmt(vb)}",
                    f"{where} {k}",
                    va,
                    vb,
                )
            )
            plan.keys[k] = _Pick(va, vb, cid)
    return plan
