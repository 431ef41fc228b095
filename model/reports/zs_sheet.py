"""The test sheet's loop-impedance rows: one per circuit fed through an overcurrent device.

A section of its own (way, circuit, protective device, required time, Zs
maximum, measured Zs, mark), built from the overcurrent analysis so the sheet
and the checks cannot disagree.
"""

from __future__ import annotations

from dataclasses import dataclass

from model.reports.analysis_view import site_index
from model.rules.findings import Analysis
from model.rules.overcurrent.disconnection import Disconnection
from model.site.models import SiteFile

TITLE = "Loop impedance and disconnection"
COLUMNS = (
    "way",
    "circuit",
    "protective device",
    "required time",
    "Zs maximum",
    "measured Zs",
    "mark",
)
NOTE = (
    "Zs maximum = Cmin × U0 / Ia for the device and the time Table 41.1 requires; a cold "
    "reading is compared with the stated fraction of it (0.8 in the UK, common practice), "
    "a reading marked warm with the maximum itself."
)


@dataclass(frozen=True)
class ZsRow:
    """One circuit's row, every cell as printed."""

    circuit_id: str
    way: str
    circuit: str
    device: str
    required: str
    zs_max: str
    measured: str
    mark: str

    def cells(self) -> tuple[str, ...]:
        return (
            self.way,
            self.circuit,
            self.device,
            self.required,
            self.zs_max,
            self.measured,
            self.mark,
        )


def _way(idx: object, d: Disconnection) -> str:
    """The circuit's way as numbered on site, else its protective device's ('' if neither)."""
    node = idx.node  # type: ignore[attr-defined]
    for nid in (d.circuit, d.device):
        way = getattr(node(nid), "way", "") if nid else ""
        if way:
            return str(way)
    return ""


def _circuit_name(idx: object, d: Disconnection) -> str:
    """The circuit's label; a circuit without one is named by its device's label."""
    label = idx.label  # type: ignore[attr-defined]
    name = str(label(d.circuit))
    if name == d.circuit and d.device and label(d.device) != d.device:
        return f"{label(d.device)} ({d.circuit})"
    return name


def _row(idx: object, d: Disconnection) -> ZsRow:
    zs_max = "—"
    if d.zs_max_ohm is not None:
        zs_max = f"{d.zs_max_ohm:.3g} Ω"
        if d.limit_ohm is not None and not d.warm and abs(d.limit_ohm - d.zs_max_ohm) > 1e-12:
            zs_max += f" (cold {d.limit_ohm:.3g} Ω)"
    measured = (
        "" if d.measured_ohm is None else f"{d.measured_ohm:g} Ω" + (" warm" if d.warm else "")
    )
    mark = d.mark if not d.note else f"{d.mark}: {d.note}"
    return ZsRow(
        circuit_id=d.circuit,
        way=_way(idx, d),
        circuit=_circuit_name(idx, d),
        device=d.device_name,
        required="—" if d.required_s is None else f"{d.required_s:g} s",
        zs_max=zs_max,
        measured=measured,
        mark=mark,
    )


def build_zs_rows(site: SiteFile, analysis: Analysis) -> list[ZsRow]:
    """The rows in tree order (empty when the analysis has no overcurrent part)."""
    if analysis.oc is None:
        return []
    idx = site_index(site, analysis)
    return [_row(idx, d) for d in analysis.oc.disconnection]
