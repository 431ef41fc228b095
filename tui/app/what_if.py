"""The "what if" view's part of the app: open it from a finding or a device, and accept
a tried change into the site as one edit (one undo step, every op journaled).

The view works on a scratch copy; only :meth:`WhatIfMixin._accept_trial` changes the
site, through the editing session, with the very ops the trial was checked with.
"""

from __future__ import annotations

import contextlib

from model.plan.changes import REMOVED, Plan
from model.plan.choices import (
    DEVICE_KINDS,
    TrialChoice,
    options_for_device,
    options_for_finding,
    planned_for_device,
    planned_for_finding,
)
from model.plan.choices import finding_devices as _finding_devices
from model.plan.search import make_plan
from model.plan.trial import Trial
from model.rules.findings import Analysis, Finding
from model.site import ops
from model.site.models import SiteFile
from model.storage.session import EditSession
from tui.screens.main import MainScreen
from tui.screens.what_if import WhatIfScreen
from tui.widgets.findings_panel import FindingsTable


def run_op(session: EditSession, op: ops.Op) -> None:
    """Make one of the site's edit ops through the session (journaled like any edit)."""
    if isinstance(op, ops.UpsertNode):
        session.upsert_node(op.node)
    elif isinstance(op, ops.DeleteNodes):
        session.delete_nodes(list(op.ids))
    elif isinstance(op, ops.SetReading):
        session.set_reading(op.visit, op.device, op.reading)
    elif isinstance(op, ops.RenameNode):
        session.rename_node(op.old, op.new)
    elif isinstance(op, ops.SetSiteInfo):
        session.set_site_info(op.info)
    elif isinstance(op, ops.UpsertVisit):
        session.upsert_visit(op.visit)
    else:
        session.replace_site(op.site)


class WhatIfMixin:
    """The "what if" part of :class:`~tui.app.shell.TripwiseApp` (a mixin of the app)."""

    session: EditSession | None
    analysis: Analysis | None
    #: The last plan made, with the site it is of.
    _plan_kept: tuple[SiteFile, Plan] | None = None

    def _current_analysis(self) -> Analysis | None:
        """The last analysis when it is of the site as it is now (else None: made afresh)."""
        a = self.analysis
        if a is None or a.index is None or a.index.site is not self.site:
            return None
        return a

    def _plan_of(self, site: SiteFile, analysis: Analysis) -> Plan:
        """The plan of ``site``: made once for each state of the site (it is the slow part),
        kept until the site changes.  Runs in the view's worker."""
        kept = self._plan_kept
        if kept is not None and kept[0] is site:
            return kept[1]
        plan = make_plan(site, analysis)
        self._plan_kept = (site, plan)
        return plan

    def _finding_under_cursor(self) -> Finding | None:
        panel = self.main.findings
        row = panel.query_one(FindingsTable).cursor_row
        shown = panel.shown
        return shown[row] if 0 <= row < len(shown) else None

    def action_what_if(self) -> None:
        """Try a change on a scratch copy: for the finding under the cursor (in the
        findings) or the device under the cursor (in the tree)."""
        if self.session is None or not isinstance(self.screen, MainScreen):
            return
        site, analysis = self.site, self._current_analysis()
        finding: Finding | None = None
        device: str | None
        if isinstance(self.focused, FindingsTable):
            finding = self._finding_under_cursor()
            if finding is None:
                self.notify("There is no finding under the cursor.")
                return
            devices = _finding_devices(site, finding)
            device = devices[0] if devices else None

            def options(analysis: Analysis) -> list[TrialChoice]:
                assert finding is not None
                return options_for_finding(site, analysis, finding)

            def planned(analysis: Analysis) -> list[TrialChoice]:
                assert finding is not None
                return planned_for_finding(self._plan_of(site, analysis), finding)
        else:
            device = self.main.tree.selected_id()
            kind = self.index.kind(device) if device is not None else None
            if device is None or kind not in DEVICE_KINDS:
                self.notify(
                    "Choose a fuse, breaker or residual-current device in the tree "
                    "(or a finding in the findings) to try a change."
                )
                return

            def options(analysis: Analysis) -> list[TrialChoice]:
                assert device is not None
                return options_for_device(site, analysis, device)

            def planned(analysis: Analysis) -> list[TrialChoice]:
                assert device is not None
                return planned_for_device(self._plan_of(site, analysis), device)

        def done(trial: Trial | None) -> None:
            self._accept_trial(site, trial)

        self.push_screen(
            WhatIfScreen(
                site,
                analysis,
                options,
                planned,
                finding=finding,
                device=device,
                read_only=self.session.read_only,
            ),
            done,
        )

    def _accept_trial(self, tried_on: SiteFile, trial: Trial | None) -> None:
        if trial is None:
            self.notify("Nothing changed: the site is as it was.")
            return
        if self.site is not tried_on:
            self.notify(
                "The site changed while the change was tried; nothing was accepted. Try it again.",
                severity="error",
            )
            return
        words = "; ".join(dc.text or dc.node for dc in trial.changes)
        first = trial.changes[0]
        select = (
            first.node
            if not any(fc.field == REMOVED for fc in first.fields)
            else tried_on.node(first.node).parent
        )

        def change(session: EditSession) -> None:
            done = 0
            try:
                for op in trial.ops:
                    run_op(session, op)
                    done += 1
            except Exception:
                if done:  # never leave half a change: put the site back as it was
                    with contextlib.suppress(Exception):
                        session.replace_site(tried_on)
                raise

        problem = self.apply_edit(f"what if: {words}", change, select=select)
        if problem:
            self.notify(f"Change not made: {problem}", severity="error")
            return
        created = len(trial.diff.created)
        self.notify(
            f"Made: {words}. Press u to undo."
            + (f" It leaves {created} new finding(s)." if created else "")
            + " Test every changed device after installation.",
            timeout=12,
        )
