"""SiteDetailsScreen: strict numbers refused at the field, a valid edit returns SiteInfo.

U0 limits (50 to 1000 V) are the SiteInfo model's; 230 V is the common
nominal line-to-earth voltage of European low-voltage supplies (IEC 60038).
"""

from __future__ import annotations

import pytest
from hosting import Host
from textual.pilot import Pilot
from textual.screen import Screen
from textual.widgets import Input, Static

from model.site.models import SiteFile, SiteInfo
from tui.screens.site_details import SiteDetailsScreen


async def retype(pilot: Pilot[None], screen: Screen[object], field: str, text: str) -> None:
    """Clear a field and type new text into it, key by key."""
    inp = screen.query_one(f"#f-{field}", Input)
    inp.focus()
    inp.value = ""
    if text:
        await pilot.press(*text)
    await pilot.pause()


def error_at(screen: Screen[object], field: str) -> str:
    return str(screen.query_one(f"#err-{field}", Static).content)


@pytest.mark.parametrize(
    ("typed", "expected"),
    [("abc", "'abc' is not a number"), ("0.23", "at least 50 V"), ("", "U0 is needed")],
)
async def test_bad_u0_is_refused_at_the_field(site: SiteFile, typed: str, expected: str) -> None:
    app = Host(SiteDetailsScreen(site))
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.pause()
        screen = app.screen
        await retype(pilot, screen, "u0_v", typed)
        await pilot.press("ctrl+s")
        await pilot.pause()
        assert app.screen is screen  # not dismissed
        assert app.results == []
        assert expected in error_at(screen, "u0_v")
        assert screen.query_one("#f-u0_v", Input).has_class("-invalid")
        assert screen.focused is screen.query_one("#f-u0_v", Input)
        # a fix clears the message and saves
        await retype(pilot, screen, "u0_v", "230")
        await pilot.press("ctrl+s")
        await pilot.pause()
        assert len(app.results) == 1
        assert isinstance(app.results[0], SiteInfo)


async def test_valid_edit_dismisses_with_new_site_info(site: SiteFile) -> None:
    app = Host(SiteDetailsScreen(site))
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.pause()
        screen = app.screen
        assert not screen.query_one("#row-ra_ohm").display  # TN-C-S: RA not shown
        await retype(pilot, screen, "name", "Oak Lane House")
        await retype(pilot, screen, "u0_v", "240")
        screen.query_one("#f-earthing").focus()
        # t steps through the choices with that letter: TN-C-S -> TT, then TN-S, ...
        await pilot.press("t")
        assert screen.query_one("#f-earthing").value == "TT"
        await pilot.pause()
        assert screen.query_one("#row-ra_ohm").display  # TT: RA shown
        assert not screen.query_one("#row-ze_ohm").display
        await retype(pilot, screen, "ra_ohm", "21.5")
        await retype(pilot, screen, "growth_pct", "25")
        await pilot.press("ctrl+s")
        await pilot.pause()
    expected = site.site.model_copy(
        update={
            "name": "Oak Lane House",
            "u0_v": 240.0,
            "earthing": "TT",
            "ra_ohm": 21.5,
            "trend": site.site.trend.model_copy(update={"growth_pct": 25.0}),
        }
    )
    assert app.results == [expected]
    assert app.results[0].ze_ohm == 0.28  # hidden field kept, not lost


async def test_empty_name_and_negative_ze_are_refused(site: SiteFile) -> None:
    app = Host(SiteDetailsScreen(site))
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = app.screen
        await retype(pilot, screen, "ze_ohm", "-1")
        await pilot.press("ctrl+s")
        await pilot.pause()
        assert "Ze must be more than 0 Ω" in error_at(screen, "ze_ohm")
        await retype(pilot, screen, "ze_ohm", "0.3")
        await retype(pilot, screen, "name", "")
        await pilot.press("ctrl+s")
        await pilot.pause()
        assert "Name must not be empty" in error_at(screen, "name")
        assert error_at(screen, "ze_ohm") == ""
        assert app.results == []


async def test_cancel_returns_none(site: SiteFile) -> None:
    app = Host(SiteDetailsScreen(site))
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.pause()
        await pilot.press("escape")
        await pilot.pause()
        assert app.results == [None]


async def test_enter_moves_down_the_fields_and_a_letter_picks(site: SiteFile) -> None:
    """Name, Enter, address, Enter, client: each lands in its own field."""
    from tui.widgets.choice_row import ChoiceRow
    from tui.widgets.tick_box import TickBox

    app = Host(SiteDetailsScreen(site))
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        screen = app.screen
        for key in ("name", "address", "client"):
            screen.query_one(f"#f-{key}", Input).value = ""
        screen.query_one("#f-name").focus()
        await pilot.press(*"Mill House", "enter", *"2 Mill Lane", "enter", *"R. Ames", "enter")
        values = [screen.query_one(f"#f-{k}", Input).value for k in ("name", "address", "client")]
        assert values == ["Mill House", "2 Mill Lane", "R. Ames"]
        # after the client comes the earthing: a letter picks, no list opens
        earthing = screen.query_one("#f-earthing", ChoiceRow)
        assert screen.focused is earthing
        await pilot.press("i")
        assert earthing.value == "IT"
        await pilot.press("enter")
        assert screen.focused is not earthing  # Enter moved on
        # the dwelling box: a tick when on, a blank when off (not colour alone)
        box = screen.query_one("#f-domestic", TickBox)
        shown_on = str(box.render())
        box.value = not box.value
        shown_off = str(box.render())
        on, off = (shown_on, shown_off) if not box.value else (shown_off, shown_on)
        assert "✓" in on and "✓" not in off and "X" not in off
        await pilot.press("ctrl+s")
        await pilot.pause()
    info = app.results[0]
    assert (info.name, info.address, info.client, info.earthing) == (
        "Mill House",
        "2 Mill Lane",
        "R. Ames",
        "IT",
    )
