"""'If this trips, what goes dark?': the circuits one device takes off supply."""

from __future__ import annotations

from typing import Any

from rich.text import Text
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.widgets import Button, DataTable, Static

from model.rules.findings import CAUTION, device_text
from model.rules.impact import TripImpact, trip_impact
from model.site.models import SiteFile
from model.site.terms import OVERCURRENT_KINDS, RCD_KINDS
from model.site.tree import SiteIndex
from tui.screens.closing import Dialog


def device_line(node: Any) -> str:
    """'RCCB 30 mA, Type A, general' for a residual-current device, the kind otherwise."""
    kind = str(node.kind)
    if hasattr(node, "idn_ma"):
        return f"{kind.upper()} {device_text(node)}"
    return kind


def trip_verb(kind: str) -> str:
    """How a node of this kind cuts off what it feeds."""
    return {"fuse": "blows", "switch": "is opened"}.get(
        kind, "trips" if kind in RCD_KINDS | OVERCURRENT_KINDS else "loses supply"
    )


def _names(idx: SiteIndex, ids: tuple[str, ...]) -> str:
    return ", ".join(f"{idx.label(c)} ({c})" for c in ids)


def lighting_text(idx: SiteIndex, impact: TripImpact) -> tuple[str, str]:
    """(text, style class) for the lighting line: kept, partly lost, or all lost."""
    if not impact.lighting_lost and not impact.lighting_kept:
        return "No lighting circuits are recorded on this site.", "-none"
    if impact.all_lighting_lost:
        return (
            "WARNING: ALL LIGHTING IS LOST. Every lighting circuit on the site goes dark: "
            + _names(idx, impact.lighting_lost),
            "-all-lost",
        )
    kept = "Lighting that stays on: " + _names(idx, impact.lighting_kept)
    if not impact.lighting_lost:
        return "No lighting is lost. " + kept, "-kept"
    return "Lighting lost: " + _names(idx, impact.lighting_lost) + ". " + kept, "-partly"


class ImpactScreen(Dialog[None]):
    """Every circuit that loses supply when one device trips, and the lighting left."""

    BINDINGS = [
        Binding("escape", "close", "Close"),
        Binding("q", "close", "Close", show=False),
    ]

    CSS_PATH = "impact.tcss"

    def __init__(self, site: SiteFile, device_id: str, index: SiteIndex | None = None) -> None:
        """``index``: the site's tree index where the caller has it (built here otherwise)."""
        super().__init__()
        self.site = site
        self.device_id = device_id
        self.index = SiteIndex.build(site) if index is None else index
        self.impact = trip_impact(self.index, device_id)

    def compose(self) -> ComposeResult:
        idx, imp = self.index, self.impact
        node = idx.node(self.device_id)
        with Vertical(id="impact-box"):
            yield Static(
                Text(
                    f"If {idx.label(self.device_id)} {trip_verb(str(node.kind))}, what goes dark?",
                    style="bold",
                ),
                id="impact-title",
                markup=False,
            )
            yield Static(
                f"{self.device_id} · {device_line(node)} · on {idx.board_label(self.device_id)}",
                id="impact-where",
                markup=False,
            )
            n = len(imp.lost)
            yield Static(
                "Nothing loses supply: no circuits below this device."
                if n == 0
                else f"{n} circuit{'s' if n != 1 else ''} lose{'s' if n == 1 else ''} supply:",
                id="impact-count",
                markup=False,
            )
            yield DataTable(id="impact-lost", cursor_type="row", zebra_stripes=True)
            text, cls = lighting_text(idx, imp)
            yield Static(text, id="impact-lighting", classes=cls, markup=False)
            yield Static(CAUTION, classes="caution", markup=False)
            yield Button("Close (Esc)", id="impact-close", compact=True)

    def on_mount(self) -> None:
        table = self.query_one("#impact-lost", DataTable)
        table.add_columns("id", "circuit", "board", "use")
        for c in self.impact.lost:
            cells = (c, self.index.label(c), self.index.board_label(c), self.index.node(c).use)
            table.add_row(*(Text(x) for x in cells), key=c)
        table.display = bool(self.impact.lost)
        if self.impact.lost:
            table.focus()

    def action_close(self) -> None:
        self.dismiss(None)

    @on(Button.Pressed, "#impact-close")
    def _close_pressed(self) -> None:
        self.dismiss(None)
