"""Standard IΔn ratings and the changes that re-judge a device's readings."""

from __future__ import annotations

from sitekit import build, rcd

from model.rules.ratings import rating_note, rejudging_changes, standard_ratings


def test_preferred_ratings_are_not_flagged() -> None:
    # IEC 61008-1 / IEC 61009-1 5.3.3 preferred values of IΔn (from memory)
    for idn in (6, 10, 30, 100, 300, 500):
        assert rating_note("rccb", float(idn)) is None
    # IEC 60947-2 Annex B adds larger settings for a CBR (from memory)
    assert rating_note("cbr", 1000.0) is None
    assert rating_note("rccb", 1000.0) is not None


def test_a_non_standard_rating_is_named_with_the_standard_values() -> None:
    note = rating_note("rcbo", 7.0)
    assert note is not None
    assert note.startswith("IΔn 7 mA is not a standard rating")
    assert "6 mA, 10 mA, 30 mA, 100 mA, 300 mA, 500 mA" in note
    assert "Kept as typed" in note
    assert standard_ratings("cbr")[-1] == 30_000.0


def test_changes_that_move_the_bands() -> None:
    site = build([rcd("r1", "o", 30), rcd("r2", "o", 100, delay="S", rated_a=40.0)])
    a = site.node("r1")
    assert rejudging_changes(a, a.model_copy(update={"label": "x"})) == []
    assert rejudging_changes(a, a.model_copy(update={"idn_ma": 100.0})) == ["idn_ma"]
    assert rejudging_changes(a, a.model_copy(update={"waveform": "AC", "delay": "S"})) == [
        "waveform",
        "delay",
    ]
