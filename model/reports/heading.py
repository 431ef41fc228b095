"""The heading every printed document carries, and the not-a-certificate statement.

Every document names the site, the visit and the rule set at the top, and
carries :data:`STATEMENT` (a record of readings and checks, not a
certificate) with the generation time and tripwise version.
"""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass

from model import __version__
from model.reports.text import clean
from model.rules.limits import rule_set
from model.site.models import SiteFile, Visit

#: Printed on every page (PDF) or at top and bottom (Markdown, text) of both documents.
STATEMENT = (
    "This document is a record of readings and checks made to support the inspector. "
    "It is NOT a certificate: the local wiring rules and licensed practice govern."
)


@dataclass(frozen=True)
class Heading:
    """What every document names at the top."""

    title: str
    site_name: str
    address: str
    client: str
    earthing: str
    rules_title: str
    visit_id: str | None
    visit_date: str | None
    inspector: str
    instrument: str
    generated: str
    version: str
    statement: str = STATEMENT
    #: The latest visit of the site when the document is of an earlier one (else None).
    later_visit_id: str | None = None
    later_visit_date: str | None = None

    def generated_line(self) -> str:
        return f"Generated {self.generated} by tripwise {self.version}"

    def visit_note(self) -> str:
        """'' for the latest visit; for an earlier one, a line saying so (printed at the top)."""
        if self.later_visit_id is None:
            return ""
        this = _visit_words(self.visit_id, self.visit_date)
        later = _visit_words(self.later_visit_id, self.later_visit_date)
        return (
            f"Readings of the visit {this}; a later visit ({later}) exists. The findings are "
            "those of the site as it stood with the readings up to this visit."
        )

    def facts(self) -> list[tuple[str, str]]:
        """(name, value) pairs for the heading block; empty values left out."""
        rows = [
            ("Site", self.site_name),
            ("Address", self.address),
            ("Client", self.client),
            ("Visit date", self.visit_date or "no visit recorded"),
            ("Inspector", self.inspector),
            ("Instrument", self.instrument),
            ("Earthing", self.earthing),
            ("Rules", self.rules_title),
        ]
        return [(k, v) for k, v in rows if v]


def _visit_words(visit_id: str | None, date: str | None) -> str:
    """'2023-05-09', or 'v2 of 2023-05-09' when the id is not the date."""
    return f"{date}" if visit_id == date else f"{visit_id} of {date}"


def build_heading(
    site: SiteFile,
    visit: Visit | None,
    title: str,
    generated: dt.datetime | None,
    later: Visit | None = None,
) -> Heading:
    """The heading of one document of ``visit``; ``generated`` None means now (UTC).

    ``later`` is the site's latest visit when the document is of an earlier one.
    """
    info = site.site
    return Heading(
        title=title,
        site_name=clean(info.name),
        address=clean(info.address),
        client=clean(info.client),
        earthing=info.earthing,
        rules_title=rule_set(info.rules).title,
        visit_id=None if visit is None else visit.id,
        visit_date=None if visit is None else visit.date,
        inspector="" if visit is None else clean(visit.inspector),
        instrument="" if visit is None else clean(visit.instrument),
        generated=_utc(generated).strftime("%Y-%m-%d %H:%M UTC"),
        version=__version__,
        later_visit_id=None if later is None else later.id,
        later_visit_date=None if later is None else later.date,
    )


def _utc(generated: dt.datetime | None) -> dt.datetime:
    """The generation time in UTC; a naive time is taken as UTC already."""
    if generated is None:
        return dt.datetime.now(dt.UTC)
    if generated.tzinfo is None:
        return generated.replace(tzinfo=dt.UTC)
    return generated.astimezone(dt.UTC)
