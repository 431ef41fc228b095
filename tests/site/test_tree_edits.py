"""Tree edits and the untested devices, on the invented Oak Lane sample."""

from __future__ import annotations

from pathlib import Path

import pytest

from model.site import editing
from model.site.models import Reading, SiteFile
from model.site.nodes import ALLOWED_CHILDREN, NODE_CLASSES
from model.site.tree import SiteIndex
from model.storage.sites import load_site

SAMPLE = Path(__file__).resolve().parents[2] / "sample_sites" / "oak-lane-house.json"


@pytest.fixture(scope="module")
def site() -> SiteFile:
    return load_site(SAMPLE)


@pytest.fixture(scope="module")
def idx(site: SiteFile) -> SiteIndex:
    return SiteIndex.build(site)


def test_unique_id_counts_up_past_the_taken_ones() -> None:
    assert editing.unique_id("rccb", set()) == "rccb1"
    assert editing.unique_id("rccb", {"rccb1", "rccb2"}) == "rccb3"
    assert editing.unique_id("", set()) == "n1"
    # ids are at most 40 characters: the prefix is cut to leave room for the number
    assert editing.unique_id("x" * 50, set()) == "x" * 36 + "1"


def test_child_kinds_in_offer_order() -> None:
    assert editing.child_kinds("board")[:5] == ["board", "rccb", "rcbo", "mcb", "circuit"]
    assert editing.child_kinds("prcd") == ["circuit"]
    assert editing.child_kinds("srcd") == ["circuit", "prcd"]
    assert editing.child_kinds("no-such-kind") == []
    # every kind is offered somewhere, in the one order
    assert sorted(editing.child_kinds("origin")) == sorted(ALLOWED_CHILDREN["origin"])


def test_new_node_values_are_a_valid_node(site: SiteFile) -> None:
    values = editing.new_node_values("rccb", "cu", site)
    assert values == {
        "id": "rccb1",
        "parent": "cu",
        "kind": "rccb",
        "label": "RCCB",
        "idn_ma": 30.0,
        "waveform": "A",
        "rated_a": 63.0,
    }
    for kind in editing.KIND_ORDER:
        values = editing.new_node_values(kind, "cu", site)
        assert NODE_CLASSES[kind].model_validate(values).kind == kind


def test_subtree_ids_in_tree_order(idx: SiteIndex) -> None:
    assert editing.subtree_ids(idx, "rc1") == ["rc1", "m1", "c-l1", "m2", "c-s1", "m3", "c-sh"]
    assert editing.subtree_ids(idx, "c-ev") == ["c-ev"]


def test_copy_subtree_gives_new_ids_beside_the_original(site: SiteFile, idx: SiteIndex) -> None:
    nodes, top = editing.copy_subtree(site, idx, "wb")
    copied = SiteFile.model_validate(
        {**site.model_dump(), "nodes": [n.model_dump() for n in nodes]}
    )
    new = SiteIndex.build(copied)
    assert top == "wb-c1"
    assert len(nodes) == len(site.nodes) + 7
    assert new.parent(top) == "rc3"  # a sibling of the original
    assert new.label(top) == "Workshop board (copy)"
    assert [new.label(c) for c in new.children[top]] == ["RCBO W1", "RCBO W2", "RCBO W3"]
    assert set(new.descendants(top)).isdisjoint(idx.by_id)


def test_move_targets_leave_out_itself_what_it_feeds_and_its_parent(idx: SiteIndex) -> None:
    targets = editing.move_targets(idx, "rc1")
    assert "rc1" not in targets and "main" not in targets
    assert not set(targets) & set(idx.descendants("rc1"))
    assert {"cu", "rc2", "m9", "wb"} <= set(targets)
    # each target may feed an RCCB
    assert all("rccb" in ALLOWED_CHILDREN[idx.kind(t)] for t in targets)


def test_moved_node_changes_only_the_parent(idx: SiteIndex) -> None:
    moved = editing.moved_node(idx.node("c-l1"), "m2")
    assert moved.parent == "m2"
    assert moved.model_dump() == {**idx.node("c-l1").model_dump(), "parent": "m2"}


def test_untested_devices_of_the_latest_visit(site: SiteFile, idx: SiteIndex) -> None:
    visit = site.latest_visit()
    assert visit is not None
    # the sample's latest visit has no reading for RCBO W2
    assert editing.is_untested(visit, "rb2")
    assert not editing.is_untested(visit, "rb1")
    assert editing.is_untested(None, "rb1")
    reason = visit.model_copy(update={"readings": {"rb2": Reading(not_tested="no access")}})
    assert not editing.is_untested(reason, "rb2")
    assert editing.next_untested(idx, visit, None) == "rb2"
    assert editing.next_untested(idx, visit, "rc1") == "rb2"
    assert editing.next_untested(idx, visit, "rb2") is None  # itself does not count
    assert editing.next_untested(idx, None, "rb3") == "rc1"  # wraps round to the first


def test_nearest_pair(idx: SiteIndex) -> None:
    assert editing.nearest_pair(idx, "rb1") == ("rc3", "rb1")  # the RCD above
    assert editing.nearest_pair(idx, "rc3") == ("rc3", "rb1")  # none above: the one below
    assert editing.nearest_pair(idx, "rc1") is None  # no RCD above or below
    assert editing.nearest_pair(idx, "m9") is None  # not an RCD
    assert editing.nearest_pair(idx, "nope") is None
