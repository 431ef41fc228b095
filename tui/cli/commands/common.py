"""Helpers shared by the sub-commands."""

from __future__ import annotations

import sys

from model.site.models import SiteFile
from model.storage.codec import SiteLoadError
from model.storage.journal import journal_path
from model.storage.sites import load_site


def load_or_report(path: str) -> SiteFile | None:
    """Load a site; on failure print one clear line to stderr and return None.

    When the site has edits in its recovery journal that are not yet in the
    file, a note on stderr says so (commands read the file as saved).
    """
    try:
        site = load_site(path)
    except SiteLoadError as exc:
        print(f"tripwise: cannot load {exc}", file=sys.stderr)
        return None
    if journal_path(path).exists():
        print(
            f"tripwise: note: {path} has edits not yet saved into the file "
            f"(in {journal_path(path).name}); open it in tripwise to recover them",
            file=sys.stderr,
        )
    return site
