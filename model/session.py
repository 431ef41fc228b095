"""An editing session on one site file (interim version, without a journal).

Each edit validates first and changes nothing when it is refused (``ValueError``
or pydantic ``ValidationError``); ``save`` writes the file safely.  This module
keeps the public interface of the editing API so the app can be built against it.
"""

from __future__ import annotations

import os
from pathlib import Path
from typing import Any

from model.site import RCD_KINDS, Reading, SiteFile, SiteInfo, Visit
from model.store import dumps_site, load_site, save_site, site_to_dict


class LockHeld(Exception):
    """Another session holds the site file; ``str()`` names the holder."""


class EditSession:
    """One open site file and the edits made to it."""

    def __init__(self, path: Path, site: SiteFile, *, read_only: bool = False) -> None:
        self.path = path
        self.site = site
        self.read_only = read_only
        self.recovered: list[str] = []
        self.warnings: list[str] = []
        self.dirty = False

    @classmethod
    def open(cls, path: str | os.PathLike[str], *, read_only: bool = False) -> EditSession:
        """Open a site file (raises ``model.store.SiteLoadError``)."""
        p = Path(path)
        return cls(p, load_site(p), read_only=read_only)

    @classmethod
    def create(cls, path: str | os.PathLike[str], site: SiteFile) -> EditSession:
        """Write a new site file; refuses to overwrite one (``FileExistsError``)."""
        p = Path(path)
        site = SiteFile.model_validate(site_to_dict(site))
        with open(p, "xb") as fh:
            fh.write(dumps_site(site).encode("utf-8"))
            fh.flush()
            os.fsync(fh.fileno())
        return cls(p, site)

    def _check_writable(self) -> None:
        if self.read_only:
            raise ValueError("the site is open read-only")

    def _replace(self, data: dict[str, Any]) -> None:
        self._check_writable()
        self.site = SiteFile.model_validate(data)
        self.dirty = True

    def _data(self) -> dict[str, Any]:
        return self.site.model_dump()

    def set_reading(self, visit_id: str, device_id: str, reading: Reading | None) -> None:
        """Record (or with None remove) one device's reading on one visit."""
        self._check_writable()
        if reading is not None:
            reading = Reading.model_validate(reading.model_dump())
        node = next((n for n in self.site.nodes if n.id == device_id), None)
        if node is None:
            raise ValueError(f"no node with id {device_id!r}")
        if node.kind not in RCD_KINDS:
            raise ValueError(f"readings are for residual-current devices, not a {node.kind}")
        visits = list(self.site.visits)
        for i, v in enumerate(visits):
            if v.id == visit_id:
                readings = dict(v.readings)
                if reading is None:
                    readings.pop(device_id, None)
                else:
                    readings[device_id] = reading
                visits[i] = v.model_copy(update={"readings": readings})
                break
        else:
            raise ValueError(f"no visit with id {visit_id!r}")
        self.site = self.site.model_copy(update={"visits": visits})
        self.dirty = True

    def upsert_node(self, node: Any) -> None:
        """Add a node, or replace the node with the same id."""
        data = self._data()
        new = node.model_dump()
        for i, n in enumerate(data["nodes"]):
            if n["id"] == new["id"]:
                data["nodes"][i] = new
                break
        else:
            data["nodes"].append(new)
        self._replace(data)

    def delete_nodes(self, ids: list[str]) -> None:
        """Remove these nodes and their readings."""
        gone = set(ids)
        data = self._data()
        data["nodes"] = [n for n in data["nodes"] if n["id"] not in gone]
        for v in data["visits"]:
            v["readings"] = {k: r for k, r in v["readings"].items() if k not in gone}
        self._replace(data)

    def set_site_info(self, info: SiteInfo) -> None:
        data = self._data()
        data["site"] = info.model_dump()
        self._replace(data)

    def upsert_visit(self, visit: Visit) -> None:
        data = self._data()
        new = visit.model_dump()
        for i, v in enumerate(data["visits"]):
            if v["id"] == new["id"]:
                data["visits"][i] = new
                break
        else:
            data["visits"].append(new)
        self._replace(data)

    def replace_site(self, site: SiteFile) -> None:
        self._replace(site.model_dump())

    def save(self) -> None:
        """Write the site to its file (temporary file, fsync, rename)."""
        self._check_writable()
        save_site(self.site, self.path)
        self.dirty = False

    def close(self) -> None:
        """End the session (nothing to release in this version)."""
