"""The help screen lists every key the app's bindings answer to."""

from __future__ import annotations

from pathlib import Path

from textual.binding import Binding

from tui.app.shell import TripwiseApp, make_app
from tui.screens.help import KEY_MAP, HelpScreen
from tui.screens.readings import ReadingScreen
from tui.widgets.findings_panel import FindingsTable
from tui.widgets.site_tree import SiteTree

NAMES = {
    "question_mark": "?",
    "exclamation_mark": "!",
    "delete": "delete",
    "enter": "enter",
    "escape": "escape",
}


def test_every_binding_is_in_the_help() -> None:
    listed = " ".join(keys for _, keys, _ in KEY_MAP).split()
    for cls in (TripwiseApp, SiteTree, FindingsTable, ReadingScreen):
        for b in cls.BINDINGS:
            assert isinstance(b, Binding)
            for key in b.key.split(","):
                shown = NAMES.get(key, key).replace("f1", "F1")
                assert shown in listed, (cls.__name__, key)


async def test_f1_opens_help(oak_lane: Path) -> None:
    app = make_app(oak_lane)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("f1")
        assert isinstance(app.screen, HelpScreen)
        await pilot.press("escape")
        assert not isinstance(app.screen, HelpScreen)


async def test_key_bar_follows_the_focus(oak_lane: Path) -> None:
    from tui.widgets.key_bar import KeyBar

    app = make_app(oak_lane)
    async with app.run_test(size=(160, 40)) as pilot:
        await app.settle()
        bar = app.main.query_one(KeyBar)
        assert "Readings" in bar.render().plain  # type: ignore[attr-defined]
        await pilot.press("f")
        await pilot.pause()
        text = bar.render().plain  # type: ignore[attr-defined]
        assert "Severity filter" in text and "Readings" not in text
