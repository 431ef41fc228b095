"""Reading entry, built for speed: digits and Enter, one key for "did not trip".

Each value is judged against its band the moment it is typed (the band comes from
``model.readings``), and recorded through the editing session when Enter moves on.
After the last field the form moves to the next untested residual-current device.
"""

from __future__ import annotations

from typing import Any

from pydantic import ValidationError
from rich.text import Text
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Grid, Vertical
from textual.screen import Screen
from textual.widget import Widget
from textual.widgets import Footer, Input, Label, Static

from model.readings import (
    Band,
    judge_ramp,
    judge_time,
    ramp_band,
    time_band,
)
from model.site import DID_NOT_TRIP, TEST_NAMES, Reading
from tui.editing import is_untested
from tui.format import LIVE_TEST_CAUTION, node_summary, node_title
from tui.forms import errors_by_field, parse_number
from tui.widgets.caution_bar import CautionBar
from tui.widgets.key_choice import KeyChoice
from tui.widgets.top_bar import TopBar
from tui.widgets.trip_input import TripInput

#: The fields in entry order.
FIELDS: tuple[str, ...] = (*TEST_NAMES, "ramp_ma", "button", "waveform", "note")

FIELD_TITLES: dict[str, str] = {
    "half_0": "½× IΔn   0°",
    "half_180": "½× IΔn 180°",
    "x1_0": "1× IΔn    0°",
    "x1_180": "1× IΔn  180°",
    "x5_0": "5× IΔn    0°",
    "x5_180": "5× IΔn  180°",
    "ramp_ma": "ramp trip",
    "button": "test button",
    "waveform": "test current",
    "note": "note",
}

FLAG_WORDS: dict[str, str] = {
    "reading.too-slow": "too slow",
    "reading.too-fast": "too fast",
    "reading.no-trip": "DID NOT TRIP",
    "reading.half-tripped": "tripped at ½×",
    "reading.ramp-out-of-band": "out of band",
    "reading.button-failed": "button failed",
}

BUTTON_OPTIONS = [("w", "worked", "worked"), ("f", "failed", "failed")]
WAVEFORM_OPTIONS = [
    ("a", "AC", "AC"),
    ("h", "half-wave", "half-wave"),
    ("d", "smooth-dc", "smooth DC"),
]


