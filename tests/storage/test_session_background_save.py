"""Saving on another thread than the edits: no edit is ever cleared from the journal unsaved.

The app encodes the site in a worker thread (``snapshot``) and writes it there
(``write_snapshot``) while the inspector goes on typing; these tests use real
files and real threads.
"""

from __future__ import annotations

import threading
from pathlib import Path

import pytest

from model.site.models import Reading
from model.storage import session as session_mod
from model.storage.journal import journal_path, read_journal
from model.storage.session import EditSession
from model.storage.sites import load_site


def _rcds(s: EditSession) -> list[str]:
    return [n.id for n in s.site.nodes if n.kind in ("rccb", "rcbo")]


def test_a_snapshot_overtaken_by_an_edit_is_not_written(site_file: Path) -> None:
    before = site_file.read_bytes()
    s = EditSession.open(site_file)
    visit = s.site.visits[-1].id
    dev, other = _rcds(s)[:2]
    s.set_reading(visit, dev, Reading(x1_0=41.0))
    snap = s.snapshot()
    s.set_reading(visit, other, Reading(x1_0=43.0))  # typed while the snapshot was encoded
    assert s.write_snapshot(snap) is False
    assert site_file.read_bytes() == before  # nothing written
    assert s.dirty
    journal = read_journal(journal_path(site_file))
    assert journal is not None and len(journal.ops) == 2  # both edits still journalled
    s.close()
    again = EditSession.open(site_file)  # as after a crash: both edits come back
    readings = again.site.visits[-1].readings
    assert readings[dev].x1_0 == 41.0 and readings[other].x1_0 == 43.0
    again.close()


def test_a_snapshot_written_holds_every_edit_and_clears_the_journal(site_file: Path) -> None:
    s = EditSession.open(site_file)
    visit = s.site.visits[-1].id
    dev = _rcds(s)[0]
    s.set_reading(visit, dev, Reading(x1_0=41.0))
    assert s.write_snapshot(s.snapshot()) is True
    assert not s.dirty
    assert not journal_path(site_file).exists()
    assert load_site(site_file).visits[-1].readings[dev].x1_0 == 41.0
    s.close()


def test_a_failed_background_write_loses_nothing(
    site_file: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    s = EditSession.open(site_file)
    visit = s.site.visits[-1].id
    dev = _rcds(s)[0]
    s.set_reading(visit, dev, Reading(x1_0=41.0))

    def disk_full(*_a: object, **_k: object) -> None:
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(session_mod, "write_atomic", disk_full)
    snap = s.snapshot()
    with pytest.raises(OSError, match="No space left"):
        s.write_snapshot(snap)
    assert s.dirty
    s.close()
    monkeypatch.undo()
    again = EditSession.open(site_file)
    assert again.site.visits[-1].readings[dev].x1_0 == 41.0  # from the journal
    again.close()


def test_edits_while_saves_run_on_another_thread_all_survive(site_file: Path) -> None:
    s = EditSession.open(site_file)
    visit = s.site.visits[-1].id
    devices = _rcds(s)[:12]
    stop = threading.Event()
    outcomes: list[bool] = []
    errors: list[BaseException] = []

    def saver() -> None:
        try:
            while not stop.is_set():
                outcomes.append(s.write_snapshot(s.snapshot()))
        except BaseException as exc:  # noqa: BLE001 - reported by the test
            errors.append(exc)

    thread = threading.Thread(target=saver)
    thread.start()
    try:
        for round_ in range(3):
            for i, dev in enumerate(devices):
                s.set_reading(visit, dev, Reading(x1_0=20.0 + round_ + i / 10))
    finally:
        stop.set()
        thread.join(60)
    assert not errors
    # a save refused because an edit came after it is retried, never half-made: with no
    # edit after it, the next one lands (how many landed between edits is the scheduler's)
    assert s.write_snapshot(s.snapshot())
    s.close()  # no last save: what is not in the file must be in the journal
    again = EditSession.open(site_file)
    readings = again.site.visits[-1].readings
    for i, dev in enumerate(devices):
        assert readings[dev].x1_0 == 22.0 + i / 10
    again.close()
