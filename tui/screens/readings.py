"""Reading entry, built for speed: digits and Enter, one key for "did not trip".

Each value is judged against its band the moment it is typed (the verdict comes from
``model.rules.entry``).  Enter sends the reading up to the app as a message to be
recorded through the editing session, and the form moves on at once; a refusal is
shown at its field when the app answers.  After the last field the form moves to the
next untested residual-current device.  All typing goes to one widget
(:class:`ReadingPad`) so fast keys never land in the wrong field.
"""

from __future__ import annotations

from typing import Any

from pydantic import ValidationError
from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.message import Message
from textual.widgets import Static

from model.rules.entry import (
    EntryVerdict,
    FieldProblem,
    chosen_waveform,
    entry_texts,
    judge_entry,
    next_field,
    reading_from_texts,
)
from model.site.editing import is_untested, next_untested
from model.site.fields import errors_by_field
from model.site.history import previous_reading
from model.site.models import Reading, Visit
from model.site.terms import TestWaveform, choices_of, reading_label
from tui.app.view import site_view
from tui.format import LIVE_TEST_CAUTION
from tui.screens.closing import ClosesOnce
from tui.screens.reading_fields import (
    BAD,
    CHOICES,
    FLAG_WORDS,
    OK,
    PAD_FIELDS,
    header_text,
    previous_text,
)
from tui.themes import tone
from tui.widgets.caution_bar import CautionBar
from tui.widgets.key_bar import KeyBar
from tui.widgets.reading_pad import ReadingPad
from tui.widgets.top_bar import TopBar


