"""Helpers shared by the sub-commands: loading a site, and writing one as the app does."""

from __future__ import annotations

import sys
from pathlib import Path

from model.site.models import SiteFile
from model.storage.codec import SiteLoadError
from model.storage.files import canonical_path
from model.storage.journal import journal_path
from model.storage.lock import LockHeld, SiteLock
from model.storage.session import EditSession
from model.storage.sites import load_site, save_site


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


def write_site(path: Path, site: SiteFile, *, replace: bool) -> None:
    """Write a whole site file the way the app saves one.

    Through :meth:`EditSession.create`: under the editing lock (``LockHeld``
    when another editor has the file open), atomically, the file replaced (only
    with ``replace``) kept as ``<name>.bak``.

    A recovery journal beside the file holds edits an app session did not
    save.  They are not in what the command read, so they are neither replayed
    nor dropped: the file is written alone, still under the lock, and the
    journal is left for the app, which sets those edits aside and says so when
    it next opens the site.
    """
    if journal_path(path).exists():
        lock = SiteLock.acquire(canonical_path(path))
        try:
            save_site(site, path)
        finally:
            lock.release()
        return
    EditSession.create(path, site, replace=replace).close()


def report_held(path: str | Path, exc: LockHeld) -> int:
    """Refuse to write a site another editor holds: one line on stderr; exit code 2."""
    print(f"tripwise: cannot write {path}: {exc}; nothing written", file=sys.stderr)
    return 2
