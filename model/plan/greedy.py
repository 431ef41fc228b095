"""The greedy search of the remedy planner (:func:`model.plan.search.make_plan`).

Each round takes the move (one catalogue change, or one change with its
repairs) that clears the most findings per changed device; ties go to fewer
new devices, then to the lower cost, then to the smaller step along the
catalogue's series.  Candidates are screened on zones of the site
(:mod:`model.plan.evaluate`), kept in a heap and re-screened lazily, only
when they reach the top again and only if a device of their zone has been
changed since.
"""

from __future__ import annotations

import heapq

from model.plan.catalogue import ANY_ASPECT, RULE_ASPECTS, Choice, choices_for
from model.plan.changes import (
    DeviceChange,
    FindingKey,
    apply_changes,
    finding_key,
)
from model.plan.evaluate import (
    ZONE_MAX,
    compare,
    device_change,
    fast_apply,
    findings_of,
    restrict,
    subtree_sizes,
    zone_nodes,
    zone_root,
)
from model.plan.moves import Move, cheap_first, idn_way, idn_ways
from model.plan.words import LEFT_REASONS, change_text
from model.rules.findings import Analysis, Finding
from model.site.models import SiteFile
from model.site.ops import InvalidEdit
from model.site.terms import OVERCURRENT_KINDS, RCD_KINDS
from model.site.tree import SiteIndex

#: Findings that show a device failed its own tests: a like-for-like replacement clears them.
FAILED_RULES = frozenset(
    {
        "reading.no-trip",
        "reading.too-slow",
        "reading.too-fast",
        "reading.button-failed",
        "reading.ramp-out-of-band",
    }
)
#: A change creating more findings than this is not repaired.
REPAIR_MAX = 3
#: Rounds of the greedy search (each after the one before has taken its moves).
PASSES = 3
#: Changes tried to clear one finding a change creates.
REPAIR_TRIES = 12
#: Words beside a repair change, by the rule of the finding it keeps away.
REPAIR_WORDS = {
    "coverage.additional-protection": "keeps the 30 mA additional protection "
    "(BS 7671 411.3.3/411.3.4)",
}

DEVICE_KINDS = RCD_KINDS | OVERCURRENT_KINDS


