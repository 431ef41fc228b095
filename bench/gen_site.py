"""A realistic, invented site of any size, for benchmarks and tests.

``generate_site(n_nodes, seed)`` builds a valid :class:`~model.site.models.SiteFile`
with exactly ``n_nodes`` nodes: a supply, a cut-out fuse, a main board, and
below it sub-boards and device groups with residual-current devices cascaded
three to five deep (time-delayed 1000/300/100 mA devices above 30 mA RCCBs and
RCBOs, with socket and portable RCDs beyond the circuits), final circuits of
varied use, and one or two visits with a reading for most devices.  Everything
in it is invented; the same ``(n_nodes, seed)`` always gives the same site.
"""

from __future__ import annotations

import random
from typing import Any

from model.site.models import SiteFile
from model.site.terms import RCD_KINDS

_USES = [
    ("sockets", 32.0),
    ("sockets", 20.0),
    ("lighting", 6.0),
    ("lighting", 10.0),
    ("cooker", 32.0),
    ("shower", 40.0),
    ("water-heater", 16.0),
    ("heating", 16.0),
    ("ev-charger", 32.0),
    ("outdoor", 16.0),
    ("fixed-equipment", 20.0),
    ("other", 16.0),
]


class _Builder:
    def __init__(self, n_nodes: int, seed: int) -> None:
        self.rng = random.Random(seed)
        self.n_nodes = n_nodes
        self.nodes: list[dict[str, Any]] = []
        self.counters: dict[str, int] = {}

    def left(self) -> int:
        return self.n_nodes - len(self.nodes)

    def add(self, prefix: str, parent: str | None, **fields: Any) -> str:
        self.counters[prefix] = self.counters.get(prefix, 0) + 1
        node_id = f"{prefix}{self.counters[prefix]}"
        node: dict[str, Any] = {"id": node_id, "kind": fields.pop("kind")}
        if parent is not None:
            node["parent"] = parent
        node.update(fields)
        self.nodes.append(node)
        return node_id

    def circuit(self, parent: str, *, small: bool = False) -> str:
        rng = self.rng
        use, rated = rng.choice(_USES[:4] if small else _USES)
        fields: dict[str, Any] = {"kind": "circuit", "use": use, "rated_a": rated}
        fields["label"] = f"{use.replace('-', ' ').capitalize()} {self.counters.get('c', 0) + 1}"
        if use == "shower":
            fields["location"] = ["bathroom"]
        if use == "outdoor":
            fields["location"] = ["outdoor"]
        if use == "ev-charger":
            fields["loads"] = [rng.choice(["ev-no-dc-detect", "ev-dc-detect-6ma"])]
        if use == "sockets" and rng.random() < 0.3:
            fields["loads"] = ["it-equipment"]
        if use == "sockets" and rng.random() < 0.3:
            fields["concealed_shallow"] = True
        if rng.random() < 0.5:
            fields["leakage_ma"] = round(rng.uniform(0.2, 4.0), 1)
        if rng.random() < 0.6:
            fields["zs_ohm"] = round(rng.uniform(0.2, 1.6), 2)
        return self.add("c", parent, **fields)

    def rcd(self, parent: str, idn_ma: float, *, delayed: bool, kind: str = "rccb") -> str:
        fields: dict[str, Any] = {
            "kind": kind,
            "idn_ma": idn_ma,
            "waveform": self.rng.choice(
                ["A", "A", "A", "AC", "F", "B"] if kind != "cbr" else ["A"]
            ),
            "rated_a": 100.0 if delayed else self.rng.choice([40.0, 63.0, 80.0]),
            "label": f"{kind.upper()} {idn_ma:g} mA",
        }
        if delayed:
            fields["delay"] = "S"
        prefix = {"rccb": "rc", "cbr": "cb", "rcbo": "rb", "srcd": "sr", "prcd": "pr"}[kind]
        return self.add(prefix, parent, **fields)

    def group(self, parent: str, depth: int) -> None:
        """Devices and circuits below ``parent``, a board ``depth`` delayed RCDs down.

        At most five RCDs in series: up to three time-delayed ones above the
        board, a 30 mA device, and a socket RCD (a portable one only above
        depth three).
        """
        rng = self.rng
        while self.left() > 0:
            r = rng.random()
            if depth < 3 and r < 0.12 and self.left() > 12:
                # a sub-board fed through a time-delayed RCD: one more level of cascade
                idn = {0: 1000.0, 1: 300.0, 2: 100.0}[depth]
                up = self.rcd(parent, idn, delayed=True, kind="cbr" if depth == 0 else "rccb")
                board = self.add("db", up, kind="board", label=f"Sub-board {depth + 1}")
                self.group(board, depth + 1)
            elif r < 0.45 and self.left() >= 3:
                rc = self.rcd(parent, 30.0, delayed=False)
                for _ in range(rng.randint(2, 5)):
                    if self.left() < 2:
                        break
                    m = self.add(
                        "m",
                        rc,
                        kind="mcb",
                        rated_a=rng.choice([6.0, 16.0, 20.0, 32.0]),
                        curve="B",
                        breaking_ka=6.0,
                    )
                    c = self.circuit(m)
                    if rng.random() < 0.15 and self.left() >= 2:
                        sr = self.rcd(c, 30.0, delayed=False, kind="srcd")
                        if depth < 3 and rng.random() < 0.5 and self.left() >= 2:
                            pr = self.rcd(sr, 10.0, delayed=False, kind="prcd")
                            self.circuit(pr, small=True)
            elif self.left() >= 2:
                rb = self.rcd(parent, 30.0, delayed=False, kind="rcbo")
                self.circuit(rb)
            else:
                self.circuit(parent)
            if rng.random() < 0.08 * (depth + 1):
                return

    def readings(self) -> dict[str, dict[str, Any]]:
        rng = self.rng
        out: dict[str, dict[str, Any]] = {}
        for n in self.nodes:
            if n["kind"] not in RCD_KINDS:
                continue
            if rng.random() < 0.05:
                out[n["id"]] = {"not_tested": "no access on the day"}
                continue
            delayed = n.get("delay") == "S"
            lo, hi = (130.0, 400.0) if delayed else (12.0, 38.0)
            r: dict[str, Any] = {
                "half_0": "did not trip",
                "x1_0": round(rng.uniform(lo, hi), 1),
                "x1_180": round(rng.uniform(lo, hi), 1),
                "x5_0": round(rng.uniform(lo / 2, hi / 3), 1),
                "ramp_ma": round(n["idn_ma"] * rng.uniform(0.6, 0.95), 1),
                "button": "worked" if rng.random() > 0.02 else "failed",
            }
            if rng.random() < 0.1:
                r["note"] = "test button stiff"
            out[n["id"]] = r
        return out


