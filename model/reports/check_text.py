"""Plain-text rendering of an analysis, as ``tripwise check`` prints it."""

from __future__ import annotations

import textwrap

from model.reports.analysis_view import findings_by_board, site_index
from model.rules.findings import Analysis
from model.rules.limits import rule_set
from model.rules.overcurrent.pairs import fmt_a
from model.site.models import SiteFile
from model.site.tree import SiteIndex


def oc_pair_lines(idx: SiteIndex, result: Analysis, wrap: textwrap.TextWrapper) -> list[str]:
    """The series pairs of fuses and breakers with their verdicts, as ``check`` lists them."""
    if not result.oc_pairs:
        return []
    out = ["", f"Overcurrent pairs ({len(result.oc_pairs)}), upstream over downstream:"]
    for p in result.oc_pairs:
        upto = "—" if p.limit_a is None else fmt_a(p.limit_a)
        out.append(
            f"  {p.verdict.upper():<13} {idx.label(p.up)} over {idx.label(p.down)}  "
            f"(selective up to {upto}; largest fault current {fmt_a(p.i_max_a)}; {p.basis} data)"
        )
        for r in p.ranges:
            out.extend(wrap.wrap(f"{r.kind}: {fmt_a(r.lo_a)} to {fmt_a(r.hi_a)}"))
    return out


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
    lines.extend(oc_pair_lines(idx, result, wrap))
    lines.append("")
    lines.append("Caution: " + result.caution)
    return "\n".join(lines) + "\n"
