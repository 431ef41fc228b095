"""Each bundled sample: the plan made and re-checked in full clears what it claims and
creates nothing; and screening on zones chooses as a whole-site check would."""

from __future__ import annotations

import sys
from pathlib import Path

import pytest
from sitekit import SAMPLES

from model.plan.changes import (
    PLAN_CAUTION,
    REPLACED,
    apply_changes,
    diff_findings,
    finding_key,
)
from model.plan.evaluate import ZONE_MAX, compare, fast_apply, restrict
from model.plan.greedy import Search
from model.plan.search import make_plan
from model.rules.checks import analyse
from model.storage.sites import load_site

SAMPLE_FILES = sorted(SAMPLES.glob("*.json"))
ROOT = Path(__file__).resolve().parents[2]


@pytest.mark.parametrize("path", SAMPLE_FILES, ids=lambda p: p.stem)
def test_sample_plan_clears_what_it_claims_and_creates_nothing(path: Path) -> None:
    site = load_site(path)
    before = analyse(site)
    plan = make_plan(site, before)
    assert plan.changes, "every bundled sample has something a device change clears"
    after = analyse(apply_changes(site, plan.changes))
    d = diff_findings(before.findings, after.findings, [dc.node for dc in plan.changes])
    replaced = {dc.node for dc in plan.changes if dc.fields[0].field == REPLACED}
    # Nothing new, by the plain (rule, nodes) match: a changed device's own missing
    # test is the test after installation, not a new finding; so is the pair of a
    # device replaced like for like whose margin rested on the old device's readings
    # (IEC 61008-1 Table 1 bands overlap; "not guaranteed" until both are tested).
    for f in d.created:
        assert f.rule == "cascade.band-overlap" and f.severity == "investigate", f
        assert set(f.nodes) & replaced and f.measured == "not both devices have readings"
    after_keys = {finding_key(f) for f in after.findings}
    claimed = [k for dc in plan.changes for k in dc.clears]
    assert claimed and not set(claimed) & after_keys
    # Every finding of the site is either claimed or listed as remaining, once.
    before_keys = sorted(finding_key(f) for f in before.findings)
    rest = [finding_key(u.finding) for u in plan.remaining]
    assert sorted(claimed + rest) == before_keys
    assert all(u.reason for u in plan.remaining)
    assert PLAN_CAUTION in plan.as_json()["caution"]


def test_no_kept_finding_is_made_worse_on_the_samples() -> None:
    for path in SAMPLE_FILES:
        site = load_site(path)
        before = analyse(site)
        plan = make_plan(site, before)
        after = analyse(apply_changes(site, plan.changes))
        changed = [dc.node for dc in plan.changes]
        replaced = [dc.node for dc in plan.changes if dc.fields[0].field == REPLACED]
        got = compare(before.findings, after.findings, changed, replaced)
        assert got.created == [], path.name


def _generated(n: int):  # type: ignore[no-untyped-def]
    sys.path.insert(0, str(ROOT / "bench"))
    try:
        from gen_site import generate_site
    finally:
        sys.path.remove(str(ROOT / "bench"))
    return generate_site(n, 7)


def test_zone_screening_gives_the_whole_site_answer_for_every_candidate() -> None:
    # A generated site larger than a zone: each candidate change screened on its zone
    # clears exactly what the same change clears on the whole site, and creates a
    # finding exactly when it does there (so the search decides the same way; the plan
    # is then checked on the whole site anyway).
    site = _generated(140)
    assert len(site.nodes) > ZONE_MAX
    analysis = analyse(site)
    zoned = Search(site, analysis)
    assert not zoned.whole
    checked = 0
    for node_id, aspects in list(zoned.candidate_nodes().items())[:12]:
        for choice in zoned.choices(node_id, aspects)[:4]:
            gain, created = zoned.screen((choice,))
            whole = analyse(fast_apply(site, [zoned.to_change(choice)])).findings
            full = compare(analysis.findings, whole, [node_id])
            full_gain = {finding_key(f) for f in full.cleared} & zoned.targets.keys()
            assert gain == full_gain, (node_id, choice.values)
            # The same decision: a change that creates a finding on the whole site creates
            # one on its zone too, and the other way round (which ones may differ: a
            # finding that lists every circuit under a device lists the zone's only).
            assert bool(created) == bool(full.created), (node_id, choice.values)
            checked += 1
    assert checked >= 20


def test_fast_apply_makes_the_same_site_as_the_site_ops() -> None:
    site = load_site(SAMPLES / "oak-lane-house.json")
    plan = make_plan(site)
    real = apply_changes(site, plan.changes)
    fast = fast_apply(site, plan.changes)
    assert sorted(n.model_dump_json() for n in fast.nodes) == sorted(
        n.model_dump_json() for n in real.nodes
    )
    assert [v.model_dump_json() for v in fast.visits] == [v.model_dump_json() for v in real.visits]
    keep = {n.id for n in site.nodes}
    assert restrict(site, keep).nodes == site.nodes
