"""Compare visits and merge another copy, from the app's keys."""

from __future__ import annotations

from pathlib import Path

from model.storage.sites import load_site, save_site
from tui.app.shell import make_app
from tui.screens.compare import CompareScreen
from tui.screens.merge import MergeScreen
from tui.screens.path_prompt import PathPromptScreen


async def test_h_opens_the_comparison_of_the_two_latest_visits(oak_lane: Path) -> None:
    app = make_app(oak_lane)
    async with app.run_test(size=(120, 40)) as pilot:
        await app.settle()
        await pilot.press("h")
        assert isinstance(app.screen, CompareScreen)
        await pilot.press("escape")
        assert not isinstance(app.screen, CompareScreen)


async def test_merge_a_second_laptops_copy_with_a_conflict(oak_lane: Path, tmp_path: Path) -> None:
    # the other laptop tested RCBO W2 (new reading) and re-tested RCCB 1 differently
    site = load_site(oak_lane)
    latest = site.latest_visit()
    assert latest is not None
    readings = dict(latest.readings)
    readings["rb2"] = readings["rb1"].model_copy(update={"x1_0": 26.0})
    readings["rc1"] = readings["rc1"].model_copy(update={"x1_0": 30.0})
    other_visit = latest.model_copy(update={"readings": readings})
    other = site.model_copy(update={"visits": [site.visits[0], other_visit]})
    other_path = tmp_path / "second laptop.json"
    save_site(other, other_path)
    other_bytes = other_path.read_bytes()

    app = make_app(oak_lane)
    async with app.run_test(size=(120, 40)) as pilot:
        await app.settle()
        await pilot.press("o")
        prompt = app.screen
        assert isinstance(prompt, PathPromptScreen)
        await pilot.press("ctrl+u")
        for ch in str(other_path):
            await pilot.press(ch if ch != " " else "space")
        await pilot.press("enter")
        await pilot.pause()
        assert isinstance(app.screen, MergeScreen)
        await pilot.press("t")  # take theirs for the one conflict (rc1 x1_0)
        await pilot.press("a")
        await pilot.pause()
        assert app.save_now()
    merged = load_site(oak_lane).latest_visit()
    assert merged is not None
    assert merged.readings["rb2"].x1_0 == 26.0  # added from the other copy
    assert merged.readings["rc1"].x1_0 == 30.0  # conflict settled as theirs
    assert other_path.read_bytes() == other_bytes  # the other copy is only read
