"""The recovery journal: every accepted edit on disk before it is shown as saved.

Beside ``site.json`` the editor keeps ``site.json.tripwise-journal``, a file
of JSON lines.  The first line is a header naming the digest of the site file
the edits apply to::

    {"journal": "tripwise.journal", "version": 1, "base": "sha256:…"}

and each further line is one small edit (an *op*), appended and synced to
disk before the edit is reported as saved::

    {"op": "set-reading", "visit": "2026-11-14", "device": "rc1", "reading": {"x1_0": 22.0}}
    {"op": "upsert-node", "node": {"id": "c9", "parent": "m3", "kind": "circuit", …}}
    {"op": "delete-nodes", "ids": ["m3", "c9"]}
    {"op": "set-site-info", "info": {…}}
    {"op": "upsert-visit", "visit": {…}}
    {"op": "replace-site", "site": {…whole site file…}}

A full save first appends ``{"saving": "sha256:…"}`` (the digest the file is
about to have), then replaces the file, then removes the journal; a journal
found with a ``saving`` digest equal to the file's is already in the file.

:func:`apply_op` is the pure function that turns a site and an op into the
next site, validating the result; live edits and replay on open use the same
function, so a journal replays to exactly what the editor showed.  A last line
cut off by a crash is ignored with a warning; so is a damaged line.
"""

from __future__ import annotations

import contextlib
import datetime as dt
import errno
import json
import os
from collections.abc import Iterator
from dataclasses import dataclass, field
from pathlib import Path
from typing import Annotated, Any, Literal

from pydantic import BaseModel, ConfigDict, Field, TypeAdapter, ValidationError

from model.site.models import Reading, SiteFile, SiteInfo, Visit
from model.site.nodes import Node
from model.site.terms import RCD_KINDS, NodeId
from model.storage.store import (
    SaveError,
    describe_validation_error,
    fsync_dir,
    one_line,
    plain_os_error,
    site_to_dict,
    temp_name,
    write_new_file,
)

#: Suffix of the journal beside a site file (``site.json.tripwise-journal``).
JOURNAL_SUFFIX = ".tripwise-journal"
JOURNAL_FORMAT = "tripwise.journal"
JOURNAL_VERSION = 1
#: A journal larger than this is rewritten as one whole-site entry. [bytes]
COMPACT_BYTES = 8 * 1024 * 1024
#: Largest journal that is read back. [bytes]
MAX_JOURNAL_BYTES = 256 * 1024 * 1024


def journal_path(site_path: str | os.PathLike[str]) -> Path:
    """The journal file of a site file."""
    p = Path(site_path)
    return p.with_name(p.name + JOURNAL_SUFFIX)


class InvalidEdit(ValueError):
    """An edit that would make the site invalid; nothing was changed.  ``str()`` is one line."""

    def __init__(self, message: str) -> None:
        super().__init__(one_line(message))


_OP_CONFIG = ConfigDict(extra="forbid", strict=True)


class SetReading(BaseModel):
    """Set (or, with ``reading`` null, remove) one device's reading on one visit."""

    model_config = _OP_CONFIG
    op: Literal["set-reading"] = "set-reading"
    visit: NodeId = Field(description="Visit id.")
    device: NodeId = Field(description="Residual-current device id.")
    reading: Reading | None = Field(default=None, description="The reading; null removes it.")


class UpsertNode(BaseModel):
    """Add a node, or replace the node with the same id (keeping its place in the list)."""

    model_config = _OP_CONFIG
    op: Literal["upsert-node"] = "upsert-node"
    node: Node = Field(description="The node.")


class DeleteNodes(BaseModel):
    """Remove nodes (and their readings on every visit)."""

    model_config = _OP_CONFIG
    op: Literal["delete-nodes"] = "delete-nodes"
    ids: list[NodeId] = Field(min_length=1, description="Ids of the nodes to remove.")


class SetSiteInfo(BaseModel):
    """Replace the site's details."""

    model_config = _OP_CONFIG
    op: Literal["set-site-info"] = "set-site-info"
    info: SiteInfo = Field(description="The new details.")


class UpsertVisit(BaseModel):
    """Add a visit, or replace the visit with the same id (readings included)."""

    model_config = _OP_CONFIG
    op: Literal["upsert-visit"] = "upsert-visit"
    visit: Visit = Field(description="The visit.")


class ReplaceSite(BaseModel):
    """Replace the whole site (moves, copies, undo: any other edit)."""

    model_config = _OP_CONFIG
    op: Literal["replace-site"] = "replace-site"
    site: SiteFile = Field(description="The whole new site.")


