"""Reading a site for a command: one clear line on stderr for every problem.

Kept apart from the writing helpers (:mod:`tui.cli.commands.common`) so that a
command that only reads a site does not import the editing session, the lock
and the edit replay it never uses (start-up time).
"""

from __future__ import annotations

import contextlib
import os
import sys

from model.site.models import SiteFile
from model.storage.codec import SiteLoadError
from model.storage.sidefiles import journal_path
from model.storage.sites import load_site


def say(message: str) -> None:
    """One line on stderr, prefixed with the program's name."""
    print(f"tripwise: {message}", file=sys.stderr)


def load_or_report(path: str) -> SiteFile | None:
    """Load a site; on failure print one clear line to stderr and return None.

    When the site has edits in its recovery journal that are not yet in the
    file, a note on stderr says so (commands read the file as saved).
    """
    try:
        site = load_site(path)
    except SiteLoadError as exc:
        say(f"cannot load {exc}")
        return None
    with contextlib.suppress(OSError):
        jp = journal_path(path)
        if os.path.lexists(jp):
            say(
                f"note: {path} has edits not yet saved into the file (in {jp.name}); "
                "open it in tripwise to recover them"
            )
    return site
