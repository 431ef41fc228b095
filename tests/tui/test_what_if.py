"""The "what if" view, driven by keys on a copy of the bundled Oak Lane sample.

Oak Lane (invented demo): rc2 is a 30 mA Type AC RCCB over lighting and socket
circuits (BS 7671 531.3.3 allows Type AC only for fixed equipment with no DC
component, so `type.ac-unsuitable` fires on it); rc1 is a 30 mA Type A RCCB
over the upstairs lights, sockets and shower, whose 30 mA additional protection
BS 7671 411.3.3, 411.3.4 and 701.411.3.3 require.
"""

from __future__ import annotations

from pathlib import Path
from typing import Any

import pytest
from textual.widgets import Input, Static

from model.plan.changes import PLAN_CAUTION
from model.site import ops
from model.storage.journal import journal_path, read_journal
from model.storage.sites import load_site
from tui.app.shell import TripwiseApp, make_app
from tui.format import caution_for_width
from tui.screens.confirm import ConfirmScreen
from tui.screens.main import MainScreen
from tui.screens.what_if import WhatIfScreen
from tui.screens.what_if_form import ScratchNodeForm

AC_RULE = ("type.ac-unsuitable", ("rc2", "c-l2", "c-s2", "c-s3"))


@pytest.fixture(autouse=True)
def no_autosave(monkeypatch: pytest.MonkeyPatch) -> None:
    """Edits stay in the journal during a test (saved only when asked), so it can be read."""
    monkeypatch.setattr("tui.app.autosave.SAVE_DELAY_S", 3600.0)


async def settled(app: TripwiseApp, pilot: Any) -> None:
    await app.workers.wait_for_complete()
    await pilot.pause()
    await app.workers.wait_for_complete()
    await pilot.pause()


async def open_on_device(app: TripwiseApp, pilot: Any, node: str) -> WhatIfScreen:
    await app.settle()
    await pilot.pause()
    app.main.select(node)
    app.main.focus_tree()
    await pilot.press("w")
    await settled(app, pilot)
    screen = app.screen
    assert isinstance(screen, WhatIfScreen)
    return screen


async def own_change(app: TripwiseApp, pilot: Any, field: str, keys: list[str]) -> None:
    """e, then a field of the scratch form given ``keys``, then Ctrl+S."""
    await pilot.press("e")
    await pilot.pause()
    form = app.screen
    assert isinstance(form, ScratchNodeForm)
    form.query_one(f"#f-{field}").focus()
    await pilot.press(*keys)
    await pilot.press("ctrl+s")
    await settled(app, pilot)


def rows(rows_: list[tuple[str, Any]]) -> dict[tuple[str, tuple[str, ...]], str]:
    return {(f.rule, f.nodes): status for status, f in rows_}


def journal_ops(site_path: Path) -> list[ops.Op]:
    contents = read_journal(journal_path(site_path))
    return [] if contents is None else list(contents.ops)


