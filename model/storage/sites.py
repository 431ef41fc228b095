"""Site files on disk, whole: load one, save one.

``load_site`` never modifies the file it reads and turns every problem into a
:class:`~model.storage.codec.SiteLoadError` with a one-line message naming
the file and where in it the problem is.  ``save_site`` replaces a file
atomically and keeps the previous version beside it as ``<name>.bak``; a save
that fails raises :class:`~model.storage.files.SaveError` and leaves the file
on disk as it was.  The app and the commands that change a site go through
:class:`model.storage.session.EditSession` instead, which adds the editing
lock and the recovery journal.
"""

from __future__ import annotations

import os
from dataclasses import dataclass

from model.site.models import SiteFile
from model.storage.codec import digest_bytes, dumps_site, parse_site_versioned
from model.storage.files import read_site_bytes, write_atomic


@dataclass(frozen=True)
class LoadedSite:
    """A site as read from disk, with what the editor needs to know about the file."""

    site: SiteFile
    #: Format version the file was written in (older ones are converted in memory).
    source_version: int
    #: ``sha256:<hex>`` of the file's bytes, to tell whether a journal belongs to it.
    digest: str


def read_site(path: str | os.PathLike[str]) -> LoadedSite:
    """Load a site file with its source version and digest.  The file is never modified."""
    data = read_site_bytes(path)
    site, version = parse_site_versioned(data, path)
    return LoadedSite(site=site, source_version=version, digest=digest_bytes(data))


def load_site(path: str | os.PathLike[str]) -> SiteFile:
    """Load and validate a site file.  The file is never modified."""
    return read_site(path).site


def save_site(site: SiteFile, path: str | os.PathLike[str]) -> None:
    """Write a site file safely.

    The new text goes to a temporary file in the same folder, which is flushed
    and synced to disk; the current file (if any) is kept as ``<name>.bak``;
    the temporary file is then renamed over the original and the folder is
    synced.  A save of identical content changes nothing.  On failure the
    original is left untouched and :class:`~model.storage.files.SaveError`
    says what failed and where.
    """
    write_atomic(path, dumps_site(site).encode("utf-8"), replace=True, backup=True)