Op = Annotated[
    SetReading | UpsertNode | DeleteNodes | SetSiteInfo | UpsertVisit | ReplaceSite,
    Field(discriminator="op"),
]
_OP_ADAPTER: TypeAdapter[Op] = TypeAdapter(Op)


def op_to_dict(op: Op) -> dict[str, Any]:
    """The JSON-ready form of an op (defaults left out, like the site file)."""
    if isinstance(op, SetReading):
        reading = None if op.reading is None else op.reading.model_dump(exclude_defaults=True)
        return {"op": op.op, "visit": op.visit, "device": op.device, "reading": reading}
    if isinstance(op, ReplaceSite):
        return {"op": op.op, "site": site_to_dict(op.site)}
    return op.model_dump(mode="json", exclude_defaults=True) | {"op": op.op}


def op_from_dict(data: Any) -> Op:
    """Validate an op read from a journal line (``ValidationError`` when it is not one)."""
    return _OP_ADAPTER.validate_python(data)


def validated_op(op: Op) -> Op:
    """The op re-read from its JSON form: checks models that were built without validation."""
    try:
        return op_from_dict(json.loads(json.dumps(op_to_dict(op))))
    except ValidationError as exc:
        raise InvalidEdit(describe_validation_error(exc, op_to_dict(op))) from None
    except (TypeError, ValueError) as exc:
        raise InvalidEdit(f"not a valid edit: {exc}") from None


def describe_op(op: Op) -> str:
    """One plain line saying what an op did ("reading for rc1 on visit 2026-11-14")."""
    if isinstance(op, SetReading):
        if op.reading is None:
            return f"removal of the reading for {op.device} on visit {op.visit}"
        return f"reading for {op.device} on visit {op.visit}"
    if isinstance(op, UpsertNode):
        return f"{op.node.kind} {op.node.id}"
    if isinstance(op, DeleteNodes):
        shown = ", ".join(op.ids[:5]) + (f" and {len(op.ids) - 5} more" if len(op.ids) > 5 else "")
        return f"deletion of {shown}"
    if isinstance(op, SetSiteInfo):
        return "site details"
    if isinstance(op, UpsertVisit):
        return f"visit {op.visit.id}"
    return "whole-site edit"


def _revalidate(site: SiteFile, **changes: Any) -> SiteFile:
    """A new site with ``changes``, checked as a whole (the parts are already valid models)."""
    doc: dict[str, Any] = {
        "format": site.format,
        "version": site.version,
        "site": site.site,
        "nodes": site.nodes,
        "visits": site.visits,
    }
    doc.update(changes)
    try:
        return SiteFile.model_validate(doc)
    except ValidationError as exc:
        raise InvalidEdit(describe_validation_error(exc, site_to_dict(site))) from None


def apply_op(site: SiteFile, op: Op) -> SiteFile:
    """The site after ``op``; ``site`` itself is never changed.

    Raises :class:`InvalidEdit` (a ``ValueError``) with a one-line message
    when the result would not be a valid site.
    """
    if isinstance(op, SetReading):
        return _set_reading(site, op)
    if isinstance(op, UpsertNode):
        nodes = list(site.nodes)
        for i, n in enumerate(nodes):
            if n.id == op.node.id:
                nodes[i] = op.node
                break
        else:
            nodes.append(op.node)
        return _revalidate(site, nodes=nodes)
    if isinstance(op, DeleteNodes):
        gone = set(op.ids)
        known = {n.id for n in site.nodes}
        missing = [i for i in op.ids if i not in known]
        if missing:
            raise InvalidEdit(f"cannot delete {', '.join(missing[:5])}: no such node")
        nodes = [n for n in site.nodes if n.id not in gone]
        orphans = [n.id for n in nodes if n.parent in gone]
        if orphans:
            raise InvalidEdit(
                f"cannot delete {', '.join(sorted(gone & {n.parent for n in nodes if n.parent}))}: "
                f"{', '.join(orphans[:5])} would be left without a parent (delete them too, "
                "or move them first)"
            )
        visits = [
            v
            if not gone & v.readings.keys()
            else v.model_copy(
                update={"readings": {k: r for k, r in v.readings.items() if k not in gone}}
            )
            for v in site.visits
        ]
        return _revalidate(site, nodes=nodes, visits=visits)
    if isinstance(op, SetSiteInfo):
        return site.model_copy(update={"site": op.info})
    if isinstance(op, UpsertVisit):
        visits = list(site.visits)
        for i, v in enumerate(visits):
            if v.id == op.visit.id:
                visits[i] = op.visit
                break
        else:
            visits.append(op.visit)
        return _revalidate(site, visits=visits)
    return op.site


