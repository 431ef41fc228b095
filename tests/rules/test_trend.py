"""``reading.trend``: growth of a trip time between visits, and a device that passed then fails.

The growth thresholds are the site's own settings (default 50 % and 10 ms):
a fact of practice, not a published limit.  The pass/fail bands are those of
IEC 61008-1 Ed.3 Table 1 (general type: 1 × IΔn at most 300 ms, 5 × IΔn at
most 40 ms).
"""

from __future__ import annotations

from typing import Any

import pytest

from model.rules.checks import CHECKS, analyse
from model.rules.checks.context import Context
from model.rules.checks.trend import check_trend
from model.rules.findings import Finding
from tests.visits_helpers import make_site

V1, V2, V3 = ("v2019", "2019-03-01"), ("v2022", "2022-03-01"), ("v2025", "2025-03-01")


def trend(site: Any) -> list[Finding]:
    return list(check_trend(Context.build(site)))


def history(r1: dict[str, Any], r2: dict[str, Any], r3: dict[str, Any], **kw: Any) -> Any:
    return make_site(
        [(V1[0], V1[1], {"rc1": r1}), (V2[0], V2[1], {"rc1": r2}), (V3[0], V3[1], {"rc1": r3})],
        **kw,
    )


def test_registered_in_checks() -> None:
    assert check_trend in CHECKS
    site = history({"x1_180": 20.0}, {"x1_180": 20.0}, {"x1_180": 31.0})
    assert [f.rule for f in analyse(site).findings].count("reading.trend") == 1


@pytest.mark.parametrize(
    ("before", "after", "fires"),
    [
        # common practice, site default 50 % and 10 ms, both must be exceeded
        (20.0, 29.0, False),  # +45 %, +9 ms: under both
        (20.0, 31.0, True),  # +55 %, +11 ms: over both
        (40.0, 55.0, False),  # +37.5 %, +15 ms: ms over, % under
        (1.0, 6.0, False),  # +500 %, +5 ms: % over, ms under
        (20.0, 30.0, False),  # exactly +50 % and +10 ms: not more than
        (31.0, 20.0, False),  # faster is not growth
    ],
)
def test_growth_threshold_against_previous_visit(before: float, after: float, fires: bool) -> None:
    # the 2019 value is far lower: only the previous visit (2022) counts
    site = history({"x1_180": 5.0}, {"x1_180": before}, {"x1_180": after})
    found = trend(site)
    assert bool(found) is fires
    if fires:
        (f,) = found
        assert f.rule == "reading.trend" and f.severity == "investigate"
        assert f.basis == "common-practice"
        assert f.nodes == ("rc1",) and f.visit == "v2025" and f.board == "cu"
        # both visits' values and dates are quoted
        assert (
            f"{before:g} ms (2022-03-01, visit v2022)" in f.message and f"{after:g} ms" in f.message
        )
        assert (
            f.measured == f"1 × IΔn, 180°: {before:g} ms (2022-03-01) → {after:g} ms (2025-03-01)"
        )
        assert f.band is not None and "50 %" in f.band and "10 ms" in f.band
        assert "common practice" in f.source


def test_site_settings_are_used() -> None:
    # site's own trend settings: 20 % and 5 ms (common practice: a site's choice)
    kw = {"trend": {"growth_pct": 20.0, "min_ms": 5.0}}
    assert trend(history({}, {"x1_0": 20.0}, {"x1_0": 25.0}, **kw)) == []  # +25 %, 5 ms not > 5
    assert len(trend(history({}, {"x1_0": 20.0}, {"x1_0": 26.0}, **kw))) == 1  # +30 %, +6 ms
    # the same 20 -> 26 ms is under the default 50 % / 10 ms
    assert trend(history({}, {"x1_0": 20.0}, {"x1_0": 26.0})) == []


