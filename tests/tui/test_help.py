"""The help screen, the key line and the command palette are made from the key bindings."""

from __future__ import annotations

from pathlib import Path

from textual.binding import Binding
from textual.widgets._footer import FooterKey

from tui.app.commands import binding_commands
from tui.app.shell import TripwiseApp, make_app
from tui.screens.help import HelpScreen, key_rows
from tui.screens.readings import ReadingScreen
from tui.widgets.findings_panel import FindingsTable
from tui.widgets.site_tree import SiteTree


async def test_every_binding_is_in_the_help(oak_lane: Path) -> None:
    app = make_app(oak_lane)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        listed = " ".join(keys for _, keys, _ in key_rows(app)).split()
        for cls in (TripwiseApp, SiteTree, FindingsTable, ReadingScreen):
            for b in cls.BINDINGS:
                assert isinstance(b, Binding)
                for key in b.key.split(","):
                    assert app.get_key_display(Binding(key, "")) in listed, (cls.__name__, key)
        assert "^p" in listed or "ctrl+p" in listed  # the palette, never a device key


async def test_f1_opens_help(oak_lane: Path) -> None:
    app = make_app(oak_lane)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("f1")
        assert isinstance(app.screen, HelpScreen)
        await pilot.press("escape")
        assert not isinstance(app.screen, HelpScreen)


async def test_key_bar_follows_the_focus(oak_lane: Path) -> None:
    app = make_app(oak_lane)
    async with app.run_test(size=(160, 40)) as pilot:
        await app.settle()
        await pilot.pause()

        def shown() -> set[str]:
            return {k.description for k in app.main.query(FooterKey)}

        assert "Readings" in shown()
        await pilot.press("f")
        await pilot.pause()
        assert "Severity filter" in shown() and "Readings" not in shown()


async def test_read_only_shows_and_offers_no_changes(oak_lane: Path) -> None:
    app = make_app(oak_lane, read_only=True)
    async with app.run_test(size=(160, 40)) as pilot:
        await app.settle()
        await pilot.pause()
        footer_keys = {k.description for k in app.main.query(FooterKey)}
        assert "Impact" in footer_keys
        for change in ("Edit", "Add", "Move", "Copy", "Delete", "Readings", "Undo"):
            assert change not in footer_keys
        titles = {c.title for c in binding_commands(app, app.main)}
        assert "Impact" in titles and "Add" not in titles and "Edit" not in titles


async def test_the_palette_lists_every_action(oak_lane: Path) -> None:
    app = make_app(oak_lane)
    async with app.run_test(size=(120, 40)) as pilot:
        await app.settle()
        commands = {c.title: c for c in binding_commands(app, app.main)}
        for cls in (TripwiseApp, SiteTree, FindingsTable):
            for b in cls.BINDINGS:
                assert b.description in commands, b.description
        # a command does what its key does
        app.main.select("rc1")
        await commands["Impact"].callback()
        await pilot.pause()
        from tui.screens.impact import ImpactScreen

        assert isinstance(app.screen, ImpactScreen)


async def test_a_narrow_key_line_keeps_help_and_the_palette_and_fits(
    oak_lane: Path, tmp_path: Path
) -> None:
    app = make_app(oak_lane)
    async with app.run_test(size=(80, 24)) as pilot:
        await app.settle()
        await pilot.pause()
        for focus in ("t", "f"):  # the tree's keys, then the findings'
            await pilot.press(focus)
            await pilot.pause()
            keys = list(app.main.query(FooterKey))
            said = {k.description for k in keys}
            assert {"Help", "palette"} <= said, said
            assert "What if" in said  # the trial of a change stays on the line
            # every key drawn whole on the line: their cells add up to less than 80
            assert sum(len(k.key_display) + len(k.description) + 2 for k in keys) <= 78
            if focus == "t":
                assert "Move" not in said and "Copy" not in said  # in the help and palette
    wide = tmp_path / "wide.json"  # a second copy: the first app's session may linger
    wide.write_bytes(oak_lane.read_bytes())
    app = make_app(wide)
    async with app.run_test(size=(160, 40)) as pilot:
        await app.settle()
        await pilot.pause()
        said = {k.description for k in app.main.query(FooterKey)}
        assert {"Move", "Copy", "Impact", "Pair", "What if", "Help", "Quit"} <= said


def test_keys_that_still_do_not_fit_give_way_from_the_end_but_help_and_palette_stay() -> None:
    from tui.widgets.key_bar import fitted, key_width

    keys = [
        FooterKey("escape", "esc", "Back to tree", "back"),
        FooterKey("pagedown", "pgdn", "Next device", "device(1)"),
        FooterKey("pageup", "pgup", "Prev device", "device(-1)"),
        FooterKey("ctrl+t", "^t", "Not tested", "not_tested"),
        FooterKey("ctrl+w", "^w", "Other test current", "page"),
        FooterKey("f1", "f1", "Help", "app.help"),
        FooterKey("ctrl+p", "^p", "palette", "app.command_palette", classes="-command-palette"),
    ]
    kept = fitted(list(keys), 78)
    said = [k.description for k in kept]
    assert sum(key_width(k) for k in kept) <= 78
    # the previous-device key goes first, then the last screen keys; Help and palette stay
    assert said == ["Back to tree", "Next device", "Not tested", "Help", "palette"]
    assert fitted(list(keys), 200) == keys  # nothing drops where all fit
