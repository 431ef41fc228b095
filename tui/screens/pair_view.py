"""What the two pair screens share: a title, rows of text, a chart, the caution, Close.

:class:`PairView` lays out one series pair (residual-current in
:mod:`tui.screens.pair`, fuses and breakers in :mod:`tui.screens.oc_pair`):
the subclass gives the title, the ``(heading, text, css class)`` rows and the
chart widget; the keys, the layout (side by side from 130 columns, stacked
below) and the styles (``pair.tcss``) are the same for both.
"""

from __future__ import annotations

from rich.text import Text
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import ScrollableContainer, Vertical
from textual.widget import Widget
from textual.widgets import Button, Static

from model.rules.findings import CAUTION
from tui.screens.closing import Dialog


class PairView(Dialog[None]):
    """A series pair of protective devices: the verdict in words beside its chart."""

    BINDINGS = [
        Binding("escape", "close", "Close"),
        Binding("q", "close", "Close", show=False),
        Binding("c", "show_chart", "Chart"),
    ]

    CSS_PATH = "pair.tcss"
    HORIZONTAL_BREAKPOINTS = [(0, "-narrow"), (130, "-wide")]

    def title_text(self) -> str:
        raise NotImplementedError

    def rows(self) -> list[tuple[str, str, str]]:
        """(heading, text, css class) rows of the summary."""
        raise NotImplementedError

    def chart_widget(self) -> Widget:
        """The chart (id ``pair-chart``), or a line saying why there is none."""
        raise NotImplementedError

    def fill_chart(self) -> None:
        """Give the chart widget its data once mounted."""

    def compose(self) -> ComposeResult:
        with Vertical(id="pair-box"):
            yield Static(Text(self.title_text(), style="bold"), id="pair-title", markup=False)
            with ScrollableContainer(id="pair-body"):
                with Vertical(id="pair-text"):
                    for heading, text, cls in self.rows():
                        row = Text()
                        row.append(f"{heading}: ", style="bold")
                        row.append(text)
                        yield Static(row, classes=f"pair-row {cls}".strip(), markup=False)
                yield self.chart_widget()
            yield Static(CAUTION, classes="caution", markup=False)
            yield Button("Close (Esc) · c: chart", id="pair-close", compact=True)

    def on_mount(self) -> None:
        self.fill_chart()
        self.query_one("#pair-body").focus()

    def action_close(self) -> None:
        self.dismiss(None)

    def action_show_chart(self) -> None:
        """Scroll the chart into view (on a short terminal it sits below the text)."""
        for chart in self.query("#pair-chart"):
            chart.scroll_visible(animate=False)

    @on(Button.Pressed, "#pair-close")
    def _close_pressed(self) -> None:
        self.dismiss(None)