class ReadingScreen(ClosesOnce[str]):
    """One device's readings at a time, on the latest visit; dismisses with the last device."""

    BINDINGS = [
        Binding("escape", "back", "Back to tree"),
        # Ctrl+P stays the command palette's, as everywhere in the app
        Binding("pagedown,ctrl+n", "device(1)", "Next device"),
        Binding("pageup,ctrl+b", "device(-1)", "Prev device"),
        Binding("ctrl+t", "not_tested", "Not tested"),
        Binding("ctrl+w", "page", "Other test current"),
    ]

    class Record(Message):
        """Record this reading of a device on the latest visit (None: nothing recorded).

        The form has already moved on; the app answers with :meth:`ReadingScreen.answer`.
        """

        def __init__(
            self,
            form: ReadingScreen,
            device_id: str,
            reading: Reading | None,
            *,
            field: str,
            texts: dict[str, str],
            undo_label: str | None,
            was_untested: bool,
        ) -> None:
            super().__init__()
            self.form = form
            self.device_id = device_id
            self.reading = reading
            #: The field whose Enter recorded it, and the whole form's text then.
            self.field = field
            self.texts = texts
            #: Keep an undo step first, under this name (the first change to a device).
            self.undo_label = undo_label
            #: Whether the device had no value and no reason before this reading.
            self.was_untested = was_untested

    def __init__(self, device_id: str, *, refused: tuple[Record, str] | None = None) -> None:
        """``refused``: open on a reading the app refused, and show why."""
        super().__init__()
        self.device_id = device_id
        self._refused = refused
        #: Flag shown at each field now (None when within band or not judged).
        self.flags: dict[str, str | None] = {}
        #: The band beside each field, and the verdict on what is typed there.
        self.bands: dict[str, str] = {}
        self.verdicts: dict[str, str] = {}
        self._verdict_text: dict[str, Text] = {}
        #: "required" or "optional" for each test under the site's rule set.
        self.need: dict[str, str] = {}
        self._undo_taken = False
        #: The test waveform whose results the form shows (a reading may hold several).
        self.page: str = "AC"
        #: The device's latest reading with values on an earlier visit, shown beside each field.
        self.previous: tuple[Visit, Reading] | None = None
        #: Readings sent up that the app has not answered yet.
        self._unanswered = 0
        #: Every device looked done, but a reading was still unanswered: close
        #: (or go on) only once the app has recorded it.
        self._finish_when_answered = False

    def compose(self) -> ComposeResult:
        yield TopBar(id="top-bar")
        with Vertical(id="reading-body"):
            yield Static("", id="rd-device", markup=False)
            yield ReadingPad(self, PAD_FIELDS, CHOICES, id="reading-pad")
            yield Static("", id="rd-status", markup=False)
            yield Static(
                "digits ⏎ next · n did not trip · w/f button · a/h/d current · r/s at "
                "rated/scaled · ^W other current · ⏎ on note: next device · req = required",
                id="rd-hint",
                markup=False,
            )
            yield Static(LIVE_TEST_CAUTION, id="rd-live", markup=False)
        yield CautionBar(id="caution")
        yield KeyBar(id="key-bar")

    def on_screen_resume(self) -> None:
        self.query_one(TopBar).screen_shown()

    @property
    def pad(self) -> ReadingPad:
        return self.query_one(ReadingPad)

    def on_mount(self) -> None:
        self.load_device(self.device_id)
        self.pad.focus()
        if self._refused is not None:
            self._show_refused(*self._refused, as_typed=True)

    # ------------------------------------------------------------- the device
    def _node(self) -> Any:
        return site_view(self).index.by_id[self.device_id]

    def load_device(self, device_id: str) -> None:
        """Fill the form from the latest visit's reading of this device and start at the top."""
        self.device_id = device_id
        self._undo_taken = False
        self._load_page(None)
        self.pad.go("half_0")
        self._show_header()
        self._judge_all()

    def _recorded(self) -> Reading | None:
        visit = site_view(self).site.latest_visit()
        return visit.readings.get(self.device_id) if visit is not None else None

    def _load_page(self, waveform: str | None) -> None:
        """Show the results of one test waveform (the reading's own when None)."""
        view = site_view(self)
        visit = view.site.latest_visit()
        reading = self._recorded()
        self.pad.values.update(entry_texts(reading, waveform))
        self.page = self.pad.values["waveform"]
        self.previous = (
            previous_reading(view.site, visit.id, self.device_id) if visit is not None else None
        )

    def _show_header(self) -> None:
        box = self.query_one("#rd-device", Static)
        width = box.size.width or self.app.size.width - 2
        box.update(header_text(site_view(self), self.device_id, self.page, self.previous, width))

    # ------------------------------------------------------------- judging
    def _judge(self, name: str) -> None:
        """Show the band beside one field and the verdict on what is typed there."""
        values = self.pad.values
        rules = site_view(self).site.site.rules
        v: EntryVerdict = judge_entry(
            self._node(), name, values[name], chosen_waveform(values), rules, values["test_current"]
        )
        self.flags[name] = v.flag
        self.need[name] = v.need
        self.bands[name] = f"{v.band} · {v.need}" if v.need else v.band
        self.verdicts[name] = v.verdict
        text = Text(no_wrap=True, overflow="ellipsis")
        if v.mark == "unreadable":
            text.append(f"✖ {v.verdict}", style=tone(BAD))
        elif v.mark == "flagged" and v.flag is not None:
            text.append(f"✖ {FLAG_WORDS.get(v.flag, v.flag)}", style=tone(BAD))
        elif v.mark == "in band":
            text.append("✓ in band" if name != "button" else f"✓ {values[name]}", style=tone(OK))
        elif v.mark == "recorded":
            text = Text("· recorded", style=tone("$tw-muted"))
        text.append_text(previous_text(self.previous, name, chosen_waveform(values)))
        self._verdict_text[name] = text
        self._show_status()

    def _show_status(self) -> None:
        """The full verdict of the field under the cursor, on its own line."""
        if not self.is_mounted:
            return
        name = self.pad.current
        text = self.verdicts.get(name, "")
        style = tone(BAD if self.flags.get(name) else "$tw-muted")
        line = Text(
            f"{self.pad.titles.get(name, name).strip()}: {text}" if text else "", style=style
        )
        box = self.query_one("#rd-status", Static)
        # A line that fits where a line was needs no new layout (the status changes on
        # every key); a longer one wraps, and the screen is laid out again for it.
        width = box.content_size.width
        fits = box.size.height == 1 and line.cell_len <= width
        box.update(line, layout=not fits)

    def _judge_all(self) -> None:
        for name, _, _ in PAD_FIELDS:
            self._judge(name)
        self.pad.refresh()

    # ------------------------------------------------------------- the pad asks
    def row_text(self, name: str) -> tuple[str, str, Text]:
        need = {"required": "req", "optional": "opt"}.get(self.need.get(name, ""), "")
        band = self.bands.get(name, "").split(" · ")[0]
        return need, band, self._verdict_text.get(name, Text())

    def field_changed(self, name: str) -> None:
        if name in ("waveform", "test_current"):
            self._judge_all()
        else:
            self._judge(name)

    def field_entered(self, name: str) -> None:
        """Enter (or a one-key value) on a field: send it to be recorded, then move on.

        The form moves on at once, so keys typed meanwhile land in the next
        field; a refusal from the app is shown when it answers.  What the form
        itself cannot read is refused at once, and the cursor stays.
        """
        if name == "not_tested":
            self._record_not_tested()
            return
        if not self._commit(name):
            return
        nxt = next_field(name, self.pad.values)
        if nxt is not None:
            self.pad.go(nxt)
            self._show_status()
        else:
            self._next_untested()

    # ------------------------------------------------------------- recording
    def _commit(self, field: str) -> bool:
        """Send the form up to be recorded; show at the field why it cannot be."""
        try:
            reading = reading_from_texts(self.pad.values, self._recorded(), self.page)
        except ValueError as exc:
            msgs = errors_by_field(exc) if isinstance(exc, ValidationError) else {}
            if isinstance(exc, FieldProblem):
                msgs = {exc.field: str(exc)}
            if field not in msgs and msgs and next(iter(msgs)) in self.pad.values:
                # another field holds what cannot be recorded: say so here, then go there
                other = next(iter(msgs))
                self._refuse(field, f"{reading_label(other)} first: {msgs[other]}")
                self.pad.go(other)
                self._show_status()
                self._refuse(other, msgs[other])
                return False
            self._refuse(field, msgs.get(field) or next(iter(msgs.values()), str(exc)))
            return False
        visit = site_view(self).site.latest_visit()
        if visit is not None and visit.readings.get(self.device_id) == reading:
            return True  # nothing changed
        self._record(field, reading)
        self.page = chosen_waveform(self.pad.values)
        return True

    def _record(self, field: str, reading: Reading | None) -> None:
        undo_label = None
        if not self._undo_taken:
            undo_label = f"readings of {self.device_id}"
            self._undo_taken = True
        visit = site_view(self).site.latest_visit()
        self._unanswered += 1
        self.app.post_message(
            self.Record(
                self,
                self.device_id,
                reading,
                field=field,
                texts=dict(self.pad.values),
                undo_label=undo_label,
                was_untested=is_untested(visit, self.device_id),
            )
        )

    def answer(self, record: Record, problem: str | None) -> None:
        """The app's answer to a :class:`Record`: None when recorded, else why not.

        A recorded first value brings the count of untested devices down; a
        refusal takes the form back to that device and field, as typed, and
        shows why there.
        """
        self._unanswered = max(0, self._unanswered - 1)
        if problem is None:
            visit = site_view(self).site.latest_visit()
            if record.was_untested and not is_untested(visit, record.device_id):
                self._show_header()  # the count of untested devices has just gone down
            if self._finish_when_answered and self._unanswered == 0:
                self._finish_when_answered = False
                self._next_untested()
            return
        self._finish_when_answered = False
        self._show_refused(record, problem, as_typed=record.device_id != self.device_id)

    def _show_refused(self, record: Record, problem: str, *, as_typed: bool) -> None:
        """Go to the refused field (with the whole form as it was typed) and show why."""
        if as_typed:
            self.device_id = record.device_id
            self.pad.values.update(record.texts)
            self._show_header()
            self._judge_all()
        self._undo_taken = True  # the app kept the undo step before trying
        self.pad.go(record.field)
        self._show_status()
        self._refuse(record.field, problem)

    def _refuse(self, field: str, message: str) -> None:
        self.flags[field] = None
        self.verdicts[field] = message
        self._verdict_text[field] = Text(f"✖ not recorded: {message}", style=tone(BAD))
        self.pad.refresh()
        self.app.bell()

    def _record_not_tested(self) -> None:
        reason = self.pad.values["not_tested"].strip()
        if not reason:
            self._refuse("not_tested", "give the reason the device was not tested")
            return
        self._record("not_tested", Reading(not_tested=reason))
        self._next_untested()

    def _next_untested(self) -> None:
        view = site_view(self)
        nxt = next_untested(view.index, view.site.latest_visit(), self.device_id)
        if nxt is None:
            if self._unanswered:
                # Say "every device" only once the app has recorded the last reading.
                self._finish_when_answered = True
                return
            self.app.notify("Every residual-current device has a reading or a reason.")
            self.action_back()
            return
        self.load_device(nxt)

    # ------------------------------------------------------------- actions
    def action_device(self, step: int) -> None:
        rcds = site_view(self).index.rcds()
        if self.device_id not in rcds:
            return
        i = rcds.index(self.device_id)
        self.load_device(rcds[(i + step) % len(rcds)])

    def action_page(self) -> None:
        """Show the next test waveform's results (AC, half-wave, smooth DC), to enter
        a second waveform's results on the same visit."""
        waves: tuple[TestWaveform, ...] = choices_of(TestWaveform)
        nxt = waves[(waves.index(self.page) + 1) % len(waves)]  # type: ignore[arg-type]
        self._load_page(nxt)
        self.pad.go("half_0")
        self._show_header()
        self._judge_all()

    def action_not_tested(self) -> None:
        self.pad.go("not_tested")

    def action_back(self) -> None:
        self.dismiss(self.device_id)

    def site_replaced(self) -> None:
        """The site changed under the form (undo): show it again."""
        if self.device_id in site_view(self).index.by_id:
            self.load_device(self.device_id)
        else:
            self.action_back()
