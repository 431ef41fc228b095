"""A new visit's id: its date, made unique with -2, -3 ... on a day with a visit already."""

from __future__ import annotations

from model.site.history import new_visit_id


def test_new_visit_id() -> None:
    assert new_visit_id("2026-12-01", []) == "2026-12-01"
    assert new_visit_id("2026-12-01", ["2026-12-01"]) == "2026-12-01-2"
    assert new_visit_id("2026-12-01", ["2026-12-01", "2026-12-01-2"]) == "2026-12-01-3"


def test_new_visit_id_takes_any_iterable_of_ids() -> None:
    visits = ("2026-12-01", "2026-12-01-2", "2026-11-30")
    assert new_visit_id("2026-12-01", (v for v in visits)) == "2026-12-01-3"
    assert new_visit_id("2026-11-29", iter(visits)) == "2026-11-29"
    # the first free number is taken
    assert new_visit_id("2026-12-01", {"2026-12-01", "2026-12-01-3"}) == "2026-12-01-2"
