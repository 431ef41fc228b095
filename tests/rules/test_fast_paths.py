"""The fast analysis gives exactly what the straightforward per-pair, per-value path gives.

``analyse`` shares work (bands per device class, one numpy pass over all
pairs, flags judged once per analysis, verdicts shared by alike pairs, words
built only for findings).  Here every site is analysed twice: as the product
does it, and with the fast functions replaced by the plain references of
``reference_paths`` (one pair or one value at a time).  The findings, the
RCD pairs and the overcurrent pairs (with the lines behind each) must be the
same, as JSON, to the last digit.

The sites are invented (``bench/gen_site.py`` and a seeded variation of it
that records failing readings, other test waveforms, set delays, makers'
selectivity limits and curves), plus the bundled samples.
"""

from __future__ import annotations

import importlib
import json
import random
import sys
from pathlib import Path
from typing import Any

import pytest
from reference_paths import CALLS, PATCHES
from sitekit import SAMPLES

from model.rules.checks import analyse
from model.rules.findings import Analysis
from model.site.models import SiteFile
from model.site.terms import OVERCURRENT_KINDS, RCD_KINDS
from model.site.tree import SiteIndex
from model.storage.sites import load_site

sys.path.insert(0, str(Path(__file__).resolve().parents[2] / "bench"))
from gen_site import generate_site  # noqa: E402


def as_text(result: Analysis) -> str:
    doc = result.as_json()
    doc["oc_pair_lines"] = [[*p.data, p.lo_a] for p in result.oc_pairs]
    return json.dumps(doc, indent=1, sort_keys=True)


def reference(site: SiteFile, monkeypatch: pytest.MonkeyPatch) -> Analysis:
    with monkeypatch.context() as m:
        for module, name, ref in PATCHES:
            m.setattr(importlib.import_module(module), name, ref)
        return analyse(site)


def vary(site: SiteFile, seed: int) -> SiteFile:
    """The site with seeded changes that reach the rarer branches of the checks.

    Invented data: failing and odd readings (did not trip, too slow, too fast,
    tripped at ½ IΔn, ramp out of band, half-wave and smooth-DC results at
    rated or scaled current), failures on the earlier visit, cbr set delays,
    fuses of unknown type, makers' selectivity limits and curves, and the IEC
    rule set for odd seeds.
    """
    rng = random.Random(seed)
    idx = SiteIndex.build(site)
    doc = site.model_dump(mode="json", exclude_none=True)
    if seed % 2:
        doc["site"]["rules"] = "iec-60364"
    idn = {}
    for n in doc["nodes"]:
        kind = n["kind"]
        if kind in RCD_KINDS:
            idn[n["id"]] = n["idn_ma"]
        if kind == "cbr" and rng.random() < 0.5:
            n["delay"] = "set"
            n["delay_ms"] = rng.choice([60.0, 150.0])
            if rng.random() < 0.5:
                n["max_break_ms"] = 500.0
        if kind == "fuse" and rng.random() < 0.3:
            n.pop("fuse_type", None)
        if kind in ("mcb", "rcbo") and rng.random() < 0.2:
            above = idx.ocpd_above[n["id"]]
            if above:
                limit = rng.choice([80.0, 400.0, 6000.0])
                n["maker_selectivity"] = [{"upstream": above[0], "limit_a": limit}]
        if kind == "mcb" and rng.random() < 0.1 and n.get("rated_a"):
            r = float(n["rated_a"])
            n["maker_curve"] = [
                {"i_a": 1.2 * r, "min_s": 600.0, "max_s": 3600.0},
                {"i_a": 5.0 * r, "min_s": 0.5, "max_s": 20.0},
                {"i_a": 15.0 * r, "min_s": 0.005, "max_s": 0.05},
            ]
    assert OVERCURRENT_KINDS
    dnt = "did not trip"
    latest, *older = sorted(doc["visits"], key=lambda v: v["date"], reverse=True)
    for dev, r in latest["readings"].items():
        if "not_tested" in r or rng.random() > 0.3:
            continue
        r["x1_0"] = rng.choice([dnt, 350.0, 2.0, 25.0, 41.0])
        r["x5_180"] = rng.choice([dnt, 45.0, 5.0, 12.0])
        if rng.random() < 0.3:
            r["half_180"] = rng.choice([dnt, 12.0])
        r["ramp_ma"] = round(idn[dev] * rng.choice([0.3, 0.7, 1.3]), 1)
        if rng.random() < 0.4:
            r["further"] = [
                {
                    "waveform": rng.choice(["half-wave", "smooth-dc"]),
                    "test_current": rng.choice(["rated", "scaled"]),
                    "x1_0": rng.choice([20.0, 400.0, dnt]),
                    "x5_0": rng.choice([8.0, 60.0]),
                    "ramp_ma": round(idn[dev] * rng.choice([0.4, 0.9, 2.5]), 1),
                }
            ]
    for visit in older:
        for r in visit["readings"].values():
            if "not_tested" not in r and rng.random() < 0.15:
                r["x1_180"] = rng.choice([dnt, 500.0, 5.0])
    return SiteFile.model_validate(doc)


