"""Two visits compared, in the trade's words: what ``tripwise compare`` prints and the
app's compare screen shows.

Reading keys become the tests' names (``x1_180`` -> '1 × IΔn, 180°'), devices
and findings are named by their labels; the ids stay in ``--json`` only.
"""

from __future__ import annotations

import textwrap
from dataclasses import dataclass

from model.rules.bands import fmt_value
from model.rules.findings import Finding
from model.site.terms import reading_label
from model.visits.compare import DeviceComparison, ValueChange, VisitComparison, change_text

#: A device's presence on the two visits, in words (nothing when on both).
PRESENCE_WORDS: dict[str, str] = {
    "both": "",
    "added": "tested on the later visit only",
    "removed": "tested on the earlier visit only",
    "neither": "not tested on either visit",
}


@dataclass(frozen=True, slots=True)
class ValueRow:
    """One compared value for people: the test's name, both values and the change."""

    device: str
    key: str
    test: str
    old: str
    new: str
    change: str


def device_heading(d: DeviceComparison) -> str:
    """'RCCB 2 (downstairs)', with its presence where it was not tested on both visits."""
    where = PRESENCE_WORDS[d.presence]
    return f"{d.label} — {where}" if where else d.label


def key_words(key: str) -> str:
    """A compared key in words; a further waveform's key ('x1_0 (half-wave)') keeps its
    waveform: '1 × IΔn, 0° (half-wave)'."""
    base, _, rest = key.partition(" ")
    return reading_label(base) + (f" {rest}" if rest else "")


def value_row(device: str, v: ValueChange) -> ValueRow:
    base = v.key.split(" ")[0]
    return ValueRow(
        device,
        v.key,
        key_words(v.key),
        fmt_value(base, v.old),
        fmt_value(base, v.new),
        change_text(v),
    )


def nodes_text(cmp: VisitComparison, f: Finding) -> str:
    """The nodes a finding names, by label ('RCCB 2 (downstairs), RCBO W3')."""
    return ", ".join(cmp.node_labels.get(n, n) for n in f.nodes)


def finding_text(cmp: VisitComparison, f: Finding) -> str:
    """A finding in one line of words: its message, led by the nodes' labels unless it
    already begins with them."""
    names = nodes_text(cmp, f)
    first = cmp.node_labels.get(f.nodes[0], f.nodes[0]) if f.nodes else ""
    return f.message if not first or f.message.startswith(first) else f"{names}: {f.message}"


def finding_groups(cmp: VisitComparison) -> list[tuple[str, list[Finding]]]:
    """(heading, findings): new, gone, unchanged."""
    return [
        ("New findings", cmp.findings_new),
        ("Findings gone", cmp.findings_gone),
        ("Findings unchanged", cmp.findings_unchanged),
    ]


def compare_text(cmp: VisitComparison, width: int = 100) -> str:
    """The comparison as plain text, as ``tripwise compare`` prints it."""
    test_w = max([len(key_words(v.key)) for d in cmp.devices for v in d.values] or [4])
    lines = [cmp.title(), "", "Readings"]
    for d in cmp.devices:
        if d.presence == "neither":
            continue
        lines.append(f"  {device_heading(d)}")
        for v in d.values:
            r = value_row(d.device, v)
            lines.append(f"    {r.test:<{test_w}}  {r.old:>12} → {r.new:<12}  {r.change}")
    untested = [d.label for d in cmp.devices if d.presence == "neither"]
    if untested:
        lines.append("")
        lines.append("Not tested on either visit: " + ", ".join(untested))
    for title, fs in finding_groups(cmp):
        lines.append("")
        lines.append(f"{title}: {len(fs)}")
        for f in fs:
            lead = f"  {f.severity.upper():<11} "
            lines.extend(
                textwrap.wrap(
                    finding_text(cmp, f),
                    width,
                    initial_indent=lead,
                    subsequent_indent=" " * len(lead),
                    break_on_hyphens=False,
                )
            )
    lines.append("")
    lines.append("Caution: " + cmp.caution)
    return "\n".join(lines) + "\n"
