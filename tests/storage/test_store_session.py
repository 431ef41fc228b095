"""The editing API: validation before anything is written, the journal, recovery, versions."""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path
from typing import Any

import pytest

from bench.gen_site import generate_site
from model.site.models import Reading, SiteFile, SiteInfo, Visit, site_to_dict
from model.site.ops import InvalidEdit
from model.site.terms import DID_NOT_TRIP
from model.storage import codec
from model.storage import journal as journal_mod
from model.storage.codec import SiteLoadError
from model.storage.files import backup_path
from model.storage.journal import journal_path
from model.storage.session import EditSession
from model.storage.sites import load_site, save_site
from tests.storage.helpers import rcd_ids


def _first(session: EditSession) -> tuple[str, str]:
    return session.site.visits[-1].id, rcd_ids(session.site)[0]


def _listing(folder: Path) -> dict[str, bytes]:
    return {p.name: p.read_bytes() for p in folder.iterdir()}


def test_create_writes_and_refuses_to_overwrite(tmp_path: Path) -> None:
    p = tmp_path / "new site.json"
    site = generate_site(30, seed=1)
    s = EditSession.create(p, site)
    assert load_site(p) == site and not s.dirty and s.recovered == []
    s.close()
    before = p.read_bytes()
    with pytest.raises(FileExistsError):
        EditSession.create(p, generate_site(10, seed=2))
    assert p.read_bytes() == before


def test_reading_is_journaled_before_it_shows_and_replayed(site_file: Path) -> None:
    s = EditSession.open(site_file)
    visit, dev = _first(s)
    s.set_reading(visit, dev, Reading(x1_0=18.5, half_0=DID_NOT_TRIP))
    assert s.dirty
    lines = journal_path(site_file).read_text().splitlines()
    assert len(lines) == 2
    assert json.loads(lines[1]) == {
        "op": "set-reading",
        "visit": visit,
        "device": dev,
        "reading": {"x1_0": 18.5, "half_0": "did not trip"},
    }  # one small line, not the whole site
    s.set_reading(visit, dev, None)
    assert dev not in s.site.visits[-1].readings
    s.set_reading(visit, dev, Reading(x1_0=19.0))
    s.close()
    assert load_site(site_file).visits[-1].readings[dev].x1_0 != 19.0  # not saved yet
    again = EditSession.open(site_file)
    assert again.site.visits[-1].readings[dev] == Reading(x1_0=19.0)
    assert again.recovered == [
        f"recovered reading for {dev} on visit {visit}",
        f"recovered removal of the reading for {dev} on visit {visit}",
        f"recovered reading for {dev} on visit {visit}",
    ]
    assert again.dirty
    again.save()
    assert not again.dirty and not journal_path(site_file).exists()
    assert load_site(site_file).visits[-1].readings[dev] == Reading(x1_0=19.0)
    again.close()
    third = EditSession.open(site_file)
    assert third.recovered == [] and not third.dirty
    third.close()


def _bad_edits(s: EditSession) -> list[tuple[str, Any]]:
    visit, dev = _first(s)
    mcb = next(n for n in s.site.nodes if n.kind == "mcb")
    board = next(n for n in s.site.nodes if n.kind == "board")
    child_of_board = next(n for n in s.site.nodes if n.parent == board.id)
    bad_site = SiteFile.model_construct(
        **{**dict(s.site), "nodes": s.site.nodes + [s.site.nodes[3]]}
    )
    return [
        ("unknown visit", lambda: s.set_reading("no-visit", dev, Reading(x1_0=20.0))),
        ("unknown device", lambda: s.set_reading(visit, "nobody", Reading(x1_0=20.0))),
        ("not an RCD", lambda: s.set_reading(visit, mcb.id, Reading(x1_0=20.0))),
        (
            "reading out of band",  # IEC 61008-1 times are positive; the format allows 0 < t <= 10 000 ms
            lambda: s.set_reading(visit, dev, Reading.model_construct(x1_0=-5.0)),
        ),
        ("bad id", lambda: s.set_reading(visit, "bad id!", None)),
        ("unknown parent", lambda: s.upsert_node(mcb.model_copy(update={"parent": "nowhere"}))),
        (
            "cycle",
            lambda: s.upsert_node(board.model_copy(update={"parent": child_of_board.id})),
        ),
        ("delete unknown", lambda: s.delete_nodes(["ghost"])),
        ("delete leaves orphans", lambda: s.delete_nodes([board.id])),
        (
            "site info invalid",
            lambda: s.set_site_info(SiteInfo.model_construct(name="", earthing="TT")),
        ),
        (
            "visit with reading on unknown device",
            lambda: s.upsert_visit(
                Visit(id="v9", date="2026-12-01", readings={"ghost": Reading(x1_0=20.0)})
            ),
        ),
        ("replace with duplicate ids", lambda: s.replace_site(bad_site)),
    ]