GENERATED = [(300, 1), (1500, 2), (4000, 3)]


@pytest.mark.parametrize(("n_nodes", "seed"), GENERATED)
@pytest.mark.parametrize("varied", [False, True], ids=["plain", "varied"])
def test_fast_analysis_matches_the_reference(
    n_nodes: int, seed: int, varied: bool, monkeypatch: pytest.MonkeyPatch
) -> None:
    site = generate_site(n_nodes, seed)
    if varied:
        site = vary(site, seed)
    CALLS.clear()
    slow = reference(site, monkeypatch)
    fast = analyse(site)
    # the reference really ran, on sites with something to compare
    assert CALLS["analyse_pairs"] == 1 and CALLS["overcurrent_pairs"] == 1
    assert CALLS["judge_group"] > 0
    if len(site.visits) > 1:
        assert CALLS["grown_tests"] > 0
    assert len(fast.pairs) > 0 and len(fast.oc_pairs) > 0
    assert any(p.ranges for p in fast.pairs)
    if varied:
        rules = {f.rule for f in fast.findings}
        assert {"reading.no-trip", "reading.too-slow", "reading.ramp-out-of-band"} <= rules
    assert as_text(fast) == as_text(slow)


@pytest.mark.parametrize("name", sorted(p.name for p in SAMPLES.glob("*.json")))
def test_samples_match_the_reference(name: str, monkeypatch: pytest.MonkeyPatch) -> None:
    site = load_site(SAMPLES / name)
    assert as_text(analyse(site)) == as_text(reference(site, monkeypatch))


def test_the_comparison_sees_a_lost_range(monkeypatch: pytest.MonkeyPatch) -> None:
    """A fast path that drops one non-selective range fails the comparison."""
    import model.rules.checks.pair_verdict as pv

    site = generate_site(1500, 2)
    slow = as_text(reference(site, monkeypatch))
    real = pv.all_unsafe_ranges

    def lossy(bands: Any) -> list[list[tuple[float, float]]]:
        out = real(bands)
        for ranges in out:
            if ranges:
                ranges.pop()
                break
        return out

    monkeypatch.setattr(pv, "all_unsafe_ranges", lossy)
    assert as_text(analyse(site)) != slow


def test_flags_are_the_judgements_flags() -> None:
    """Every value's flag without words is the flag of the worded judgement, for every
    device class, test waveform and test current (IEC 61008-1 Table 1 bands through
    ``time_band``; the flag functions must never disagree with it)."""
    from types import SimpleNamespace

    from model.rules.bands import GROUPS, judge_ramp, judge_time, ramp_band, time_band
    from model.rules.flags import group_bands, ramp_flag, time_flag

    values: list[Any] = [None, "did not trip", 1.0, 9.9, 10.0, 39.9, 40.0, 130.0, 150.0]
    values += [151.0, 199.0, 200.0, 299.0, 300.0, 499.0, 500.0, 501.0, 1000.0, 5000.0]
    seen: set[str | None] = set()
    for idn in (10.0, 30.0, 100.0, 300.0, 1000.0):
        for dtype in ("AC", "A", "F", "B"):
            for delay, dms, bms in (("general", None, None), ("S", None, None),
                                    ("set", 150.0, 500.0), ("set", 60.0, None)):  # fmt: skip
                node = SimpleNamespace(
                    idn_ma=idn, waveform=dtype, delay=delay, delay_ms=dms, max_break_ms=bms
                )
                for rules in ("uk-bs7671-2022", "iec-60364"):
                    for wf in ("AC", "half-wave", "smooth-dc"):
                        for tc in (None, "rated", "scaled"):
                            bands = group_bands(node, wf, rules, tc)
                            for g, group in enumerate(GROUPS):
                                band = time_band(node, group, wf, rules, tc)
                                assert bands[g] == band
                                for v in values:
                                    flag = judge_time(band, v).flag
                                    assert time_flag(band, v) == flag, (band, v)
                                    seen.add(flag)
                        for m in (None, 0.2, 0.35, 0.5, 0.51, 1.0, 1.01, 1.4, 2.0, 2.1):
                            ramp = None if m is None else m * idn
                            flag = judge_ramp(ramp_band(node, wf), ramp).flag
                            assert ramp_flag(node, wf, ramp) == flag
                            seen.add(flag)
    # the grid reaches every flag a value can earn
    assert seen >= {
        None,
        "reading.no-trip",
        "reading.too-slow",
        "reading.too-fast",
        "reading.half-tripped",
        "reading.ramp-out-of-band",
        "reading.test-not-applicable",
    }
