"""Plain-text rendering of an analysis, as ``tripwise check`` prints it."""

from __future__ import annotations

import textwrap

from model.rules.findings import SEVERITY_RANK, Analysis, Finding
from model.rules.limits import rule_set
from model.site.models import SiteFile
from model.site.tree import SiteIndex


def findings_by_board(site: SiteFile, result: Analysis) -> list[tuple[str, list[Finding]]]:
    """Findings grouped by board; boards ordered by their worst finding, then tree order."""
    idx = SiteIndex.build(site)
    groups: dict[str, list[Finding]] = {}
    for f in result.findings:
        groups.setdefault(f.board, []).append(f)
    pos = {nid: i for i, nid in enumerate(idx.order)}
    for fs in groups.values():
        fs.sort(key=lambda f: (SEVERITY_RANK[f.severity], f.rule, f.nodes))
    return sorted(
        groups.items(),
        key=lambda kv: (min(SEVERITY_RANK[f.severity] for f in kv[1]), pos.get(kv[0], 1 << 30)),
    )


def check_text(site: SiteFile, result: Analysis, width: int = 100) -> str:
    """The findings of one site as text, grouped by board, worst first."""
    idx = SiteIndex.build(site)
    info = site.site
    lines = [
        f"{info.name} — {info.earthing}, rules: {rule_set(info.rules).title}",
    ]
    c = result.counts()
    total = len(result.findings)
    if total:
        lines.append(f"{total} finding(s): " + ", ".join(f"{n} {s}" for s, n in c.items() if n))
    else:
        lines.append("No findings.")
    wrap = textwrap.TextWrapper(width=width, initial_indent="    ", subsequent_indent="    ")
    for board, fs in findings_by_board(site, result):
        lines.append("")
        lines.append(f"[{idx.label(board)}]")
        for f in fs:
            lines.append(f"  {f.severity.upper():<11} {f.rule}")
            lines.extend(wrap.wrap(f.message))
            if f.measured or f.band:
                lines.extend(wrap.wrap(f"measured: {f.measured or '—'}   band: {f.band or '—'}"))
            lines.extend(wrap.wrap(f"do: {f.action}"))
            basis = "" if f.basis == "standard" else f" ({f.basis})"
            lines.extend(wrap.wrap(f"source: {f.source}{basis}"))
    lines.append("")
    lines.append("Caution: " + result.caution)
    return "\n".join(lines) + "\n"
