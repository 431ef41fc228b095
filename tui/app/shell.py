"""The tripwise terminal app: one site file, edited through an editing session.

``make_app(site_path)`` opens the session and builds the app; the CLI and the
tests both use it.  Every accepted edit goes through the session (which
validates and journals it) before the save state shows it as saved; checks are
re-run in a worker after each edit so typing never waits for them.
"""

from __future__ import annotations

import os
from collections.abc import Callable
from pathlib import Path
from typing import Any

from pydantic import ValidationError
from textual import work
from textual.app import App
from textual.binding import Binding
from textual.reactive import reactive
from textual.screen import ModalScreen, Screen
from textual.timer import Timer

from model.rules.checks import analyse
from model.rules.findings import Analysis
from model.site import editing
from model.site.messages import error_text
from model.site.models import Reading, SiteFile
from model.site.terms import RCD_KINDS
from model.site.tree import SiteIndex
from model.site.undo import UndoStack
from model.storage.session import EditSession, LockHeld
from tui.format import KIND_TITLES
from tui.screens.choice import ChoiceScreen
from tui.screens.confirm import ConfirmScreen
from tui.screens.help import HelpScreen
from tui.screens.main import MainScreen
from tui.screens.node_editor import NodeEditorScreen
from tui.screens.readings import ReadingScreen
from tui.screens.start_visit import StartVisitScreen

#: Seconds after the last edit before the file is written (edits are journalled at once).
SAVE_DELAY_S = 0.8
#: Seconds after the last edit before the checks are re-run.
ANALYSIS_DELAY_S = 0.12
#: Seconds after the first paint before the first checks (the tree is usable meanwhile).
FIRST_ANALYSIS_DELAY_S = 0.1


def describe(exc: BaseException) -> str:
    """One line for the user from a refused edit."""
    if isinstance(exc, ValidationError):
        msgs = []
        for err in exc.errors()[:3]:
            msgs.append(error_text(err))
        return "; ".join(msgs)
    return str(exc)


