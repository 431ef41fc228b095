"""A site's visits in time order, and the site as it stood at one visit.

Visits are ordered by date; visits on the same date keep their order in the
file (the later one in the list is the later visit), which is the order
:meth:`model.site.models.SiteFile.latest_visit` uses.
"""

from __future__ import annotations

from collections.abc import Iterable

from model.site.models import Reading, SiteFile, Visit


def ordered_visits(site: SiteFile) -> list[Visit]:
    """The site's visits, oldest first (by date, then by position in the file)."""
    pos = {id(v): i for i, v in enumerate(site.visits)}
    return sorted(site.visits, key=lambda v: (v.date, pos[id(v)]))


def visit_ids(site: SiteFile) -> list[str]:
    """Visit ids, oldest first."""
    return [v.id for v in ordered_visits(site)]


def known_visits_text(site: SiteFile) -> str:
    """The site's visit ids for a message, oldest first: 'v1, v2', or 'none'."""
    return ", ".join(visit_ids(site)) or "none"


def find_visit(site: SiteFile, visit_id: str) -> Visit | None:
    """The visit with this id, or None."""
    for v in site.visits:
        if v.id == visit_id:
            return v
    return None


def visits_before(site: SiteFile, visit_id: str) -> list[Visit]:
    """The visits earlier than ``visit_id``, most recent first."""
    order = ordered_visits(site)
    for i, v in enumerate(order):
        if v.id == visit_id:
            return list(reversed(order[:i]))
    raise KeyError(visit_id)


def cut_at(site: SiteFile, visit_id: str) -> SiteFile:
    """A copy of the site whose history ends at ``visit_id`` (later visits left out).

    The copy's :meth:`~model.site.models.SiteFile.latest_visit` is that visit.  It shares the
    (unchanged) nodes and visits of the original: treat it as read-only.
    """
    order = ordered_visits(site)
    keep: set[int] = set()
    for v in order:
        keep.add(id(v))
        if v.id == visit_id:
            break
    else:
        raise KeyError(visit_id)
    visits = [v for v in site.visits if id(v) in keep]
    return site.model_copy(update={"visits": visits})


def new_visit_id(date: str, taken: Iterable[str]) -> str:
    """The id for a new visit on ``date``: the date, or the date with -2, -3 ... when taken."""
    used = set(taken)
    if date not in used:
        return date
    n = 2
    while f"{date}-{n}" in used:
        n += 1
    return f"{date}-{n}"


def previous_reading(site: SiteFile, visit_id: str, device: str) -> tuple[Visit, Reading] | None:
    """The latest reading of ``device`` with values on a visit earlier than ``visit_id``."""
    for v in visits_before(site, visit_id):
        r = v.readings.get(device)
        if r is not None and r.has_values():
            return v, r
    return None
