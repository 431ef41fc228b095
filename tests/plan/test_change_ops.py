"""A planned change made on a copy with the site's own ops (model.plan.changes)."""

from __future__ import annotations

import pytest
from sitekit import SAMPLES

from model.plan.changes import (
    REMOVED,
    DeviceChange,
    FieldChange,
    apply_changes,
    change_ops,
    diff_findings,
)
from model.rules.checks import analyse
from model.site.ops import DeleteNodes, InvalidEdit, SetReading, UpsertNode
from model.storage.sites import load_site

OAK = SAMPLES / "oak-lane-house.json"


def _change(node: str, *fields: tuple[str, object, object]) -> DeviceChange:
    return DeviceChange(node, tuple(FieldChange(node, f, a, b) for f, a, b in fields))


def test_a_waveform_change_is_made_on_a_copy_and_drops_the_old_devices_readings() -> None:
    site = load_site(OAK)
    before = site.model_dump_json()
    assert "rc2" in site.visits[-1].readings
    after = apply_changes(site, [_change("rc2", ("waveform", "AC", "A"))])
    assert site.model_dump_json() == before  # the site itself is never changed
    rc2 = next(n for n in after.nodes if n.id == "rc2")
    assert (rc2.kind, rc2.waveform, rc2.idn_ma) == ("rccb", "A", 30.0)
    # the readings were taken of the device being replaced: not carried to the new one
    assert all("rc2" not in v.readings for v in after.visits)


def test_type_a_in_place_of_type_ac_clears_the_531_3_3_finding_and_asks_for_a_test() -> None:
    site = load_site(OAK)
    changes = [_change("rc2", ("waveform", "AC", "A"))]
    d = diff_findings(
        analyse(site).findings, analyse(apply_changes(site, changes)).findings, {"rc2"}
    )
    # BS 7671 531.3.3: Type AC only for fixed equipment without DC; a Type A device meets it
    assert ("type.ac-unsuitable", ("rc2", "c-l2", "c-s2", "c-s3")) in [
        (f.rule, f.nodes) for f in d.cleared
    ]
    assert d.created == []
    # BS 7671 643.7.1: the new device is tested after installation
    assert [(f.rule, f.nodes) for f in d.to_test] == [("reading.missing", ("rc2",))]


def test_an_mcb_becomes_an_rcbo_of_the_same_curve_and_rating() -> None:
    site = load_site(OAK)
    m8 = next(n for n in site.nodes if n.id == "m8")
    change = _change("m8", ("kind", "mcb", "rcbo"), ("idn_ma", None, 30.0), ("waveform", None, "A"))
    ops = change_ops(site, [change])
    assert [type(o) for o in ops] == [UpsertNode]
    after = apply_changes(site, [change])
    new = next(n for n in after.nodes if n.id == "m8")
    assert (new.kind, new.rated_a, new.curve, new.parent) == (
        "rcbo",
        m8.rated_a,
        m8.curve,
        m8.parent,
    )
    d = diff_findings(analyse(site).findings, analyse(after).findings, {"m8"})
    # BS 7671 411.3.3: a socket circuit gets 30 mA additional protection from the RCBO
    assert ("coverage.additional-protection", ("c-out",)) in [(f.rule, f.nodes) for f in d.cleared]


def test_removing_a_device_moves_its_children_up_and_removes_only_it() -> None:
    site = load_site(OAK)
    ops = change_ops(site, [_change("rc1", (REMOVED, "rccb", None))])
    assert isinstance(ops[-1], DeleteNodes) and ops[-1].ids == ["rc1"]
    assert any(isinstance(o, SetReading) for o in ops)
    after = apply_changes(site, [_change("rc1", (REMOVED, "rccb", None))])
    ids = [n.id for n in after.nodes]
    assert "rc1" not in ids and len(ids) == len(site.nodes) - 1
    assert {n.id: n.parent for n in after.nodes}["m1"] == "main"


def test_an_invalid_change_is_refused_with_the_reason() -> None:
    site = load_site(OAK)
    # IEC 61008-1: type S exists only above 30 mA
    with pytest.raises(InvalidEdit, match="cannot change rc2: .*type S") as exc:
        apply_changes(site, [_change("rc2", ("delay", "general", "S"))])
    assert "\n" not in str(exc.value)
    with pytest.raises(InvalidEdit, match="cannot change nope: no such node"):
        change_ops(site, [_change("nope", ("waveform", "AC", "A"))])


def test_a_change_made_on_the_site_keeps_the_old_readings_in_the_visits_notes() -> None:
    site = load_site(OAK)
    old = {v.id: v.readings["rc2"] for v in site.visits if "rc2" in v.readings}
    assert len(old) == 2
    after = apply_changes(
        site, [_change("rc2", ("waveform", "AC", "A"))], record="2026-12-02 08:10 UTC"
    )
    for v in after.visits:
        if v.id in old:
            assert "rc2" not in v.readings
            line = v.notes.splitlines()[-1]
            # the failure stays on the record: the old device's rating and each value as typed
            assert line.startswith("2026-12-02 08:10 UTC: rc2 (RCCB 2 (downstairs); 30 mA, Type AC")
            assert f'"x1_180": {old[v.id].x1_180}' in line
    # other devices' readings are untouched
    assert {k for v in after.visits for k in v.readings} == {
        k for v in site.visits for k in v.readings
    } - {"rc2"}


def test_full_visit_notes_are_cut_with_a_mark_never_refused_or_overrun() -> None:
    site = load_site(OAK)
    last = site.visits[-1]
    full = last.model_copy(update={"notes": "x" * 19_990})
    site = site.model_copy(update={"visits": [*site.visits[:-1], full]})
    after = apply_changes(site, [_change("rc2", ("waveform", "AC", "A"))], record="t")
    notes = after.visits[-1].notes
    # Visit.notes holds at most 20,000 characters (the site model); the cut is said
    assert len(notes) == 20_000 and notes.endswith("(cut to fit the visit's notes)")