async def test_from_a_device_own_change_clears_type_ac_then_accept_and_one_undo(
    oak_lane: Path,
) -> None:
    original = load_site(oak_lane)
    app = make_app(oak_lane)
    async with app.run_test(size=(120, 40)) as pilot:
        screen = await open_on_device(app, pilot, "rc2")
        assert screen.device == "rc2" and screen.finding is None
        await own_change(app, pilot, "waveform", ["a"])  # a: Type A
        assert app.screen is screen
        trial = screen.trial
        assert trial is not None
        assert screen.choices[-1].source == "own"
        before, after = rows(screen.before_rows), rows(screen.after_rows)
        # BS 7671 531.3.3: a Type A device over these circuits meets the rule
        assert before[AC_RULE] == "cleared"
        assert AC_RULE not in after
        assert "NEW" not in after.values()
        # the new device needs its own test after installation (BS 7671 643.7.1)
        assert after[("reading.missing", ("rc2",))] == "test"
        # the Patio socket still has no 30 mA protection (BS 7671 411.3.3): kept
        assert before[("coverage.additional-protection", ("c-out",))] == "kept"
        assert after[("coverage.additional-protection", ("c-out",))] == "kept"
        counts = str(screen.query_one("#wi-counts", Static).content)
        assert "required 4→2" in counts
        # nothing is changed in the site until Accept
        assert app.site.node("rc2").waveform == "AC"
        assert journal_ops(oak_lane) == []

        await pilot.press("a")
        await settled(app, pilot)
        assert isinstance(app.screen, MainScreen)
        assert app.site.node("rc2").waveform == "A"
        # the readings taken of the replaced device are not the new device's
        assert all("rc2" not in v.readings for v in app.site.visits)
        journaled = journal_ops(oak_lane)
        assert any(isinstance(op, ops.UpsertNode) and op.node.id == "rc2" for op in journaled)
        assert sum(isinstance(op, ops.SetReading) for op in journaled) == 2
        assert len(app.undo_stack) == 1  # one step for the whole change

        await pilot.press("u")
        await pilot.pause()
        assert app.site.model_dump() == original.model_dump()  # exactly as it was
        assert len(app.undo_stack) == 0


async def test_from_a_finding_opens_on_that_finding_and_its_device(oak_lane: Path) -> None:
    app = make_app(oak_lane)
    async with app.run_test(size=(120, 40)) as pilot:
        await app.settle()
        await pilot.pause()
        panel = app.main.findings
        row = next(i for i, f in enumerate(panel.shown) if (f.rule, f.nodes) == AC_RULE)
        app.main.focus_findings()
        for _ in range(row):
            await pilot.press("down")
        await pilot.press("w")
        await settled(app, pilot)
        screen = app.screen
        assert isinstance(screen, WhatIfScreen)
        assert screen.finding is not None
        assert (screen.finding.rule, screen.finding.nodes) == AC_RULE
        assert screen.device == "rc2"  # the first device the finding names
        title = str(screen.query_one("#wi-title", Static).content)
        assert "type.ac-unsuitable" in title
        # before anything is tried, the before side lists every finding of the site
        assert len(screen.before_rows) == len(app.analysis.findings)  # type: ignore[union-attr]
        assert screen.after_rows == []
        counts = str(screen.query_one("#wi-counts", Static).content)
        assert "required 4" in counts and "finding the changes" not in counts
        # first the plan's change for this finding: rc2 from Type AC to Type A
        # (BS 7671 531.3.3), then the options of rc2, those that clear it first
        plan = screen.choices[0]
        assert plan.source == "plan" and plan.clears_target
        (change,) = plan.changes
        assert change.node == "rc2"
        assert {(fc.field, fc.before, fc.after) for fc in change.fields} == {
            ("waveform", "AC", "A")
        }
        assert all(c.source == "option" for c in screen.choices[1:])
        assert all(c.changes[0].node == "rc2" for c in screen.choices[1:])
        targets = [c.clears_target for c in screen.choices[1:]]
        assert targets == sorted(targets, reverse=True)
        await pilot.press("enter")  # try the plan's change
        await settled(app, pilot)
        assert screen.tried is plan and screen.trial is not None
        assert rows(screen.before_rows)[AC_RULE] == "cleared"
        assert "NEW" not in rows(screen.after_rows).values()
        await pilot.press("escape")
        await pilot.pause()
        assert isinstance(app.screen, MainScreen)
        assert app.site.node("rc2").waveform == "AC"  # Escape: nothing changed


@pytest.mark.parametrize("key", ["d", "escape"])
async def test_drop_and_escape_leave_the_site_unchanged(oak_lane: Path, key: str) -> None:
    on_disk = oak_lane.read_bytes()
    app = make_app(oak_lane)
    async with app.run_test(size=(120, 40)) as pilot:
        screen = await open_on_device(app, pilot, "rc2")
        await own_change(app, pilot, "waveform", ["a"])
        assert screen.trial is not None
        await pilot.press(key)
        await pilot.pause()
        assert isinstance(app.screen, MainScreen)
        assert app.site.node("rc2").waveform == "AC"
        assert len(app.undo_stack) == 0
        assert journal_ops(oak_lane) == []
    assert oak_lane.read_bytes() == on_disk


