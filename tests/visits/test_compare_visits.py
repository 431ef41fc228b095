"""Comparing two visits of one site: readings side by side, devices tested, findings."""

from __future__ import annotations

from typing import Any

import pytest

from model.site.history import cut_at
from model.site.models import SiteFile
from model.visits.compare import CompareError, compare_visits
from model.visits.compare_words import compare_text
from tests.visits_helpers import NODES, make_site

EXTRA = [
    {"id": "rc3", "kind": "rccb", "parent": "cu", "label": "RCCB 3", "idn_ma": 30, "waveform": "A"},
    {"id": "c4", "kind": "circuit", "parent": "rc3", "label": "Garage", "use": "sockets"},
    {"id": "rc4", "kind": "rccb", "parent": "cu", "label": "RCCB 4", "idn_ma": 30, "waveform": "A"},
    {"id": "c5", "kind": "circuit", "parent": "rc4", "label": "Loft", "use": "lighting"},
]


def three_visits() -> SiteFile:
    visits: list[tuple[str, str, dict[str, dict[str, Any]]]] = [
        ("v1", "2019-03-01", {"rc1": {"x1_0": 20.0}, "rc2": {"x1_0": 25.0}}),
        ("v2", "2022-03-01", {"rc1": {"x1_0": 22.0, "x5_0": 12.0}, "rc2": {"x1_0": 25.0}}),
        (
            "v3",
            "2025-03-01",
            {"rc1": {"x1_0": 320.0, "x5_0": 12.0, "ramp_ma": 24.0}, "rc3": {"x1_0": 30.0}},
        ),
    ]
    return make_site(visits, nodes=NODES + EXTRA)


def keys(fs: list[Any]) -> list[tuple[str, tuple[str, ...]]]:
    return sorted((f.rule, f.nodes) for f in fs)


def test_default_is_two_latest_visits() -> None:
    cmp = compare_visits(three_visits())
    assert (cmp.from_id, cmp.to_id) == ("v2", "v3")
    assert (cmp.from_date, cmp.to_date) == ("2022-03-01", "2025-03-01")


def test_readings_side_by_side_with_change() -> None:
    cmp = compare_visits(three_visits())
    rc1 = cmp.device("rc1")
    assert rc1.presence == "both" and rc1.changed
    x1 = next(v for v in rc1.values if v.key == "x1_0")
    assert (x1.old, x1.new, x1.change, x1.unit) == (22.0, 320.0, 298.0, "ms")
    assert x1.change_pct == pytest.approx(100 * 298 / 22)
    x5 = next(v for v in rc1.values if v.key == "x5_0")
    assert (x5.change, x5.change_pct) == (0.0, 0.0) and not x5.differs
    ramp = next(v for v in rc1.values if v.key == "ramp_ma")
    assert (ramp.old, ramp.new, ramp.change) == (None, 24.0, None)


def test_devices_added_removed_and_never_tested() -> None:
    cmp = compare_visits(three_visits())
    assert cmp.added == ["rc3"]
    assert cmp.removed == ["rc2"]
    assert cmp.untested == ["rc4"]


def test_findings_new_gone_unchanged() -> None:
    cmp = compare_visits(three_visits())
    # IEC 61008-1 Table 1: 320 ms at 1 × IΔn on a general device is too slow (max 300 ms)
    assert keys(cmp.findings_new) == [
        ("reading.missing", ("rc2",)),  # not tested on v3
        ("reading.too-slow", ("rc1",)),
        ("reading.trend", ("rc1",)),  # grown 22 -> 320 ms
        ("reading.trend", ("rc1",)),  # passed on v2, fails now
    ]
    assert keys(cmp.findings_gone) == [("reading.missing", ("rc3",))]  # tested on v3
    unchanged = keys(cmp.findings_unchanged)
    assert ("reading.missing", ("rc4",)) in unchanged
    assert not any(r.startswith("reading.trend") for r, _ in unchanged)
    # all three lists together are every finding of the later visit plus the gone ones
    total_after = len(cmp.findings_new) + len(cmp.findings_unchanged)
    from model.rules.checks import analyse

    assert total_after == len(analyse(three_visits()).findings)


def test_explicit_visits() -> None:
    cmp = compare_visits(three_visits(), "v1", "v2")
    x1 = next(v for v in cmp.device("rc1").values if v.key == "x1_0")
    assert (x1.old, x1.new, x1.change) == (20.0, 22.0, 2.0)
    assert x1.change_pct == pytest.approx(10.0)
    assert not cmp.device("rc2").changed
    assert cmp.findings_new == [] and cmp.findings_gone == []


def test_only_to_given_compares_with_the_visit_before() -> None:
    cmp = compare_visits(three_visits(), to_id="v2")
    assert (cmp.from_id, cmp.to_id) == ("v1", "v2")
    cmp = compare_visits(three_visits(), from_id="v1")
    assert (cmp.from_id, cmp.to_id) == ("v1", "v3")


def test_unknown_visit_lists_known_ones() -> None:
    with pytest.raises(CompareError, match=r"'v9'.*v1, v2, v3"):
        compare_visits(three_visits(), "v9", "v3")
    one = make_site([("only", "2025-01-01", {})])
    with pytest.raises(CompareError, match="only"):
        compare_visits(one)


def test_cut_at_keeps_history_up_to_the_visit() -> None:
    site = three_visits()
    cut = cut_at(site, "v2")
    assert [v.id for v in cut.visits] == ["v1", "v2"]
    latest = cut.latest_visit()
    assert latest is not None and latest.id == "v2"
    assert [v.id for v in site.visits] == ["v1", "v2", "v3"]  # the original is untouched


def test_text_names_both_visits_and_caution() -> None:
    text = compare_text(compare_visits(three_visits()))
    assert "visit v2 (2022-03-01) → visit v3 (2025-03-01)" in text
    assert "+298 ms" in text and "not a certificate" in text


def test_further_waveform_values_are_compared() -> None:
    site = make_site(
        [
            (
                "a",
                "2024-01-01",
                {"rc1": {"x1_0": 20.0, "further": [{"waveform": "half-wave", "x1_0": 25.0}]}},
            ),
            (
                "b",
                "2025-01-01",
                {"rc1": {"x1_0": 21.0, "further": [{"waveform": "half-wave", "x1_0": 30.0}]}},
            ),
        ]
    )
    d = compare_visits(site).device("rc1")
    (v,) = [v for v in d.values if v.key == "x1_0 (half-wave)"]
    assert (v.old, v.new, v.change, v.unit) == (25.0, 30.0, 5.0, "ms")
    assert "1 × IΔn, 0° (half-wave)" in compare_text(compare_visits(site))
