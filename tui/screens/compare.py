"""Two visits of the site side by side (readings, devices tested, findings new and gone)."""

from __future__ import annotations

from rich.text import Text
from textual import work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.widgets import DataTable, Static

from model.rules.bands import fmt_value
from model.rules.findings import CAUTION
from model.site.history import visit_ids
from model.site.models import SiteFile
from model.visits.compare import CompareError, VisitComparison, change_text, compare_visits
from tui.screens.closing import Dialog


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
                f"Caution: {CAUTION}   [ / ]: earlier / later pair of visits · Esc: close",
                id="compare-caution",
                markup=False,
            )

    def on_mount(self) -> None:
        table = self.query_one("#compare-readings", DataTable)
        table.add_columns("device", "value", "from", "to", "change")
        self._compare()

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
            if d.presence == "neither":
                table.add_row(
                    Text(f"{d.label} ({d.device})"), "", "", "", "not tested on either visit"
                )
                continue
            where = {"added": " (later only)", "removed": " (earlier only)"}.get(d.presence, "")
            first = True
            for v in d.values:
                name = f"{d.label} ({d.device}){where}" if first else ""
                first = False
                table.add_row(
                    Text(name),
                    Text(v.key),
                    Text(fmt_value(v.key, v.old)),
                    Text(fmt_value(v.key, v.new)),
                    Text(change_text(v)),
                    key=f"{d.device}:{v.key}",
                )
        parts = []
        for title, fs in (
            ("New findings", cmp.findings_new),
            ("Findings gone", cmp.findings_gone),
            ("Unchanged", cmp.findings_unchanged),
        ):
            parts.append(f"{title}: {len(fs)}")
            if title != "Unchanged":
                parts.extend(f"  {f.severity.upper()} {f.rule} ({', '.join(f.nodes)})" for f in fs)
        self.query_one("#compare-findings", Static).update("\n".join(parts))

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
