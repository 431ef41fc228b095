"""The reading form as one focused widget, so fast typing always lands in the right field.

Every key goes to this one widget, in order; it moves between fields itself, in
the same step as the key, and asks its form (the reading screen) to judge and to
record.  In a number field every printable character is kept as typed and judged
(a stray letter is shown and refused, never dropped); keys a field does not use
are swallowed (so a stray letter never triggers an app command), except control
keys, which the screen's bindings take.
"""

from __future__ import annotations

from typing import Protocol

from rich.segment import Segment
from rich.text import Text
from textual import events
from textual.geometry import Region
from textual.reactive import reactive
from textual.strip import Strip
from textual.widget import Widget

from model.site.terms import DID_NOT_TRIP
from tui.themes import tone

#: The key that records "did not trip" in a time field.
DID_NOT_TRIP_KEY = "n"


class ReadingForm(Protocol):
    """What the pad needs from the screen that owns it."""

    def field_changed(self, name: str) -> None: ...
    def field_entered(self, name: str) -> None: ...
    def row_text(self, name: str) -> tuple[str, str, Text]:
        """(need mark, band text, verdict) for one row."""
        ...


class ReadingPad(Widget, can_focus=True):
    """Rows of fields: title, typed value, band, verdict."""

    #: The field the cursor is on (its rows are drawn again by :meth:`go`).
    current: reactive[str] = reactive("", layout=False, repaint=False)

    def __init__(
        self,
        form: ReadingForm,
        fields: list[tuple[str, str, str]],
        choices: dict[str, list[tuple[str, str]]],
        *,
        id: str | None = None,
    ) -> None:
        """``fields`` are (name, kind, title); kind is time, number, choice or text.

        ``choices`` maps a choice field to its (key, value) pairs.
        """
        super().__init__(id=id)
        self._form = form
        self.fields = fields
        self.kinds = {n: k for n, k, _ in fields}
        self.titles = {n: t for n, _, t in fields}
        self.choices = choices
        self.values: dict[str, str] = {n: "" for n, _, _ in fields}
        #: True until the first key in a field: typing then replaces what was there.
        self.fresh = True
        self.set_reactive(ReadingPad.current, fields[0][0])

    @property
    def names(self) -> list[str]:
        return [n for n, _, _ in self.fields]

    def go(self, name: str) -> None:
        was = self.current
        self.current = name
        self.fresh = True
        self.refresh_rows(was, name)

    def move(self, step: int) -> None:
        names = self.names
        i = names.index(self.current)
        self.go(names[(i + step) % len(names)])

    def refresh_rows(self, *names: str) -> None:
        """Draw these rows again (a key changes one row; the rest stays as drawn)."""
        width = self.size.width
        for name in set(names):
            if name in self.kinds:
                self.refresh(Region(0, self.names.index(name), width, 1))

    def get_content_height(self, container: object, viewport: object, width: int) -> int:
        return len(self.fields)

    def render(self) -> Text:
        """The whole pad as one text (what :meth:`render_line` draws, row by row)."""
        return Text("\n", no_wrap=True).join(self._row(y) for y in range(len(self.fields)))

    def render_line(self, y: int) -> Strip:
        width = self.size.width
        base = self.rich_style
        if not 0 <= y < len(self.fields):
            return Strip.blank(width, base)
        segments = Segment.apply_style(self._row(y).render(self.app.console), base)
        return Strip(segments).adjust_cell_length(width, base)

    def _row(self, y: int) -> Text:
        """One field's row: title, need mark, typed value, band, verdict."""
        name, kind, title = self.fields[y]
        width = max(self.size.width, 40)
        title_w, need_w, value_w = 12, 4, 14
        rest = width - 1 - title_w - need_w - value_w - 2
        band_w = max(10, min(28, rest // 2))
        here = name == self.current and self.has_focus
        need, band, verdict = self._form.row_text(name)
        line = Text(no_wrap=True)
        line.append("▸" if name == self.current else " ", style=tone("bold $accent"))
        line.append(f"{title:<{title_w}}", style="bold" if here else tone("$tw-field"))
        line.append(
            f"{need:<{need_w}}",
            style=tone("bold $tw-investigate") if need == "req" else tone("$tw-quiet"),
        )
        value = self.values[name]
        if kind == "choice":
            shown = " ".join(
                f"[{v}]" if v == value else f"{k}:{v[:4]}" for k, v in self.choices[name]
            )
        else:
            unit = " ms" if kind == "time" else (" mA" if name == "ramp_ma" else "")
            typed_number = value and value != DID_NOT_TRIP
            shown = value + ("▏" if here else (unit if typed_number else ""))
        line.append(
            shown[: value_w - 1].ljust(value_w),
            style=tone("on $tw-cell-here") if here else tone("on $tw-cell"),
        )
        line.append(" ")
        line.append(f"{band[: band_w - 1]:<{band_w}}", style=tone("$tw-value"))
        line.append_text(verdict)
        line.truncate(width, overflow="ellipsis")
        return line

    def on_click(self, event: events.Click) -> None:
        row = event.y
        if 0 <= row < len(self.fields):
            self.go(self.fields[row][0])

    def on_focus(self) -> None:
        self.refresh()

    def on_blur(self) -> None:
        self.refresh()

    async def _on_key(self, event: events.Key) -> None:
        name = self.current
        kind = self.kinds[name]
        key, ch = event.key, event.character
        value = self.values[name]
        handled = True
        if key == "enter":
            self._form.field_entered(name)
        elif key == "up":
            self.move(-1)
        elif key == "down":
            self.move(1)
        elif key == "backspace":
            self.values[name] = "" if value == DID_NOT_TRIP else value[:-1]
            self.fresh = False
            self._changed(name)
        elif kind == "time" and ch == DID_NOT_TRIP_KEY:
            self.values[name] = DID_NOT_TRIP
            self._changed(name)
            self._form.field_entered(name)
        elif kind in ("time", "number") and event.is_printable and ch is not None:
            # Every character typed is kept, a letter or a minus sign too: the value
            # is then judged as typed ("1e3" is refused with the reason), never
            # quietly read as something else ("13").
            keep = value if not self.fresh and value != DID_NOT_TRIP else ""
            self.values[name] = keep + ch
            self.fresh = False
            self._changed(name)
        elif kind == "choice" and ch is not None and ch in dict(self.choices[name]):
            self.values[name] = dict(self.choices[name])[ch]
            self._changed(name)
            self._form.field_entered(name)
        elif kind == "choice" and key in ("space", "left", "right"):
            vals = [v for _, v in self.choices[name]]
            i = vals.index(value) if value in vals else -1
            self.values[name] = vals[(i + (-1 if key == "left" else 1)) % len(vals)]
            self._changed(name)
        elif kind == "text" and event.is_printable and ch is not None:
            self.values[name] = (value if not self.fresh else "") + ch
            self.fresh = False
            self._changed(name)
        elif event.is_printable:
            self.app.bell()  # not a value for this field; never an app command while typing
        else:
            handled = False
        if handled:
            event.stop()
            event.prevent_default()
        self.refresh_rows(name, self.current)

    def _changed(self, name: str) -> None:
        self._form.field_changed(name)
