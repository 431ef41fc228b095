"""The moves of the remedy search: a change with its repairs, ranked; and which way an
IΔn change can help a finding."""

from __future__ import annotations

from dataclasses import dataclass, field

from model.plan.catalogue import Choice
from model.plan.changes import DeviceChange, FindingKey
from model.rules.findings import Finding


@dataclass
class Move:
    """One step of the plan: a choice, and the repairs that go with it."""

    choices: tuple[Choice, ...]
    gain: frozenset[FindingKey]
    new_devices: int
    cost: int
    #: Findings the first choice clears on its own (a move led by the change that does
    #: the work is preferred to the same changes led by a repair).
    lead: int = 0
    #: For each repair (choices after the first), the rule of the finding it keeps away.
    why: tuple[str, ...] = ()
    #: The changes made, once the move is taken into the plan.
    made: list[DeviceChange] = field(default_factory=list)

    def rank(self) -> tuple[float, int, int, int, int, str]:
        n = len(self.choices)
        steps = sum(c.steps for c in self.choices)
        first = self.choices[0].node
        return (-len(self.gain) / n, self.new_devices, self.cost, steps, -self.lead, first)


#: Rules whose finding names the upstream device first and the downstream ones after.
PAIR_RULES = frozenset(
    {"cascade.upstream-not-delayed", "cascade.ratio-below-3", "cascade.band-overlap"}
)


def idn_ways(f: Finding, device: str) -> set[str]:
    """Which way an IΔn change of ``device`` can help clear ``f``.

    Of a pair, the upstream device's IΔn goes up and the downstream one's down
    (BS 7671 536.4.1.4, common practice); 30 mA additional protection needs a
    smaller IΔn (BS 7671 411.3.3), standing leakage a larger one (531.3.2).
    Anything else: either way, and a change with no IΔn in it always.
    """
    if f.rule in PAIR_RULES:
        return {"same", "up" if f.nodes[:1] == (device,) else "down"}
    if f.rule in ("coverage.additional-protection", "earthing.tt-no-rcd"):
        return {"same", "down"}
    if f.rule == "leakage.over-30pct":
        return {"same", "up"}
    return {"same", "up", "down"}


def idn_way(c: Choice, node: object) -> str:
    new = dict(c.values).get("idn_ma")
    old = getattr(node, "idn_ma", None)
    if new is None or old is None or new == old:
        return "same"
    return "up" if new > old else "down"


def cheap_first(c: Choice) -> tuple[int, int, int]:
    return (c.new_device, c.cost, c.steps)


__all__ = ["PAIR_RULES", "Move", "cheap_first", "idn_way", "idn_ways"]
