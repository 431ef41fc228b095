"""The merge screen: choose per conflict by key, dismiss with the resolved site."""

from __future__ import annotations

from typing import Any

from textual.app import App
from textual.widgets import Static

from model.site.models import SiteFile
from model.visits.merge import merge_sites
from tests.visits_helpers import make_site
from tui.screens.merge import MergeScreen


class Host(App[None]):
    def __init__(self) -> None:
        super().__init__()
        self.outcome: list[SiteFile | None] = []


def conflicted() -> Any:
    ours = make_site([("v1", "2025-06-01", {"rc1": {"x1_0": 22.0, "x5_0": 10.0}})])
    theirs = make_site(
        [("v1", "2025-06-01", {"rc1": {"x1_0": 23.0, "x5_0": 11.0}, "rc2": {"x1_0": 19.0}})]
    )
    return merge_sites(ours, theirs)


async def test_choose_each_conflict_then_apply() -> None:
    res = conflicted()
    assert [c.id for c in res.conflicts] == ["reading:v1/rc1/x1_0", "reading:v1/rc1/x5_0"]
    app = Host()
    async with app.run_test(size=(120, 40)) as pilot:
        await app.push_screen(MergeScreen(res), app.outcome.append)
        await pilot.pause()
        await pilot.press("a")  # nothing chosen yet: refused, screen stays
        await pilot.pause()
        assert app.outcome == []
        status = str(app.screen.query_one("#merge-status", Static).render())
        assert "Cannot apply" in status
        await pilot.press("o")  # first conflict: ours; the cursor moves on
        await pilot.press("t")  # second: theirs
        await pilot.press("a")
        await pilot.pause()
    (site,) = app.outcome
    assert site is not None
    r = site.visits[0].readings
    assert (r["rc1"].x1_0, r["rc1"].x5_0, r["rc2"].x1_0) == (22.0, 11.0, 19.0)


async def test_all_theirs_and_cancel() -> None:
    app = Host()
    async with app.run_test(size=(120, 40)) as pilot:
        await app.push_screen(MergeScreen(conflicted()), app.outcome.append)
        await pilot.pause()
        await pilot.press("T", "a")
        await pilot.pause()
        await app.push_screen(MergeScreen(conflicted()), app.outcome.append)
        await pilot.pause()
        await pilot.press("escape")
        await pilot.pause()
    first, second = app.outcome
    assert first is not None and first.visits[0].readings["rc1"].x1_0 == 23.0
    assert second is None
