"""A check box whose mark differs by shape, not only by colour: ✓ when on, blank when off.

Space turns it on and off; Enter moves to the next field, as in every form.
"""

from __future__ import annotations

from textual.binding import Binding
from textual.content import Content
from textual.widgets import Checkbox


class TickBox(Checkbox):
    """A :class:`~textual.widgets.Checkbox` showing ``✓`` when on and a blank when off."""

    BINDINGS = [
        Binding("space", "toggle_button", "Toggle", show=False),
        Binding("enter", "next_field", "Next field", show=False),
    ]

    @property
    def _button(self) -> Content:
        inner = "✓" if self.value else " "
        style = self.get_visual_style("toggle--button")
        return Content.assemble(("[", ""), (inner, style), ("]", ""))

    def action_next_field(self) -> None:
        self.screen.focus_next()
