"""Two visits of the site side by side (readings, devices tested, findings new and gone)."""

from __future__ import annotations

from rich.text import Text
from textual import work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.widgets import DataTable, Static
from textual.widgets.data_table import ColumnKey

from model.site.history import visit_ids
from model.site.models import SiteFile
from model.visits.compare import CompareError, VisitComparison, compare_visits
from model.visits.compare_words import device_heading, finding_groups, finding_text, value_row
from tui.format import CAUTION_SHORT, SEVERITY_MARK
from tui.screens.closing import Dialog
from tui.themes import tone

#: The table's columns (key, heading): a device heads its tests, then both values.
COLUMNS: tuple[tuple[str, str], ...] = (
    ("test", "device · test"),
    ("from", "earlier"),
    ("to", "later"),
    ("change", "change"),
)
#: Widths of the value columns: 'did not trip', '+132 ms (+73 %)', 'now did not trip'.
VALUE_WIDTHS: dict[str, int] = {"from": 12, "to": 12, "change": 16}


class CompareScreen(Dialog[None]):
    """Compare two visits (default: the two latest).  Escape closes."""

    BINDINGS = [
        Binding("escape", "close", "Close"),
        Binding("q", "close", "Close", show=False),
        Binding("left_square_bracket", "step(-1)", "Earlier pair"),
        Binding("right_square_bracket", "step(1)", "Later pair"),
    ]
    CSS_PATH = "compare.tcss"

    def __init__(
        self, site: SiteFile, from_id: str | None = None, to_id: str | None = None
    ) -> None:
        super().__init__()
        self.site = site
        self.from_id = from_id
        self.to_id = to_id
        self.comparison: VisitComparison | None = None
        self.error: str | None = None

    def compose(self) -> ComposeResult:
        with Vertical(id="compare-box"):
            yield Static("Comparing visits…", id="compare-title", markup=False)
            yield DataTable(id="compare-readings", zebra_stripes=True, cursor_type="row")
            yield Static("", id="compare-findings", markup=False)
            yield Static(
                f"{CAUTION_SHORT}  [ ]: earlier / later pair · Esc: close",
                id="compare-caution",
                markup=False,
            )

    def on_mount(self) -> None:
        table = self.query_one("#compare-readings", DataTable)
        for key, title in COLUMNS:
            table.add_column(title, key=key)
        self._compare()

    def on_resize(self) -> None:
        self._fit_columns()

    def _fit_columns(self) -> None:
        """The values keep their width; the device and test column takes what is left,
        so the change column is always on screen (80 columns and up)."""
        table = self.query_one("#compare-readings", DataTable)
        if ColumnKey("test") not in table.columns:
            return  # not set up yet
        width = table.size.width or self.app.size.width - 6
        fixed = sum(VALUE_WIDTHS.values())
        # each column has one cell of padding each side; two more for the scroll bar
        first = max(12, width - fixed - 2 * len(COLUMNS) - 2)
        for key, w in (("test", first), *VALUE_WIDTHS.items()):
            column = table.columns[ColumnKey(key)]
            column.auto_width = False
            column.width = w
        table.refresh()

    @work(thread=True, exclusive=True)
    def _compare(self) -> None:
        try:
            result = compare_visits(self.site, self.from_id, self.to_id)
        except CompareError as exc:
            self.app.call_from_thread(self._show_error, str(exc))
            return
        self.app.call_from_thread(self._show, result)

    def _show_error(self, message: str) -> None:
        self.error = message
        self.query_one("#compare-title", Static).update(f"Cannot compare: {message}")

    def _show(self, cmp: VisitComparison) -> None:
        self.comparison = cmp
        self.query_one("#compare-title", Static).update(cmp.title())
        table = self.query_one("#compare-readings", DataTable)
        table.clear()
        for d in cmp.devices:
            heading = Text(device_heading(d), style="bold", overflow="ellipsis", no_wrap=True)
            table.add_row(heading, "", "", "", key=d.device)
            for v in d.values:
                r = value_row(d.device, v)
                table.add_row(
                    Text(f"  {r.test}", overflow="ellipsis", no_wrap=True),
                    Text(r.old, overflow="ellipsis", no_wrap=True),
                    Text(r.new, overflow="ellipsis", no_wrap=True),
                    Text(r.change, overflow="ellipsis", no_wrap=True),
                    key=f"{d.device}:{v.key}",
                )
        self._fit_columns()
        text = Text()
        for title, fs in finding_groups(cmp):
            text.append(f"{title}: {len(fs)}\n", style="bold")
            if title == "Findings unchanged":
                continue
            for f in fs:
                mark, style = SEVERITY_MARK[f.severity]
                text.append(f" {mark} {f.severity:<11} ", style=tone(style))
                text.append(f"{finding_text(cmp, f)}\n")
        text.rstrip()
        self.query_one("#compare-findings", Static).update(text)

    def action_step(self, delta: int) -> None:
        """Move both visits one visit earlier (-1) or later (+1) in the site's history."""
        if self.comparison is None:
            return
        order = visit_ids(self.site)
        i, j = order.index(self.comparison.from_id), order.index(self.comparison.to_id)
        if not (0 <= i + delta < len(order) and 0 <= j + delta < len(order)):
            self.notify("No visit further that way.", severity="warning")
            return
        self.from_id, self.to_id = order[i + delta], order[j + delta]
        self._compare()

    def action_close(self) -> None:
        self.dismiss(None)
