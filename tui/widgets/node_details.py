"""What the app knows about the node under the cursor: values, findings, readings, impact."""

from __future__ import annotations

from typing import Any

from rich.text import Text
from textual.widgets import Static

from model.rules.bands import fmt_result, judge_reading
from model.rules.findings import Analysis, Finding
from model.rules.impact import trip_impact
from model.site.fields import field_specs
from model.site.models import Visit
from model.site.nodes import NODE_CLASSES
from model.site.terms import RCD_KINDS, TEST_NAMES
from model.site.tree import SiteIndex
from tui.format import SEVERITY_MARK, node_summary, node_title
from tui.themes import tone

TEST_TITLES = {
    "half_0": "½× 0°",
    "half_180": "½× 180°",
    "x1_0": "1× 0°",
    "x1_180": "1× 180°",
    "x5_0": "5× 0°",
    "x5_180": "5× 180°",
}

#: Kinds whose opening cuts supply to what is below (for the impact summary).
_IMPACT_KINDS = RCD_KINDS | {"board", "switch", "fuse", "mcb", "origin"}


def impact_lines(idx: SiteIndex, node_id: str) -> list[str]:
    """A short account of what a trip of this node cuts off (from ``model.rules.impact``)."""
    imp = trip_impact(idx, node_id)
    if not imp.lost:
        return ["A trip here cuts off no circuits."]
    names = ", ".join(idx.label(c) for c in imp.lost[:6])
    more = f" and {len(imp.lost) - 6} more" if len(imp.lost) > 6 else ""
    lines = [f"A trip here cuts off {len(imp.lost)} circuit(s): {names}{more}."]
    if imp.all_lighting_lost:
        lines.append("All lighting is lost.")
    elif imp.lighting_lost:
        kept = ", ".join(idx.label(c) for c in imp.lighting_kept[:4])
        lines.append(f"Lighting kept on: {kept}.")
    return lines


class NodeDetails(Static):
    """A read-only account of one node."""

    def show(
        self,
        idx: SiteIndex,
        node_id: str | None,
        analysis: Analysis | None,
        visit: Visit | None,
        rules: str,
    ) -> None:
        if node_id is None or node_id not in idx.by_id:
            self.update("Nothing selected.")
            return
        node = idx.by_id[node_id]
        t = Text()
        t.append(node_title(node), style="bold")
        t.append(f"  {node.kind} · {node.id}\n", style=tone("$tw-muted"))
        if node.kind != "origin":
            t.append(f"{node_summary(node)}\n", style=tone("$tw-value"))
        t.append(f"{idx.path_text(node_id)}\n", style=tone("$tw-muted"))
        self._values(t, node)
        if analysis is not None:
            mine = [f for f in analysis.findings if node_id in f.nodes]
            if mine:
                t.append("\nFindings\n", style="bold underline")
                for f in mine:
                    mark, style = SEVERITY_MARK[f.severity]
                    style = tone(style)
                    t.append(f"{mark} ", style=style)
                    t.append(f"{f.message}\n")
        if node.kind in RCD_KINDS:
            self._readings(t, node, visit, rules)
        if node.kind in _IMPACT_KINDS:
            t.append("\nIf it opens\n", style="bold underline")
            for line in impact_lines(idx, node_id):
                t.append(line + "\n")
        self.update(t)

    def show_finding(self, idx: SiteIndex, f: Finding) -> None:
        """One finding in full: what, where, what to do, and what it rests on."""
        mark, style = SEVERITY_MARK[f.severity]
        style = tone(style)
        t = Text()
        t.append(f"{mark} {f.severity}", style=style)
        t.append(f"  {f.rule}\n", style=tone("$tw-muted"))
        where = ", ".join(idx.path_text(n) for n in f.nodes if n in idx.by_id)
        if where:
            t.append(f"{where}\n", style=tone("$tw-muted"))
        t.append(f"\n{f.message}\n")
        if f.measured or f.band:
            t.append(
                f"measured {f.measured or '—'}; band {f.band or '—'}\n", style=tone("$tw-value")
            )
        t.append("\nWhat to do\n", style="bold underline")
        t.append(f"{f.action}\n")
        basis = "" if f.basis == "standard" else f" ({f.basis}: advice, not a requirement)"
        t.append(f"\nRests on: {f.source}{basis}\n", style=tone("$tw-muted"))
        t.append("Enter: go to the node\n", style=tone("$tw-muted"))
        self.update(t)

    def _values(self, t: Text, node: Any) -> None:
        for spec in field_specs(NODE_CLASSES[node.kind]):
            if spec.name in ("id", "label"):
                continue
            v = getattr(node, spec.name)
            if v in (None, "", [], False):
                continue
            shown = (
                ", ".join(v)
                if isinstance(v, list)
                else ("yes" if v is True else f"{v:g}" if isinstance(v, float) else str(v))
            )
            unit = f" {spec.unit}" if spec.unit else ""
            t.append(f"{spec.title}: ", style=tone("$tw-muted"))
            t.append(f"{shown}{unit}\n")

    def _readings(self, t: Text, node: Any, visit: Visit | None, rules: str) -> None:
        t.append("\nReadings", style="bold underline")
        if visit is None:
            t.append("  (no visit yet; press r to start one)\n", style=tone("$tw-muted"))
            return
        t.append(f"  visit {visit.date}\n", style=tone("$tw-muted"))
        reading = visit.readings.get(node.id)
        if reading is None:
            t.append("not tested yet (press r)\n", style=tone("$tw-investigate"))
            return
        if reading.not_tested is not None:
            t.append(f"not tested: {reading.not_tested}\n")
            return
        verdicts = judge_reading(node, reading, rules)
        for test in TEST_NAMES:
            value = getattr(reading, test)
            if value is None:
                continue
            j = verdicts[test]
            t.append(f"{TEST_TITLES[test]:<9}{fmt_result(value):<14}")
            t.append(
                "✖ " + j.text if j.flag else "✓",
                style=tone("$tw-required") if j.flag else tone("$tw-ok"),
            )
            t.append("\n")
        if reading.ramp_ma is not None:
            j = verdicts["ramp_ma"]
            t.append(f"{'ramp':<9}{reading.ramp_ma:g} mA{'':<8}")
            t.append(
                "✖ " + j.text if j.flag else "✓",
                style=tone("$tw-required") if j.flag else tone("$tw-ok"),
            )
            t.append("\n")
        if reading.button is not None:
            t.append(f"{'button':<9}{reading.button}\n")
