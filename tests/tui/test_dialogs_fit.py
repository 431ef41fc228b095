"""Every dialog fits an 80×24 terminal: its buttons (or its list) are on screen, its keys shown."""

from __future__ import annotations

from pathlib import Path

import pytest
from textual.screen import ModalScreen
from textual.widgets import Button

from tui.app.shell import make_app
from tui.screens.choice import ChoiceScreen
from tui.screens.confirm import ConfirmScreen
from tui.screens.export import ExportScreen
from tui.screens.help import HelpScreen
from tui.screens.impact import ImpactScreen
from tui.screens.node_editor import NodeEditorScreen
from tui.screens.pair import PairScreen
from tui.screens.path_prompt import PathPromptScreen
from tui.screens.site_details import SiteDetailsScreen
from tui.screens.start_visit import StartVisitScreen
from tui.screens.visits import VisitsScreen

#: (node under the cursor, keys that open the dialog, the dialog).
DIALOGS = [
    ("c-s1", ["e"], NodeEditorScreen),  # a circuit: the longest node form
    ("rc1", ["a", "k"], NodeEditorScreen),  # a new CBR: the most residual-current fields
    ("cu", ["a"], ChoiceScreen),
    ("cu", ["a", "c"], NodeEditorScreen),
    ("rc1", ["d"], ConfirmScreen),
    ("rc1", ["s"], SiteDetailsScreen),
    ("rc1", ["v"], VisitsScreen),
    ("rc1", ["x"], ExportScreen),
    ("rc1", ["f1"], HelpScreen),
    ("rc1", ["i"], ImpactScreen),
    ("rb1", ["p"], PairScreen),
    ("rc1", ["o"], PathPromptScreen),
]


def _on_screen(screen: ModalScreen, widget) -> bool:  # type: ignore[no-untyped-def,type-arg]
    region = widget.region
    return region.area > 0 and screen.region.contains_region(region)


@pytest.mark.parametrize(("node", "keys", "dialog"), DIALOGS)
async def test_dialog_fits_80x24(oak_lane: Path, node: str, keys: list[str], dialog: type) -> None:
    app = make_app(oak_lane)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        app.main.select(node)
        await pilot.press(*keys)
        await pilot.pause()
        screen = app.screen
        assert isinstance(screen, dialog)
        buttons = list(screen.query(Button))
        for button in buttons:
            assert _on_screen(screen, button), f"{button.label} is cut off"
        if not buttons:  # a list or a prompt: its whole frame is on screen
            frame = screen.query_one(".dialog")
            assert _on_screen(screen, frame)
        shown = " ".join(str(w.render()) for w in screen.query("Static, Label, Button"))
        assert "Esc" in shown or "esc" in shown or "escape" in shown


async def test_start_visit_fits_80x24(oak_lane_no_visits: Path) -> None:
    app = make_app(oak_lane_no_visits)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        app.main.select("rc1")
        await pilot.press("r")
        screen = app.screen
        assert isinstance(screen, StartVisitScreen)
        assert _on_screen(screen, screen.query_one(".dialog"))
        assert "Esc cancel" in str(screen.query_one("#visit-keys").render())
