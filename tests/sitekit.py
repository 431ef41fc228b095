"""Small builders for test sites (importable from every test folder)."""

from __future__ import annotations

import json
import shutil
import subprocess
import sys
from pathlib import Path
from typing import Any

from model.rules.checks import analyse
from model.rules.findings import Analysis
from model.site.models import SiteFile

ROOT = Path(__file__).resolve().parent.parent
SAMPLES = ROOT / "sample_sites"


def node(id: str, parent: str | None, kind: str, **kw: Any) -> dict[str, Any]:
    d: dict[str, Any] = {"id": id, "kind": kind, **kw}
    if parent is not None:
        d["parent"] = parent
    return d


def rcd(
    id: str,
    parent: str,
    idn_ma: float,
    *,
    kind: str = "rccb",
    waveform: str = "A",
    delay: str = "general",
    **kw: Any,
) -> dict[str, Any]:
    return node(id, parent, kind, idn_ma=float(idn_ma), waveform=waveform, delay=delay, **kw)


def circuit(id: str, parent: str, use: str = "other", **kw: Any) -> dict[str, Any]:
    return node(id, parent, "circuit", use=use, **kw)


def site_doc(
    nodes: list[dict[str, Any]], visits: list[dict[str, Any]] | None = None, **info: Any
) -> dict[str, Any]:
    base = {"name": "Test site", "earthing": "TN-C-S"}
    base.update(info)
    return {
        "format": "tripwise.site",
        "version": 2,
        "site": base,
        "nodes": [node("o", None, "origin"), *nodes],
        "visits": visits or [],
    }


def build(
    nodes: list[dict[str, Any]], visits: list[dict[str, Any]] | None = None, **info: Any
) -> SiteFile:
    return SiteFile.model_validate(site_doc(nodes, visits, **info))


def visit(
    readings: dict[str, dict[str, Any]], id: str = "v1", date: str = "2026-11-30"
) -> dict[str, Any]:
    return {"id": id, "date": date, "readings": readings}


def run(
    nodes: list[dict[str, Any]], visits: list[dict[str, Any]] | None = None, **info: Any
) -> Analysis:
    return analyse(build(nodes, visits, **info))


def rules_of(result: Analysis, rule: str) -> list[Any]:
    return [f for f in result.findings if f.rule == rule]


def copy_sample(name: str, dest: Path) -> Path:
    target = dest / f"{name}.json"
    shutil.copyfile(SAMPLES / f"{name}.json", target)
    return target


def write_doc(path: Path, doc: Any) -> Path:
    path.write_text(json.dumps(doc, ensure_ascii=False), encoding="utf-8")
    return path


def tripwise(
    *args: str, env: dict[str, str] | None = None, stdin: str | None = None
) -> subprocess.CompletedProcess[str]:
    """Run ``python -m tui ARGS`` from the repository root (this checkout's code)."""
    return subprocess.run(
        [sys.executable, "-m", "tui", *args],
        cwd=ROOT,
        capture_output=True,
        text=True,
        env=env,
        input=stdin,
        stdin=None if stdin is not None else subprocess.DEVNULL,
        timeout=120,
        check=False,
    )
