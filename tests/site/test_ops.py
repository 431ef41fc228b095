"""Edits as data: each op made on a site in memory, its JSON form, and refused edits."""

from __future__ import annotations

import json

import pytest
from sitekit import build, circuit, rcd, visit

from model.site.models import Reading, SiteFile
from model.site.ops import (
    DeleteNodes,
    InvalidEdit,
    SetReading,
    apply_op,
    describe_op,
    op_from_dict,
    op_to_dict,
    validated_op,
)


def _site() -> SiteFile:
    return build(
        [rcd("r1", "o", 30), circuit("c1", "r1"), circuit("c2", "o")],
        [visit({"r1": {"x1_0": 20.0}})],
    )


def test_set_reading_leaves_the_old_site_alone() -> None:
    site = _site()
    op = SetReading(visit="v1", device="r1", reading=Reading(x1_0=25.0))
    after = apply_op(site, op)
    assert after.visits[0].readings["r1"].x1_0 == 25.0
    assert site.visits[0].readings["r1"].x1_0 == 20.0
    assert describe_op(op) == "reading for r1 on visit v1"


def test_readings_only_for_residual_current_devices() -> None:
    with pytest.raises(InvalidEdit, match="c2 is a circuit"):
        apply_op(_site(), SetReading(visit="v1", device="c2", reading=Reading(x1_0=1.0)))
    with pytest.raises(InvalidEdit, match="no visit 'v9'"):
        apply_op(_site(), SetReading(visit="v9", device="r1", reading=Reading(x1_0=1.0)))


def test_delete_refuses_to_leave_a_child_without_its_parent() -> None:
    site = _site()
    with pytest.raises(InvalidEdit, match="c1 would be left without a parent"):
        apply_op(site, DeleteNodes(ids=["r1"]))
    after = apply_op(site, DeleteNodes(ids=["r1", "c1"]))
    assert [n.id for n in after.nodes] == ["o", "c2"]
    assert after.visits[0].readings == {}  # the device's readings go with it


def test_json_form_round_trips() -> None:
    op = SetReading(visit="v1", device="r1", reading=Reading(x1_0=18.5))
    line = json.dumps(op_to_dict(op))
    assert json.loads(line) == {
        "op": "set-reading",
        "visit": "v1",
        "device": "r1",
        "reading": {"x1_0": 18.5},
    }
    assert op_from_dict(json.loads(line)) == op


def test_an_op_built_without_validation_is_checked() -> None:
    bad = SetReading.model_construct(op="set-reading", visit="v 1", device="r1", reading=None)
    with pytest.raises(InvalidEdit, match="visit"):
        validated_op(bad)