def test_previous_visit_with_that_test_is_used() -> None:
    # 2022 has no x1_180 at all: compare with 2019
    site = history({"x1_180": 20.0}, {"x5_0": 12.0}, {"x1_180": 31.0})
    (f,) = trend(site)
    assert "20 ms (2019-03-01, visit v2019)" in f.message


def test_like_with_like_test_waveform() -> None:
    # the 2022 test was made with half-wave current; compare the AC result with 2019's AC one
    site = history({"x1_0": 30.0}, {"x1_0": 12.0, "waveform": "half-wave"}, {"x1_0": 31.0})
    assert trend(site) == []  # 30 -> 31 ms: no growth to speak of
    site = history({"x1_0": 12.0}, {"x1_0": 30.0, "waveform": "half-wave"}, {"x1_0": 31.0})
    (f,) = trend(site)
    assert "12 ms (2019-03-01, visit v2019)" in f.message


def test_several_tests_grown_make_one_finding() -> None:
    site = history({}, {"x1_0": 20.0, "x5_0": 10.0}, {"x1_0": 40.0, "x5_0": 25.0})
    (f,) = trend(site)
    assert "1 × IΔn, 0° 20 ms" in f.message and "5 × IΔn, 0° 10 ms" in f.message


def test_pass_then_fail() -> None:
    # IEC 61008-1 Table 1: general type at 1 × IΔn at most 300 ms; 280 passes, 320 fails.
    site = history({"x1_0": 250.0}, {"x1_0": 280.0}, {"x1_0": 320.0})
    (f,) = trend(site)  # +40 ms is only +14 %: no growth finding, one pass-then-fail
    assert f.rule == "reading.trend" and f.visit == "v2025"
    assert "2022-03-01" in f.message and "2025-03-01" in f.message
    assert "280 ms" in f.measured and "320 ms" in f.measured  # type: ignore[operator]
    assert "320 ms is slower than ≤ 300 ms" in f.message  # in words, no rule id
    assert "reading." not in f.message
    assert f.band == "1 × IΔn, 0°: ≤ 300 ms"  # IEC 61008-1 Table 1


def test_fail_then_fail_is_not_new() -> None:
    # IEC 61008-1 Table 1: 310 ms already failed on the previous visit
    assert trend(history({"x1_0": 250.0}, {"x1_0": 310.0}, {"x1_0": 320.0})) == []


def test_pass_then_did_not_trip() -> None:
    site = history({}, {"x1_0": 25.0}, {"x1_0": "did not trip"})
    (f,) = trend(site)
    assert "it must trip" in f.message and "did not trip" in f.measured  # type: ignore[operator]


def test_not_tested_previous_visit_is_passed_over() -> None:
    # 2022: not tested; the previous reading with values is 2019's (passed), so the fail is new
    site = history({"x1_0": 30.0}, {"not_tested": "locked room"}, {"x1_0": 320.0})
    found = trend(site)
    assert len(found) == 2  # growth 30 -> 320 ms, and pass (2019) then fail
    assert all("2019-03-01" in f.message for f in found)


def test_single_visit_and_untested_latest_give_nothing() -> None:
    assert trend(make_site([("a", "2025-01-01", {"rc1": {"x1_0": 320.0}})])) == []
    site = history({}, {"x1_0": 20.0}, {"not_tested": "no access"})
    assert trend(site) == []


def test_latest_is_by_date_not_list_order() -> None:
    visits = [
        (V3[0], V3[1], {"rc1": {"x1_180": 31.0}}),
        (V1[0], V1[1], {"rc1": {"x1_180": 5.0}}),
        (V2[0], V2[1], {"rc1": {"x1_180": 20.0}}),
    ]
    (f,) = trend(make_site(visits))
    assert f.visit == "v2025" and "20 ms (2022-03-01, visit v2022)" in f.message


def test_other_device_history_does_not_leak() -> None:
    site = make_site(
        [
            ("a", "2020-01-01", {"rc1": {"x1_0": 20.0}}),
            ("b", "2024-01-01", {"rc2": {"x1_0": 40.0}}),
        ]
    )
    assert trend(site) == []
