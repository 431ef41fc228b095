"""One series pair of fuses or breakers: both bands, the verdict in words, the data it rests on."""

from __future__ import annotations

from rich.text import Text
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import ScrollableContainer, Vertical
from textual.screen import ModalScreen
from textual.widgets import Button, Static

from model.reports.oc_chart import OcChart, oc_chart_data
from model.rules.findings import CAUTION, Analysis
from model.rules.overcurrent.pairs import fmt_a
from model.site.models import SiteFile
from tui.widgets.occhart import OcBandChart


class OcPairScreen(ModalScreen[None]):
    """Selectivity of an upstream and a downstream overcurrent device."""

    BINDINGS = [
        Binding("escape", "close", "Close"),
        Binding("q", "close", "Close", show=False),
        Binding("c", "show_chart", "Chart"),
    ]

    CSS_PATH = "oc_pair.tcss"
    HORIZONTAL_BREAKPOINTS = [(0, "-narrow"), (130, "-wide")]

    def __init__(self, site: SiteFile, analysis: Analysis, up_id: str, down_id: str) -> None:
        super().__init__()
        self.chart: OcChart = oc_chart_data(site, analysis, up_id, down_id)

    def _lines(self) -> list[tuple[str, str, str]]:
        c = self.chart
        rows = [
            ("Upstream", f"{c.up_label} ({c.up_id}) · {c.up_name}", ""),
            ("Downstream", f"{c.down_label} ({c.down_id}) · {c.down_name}", ""),
            ("Verdict", f"{c.verdict.upper()}: {c.verdict_words}", f"-{c.verdict}"),
            ("Why", c.explanation, ""),
        ]
        if c.limit_a is not None:
            rows.append(("Selective up to", fmt_a(c.limit_a), ""))
        if c.i_max_a is not None:
            rows.append(("Largest fault current", fmt_a(c.i_max_a), ""))
        for lo, hi, kind in c.ranges:
            rows.append(("Range", f"{kind}: {fmt_a(lo)} to {fmt_a(hi)}", "-warn"))
        for line in c.data:
            rows.append(("Rests on", line, "-muted"))
        for note in c.notes:
            rows.append(("Note", note, "-muted"))
        return rows

    def compose(self) -> ComposeResult:
        c = self.chart
        with Vertical(id="pair-box"):
            yield Static(
                Text(f"Selectivity: {c.up_label} above {c.down_label}", style="bold"),
                id="pair-title",
                markup=False,
            )
            with ScrollableContainer(id="pair-body"):
                with Vertical(id="pair-text"):
                    for heading, text, cls in self._lines():
                        row = Text()
                        row.append(f"{heading}: ", style="bold")
                        row.append(text)
                        yield Static(row, classes=f"pair-row {cls}".strip(), markup=False)
                yield OcBandChart(id="pair-chart")
            yield Static(CAUTION, classes="caution", markup=False)
            yield Button("Close (Esc) · c: chart", id="pair-close", compact=True)

    def on_mount(self) -> None:
        self.query_one(OcBandChart).chart = self.chart
        self.query_one("#pair-body").focus()

    def action_close(self) -> None:
        self.dismiss(None)

    def action_show_chart(self) -> None:
        for chart in self.query(OcBandChart):
            chart.scroll_visible(animate=False)

    @on(Button.Pressed, "#pair-close")
    def _close_pressed(self) -> None:
        self.dismiss(None)
