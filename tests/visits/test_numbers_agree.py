"""A number typed in the app and the same text in an imported CSV cell give the same result.

Both go through ``model.site.numbers.parse_number``; this holds the reading
screen, the node forms and the CSV import to one list of texts, so that no
path accepts what another refuses or reads a text as another number.
"""

from __future__ import annotations

import pytest

from model.rules.entry import entry_texts, judge_entry, reading_from_texts
from model.site.fields import field_specs
from model.site.nodes import NODE_CLASSES
from model.visits.import_csv import CsvImportError, plan_import
from tests.visits_helpers import make_site, sheet_csv

#: (text, the number it means, or None where it is refused)
TEXTS: list[tuple[str, float | None]] = [
    ("25", 25.0),
    ("25.5", 25.5),
    ("0,5", 0.5),  # a comma as the decimal mark, usual on site
    (".5", 0.5),
    ("+30", 30.0),
    (" 30 ", 30.0),  # spaces around are not part of the number
    ("0.001", 0.001),  # kept exactly, never rounded
    ("1e3", None),  # an exponent: refused, never read as 13 or 1000
    ("1_000", None),  # a separator Python would accept
    ("1,000", None),  # one thousand or one? refused as ambiguous
    ("1 000", None),
    ("１２", None),  # full-width digits
    ("٣٠", None),  # Arabic-Indic digits
    ("inf", None),
    ("nan", None),
    ("12..5", None),
    ("3O", None),  # a letter O
]


def _typed(text: str) -> float | None:
    """The reading screen: the value recorded for x1_0, or None when refused."""
    try:
        reading = reading_from_texts(entry_texts(None) | {"x1_0": text})
    except ValueError:
        return None
    return reading.x1_0  # type: ignore[return-value]


def _form(text: str) -> float | None:
    """A node form's number field (an RCCB's IΔn), or None when refused."""
    from model.site.fields import typed_value

    spec = next(s for s in field_specs(NODE_CLASSES["rccb"]) if s.name == "idn_ma")
    try:
        return typed_value(spec, text)  # type: ignore[no-any-return]
    except ValueError:
        return None


def _imported(text: str) -> float | None:
    """The CSV import of the same text in the x1_0 column, or None when refused."""
    site = make_site([("v1", "2025-01-01", {})])
    try:
        plan = plan_import(site, sheet_csv([{"device": "rc1", "x1_0": text}]))
    except CsvImportError:
        return None
    return plan.site.visits[0].readings["rc1"].x1_0  # type: ignore[return-value]


@pytest.mark.parametrize(("text", "means"), TEXTS)
def test_typing_and_import_read_each_text_alike(text: str, means: float | None) -> None:
    assert _typed(text) == means
    assert _imported(text) == means
    assert _form(text) == means


def test_a_refused_text_gives_the_same_reason_both_ways() -> None:
    site = make_site([("v1", "2025-01-01", {})])
    for text in ("1e3", "１２", "1,000"):
        with pytest.raises(CsvImportError) as err:
            plan_import(site, sheet_csv([{"device": "rc1", "x1_0": text}]))
        imported = str(err.value)
        typed = judge_entry(
            next(n for n in site.nodes if n.id == "rc1"), "x1_0", text, "AC", site.site.rules
        ).verdict
        assert typed and typed in imported, (typed, imported)