def test_failed_edits_change_nothing(site_file: Path) -> None:
    s = EditSession.open(site_file)
    visit, dev = _first(s)
    s.set_reading(visit, dev, Reading(x1_0=21.0))
    for name, edit in _bad_edits(s):
        site_before = s.site
        folder_before = _listing(site_file.parent)
        with pytest.raises(ValueError) as err:
            edit()
        msg = str(err.value)
        assert msg and "\n" not in msg, name
        assert s.site is site_before, name
        assert _listing(site_file.parent) == folder_before, name
        assert s.dirty
    s.close()
    again = EditSession.open(site_file)
    assert len(again.recovered) == 1
    again.close()


def test_failed_edit_messages_name_the_problem(site_file: Path) -> None:
    s = EditSession.open(site_file)
    msgs = {}
    for name, edit in _bad_edits(s):
        with pytest.raises(ValueError) as err:
            edit()
        msgs[name] = str(err.value)
    s.close()
    assert "no visit 'no-visit'" in msgs["unknown visit"]
    assert "no device 'nobody'" in msgs["unknown device"]
    assert "readings are for residual-current devices" in msgs["not an RCD"]
    assert "x1_0" in msgs["reading out of band"]
    assert "unknown parent 'nowhere'" in msgs["unknown parent"]
    assert "cycle" in msgs["cycle"]
    assert "no such node" in msgs["delete unknown"]
    assert "without a parent" in msgs["delete leaves orphans"]
    assert "name" in msgs["site info invalid"]
    assert "no node with id 'ghost'" in msgs["visit with reading on unknown device"]
    assert "duplicate id" in msgs["replace with duplicate ids"]


def test_every_kind_of_edit_replays(site_file: Path) -> None:
    s = EditSession.open(site_file)
    visit, dev = _first(s)
    circuit = next(n for n in s.site.nodes if n.kind == "circuit")
    s.upsert_node(circuit.model_copy(update={"label": "Kitchen ring"}))
    new = circuit.model_copy(update={"id": "c-new", "label": "Garage"})
    s.upsert_node(new)
    s.delete_nodes(["c-new"])
    s.set_site_info(s.site.site.model_copy(update={"notes": "meter cupboard locked"}))
    s.upsert_visit(Visit(id="v2026-12-01", date="2026-12-01", readings={dev: Reading(x1_0=17.0)}))
    moved = s.site.model_copy(update={"nodes": list(reversed(s.site.nodes))})
    s.replace_site(moved)
    expected = s.site
    s.close()
    again = EditSession.open(site_file, read_only=True)
    assert again.site == expected
    assert again.recovered == [
        f"recovered circuit {circuit.id}",
        "recovered circuit c-new",
        "recovered deletion of c-new",
        "recovered site details",
        "recovered visit v2026-12-01",
        "recovered whole-site edit",
    ]
    assert visit != "v2026-12-01"


def test_delete_removes_the_readings_of_deleted_devices(tmp_path: Path) -> None:
    site = generate_site(40, seed=2)
    s = EditSession.create(tmp_path / "s.json", site)
    dev = next(n.id for n in s.site.nodes if n.kind == "rcbo")  # feeds one circuit
    assert dev in s.site.visits[-1].readings
    ids = [dev] + [n.id for n in s.site.nodes if n.parent == dev]
    s.delete_nodes(ids)
    assert dev not in s.site.visits[-1].readings
    s.save()
    assert dev not in load_site(tmp_path / "s.json").visits[-1].readings
    s.close()