class Search:
    """The state of one search: the site as planned so far, the moves taken, and the
    screening results still valid (see the module's docstring)."""

    def __init__(self, site: SiteFile, analysis: Analysis) -> None:
        self.site0 = site
        self.index0 = analysis.index if analysis.index is not None else SiteIndex.build(site)
        self.before = analysis.findings
        self.targets: dict[FindingKey, Finding] = {
            finding_key(f): f for f in self.before if f.rule not in LEFT_REASONS
        }
        self.sizes = subtree_sizes(self.index0)
        self.whole = len(site.nodes) <= ZONE_MAX
        self.base_cache: dict[frozenset[str], list[Finding]] = {}
        self.cut_cache: dict[tuple[frozenset[str], int], SiteFile] = {}
        self.current = site
        self.chosen: list[Move] = []
        self.done: set[FindingKey] = set()
        self.evaluations = 0
        #: Screening results by choices: (length of the log then, cleared, created); a
        #: result stands while no device of its zone has been changed since.
        self.memo: dict[tuple[Choice, ...], tuple[int, frozenset[FindingKey], list[Finding]]] = {}
        #: The devices changed by the plan, in the order the moves were taken.
        self.log: list[str] = []
        self.zones: dict[tuple[str, ...], frozenset[str]] = {}
        #: The findings each candidate device was chosen for.
        self.reach: dict[str, set[FindingKey]] = {}
        #: Which way (``up``, ``down``) an IΔn change of each candidate can help.
        self.ways: dict[str, set[str]] = {}

    def replaced(self) -> set[str]:
        """Devices the plan so far replaces like for like."""
        return {c.node for mv in self.chosen for c in mv.choices if c.action == "replace"}

    @property
    def changes(self) -> list[DeviceChange]:
        return [dc for mv in self.chosen for dc in mv.made]

    # ---- candidates -------------------------------------------------------------------
    def candidate_nodes(self) -> dict[str, frozenset[str]]:
        """The devices worth changing, each with the kinds of change that bear on its findings."""
        idx = self.index0
        out: dict[str, set[str]] = {}
        for f in self.targets.values():
            aspects = RULE_ASPECTS.get(f.rule, ANY_ASPECT)
            for n in f.nodes:
                if n not in idx.by_id:
                    continue
                if idx.kind(n) in DEVICE_KINDS:
                    near: tuple[str, ...] = (n, *idx.ocpd_above[n][:1])
                else:
                    near = idx.ocpd_above[n][:1] + idx.rcd_above[n][:2]
                for d in near:
                    out.setdefault(d, set()).update(aspects)
                    self.reach.setdefault(d, set()).add(finding_key(f))
                    self.ways.setdefault(d, set()).update(idn_ways(f, d))
        return {n: frozenset(out[n]) for n in idx.order if n in out and not self.is_cutout(n)}

    def is_cutout(self, node_id: str) -> bool:
        """The supply's own fuse (fed straight from the origin): the network operator's."""
        idx = self.index0
        parent = idx.parent(node_id)
        return idx.kind(node_id) == "fuse" and parent is not None and idx.parent(parent) is None

    def choices(
        self, node_id: str, aspects: frozenset[str] = ANY_ASPECT, ways: set[str] | None = None
    ) -> list[Choice]:
        """The catalogue changes of a device that bear on ``aspects``; an IΔn change only
        the ``ways`` it can help (None: either way)."""
        idx = self.index0
        node = idx.node(node_id)
        above = idx.rcd_above[node_id][:1]
        failed = any(f.rule in FAILED_RULES and node_id in f.nodes for f in self.before)
        feeds = any(idx.kind(c) != "circuit" for c in idx.children.get(node_id, []))
        every = choices_for(node, idx.node(above[0]) if above else None, failed, feeds)
        out = [c for c in every if c.aspects <= aspects]
        if ways is None:
            return out
        return [c for c in out if idn_way(c, node) in ways]

    def to_change(self, choice: Choice, note: str = "") -> DeviceChange:
        idx = self.index0
        node = idx.node(choice.node)
        above = idx.rcd_above[choice.node][:1]
        text = change_text(node, choice, idx.node(above[0]) if above else None)
        return device_change(node, choice, text + note)

    # ---- screening --------------------------------------------------------------------
    def zone(self, node_ids: list[str]) -> frozenset[str]:
        """The nodes a screening of changes on ``node_ids`` looks at (empty: the whole site)."""
        if self.whole:
            return frozenset()
        key = tuple(node_ids)
        got = self.zones.get(key)
        if got is None:
            keep: set[str] = set()
            for n in node_ids:
                keep |= zone_nodes(self.index0, zone_root(self.index0, n, self.sizes))
            got = self.zones[key] = frozenset(keep)
        return got

    def screen(self, extra: tuple[Choice, ...]) -> tuple[frozenset[FindingKey], list[Finding]]:
        """Targets cleared (with the plan so far) and findings created, on the zone."""
        zone = self.zone([c.node for c in extra])
        got = self.memo.get(extra)
        if got is not None:
            stamp, cleared, created = got
            later = self.log[stamp:]
            if not later or (zone and not zone.intersection(later)):
                return cleared - self.done, created
        cleared, created = self._screen(extra)
        self.memo[extra] = (len(self.log), cleared, created)
        return cleared - self.done, created

    def _screen(self, extra: tuple[Choice, ...]) -> tuple[frozenset[FindingKey], list[Finding]]:
        self.evaluations += 1
        keep = self.zone([c.node for c in extra])
        base = self.base_cache.get(keep)
        if base is None:
            base = self.before if not keep else findings_of(restrict(self.site0, keep))
            self.base_cache[keep] = base
        # The zone of the site as the plan has left it (cut once per zone and plan state).
        part = self.cut_cache.get((keep, len(self.log)))
        if part is None:
            part = self.current if not keep else restrict(self.current, keep)
            self.cut_cache[(keep, len(self.log))] = part
        try:
            site = fast_apply(part, [self.to_change(c) for c in extra])
        except (InvalidEdit, ValueError, KeyError):
            return frozenset(), [Finding("plan.invalid", "required", (), "", "", "", "")]
        changed = {c.node for c in extra} | {dc.node for dc in self.changes}
        replaced = {c.node for c in extra if c.action == "replace"} | self.replaced()
        got = compare(base, findings_of(site), changed, replaced)
        cleared = frozenset(finding_key(f) for f in got.cleared) & self.targets.keys()
        return cleared, got.created

    def move(self, choices: tuple[Choice, ...], why: tuple[str, ...] = ()) -> Move | None:
        gain, created = self.screen(choices)
        if created or not gain:
            return None
        return Move(
            choices,
            gain,
            sum(c.new_device for c in choices),
            sum(c.cost for c in choices),
            len(self.screen(choices[:1])[0]),
            why,
        )

    def repaired(self, first: Choice, created: list[Finding]) -> Move | None:
        """``first`` with further changes that clear every finding it creates, or None.

        Each round takes the first finding still created and tries the changes
        of its devices (cheapest first) until one clears it without creating
        anything the move did not already create.
        """
        if len(created) > REPAIR_MAX:
            return None
        chosen: tuple[Choice, ...] = (first,)
        why: tuple[str, ...] = ()
        idx = self.index0
        still = created
        while still:
            f = still[0]
            known = {finding_key(g) for g in still}
            options: list[Choice] = []
            for n in f.nodes:
                if n not in idx.by_id:
                    continue
                near = [n] if idx.kind(n) in DEVICE_KINDS else list(idx.ocpd_above[n][:1])
                for d in near:
                    if d not in {c.node for c in chosen} and not self.is_cutout(d):
                        options.extend(self.choices(d, RULE_ASPECTS.get(f.rule, ANY_ASPECT)))
            options.sort(key=lambda c: (c.new_device, c.cost, c.steps))
            for r in options[:REPAIR_TRIES]:
                _, after = self.screen((*chosen, r))
                keys = {finding_key(g) for g in after}
                if finding_key(f) not in keys and keys <= known:
                    chosen, still, why = (*chosen, r), after, (*why, f.rule)
                    break
            else:
                return None
        return self.move(chosen, why)

    # ---- the search -------------------------------------------------------------------
    def run(self) -> None:
        """Greedy rounds until no move clears anything more.

        Every candidate is screened once; the moves are kept in a heap by their
        rank and re-screened lazily when they reach the top.  When the heap is
        empty, the candidates that cleared something but created a finding are
        tried again on the site as the plan has left it (a change may become
        possible after another).
        """
        pending = [
            c
            for node_id, aspects in self.candidate_nodes().items()
            for c in sorted(self.choices(node_id, aspects, self.ways.get(node_id)), key=cheap_first)
        ]
        for _ in range(PASSES):
            heap: list[tuple[tuple[float, int, int, int, int, str], int, Move]] = []
            blocked: list[tuple[Choice, list[Finding]]] = []
            taken = {dc.node for dc in self.changes}
            best: dict[str, tuple[int, Choice, list[Finding]]] = {}
            clean: dict[str, int] = {}
            #: Devices whose cheapest clean change already clears all they were chosen for.
            settled: set[str] = set()
            for seq, choice in enumerate(pending):
                if choice.node in taken or choice.node in settled:
                    continue
                gain, created = self.screen((choice,))
                if not gain:
                    continue
                if created:
                    blocked.append((choice, created))
                    # Only the best change of a device that creates findings is repaired.
                    if len(gain) > best.get(choice.node, (0, choice, []))[0]:
                        best[choice.node] = (len(gain), choice, created)
                    continue
                mv = self.move((choice,))
                if mv is not None:
                    clean[choice.node] = max(clean.get(choice.node, 0), len(gain))
                    heapq.heappush(heap, (mv.rank(), seq, mv))
                    if gain >= self.reach.get(choice.node, set()) - self.done:
                        settled.add(choice.node)
            for node_id, (n, choice, created) in best.items():
                if n > clean.get(node_id, 0):
                    mv = self.repaired(choice, created)
                    if mv is not None:
                        heapq.heappush(heap, (mv.rank(), len(pending) + len(heap), mv))
            if not self.take(heap):
                return
            # Retried: a change blocked by a finding on a device the plan has changed since.
            changed = set(self.log)
            pending = [c for c, made in blocked if changed & {n for f in made for n in f.nodes}]

    def take(self, heap: list[tuple[tuple[float, int, int, int, int, str], int, Move]]) -> int:
        """Moves taken from the heap, best first, each re-screened when it reaches the top."""
        taken = 0
        seq = len(heap) + 1_000_000
        while heap:
            _, _, mv = heapq.heappop(heap)
            if {c.node for c in mv.choices} & {dc.node for dc in self.changes}:
                continue
            fresh = self.move(mv.choices, mv.why)
            if fresh is None:
                continue
            if heap and fresh.rank() > heap[0][0]:
                seq += 1
                heapq.heappush(heap, (fresh.rank(), seq, fresh))
                continue
            taken += self.accept(fresh)
        return taken

    def accept(self, mv: Move) -> int:
        notes = [""] * len(mv.choices)
        first = self.index0.node(mv.choices[0].node)
        for i in range(1, len(mv.choices)):
            rule = mv.why[i - 1]
            notes[i] = "; " + REPAIR_WORDS.get(rule, f"keeps {rule} away")
            notes[i] += f' with the change to "{first.label or first.id}"'
        new = [self.to_change(c, n) for c, n in zip(mv.choices, notes, strict=True)]
        try:
            self.current = apply_changes(self.current, new)
        except (InvalidEdit, ValueError, KeyError):
            return 0
        mv.made = new
        self.log.extend(c.node for c in mv.choices)
        self.chosen.append(mv)
        self.done |= mv.gain
        return 1

    def drop_last_touching(self, created: list[Finding]) -> None:
        """Take out the last move that reaches the nodes of a finding the plan created."""
        idx = self.index0
        names = {n for f in created for n in f.nodes}
        drop = len(self.chosen) - 1
        for j in range(len(self.chosen) - 1, -1, -1):
            reach: set[str] = set()
            for c in self.chosen[j].choices:
                reach |= {c.node, *idx.descendants(c.node)}
                reach |= set(idx.rcd_above[c.node]) | set(idx.ocpd_above[c.node])
            if reach & names:
                drop = j
                break
        self.chosen.pop(drop)
        self.memo.clear()
        self.cut_cache.clear()
        self.log = [c.node for m in self.chosen for c in m.choices]
        self.done = set().union(*(m.gain for m in self.chosen)) if self.chosen else set()
        self.current = apply_changes(self.site0, self.changes)


__all__ = ["DEVICE_KINDS", "FAILED_RULES", "Search"]
