"""What the keys on the tree do: add, edit, move, copy and delete a node, enter readings,
and open the trip impact or the pair of the node under the cursor.

The forms these open send their changes up as messages (a node to apply, a
reading to record); the handlers here make the change and answer the form.
"""

from __future__ import annotations

from typing import Any

from model.rules.ratings import rating_note, rejudging_changes
from model.site import editing, ops
from model.site.fields import field_title
from model.site.numbers import number_text
from model.site.terms import RCD_KINDS
from model.site.tree import SiteIndex
from tui.format import KIND_KEYS, KIND_TITLES
from tui.screens.choice import ChoiceScreen
from tui.screens.confirm import ConfirmScreen
from tui.screens.main import MainScreen
from tui.screens.node_editor import NodeEditorScreen
from tui.screens.readings import ReadingScreen
from tui.screens.start_visit import StartVisitScreen


def _shown(value: Any) -> str:
    if value is None:
        return "none"
    return number_text(value) if isinstance(value, float) else str(value)


class NodeActionsMixin:
    """The tree's actions in :class:`~tui.app.shell.TripwiseApp` (a mixin of the app)."""

    index: SiteIndex

    def _selected(self) -> str | None:
        if not isinstance(self.screen, MainScreen):
            return None
        return self.main.tree.selected_id()

    # ------------------------------------------------------------ the tree
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

        self.push_screen(
            ChoiceScreen(f"Add under {self.index.label(parent)}", options, keys=KIND_KEYS), chosen
        )

    def action_edit_node(self) -> None:
        nid = self._selected()
        if nid is None or not self._writable():
            return
        values = self.index.by_id[nid].model_dump()
        facts = ""
        oc = getattr(self.analysis, "oc", None)
        if oc is not None:
            from model.rules.overcurrent.disconnection import device_summary

            facts = device_summary(oc.disconnection, nid)
        self.push_screen(NodeEditorScreen(values, new=False, facts=facts))

    def on_node_editor_screen_apply(self, message: NodeEditorScreen.Apply) -> None:
        """A node form's validated node: add or change it (asking first when that re-judges
        readings already taken), and answer the form."""
        node: Any = message.node
        old_id = message.old_id
        if (message.new or node.id != old_id) and node.id in self.index.by_id:
            message.editor.answer(str(node.id), f"Id {node.id} is already used; choose another")
            return
        if old_id is None:
            self._apply_node(message, node)
            return
        changed = rejudging_changes(self.index.by_id[old_id], node)
        taken = sum(1 for v in self.site.visits if old_id in v.readings)
        if not changed or not taken:
            self._apply_node(message, node)
            return
        old = self.index.by_id[old_id]
        what = "; ".join(
            f"{field_title(f)} {_shown(getattr(old, f, None))} → {_shown(getattr(node, f, None))}"
            for f in changed
        )

        def answered(yes: bool | None) -> None:
            if yes:
                self._apply_node(message, node)
            else:
                message.editor.answer(None, None)

        self.push_screen(
            ConfirmScreen(
                "Judge the readings again?",
                f"{self.index.label(old_id)} has readings on {taken} visit(s).\n{what}\n\n"
                "Its readings stay as recorded, but they will be judged against the bands "
                "of the changed device: marks and findings may change. Apply the change?",
                yes="Apply",
                no="Back to the form",
            ),
            answered,
        )

    def _apply_node(self, message: NodeEditorScreen.Apply, node: Any) -> None:
        old_id = message.old_id
        new_id = str(node.id)
        if old_id is None:
            label, change = f"add {new_id}", (lambda s: s.upsert_node(node))
        elif old_id != new_id:
            # checked on a copy first, so the session makes both steps or neither
            try:
                ops.apply_op(
                    ops.apply_op(self.site, ops.RenameNode(old=old_id, new=new_id)),
                    ops.UpsertNode(node=node),
                )
            except ValueError as exc:
                message.editor.answer(new_id, str(exc))
                return

            def change(s: Any) -> None:
                s.rename_node(old_id, new_id)
                s.upsert_node(node)

            label = f"rename {old_id} to {new_id}"
        else:
            label, change = f"edit {new_id}", (lambda s: s.upsert_node(node))
        problem = self.apply_edit(label, change, select=new_id)
        message.editor.answer(new_id, problem)
        note = rating_note(node.kind, float(node.idn_ma)) if hasattr(node, "idn_ma") else None
        if problem is None and note:
            self.notify(note, severity="warning", timeout=10)

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

    # ------------------------------------------------------------ analysis screens
    def action_impact(self) -> None:
        nid = self._selected()
        if nid is None:
            return
        from tui.screens.impact import ImpactScreen

        self.push_screen(ImpactScreen(self.site, nid, self.index))

    def action_pair(self) -> None:
        nid = self._selected()
        if nid is None:
            return
        pair = editing.nearest_pair(self.index, nid)
        if pair is None:
            from model.rules.overcurrent.analysis import nearest_oc_pair

            oc = nearest_oc_pair(self.index, nid)
            if oc is not None and self.analysis is not None:
                from tui.screens.oc_pair import OcPairScreen

                self.push_screen(OcPairScreen(self.site, self.analysis, oc[0], oc[1]))
                return
            self.notify(
                "Choose a residual-current device with another RCD above or below it, "
                "or a fuse or breaker with another above or below it."
            )
            return
        from tui.screens.pair import PairScreen

        self.push_screen(PairScreen(self.site, self.analysis, pair[0], pair[1]))
