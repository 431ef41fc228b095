"""Every action of the app in the command palette, listed from the key bindings.

The palette (Ctrl+P) offers the app's own actions besides Textual's: one entry
for each binding of the app, the tree, the findings and the screen in front, so
nothing can be reached by key that cannot also be found by name.  An action the
app refuses where you are (a change in a read-only site) is not offered.
"""

from __future__ import annotations

from collections.abc import Iterable
from typing import Any

from textual.app import SystemCommand
from textual.binding import Binding
from textual.dom import DOMNode
from textual.screen import Screen


def binding_sources(app: Any, screen: Screen[Any]) -> list[tuple[DOMNode, list[Binding]]]:
    """(the node an action runs on, its bindings): the screen in front, the tree, the findings, the app."""
    from tui.screens.main import MainScreen
    from tui.widgets.findings_panel import FindingsTable
    from tui.widgets.site_tree import SiteTree

    out: list[tuple[DOMNode, list[Binding]]] = [(screen, _bindings(type(screen)))]
    if isinstance(screen, MainScreen):
        out.append((screen.tree, _bindings(SiteTree)))
        out.append((screen.query_one(FindingsTable), _bindings(FindingsTable)))
    out.append((app, _bindings(type(app))))
    return out


def _bindings(cls: type) -> list[Binding]:
    return [b for b in getattr(cls, "BINDINGS", []) if isinstance(b, Binding)]


def _allowed(app: Any, node: DOMNode, action: str) -> bool:
    target: Any = app if action.startswith("app.") else node
    name = action.removeprefix("app.").split("(", 1)[0]
    return target.check_action(name, ()) is not False


def binding_commands(app: Any, screen: Screen[Any]) -> Iterable[SystemCommand]:
    """One palette command per bound action where the palette was opened (each action once)."""
    seen: set[str] = set()
    for node, bindings in binding_sources(app, screen):
        for b in bindings:
            if b.action in seen or not b.description or not _allowed(app, node, b.action):
                continue
            seen.add(b.action)
            keys = ", ".join(app.get_key_display(Binding(k, b.action)) for k in b.key.split(","))
            yield SystemCommand(
                b.description,
                f"{b.tooltip} (key: {keys})" if b.tooltip else f"key: {keys}",
                _runner(node, b.action),
            )


def _runner(node: DOMNode, action: str) -> Any:
    async def run() -> None:
        await node.run_action(action)

    return run


class CommandsMixin:
    """The command palette part of :class:`~tui.app.shell.TripwiseApp` (a mixin of the app)."""

    def get_system_commands(self, screen: Screen[Any]) -> Iterable[SystemCommand]:
        yield from binding_commands(self, screen)
        yield from super().get_system_commands(screen)  # type: ignore[misc]
