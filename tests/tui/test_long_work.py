"""Long work shows that it is under way: a slow check, a slow document.

The work is held back by a gate the test opens, so what the screen shows
while it runs is checked without any timing luck.
"""

from __future__ import annotations

import shutil
import threading
from pathlib import Path
from typing import Any

import pytest
from textual.app import App, ComposeResult
from textual.widgets import LoadingIndicator, Static

import tui.app.analysis as analysis_mod
import tui.screens.export as export_mod
from model.rules.checks import analyse
from tui.app.shell import make_app
from tui.screens.export import ExportScreen


async def test_a_slow_check_shows_it_is_checking(
    oak_lane: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    gate = threading.Event()

    def slow_analyse(site: Any, index: Any = None) -> Any:
        gate.wait(30)
        return analyse(site, index)

    monkeypatch.setattr(analysis_mod, "analyse", slow_analyse)
    app = make_app(oak_lane)
    try:
        async with app.run_test(size=(80, 24)) as pilot:
            panel = app.main.findings
            for _ in range(100):  # the first check starts just after the first paint
                if panel.checking:
                    break
                await pilot.pause(0.05)
            assert panel.checking
            count = str(panel.query_one("#findings-count", Static).render())
            assert "checking" in count
            await pilot.pause(0.6)  # longer than LOADING_AFTER_S: the indicator is up
            busy = panel.query_one("#findings-busy", LoadingIndicator)
            assert busy.display
            # the tree still answers while the check runs
            await pilot.press("down")
            assert app.main.tree.cursor_line == 1
            gate.set()
            await app.workers.wait_for_complete()
            await pilot.pause()
            assert not panel.checking and not busy.display
            assert "checking" not in str(panel.query_one("#findings-count", Static).render())
            assert app.analysis is not None and panel.shown
    finally:
        gate.set()


class Host(App[None]):
    def __init__(self, site_path: Path) -> None:
        super().__init__()
        self.site_path = site_path
        self.result: object = None

    def compose(self) -> ComposeResult:
        yield Static("host")

    def on_mount(self) -> None:
        self.push_screen(ExportScreen(self.site_path), self._done)

    def _done(self, result: Path | None) -> None:
        self.result = result


async def test_a_slow_document_shows_progress(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    site = tmp_path / "oak lane.json"
    shutil.copyfile(
        Path(__file__).resolve().parents[2] / "sample_sites" / "oak-lane-house.json", site
    )
    gate = threading.Event()
    real_write = export_mod.write_report

    def slow_write(*args: Any, **kwargs: Any) -> Path:
        gate.wait(30)
        return real_write(*args, **kwargs)

    monkeypatch.setattr(export_mod, "write_report", slow_write)
    app = Host(site)
    try:
        async with app.run_test(size=(80, 24)) as pilot:
            await pilot.pause()
            screen = app.screen
            assert isinstance(screen, ExportScreen)
            busy = screen.query_one("#export-busy", LoadingIndicator)
            assert not busy.display
            await pilot.press("ctrl+s")
            await pilot.pause(1.3)
            assert busy.display
            status = str(screen.query_one("#export-status", Static).render())
            assert status.startswith("Writing ") and " s " in status  # seconds so far
            gate.set()
            await app.workers.wait_for_complete()
            await pilot.pause()
            assert isinstance(app.result, Path) and app.result.is_file()
            assert app.screen is not screen
    finally:
        gate.set()
