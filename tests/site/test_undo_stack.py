"""The undo stack: whole-site states, newest first back, up to a limit."""

from __future__ import annotations

from pathlib import Path

import pytest

from model.site.models import SiteFile
from model.site.undo import UNDO_LIMIT, UndoStack
from model.storage.sites import load_site

SAMPLE = Path(__file__).resolve().parents[2] / "sample_sites" / "oak-lane-house.json"


def renamed(site: SiteFile, name: str) -> SiteFile:
    return site.model_copy(update={"site": site.site.model_copy(update={"name": name})})


def test_undo_gives_back_the_states_newest_first() -> None:
    first = load_site(SAMPLE)
    second = renamed(first, "Second")
    stack = UndoStack()
    assert len(stack) == 0 and not stack
    stack.push("rename", first)
    stack.push("rename again", second)
    assert len(stack) == 2
    assert stack.undo() == ("rename again", second)
    label, site = stack.undo()
    assert label == "rename" and site is first  # the very object kept, not a copy
    with pytest.raises(IndexError):
        stack.undo()


def test_the_oldest_steps_are_forgotten_past_the_limit() -> None:
    base = load_site(SAMPLE)
    stack = UndoStack(limit=3)
    assert stack.limit == 3
    for i in range(5):
        stack.push(f"step {i}", renamed(base, f"Site {i}"))
    assert len(stack) == 3
    assert [stack.undo()[0] for _ in range(3)] == ["step 4", "step 3", "step 2"]
    assert UndoStack().limit == UNDO_LIMIT == 200
    with pytest.raises(ValueError):
        UndoStack(limit=0)
