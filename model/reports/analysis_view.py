"""How the reports read an analysis: the site index it was built on, and findings by board.

The checks build one :class:`~model.site.tree.SiteIndex` per analysis; every
report of that analysis reads the same index rather than building another.
"""

from __future__ import annotations

from model.rules.findings import SEVERITY_RANK, Analysis, Finding
from model.site.models import SiteFile
from model.site.tree import SiteIndex


def site_index(site: SiteFile, analysis: Analysis) -> SiteIndex:
    """The index the analysis of ``site`` was built on; a new one if it was of another site."""
    if analysis.index is not None and analysis.index.site is site:
        return analysis.index
    return SiteIndex.build(site)


def findings_by_board(idx: SiteIndex, result: Analysis) -> list[tuple[str, list[Finding]]]:
    """Findings grouped by board; boards ordered by their worst finding, then tree order."""
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
