"""Small helpers shared by the storage tests."""

from __future__ import annotations

import hashlib
from pathlib import Path

from model.site.models import SiteFile
from model.site.terms import RCD_KINDS


def rcd_ids(site: SiteFile) -> list[str]:
    """Ids of the residual-current devices, in tree-list order."""
    return [n.id for n in site.nodes if n.kind in RCD_KINDS]


def file_digest(p: Path) -> str:
    return hashlib.sha256(p.read_bytes()).hexdigest()