async def test_a_bad_value_is_refused_with_the_reason_and_nothing_changes(
    oak_lane: Path,
) -> None:
    app = make_app(oak_lane)
    async with app.run_test(size=(120, 40)) as pilot:
        screen = await open_on_device(app, pilot, "rc2")
        await pilot.press("e")
        await pilot.pause()
        form = app.screen
        assert isinstance(form, ScratchNodeForm)
        field = form.query_one("#f-idn_ma", Input)
        field.focus()
        await pilot.press("end", "ctrl+u", *"0.03")
        # the model refuses a rating given in amps (the format's own check, as the node form)
        assert "looks like amps" in form.errors["idn_ma"]
        await pilot.press("ctrl+s")
        await pilot.pause()
        assert app.screen is form  # refused: the form stays, with the reason at the field
        assert field.value == "0.03"  # kept exactly as typed
        await pilot.press("escape")
        await pilot.pause()
        assert app.screen is screen
        assert [c for c in screen.choices if c.source == "own"] == []
        assert screen.trial is None
        assert app.site.node("rc2").idn_ma == 30.0
        assert journal_ops(oak_lane) == []


async def test_a_label_alone_is_not_a_device_change(oak_lane: Path) -> None:
    app = make_app(oak_lane)
    async with app.run_test(size=(120, 40)) as pilot:
        await open_on_device(app, pilot, "rc2")
        await pilot.press("e")
        await pilot.pause()
        form = app.screen
        assert isinstance(form, ScratchNodeForm)
        await pilot.press("end", *" x", "ctrl+s")  # the form starts on the label
        await pilot.pause()
        assert app.screen is form
        said = str(form.query_one("#form-error", Static).content)
        assert "label" in said and "does not change the device" in said
        await pilot.press("escape")


async def test_the_apply_button_of_the_scratch_form_never_reaches_the_site(
    oak_lane: Path,
) -> None:
    app = make_app(oak_lane)
    async with app.run_test(size=(120, 40)) as pilot:
        screen = await open_on_device(app, pilot, "rc2")
        await pilot.press("e")
        await pilot.pause()
        form = app.screen
        assert isinstance(form, ScratchNodeForm)
        form.query_one("#f-waveform").focus()
        await pilot.press("a")
        await pilot.click("#apply")
        await settled(app, pilot)
        assert app.screen is screen
        assert screen.trial is not None and screen.choices[-1].source == "own"
        assert app.site.node("rc2").waveform == "AC"
        assert journal_ops(oak_lane) == []


async def test_accepting_a_change_that_creates_findings_asks_first(oak_lane: Path) -> None:
    app = make_app(oak_lane)
    async with app.run_test(size=(120, 40)) as pilot:
        screen = await open_on_device(app, pilot, "rc1")
        await own_change(app, pilot, "idn_ma", ["end", "ctrl+u", "1", "0", "0"])
        trial = screen.trial
        assert trial is not None and trial.creates
        after = rows(screen.after_rows)
        # 100 mA takes away the additional protection BS 7671 411.3.3 requires for the
        # upstairs sockets: a new finding, listed first and marked NEW
        assert after[("coverage.additional-protection", ("c-s1", "rc1"))] == "NEW"
        assert screen.after_rows[0][0] == "NEW"
        warning = screen.query_one("#wi-new", Static)
        assert warning.display and "NEW FINDING" in str(warning.content)

        await pilot.press("a")
        await pilot.pause()
        assert isinstance(app.screen, ConfirmScreen)
        await pilot.press("n")
        await pilot.pause()
        assert app.screen is screen
        assert app.site.node("rc1").idn_ma == 30.0  # declined: nothing changed

        await pilot.press("a")
        await pilot.pause()
        await pilot.press("y")
        await settled(app, pilot)
        assert isinstance(app.screen, MainScreen)
        assert app.site.node("rc1").idn_ma == 100.0
        await pilot.press("u")
        await pilot.pause()
        assert app.site.node("rc1").idn_ma == 30.0