def generate_site(n_nodes: int, seed: int = 0) -> SiteFile:
    """An invented, valid site with exactly ``n_nodes`` nodes (at least 4)."""
    if n_nodes < 4:
        raise ValueError("a generated site needs at least 4 nodes")
    b = _Builder(n_nodes, seed)
    b.add("supply", None, kind="origin", label="Supply intake")
    b.add(
        "cutout", "supply1", kind="fuse", rated_a=100.0, fuse_type="gG", breaking_ka=33.0,
        label="Cut-out fuse",
    )  # fmt: skip
    b.add("mb", "cutout1", kind="board", label="Main board", place="Plant room", pscc_ka=4.0)
    while b.left() > 0:
        b.group("mb1", 0)
    visits = [
        {
            "id": "v2026-11-14",
            "date": "2026-11-14",
            "inspector": "A. Tester (invented)",
            "instrument": "Multifunction tester",
            "readings": b.readings(),
        }
    ]
    if seed % 2 == 1:
        visits.insert(0, {"id": "v2025-11-02", "date": "2025-11-02", "readings": b.readings()})
    doc = {
        "format": "tripwise.site",
        "version": 2,
        "site": {
            "name": f"Generated site {n_nodes}/{seed} (invented)",
            "address": "1 Invented Road",
            "earthing": b.rng.choice(["TN-C-S", "TN-S", "TT"]),
            "ze_ohm": 0.35,
            "ra_ohm": 21.0,
            "domestic": False,
        },
        "nodes": b.nodes,
        "visits": visits,
    }
    return SiteFile.model_validate(doc)
