"""Every key in README's key table, pressed where it applies, does what the table says.

The keys are read from README itself: a key documented there with no check here,
or checked here but no longer documented, fails the test.
"""

from __future__ import annotations

import re
from collections.abc import Awaitable, Callable
from pathlib import Path
from typing import Any

from textual.command import CommandPalette

from model.storage.sites import load_site
from tui.app.shell import TripwiseApp, make_app
from tui.screens.choice import ChoiceScreen
from tui.screens.compare import CompareScreen
from tui.screens.confirm import ConfirmScreen
from tui.screens.export import ExportScreen
from tui.screens.help import HelpScreen
from tui.screens.impact import ImpactScreen
from tui.screens.main import MainScreen
from tui.screens.node_editor import NodeEditorScreen
from tui.screens.pair import PairScreen
from tui.screens.path_prompt import PathPromptScreen
from tui.screens.readings import ReadingScreen
from tui.screens.site_details import SiteDetailsScreen
from tui.screens.visits import VisitsScreen
from tui.screens.what_if import WhatIfScreen
from tui.screens.what_if_form import ScratchNodeForm
from tui.widgets.findings_panel import FindingsTable

README = Path(__file__).resolve().parents[2] / "README.md"
Check = Callable[[TripwiseApp, Any], Awaitable[None]]
#: README's key names as the keys pressed.
PRESS = {
    "F1": "f1",
    "?": "question_mark",
    "esc": "escape",
    "pgdn": "pagedown",
    "!": "exclamation_mark",
}
PRESS |= {"pgup": "pageup", "↑": "up", "↓": "down"}


def documented_keys() -> set[tuple[str, str]]:
    """(where, key) for every key in README's key table ('digits' and 'a letter' too)."""
    text = README.read_text(encoding="utf-8")
    table = text[text.index("| where | keys | what |") :].split("\n\n", 1)[0]
    out: set[tuple[str, str]] = set()
    for line in table.splitlines()[2:]:
        cells = [c.strip() for c in line.strip("|").split("|")]
        where, keys = cells[0], cells[1]
        out.update((where, k) for k in re.findall(r"`([^`]+)`", keys))
        out.update((where, w) for w in ("digits", "a letter") if w in keys.replace("`", " "))
    return out


async def _opens(app: TripwiseApp, pilot: Any, key: str, screen: type, node: str = "rc1") -> None:
    app.main.select(node)
    app.main.focus_tree()
    await pilot.press(key)
    await pilot.pause()
    assert isinstance(app.screen, screen), (key, app.screen)
    await pilot.press("escape")
    await pilot.pause()
    assert isinstance(app.screen, MainScreen)


def opens(screen: type, node: str = "rc1") -> Callable[[str], Check]:
    def make(key: str) -> Check:
        async def check(app: TripwiseApp, pilot: Any) -> None:
            await _opens(app, pilot, key, screen, node)

        return check

    return make


async def _copy_then(app: TripwiseApp, pilot: Any, key: str) -> None:
    """An edit (a copy), then ``key`` undoes it."""
    n = len(app.site.nodes)
    app.main.select("c-s1")
    app.main.focus_tree()
    await pilot.press("c")
    assert len(app.site.nodes) == n + 1
    await pilot.press(key)
    assert len(app.site.nodes) == n


async def _save(app: TripwiseApp, pilot: Any, key: str) -> None:
    app.main.select("c-s1")
    app.main.focus_tree()
    before = {n.id for n in app.site.nodes}
    await pilot.press("c")
    (copied,) = {n.id for n in app.site.nodes} - before
    await pilot.press(key)
    assert app.save_state == "saved"
    assert copied in {n.id for n in load_site(app.site_path).nodes}  # on disk now
    await pilot.press("u", "ctrl+s")


async def _focus_tree(app: TripwiseApp, pilot: Any, key: str) -> None:
    app.main.focus_findings()
    await pilot.press(key)
    assert app.focused is app.main.tree


async def _focus_findings(app: TripwiseApp, pilot: Any, key: str) -> None:
    app.main.focus_tree()
    await pilot.press(key)
    assert isinstance(app.focused, FindingsTable)


async def _delete_asks(app: TripwiseApp, pilot: Any, key: str) -> None:
    await _opens(app, pilot, key, ConfirmScreen, "c-s1")
    assert "c-s1" in app.index.by_id  # declined: nothing deleted


async def _copy(app: TripwiseApp, pilot: Any, key: str) -> None:
    await _copy_then(app, pilot, "u")  # the copy itself is key "c"


