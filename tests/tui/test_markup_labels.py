"""User text that looks like markup is shown as typed and never breaks a screen."""

from __future__ import annotations

import json
from pathlib import Path

from sitekit import SAMPLES

from tui.app.shell import make_app
from tui.screens.compare import CompareScreen
from tui.screens.export import ExportScreen
from tui.screens.help import HelpScreen
from tui.screens.impact import ImpactScreen
from tui.screens.node_editor import NodeEditorScreen
from tui.screens.pair import PairScreen
from tui.screens.readings import ReadingScreen
from tui.screens.site_details import SiteDetailsScreen
from tui.screens.visits import VisitsScreen

ODD = " [/b] [bold]x[/] [link=y]"


def odd_site(tmp_path: Path) -> Path:
    doc = json.loads((SAMPLES / "oak-lane-house.json").read_text(encoding="utf-8"))
    for n in doc["nodes"]:
        n["label"] = n.get("label", n["id"]) + ODD
        if n["kind"] == "board":
            n["place"] = "[/i] by the door"
    doc["site"]["name"] = "Site [/u] name"
    doc["visits"][-1]["inspector"] = "[/] A. N. Other"
    path = tmp_path / "odd [labels].json"
    path.write_text(json.dumps(doc, ensure_ascii=False), encoding="utf-8")
    return path


async def test_every_screen_survives_markup_like_labels(tmp_path: Path) -> None:
    app = make_app(odd_site(tmp_path))
    async with app.run_test(size=(160, 45)) as pilot:
        await app.settle()
        await pilot.press("f", "2", "2", "1", "enter")
        assert "[/b]" in app.main.query_one("#filter-board").render().plain  # type: ignore[attr-defined]
        app.main.select("rb1")
        for key, screen in (
            ("i", ImpactScreen),
            ("p", PairScreen),
            ("e", NodeEditorScreen),
            ("r", ReadingScreen),
            ("h", CompareScreen),
            ("x", ExportScreen),
            ("s", SiteDetailsScreen),
            ("v", VisitsScreen),
            ("f1", HelpScreen),
        ):
            await pilot.press("t", key)
            await pilot.pause()
            assert isinstance(app.screen, screen), key
            await pilot.press("escape")
            await pilot.pause()
            app.main.select("rb1")


async def test_notices_show_user_text_as_typed(tmp_path: Path) -> None:
    app = make_app(odd_site(tmp_path))
    async with app.run_test(size=(120, 40)) as pilot:
        await app.settle()
        app.notify("Merged copy [/b].json")  # a file name that looks like markup
        await pilot.pause()
        assert any("[/b]" in n.message for n in app._notifications)
