"""Refused values, delete with undo, the impact summary and findings after an edit."""

from __future__ import annotations

from pathlib import Path

import pytest

from model.rules.impact import trip_impact
from model.storage.session import LockHeld
from model.storage.sites import load_site, save_site
from tui.app.shell import make_app
from tui.screens.confirm import ConfirmScreen
from tui.screens.node_editor import NodeEditorScreen
from tui.screens.readings import ReadingScreen
from tui.widgets.node_details import NodeDetails


async def test_refused_value_leaves_file_unchanged(oak_lane: Path) -> None:
    before = oak_lane.read_bytes()
    app = make_app(oak_lane)
    async with app.run_test(size=(120, 40)) as pilot:
        app.main.select("rc1")
        await pilot.press("e")
        editor = app.screen
        assert isinstance(editor, NodeEditorScreen)
        # label is focused first (the id of an existing node is fixed); Enter to the
        # way, Enter to IΔn
        await pilot.press("enter", "enter", "ctrl+u", *"0.03")
        # the model refuses a rating given in amps (model.site.models _idn_sane)
        assert "looks like amps" in editor.errors["idn_ma"]
        await pilot.press("ctrl+s")
        assert app.screen is editor  # refused: the form stays open
        await pilot.press("escape")
        # a trip time above the 10 000 ms the format allows is refused at the field
        await pilot.press("r")
        screen = app.screen
        assert isinstance(screen, ReadingScreen)
        await pilot.press("enter", "enter", *"20000", "enter")
        assert screen.pad.current == "x1_0"
        assert "10000" in screen.verdicts["x1_0"]
        await pilot.press("escape")
        assert app.save_now()
        assert len(app.undo_stack) == 0
    assert oak_lane.read_bytes() == before


async def test_delete_asks_and_undo_restores(oak_lane: Path) -> None:
    original = load_site(oak_lane)
    app = make_app(oak_lane)
    async with app.run_test(size=(120, 40)) as pilot:
        app.main.select("wb")  # the workshop board and its RCBOs
        await pilot.press("d")
        assert isinstance(app.screen, ConfirmScreen)
        await pilot.press("y")
        ids = {n.id for n in app.site.nodes}
        assert "wb" not in ids and "rb1" not in ids
        assert "rb1" not in app.site.latest_visit().readings  # type: ignore[union-attr]
        await pilot.press("ctrl+s")
        assert "rb1" not in {n.id for n in load_site(oak_lane).nodes}
        await pilot.press("u")
        assert app.site == original
        await pilot.press("ctrl+s")
        assert app.main.tree.select_id("rb1")
    assert load_site(oak_lane) == original


async def test_copy_board_gets_new_ids(oak_lane: Path) -> None:
    app = make_app(oak_lane)
    async with app.run_test(size=(120, 40)) as pilot:
        app.main.select("wb")
        n_before = len(app.site.nodes)
        below = len(app.index.descendants("wb"))
        await pilot.press("c")
        ids = [n.id for n in app.site.nodes]
        assert len(ids) == n_before + below + 1
        assert len(set(ids)) == len(ids)
        top = app.main.tree.selected_id()
        assert top is not None and top != "wb"
        assert app.index.parent(top) == app.index.parent("wb")


async def test_details_show_trip_impact(oak_lane: Path) -> None:
    app = make_app(oak_lane)
    async with app.run_test(size=(120, 40)) as pilot:
        app.main.select("rc1")
        await pilot.pause()
        text = str(app.main.query_one(NodeDetails).render())
        impact = trip_impact(app.site, "rc1")
        # Common practice: a device that opens disconnects every circuit it feeds.
        assert f"cuts off {len(impact.lost)} circuit(s)" in text
        for cid in impact.lost:
            assert app.index.label(cid) in text
        # lighting on the other RCCB stays on (sample: lights downstairs on rc2)
        assert "Lights downstairs" in text


async def test_findings_update_after_edit(oak_lane: Path) -> None:
    app = make_app(oak_lane)
    async with app.run_test(size=(120, 40)) as pilot:
        await app.settle()
        await pilot.pause()

        def ac_findings() -> list[str]:
            return [
                f.rule
                for f in app.main.findings.shown
                if f.rule == "type.ac-unsuitable" and "rc2" in f.nodes
            ]

        # BS 7671 531.3.3: Type AC only for fixed equipment with no DC component
        assert ac_findings()
        app.main.select("rc2")
        await pilot.press("e")
        assert isinstance(app.screen, NodeEditorScreen)
        app.screen.query_one("#f-waveform").focus()
        await pilot.press("a")  # the letter picks type A (AC -> A), no list opens
        await pilot.press("ctrl+s")
        # rc2 has readings: the change re-judges them, so the app asks first
        assert isinstance(app.screen, ConfirmScreen)
        assert "readings on 2 visit(s)" in str(app.screen.query_one(".dialog-body").render())
        await pilot.press("y")
        assert app.site.node("rc2").waveform == "A"
        await app.settle()
        await pilot.pause()
        assert not ac_findings()
        # the jump from a finding selects its node in the tree
        app.main.focus_findings()
        await pilot.press("enter")
        shown = app.main.findings.shown
        assert shown and app.main.tree.selected_id() == shown[0].nodes[0]