async def _jump(app: TripwiseApp, pilot: Any, key: str) -> None:
    app.main.select("supply")
    app.main.focus_findings()
    await pilot.press(key)
    first = app.main.findings.shown[0]
    assert app.main.tree.selected_id() == first.nodes[0]
    assert app.focused is app.main.tree


def _filter(which: str) -> Check:
    async def check(app: TripwiseApp, pilot: Any) -> None:
        panel = app.main.findings
        before = (panel.severity, panel.board)
        app.main.focus_findings()
        await pilot.press("1" if which == "severity" else "2")
        assert (panel.severity, panel.board) != before
        panel.severity, panel.board = before
        app.main.focus_tree()

    return check


async def _or_worse(app: TripwiseApp, pilot: Any, key: str) -> None:
    panel = app.main.findings
    before = panel.or_worse
    app.main.focus_findings()
    await pilot.press(key)
    assert panel.or_worse is (not before)
    await pilot.press(key)
    app.main.focus_tree()


async def _theme(app: TripwiseApp, pilot: Any, key: str) -> None:
    # the settings file goes to the test's own folder (tests/tui/conftest.py)
    before = app.theme
    app.main.focus_tree()
    await pilot.press(key)
    assert app.theme != before
    await pilot.press(key)
    assert app.theme == before


async def _form_next(app: TripwiseApp, pilot: Any, key: str) -> None:
    app.main.select("rc1")
    app.main.focus_tree()
    await pilot.press("e")
    form = app.screen
    assert isinstance(form, NodeEditorScreen)
    assert form.focused is form.query_one("#f-label")
    await pilot.press(key)
    names = [spec.name for spec in form.specs]
    after = names[names.index("label") + 1]
    assert form.focused is form.query_one(f"#f-{after}")  # the field after the label
    await pilot.press("escape")


async def _form_apply(app: TripwiseApp, pilot: Any, key: str) -> None:
    app.main.select("c-s1")
    app.main.focus_tree()
    await pilot.press("e", "end", *" (tested)", key)
    assert isinstance(app.screen, MainScreen)
    assert app.site.node("c-s1").label.endswith(" (tested)")
    await pilot.press("u")


async def _form_cancel(app: TripwiseApp, pilot: Any, key: str) -> None:
    app.main.select("c-s1")
    app.main.focus_tree()
    label = app.site.node("c-s1").label
    await pilot.press("e", *"xyz", key)
    assert isinstance(app.screen, MainScreen)
    assert app.site.node("c-s1").label == label


async def _form_letter(app: TripwiseApp, pilot: Any, key: str) -> None:
    app.main.select("c-s1")
    app.main.focus_tree()
    await pilot.press("e")
    form = app.screen
    form.query_one("#f-use").focus()
    await pilot.press("l")  # lighting
    assert form.query_one("#f-use").value == "lighting"
    await pilot.press("escape")


async def _form_space(app: TripwiseApp, pilot: Any, key: str) -> None:
    app.main.select("c-s1")
    app.main.focus_tree()
    await pilot.press("e")
    form = app.screen
    box = form.query_one("#f-concealed_shallow")
    box.focus()
    before = box.value
    await pilot.press(key)
    assert box.value is (not before)
    await pilot.press("escape")


async def _readings(app: TripwiseApp, pilot: Any) -> ReadingScreen:
    app.main.select("rc1")
    app.main.focus_tree()
    await pilot.press("r")
    screen = app.screen
    assert isinstance(screen, ReadingScreen)
    return screen


def _reading(keys: tuple[str, ...], field: str, expect: Any) -> Check:
    async def check(app: TripwiseApp, pilot: Any) -> None:
        screen = await _readings(app, pilot)
        screen.pad.go(field)
        await pilot.press(*keys)
        await pilot.pause()
        visit = app.site.latest_visit()
        assert visit is not None
        assert getattr(visit.readings["rc1"], field) == expect
        await pilot.press("escape")
        await pilot.press("u")  # the whole device's change is one undo step

    return check


async def _not_tested(app: TripwiseApp, pilot: Any, key: str) -> None:
    screen = await _readings(app, pilot)
    await pilot.press(key)
    assert screen.pad.current == "not_tested"
    await pilot.press("escape")


def _device(step: int) -> Callable[[str], Check]:
    def make(key: str) -> Check:
        async def check(app: TripwiseApp, pilot: Any) -> None:
            screen = await _readings(app, pilot)
            order = list(app.index.rcds())
            await pilot.press(key)
            assert screen.device_id == order[(order.index("rc1") + step) % len(order)]
            await pilot.press("escape")

        return check

    return make