def _set_reading(site: SiteFile, op: SetReading) -> SiteFile:
    """Fast path: only what a reading can break is checked (visit and device exist, device is an RCD)."""
    vi = next((i for i, v in enumerate(site.visits) if v.id == op.visit), -1)
    if vi < 0:
        raise InvalidEdit(f"no visit {op.visit!r} in this site")
    visit = site.visits[vi]
    if op.reading is not None:
        for n in site.nodes:
            if n.id == op.device:
                if n.kind not in RCD_KINDS:
                    raise InvalidEdit(
                        f"{op.device} is a {n.kind}; readings are for residual-current devices"
                    )
                break
        else:
            raise InvalidEdit(f"no device {op.device!r} in this site")
    readings = dict(visit.readings)
    if op.reading is None:
        if op.device not in readings:
            return site
        del readings[op.device]
    else:
        readings[op.device] = op.reading
    visits = list(site.visits)
    visits[vi] = visit.model_copy(update={"readings": readings})
    return site.model_copy(update={"visits": visits})


# --- the journal file -------------------------------------------------------


@dataclass
class JournalContents:
    """What a journal file holds, read without changing it."""

    path: Path
    #: Digest of the site file the ops apply to (None when the header is unreadable).
    base: str | None
    ops: list[Op] = field(default_factory=list)
    #: Digests of full saves that were begun while this journal was in use.
    saving: list[str] = field(default_factory=list)
    warnings: list[str] = field(default_factory=list)
    #: Bytes up to the end of the last whole line (a torn tail starts here).
    good_size: int = 0
    size: int = 0


def _header(base: str) -> bytes:
    return (
        json.dumps({"journal": JOURNAL_FORMAT, "version": JOURNAL_VERSION, "base": base}) + "\n"
    ).encode("utf-8")


def _lines(data: bytes) -> Iterator[tuple[int, bytes, int]]:
    """(line number, line bytes, offset just past its newline) for each whole line."""
    pos = 0
    lineno = 0
    while True:
        nl = data.find(b"\n", pos)
        if nl < 0:
            return
        lineno += 1
        yield lineno, data[pos:nl], nl + 1
        pos = nl + 1


def read_journal(path: str | os.PathLike[str]) -> JournalContents | None:
    """Read a journal (None when there is none).  Never raises for damaged content."""
    jp = Path(path)
    try:
        with open(jp, "rb") as fh:
            data = fh.read(MAX_JOURNAL_BYTES + 1)
    except FileNotFoundError:
        return None
    except OSError as exc:
        out = JournalContents(jp, None)
        out.warnings.append(
            f"the recovery journal {jp.name} could not be read: {plain_os_error(exc)}"
        )
        return out
    out = JournalContents(jp, None, size=len(data))
    if len(data) > MAX_JOURNAL_BYTES:
        out.warnings.append(f"the recovery journal {jp.name} is too large to read")
        return out
    for lineno, line, end in _lines(data):
        out.good_size = end
        try:
            item = json.loads(line.decode("utf-8"))
        except (UnicodeDecodeError, ValueError, RecursionError):
            item = None
        if lineno == 1:
            if (
                isinstance(item, dict)
                and item.get("journal") == JOURNAL_FORMAT
                and item.get("version") == JOURNAL_VERSION
                and isinstance(item.get("base"), str)
            ):
                out.base = item["base"]
                continue
            out.warnings.append(
                f"the recovery journal {jp.name} is not one this tripwise can read; it was ignored"
            )
            return out
        if item is None:
            out.warnings.append(
                f"entry {lineno} of the recovery journal is damaged and was ignored"
            )
            continue
        if isinstance(item, dict) and isinstance(item.get("saving"), str) and len(item) == 1:
            out.saving.append(item["saving"])
            continue
        try:
            out.ops.append(op_from_dict(item))
        except ValidationError as exc:
            out.warnings.append(
                f"entry {lineno} of the recovery journal is not a valid edit and was ignored "
                f"({describe_validation_error(exc, item)})"
            )
    if out.good_size < len(data):
        if out.base is None and out.good_size == 0:
            out.warnings.append(
                f"the recovery journal {jp.name} was cut off before its first line; it was ignored"
            )
        else:
            out.warnings.append(
                "the last entry of the recovery journal was cut off (tripwise stopped while "
                "writing it) and was ignored"
            )
    return out