class TripwiseApp(App[None]):
    """The app for one site file."""

    CSS_PATH = "app.tcss"
    TITLE = "tripwise"

    BINDINGS = [
        Binding("f1", "help", "Help"),
        Binding("question_mark", "help", "Help", show=False),
        Binding("ctrl+s", "save", "Save", show=False),
        Binding("ctrl+z", "undo", "Undo"),
        Binding("u", "undo", "Undo", show=False),
        Binding("t", "focus_tree", "Tree", show=False),
        Binding("f", "focus_findings", "Findings"),
        Binding("s", "site_details", "Site", show=False),
        Binding("v", "visits", "Visits", show=False),
        Binding("x", "export", "Export", show=False),
        Binding("h", "compare_visits", "Compare visits", show=False),
        Binding("o", "merge_other", "Merge a copy", show=False),
        Binding("q", "quit_app", "Quit"),
    ]

    site_name: reactive[str] = reactive("")
    save_state: reactive[str] = reactive("saved")
    save_message: reactive[str] = reactive("")

    def __init__(
        self,
        site_path: Path,
        session: EditSession | None,
        *,
        lock_message: str | None = None,
    ) -> None:
        super().__init__()
        self.site_path = site_path
        self.session: EditSession | None = session
        self.lock_message = lock_message
        self.analysis: Analysis | None = None
        self.index: SiteIndex = _empty_index()
        self.undo_stack = UndoStack()
        self._save_timer: Timer | None = None
        self._analysis_timer: Timer | None = None
        self._analysis_gen = 0
        self._analysis_wanted = False
        self._warned = 0
        if session is not None:
            self._took_session(session)

    _APP_ACTIONS = frozenset(
        {"help", "save", "undo", "focus_tree", "focus_findings", "site_details", "visits"}
        | {"export", "quit_app"}
    )
    #: Actions that make no sense while typing readings (their keys are values there).
    _NOT_WHILE_READING = frozenset(
        {"focus_tree", "focus_findings", "quit_app", "site_details", "visits", "export"}
    )

    #: App actions offered under a dialog (the others wait until it is closed).
    _UNDER_A_DIALOG = frozenset({"help", "save"})

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        if isinstance(self.screen, ModalScreen):
            return action in self._UNDER_A_DIALOG or action not in self._APP_ACTIONS
        reading = isinstance(self.screen, ReadingScreen)
        return not (reading and action in self._NOT_WHILE_READING)

    # ------------------------------------------------------------ start-up
    def get_default_screen(self) -> Screen[Any]:
        return MainScreen()

    def _took_session(self, session: EditSession) -> None:
        self.session = session
        self.index = SiteIndex.build(session.site)
        self.site_name = session.site.site.name
        self.save_state = "read-only" if session.read_only else "saved"

    def notify(
        self,
        message: str,
        *,
        title: str = "",
        severity: Any = "information",
        timeout: float | None = None,
        markup: bool = False,
    ) -> None:
        """Notices carry user text (labels, file names): never read them as markup."""
        super().notify(message, title=title, severity=severity, timeout=timeout, markup=False)

    def on_mount(self) -> None:
        if self.session is None:
            self.push_screen(
                ConfirmScreen(
                    "This site is open elsewhere",
                    f"{self.lock_message}\n\nOpen it read-only (look, but change nothing)?",
                    yes="Open read-only",
                    no="Quit",
                ),
                self._lock_answer,
            )
            return
        self._opened()

    def _lock_answer(self, yes: bool | None) -> None:
        if not yes:
            self.exit()
            return
        try:
            self._took_session(EditSession.open(self.site_path, read_only=True))
        except Exception as exc:  # noqa: BLE001 - shown to the user, never a traceback
            self.exit(message=f"tripwise: cannot open {self.site_path}: {exc}")
            return
        self.main.show_site(keep=None)
        self._opened()

    def _opened(self) -> None:
        assert self.session is not None
        for line in self.session.recovered:
            self.notify(line, title="Recovered from the journal", timeout=12)
        self._show_new_warnings()
        # the first screen is drawn before the checks start, so the tree is usable at once
        self._analysis_wanted = True
        self.call_after_refresh(self._first_analysis)

    @property
    def has_site(self) -> bool:
        """False only while the app asks whether to open a site held elsewhere read-only."""
        return self.session is not None

    @property
    def main(self) -> MainScreen:
        """The main screen (at the bottom of the screen stack)."""
        for s in self.screen_stack:
            if isinstance(s, MainScreen):
                return s
        raise LookupError("main screen")

    # ------------------------------------------------------------ editing
    @property
    def site(self) -> SiteFile:
        assert self.session is not None
        return self.session.site

    def _writable(self) -> bool:
        if self.session is None:
            return False
        if self.session.read_only:
            self.notify("The site is open read-only; nothing can be changed.", severity="warning")
            return False
        return True

    def apply_edit(
        self,
        label: str,
        change: Callable[[EditSession], None],
        *,
        select: str | None = None,
    ) -> str | None:
        """Make one change through the session; None when accepted, else why it was refused."""
        if not self._writable():
            return "the site is open read-only"
        assert self.session is not None
        before = self.site
        try:
            change(self.session)
        except (ValueError, TypeError, KeyError, OSError) as exc:
            return describe(exc)
        self.undo_stack.push(label, before)
        self._after_edit(structural=True, select=select)
        return None

    def record_reading(self, device_id: str, reading: Reading | None) -> str | None:
        """Record one device's reading on the latest visit (None when accepted)."""
        if not self._writable():
            return "the site is open read-only"
        assert self.session is not None
        visit = self.site.latest_visit()
        if visit is None:
            return "there is no visit to record on"
        if visit.readings.get(device_id) == reading:
            return None  # nothing changed: nothing to journal
        try:
            self.session.set_reading(visit.id, device_id, reading)
        except (ValueError, TypeError, KeyError, OSError) as exc:
            return describe(exc)
        self._after_edit(structural=False)
        return None

    def _after_edit(self, *, structural: bool, select: str | None = None) -> None:
        self.site_name = self.site.site.name
        if structural:
            self.index = SiteIndex.build(self.site)
            self.main.show_site(keep=select)
        self._schedule_save()
        self._schedule_analysis()

    # ------------------------------------------------------------ saving
    def _schedule_save(self) -> None:
        self.save_state = "pending"
        if self._save_timer is not None:
            self._save_timer.stop()
        self._save_timer = self.set_timer(SAVE_DELAY_S, self._save_due)

    def _save_due(self) -> None:
        self._save_timer = None
        self.save_state = "saving"
        self.call_after_refresh(self.save_now)

    def save_now(self) -> bool:
        """Write the file now; the save state shows the outcome."""
        if self._save_timer is not None:
            self._save_timer.stop()
            self._save_timer = None
        if self.session is None or self.session.read_only:
            return True
        if not self.session.dirty and self.save_state == "saved":
            return True
        try:
            self.session.save()
        except Exception as exc:  # noqa: BLE001 - any failure is shown, the journal keeps the edits
            self.save_state = "error"
            self.save_message = str(exc) or exc.__class__.__name__
            return False
        self.save_state = "saved"
        self.save_message = ""
        self._show_new_warnings()
        return True

    def _show_new_warnings(self) -> None:
        assert self.session is not None
        for line in self.session.warnings[self._warned :]:
            self.notify(line, title="Warning", severity="warning", timeout=12)
        self._warned = len(self.session.warnings)

    # ------------------------------------------------------------ analysis
    def _schedule_analysis(self) -> None:
        self._analysis_gen += 1
        self._analysis_wanted = True
        if self._analysis_timer is not None:
            self._analysis_timer.stop()
        self._analysis_timer = self.set_timer(ANALYSIS_DELAY_S, self._start_analysis)

    def _start_analysis(self) -> None:
        self._analysis_timer = None
        if self.session is None or not self._analysis_wanted:
            return
        self._analysis_wanted = False
        self._run_analysis(self.site, self._analysis_gen)

    def _first_analysis(self) -> None:
        self._analysis_timer = self.set_timer(FIRST_ANALYSIS_DELAY_S, self._start_analysis)

    @work(thread=True, exclusive=True, group="analysis", exit_on_error=False)
    def _run_analysis(self, site: SiteFile, gen: int) -> None:
        try:
            result: Analysis | str = analyse(site)
        except Exception as exc:  # noqa: BLE001 - reported on screen
            result = f"the checks failed: {exc}"
        self.call_from_thread(self._analysis_done, result, gen)

    def _analysis_done(self, result: Analysis | str, gen: int) -> None:
        if gen != self._analysis_gen:
            return
        if isinstance(result, str):
            self.notify(result, severity="error")
            return
        self.analysis = result
        self.main.show_analysis()

    async def settle(self) -> None:
        """Run pending checks now and wait for them (used by tests and benchmarks)."""
        if self._analysis_timer is not None:
            self._analysis_timer.stop()
        self._start_analysis()
        await self.workers.wait_for_complete()

    # ------------------------------------------------------------ tree actions
    def _selected(self) -> str | None:
        if not isinstance(self.screen, MainScreen):
            return None
        return self.main.tree.selected_id()

    def action_add_node(self) -> None:
        parent = self._selected()
        if parent is None or not self._writable():
            return
        kinds = editing.child_kinds(self.index.kind(parent))
        if not kinds:
            self.notify(f"Nothing can be fed by a {self.index.kind(parent)}.", severity="warning")
            return
        options = [(KIND_TITLES[k], k) for k in kinds]

        def chosen(kind: str | None) -> None:
            if kind is None:
                return
            values = editing.new_node_values(kind, parent, self.site)
            self.push_screen(NodeEditorScreen(values, new=True))

        self.push_screen(ChoiceScreen(f"Add under {self.index.label(parent)}", options), chosen)

    def action_edit_node(self) -> None:
        nid = self._selected()
        if nid is None or not self._writable():
            return
        values = self.index.by_id[nid].model_dump()
        self.push_screen(NodeEditorScreen(values, new=False))

    def on_node_editor_screen_apply(self, message: NodeEditorScreen.Apply) -> None:
        """A node form's validated node: add or change it, and answer the form."""
        node: Any = message.node
        if message.new and node.id in self.index.by_id:
            problem: str | None = f"id {node.id!r} is already used; choose another"
        else:
            verb = "add" if message.new else "edit"
            problem = self.apply_edit(
                f"{verb} {node.id}", lambda s: s.upsert_node(node), select=str(node.id)
            )
        message.editor.answer(str(node.id), problem)

    def action_move_node(self) -> None:
        nid = self._selected()
        if nid is None or not self._writable():
            return
        if self.index.kind(nid) == "origin":
            self.notify("The origin cannot be moved.", severity="warning")
            return
        targets = editing.move_targets(self.index, nid)
        if not targets:
            self.notify("There is nowhere else this node may be fed from.", severity="warning")
            return
        options = [(self.index.path_text(t) or t, t) for t in targets]

        def chosen(target: str | None) -> None:
            if target is None:
                return
            moved = editing.moved_node(self.index.by_id[nid], target)
            problem = self.apply_edit(f"move {nid}", lambda s: s.upsert_node(moved), select=nid)
            if problem:
                self.notify(f"Not moved: {problem}", severity="error")

        self.push_screen(
            ChoiceScreen(f"Move {self.index.label(nid)} to be fed from…", options), chosen
        )

    def action_copy_node(self) -> None:
        nid = self._selected()
        if nid is None or not self._writable():
            return
        if self.index.kind(nid) == "origin":
            self.notify("The origin cannot be copied.", severity="warning")
            return
        nodes, top = editing.copy_subtree(self.site, self.index, nid)
        new_site = self.site.model_copy(update={"nodes": nodes})
        problem = self.apply_edit(f"copy {nid}", lambda s: s.replace_site(new_site), select=top)
        if problem:
            self.notify(f"Not copied: {problem}", severity="error")
        else:
            self.notify(
                f"Copied as {top} (with {len(editing.subtree_ids(self.index, top)) - 1} below)."
            )

    def action_delete_node(self) -> None:
        nid = self._selected()
        if nid is None or not self._writable():
            return
        if self.index.kind(nid) == "origin":
            self.notify("The origin cannot be deleted.", severity="warning")
            return
        ids = editing.subtree_ids(self.index, nid)
        parent = self.index.parent(nid)
        below = f" and the {len(ids) - 1} node(s) it feeds" if len(ids) > 1 else ""

        def answered(yes: bool | None) -> None:
            if not yes:
                return
            problem = self.apply_edit(f"delete {nid}", lambda s: s.delete_nodes(ids), select=parent)
            if problem:
                self.notify(f"Not deleted: {problem}", severity="error")
            else:
                self.notify(f"Deleted {len(ids)} node(s). Press u to undo.")

        self.push_screen(
            ConfirmScreen(
                "Delete?",
                f"Delete {self.index.label(nid)}{below}, with their readings?\n"
                "You can undo this with u.",
            ),
            answered,
        )

    def action_undo(self) -> None:
        if not self._writable():
            return
        if not self.undo_stack:
            self.notify("Nothing to undo.")
            return
        assert self.session is not None
        label, state = self.undo_stack.undo()
        try:
            self.session.replace_site(state)
        except (ValueError, TypeError, OSError) as exc:
            self.notify(f"Could not undo: {describe(exc)}", severity="error")
            return
        self.index = SiteIndex.build(self.site)
        self.site_name = self.site.site.name
        self.main.show_site(keep=None)
        if isinstance(self.screen, ReadingScreen):
            self.screen.site_replaced()
        self._schedule_save()
        self._schedule_analysis()
        self.notify(f"Undone: {label}")

    # ------------------------------------------------------------ readings
    def action_readings(self) -> None:
        if not self._writable():
            return
        nid = self._selected()
        device = nid if nid is not None and self.index.kind(nid) in RCD_KINDS else None
        if device is None:
            visit = self.site.latest_visit()
            device = editing.next_untested(self.index, visit, nid) or next(
                iter(self.index.rcds()), None
            )
        if device is None:
            self.notify("There is no residual-current device to test yet.", severity="warning")
            return
        if self.site.latest_visit() is None:
            taken = {v.id for v in self.site.visits}

            def started(visit: Any) -> None:
                if visit is None:
                    return
                problem = self.apply_edit(
                    f"start visit {visit.id}", lambda s: s.upsert_visit(visit)
                )
                if problem:
                    self.notify(f"Visit not started: {problem}", severity="error")
                    return
                self._open_readings(ReadingScreen(device))

            self.push_screen(StartVisitScreen(taken), started)
            return
        self._open_readings(ReadingScreen(device))

    def _open_readings(self, form: ReadingScreen) -> None:
        """Show the reading form; when it closes, the tree's cursor goes to its last device."""
        self.push_screen(form, self._reading_closed)

    def _reading_closed(self, device_id: str | None) -> None:
        if device_id is not None:
            self.main.select(device_id)

    def on_reading_screen_record(self, message: ReadingScreen.Record) -> None:
        """A reading from the form: record it and answer the form (opened again if closed)."""
        if message.undo_label is not None:
            self.undo_stack.push(message.undo_label, self.site)
        problem = self.record_reading(message.device_id, message.reading)
        if message.form in self.screen_stack:
            message.form.answer(message, problem)
        elif problem is not None:
            self._open_readings(ReadingScreen(message.device_id, refused=(message, problem)))

    # ------------------------------------------------------------ other screens
    def action_help(self) -> None:
        if not isinstance(self.screen, HelpScreen):
            self.push_screen(HelpScreen())

    def action_save(self) -> None:
        if self.session is not None and self.session.read_only:
            self.notify("Read-only: nothing to save.")
            return
        if self.save_now():
            self.notify("Saved.", timeout=2)

    def action_focus_tree(self) -> None:
        if isinstance(self.screen, MainScreen):
            self.main.focus_tree()

    def action_focus_findings(self) -> None:
        if isinstance(self.screen, MainScreen):
            self.main.focus_findings()

    def action_impact(self) -> None:
        nid = self._selected()
        if nid is None:
            return
        from tui.screens.impact import ImpactScreen

        self.push_screen(ImpactScreen(self.site, nid))

    def action_pair(self) -> None:
        nid = self._selected()
        if nid is None:
            return
        pair = editing.nearest_pair(self.index, nid)
        if pair is None:
            self.notify("Choose a residual-current device with another RCD above or below it.")
            return
        from tui.screens.pair import PairScreen

        self.push_screen(PairScreen(self.site, self.analysis, pair[0], pair[1]))

    def action_site_details(self) -> None:
        if self.session is None:
            return
        from tui.screens.site_details import SiteDetailsScreen

        def done(info: Any) -> None:
            if info is None or not self._writable():
                return
            problem = self.apply_edit("site details", lambda s: s.set_site_info(info))
            if problem:
                self.notify(f"Site details not changed: {problem}", severity="error")

        self.push_screen(SiteDetailsScreen(self.site), done)

    def action_visits(self) -> None:
        if self.session is None:
            return
        from tui.screens.visits import VisitsScreen

        def done(visit: Any) -> None:
            if visit is None or not self._writable():
                return
            problem = self.apply_edit(f"visit {visit.id}", lambda s: s.upsert_visit(visit))
            if problem:
                self.notify(f"Visit not added: {problem}", severity="error")

        self.push_screen(VisitsScreen(self.site), done)

    def action_export(self) -> None:
        from tui.screens.export import ExportScreen

        if self.session is not None and not self.session.read_only:
            self.save_now()
        self.push_screen(ExportScreen(self.site_path))

    def action_compare_visits(self) -> None:
        from tui.screens.compare import CompareScreen

        if len(self.site.visits) < 2:
            self.notify(f"Comparing needs two visits; this site has {len(self.site.visits)}.")
            return
        self.push_screen(CompareScreen(self.site))

    def action_merge_other(self) -> None:
        """Merge another copy of this site (from a second laptop) into it."""
        if not self._writable():
            self.notify("The site is open read-only.", severity="warning")
            return
        from tui.screens.path_prompt import PathPromptScreen

        self.push_screen(
            PathPromptScreen(
                "Merge another copy of this site",
                "Path of the other copy (it is only read, never changed):",
                start=str(self.site_path.parent) + "/",
            ),
            self._merge_from,
        )

    def _merge_from(self, path: str | None) -> None:
        if not path:
            return
        from model.storage.store import SiteLoadError, load_site
        from model.visits.merge import merge_sites
        from tui.screens.merge import MergeScreen

        try:
            other = load_site(Path(path).expanduser())
        except SiteLoadError as exc:
            self.notify(f"Cannot merge: {exc}", severity="error")
            return
        result = merge_sites(self.site, other)

        def apply(merged: SiteFile | None) -> None:
            if merged is None:
                return
            problem = self.apply_edit(f"merge {Path(path).name}", lambda s: s.replace_site(merged))
            if problem:
                self.notify(f"Merge not applied: {problem}", severity="error")
            else:
                settled = len(result.conflicts)
                self.notify(
                    f"Merged {Path(path).name}"
                    + (f"; {settled} conflict(s) settled by your choices." if settled else ".")
                )

        if result.clean:
            apply(result.merged())
        else:
            self.push_screen(MergeScreen(result), apply)

    def action_quit_app(self) -> None:
        unsaved = (
            self.session is not None
            and not self.session.read_only
            and (self.session.dirty or self.save_state in ("pending", "saving", "error"))
        )
        if unsaved and not self.save_now():

            def answered(yes: bool | None) -> None:
                if yes:
                    self._close_and_exit()

            self.push_screen(
                ConfirmScreen(
                    "Saving failed",
                    f"{self.save_message}\nYour edits are kept in the journal. Quit anyway?",
                ),
                answered,
            )
            return
        self._close_and_exit()

    def _close_and_exit(self) -> None:
        if self.session is not None:
            self.session.close()
        self.exit()


def _empty_index() -> SiteIndex:
    return SiteIndex(site=None)  # type: ignore[arg-type]


def make_app(site_path: str | os.PathLike[str], *, read_only: bool = False) -> TripwiseApp:
    """Open a site file for editing (or read-only) and build the app on it.

    Raises ``model.storage.store.SiteLoadError`` when the file cannot be used.  When the
    file is held by another session the app starts by offering to open it read-only.
    """
    path = Path(site_path)
    try:
        session = EditSession.open(path, read_only=read_only)
    except LockHeld as exc:
        return TripwiseApp(path, None, lock_message=str(exc))
    return TripwiseApp(path, session)
