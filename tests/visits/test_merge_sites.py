"""Merging two diverged copies of one site: nothing lost, self-merge is a no-op, order-free.

The sites here are generated (invented data); what is checked is the
bookkeeping of the merge, not any electrical limit.
"""

from __future__ import annotations

import copy
from typing import Any

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from model.site.models import SiteFile
from model.site.nodes import RccbNode
from model.site.terms import RCD_KINDS
from model.storage.codec import dumps_site
from model.storage.sites import load_site
from model.visits.merge import merge_sites
from model.visits.merge_conflicts import MergeError
from model.visits.merge_result import recorded_keys
from tests.visits_helpers import SAMPLES, make_site

TIMES = st.one_of(
    st.sampled_from([9.0, 12.5, 18.0, 25.0, 40.0, 140.0, 310.0]), st.just("did not trip")
)
TEST_KEYS = ["half_0", "half_180", "x1_0", "x1_180", "x5_0", "x5_180"]


@st.composite
def readings(draw: Any) -> dict[str, Any]:
    if draw(st.integers(0, 9)) == 0:
        return {"not_tested": draw(st.sampled_from(["no access", "locked"]))}
    r: dict[str, Any] = {}
    for k in draw(st.lists(st.sampled_from(TEST_KEYS), max_size=4, unique=True)):
        r[k] = draw(TIMES)
    if draw(st.booleans()):
        r["ramp_ma"] = draw(st.sampled_from([18.0, 24.0, 27.0]))
    if draw(st.booleans()):
        r["button"] = draw(st.sampled_from(["worked", "failed"]))
    if draw(st.integers(0, 5)) == 0:
        r["waveform"] = "half-wave"
    if draw(st.integers(0, 4)) == 0:
        r["note"] = draw(st.sampled_from(["re-tested", "slow"]))
    return r


@st.composite
def base_sites(draw: Any) -> dict[str, Any]:
    nodes: list[dict[str, Any]] = [
        {"id": "supply", "kind": "origin"},
        {"id": "cu", "kind": "board", "parent": "supply"},
    ]
    n_rcd = draw(st.integers(1, 4))
    for i in range(n_rcd):
        nodes.append(
            {
                "id": f"r{i}",
                "kind": draw(st.sampled_from(["rccb", "rcbo"])),
                "parent": "cu",
                "idn_ma": draw(st.sampled_from([30.0, 100.0])),
                "waveform": draw(st.sampled_from(["A", "AC"])),
                "label": f"RCD {i}",
            }
        )
        nodes.append({"id": f"c{i}", "kind": "circuit", "parent": f"r{i}", "use": "sockets"})
    visits = []
    for j in range(draw(st.integers(0, 3))):
        rs = {f"r{i}": draw(readings()) for i in range(n_rcd) if draw(st.booleans())}
        visits.append({"id": f"v{j}", "date": f"202{j}-05-0{j + 1}", "readings": rs})
    return {
        "format": "tripwise.site",
        "version": 2,
        "site": {"name": "Generated (invented)", "earthing": "TN-S"},
        "nodes": nodes,
        "visits": visits,
    }


def _rcds(d: dict[str, Any]) -> list[str]:
    return [n["id"] for n in d["nodes"] if n["kind"] in RCD_KINDS]


@st.composite
def edited(draw: Any, base: dict[str, Any], side: str) -> dict[str, Any]:
    d = copy.deepcopy(base)
    for _ in range(draw(st.integers(0, 7))):
        op = draw(
            st.sampled_from(
                [
                    "add_reading",
                    "change_reading",
                    "replace_reading",
                    "add_node",
                    "edit_node",
                    "add_visit",
                    "edit_visit",
                    "edit_site",
                ]
            )
        )
        if op == "add_node":
            nid = draw(st.sampled_from(["n1", "n2", f"{side}-n"]))
            if any(n["id"] == nid for n in d["nodes"]):
                continue
            d["nodes"].append(
                {
                    "id": nid,
                    "kind": draw(st.sampled_from(["rccb", "rcbo"])),
                    "parent": draw(st.sampled_from(["cu", "supply"])),
                    "idn_ma": draw(st.sampled_from([30.0, 100.0])),
                    "waveform": "A",
                }
            )
        elif op == "edit_node":
            n = draw(st.sampled_from(d["nodes"]))
            n["label"] = draw(st.sampled_from(["edited", f"edited by {side}"]))
        elif op == "add_visit":
            vid = draw(st.sampled_from(["vx", f"{side}-v"]))
            if any(v["id"] == vid for v in d["visits"]):
                continue
            d["visits"].append(
                {
                    "id": vid,
                    "date": draw(st.sampled_from(["2025-01-01", "2025-01-02"])),
                    "inspector": side,
                    "readings": {},
                }
            )
        elif op == "edit_visit" and d["visits"]:
            v = draw(st.sampled_from(d["visits"]))
            v["inspector"] = draw(st.sampled_from(["A. N. Other", side]))
        elif op == "edit_site":
            d["site"]["address"] = draw(st.sampled_from(["1 Lane", f"{side} lane"]))
        elif d["visits"]:
            v = draw(st.sampled_from(d["visits"]))
            dev = draw(st.sampled_from(_rcds(d)))
            r = v["readings"].get(dev)
            if op == "replace_reading" or r is None:
                v["readings"][dev] = draw(readings())
            elif "not_tested" not in r:
                r[draw(st.sampled_from(TEST_KEYS))] = draw(TIMES)
    return d


