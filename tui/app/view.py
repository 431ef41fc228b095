"""What a screen may read of the open site: a typed, read-only view of the app.

Screens read the site, its index and the last analysis through this view; every
change goes up to the app as a posted message (or as a screen's dismiss result),
and the app alone changes the site.
"""

from __future__ import annotations

from typing import Protocol, cast

from textual.dom import DOMNode

from model.rules.findings import Analysis
from model.site.models import SiteFile
from model.site.tree import SiteIndex


class SiteView(Protocol):
    """The open site as the app holds it now."""

    @property
    def has_site(self) -> bool:
        """False only while the app waits to know whether the site can be opened."""
        ...

    @property
    def site(self) -> SiteFile: ...

    @property
    def index(self) -> SiteIndex: ...

    @property
    def analysis(self) -> Analysis | None:
        """The last finished analysis (None until the first one is done)."""
        ...


def site_view(node: DOMNode) -> SiteView:
    """The app a screen or widget belongs to, as a view of its site."""
    return cast(SiteView, node.app)
