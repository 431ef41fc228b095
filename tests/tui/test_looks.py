"""The daylight theme: switched by a key or the command palette, remembered per user."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from model.rules.findings import SEVERITY_RANK
from tui.app.shell import make_app
from tui.themes import DARK, LIGHT, THEMES


async def test_l_switches_to_daylight_and_it_is_remembered(
    oak_lane: Path, own_settings_dir: Path
) -> None:
    app = make_app(oak_lane)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        assert app.theme == DARK
        dark_bg = app.screen.styles.background
        await pilot.press("l")
        await pilot.pause()
        assert app.theme == LIGHT
        # the screen really took the daylight colours from the theme
        assert app.screen.styles.background != dark_bg
        assert app.screen.styles.background.hex.lower() == THEMES[LIGHT].background
    saved = json.loads((own_settings_dir / "settings.json").read_text(encoding="utf-8"))
    assert saved == {"theme": LIGHT}
    again = make_app(oak_lane, read_only=True)  # the first app still holds the lock
    async with again.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        assert again.theme == LIGHT
        await pilot.press("l")
        await pilot.pause()
        assert again.theme == DARK
    assert json.loads((own_settings_dir / "settings.json").read_text())["theme"] == DARK


async def test_the_palette_offers_the_other_theme(oak_lane: Path) -> None:
    app = make_app(oak_lane)
    async with app.run_test(size=(100, 30)) as pilot:
        await pilot.pause()
        titles = [c.title for c in app.get_system_commands(app.screen)]
        assert "Daylight theme" in titles
        assert "Theme" not in titles  # Textual's own list holds themes that are not ours
        command = next(
            c for c in app.get_system_commands(app.screen) if c.title == "Daylight theme"
        )
        command.callback()
        await pilot.pause()
        assert app.theme == LIGHT
        titles = [c.title for c in app.get_system_commands(app.screen)]
        assert "Dark theme" in titles


async def test_a_corrupt_settings_file_is_ignored_with_a_note(
    oak_lane: Path, own_settings_dir: Path
) -> None:
    own_settings_dir.mkdir(parents=True)
    (own_settings_dir / "settings.json").write_text('{"theme": "tripwise-dayl', encoding="utf-8")
    app = make_app(oak_lane)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        assert app.theme == DARK
        notes = [n.message for n in app._notifications]
        assert any("not valid JSON" in m and "settings.json" in m for m in notes)
        await pilot.press("l")  # the next change replaces the bad file
        await pilot.pause()
    assert json.loads((own_settings_dir / "settings.json").read_text()) == {"theme": LIGHT}


async def test_an_unknown_theme_name_is_ignored_with_a_note(
    oak_lane: Path, own_settings_dir: Path
) -> None:
    own_settings_dir.mkdir(parents=True)
    (own_settings_dir / "settings.json").write_text('{"theme": "neon"}', encoding="utf-8")
    app = make_app(oak_lane)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        assert app.theme == DARK
        assert any("'neon'" in n.message for n in app._notifications)


async def test_no_hex_colour_in_interface_code() -> None:
    import re

    root = Path(__file__).resolve().parents[2] / "tui"
    for path in root.rglob("*"):
        if path.suffix not in (".py", ".tcss") or path.name == "themes.py":
            continue
        found = re.findall(r"#[0-9a-fA-F]{6}\b", path.read_text(encoding="utf-8"))
        assert not found, (path.name, found)


async def test_severity_filter_this_or_worse(oak_lane: Path) -> None:
    app = make_app(oak_lane)
    async with app.run_test(size=(120, 40)) as pilot:
        await app.settle()
        await pilot.pause()
        panel = app.main.findings
        findings = list(app.analysis.findings)  # type: ignore[union-attr]
        await pilot.press("f", "1", "1")  # all -> urgent -> required
        assert panel.severity_words() == "required only"
        assert {f.severity for f in panel.shown} == {"required"}
        await pilot.press("exclamation_mark")
        assert panel.severity_words() == "required or worse"
        want = [f for f in findings if SEVERITY_RANK[f.severity] <= SEVERITY_RANK["required"]]
        assert panel.shown == want
        assert "required or worse" in str(panel.query_one("#filter-severity").render())
        await pilot.press("1")  # the mode is kept while the level steps on
        assert panel.severity_words() == "advisory or worse"
        assert len(panel.shown) == len(
            [f for f in findings if f.severity in ("urgent", "required", "advisory")]
        )
        await pilot.press("exclamation_mark")
        assert panel.severity_words() == "advisory only"
        assert {f.severity for f in panel.shown} <= {"advisory"}
        await pilot.press("1", "1")  # investigate, then all
        assert panel.severity_words() == "all" and len(panel.shown) == len(findings)


async def test_the_demo_says_where_its_copy_is(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    import argparse

    from tui.cli.commands import demo
    from tui.cli.commands import open as open_cmd

    monkeypatch.setenv("XDG_DATA_HOME", str(tmp_path / "data"))
    seen: dict[str, object] = {}

    def fake_open(path: str, *, read_only: bool = False, welcome: str | None = None) -> int:
        seen.update(path=path, welcome=welcome)
        return 0

    monkeypatch.setattr(open_cmd, "open_app", fake_open)
    args = argparse.Namespace(name="oak-lane-house", list=False, check=False)
    assert demo.run(args) == 0
    copy = tmp_path / "data" / "tripwise" / "demo" / "oak-lane-house.json"
    assert seen["path"] == str(copy) and copy.is_file()
    assert str(copy) in str(seen["welcome"]) and "q quits" in str(seen["welcome"])
    # the app shows it as it opens, and keeps the file's name in the top strip
    app = make_app(copy, welcome=str(seen["welcome"]))
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        assert any(str(copy) in n.message for n in app._notifications)
        assert "oak-lane-house.json" in str(app.screen.query_one("#site-name").render())