@st.composite
def divergent_pairs(draw: Any) -> tuple[SiteFile, SiteFile]:
    base = draw(base_sites())
    ours = SiteFile.model_validate(draw(edited(base, "ours")))
    theirs = SiteFile.model_validate(draw(edited(base, "theirs")))
    return ours, theirs


def values(sf: SiteFile) -> dict[tuple[str, str, str], Any]:
    """Every recorded value of every reading: (visit, device, key) -> value."""
    return {
        (v.id, dev, k): getattr(r, k)
        for v in sf.visits
        for dev, r in v.readings.items()
        for k in recorded_keys(r)
    }


def canonical(sf: SiteFile) -> Any:
    """A site's content, free of the order of nodes and visits."""
    return (
        sf.site.model_dump(),
        {n.id: n.model_dump() for n in sf.nodes},
        {
            v.id: (
                v.date,
                v.inspector,
                v.instrument,
                v.notes,
                {d: r.model_dump() for d, r in v.readings.items()},
            )
            for v in sf.visits
        },
    )


SETTINGS = settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])


@SETTINGS
@given(divergent_pairs())
def test_every_reading_is_in_the_output_or_the_conflict_report(pair: Any) -> None:
    ours, theirs = pair
    res = merge_sites(ours, theirs)
    acc = res.accounting()
    by_src = {"ours": values(ours), "theirs": values(theirs)}
    # the accounting lists exactly every value of both inputs
    assert {(a.source, a.visit, a.device, a.key) for a in acc} == {
        (src, *k) for src, vals in by_src.items() for k in vals
    }
    conflicts = {c.id: c for c in res.conflicts}
    assert len(conflicts) == len(res.conflicts)  # ids are unique
    out = {side: values(res.resolve(side)) for side in ("ours", "theirs")}  # type: ignore[arg-type]
    for a in acc:
        key = (a.visit, a.device, a.key)
        # choosing a copy's side keeps every value of that copy
        assert out[a.source].get(key) == a.value
        other = "theirs" if a.source == "ours" else "ours"
        if out[other].get(key) != a.value:
            # lost on the other choice only through a listed conflict
            assert a.outcome == "conflict" and a.conflict in conflicts
        else:
            assert a.outcome == "in result" or a.conflict in conflicts
    # nothing is invented: every output value comes from one of the inputs
    for side_vals in out.values():
        for key, val in side_vals.items():
            assert val in (by_src["ours"].get(key), by_src["theirs"].get(key))


@SETTINGS
@given(divergent_pairs())
def test_merge_with_itself_changes_nothing(pair: Any) -> None:
    for sf in pair:
        res = merge_sites(sf, sf)
        assert res.conflicts == []
        assert dumps_site(res.merged()) == dumps_site(sf)


@SETTINGS
@given(divergent_pairs())
def test_merge_order_does_not_matter(pair: Any) -> None:
    a, b = pair
    ab, ba = merge_sites(a, b), merge_sites(b, a)
    assert {c.id for c in ab.conflicts} == {c.id for c in ba.conflicts}
    for c in ab.conflicts:
        mirror = ba.conflict(c.id)
        assert (mirror.ours, mirror.theirs) == (c.theirs, c.ours)
    if ab.clean:
        assert canonical(ab.merged()) == canonical(ba.merged())
    # with conflicts: taking A's side either way gives the same site
    assert canonical(ab.resolve("ours")) == canonical(ba.resolve("theirs"))


# --- hand-made cases -------------------------------------------------------------


def two_laptops() -> tuple[SiteFile, SiteFile]:
    visit = ("v1", "2025-06-01")
    ours = make_site([(*visit, {"rc1": {"x1_0": 22.0, "x1_180": 24.0}})])
    theirs = make_site([(*visit, {"rc2": {"x1_0": 19.0}})])
    return ours, theirs


def test_two_inspectors_same_day_combine() -> None:
    ours, theirs = two_laptops()
    res = merge_sites(ours, theirs)
    assert res.clean
    v = res.merged().visits[0]
    assert set(v.readings) == {"rc1", "rc2"}
    assert v.readings["rc1"].x1_180 == 24.0 and v.readings["rc2"].x1_0 == 19.0


