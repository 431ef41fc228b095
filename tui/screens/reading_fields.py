"""The fields, one-key choices and words of the reading screen (:mod:`tui.screens.readings`)."""

from __future__ import annotations

from typing import Any

from rich.text import Text

from model.rules.bands import fmt_value
from model.site.editing import is_untested
from model.site.fields import field_choices
from model.site.models import Reading, Visit
from model.site.terms import TEST_NAMES
from tui.format import node_summary, node_title
from tui.themes import tone

#: Each field of the pad: (name, kind, title), in the order of model.rules.entry.ENTRY_FIELDS.
PAD_FIELDS: list[tuple[str, str, str]] = [
    ("half_0", "time", "½× IΔn   0°"),
    ("half_180", "time", "½× IΔn 180°"),
    ("x1_0", "time", "1× IΔn   0°"),
    ("x1_180", "time", "1× IΔn 180°"),
    ("x5_0", "time", "5× IΔn   0°"),
    ("x5_180", "time", "5× IΔn 180°"),
    ("ramp_ma", "number", "ramp trip"),
    ("button", "choice", "test button"),
    ("waveform", "choice", "test current"),
    ("test_current", "choice", "at current"),
    ("note", "text", "note"),
    ("not_tested", "text", "not tested"),
]

#: The one-key answers of the choice fields, in the order of the model's choices.
CHOICE_KEYS: dict[str, tuple[str, ...]] = {
    "button": ("w", "f"),
    "waveform": ("a", "h", "d"),
    "test_current": ("r", "s"),
}
CHOICES: dict[str, list[tuple[str, str]]] = {
    name: list(zip(CHOICE_KEYS[name], field_choices(Reading, name), strict=True))
    for name in CHOICE_KEYS
}

FLAG_WORDS: dict[str, str] = {
    "reading.too-slow": "too slow",
    "reading.too-fast": "too fast",
    "reading.no-trip": "DID NOT TRIP",
    "reading.half-tripped": "tripped at ½×",
    "reading.ramp-out-of-band": "out of band",
    "reading.button-failed": "button failed",
    "reading.test-not-applicable": "not for this type",
}

OK = "$tw-ok"
BAD = "bold $tw-bad"


def previous_text(prev: tuple[Visit, Reading] | None, name: str, waveform: str) -> Text:
    """The value recorded for this field on the previous visit, for beside the field."""
    if prev is None or name not in (*TEST_NAMES, "ramp_ma", "button"):
        return Text()
    _, reading = prev
    results = reading if name == "button" else reading.results_for(waveform)
    value = None if results is None else getattr(results, name)
    if value is None:
        return Text()
    return Text(f"  was {fmt_value(name, value)}", style=tone("$tw-muted"))


def header_text(
    view: Any,
    device_id: str,
    page: str,
    previous: tuple[Visit, Reading] | None,
    width: int = 80,
) -> Text:
    """The device, where it is and how far the visit has got; then which test
    waveform's results the form shows and the visit the 'was' values come from."""
    idx = view.index
    node = idx.by_id[device_id]
    visit = view.site.latest_visit()
    rcds = idx.rcds()
    left = sum(1 for d in rcds if is_untested(visit, d))
    t = Text(no_wrap=True, overflow="ellipsis")
    t.append(node_title(node), style="bold")
    t.append(f"  {node.kind} {node_summary(node)}", style=tone("$tw-value"))
    t.append(f"  ·  {idx.path_text(device_id)}", style=tone("$tw-muted"))
    t2 = Text(no_wrap=True, overflow="ellipsis", style=tone("$tw-muted"))
    pos = rcds.index(device_id) + 1 if device_id in rcds else 0
    t2.append(f"device {pos} of {len(rcds)} · {left} untested")
    reading = None
    if visit is not None:
        reading = visit.readings.get(device_id)
        t2.append(f" · visit {visit.date}")
        if visit.inspector:
            t2.append(f" ({visit.inspector})")
    t2.append(f" · rules {view.site.site.rules}")
    t3 = Text(no_wrap=True, overflow="ellipsis", style=tone("$tw-muted"))
    t3.append(f"{page} test current", style=tone("bold $tw-value"))
    others = [r.waveform for r in reading.result_sets()] if reading is not None else []
    others = [w for w in others if w != page]
    if others:
        t3.append(f" (also recorded: {', '.join(others)})")
    t3.append(" · ^W other current")
    if previous is not None:
        t3.append(f" · 'was': visit {previous[0].date}")
    for line in (t, t2, t3):
        line.truncate(max(width, 20), overflow="ellipsis")
    return Text("\n", no_wrap=True).join([t, t2, t3])
