"""A text snapshot of the main screen at 80×24 guards its layout.

The capture is the screen as a terminal shows it, without colours; clock times
are masked.  After a deliberate change of layout, look at the new capture and
accept it with ``TRIPWISE_SNAPSHOTS=update python -m pytest tests/tui/test_main_snapshot.py``.
"""

from __future__ import annotations

import io
import os
import re
from pathlib import Path
from typing import Any

from rich.console import Console
from textual.app import App

from tui.app.shell import make_app

SNAPSHOTS = Path(__file__).resolve().parent / "snapshots"
_TIME = re.compile(r"\b\d{1,2}:\d{2}(:\d{2})?\b")


def screen_text(app: App[object]) -> str:
    """The screen as plain text, one line per terminal row, times masked."""
    width, height = app.size
    console = Console(
        width=width, height=height, file=io.StringIO(), record=True, legacy_windows=False
    )
    console.print(app.screen._compositor.render_update(full=True))
    lines = console.export_text(styles=False).splitlines()
    return "\n".join(_TIME.sub("hh:mm", line.rstrip()) for line in lines[:height]) + "\n"


async def settled_text(pilot: Any) -> str:
    """The screen once three captures in a row agree (a table sizes its columns when
    idle, which on a busy machine can take a while)."""
    seen: list[str] = []
    for _ in range(60):
        await pilot.pause(0.15)
        seen.append(screen_text(pilot.app))
        if len(seen) >= 3 and seen[-1] == seen[-2] == seen[-3]:
            break
    return seen[-1]


def check_snapshot(name: str, text: str) -> None:
    path = SNAPSHOTS / name
    if os.environ.get("TRIPWISE_SNAPSHOTS") == "update":
        path.write_text(text, encoding="utf-8")
    assert path.exists(), f"no snapshot {path.name}; make it with TRIPWISE_SNAPSHOTS=update"
    expected = path.read_text(encoding="utf-8")
    assert text == expected, f"the screen differs from {path.name}:\n{text}"


async def test_main_screen_at_80x24(oak_lane: Path) -> None:
    app = make_app(oak_lane)
    async with app.run_test(size=(80, 24)) as pilot:
        await app.settle()
        text = await settled_text(pilot)
    lines = text.splitlines()
    assert len(lines) == 24
    # the parts an inspector relies on, each in its place
    assert lines[0].lstrip().startswith("tripwise") and "Oak Lane House" in lines[0]
    assert "saved" in lines[0]
    assert "Not a certificate" in lines[22]
    assert any("Findings" in line and "severity: all" in line for line in lines)
    assert any("[6] MCB 5" in line for line in lines) or any("[1] MCB 1" in line for line in lines)
    check_snapshot("main-80x24.txt", text)
