"""The main screen: the tree beside the node's details, the findings below, the caution always."""

from __future__ import annotations

from textual import events, on
from textual.app import ComposeResult
from textual.containers import Horizontal, VerticalScroll
from textual.screen import Screen
from textual.widgets import Tree

from tui.app.view import site_view
from tui.widgets.caution_bar import CautionBar
from tui.widgets.findings_panel import FindingsPanel, FindingsTable
from tui.widgets.key_bar import KeyBar
from tui.widgets.node_details import NodeDetails
from tui.widgets.site_tree import SiteTree
from tui.widgets.top_bar import TopBar


class MainScreen(Screen[None]):
    """Shows the app's site; the app calls ``show_*`` after each change."""

    def compose(self) -> ComposeResult:
        yield TopBar(id="top-bar")
        with Horizontal(id="body"):
            yield SiteTree(id="site-tree")
            with VerticalScroll(id="details-box"):
                yield NodeDetails(id="details")
        yield FindingsPanel(id="findings")
        yield CautionBar(id="caution")
        yield KeyBar(id="key-bar")

    @property
    def tree(self) -> SiteTree:
        return self.query_one(SiteTree)

    @property
    def findings(self) -> FindingsPanel:
        return self.query_one(FindingsPanel)

    def on_mount(self) -> None:
        self.tree.focus()
        if site_view(self).has_site:
            self.show_site(keep=None)

    def show_site(self, keep: str | None) -> None:
        """Rebuild the tree (structure changed) and refresh everything else."""
        view = site_view(self)
        worst = view.analysis.worst_by_node() if view.analysis is not None else {}
        current = keep or self.tree.selected_id()
        if current == view.index.root:
            current = None  # the cursor starts on the root anyway
        self.tree.rebuild(view.index, worst, keep=current)
        self.show_details()
        if view.analysis is not None:
            self.findings.show(view.analysis, view.index)

    def retone(self) -> None:
        """The theme changed: redraw what was coloured when it was built."""
        if site_view(self).has_site:
            self.show_site(keep=None)
        self.query_one(KeyBar).refresh_keys()

    #: True when an analysis arrived while another screen was on top (shown on return).
    _analysis_unseen = False

    def show_analysis(self) -> None:
        """A new analysis arrived: marks, findings, details.

        Under another screen (the reading form) nothing is drawn now: the
        findings are filled in once, when this screen is shown again.
        """
        view = site_view(self)
        if view.analysis is None:
            return
        if not self.is_active:
            self._analysis_unseen = True
            return
        self._analysis_unseen = False
        self.tree.set_worst(view.analysis.worst_by_node())
        self.findings.show(view.analysis, view.index)
        self.show_details()

    def on_screen_resume(self) -> None:
        self.query_one(TopBar).screen_shown()
        if self._analysis_unseen:
            self.show_analysis()

    def show_details(self) -> None:
        view = site_view(self)
        if not view.has_site:
            return
        site = view.site
        self.query_one(NodeDetails).show(
            view.index, self.tree.selected_id(), view.analysis, site.latest_visit(), site.site.rules
        )

    def select(self, node_id: str) -> None:
        if self.tree.select_id(node_id):
            self.show_details()

    def focus_tree(self) -> None:
        self.set_focus(self.tree)  # at once, so the next key already goes there

    def focus_findings(self) -> None:
        self.set_focus(self.query_one(FindingsTable))

    @on(Tree.NodeHighlighted, "#site-tree")
    def _highlighted(self) -> None:
        self.show_details()

    def on_descendant_focus(self, event: events.DescendantFocus) -> None:
        if event.widget is self.tree:
            self.show_details()

    @on(FindingsPanel.Highlighted)
    def _finding_highlighted(self, event: FindingsPanel.Highlighted) -> None:
        self.query_one(NodeDetails).show_finding(site_view(self).index, event.finding)

    @on(FindingsPanel.JumpTo)
    def _jump(self, event: FindingsPanel.JumpTo) -> None:
        self.select(event.node_id)
        self.tree.focus()