def _field(step: int) -> Callable[[str], Check]:
    def make(key: str) -> Check:
        async def check(app: TripwiseApp, pilot: Any) -> None:
            screen = await _readings(app, pilot)
            screen.pad.go("x1_0")
            await pilot.press(key)
            assert screen.pad.current == ("x1_180" if step > 0 else "half_180")
            await pilot.press("escape")

        return check

    return make


async def _other_waveform(app: TripwiseApp, pilot: Any, key: str) -> None:
    screen = await _readings(app, pilot)
    assert screen.page == "AC"
    await pilot.press(key)
    assert screen.page == "half-wave"
    await pilot.press("escape")


def _test_current(expect: str) -> Callable[[str], Check]:
    def make(key: str) -> Check:
        async def check(app: TripwiseApp, pilot: Any) -> None:
            screen = await _readings(app, pilot)
            await pilot.press("ctrl+w")  # half-wave: the test current is asked
            screen.pad.go("test_current")
            await pilot.press(key)
            assert screen.pad.values["test_current"] == expect
            await pilot.press("escape")

        return check

    return make


async def _back(app: TripwiseApp, pilot: Any, key: str) -> None:
    await _readings(app, pilot)
    await pilot.press(key)
    assert isinstance(app.screen, MainScreen)


async def _what_if(app: TripwiseApp, pilot: Any, *, own: bool = True) -> WhatIfScreen:
    """The what-if view on rc2, with a change of your own (Type A) tried."""
    app.main.select("rc2")
    app.main.focus_tree()
    await pilot.press("w")
    await app.workers.wait_for_complete()
    await pilot.pause()
    screen = app.screen
    assert isinstance(screen, WhatIfScreen)
    if own:
        await pilot.press("e")
        form = app.screen
        assert isinstance(form, ScratchNodeForm)
        form.query_one("#f-waveform").focus()
        await pilot.press("a", "ctrl+s")
        await app.workers.wait_for_complete()
        await pilot.pause()
        assert screen.trial is not None
    return screen


async def _what_if_finding(app: TripwiseApp, pilot: Any, key: str) -> None:
    app.main.focus_findings()
    first = app.main.findings.shown[0]
    await pilot.press(key)
    await pilot.pause()
    screen = app.screen
    assert isinstance(screen, WhatIfScreen)
    assert screen.finding == first
    await pilot.press("escape")


async def _what_if_try(app: TripwiseApp, pilot: Any, key: str) -> None:
    screen = await _what_if(app, pilot)
    screen.trial = None
    screen.query_one("#wi-choices").focus()
    await pilot.press(key)
    await app.workers.wait_for_complete()
    await pilot.pause()
    assert screen.trial is not None  # tried again
    await pilot.press("escape")


async def _what_if_own(app: TripwiseApp, pilot: Any, key: str) -> None:
    await _what_if(app, pilot, own=False)
    await pilot.press(key)
    assert isinstance(app.screen, ScratchNodeForm)
    await pilot.press("escape", "escape")


async def _what_if_accept(app: TripwiseApp, pilot: Any, key: str) -> None:
    await _what_if(app, pilot)
    await pilot.press(key)
    await pilot.pause()
    assert isinstance(app.screen, MainScreen)
    assert app.site.node("rc2").waveform == "A"
    await pilot.press("u")
    assert app.site.node("rc2").waveform == "AC"


async def _what_if_drop(app: TripwiseApp, pilot: Any, key: str) -> None:
    await _what_if(app, pilot)
    await pilot.press(key)
    await pilot.pause()
    assert isinstance(app.screen, MainScreen)
    assert app.site.node("rc2").waveform == "AC"


def _const(check: Check) -> Callable[[str], Check]:
    return lambda _key: check


