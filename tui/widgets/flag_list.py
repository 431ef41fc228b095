"""A list of flags to tick (a circuit's loads, its special locations): Space ticks, Enter moves on."""

from __future__ import annotations

from textual.binding import Binding
from textual.widgets import SelectionList


class FlagList(SelectionList[str]):
    """:class:`~textual.widgets.SelectionList` where Enter goes to the next field of the form."""

    BINDINGS = [Binding("enter", "next_field", "Next field", show=False)]

    def action_next_field(self) -> None:
        self.screen.focus_next()
