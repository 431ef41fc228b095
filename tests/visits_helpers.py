"""Small hand-made sites with several visits, shared by the visits, compare and merge tests.

The tree and readings here are invented for the tests; the limits they are
checked against are named beside each assertion in the tests.
"""

from __future__ import annotations

import copy
import shutil
from pathlib import Path
from typing import Any

from model.site import SiteFile

REPO = Path(__file__).resolve().parents[1]
SAMPLES = REPO / "sample_sites"

NODES: list[dict[str, Any]] = [
    {"id": "supply", "kind": "origin", "label": "Supply"},
    {"id": "cu", "kind": "board", "parent": "supply", "label": "Consumer unit"},
    {"id": "rc1", "kind": "rccb", "parent": "cu", "label": "RCCB 1", "idn_ma": 30, "waveform": "A"},
    {"id": "c1", "kind": "circuit", "parent": "rc1", "label": "Sockets", "use": "sockets"},
    {"id": "rc2", "kind": "rccb", "parent": "cu", "label": "RCCB 2", "idn_ma": 30, "waveform": "A"},
    {"id": "c2", "kind": "circuit", "parent": "rc2", "label": "Lights", "use": "lighting"},
    {"id": "m3", "kind": "mcb", "parent": "cu", "label": "MCB 3", "rated_a": 16},
    {"id": "c3", "kind": "circuit", "parent": "m3", "label": "Boiler", "use": "heating"},
]


def site_dict(
    visits: list[tuple[str, str, dict[str, dict[str, Any]]]],
    nodes: list[dict[str, Any]] | None = None,
    trend: dict[str, float] | None = None,
) -> dict[str, Any]:
    """A site document: ``visits`` as (id, date, readings by device)."""
    info: dict[str, Any] = {"name": "Test site (invented)", "earthing": "TN-C-S", "ze_ohm": 0.3}
    if trend is not None:
        info["trend"] = trend
    return {
        "format": "tripwise.site",
        "version": 1,
        "site": info,
        "nodes": copy.deepcopy(NODES if nodes is None else nodes),
        "visits": [
            {"id": vid, "date": date, "readings": copy.deepcopy(readings)}
            for vid, date, readings in visits
        ],
    }


def make_site(
    visits: list[tuple[str, str, dict[str, dict[str, Any]]]],
    nodes: list[dict[str, Any]] | None = None,
    trend: dict[str, float] | None = None,
) -> SiteFile:
    return SiteFile.model_validate(site_dict(visits, nodes, trend))


def sample_copy(tmp_path: Path, name: str = "oak-lane-house", dest: str | None = None) -> Path:
    """A copy of a bundled sample in ``tmp_path`` (the samples themselves are never touched)."""
    out = tmp_path / (dest or f"{name}.json")
    shutil.copyfile(SAMPLES / f"{name}.json", out)
    return out


def run_cli(*args: str, stdin: str | None = None) -> Any:
    """Run ``python -m tui ARGS`` from the worktree root; the completed process."""
    import subprocess
    import sys

    return subprocess.run(
        [sys.executable, "-m", "tui", *args],
        cwd=REPO,
        capture_output=True,
        text=True,
        input=stdin,
        timeout=120,
    )