def test_read_only_session_changes_nothing(site_file: Path) -> None:
    w = EditSession.open(site_file)
    visit, dev = _first(w)
    w.set_reading(visit, dev, Reading(x1_0=30.0))
    w.close()
    with open(journal_path(site_file), "ab") as fh:
        fh.write(b'{"op": "set-rea')  # a torn last line
    before = _listing(site_file.parent)
    ro = EditSession.open(site_file, read_only=True)
    assert ro.read_only and ro.site.visits[-1].readings[dev].x1_0 == 30.0
    assert any("cut off" in x for x in ro.warnings)
    for call in (
        lambda: ro.set_reading(visit, dev, None),
        lambda: ro.upsert_node(ro.site.nodes[1]),
        lambda: ro.delete_nodes(["x"]),
        lambda: ro.set_site_info(ro.site.site),
        lambda: ro.upsert_visit(ro.site.visits[0]),
        lambda: ro.replace_site(ro.site),
        ro.save,
    ):
        with pytest.raises(PermissionError, match="read-only"):
            call()
    ro.close()
    assert _listing(site_file.parent) == before


def test_torn_last_line_is_dropped_before_appending(site_file: Path) -> None:
    s = EditSession.open(site_file)
    visit, dev = _first(s)
    other = rcd_ids(s.site)[1]
    s.set_reading(visit, dev, Reading(x1_0=11.0))
    s.close()
    with open(journal_path(site_file), "ab") as fh:
        fh.write(b'{"op": "set-reading", "visit": "')
    s = EditSession.open(site_file)
    assert s.recovered == [f"recovered reading for {dev} on visit {visit}"]
    assert any("cut off" in w and "ignored" in w for w in s.warnings)
    s.set_reading(visit, other, Reading(x1_0=12.0))
    s.close()
    s = EditSession.open(site_file)
    assert s.warnings == [] and len(s.recovered) == 2
    assert s.site.visits[-1].readings[other].x1_0 == 12.0
    s.close()


def test_damaged_middle_line_is_skipped_with_a_warning(site_file: Path) -> None:
    s = EditSession.open(site_file)
    visit, dev = _first(s)
    a, b = rcd_ids(s.site)[1:3]
    s.set_reading(visit, a, Reading(x1_0=11.0))
    s.set_reading(visit, dev, Reading(x1_0=12.0))
    s.set_reading(visit, b, Reading(x1_0=13.0))
    s.close()
    jp = journal_path(site_file)
    lines = jp.read_bytes().split(b"\n")
    lines[2] = b'{"op": "set-reading", "visit": \x00\x00 garbage'
    jp.write_bytes(b"\n".join(lines))
    s = EditSession.open(site_file, read_only=True)
    assert [w for w in s.warnings if "entry 3" in w and "damaged" in w]
    assert s.site.visits[-1].readings[a].x1_0 == 11.0
    assert s.site.visits[-1].readings[b].x1_0 == 13.0
    s.close()


def test_journal_of_another_version_of_the_file_is_kept_aside(site_file: Path) -> None:
    s = EditSession.open(site_file)
    visit, dev = _first(s)
    s.set_reading(visit, dev, Reading(x1_0=44.0))
    s.close()
    # a colleague's copy is put over the file
    colleague = load_site(site_file).model_copy(
        update={"site": load_site(site_file).site.model_copy(update={"notes": "from the office"})}
    )
    save_site(colleague, site_file)
    s = EditSession.open(site_file)
    assert s.site == colleague and s.recovered == []
    assert any(
        "changed outside tripwise" in w and "1 unsaved edit was not applied" in w
        for w in s.warnings
    )
    kept = [p for p in site_file.parent.iterdir() if ".unapplied-" in p.name]
    assert len(kept) == 1 and b'"x1_0": 44.0' in kept[0].read_bytes()
    assert not journal_path(site_file).exists()
    s.close()