async def test_read_only_site_can_try_but_not_accept(oak_lane: Path) -> None:
    app = make_app(oak_lane, read_only=True)
    async with app.run_test(size=(120, 40)) as pilot:
        screen = await open_on_device(app, pilot, "rc2")
        await own_change(app, pilot, "waveform", ["a"])
        assert screen.trial is not None
        await pilot.press("a")
        await pilot.pause()
        assert app.screen is screen
        assert "read-only" in str(screen.query_one("#wi-counts", Static).content)
        assert app.site.node("rc2").waveform == "AC"


async def test_a_node_that_is_not_a_device_says_so(oak_lane: Path) -> None:
    app = make_app(oak_lane)
    async with app.run_test(size=(120, 40)) as pilot:
        await app.settle()
        app.main.select("c-s1")  # a circuit: no device to change
        app.main.focus_tree()
        await pilot.press("w")
        await pilot.pause()
        assert isinstance(app.screen, MainScreen)


@pytest.mark.parametrize("size", [(80, 24), (160, 45)])
async def test_fits_with_both_cautions_in_view(oak_lane: Path, size: tuple[int, int]) -> None:
    app = make_app(oak_lane)
    async with app.run_test(size=size) as pilot:
        screen = await open_on_device(app, pilot, "rc2")
        await own_change(app, pilot, "waveform", ["a"])
        width, height = size
        for selector in (
            "#wi-title",
            "#wi-choices",
            "#wi-counts",
            "#wi-before",
            "#wi-after",
            "#wi-plan-caution",
            "#caution",
            "#key-bar",
        ):
            region = screen.query_one(selector).region
            assert region.height >= 1, selector
            assert region.y + region.height <= height and region.x + region.width <= width
        assert screen.query_one("#wi-before").region.height >= 3  # rows can be read
        plan = str(screen.query_one("#wi-plan-caution", Static).content)
        if width >= 120:
            assert plan == PLAN_CAUTION
        else:
            # the short form keeps every duty of the full one
            assert "competent person" in plan and "prove dead" in plan
            assert "after installation" in plan
        caution = str(screen.query_one("#caution", Static).content)
        assert caution == caution_for_width(width - 2)
        assert "Not a certificate" in caution or "not a certificate" in caution


async def test_accept_makes_only_the_change_shown(oak_lane: Path) -> None:
    app = make_app(oak_lane)
    async with app.run_test(size=(120, 40)) as pilot:
        screen = await open_on_device(app, pilot, "rc2")
        await own_change(app, pilot, "waveform", ["a"])  # Type A
        await own_change(app, pilot, "waveform", ["f"])  # Type F
        assert [c.source for c in screen.choices][-2:] == ["own", "own"]
        assert screen.trial is not None
        assert screen.trial.site_after.node("rc2").waveform == "F"
        # the cursor moves to the other change: the trial shown was not of it, so it goes
        await pilot.press("up")
        await pilot.pause()
        assert screen.trial is None and screen.after_rows == []
        await pilot.press("a")  # nothing tried: nothing to accept
        await pilot.pause()
        assert app.screen is screen
        assert "Try a change first" in str(screen.query_one("#wi-counts", Static).content)
        await pilot.press("enter")  # tries Type A
        await settled(app, pilot)
        assert screen.trial is not None
        assert screen.trial.site_after.node("rc2").waveform == "A"
        await pilot.press("a")
        await settled(app, pilot)
        assert app.site.node("rc2").waveform == "A"


