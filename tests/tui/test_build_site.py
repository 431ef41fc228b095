"""Building a small site from empty by keys alone, then reloading it from disk."""

from __future__ import annotations

from pathlib import Path

from model.site.models import SiteFile
from model.storage.session import EditSession
from model.storage.sites import load_site
from tui.app.shell import make_app
from tui.cli.commands.new import empty_site
from tui.screens.choice import ChoiceScreen
from tui.screens.node_editor import NodeEditorScreen


async def test_build_small_site_by_keys(tmp_path: Path) -> None:
    path = tmp_path / "new site.json"
    EditSession.create(path, empty_site("Garage flat")).close()
    app = make_app(path)
    async with app.run_test(size=(120, 40)) as pilot:
        # origin is under the cursor; add a board
        await pilot.press("a")
        assert isinstance(app.screen, ChoiceScreen)
        await pilot.press("b")  # each kind has its letter: b for a board
        assert isinstance(app.screen, NodeEditorScreen)
        # the label first (the id board1 is generated), Enter to the place
        await pilot.press("ctrl+u", *"CU", "enter", *"Hall", "ctrl+s")
        assert not isinstance(app.screen, NodeEditorScreen)
        assert app.main.tree.selected_id() == "board1"
        # an RCCB under the board (r), defaults kept: 30 mA Type A
        await pilot.press("a", "r", "ctrl+s")
        assert app.main.tree.selected_id() == "rccb1"
        # a circuit under the RCCB (c)
        await pilot.press("a", "c")
        assert isinstance(app.screen, NodeEditorScreen)
        await pilot.press("ctrl+u", *"Kitchen", "ctrl+s")
        assert app.main.tree.selected_id() == "circuit1"
        await pilot.press("ctrl+s")
        assert app.save_state == "saved"
        in_app = app.site
    on_disk = load_site(path)
    assert on_disk == in_app
    expected = SiteFile.model_validate(
        {
            "format": "tripwise.site",
            "version": 2,
            "site": {"name": "Garage flat", "earthing": "TN-C-S"},
            "nodes": [
                {"id": "supply", "kind": "origin", "label": "Supply intake"},
                {
                    "id": "board1",
                    "kind": "board",
                    "parent": "supply",
                    "label": "CU",
                    "place": "Hall",
                },
                {
                    "id": "rccb1",
                    "kind": "rccb",
                    "parent": "board1",
                    "label": "RCCB",
                    "idn_ma": 30.0,
                    "waveform": "A",
                    "rated_a": 63.0,
                },
                {
                    "id": "circuit1",
                    "kind": "circuit",
                    "parent": "rccb1",
                    "label": "Kitchen",
                    "use": "sockets",
                    "rated_a": 32.0,
                },
            ],
        }
    )
    assert on_disk.nodes == expected.nodes
    assert on_disk.site.name == "Garage flat"
