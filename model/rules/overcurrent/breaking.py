"""Breaking capacity: each overcurrent device against the fault current where it is installed.

References
----------
BS 7671 434.5.1 (breaking capacity not less than the prospective fault
current, unless an upstream device gives back-up); BS 7671 536.4.201 and
BS EN 61439-3 Annex ZB (a consumer unit's conditional rating with its maker's
devices).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Literal

from model.rules.overcurrent.analysis import oc_devices
from model.rules.overcurrent.bands import device_name
from model.rules.overcurrent.faults import SiteValues
from model.site.tree import SiteIndex

SOURCE = "BS 7671 434.5.1; IEC 60364-4-43 434.5.1"
CONDITIONAL_SOURCE = "BS 7671 536.4.201; BS EN 61439-3 Annex ZB"


@dataclass(slots=True, unsafe_hash=True)
class Breaking:
    """One device with a recorded breaking capacity and a known fault level (read-only)."""

    device: str
    name: str
    breaking_ka: float
    pscc_ka: float
    level_note: str
    mark: Literal["ok", "covered", "too low"]
    cover: str


def breaking_rows(
    idx: SiteIndex, values: SiteValues, devices: list[str] | None = None
) -> list[Breaking]:
    """Every device whose breaking capacity and fault level are both known."""
    out: list[Breaking] = []
    for d in oc_devices(idx) if devices is None else devices:
        dev = idx.by_id[d]
        level = values.level.get(d)
        if dev.__dict__["breaking_ka"] is None or level is None:
            continue
        name = device_name(dev)
        if dev.breaking_ka >= level.ka - 1e-9:
            out.append(Breaking(d, name, dev.breaking_ka, level.ka, level.note, "ok", ""))
            continue
        cover = ""
        board = idx.board_of[d]
        bn = idx.by_id[board]
        cond = bn.conditional_ka if bn.kind == "board" else None
        if cond is not None and cond >= level.ka - 1e-9:
            cover = (
                f"the conditional rating {cond:g} kA of {idx.label(board)} ({CONDITIONAL_SOURCE})"
            )
        if not cover:
            above = set(idx.ocpd_above[d])
            for row in dev.maker_backup:
                if row.upstream in above and row.up_to_ka >= level.ka - 1e-9:
                    cover = (
                        f"the maker's back-up combination with {idx.label(row.upstream)} up to "
                        f"{row.up_to_ka:g} kA ({row.source or 'source not given'})"
                    )
                    break
        mark: Literal["covered", "too low"] = "covered" if cover else "too low"
        out.append(Breaking(d, name, dev.breaking_ka, level.ka, level.note, mark, cover))
    return out