async def test_with_no_current_analysis_the_site_is_checked_first(oak_lane: Path) -> None:
    from hosting import Host

    from model.plan.choices import choices_for_device
    from model.rules.checks import analyse

    site = load_site(oak_lane)
    seen: list[object] = []

    def make(analysis: Any) -> Any:
        seen.append(analysis)
        return choices_for_device(site, analysis, "rc2")

    screen = WhatIfScreen(site, None, make, device="rc2")
    app = Host(screen)
    async with app.run_test(size=(120, 40)) as pilot:
        await settled(app, pilot)  # type: ignore[arg-type]
        expected = analyse(site).findings
        assert seen and seen[0] is screen.analysis  # checked once, handed to the planner
        assert [f for _, f in screen.before_rows] == expected
        assert screen.choices and all(c.changes[0].node == "rc2" for c in screen.choices)
        await pilot.press("escape")
        await pilot.pause()
    assert app.results == [None]  # left without a change


async def until(pilot: Any, ready: Any, what: str) -> None:
    for _ in range(600):
        if ready():
            return
        await pilot.pause(0.05)
    raise AssertionError(f"timed out waiting for {what}")


async def test_the_plan_arrives_after_the_options_and_keeps_the_trial(oak_lane: Path) -> None:
    import threading

    from hosting import Host

    from model.plan.choices import options_for_device, planned_for_device
    from model.plan.search import make_plan

    site = load_site(oak_lane)
    release = threading.Event()

    def planned(analysis: Any) -> Any:
        release.wait(60)
        return planned_for_device(make_plan(site, analysis), "rc2")

    screen = WhatIfScreen(
        site, None, lambda a: options_for_device(site, a, "rc2"), planned, device="rc2"
    )
    app = Host(screen)
    async with app.run_test(size=(120, 40)) as pilot:
        await until(pilot, lambda: screen.choices, "the options")
        assert screen.planning
        assert "making the plan" in str(screen.query_one("#wi-title", Static).content)
        assert all(c.source == "option" for c in screen.choices)
        await pilot.press("down", "enter")  # try the second option meanwhile
        await until(pilot, lambda: screen.trial is not None, "the trial")
        tried = screen.tried
        assert tried is not None and tried.summary == screen.choices[1].summary
        release.set()
        await until(pilot, lambda: not screen.planning, "the plan")
        await pilot.pause()
        # the plan's change of rc2 (Type AC to Type A, BS 7671 531.3.3) comes first now
        assert screen.choices[0].source == "plan"
        assert screen.choices[0].summary == "rc2: Type (waveform) AC → A"
        # the trial shown is still of the change under the cursor
        assert screen.trial is not None and screen.tried is not None
        assert screen.tried.summary == tried.summary
        assert screen.highlighted_choice() is screen.tried
        await pilot.press("escape")


async def test_a_change_the_site_refuses_is_said_and_cannot_be_accepted(oak_lane: Path) -> None:
    from hosting import Host

    from model.plan.changes import DeviceChange, FieldChange
    from model.plan.choices import TrialChoice

    site = load_site(oak_lane)
    bad = DeviceChange("rc2", (FieldChange("rc2", "idn_ma", 30.0, -5.0),), text="rc2 to -5 mA")
    screen = WhatIfScreen(site, None, lambda a: [TrialChoice("option", (bad,))], device="rc2")
    app = Host(screen)
    async with app.run_test(size=(120, 40)) as pilot:
        await settled(app, pilot)  # type: ignore[arg-type]
        await pilot.press("enter")
        await settled(app, pilot)  # type: ignore[arg-type]
        said = str(screen.query_one("#wi-counts", Static).content)
        # the site format's own bounds for IΔn, said with the field's title
        assert "cannot be made" in said and "IΔn -5.0 is outside 6 to 30000 mA" in said
        assert screen.trial is None and screen.after_rows == []
        await pilot.press("a")
        await pilot.pause()
        assert app.results == []  # nothing to accept: still open
        await pilot.press("escape")
        await pilot.pause()
    assert app.results == [None]
