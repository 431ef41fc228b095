"""Fault levels and loop impedances as the checks read them: the latest visit wins.

A board's or the origin's ``pscc_ka`` and a circuit's ``zs_ohm`` are replaced
by the latest visit's measurement where that visit has one.  A measurement is
taken cold unless marked ``warm``; a circuit's own ``zs_ohm`` is a cold
measurement.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from model.site.history import ordered_visits
from model.site.models import SiteFile
from model.site.tree import SiteIndex

#: Fault level taken where none is known at all, with the reason. [kA]
ASSUMED_KA = 16.0
ASSUMED_NOTE = (
    "no fault level recorded: taken as 16 kA (an assumption; record pscc_ka at the board "
    "or the origin)"
)


@dataclass(frozen=True, slots=True)
class Level:
    """A prospective fault current and where it comes from."""

    ka: float
    note: str


@dataclass(frozen=True, slots=True)
class LoopZs:
    """A circuit's Zs as judged: the value, whether it was warm, and where it comes from."""

    ohm: float
    warm: bool
    note: str


def _latest_measurements(site: SiteFile) -> dict[str, tuple[str, Any]]:
    """Each node's latest measurement record with the id of its visit (later visits win)."""
    out: dict[str, tuple[str, Any]] = {}
    for v in ordered_visits(site):
        for nid, m in v.measurements.items():
            out[nid] = (v.id, m)
    return out


@dataclass
class SiteValues:
    """The fault level at every node and the Zs of every circuit."""

    level: dict[str, Level | None]
    zs: dict[str, LoopZs]

    @classmethod
    def build(cls, site: SiteFile, idx: SiteIndex) -> SiteValues:
        latest = _latest_measurements(site) if site.visits else {}
        level: dict[str, Level | None] = {}
        zs: dict[str, LoopZs] = {}
        info = site.site
        by_id = idx.by_id
        for nid in idx.order:
            n = by_id[nid].__dict__
            kind = n["kind"]
            own: Level | None = None
            if kind in ("board", "origin"):
                m = latest.get(nid)
                if m is not None and m[1].pscc_ka is not None:
                    own = Level(m[1].pscc_ka, f"measured at {idx.label(nid)} on visit {m[0]}")
                elif n["pscc_ka"] is not None:
                    own = Level(n["pscc_ka"], f"recorded at {idx.label(nid)}")
            if own is None:
                parent = n["parent"]
                if parent is not None:
                    own = level[parent]
                elif info.ze_ohm is not None:
                    own = Level(
                        info.u0_v / info.ze_ohm / 1000.0,
                        f"U0 / Ze = {info.u0_v:g} V / {info.ze_ohm:g} Ω at the origin (the "
                        "earth-fault current only; record pscc_ka)",
                    )
            level[nid] = own
            if kind == "circuit":
                m = latest.get(nid)
                if m is not None and m[1].zs_ohm is not None:
                    warm = m[1].warm
                    zs[nid] = LoopZs(
                        m[1].zs_ohm, warm, f"visit {m[0]}" + (" (warm)" if warm else " (cold)")
                    )
                elif n["zs_ohm"] is not None:
                    zs[nid] = LoopZs(n["zs_ohm"], False, "recorded on the circuit (cold)")
        return cls(level=level, zs=zs)

    def at(self, node_id: str) -> Level:
        """The fault level where this node is installed, or the stated assumption."""
        lv = self.level.get(node_id)
        return lv if lv is not None else Level(ASSUMED_KA, ASSUMED_NOTE)
