"""Every dialog survives keys sent in a burst, with no pause between them.

``pilot.press`` waits for the app to settle after each key; a person typing
fast (or a paste) does not.  These tests post all the keys of a burst at once
and check that the app is still running, each dialog closed exactly once and
the screens left are the ones expected.
"""

from __future__ import annotations

from pathlib import Path

from textual import events

from model.storage.session import EditSession
from model.storage.sites import load_site
from tui.app.shell import TripwiseApp, make_app
from tui.screens.confirm import ConfirmScreen
from tui.screens.main import MainScreen
from tui.screens.node_editor import NodeEditorScreen
from tui.screens.readings import ReadingScreen
from tui.screens.start_visit import StartVisitScreen

_CHARS = {"enter": "\r", "escape": "\x1b", "tab": "\t"}


async def burst(app: TripwiseApp, pilot, *keys: str) -> None:  # type: ignore[no-untyped-def]
    """Send ``keys`` as fast as a terminal can deliver them, then let the app settle."""
    for key in keys:
        app.post_message(events.Key(key, _CHARS.get(key, key if len(key) == 1 else None)))
    for _ in range(4):
        await pilot.pause()


def stack(app: TripwiseApp) -> list[type]:
    return [type(s) for s in app.screen_stack]


async def test_add_enter_enter_opens_one_form_and_never_crashes(oak_lane: Path) -> None:
    for _ in range(3):  # the crash came 2 runs in 3
        app = make_app(oak_lane)
        async with app.run_test(size=(120, 40)) as pilot:
            await app.settle()
            app.main.select("rc1")
            await burst(app, pilot, "t", "a", "enter", "enter")
            assert stack(app) == [MainScreen, NodeEditorScreen]
            assert app.screen._new  # type: ignore[attr-defined]
            await burst(app, pilot, "escape", "escape", "escape", "escape")
            assert stack(app) == [MainScreen] and app.is_running
        app.session.close()  # type: ignore[union-attr]


async def test_every_dialog_closes_once_under_a_burst(oak_lane: Path) -> None:
    app = make_app(oak_lane)
    async with app.run_test(size=(120, 40)) as pilot:
        await app.settle()
        for opener in ("a", "e", "d", "x", "s", "v", "h", "i", "f1", "m"):
            app.main.select("rc1")
            await burst(app, pilot, "t", opener, "escape", "escape", "escape", "enter", "escape")
            await burst(app, pilot, "escape", "escape")
            assert stack(app) == [MainScreen], opener
            assert app.is_running
    # nothing was changed by all those keys
    assert [n.id for n in load_site(oak_lane).nodes] == [n.id for n in app.site.nodes]


async def test_delete_confirmed_twice_in_a_burst_deletes_once(oak_lane: Path) -> None:
    app = make_app(oak_lane)
    async with app.run_test(size=(120, 40)) as pilot:
        await app.settle()
        before = {n.id for n in app.site.nodes}
        app.main.select("m1")
        await burst(app, pilot, "t", "d", "y", "y", "y", "enter")
        assert isinstance(app.screen, MainScreen | ConfirmScreen)
        await burst(app, pilot, "escape", "escape")
        after = {n.id for n in app.site.nodes}
        removed = before - after
        assert "m1" in removed and "rc1" in after  # one delete, of the node chosen
        assert app.is_running


async def test_a_question_answered_in_a_burst_calls_back_once(oak_lane: Path) -> None:
    app = make_app(oak_lane)
    answers: list[bool | None] = []
    async with app.run_test(size=(120, 40)) as pilot:
        await app.settle()
        app.push_screen(ConfirmScreen("Quit?", "Unsaved edits."), answers.append)
        await pilot.pause()
        await burst(app, pilot, "n", "y", "y", "n", "escape")
        assert answers == [False] and stack(app) == [MainScreen]


async def test_open_elsewhere_question_in_a_burst(oak_lane: Path) -> None:
    holder = EditSession.open(oak_lane)
    try:
        app = make_app(oak_lane)
        async with app.run_test(size=(120, 40)) as pilot:
            await pilot.pause()
            assert isinstance(app.screen, ConfirmScreen)
            await burst(app, pilot, "y", "y", "y", "enter")
            assert app.is_running and app.session is not None and app.session.read_only
            assert stack(app)[0] is MainScreen and ConfirmScreen not in stack(app)
    finally:
        holder.close()


async def test_reading_screen_left_in_a_burst(oak_lane_no_visits: Path) -> None:
    app = make_app(oak_lane_no_visits)
    async with app.run_test(size=(120, 40)) as pilot:
        await app.settle()
        app.main.select("rc1")
        await pilot.press("r")
        if isinstance(app.screen, StartVisitScreen):
            await pilot.press("enter", *"A. Tester", "enter", *"MFT-1", "enter")
        assert isinstance(app.screen, ReadingScreen)
        await burst(app, pilot, "escape", "escape", "escape", "escape")
        assert stack(app) == [MainScreen] and app.is_running
