"""Undo: whole-site states kept before each change, newest last, up to a limit.

A site file is never changed in place (every edit makes a new one), so keeping
the object itself is a true snapshot of the site as it was.
"""

from __future__ import annotations

from model.site.models import SiteFile

#: Whole-site states kept for undo.
UNDO_LIMIT = 200


class UndoStack:
    """The states a site can be taken back to, each with what the change after it was."""

    def __init__(self, limit: int = UNDO_LIMIT) -> None:
        if limit < 1:
            raise ValueError("an undo stack keeps at least one step")
        self._limit = limit
        self._steps: list[tuple[str, SiteFile]] = []

    @property
    def limit(self) -> int:
        """The most steps kept; pushing more forgets the oldest."""
        return self._limit

    def push(self, label: str, site: SiteFile) -> None:
        """Keep ``site`` (the state before the change called ``label``)."""
        self._steps.append((label, site))
        del self._steps[: -self._limit]

    def undo(self) -> tuple[str, SiteFile]:
        """The latest step, taken off the stack: (what the change was, the site before it).

        Raises IndexError when there is nothing to undo.
        """
        if not self._steps:
            raise IndexError("nothing to undo")
        return self._steps.pop()

    def __len__(self) -> int:
        return len(self._steps)
