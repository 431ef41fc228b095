"""Helpers shared by the sub-commands: loading a site (from :mod:`tui.cli.loading`), and
writing one as the app does."""

from __future__ import annotations

import os
from pathlib import Path

from model.site.models import SiteFile
from model.site.ops import InvalidEdit
from model.storage.codec import SiteLoadError, dumps_site
from model.storage.files import SaveError, backup_path
from model.storage.lock import LockHeld
from model.storage.session import EditSession
from model.storage.sidefiles import protected_reason
from model.storage.sites import read_site
from tui.cli.loading import load_or_report as load_or_report
from tui.cli.loading import say as say


class SiteChanged(Exception):
    """The site on disk is no longer the one the command showed its changes against."""


def write_site(
    path: Path, site: SiteFile, *, replace: bool, expect: SiteFile | None = None
) -> list[str]:
    """Write a whole site file through an editing session, as the app saves one.

    A new file is made by :meth:`EditSession.create`.  An existing one (only
    with ``replace``) is opened for editing: the editing lock is taken
    (``LockHeld`` names the holder), and a journal left by an editor that
    stopped is replayed and saved into the file first, so the version
    replaced, kept as ``<name>.bak``, holds those edits.  With ``expect``
    the site as opened (journal included) must still be ``expect``
    (:class:`SiteChanged` otherwise).  Returns the notes for the user.
    """
    if not os.path.exists(path):  # nothing there, or a link to nothing (refused by create)
        with EditSession.create(path, site) as s:
            return list(s.warnings)
    if not replace:
        raise FileExistsError(f"{path} already exists")
    try:
        read_site(path)
    except SiteLoadError:  # not a site (replaced under the lock; any journal is set aside)
        with EditSession.create(path, site, replace=True) as s:
            return list(s.warnings)
    with EditSession.open(path) as s:
        notes = list(s.warnings)
        if expect is not None and dumps_site(s.site) != dumps_site(expect):
            raise SiteChanged(f"{path} changed while this command ran")
        if s.dirty:
            s.save()
            notes.append(
                f"{len(s.recovered)} unsaved edit(s) found in the recovery journal were "
                f"saved first; that version is kept as {backup_path(s.path).name}"
            )
        s.replace_site(site)
        s.save()
        notes.extend(s.warnings[len(notes) :])
    return notes


def save_or_report(
    path: Path, site: SiteFile, *, replace: bool, expect: SiteFile | None = None
) -> int:
    """:func:`write_site`, every refusal and failure said in one line; 0 written, 2 not."""
    refused = protected_reason(path, sites_too=False)
    if refused is not None:
        say(f"cannot write {path}: {refused}; nothing written")
        return 2
    try:
        notes = write_site(path, site, replace=replace, expect=expect)
    except LockHeld as exc:
        return report_held(path, exc)
    except SiteChanged:
        say(f"{path} changed on disk while this command ran; nothing written (run it again)")
        return 2
    except FileExistsError:
        say(f"{path} already exists; not overwritten")
        return 2
    except SiteLoadError as exc:
        say(f"cannot write {exc}; nothing written")
        return 2
    except (SaveError, InvalidEdit) as exc:
        say(f"{exc}")
        return 2
    except (OSError, RuntimeError) as exc:
        say(f"cannot write {path}: {getattr(exc, 'strerror', None) or exc}; nothing written")
        return 2
    for line in notes:
        say(f"note: {line}")
    return 0


def report_held(path: str | Path, exc: LockHeld) -> int:
    """Refuse to write a site another editor holds: one line on stderr; exit code 2."""
    say(f"cannot write {path}: {exc}; nothing written")
    return 2