CHECKS: dict[tuple[str, str], Callable[[str], Check]] = {
    ("anywhere", "F1"): opens(HelpScreen),
    ("anywhere", "?"): opens(HelpScreen),
    ("anywhere", "ctrl+p"): opens(CommandPalette),
    ("anywhere", "ctrl+s"): lambda k: lambda a, p: _save(a, p, k),
    ("anywhere", "ctrl+z"): lambda k: lambda a, p: _copy_then(a, p, k),
    ("anywhere", "u"): lambda k: lambda a, p: _copy_then(a, p, k),
    ("anywhere", "t"): lambda k: lambda a, p: _focus_tree(a, p, k),
    ("anywhere", "f"): lambda k: lambda a, p: _focus_findings(a, p, k),
    ("anywhere", "s"): opens(SiteDetailsScreen),
    ("anywhere", "v"): opens(VisitsScreen),
    ("anywhere", "x"): opens(ExportScreen),
    ("anywhere", "h"): opens(CompareScreen),
    ("anywhere", "o"): opens(PathPromptScreen),
    ("anywhere", "q"): lambda k: lambda a, p: _noop(),  # checked last, in its own app
    ("tree", "a"): opens(ChoiceScreen, "cu"),
    ("tree", "e"): opens(NodeEditorScreen),
    ("tree", "enter"): opens(NodeEditorScreen),
    ("tree", "m"): opens(ChoiceScreen, "c-s1"),
    ("tree", "c"): lambda k: lambda a, p: _copy(a, p, k),
    ("tree", "d"): lambda k: lambda a, p: _delete_asks(a, p, k),
    ("tree", "delete"): lambda k: lambda a, p: _delete_asks(a, p, k),
    ("tree", "r"): opens(ReadingScreen),
    ("tree", "i"): opens(ImpactScreen),
    ("tree", "p"): opens(PairScreen, "rb1"),
    ("tree", "w"): opens(WhatIfScreen, "rc2"),
    ("findings", "w"): lambda k: lambda a, p: _what_if_finding(a, p, k),
    ("what if", "enter"): lambda k: lambda a, p: _what_if_try(a, p, k),
    ("what if", "e"): lambda k: lambda a, p: _what_if_own(a, p, k),
    ("what if", "a"): lambda k: lambda a, p: _what_if_accept(a, p, k),
    ("what if", "d"): lambda k: lambda a, p: _what_if_drop(a, p, k),
    ("what if", "esc"): lambda k: lambda a, p: _what_if_drop(a, p, k),
    ("findings", "enter"): lambda k: lambda a, p: _jump(a, p, k),
    ("findings", "1"): _const(_filter("severity")),
    ("findings", "2"): _const(_filter("board")),
    ("findings", "!"): lambda k: lambda a, p: _or_worse(a, p, k),
    ("anywhere", "l"): lambda k: lambda a, p: _theme(a, p, k),
    ("form", "enter"): lambda k: lambda a, p: _form_next(a, p, k),
    ("form", "ctrl+s"): lambda k: lambda a, p: _form_apply(a, p, k),
    ("form", "esc"): lambda k: lambda a, p: _form_cancel(a, p, k),
    ("form", "a letter"): lambda k: lambda a, p: _form_letter(a, p, k),
    ("form", "space"): lambda k: lambda a, p: _form_space(a, p, k),
    ("readings", "digits"): _const(_reading(("2", "5", "enter"), "x1_0", 25.0)),
    ("readings", "enter"): _const(_reading(("3", "1", "enter"), "x1_180", 31.0)),
    ("readings", "n"): _const(_reading(("n",), "x1_180", "did not trip")),
    ("readings", "w"): _const(_reading(("w",), "button", "worked")),
    ("readings", "f"): _const(_reading(("f",), "button", "failed")),
    ("readings", "a"): _const(_reading(("a",), "waveform", "AC")),
    ("readings", "h"): _const(_reading(("h",), "waveform", "half-wave")),
    ("readings", "d"): _const(_reading(("d",), "waveform", "smooth-dc")),
    ("readings", "ctrl+t"): lambda k: lambda a, p: _not_tested(a, p, k),
    ("readings", "ctrl+w"): lambda k: lambda a, p: _other_waveform(a, p, k),
    ("readings", "r"): _test_current("rated"),
    ("readings", "s"): _test_current("scaled"),
    ("readings", "pgdn"): _device(1),
    ("readings", "ctrl+n"): _device(1),
    ("readings", "pgup"): _device(-1),
    ("readings", "ctrl+b"): _device(-1),
    ("readings", "↑"): _field(-1),
    ("readings", "↓"): _field(1),
    ("readings", "esc"): lambda k: lambda a, p: _back(a, p, k),
}


async def _noop() -> None:
    return None


def test_every_documented_key_has_a_check() -> None:
    documented = documented_keys()
    assert documented == set(CHECKS), (
        f"documented, no check: {sorted(documented - set(CHECKS))}; "
        f"checked, not documented: {sorted(set(CHECKS) - documented)}"
    )


async def test_each_documented_key_does_what_the_table_says(oak_lane: Path) -> None:
    app = make_app(oak_lane)
    async with app.run_test(size=(120, 40)) as pilot:
        await app.settle()
        await pilot.pause()
        for (where, key), make in CHECKS.items():
            try:
                await make(PRESS.get(key, key))(app, pilot)
            except AssertionError as exc:
                raise AssertionError(f"{where} {key}: {exc}") from exc
            while not isinstance(app.screen, MainScreen):  # back to the tree for the next
                await pilot.press("escape")
            await pilot.pause()
        await pilot.press("q")
        await pilot.pause()
    assert app.return_code == 0  # q saved and quit