def test_same_device_other_tests_combine_and_same_test_conflicts() -> None:
    ours = make_site([("v1", "2025-06-01", {"rc1": {"x1_0": 22.0, "x5_0": 12.0}})])
    theirs = make_site([("v1", "2025-06-01", {"rc1": {"x1_0": 23.0, "x1_180": 25.0}})])
    res = merge_sites(ours, theirs)
    (c,) = res.conflicts
    assert (c.id, c.kind, c.ours, c.theirs) == ("reading:v1/rc1/x1_0", "reading", 22.0, 23.0)
    r = res.resolve({"reading:v1/rc1/x1_0": "theirs"}).visits[0].readings["rc1"]
    assert (r.x1_0, r.x5_0, r.x1_180) == (23.0, 12.0, 25.0)
    with pytest.raises(MergeError, match="no choice"):
        res.resolve({})
    with pytest.raises(MergeError, match="no such conflict"):
        res.resolve({"reading:v1/rc1/x1_0": "ours", "node:zz": "ours"})
    with pytest.raises(MergeError):
        res.merged()


def test_different_test_waveform_is_one_whole_reading_conflict() -> None:
    ours = make_site([("v1", "2025-06-01", {"rc1": {"x1_0": 22.0}})])
    theirs = make_site([("v1", "2025-06-01", {"rc1": {"x5_0": 30.0, "waveform": "half-wave"}})])
    (c,) = merge_sites(ours, theirs).conflicts
    assert c.id == "reading:v1/rc1" and c.theirs["waveform"] == "half-wave"
    r = merge_sites(ours, theirs).resolve("theirs").visits[0].readings["rc1"]
    assert (r.x1_0, r.x5_0, r.waveform) == (None, 30.0, "half-wave")


def test_nodes_added_and_edited() -> None:
    ours = load_site(SAMPLES / "oak-lane-house.json")
    doc = ours.model_dump(mode="json", exclude_defaults=True)
    doc["nodes"].append(
        {"id": "rc9", "kind": "rccb", "parent": "cu", "idn_ma": 30, "waveform": "A"}
    )
    for n in doc["nodes"]:
        if n["id"] == "rc1":
            n["label"] = "RCCB 1 (renamed)"
    theirs = SiteFile.model_validate(doc)
    res = merge_sites(ours, theirs)
    (c,) = res.conflicts
    assert c.id == "node:rc1" and c.differences() == [
        ("label", "RCCB 1 (upstairs)", "RCCB 1 (renamed)")
    ]
    merged = res.resolve({"node:rc1": "ours"})
    assert merged.node("rc9").idn_ma == 30 and merged.node("rc1").label == "RCCB 1 (upstairs)"
    assert res.resolve("theirs").node("rc1").label == "RCCB 1 (renamed)"


def test_visit_details_conflict() -> None:
    ours = make_site([("v1", "2025-06-01", {})])
    theirs = make_site([("v1", "2025-06-02", {})])
    (c,) = merge_sites(ours, theirs).conflicts
    assert c.id == "visit:v1" and ("date", "2025-06-01", "2025-06-02") in c.differences()


def test_node_whose_parent_is_missing_is_a_conflict() -> None:
    ours = make_site([])
    orphan = RccbNode(id="x9", kind="rccb", parent="ghost", idn_ma=30, waveform="A")
    theirs = ours.model_copy(update={"nodes": [*ours.nodes, orphan]})  # not validated
    res = merge_sites(ours, theirs)
    (c,) = res.conflicts
    assert c.id == "node-parent:x9" and c.ours is None
    assert all(n.id != "x9" for n in res.resolve("ours").nodes)
    with pytest.raises(MergeError, match="ghost"):
        res.resolve("theirs")


def test_further_waveform_results_survive_a_merge() -> None:
    # nothing recorded is dropped: equal further results are kept, differing ones conflict
    hw = {"waveform": "half-wave", "test_current": "scaled", "x1_0": 25.0}
    a = make_site([("v", "2025-01-01", {"rc1": {"x1_0": 20.0, "further": [hw]}})])
    b = make_site([("v", "2025-01-01", {"rc1": {"x1_0": 20.0, "x5_0": 9.0, "further": [hw]}})])
    merged = merge_sites(a, b).merged().visits[0].readings["rc1"]
    assert merged.x5_0 == 9.0 and merged.further[0].x1_0 == 25.0
    c = make_site([("v", "2025-01-01", {"rc1": {"x1_0": 20.0}})])
    res = merge_sites(a, c)
    assert [x.id for x in res.conflicts] == ["reading:v/rc1"]
    assert res.resolve("ours").visits[0].readings["rc1"].further[0].test_current == "scaled"
