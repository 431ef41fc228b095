"""Plain-text rendering of an analysis, as ``tripwise check`` prints it."""

from __future__ import annotations

import textwrap

from model.reports.analysis_view import findings_by_board, site_index
from model.rules.findings import Analysis
from model.rules.limits import rule_set
from model.site.models import SiteFile


def check_text(site: SiteFile, result: Analysis, width: int = 100) -> str:
    """The findings of one site as text, grouped by board, worst first."""
    idx = site_index(site, result)
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
    for board, fs in findings_by_board(idx, result):
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