def test_crash_after_rename_before_clearing_journal_does_not_replay_twice(
    site_file: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    s = EditSession.open(site_file)
    visit, dev = _first(s)
    board = next(n for n in s.site.nodes if n.kind == "board")
    s.upsert_node(board.model_copy(update={"label": "Renamed board"}))
    s.set_reading(visit, dev, Reading(x1_0=15.0))
    real_clear = journal_mod.JournalWriter.clear
    kept: list[bytes] = []

    def stop_before_clear(self: journal_mod.JournalWriter, new_base: str) -> None:
        kept.append(self.path.read_bytes())  # the journal as a crash at this point leaves it
        real_clear(self, new_base)

    monkeypatch.setattr(journal_mod.JournalWriter, "clear", stop_before_clear)
    s.save()
    s.close()
    assert b'"saving": "sha256:' in kept[0]
    journal_path(site_file).write_bytes(kept[0])
    s = EditSession.open(site_file)
    assert s.recovered == [] and s.warnings == [] and not s.dirty
    assert not journal_path(site_file).exists()
    assert s.site == load_site(site_file)
    s.close()


def test_save_keeps_one_backup_and_cleans_temp_files(site_file: Path) -> None:
    first = site_file.read_bytes()
    dead = subprocess.Popen([sys.executable, "-c", "pass"])
    dead.wait()
    stray = site_file.with_name(f".{site_file.name}.{dead.pid}-0123abcd.tmp")
    stray_bak = site_file.with_name(f".{site_file.name}.bak.{dead.pid}-0123abcd.tmp")
    other_site = site_file.with_name(f".{site_file.name}.copy.json.{dead.pid}-0123abcd.tmp")
    live = site_file.with_name(f".{site_file.name}.{os.getppid()}-0123abcd.tmp")
    for p in (stray, stray_bak, other_site, live):
        p.write_bytes(b"half a save")
    s = EditSession.open(site_file)
    assert not stray.exists() and not stray_bak.exists()  # left by a save that was cut off
    assert other_site.exists() and live.exists()  # another site's, or a running program's
    other_site.unlink()
    live.unlink()
    visit, dev = _first(s)
    s.set_reading(visit, dev, Reading(x1_0=16.0))
    s.save()
    assert backup_path(site_file).read_bytes() == first
    second = site_file.read_bytes()
    s.set_reading(visit, dev, Reading(x1_0=17.0))
    s.save()
    assert backup_path(site_file).read_bytes() == second
    s.save()  # nothing changed: the backup still holds the version before
    assert backup_path(site_file).read_bytes() == second
    s.close()
    names = sorted(p.name for p in site_file.parent.iterdir())
    assert names == ["site.json", "site.json.bak"]


def test_file_changed_outside_while_open_is_kept_as_backup(site_file: Path) -> None:
    s = EditSession.open(site_file)
    visit, dev = _first(s)
    s.set_reading(visit, dev, Reading(x1_0=16.0))
    outside = site_file.read_bytes().replace(b'"name": "Generated', b'"name": "Edited')
    site_file.write_bytes(outside)
    s.save()
    assert backup_path(site_file).read_bytes() == outside
    assert any("changed outside tripwise while it was open" in w for w in s.warnings)
    s.close()


def test_compaction_keeps_the_journal_small(
    site_file: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    import model.storage.session as session_mod

    monkeypatch.setattr(session_mod, "COMPACT_BYTES", 2000)
    s = EditSession.open(site_file)
    visit, _ = _first(s)
    for i, dev in enumerate(rcd_ids(s.site) * 3):
        s.set_reading(visit, dev, Reading(x1_0=10.0 + i, note="n" * 100))
    expected = s.site
    s.close()
    assert journal_path(site_file).stat().st_size < 2 * len(site_file.read_bytes()) + 4000
    again = EditSession.open(site_file)
    assert again.site == expected
    again.close()
    assert journal_mod.COMPACT_BYTES == 8 * 1024 * 1024


# --- format versions ---------------------------------------------------------


def _v0_from(site: SiteFile) -> dict[str, Any]:
    """A made-up version 0: "installation" for "site", "type" for a node's "kind"."""
    d = site_to_dict(site)
    return {
        "format": "tripwise.site",
        "version": 0,
        "installation": d["site"],
        "nodes": [{("type" if k == "kind" else k): v for k, v in n.items()} for n in d["nodes"]],
        "visits": d.get("visits", []),
    }


def _v0_to_v1(doc: dict[str, Any]) -> dict[str, Any]:
    out = {k: v for k, v in doc.items() if k != "installation"}
    out["site"] = doc["installation"]
    out["nodes"] = [{("kind" if k == "type" else k): v for k, v in n.items()} for n in doc["nodes"]]
    out["version"] = 1
    return out


def test_newer_version_is_refused_and_not_touched(tmp_path: Path) -> None:
    p = tmp_path / "future.json"
    d = site_to_dict(generate_site(12, seed=1))
    d["version"] = 3
    p.write_text(json.dumps(d))
    before = p.read_bytes()
    for opener in (load_site, EditSession.open, lambda x: EditSession.open(x, read_only=True)):
        with pytest.raises(SiteLoadError, match="format version 3 is newer than this tripwise"):
            opener(p)
    assert p.read_bytes() == before
    assert sorted(x.name for x in tmp_path.iterdir()) == ["future.json"]


def test_unknown_old_version_is_refused(tmp_path: Path) -> None:
    p = tmp_path / "old.json"
    p.write_text(json.dumps(_v0_from(generate_site(12, seed=1))))
    with pytest.raises(SiteLoadError, match="format version 0 is not a known version"):
        load_site(p)


def test_version_0_is_migrated_in_memory_and_written_on_next_save(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    monkeypatch.setitem(codec.MIGRATIONS, 0, _v0_to_v1)
    site = generate_site(40, seed=2)
    p = tmp_path / "old site.json"
    p.write_text(json.dumps(_v0_from(site), indent=2))
    original = p.read_bytes()
    assert load_site(p) == site
    assert p.read_bytes() == original  # loading never writes
    s = EditSession.open(p)
    assert s.site == site
    assert any("format version 0" in w and "old site.json.v0.bak" in w for w in s.warnings)
    assert p.read_bytes() == original
    visit, dev = _first(s)
    s.set_reading(visit, dev, Reading(x1_0=20.0))
    s.close()
    assert p.read_bytes() == original  # still only in the journal
    s = EditSession.open(p)
    assert s.site.visits[-1].readings[dev].x1_0 == 20.0
    s.save()
    s.close()
    assert json.loads(p.read_bytes())["version"] == 2
    assert (tmp_path / "old site.json.v0.bak").read_bytes() == original
    assert backup_path(p).read_bytes() == original
    monkeypatch.delitem(codec.MIGRATIONS, 0)
    assert load_site(p).visits[-1].readings[dev].x1_0 == 20.0  # a plain current file now


def test_a_version_1_file_opens_and_is_written_as_version_2_on_save(tmp_path: Path) -> None:
    """Version 1 files (every file written before the format gained its optional
    version 2 fields) open unchanged and are rewritten as version 2 only at a save."""
    site = generate_site(30, seed=4)
    d = site_to_dict(site)
    d["version"] = 1
    p = tmp_path / "v1.json"
    p.write_text(json.dumps(d, indent=2))
    original = p.read_bytes()
    assert load_site(p) == site
    s = EditSession.open(p)
    assert any("format version 1" in w and "v1.json.v1.bak" in w for w in s.warnings)
    visit, dev = _first(s)
    s.set_reading(visit, dev, Reading(x1_0=21.0))
    s.save()
    s.close()
    assert json.loads(p.read_bytes())["version"] == 2
    assert (tmp_path / "v1.json.v1.bak").read_bytes() == original
    assert load_site(p).visits[-1].readings[dev].x1_0 == 21.0


def test_broken_migration_gives_a_clear_error(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    monkeypatch.setitem(codec.MIGRATIONS, 0, _v0_to_v1)
    p = tmp_path / "old.json"
    doc = _v0_from(generate_site(12, seed=1))
    del doc["installation"]
    p.write_text(json.dumps(doc))
    with pytest.raises(SiteLoadError, match="could not convert format version 0 to 1"):
        load_site(p)


def test_session_files_are_named_beside_the_site(site_file: Path) -> None:
    s = EditSession.open(site_file)
    visit, dev = _first(s)
    s.set_reading(visit, dev, Reading(x1_0=20.0))
    names = sorted(os.listdir(site_file.parent))
    assert names == ["site.json", "site.json.tripwise-journal", "site.json.tripwise-lock"]
    s.close()
    assert sorted(os.listdir(site_file.parent)) == ["site.json", "site.json.tripwise-journal"]
    with pytest.raises(InvalidEdit):
        raise InvalidEdit("x")