async def test_lock_held_offers_read_only(oak_lane: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    from model.storage import session as session_mod

    holder = session_mod.EditSession.open(oak_lane)  # another editor holds the file
    try:
        session_mod.EditSession.open(oak_lane).close()
    except LockHeld:
        pass  # the session locks: the real refusal is used
    else:  # a session without locking: refuse the second editor as a lock would
        real_open = session_mod.EditSession.open.__func__  # type: ignore[attr-defined]

        def fake_open(cls, path, *, read_only=False):  # type: ignore[no-untyped-def]
            if not read_only:
                raise LockHeld("held by inspector@van (pid 4242)")
            return real_open(cls, path, read_only=read_only)

        monkeypatch.setattr(session_mod.EditSession, "open", classmethod(fake_open))
    before = oak_lane.read_bytes()
    try:
        app = make_app(oak_lane)
        async with app.run_test(size=(120, 40)) as pilot:
            assert isinstance(app.screen, ConfirmScreen)
            await pilot.press("y")
            assert app.session is not None and app.session.read_only
            assert app.save_state == "read-only"
            await pilot.press("d")
            assert not isinstance(app.screen, ConfirmScreen)
            await pilot.press("ctrl+s")
    finally:
        holder.close()
    assert oak_lane.read_bytes() == before


async def test_hook_keys_open_the_analysis_screens(oak_lane: Path) -> None:
    from tui.screens.export import ExportScreen
    from tui.screens.impact import ImpactScreen
    from tui.screens.pair import PairScreen
    from tui.screens.site_details import SiteDetailsScreen
    from tui.screens.visits import VisitsScreen

    app = make_app(oak_lane)
    async with app.run_test(size=(120, 40)) as pilot:
        await app.settle()
        app.main.select("rb1")
        for key, cls in (
            ("i", ImpactScreen),
            ("p", PairScreen),
            ("s", SiteDetailsScreen),
            ("v", VisitsScreen),
            ("x", ExportScreen),
        ):
            await pilot.press(key)
            assert isinstance(app.screen, cls), key
            await pilot.press("escape")
            assert not isinstance(app.screen, cls), key


async def test_move_reparents_by_keys(oak_lane: Path) -> None:
    app = make_app(oak_lane)
    async with app.run_test(size=(120, 40)) as pilot:
        app.main.select("c-l1")  # lights upstairs, under MCB 1
        await pilot.press("m")
        from tui.screens.choice import ChoiceScreen

        assert isinstance(app.screen, ChoiceScreen)
        await pilot.press("enter")  # the first place it may be fed from
        new_parent = app.site.node("c-l1").parent
        assert new_parent != "m1"
        assert app.main.tree.selected_id() == "c-l1"
        await pilot.press("ctrl+s")
    assert load_site(oak_lane).node("c-l1").parent == new_parent


async def test_findings_filter_by_severity(oak_lane: Path) -> None:
    app = make_app(oak_lane)
    async with app.run_test(size=(120, 40)) as pilot:
        await app.settle()
        await pilot.pause()
        total = len(app.analysis.findings)  # type: ignore[union-attr]
        await pilot.press("f", "1")  # all -> urgent
        assert app.main.findings.severity == "urgent"
        assert all(f.severity == "urgent" for f in app.main.findings.shown)
        await pilot.press("1")  # -> required
        shown = app.main.findings.shown
        assert shown and all(f.severity == "required" for f in shown)
        await pilot.press("1", "1", "1")  # advisory, investigate, back to all
        assert len(app.main.findings.shown) == total


async def test_save_error_is_shown_and_recovered_lines_too(
    oak_lane: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    from model.storage import session as session_mod

    real_open = session_mod.EditSession.open.__func__  # type: ignore[attr-defined]

    def open_with_recovery(cls, path, *, read_only=False):  # type: ignore[no-untyped-def]
        s = real_open(cls, path, read_only=read_only)
        s.recovered = ["re-applied 2 edits made after the last save"]
        return s

    monkeypatch.setattr(session_mod.EditSession, "open", classmethod(open_with_recovery))
    app = make_app(oak_lane)
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.pause()
        assert any("re-applied 2 edits" in n.message for n in app._notifications)

        def full_disk(*_a: object, **_k: object) -> None:
            raise OSError(28, "No space left on device")

        # the disk fills up under the file: the save in the background and the save
        # on request both meet it (the journal still takes the edits)
        monkeypatch.setattr(session_mod, "write_atomic", full_disk)
        app.main.select("wb")
        await pilot.press("c")  # any accepted edit
        # the autosave may already have tried (and failed) by now: either way not saved
        assert app.save_state in ("pending", "error")
        await pilot.press("ctrl+s")
        assert app.save_state == "error"
        bar = str(app.screen.query_one("#save-state").render())
        assert "not saved" in bar and "No space left" in bar


async def test_a_new_node_with_a_used_id_is_refused_in_the_form(oak_lane: Path) -> None:
    app = make_app(oak_lane)
    async with app.run_test(size=(120, 40)) as pilot:
        app.main.select("cu")
        await pilot.press("a", "b")  # b: a board under the consumer unit
        editor = app.screen
        assert isinstance(editor, NodeEditorScreen)
        assert editor.focused is editor.query_one("#f-label")  # new and edit start here
        await pilot.press("shift+tab", "ctrl+u", *"rc1", "ctrl+s")
        assert app.screen is editor  # refused: the form stays open with the reason
        assert "Id rc1 is already used" in str(editor.query_one("#form-error").render())
        assert len(app.undo_stack) == 0
        await pilot.press("ctrl+u", *"board9", "ctrl+s")
        assert not isinstance(app.screen, NodeEditorScreen)
        assert app.index.parent("board9") == "cu"
        assert app.main.tree.selected_id() == "board9"


@pytest.mark.parametrize(
    ("typed", "says"),
    [("1e3", "'1e3' is not a number"), ("abc", "'abc' is not a number"), ("-5", "-5")],
)
async def test_a_number_field_keeps_what_is_typed_and_refuses_it(
    oak_lane: Path, typed: str, says: str
) -> None:
    """'1e3' is never quietly read as 13, nor '-5' as 5."""
    before = oak_lane.read_bytes()
    app = make_app(oak_lane)
    async with app.run_test(size=(80, 24)) as pilot:
        app.main.select("rc1")
        await pilot.press("e")
        editor = app.screen
        assert isinstance(editor, NodeEditorScreen)
        await pilot.press("enter", "enter", "ctrl+u", *typed)  # the label, the way, then IΔn
        assert says in editor.errors["idn_ma"]
        await pilot.press("ctrl+s")
        assert app.screen is editor  # refused: the form stays open
        await pilot.press("escape")
        assert app.site.node("rc1").idn_ma == 30  # the sample's value, unchanged
    assert oak_lane.read_bytes() == before


async def test_saving_a_form_unchanged_keeps_every_digit(oak_lane: Path) -> None:
    site = load_site(oak_lane)
    nodes = [
        n.model_copy(update={"zs_ohm": 0.4123456789}) if n.id == "c-ck" else n for n in site.nodes
    ]
    save_site(site.model_copy(update={"nodes": nodes}), oak_lane)
    app = make_app(oak_lane)
    async with app.run_test(size=(80, 24)) as pilot:
        app.main.select("c-ck")
        await pilot.press("e")
        assert isinstance(app.screen, NodeEditorScreen)
        await pilot.press("ctrl+s")
        await app.settle()
        assert not isinstance(app.screen, NodeEditorScreen)
        assert app.site.node("c-ck").zs_ohm == 0.4123456789  # not 0.412346


async def test_renaming_an_id_in_the_form_carries_children_and_readings(oak_lane: Path) -> None:
    app = make_app(oak_lane)
    async with app.run_test(size=(120, 40)) as pilot:
        children = [n.id for n in app.site.nodes if n.parent == "rc1"]
        tested = [v.id for v in app.site.visits if "rc1" in v.readings]
        app.main.select("rc1")
        await pilot.press("e", "shift+tab")  # from the label back to the id
        editor = app.screen
        assert isinstance(editor, NodeEditorScreen)
        assert editor.focused is editor.query_one("#f-id")
        await pilot.press("ctrl+u", *"rcd-upstairs", "ctrl+s")
        assert not isinstance(app.screen, NodeEditorScreen)
        ids = {n.id for n in app.site.nodes}
        assert "rc1" not in ids and "rcd-upstairs" in ids
        assert all(app.site.node(c).parent == "rcd-upstairs" for c in children)
        assert [v.id for v in app.site.visits if "rcd-upstairs" in v.readings] == tested
        assert app.main.tree.selected_id() == "rcd-upstairs"
        await pilot.press("u")  # one undo step puts the old id back
        assert "rc1" in {n.id for n in app.site.nodes}


async def test_a_non_standard_rating_is_kept_with_a_note(oak_lane: Path) -> None:
    app = make_app(oak_lane)
    async with app.run_test(size=(120, 40)) as pilot:
        app.main.select("rc1")
        await pilot.press("e")
        editor = app.screen
        assert isinstance(editor, NodeEditorScreen)
        editor.query_one("#f-idn_ma").focus()
        await pilot.press("ctrl+u", "7")  # IΔn 7 mA
        # IEC 61008-1 preferred values of IΔn are 6, 10, 30, 100, 300, 500 mA (from memory)
        note = str(editor.query_one("#err-idn_ma").render())
        assert "not a standard rating" in note and "idn_ma" not in editor.errors
        await pilot.press("ctrl+s")
        # rc1 has readings: asked first, and "no" keeps the form and the device
        assert isinstance(app.screen, ConfirmScreen)
        await pilot.press("n")
        assert app.screen is editor and app.site.node("rc1").idn_ma == 30.0
        await pilot.press("ctrl+s", "y")
        assert app.site.node("rc1").idn_ma == 7.0  # kept exactly as typed
        assert any("not a standard rating" in n.message for n in app._notifications)