class JournalWriter:
    """Appends ops to a site's journal, each synced to disk before ``append`` returns."""

    def __init__(self, site_path: Path, base: str, *, existing_size: int | None = None) -> None:
        self.path = journal_path(site_path)
        self.base = base
        self._fd: int | None = None
        self._size = 0
        if existing_size is not None:
            self._open_existing(existing_size)

    @property
    def size(self) -> int:
        """Bytes in the journal now (0 when there is none)."""
        return self._size if self._fd is not None else 0

    def _open_existing(self, good_size: int) -> None:
        fd = os.open(self.path, os.O_WRONLY | getattr(os, "O_CLOEXEC", 0))
        try:
            if os.fstat(fd).st_size != good_size:  # drop a torn tail before appending
                os.ftruncate(fd, good_size)
                os.fsync(fd)
        except BaseException:
            os.close(fd)
            raise
        self._fd = fd
        self._size = good_size

    def _start(self, first_lines: bytes = b"") -> None:
        """Put a fresh journal (header and ``first_lines``) in place atomically."""
        tmp = temp_name(self.path)
        write_new_file(tmp, _header(self.base) + first_lines, None)
        try:
            os.replace(tmp, self.path)
        except BaseException:
            tmp.unlink(missing_ok=True)
            raise
        fsync_dir(self.path.parent)
        fd = os.open(self.path, os.O_WRONLY | getattr(os, "O_CLOEXEC", 0))
        self._close_fd()
        self._fd = fd
        self._size = os.fstat(fd).st_size

    def append(self, op: Op) -> None:
        """Write one op and sync it; raises :class:`SaveError` and leaves no partial line."""
        line = (json.dumps(op_to_dict(op), ensure_ascii=False) + "\n").encode("utf-8")
        try:
            if self._fd is None:
                self._start(line)
                return
            start = self._size
            try:
                view = memoryview(line)
                off = start
                while view:
                    n = os.pwrite(self._fd, view, off)
                    view = view[n:]
                    off += n
                _datasync(self._fd)
            except OSError:
                with contextlib.suppress(OSError):
                    os.ftruncate(self._fd, start)
                    _datasync(self._fd)
                raise
            self._size = start + len(line)
        except OSError as exc:
            raise SaveError(
                self.path,
                f"recording the edit in the recovery journal {self.path.name}",
                plain_os_error(exc),
            ) from exc

    def mark_saving(self, digest: str) -> None:
        """Record, before a full save replaces the file, the digest the file is about to get.

        A save cut off after its rename but before :meth:`clear` then leaves
        a journal whose every entry is known to be in the file.
        """
        if self._fd is None:
            return
        line = (json.dumps({"saving": digest}) + "\n").encode("utf-8")
        try:
            os.pwrite(self._fd, line, self._size)
            _datasync(self._fd)
        except OSError as exc:
            with contextlib.suppress(OSError):
                os.ftruncate(self._fd, self._size)
            raise SaveError(
                self.path, f"updating the recovery journal {self.path.name}", plain_os_error(exc)
            ) from exc
        self._size += len(line)

    def compact(self, site: SiteFile) -> None:
        """Rewrite the journal as one whole-site entry (keeps it small after many edits)."""
        line = (json.dumps(op_to_dict(ReplaceSite(site=site)), ensure_ascii=False) + "\n").encode(
            "utf-8"
        )
        try:
            self._start(line)
        except OSError as exc:
            raise SaveError(
                self.path, "compacting the recovery journal", plain_os_error(exc)
            ) from exc

    def clear(self, new_base: str) -> None:
        """Remove the journal after a full save; later ops start a journal on ``new_base``."""
        self._close_fd()
        self.base = new_base
        with contextlib.suppress(FileNotFoundError):
            self.path.unlink()
        fsync_dir(self.path.parent)

    def _close_fd(self) -> None:
        fd, self._fd = self._fd, None
        if fd is not None:
            with contextlib.suppress(OSError):
                os.close(fd)

    def close(self) -> None:
        """Stop writing (the journal stays on disk)."""
        self._close_fd()


def _datasync(fd: int) -> None:
    sync = getattr(os, "fdatasync", os.fsync)
    sync(fd)


def move_aside(path: Path, label: str) -> Path | None:
    """Rename a journal that cannot be applied to ``<site>.<label>-<time>.tripwise-journal``."""
    stamp = dt.datetime.now().strftime("%Y%m%dT%H%M%S")
    stem = path.name[: -len(JOURNAL_SUFFIX)] if path.name.endswith(JOURNAL_SUFFIX) else path.name
    for n in range(100):
        extra = "" if n == 0 else f"-{n}"
        dest = path.with_name(f"{stem}.{label}-{stamp}{extra}{JOURNAL_SUFFIX}")
        if dest.exists():
            continue
        try:
            os.link(path, dest)
            os.unlink(path)
        except FileExistsError:
            continue
        except OSError as exc:
            if exc.errno in (errno.EPERM, errno.ENOTSUP, errno.EXDEV):
                os.replace(path, dest)
            else:
                return None
        fsync_dir(path.parent)
        return dest
    return None
