"""The app's other screens: help, site details, visits, export, comparing visits and
merging another copy, and moving the focus between the tree and the findings.

A dialog hands back what it made (site details, a visit, a merged site) as its
dismiss result; the callbacks here apply it as one edit.
"""

from __future__ import annotations

from pathlib import Path
from typing import Any

from model.site.models import SiteFile
from model.storage.session import EditSession
from tui.screens.help import HelpScreen
from tui.screens.main import MainScreen


class DialogActionsMixin:
    """The dialog and focus actions of :class:`~tui.app.shell.TripwiseApp` (a mixin of the app)."""

    session: EditSession | None
    site_path: Path

    def action_help(self) -> None:
        if not isinstance(self.screen, HelpScreen):
            self.push_screen(HelpScreen())

    def action_focus_tree(self) -> None:
        if isinstance(self.screen, MainScreen):
            self.main.focus_tree()

    def action_focus_findings(self) -> None:
        if isinstance(self.screen, MainScreen):
            self.main.focus_findings()

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
        from model.storage.codec import SiteLoadError
        from model.storage.sites import load_site
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
