"""The way in the tree and the node form (numbering a board's ways: common practice)."""

from __future__ import annotations

from pathlib import Path

from textual.widgets import Input

from model.storage.sites import load_site
from tui.app.shell import make_app
from tui.screens.node_editor import NodeEditorScreen


async def test_way_is_shown_in_the_tree_and_edited_in_the_form(oak_lane: Path) -> None:
    app = make_app(oak_lane)
    async with app.run_test(size=(100, 30)) as pilot:
        await pilot.pause()
        tree = app.main.tree
        label = tree.node_label(app.index, "m5").plain
        assert "[6] MCB 5" in label  # the demo sample's MCB 5 is in way 6
        app.main.select("m5")
        await pilot.press("e")
        editor = app.screen
        assert isinstance(editor, NodeEditorScreen)
        way = editor.query_one("#f-way", Input)
        assert way.value == "6"
        way.value = "L2-6"
        await pilot.press("ctrl+s")
        await pilot.pause()
        assert app.screen is not editor
        assert "[L2-6] MCB 5" in tree.node_label(app.index, "m5").plain
        await pilot.press("ctrl+s")
    assert load_site(oak_lane).node("m5").way == "L2-6"  # type: ignore[union-attr]


async def test_a_bad_way_is_refused_at_its_field(oak_lane: Path) -> None:
    before = oak_lane.read_bytes()
    app = make_app(oak_lane)
    async with app.run_test(size=(100, 30)) as pilot:
        await pilot.pause()
        app.main.select("m5")
        await pilot.press("e")
        editor = app.screen
        assert isinstance(editor, NodeEditorScreen)
        editor.query_one("#f-way", Input).value = "way number thirteen"
        await pilot.press("ctrl+s")
        await pilot.pause()
        assert app.screen is editor  # refused: the form stays open with the reason
        assert "12" in editor.errors["way"]
        await pilot.press("escape")
    assert oak_lane.read_bytes() == before