class ReadingScreen(Screen[None]):
    """One device's readings at a time, on the latest visit."""

    BINDINGS = [
        Binding("escape", "back", "Back to tree"),
        Binding("up", "field(-1)", "Prev field", show=False),
        Binding("down", "field(1)", "Next field", show=False),
        Binding("ctrl+n", "device(1)", "Next device"),
        Binding("ctrl+p", "device(-1)", "Prev device"),
        Binding("ctrl+t", "not_tested", "Not tested"),
    ]

    def __init__(self, device_id: str) -> None:
        super().__init__()
        self.device_id = device_id
        #: Flag shown at each field now (None when within band or not judged).
        self.flags: dict[str, str | None] = {}
        #: Text shown beside each field: the band, and the verdict.
        self.bands: dict[str, str] = {}
        self.verdicts: dict[str, str] = {}
        self._undo_taken = False

    # ------------------------------------------------------------------ layout
    def compose(self) -> ComposeResult:
        yield TopBar(id="top-bar")
        with Vertical(id="reading-body"):
            yield Static("", id="rd-device")
            with Grid(id="reading-grid"):
                for name in FIELDS:
                    yield Label(FIELD_TITLES[name], classes="rd-title")
                    yield self._field_widget(name)
                    yield Static("", id=f"band-{name}", classes="rd-band")
                    yield Static("", id=f"verdict-{name}", classes="rd-verdict")
                yield Label("not tested", classes="rd-title")
                yield Input(placeholder="reason (ctrl+t)", id="rd-not_tested", compact=True)
                yield Static("reason instead of values", classes="rd-band")
                yield Static("", id="verdict-not_tested", classes="rd-verdict")
            yield Static(
                "digits ⏎ next · n did not trip · w/f button · a/h/d test current · "
                "⏎ on note: next untested device",
                id="rd-hint",
            )
            yield Static(LIVE_TEST_CAUTION, id="rd-live")
        yield CautionBar(id="caution")
        yield Footer(compact=True, show_command_palette=False)

    def _field_widget(self, name: str) -> Widget:
        if name in TEST_NAMES:
            return TripInput(id=f"rd-{name}")
        if name == "ramp_ma":
            return Input(placeholder="mA", restrict=r"[0-9.,]*", compact=True, id="rd-ramp_ma")
        if name == "button":
            return KeyChoice(BUTTON_OPTIONS, id="rd-button")
        if name == "waveform":
            return KeyChoice(WAVEFORM_OPTIONS, value="AC", allow_none=False, id="rd-waveform")
        return Input(placeholder="free text", compact=True, id="rd-note")

    def on_mount(self) -> None:
        self.load_device(self.device_id)

    # ------------------------------------------------------------- the device
    @property
    def _app(self) -> Any:
        return self.app

    def _node(self) -> Any:
        return self._app.index.by_id[self.device_id]

    def load_device(self, device_id: str) -> None:
        """Fill the form from the latest visit's reading of this device and start at the top."""
        self.device_id = device_id
        self._undo_taken = False
        app = self._app
        visit = app.session.site.latest_visit()
        reading = visit.readings.get(device_id) if visit is not None else None
        for name in FIELDS:
            w = self.query_one(f"#rd-{name}")
            value = getattr(reading, name) if reading is not None else None
            if isinstance(w, KeyChoice):
                w.value = value if value is not None or name != "waveform" else "AC"
            elif isinstance(w, Input):
                if value is None:
                    w.value = ""
                elif isinstance(value, float):
                    w.value = f"{value:g}"
                else:
                    w.value = str(value)
        nt = self.query_one("#rd-not_tested", Input)
        nt.value = reading.not_tested if reading is not None and reading.not_tested else ""
        self._show_header()
        self._judge_all()
        self.query_one("#rd-half_0").focus()

    def _show_header(self) -> None:
        app = self._app
        idx = app.index
        node = self._node()
        visit = app.session.site.latest_visit()
        rcds = idx.rcds()
        left = sum(1 for d in rcds if is_untested(visit, d))
        t = Text(no_wrap=True, overflow="ellipsis")
        t.append(node_title(node), style="bold")
        t.append(f"  {node.kind} {node_summary(node)}", style="#d9c28a")
        t.append(f"  ·  {idx.path_text(self.device_id)}", style="#8fa7b3")
        t2 = Text(no_wrap=True, overflow="ellipsis")
        pos = rcds.index(self.device_id) + 1 if self.device_id in rcds else 0
        t2.append(f"device {pos} of {len(rcds)} · {left} untested", style="#8fa7b3")
        if visit is not None:
            t2.append(f" · visit {visit.date}", style="#8fa7b3")
            if visit.inspector:
                t2.append(f" ({visit.inspector})", style="#8fa7b3")
        rules = app.session.site.site.rules
        t2.append(f" · rules {rules}", style="#8fa7b3")
        self.query_one("#rd-device", Static).update(Text("\n").join([t, t2]))

    # ------------------------------------------------------------- judging
    def _waveform(self) -> str:
        return self.query_one("#rd-waveform", KeyChoice).value or "AC"

    def _raw(self, name: str) -> Any:
        """The value typed in a field (float, 'did not trip', text or None); ValueError if unreadable."""
        w = self.query_one(f"#rd-{name}")
        if isinstance(w, KeyChoice):
            return w.value
        assert isinstance(w, Input)
        if name == "note":
            return w.value
        if name in TEST_NAMES and w.value == DID_NOT_TRIP:
            return DID_NOT_TRIP
        return parse_number(w.value)

    def _band(self, name: str) -> Band:
        rules = self._app.session.site.site.rules
        group = name.split("_", 1)[0]
        return time_band(self._node(), group, self._waveform(), rules)  # type: ignore[arg-type]

    def _judge(self, name: str) -> None:
        """Show the band beside one field and the verdict on what is typed there."""
        node = self._node()
        flag: str | None = None
        band_text = ""
        try:
            value = self._raw(name)
            problem = ""
        except ValueError as exc:
            value, problem = None, str(exc)
        if name in TEST_NAMES:
            band = self._band(name)
            need = "required" if band.required else "optional"
            band_text = f"{band.text} · {need}"
            j = judge_time(band, value)
            flag, verdict = j.flag, j.text
        elif name == "ramp_ma":
            rb = ramp_band(node, self._waveform())
            band_text = f"{rb.low_ma:g}–{rb.high_ma:g} mA · optional"
            j = judge_ramp(rb, value)
            flag, verdict = j.flag, j.text
        elif name == "button":
            band_text = "must trip the device · optional"
            flag = "reading.button-failed" if value == "failed" else None
            verdict = "test button did not trip the device" if flag else (value or "not recorded")
        elif name == "waveform":
            band_text = "sets the bands above"
            verdict = ""
        else:
            verdict = ""
        if problem:
            verdict, flag = problem, None
        self.flags[name] = flag
        self.bands[name] = band_text
        self.verdicts[name] = verdict
        self.query_one(f"#band-{name}", Static).update(band_text)
        v = Text(no_wrap=True, overflow="ellipsis")
        if problem:
            v.append(f"✖ {problem}", style="bold #ff4d5e")
        elif flag:
            v.append(f"✖ {FLAG_WORDS.get(flag, flag)}: ", style="bold #ff4d5e")
            v.append(verdict, style="#ff9a3c")
        elif value not in (None, "") and name not in ("waveform", "note"):
            v.append(f"✓ {verdict}", style="#7bd88f")
        self.query_one(f"#verdict-{name}", Static).update(v)

    def _judge_all(self) -> None:
        for name in FIELDS:
            self._judge(name)

    # ------------------------------------------------------------- recording
    def _reading(self) -> Reading | None:
        """The form as a Reading (None when nothing is recorded); ValueError/ValidationError if bad."""
        data: dict[str, Any] = {}
        for name in FIELDS:
            v = self._raw(name)
            if v not in (None, ""):
                data[name] = v
        reading = Reading.model_validate(data)
        if not reading.has_values() and not reading.note:
            return None
        return reading

    def _commit(self, field: str) -> bool:
        """Record the form through the session; show a refusal at the field."""
        try:
            reading = self._reading()
        except ValueError as exc:
            msgs = errors_by_field(exc) if isinstance(exc, ValidationError) else {field: str(exc)}
            self._refuse(field, next(iter(msgs.values()), str(exc)))
            return False
        visit = self._app.site.latest_visit()
        if visit is not None and visit.readings.get(self.device_id) == reading:
            return True  # nothing changed
        if not self._undo_taken:
            self._app.push_undo(f"readings of {self.device_id}")
            self._undo_taken = True
        problem = self._app.record_reading(self.device_id, reading)
        if problem:
            self._refuse(field, problem)
            return False
        return True

    def _refuse(self, field: str, message: str) -> None:
        self.flags[field] = None
        self.verdicts[field] = message
        self.query_one(f"#verdict-{field}", Static).update(
            Text(f"✖ not recorded: {message}", style="bold #ff4d5e")
        )
        self.app.bell()

    def _advance(self, field: str) -> None:
        if not self._commit(field):
            return
        i = FIELDS.index(field)
        if i + 1 < len(FIELDS):
            self.query_one(f"#rd-{FIELDS[i + 1]}").focus()
        else:
            self._next_untested()

    def _next_untested(self) -> None:
        nxt = self._app.next_untested(self.device_id)
        self._show_header()
        if nxt is None:
            self.app.notify("Every residual-current device has a reading or a reason.")
            self.action_back()
            return
        self.load_device(nxt)

    # ------------------------------------------------------------- events
    @on(Input.Changed)
    def _typed(self, event: Input.Changed) -> None:
        name = (event.input.id or "").removeprefix("rd-")
        if name in FIELDS:
            self._judge(name)

    @on(Input.Submitted)
    def _submitted(self, event: Input.Submitted) -> None:
        event.stop()
        name = (event.input.id or "").removeprefix("rd-")
        if name == "not_tested":
            self._record_not_tested()
        elif name in FIELDS:
            self._advance(name)

    @on(TripInput.DidNotTrip)
    def _did_not_trip(self, event: TripInput.DidNotTrip) -> None:
        name = (event.input.id or "").removeprefix("rd-")
        self._judge(name)
        self._advance(name)

    @on(KeyChoice.Chosen)
    def _chosen(self, event: KeyChoice.Chosen) -> None:
        name = (event.choice.id or "").removeprefix("rd-")
        if name == "waveform":
            self._judge_all()
        else:
            self._judge(name)
        self._advance(name)

    @on(KeyChoice.Stepped)
    def _stepped(self, event: KeyChoice.Stepped) -> None:
        name = (event.choice.id or "").removeprefix("rd-")
        if name == "waveform":
            self._judge_all()
        else:
            self._judge(name)

    def _record_not_tested(self) -> None:
        reason = self.query_one("#rd-not_tested", Input).value.strip()
        if not reason:
            self.query_one("#verdict-not_tested", Static).update(
                Text("✖ give a reason", style="bold #ff4d5e")
            )
            return
        if not self._undo_taken:
            self._app.push_undo(f"readings of {self.device_id}")
            self._undo_taken = True
        problem = self._app.record_reading(self.device_id, Reading(not_tested=reason))
        if problem:
            self.query_one("#verdict-not_tested", Static).update(
                Text(f"✖ {problem}", style="bold #ff4d5e")
            )
            return
        self._next_untested()

    # ------------------------------------------------------------- actions
    def action_field(self, step: int) -> None:
        focused = self.focused
        names = [*FIELDS, "not_tested"]
        cur = (focused.id or "").removeprefix("rd-") if focused is not None else ""
        i = names.index(cur) if cur in names else 0
        self.query_one(f"#rd-{names[(i + step) % len(names)]}").focus()

    def action_device(self, step: int) -> None:
        rcds = self._app.index.rcds()
        if self.device_id not in rcds or not rcds:
            return
        i = rcds.index(self.device_id)
        self.load_device(rcds[(i + step) % len(rcds)])

    def action_not_tested(self) -> None:
        self.query_one("#rd-not_tested", Input).focus()

    def action_back(self) -> None:
        self._app.reading_closed(self.device_id)
        self.dismiss(None)

    def site_replaced(self) -> None:
        """The site changed under the form (undo): show it again."""
        if self.device_id in self._app.index.by_id:
            self.load_device(self.device_id)
        else:
            self.action_back()
