"""Editing a site file: the one API the app and the commands use to change a site on disk.

An :class:`EditSession` holds the site open for editing (with the lock of
:mod:`model.storage.lock`), records every accepted edit (an op of
:mod:`model.site.ops`) in the recovery journal of :mod:`model.storage.journal`
before it returns, and writes the whole file with the atomic writer of
:mod:`model.storage.files` on :meth:`EditSession.save`.  So an edit that has
returned is on disk, whatever happens next; opening the site again replays the
journal (:mod:`model.storage.recovery`) and lists what was recovered.

Files beside ``site.json``: ``site.json.bak`` (the version before the last
save), ``site.json.tripwise-journal`` (edits not yet in the file),
``site.json.tripwise-lock`` (who is editing), and after opening an older
format version, ``site.json.v<N>.bak`` (the file as it was before conversion).
"""

from __future__ import annotations

import contextlib
import json
import os
import re
import threading
from pathlib import Path

from pydantic import ValidationError

from model.site.messages import describe_validation_error
from model.site.models import Reading, SiteFile, SiteInfo, Visit
from model.site.nodes import Node
from model.site.ops import (
    DeleteNodes,
    InvalidEdit,
    Op,
    RenameNode,
    ReplaceSite,
    SetReading,
    SetSiteInfo,
    UpsertNode,
    UpsertVisit,
    apply_op,
    validated_op,
)
from model.site.terms import FORMAT_VERSION, ID_PATTERN
from model.storage.codec import SiteLoadError, digest_bytes, dumps_site
from model.storage.files import (
    SaveError,
    backup_path,
    canonical_path,
    copy_aside,
    plain_os_error,
    write_atomic,
    write_new_file,
)
from model.storage.journal import COMPACT_BYTES, JournalWriter, journal_path
from model.storage.lock import LockHeld, LockInfo, LockUnavailable, SiteLock
from model.storage.recovery import recover, remove_stray_temp_files, set_aside_old_journal
from model.storage.sidefiles import side_path, temp_name
from model.storage.sites import read_site

_ID_RE = re.compile(ID_PATTERN)

__all__ = ["EditSession", "LockHeld", "LockInfo", "SaveError", "SiteLoadError", "InvalidEdit"]


def _digest_of(path: Path) -> str | None:
    try:
        return digest_bytes(path.read_bytes())
    except OSError:
        return None


