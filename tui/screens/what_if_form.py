"""A change of your own in a "what if": the node form, made on a scratch copy only.

The same form as editing a node (its fields, its checks as you type, every value
kept exactly as typed or refused with the reason), but Apply never reaches the
site: the edited device becomes a :class:`~model.plan.changes.DeviceChange`
(:func:`model.plan.trial.own_change`), checked on a scratch copy before the form
closes.  A change the site would refuse keeps the form open with the reason.
"""

from __future__ import annotations

from typing import Any

from textual import on
from textual.widgets import Button, Label, Static

from model.plan.changes import DeviceChange
from model.plan.trial import TrialRefused, own_change, scratch_site
from model.site.models import SiteFile
from tui.screens.node_editor import NodeEditorScreen


class ScratchNodeForm(NodeEditorScreen):
    """Edit a device's fields for a trial; dismisses with its id once :attr:`change` is set."""

    def __init__(self, site: SiteFile, values: dict[str, Any]) -> None:
        super().__init__(values, new=False)
        self.site = site
        #: The change the form made (None until it was accepted as a trial).
        self.change: DeviceChange | None = None

    def on_mount(self) -> None:
        super().on_mount()
        self.query_one(".dialog-title", Label).update(
            f"Your change to {self.old_id} (tried on a scratch copy; the site is not changed)"
        )

    @on(Button.Pressed, "#apply")
    def _apply_pressed(self, event: Button.Pressed) -> None:
        # the node form's own handler would send the node to the app: never from here
        event.prevent_default()
        event.stop()
        self.action_apply()

    def action_apply(self) -> None:
        """Check the form and the change on a scratch copy; close with it, or say why not."""
        node = self._check()
        if node is None:
            self.app.bell()
            return
        problem = ""
        try:
            change = own_change(self.site, node)
            if change is None:
                problem = "Nothing changed: edit a field to try a change."
            else:
                scratch_site(self.site, [change])
        except TrialRefused as exc:
            problem = f"Not tried: {exc}"
        if problem:
            top = self.query_one("#form-error", Static)
            top.update(problem)
            top.display = True
            self.app.bell()
            return
        self.change = change
        self.dismiss(self.old_id)
