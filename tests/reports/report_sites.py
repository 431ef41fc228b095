"""Sites used by the report tests: copies of the bundled samples and one awkward variant.

The awkward variant starts from the invented Oak Lane sample and gives its
devices labels with Ω, µ, ×, accents, spreadsheet formulas and markup, a
"did not trip" at IΔn, a device not tested (with its reason) and a two-line
note.  Every name and reading in it is invented.
"""

from __future__ import annotations

import copy
import json
import re
import shutil
from pathlib import Path
from typing import Any

from model.site.models import SiteFile
from model.storage.codec import parse_site

ROOT = Path(__file__).resolve().parents[2]
SAMPLES = sorted((ROOT / "sample_sites").glob("*.json"))

UNICODE_LABEL = "Café Ω-board µ-RCCB 2×30 mA ½ Zoë"
FORMULA_LABEL = '=HYPERLINK("x")'
MARKUP_LABEL = "<b>*x*</b>"


def copy_samples(tmp: Path) -> list[Path]:
    """Copies of every bundled sample site in ``tmp`` (the product reads real files)."""
    out = []
    for s in SAMPLES:
        dest = tmp / s.name
        shutil.copyfile(s, dest)
        out.append(dest)
    return out


def _raw() -> dict[str, Any]:
    data: dict[str, Any] = json.loads((ROOT / "sample_sites" / "oak-lane-house.json").read_text())
    return data


def awkward_raw() -> dict[str, Any]:
    d = copy.deepcopy(_raw())
    labels = {
        "rc2": UNICODE_LABEL,
        "rb1": FORMULA_LABEL,
        "rb3": MARKUP_LABEL,
        "cu": "Tableau général (Ω)",
        "c-out": "-Patio socket",
        "rc1": "@upstairs",
    }
    for n in d["nodes"]:
        if n["id"] in labels:
            n["label"] = labels[n["id"]]
    d["site"]["name"] = "Maison Élodie & <Sons> (invented)"
    latest = d["visits"][-1]["readings"]
    latest["rb3"]["x1_180"] = "did not trip"
    latest["rb3"]["note"] = "First line\nsecond line @home"
    latest["rb2"] = {"not_tested": "+ socket circuit in use by the client (invented)"}
    return d


def awkward_site() -> SiteFile:
    return parse_site(json.dumps(awkward_raw()))


def write_awkward(tmp: Path, name: str = "awkward site.json") -> Path:
    p = tmp / name
    p.write_text(json.dumps(awkward_raw(), ensure_ascii=False, indent=2), encoding="utf-8")
    return p


def big_raw(boards: int = 8, per_board: int = 12) -> dict[str, Any]:
    """A larger invented site: boards of RCBOs below a non-delayed RCCB (many pair findings)."""
    nodes: list[dict[str, Any]] = [{"id": "o", "kind": "origin", "label": "Intake"}]
    readings: dict[str, Any] = {}
    for b in range(boards):
        nodes.append(
            {
                "id": f"b{b}",
                "parent": "o",
                "kind": "board",
                "label": f"Board {b}",
                "place": f"Floor {b}",
            }
        )
        nodes.append(
            {
                "id": f"f{b}",
                "parent": f"b{b}",
                "kind": "rccb",
                "label": f"Feed {b}",
                "idn_ma": 100.0,
                "waveform": "A",
                "rated_a": 63.0,
            }
        )
        readings[f"f{b}"] = {"x1_0": 40.0 + b, "x5_0": 20.0, "button": "worked"}
        for k in range(per_board):
            d = f"d{b}-{k}"
            nodes.append(
                {
                    "id": d,
                    "parent": f"f{b}",
                    "kind": "rcbo",
                    "label": f"RCBO {b}.{k}",
                    "idn_ma": 30.0,
                    "waveform": "A",
                    "rated_a": 20.0,
                }
            )
            nodes.append(
                {
                    "id": f"c{b}-{k}",
                    "parent": d,
                    "kind": "circuit",
                    "use": "sockets",
                    "label": f"Sockets {b}.{k}",
                    "rated_a": 20.0,
                }
            )
            readings[d] = {
                "half_0": "did not trip",
                "x1_0": 20.0 + k,
                "x1_180": 320.0 if k == 3 else 22.0,
                "x5_0": 10.0,
                "ramp_ma": 22.5,
                "button": "worked",
            }
    return {
        "format": "tripwise.site",
        "version": 2,
        "site": {"name": "Block of flats (invented)", "earthing": "TN-S", "ze_ohm": 0.35},
        "nodes": nodes,
        "visits": [
            {
                "id": "v1",
                "date": "2026-10-02",
                "inspector": "A. Inventé",
                "instrument": "tester",
                "readings": readings,
            }
        ],
    }


def squash(text: str) -> str:
    """Text with all whitespace removed, for comparing wrapped output with the source."""
    return re.sub(r"\s+", "", text)
