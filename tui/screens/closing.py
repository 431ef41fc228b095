"""Screens that close once, whatever keys arrive and however fast.

Keys typed in a burst reach a screen's widgets before the screen has gone: a
second Enter on a list that has just been chosen from chooses again, and a
second ``dismiss`` pops whatever screen is on top by then (the app's own, or
the next dialog).  :class:`ClosesOnce` makes the app's screens close exactly
once: ``dismiss`` acts only the first time and only while the screen is the
one on top, and from that moment the screen ignores keys, clicks and the
messages of its widgets (a press, a choice, a submitted field) and runs no
more actions.  Keys typed before a screen closed were meant for it, so they
are dropped, never passed on to the screen below or the next one: the app
(:class:`KeyGate`) drops every key event made before the last dismissal.  A
burst ``d y y Enter`` deletes once and opens nothing; ``a Enter Enter`` opens
one form, which starts with the next key typed after it appeared.

:class:`Dialog` is the base of every modal screen of the app.
"""

from __future__ import annotations

from typing import Any, TypeVar

from textual import events
from textual.app import App
from textual.await_complete import AwaitComplete
from textual.message import Message
from textual.screen import ModalScreen, Screen

ResultT = TypeVar("ResultT")


class ClosesOnce(Screen[ResultT]):
    """A screen that is dismissed once and is inert while it closes."""

    _closing_once: bool = False

    @property
    def dismissed(self) -> bool:
        """True from the first ``dismiss`` on."""
        return self._closing_once

    def dismiss(self, result: Any = None) -> AwaitComplete:
        """Close with ``result`` the first time, while on top; later calls do nothing."""
        if self._closing_once or not self.is_attached or self.app.screen is not self:
            return AwaitComplete.nothing()
        self._closing_once = True
        gate = self.app
        if isinstance(gate, KeyGate):
            gate.keys_void_before = Message().time  # the same clock as a key event's time
        return super().dismiss(result)

    def check_message_enabled(self, message: Message) -> bool:
        if self._closing_once and (
            isinstance(message, events.InputEvent) or message.control is not None
        ):
            return False
        return super().check_message_enabled(message)

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        if self._closing_once:
            return False
        return super().check_action(action, parameters)


class Dialog(ClosesOnce[ResultT], ModalScreen[ResultT]):
    """A modal screen of the app (a dialog, a form, a question): closes once."""


class KeyGate(App[Any]):
    """An app that drops the keys typed before its last screen was dismissed."""

    #: Key events made before this time were meant for a screen that has closed.
    keys_void_before: float = float("-inf")

    async def on_event(self, event: events.Event) -> None:
        if isinstance(event, events.Key) and event.time <= self.keys_void_before:
            return
        await super().on_event(event)
