"""The app when the disk says no: no journal can be started; edits recovered on opening."""

from __future__ import annotations

import errno
import os
from pathlib import Path

import pytest

from model.site.models import Reading
from model.storage import session as session_module
from model.storage.session import EditSession
from model.storage.sites import load_site
from tui.app.shell import make_app


async def test_no_journal_possible_opens_read_only_with_the_reason(
    oak_lane: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    # a full disk: the journal cannot be started, so edits could not be kept safe
    def disk_full(*_a: object, **_k: object) -> None:
        raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC))

    monkeypatch.setattr(session_module, "write_new_file", disk_full)
    before = oak_lane.read_bytes()
    app = make_app(oak_lane)
    monkeypatch.undo()
    async with app.run_test(size=(120, 40)) as pilot:
        assert app.session is not None and app.session.read_only
        assert app.save_state == "read-only"
        bar = str(app.screen.query_one("#save-state").render())
        assert "the disk is full" in bar
        app.main.select("rc1")
        await pilot.press("r")  # the readings pad: refused, never a traceback
        await pilot.press("escape")
        await pilot.press("d")
        assert app.return_code is None
        assert app.site.latest_visit() is not None
    assert oak_lane.read_bytes() == before
    assert sorted(p.name for p in oak_lane.parent.iterdir()) == [oak_lane.name]


async def test_recovered_edits_are_not_shown_as_saved(oak_lane: Path) -> None:
    s = EditSession.open(oak_lane)  # an editor that stopped before saving
    s.set_reading(s.site.visits[-1].id, "rc1", Reading(x1_0=41.0))
    s.close()
    app = make_app(oak_lane)
    async with app.run_test(size=(120, 40)) as pilot:
        assert app.save_state == "recovered"
        bar = str(app.screen.query_one("#save-state").render())
        assert "recovered, not yet saved" in bar
        assert load_site(oak_lane).visits[-1].readings["rc1"].x1_0 != 41.0
        await pilot.press("ctrl+s")
        assert app.save_state == "saved"
        assert "✔ saved" in str(app.screen.query_one("#save-state").render())
    assert load_site(oak_lane).visits[-1].readings["rc1"].x1_0 == 41.0
