"""Helpers shared by the sub-commands."""

from __future__ import annotations

import sys

from model.site import SiteFile
from model.store import SiteLoadError, load_site


def load_or_report(path: str) -> SiteFile | None:
    """Load a site; on failure print one clear line to stderr and return None."""
    try:
        return load_site(path)
    except SiteLoadError as exc:
        print(f"tripwise: cannot load {exc}", file=sys.stderr)
        return None
