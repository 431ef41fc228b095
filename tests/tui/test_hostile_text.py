"""Text from a site file that a terminal would obey is drawn as visible escapes.

The bytes checked are the ones the app would send to the terminal for the
whole screen (the compositor's full update), on the main screen and under
each dialog that shows a label.
"""

from __future__ import annotations

import json
from pathlib import Path

from sitekit import SAMPLES

from tui.app.shell import TripwiseApp, make_app
from tui.screens.confirm import ConfirmScreen
from tui.screens.node_editor import NodeEditorScreen
from tui.screens.readings import ReadingScreen
from tui.screens.site_details import SiteDetailsScreen

#: Set the window title (OSC 0), write the clipboard (OSC 52), a hyperlink
#: (OSC 8), clear the screen (CSI 2J, also as the C1 CSI), a right-to-left
#: override, an isolate and a line separator; then markup that must stay text.
HOSTILE = (
    "\x1b]0;PWNED\x07\x1b]52;c;aGk=\x07\x1b]8;;http://x.invalid\x1b\\L\x1b]8;;\x1b\\"
    "\x1b[2J\x9b2J\u202eRTL\u2066I\u2028[b]bold[/b]"
)
RAW = ("\x1b]0;", "\x1b]52;", "\x1b]8;", "\x1b[2J", "\x9b", "\u202e", "\u2066", "\u2028")
VISIBLE = "\\x1b]0;PWNED\\x07"


def hostile_site(tmp_path: Path) -> Path:
    doc = json.loads((SAMPLES / "oak-lane-house.json").read_text(encoding="utf-8"))
    for n in doc["nodes"]:
        n["label"] = n.get("label", n["id"])[:6] + HOSTILE
    doc["site"]["name"] = "Site" + HOSTILE
    path = tmp_path / "hostile.json"
    path.write_text(json.dumps(doc, ensure_ascii=False), encoding="utf-8")
    return path


def terminal_bytes(app: TripwiseApp) -> str:
    """What the app would write to the terminal to draw the whole screen now."""
    update = app.screen._compositor.render_update(full=True)
    return update.render_segments(app.console)


def assert_shown_not_obeyed(out: str) -> None:
    for raw in RAW:
        assert raw not in out, repr(raw)
    assert VISIBLE in out
    assert "[b]bold[/b]" in out  # markup in user text stays text


async def test_labels_with_escape_sequences_are_drawn_visibly(tmp_path: Path) -> None:
    app = make_app(hostile_site(tmp_path))
    async with app.run_test(size=(200, 50)) as pilot:
        await app.settle()
        assert_shown_not_obeyed(terminal_bytes(app))  # tree, details, findings table
        app.notify("Saved as x" + HOSTILE)
        await pilot.pause()
        out = terminal_bytes(app)
        assert "\x1b]0;" not in out and "\\x1b]0;" in out  # the notice

        for key, screen in (
            ("d", ConfirmScreen),
            ("e", NodeEditorScreen),
            ("r", ReadingScreen),
            ("s", SiteDetailsScreen),
        ):
            app.main.select("rc1")
            await pilot.press("t", key)
            await pilot.pause()
            if key == "r" and not isinstance(app.screen, ReadingScreen):
                await pilot.press("enter", *"A. Tester", "enter", *"MFT-1", "enter")
                await pilot.pause()
            assert isinstance(app.screen, screen), key
            out = terminal_bytes(app)
            for raw in RAW:
                assert raw not in out, (key, repr(raw))
            # the form shows the label's end in its field; the others show it all
            assert ("\\u2028[b]bold[/b]" if key == "e" else "\\x1b]0;PWNED") in out, key
            await pilot.press("escape")
            await pilot.pause()
    # the stored text keeps every character: nothing was changed by showing it
    doc = json.loads((tmp_path / "hostile.json").read_text(encoding="utf-8"))
    assert doc["nodes"][0]["label"].endswith(HOSTILE)
