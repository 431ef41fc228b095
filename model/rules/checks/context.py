"""What every check reads: the site, its tree index, the rule set and the pair analysis."""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

from model.rules.bands import Band
from model.rules.findings import PairAnalysis
from model.rules.flags import judge_values
from model.rules.limits import RuleSet, rule_set
from model.site.history import visits_before
from model.site.models import SiteFile, Visit
from model.site.tree import SiteIndex


@dataclass
class Context:
    site: SiteFile
    index: SiteIndex
    rules: RuleSet
    latest: Visit | None
    pairs: list[PairAnalysis] = field(default_factory=list)
    #: The overcurrent analysis (``checks.overcurrent.OcAnalysis``), built by its check.
    oc: Any = None
    _earlier: list[Visit] | None = field(default=None, repr=False)
    _judged: dict[int, tuple[tuple[Band, ...], tuple[str | None, ...]]] = field(
        default_factory=dict, repr=False
    )

    def judged(self, node: Any, res: Any) -> tuple[tuple[Band, ...], tuple[str | None, ...]]:
        """:func:`model.rules.flags.judge_values` of one set of results (the bands of its
        test groups and the flag of each value), worked out once per analysis and shared
        by the checks that read it (readings, trend)."""
        got = self._judged.get(id(res))
        if got is None:
            got = self._judged[id(res)] = judge_values(node, res, self.rules.name)
        return got

    def value_flags(self, node: Any, res: Any) -> tuple[str | None, ...]:
        """The flags of :meth:`judged`."""
        return self.judged(node, res)[1]

    def earlier_visits(self) -> list[Visit]:
        """The visits before the latest one, most recent first (worked out once)."""
        if self._earlier is None:
            latest = self.latest
            self._earlier = [] if latest is None else visits_before(self.site, latest.id)
        return self._earlier

    @classmethod
    def build(cls, site: SiteFile, index: SiteIndex | None = None) -> Context:
        if index is not None and index.site is not site:
            raise ValueError("the tree index was built from another version of the site")
        return cls(
            site=site,
            index=SiteIndex.build(site) if index is None else index,
            rules=rule_set(site.site.rules),
            latest=site.latest_visit(),
        )
