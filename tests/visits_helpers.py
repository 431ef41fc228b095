"""Small hand-made sites with several visits, shared by the visits, compare and merge tests.

The tree and readings here are invented for the tests; the limits they are
checked against are named beside each assertion in the tests.
"""

from __future__ import annotations

import copy
import shutil
from pathlib import Path
from typing import Any

from model.site.models import SiteFile

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
        "version": 2,
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
    """Run ``python -m tui ARGS`` from the repository root; the completed process."""
    from sitekit import tripwise

    return tripwise(*args, stdin=stdin)


#: The test-sheet CSV layout: value columns (the others are there to be ignored).
SHEET_VALUE_COLUMNS = [
    "half_0 [ms]",
    "half_180 [ms]",
    "x1_0 [ms]",
    "x1_180 [ms]",
    "x5_0 [ms]",
    "x5_180 [ms]",
    "ramp [mA]",
    "button",
    "waveform",
    "test_current",
    "note",
    "not_tested",
]
SHEET_KEYS = [
    "half_0",
    "half_180",
    "x1_0",
    "x1_180",
    "x5_0",
    "x5_180",
    "ramp_ma",
    "button",
    "waveform",
    "test_current",
    "note",
    "not_tested",
]


def sheet_csv(rows: list[dict[str, Any]], guard: bool = False) -> str:
    """A CSV in the test-sheet layout, written with the csv module.

    ``rows`` are readings by key plus ``device``; label, board, type, band and
    mark columns are filled with text the import must ignore.  With ``guard``
    every text cell carries the spreadsheet's leading apostrophe.
    """
    import csv
    import io

    header = ["device", "label", "board", "type", "x1 band", *SHEET_VALUE_COLUMNS, "x1 mark"]
    buf = io.StringIO()
    w = csv.writer(buf)
    w.writerow(header)
    for r in rows:
        cells = [r["device"], "Some label, with comma", "Board 1", "RCCB 30 mA A", "≤ 300 ms"]
        for key in SHEET_KEYS:
            v = r.get(key)
            if v is None:
                cells.append("")
            elif isinstance(v, float):
                cells.append(f"{v:g}")
            else:
                cells.append(f"'{v}" if guard else str(v))
        cells.append("FAIL?")
        w.writerow(cells)
    return buf.getvalue()