class EditSession:
    """A site open in the editor.  See the module docstring.

    ``site`` is replaced, never changed in place, by each edit (consecutive
    sites share unchanged parts), so the caller may keep earlier ``site``
    values, e.g. for undo, but must not mutate them.

    A save may run on another thread (:meth:`snapshot`, :meth:`write_snapshot`): edits,
    writes and closing take turns on one lock, so no edit is cleared from the journal unsaved.
    """

    path: Path
    site: SiteFile
    read_only: bool
    #: One plain line per journal entry replayed on open.
    recovered: list[str]
    #: Things the user should know (torn journal line ignored, file converted, ...).
    warnings: list[str]

    def __init__(
        self,
        path: Path,
        site: SiteFile,
        *,
        read_only: bool,
        digest: str,
        lock: SiteLock | None,
        source_version: int = FORMAT_VERSION,
    ) -> None:
        self.path = path
        self.site = site
        self.read_only = read_only
        self.recovered = []
        self.warnings = []
        self._digest = digest
        self._lock = lock
        self._source_version = source_version
        self._journal: JournalWriter | None = None if read_only else JournalWriter(path, digest)
        self._pending = 0
        self._edits = 0  # edits accepted since opening
        self._turn = threading.RLock()

    # --- opening ------------------------------------------------------------

    @classmethod
    def open(cls, path: str | os.PathLike[str], *, read_only: bool = False) -> EditSession:
        """Open a site; replay its journal.  Raises ``SiteLoadError`` or ``LockHeld``."""
        p = canonical_path(path)
        lock: SiteLock | None = None
        if not read_only:
            if not p.exists():
                raise SiteLoadError(p, "no such file")
            try:
                lock = SiteLock.acquire(p)
            except LockUnavailable as exc:
                raise SiteLoadError(
                    p,
                    f"cannot open for editing: {exc.plain or plain_os_error(exc)} when making "
                    f"the lock file {Path(exc.filename or '').name}; open it read-only instead",
                ) from None
        try:
            loaded = read_site(p)
            s = cls(
                p,
                loaded.site,
                read_only=read_only,
                digest=loaded.digest,
                lock=lock,
                source_version=loaded.source_version,
            )
            if lock is not None and lock.took_over is not None:
                t = lock.took_over
                if (t.host, t.pid) != (lock.info.host, lock.info.pid):
                    s.warnings.append(
                        f"took over the editing lock left by pid {t.pid} on host {t.host} "
                        f"(since {t.since_text()}), which is no longer running"
                    )
            if loaded.source_version < FORMAT_VERSION:
                s.warnings.append(
                    f"{p.name} is in format version {loaded.source_version}; it was converted "
                    f"in memory and will be written as version {FORMAT_VERSION} when you save "
                    f"(the original will be kept as {s._version_backup().name})"
                )
            s._recover()
            if not read_only:
                remove_stray_temp_files(p)
                s._warn_other_names()
        except BaseException:
            if lock is not None:
                lock.release()
            raise
        return s

    @classmethod
    def create(
        cls, path: str | os.PathLike[str], site: SiteFile, *, replace: bool = False
    ) -> EditSession:
        """Write a new site file and open it.

        Without ``replace`` the path must not exist (``FileExistsError``); with
        it, a file there is replaced and kept as ``<name>.bak``.  ``LockHeld``
        when another editor has the file open.
        """
        if os.path.islink(path) and not os.path.exists(path):
            raise SaveError(
                path,
                "creating the file",
                "it is a symbolic link to a file that does not exist; tripwise does not create "
                "a file at the far end of a link",
            )
        p = canonical_path(path)
        if not replace and p.exists():
            raise FileExistsError(f"{p} already exists; tripwise will not overwrite it")
        site = apply_op(
            site, validated_op(ReplaceSite.model_construct(op="replace-site", site=site))
        )
        try:
            lock = SiteLock.acquire(p)
        except LockUnavailable as exc:
            raise SaveError(p, "making the lock file", exc.plain or plain_os_error(exc)) from None
        try:
            data = dumps_site(site).encode("utf-8")
            write_atomic(p, data, replace=replace, backup=True)
            lock.follow_file()
            s = cls(p, site, read_only=False, digest=digest_bytes(data), lock=lock)
            warning = set_aside_old_journal(p)
            if warning:
                s.warnings.append(warning)
        except BaseException:
            lock.release()
            raise
        return s

    def _version_backup(self) -> Path:
        return side_path(self.path, f".v{self._source_version}.bak")

    def _warn_other_names(self) -> None:
        with contextlib.suppress(OSError):
            links = self.path.stat().st_nlink
            if links > 1:
                self.warnings.append(
                    f"{self.path.name} has {links} names on this disk (hard links); a save "
                    "writes a new file under this name only, so the other names keep the "
                    "version of now"
                )

    def check_journal(self) -> None:
        """Raise :class:`SaveError` when no recovery journal can be written beside the file.

        The app calls it on opening, so a read-only folder or a full disk is
        said at once and the site opened read-only, never at the first edit.
        """
        if self.read_only or self._journal is None or self._journal.size:
            return
        probe = temp_name(journal_path(self.path))
        try:
            write_new_file(probe, b"{}\n", None)
        except OSError as exc:
            raise SaveError(
                journal_path(self.path), "starting the recovery journal", plain_os_error(exc)
            ) from exc
        finally:
            with contextlib.suppress(OSError):
                probe.unlink()

    def _recover(self) -> None:
        r = recover(self.path, self.site, self._digest, read_only=self.read_only)
        self.site = r.site
        self.recovered.extend(r.recovered)
        self.warnings.extend(r.warnings)
        self._pending = r.pending
        if r.resume_at is not None and not self.read_only:
            self._journal = JournalWriter(self.path, self._digest, existing_size=r.resume_at)

    # --- state --------------------------------------------------------------

    @property
    def dirty(self) -> bool:
        """True when the journal holds edits not yet written to the site file."""
        return self._pending > 0

    def _check_writable(self) -> None:
        if self.read_only:
            raise PermissionError(f"{self.path.name} is open read-only; nothing can be changed")
        if self._journal is None or (self._lock is not None and not self._lock.held):
            raise PermissionError(f"{self.path.name} is closed; open it again to edit")

    def _commit(self, op: Op, *, trusted: bool = False) -> None:
        """Validate, journal (synced), then show: the order that makes edits survive crashes."""
        if not trusted:
            op = validated_op(op)
        with self._turn:
            self._check_writable()
            new_site = apply_op(self.site, op)
            assert self._journal is not None
            self._journal.append(op)
            self.site = new_site
            self._pending += 1
            self._edits += 1
            if self._journal.size > COMPACT_BYTES and self._pending > 1:
                with contextlib.suppress(SaveError):
                    self._journal.compact(self.site)
                    self._pending = 1

    # --- edits --------------------------------------------------------------

    def set_reading(self, visit_id: str, device_id: str, reading: Reading | None) -> None:
        """Record (or with None remove) one device's reading on one visit."""
        self._check_writable()
        if reading is not None:
            # re-check the reading itself (it may have been built without validation)
            raw = reading.model_dump(mode="json", exclude_defaults=True)
            try:
                reading = Reading.model_validate(json.loads(json.dumps(raw)))
            except ValidationError as exc:
                problem = describe_validation_error(exc, raw)
                raise InvalidEdit(f"reading for {device_id}: {problem}") from None
            except (TypeError, ValueError) as exc:
                raise InvalidEdit(f"reading for {device_id}: {exc}") from None
        op: Op = SetReading.model_construct(
            op="set-reading", visit=visit_id, device=device_id, reading=reading
        )
        if not _is_id(visit_id) or not _is_id(device_id):
            op = validated_op(op)
        self._commit(op, trusted=True)

    def upsert_node(self, node: Node) -> None:
        """Add a node, or replace the node with the same id (the whole tree is checked)."""
        self._commit(UpsertNode.model_construct(op="upsert-node", node=node))

    def delete_nodes(self, ids: list[str]) -> None:
        """Remove nodes and their readings; children not also removed make it fail."""
        self._commit(DeleteNodes.model_construct(op="delete-nodes", ids=list(ids)))

    def set_site_info(self, info: SiteInfo) -> None:
        """Replace the site's details."""
        self._commit(SetSiteInfo.model_construct(op="set-site-info", info=info))

    def upsert_visit(self, visit: Visit) -> None:
        """Add a visit, or replace the one with the same id (its readings included)."""
        self._commit(UpsertVisit.model_construct(op="upsert-visit", visit=visit))

    def rename_node(self, old: str, new: str) -> None:
        """Give a node a new id; its children and its readings on every visit follow it."""
        self._commit(RenameNode.model_construct(op="rename-node", old=old, new=new))

    def replace_site(self, site: SiteFile) -> None:
        """Any other edit (move, copy a subtree, undo): the whole new site."""
        self._commit(ReplaceSite.model_construct(op="replace-site", site=site))

    # --- saving -------------------------------------------------------------

    def save(self) -> None:
        """Write the whole file atomically (keeping the backup), then clear the journal."""
        with self._turn:  # no edit comes between the snapshot and the write
            self.write_snapshot(self.snapshot())

    def snapshot(self) -> tuple[int, bytes]:
        """(edits accepted so far, the site encoded for the file); touches no file (any thread)."""
        with self._turn:
            site, edits = self.site, self._edits
        return edits, dumps_site(site).encode("utf-8")

    def write_snapshot(self, snap: tuple[int, bytes]) -> bool:
        """Write a :meth:`snapshot` as :meth:`save` does (any thread); False, writing nothing,
        when an edit came after it (the journal keeps it: save again)."""
        with self._turn:
            self._check_writable()
            if snap[0] != self._edits:
                return False
            self._write(snap[1])
            return True

    def _write(self, data: bytes) -> None:
        on_disk = _digest_of(self.path)
        if on_disk is not None and on_disk != self._digest:
            self.warnings.append(
                f"{self.path.name} was changed outside tripwise while it was open; that "
                f"version is kept as {backup_path(self.path).name}"
            )
        if self._source_version < FORMAT_VERSION and self.path.exists():
            vb = self._version_backup()
            if not vb.exists():
                try:
                    copy_aside(self.path, vb)
                except OSError as exc:
                    raise SaveError(
                        self.path, f"keeping the original as {vb.name}", plain_os_error(exc)
                    ) from exc
        new_digest = digest_bytes(data)
        assert self._journal is not None
        self._journal.mark_saving(new_digest)
        write_atomic(self.path, data, replace=True, backup=True)
        if self._lock is not None:
            with contextlib.suppress(LockHeld):
                self._lock.follow_file()
        self._digest = new_digest
        self._source_version = FORMAT_VERSION
        self._pending = 0
        try:
            self._journal.clear(self._digest)
        except OSError as exc:
            # The file holds every edit; a journal left behind is recognised as saved.
            self.warnings.append(
                f"saved, but the recovery journal could not be cleared: {plain_os_error(exc)}"
            )

    def close(self) -> None:
        """Release the lock (does not save; unsaved edits stay in the journal); a save
        running on another thread finishes first."""
        with self._turn:
            if self._journal is not None:
                self._journal.close()
            if self._lock is not None:
                self._lock.release()

    def __enter__(self) -> EditSession:
        return self

    def __exit__(self, *exc: object) -> None:
        self.close()


def _is_id(text: object) -> bool:
    """True for a string that fits the id pattern of :data:`model.site.terms.NodeId`."""
    return isinstance(text, str) and _ID_RE.match(text) is not None
