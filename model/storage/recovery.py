"""What opening a site for editing finds beside it, and what is done with it.

- The recovery journal (:mod:`model.storage.journal`): replayed when it
  belongs to the file as it is; dropped when a save had already put its
  edits in the file; set aside (renamed, never deleted while it holds edits)
  when it cannot be applied.  Every step the user should know of is a warning.
- Temporary files left by a save that was cut off: removed.

A read-only opening replays the journal in memory and changes nothing on disk.
"""

from __future__ import annotations

import contextlib
import os
import re
from dataclasses import dataclass, field
from pathlib import Path

from model.site.models import SiteFile
from model.site.ops import InvalidEdit, apply_op, describe_op
from model.storage.codec import SiteLoadError
from model.storage.files import backup_path
from model.storage.journal import journal_path, move_aside, read_journal
from model.storage.sidefiles import temp_file_of, temp_stem, writer_running


@dataclass
class Recovery:
    """The site as the journal leaves it, and what happened to the journal."""

    site: SiteFile
    #: One plain line per journal entry replayed.
    recovered: list[str] = field(default_factory=list)
    #: Things the user should know (torn entry ignored, journal set aside, ...).
    warnings: list[str] = field(default_factory=list)
    #: Journal entries not yet in the site file (replayed or skipped).
    pending: int = 0
    #: Bytes of the journal to keep appending after (None: the next edit starts a new one).
    resume_at: int | None = None


def recover(path: Path, site: SiteFile, digest: str, *, read_only: bool) -> Recovery:
    """Apply the journal of the site file at ``path``, whose bytes have ``digest``."""
    out = Recovery(site)
    jp = journal_path(path)
    contents = read_journal(jp)
    if contents is None:
        return out
    if contents.refused is not None and not read_only:
        raise SiteLoadError(
            path,
            f"cannot open for editing: {jp.name} {contents.refused}; move it away or open "
            "read-only",
        )
    out.warnings.extend(contents.warnings)
    if contents.base == digest:
        for op in contents.ops:
            try:
                out.site = apply_op(out.site, op)
            except InvalidEdit as exc:
                out.warnings.append(
                    f"the recorded {describe_op(op)} could not be applied and was skipped: {exc}"
                )
                continue
            out.recovered.append(f"recovered {describe_op(op)}")
        out.pending = len(contents.ops)
        out.resume_at = contents.good_size
        return out
    if digest in contents.saving:
        # The last save replaced the file but stopped before it could clear the
        # journal: every entry is already in the file.
        if not read_only:
            _discard(jp)
        return out
    if contents.base is None and not contents.ops:
        if not read_only and not contents.warnings:
            _discard(jp)
        elif not read_only:
            moved = move_aside(jp, "unreadable")
            if moved:
                out.warnings.append(f"the unreadable journal was kept as {moved.name}")
        return out
    n = len(contents.ops)
    if n == 0 and not contents.warnings:
        if not read_only:  # nothing in it but a header: nothing to keep
            _discard(jp)
        return out
    where = ""
    if not read_only:
        moved = move_aside(jp, "unapplied")
        where = f"; they are kept in {moved.name}" if moved else ""
    out.warnings.append(
        f"{path.name} was changed outside tripwise after the recovery journal was "
        f"written, so its {n} unsaved edit{'s were' if n != 1 else ' was'} not applied{where}"
    )
    return out


def set_aside_old_journal(path: Path) -> str | None:
    """Before a new file takes ``path``'s name: rename a journal left by an earlier file.

    Returns the warning to show, or None when there was no journal.
    """
    old = read_journal(journal_path(path))
    if old is None:
        return None
    moved = move_aside(old.path, "unused")
    return "an old recovery journal for a file of this name was set aside" + (
        f" as {moved.name}" if moved else ""
    )


def _discard(jp: Path) -> None:
    with contextlib.suppress(OSError):
        jp.unlink()


def remove_stray_temp_files(path: Path) -> None:
    """Temporary files of this site's file, backups and journal left by a save that was cut off.

    Only the caller holding the editing lock may do this (nobody else saves
    this site); files of a process still running are left alone.  A process
    is told by its id and the token in the name, so a later process that got
    the same id does not keep a dead save's file alive.
    """
    name = path.name
    mine = {temp_stem(n) for n in (name, backup_path(path).name, journal_path(path).name)}
    version_backup = re.compile(re.escape(name) + r"\.v\d+\.bak")
    with contextlib.suppress(OSError):
        for entry in os.scandir(path.parent):
            temp = temp_file_of(entry.name)
            if temp is None:
                continue
            stem, pid, token = temp
            if (stem in mine or version_backup.fullmatch(stem)) and not writer_running(pid, token):
                with contextlib.suppress(OSError):
                    os.unlink(entry.path)
