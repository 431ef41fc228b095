"""A reading as it is typed: each field's value, the band beside it and the verdict so far.

The reading form judges a value the moment it is typed, before it is recorded:
the band and the judgement come from :mod:`model.rules.bands`, exactly as for a
recorded reading.  The form's text turns into a :class:`~model.site.models.Reading`
here, and a recorded reading back into the form's text.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any, Literal

from pydantic import ValidationError

from model.rules.bands import (
    group_of,
    judge_button,
    judge_ramp,
    judge_time,
    ramp_band,
    ramp_band_text,
    time_band,
)
from model.site.messages import plain_message
from model.site.models import Reading
from model.site.numbers import number_text, parse_number
from model.site.terms import DID_NOT_TRIP, TEST_NAMES

#: The fields in entry order (after the last comes the next device).
ENTRY_ORDER: tuple[str, ...] = (
    *TEST_NAMES,
    "ramp_ma",
    "button",
    "waveform",
    "test_current",
    "note",
)
#: Every field of the form: the entry order, then the reason a device was not tested.
ENTRY_FIELDS: tuple[str, ...] = (*ENTRY_ORDER, "not_tested")
#: Fields whose text is taken as it is (the others are numbers or 'did not trip').
_TEXT_FIELDS = frozenset({"note", "not_tested", "button", "waveform", "test_current"})
#: Fields that belong to one test waveform's results (a page of the form).
PAGE_FIELDS: tuple[str, ...] = (*TEST_NAMES, "ramp_ma", "waveform", "test_current")
#: Fields judged against a band (a value in them is either flagged or in band).
_JUDGED = frozenset({*TEST_NAMES, "ramp_ma", "button"})

#: The test current a reading assumes when none is given.
DEFAULT_TEST_WAVEFORM: str = Reading.model_fields["waveform"].default

Mark = Literal["", "unreadable", "flagged", "in band", "recorded"]


def typed_value(name: str, text: str) -> float | str | None:
    """The value of a field's text: a number, 'did not trip', the text, or None when empty.

    Raises ValueError, in plain words, when a number cannot be read.
    """
    if name in _TEXT_FIELDS:
        return text or None
    if name in TEST_NAMES and text == DID_NOT_TRIP:
        return DID_NOT_TRIP
    return parse_number(text)


#: What a numeric field holds and its unit, for messages in plain words.
_NUMBER_FIELDS: dict[str, tuple[str, str]] = {
    **{t: ("a trip time", "ms") for t in TEST_NAMES},
    "ramp_ma": ("the ramp trip current", "mA"),
}


def value_problem(name: str, value: float | str | None) -> str | None:
    """Why the site file would refuse this one typed number, in plain words; None if it is fine.

    The limits are the model's own (:class:`~model.site.models.Reading`), so a
    value is refused at the field the moment it is typed, for the same reason
    it would be refused when recorded, and is never judged against a band first.
    """
    if name not in _NUMBER_FIELDS or not isinstance(value, float):
        return None
    try:
        Reading.model_validate({name: value})
    except ValidationError as exc:
        errors = [e for e in exc.errors() if e.get("type") != "literal_error"] or exc.errors()
        what, unit = _NUMBER_FIELDS[name]
        message = plain_message(errors[0], what, unit, value)
        if name in TEST_NAMES and errors[0].get("type") in ("less_than_equal", "less_than"):
            # why there is a ceiling, and what to record instead
            message += (
                f"; a trip test never runs that long, so a device that did not trip is "
                f"recorded as {DID_NOT_TRIP!r}, not as a time"
            )
        return message
    return None


def entry_texts(reading: Reading | None, waveform: str | None = None) -> dict[str, str]:
    """The form's text for a recorded reading (empty fields where there is none).

    ``waveform`` picks the page of the form: the results taken with that test
    waveform (the reading's own by default); the test button, note and
    not-tested reason are the reading's whatever the page.
    """
    page = waveform or (reading.waveform if reading is not None else DEFAULT_TEST_WAVEFORM)
    results = reading.results_for(page) if reading is not None else None
    texts: dict[str, str] = {}
    for name in ENTRY_FIELDS:
        if name == "waveform":
            value: Any = page
        elif name in PAGE_FIELDS:
            value = getattr(results, name) if results is not None else None
        else:
            value = getattr(reading, name) if reading is not None else None
        if value is None:
            texts[name] = ""
        elif isinstance(value, float):
            texts[name] = number_text(value)
        else:
            texts[name] = str(value)
    return texts


def next_field(name: str, texts: dict[str, str]) -> str | None:
    """The field after ``name`` in entry order; None after the last.

    The test current convention only matters for a half-wave or smooth-DC
    test, so with AC test current the form steps over it.
    """
    i = ENTRY_ORDER.index(name) + 1
    while i < len(ENTRY_ORDER):
        nxt = ENTRY_ORDER[i]
        if nxt != "test_current" or chosen_waveform(texts) != DEFAULT_TEST_WAVEFORM:
            return nxt
        i += 1
    return None


def chosen_waveform(texts: dict[str, str]) -> str:
    """The test current the form's bands are for."""
    return texts.get("waveform") or DEFAULT_TEST_WAVEFORM


class FieldProblem(ValueError):
    """A typed value refused, with the field it was typed in (``field``)."""

    def __init__(self, field: str, problem: str) -> None:
        super().__init__(problem)
        self.field = field


def _typed(texts: dict[str, str], names: tuple[str, ...]) -> dict[str, Any]:
    data: dict[str, Any] = {}
    for name in names:
        try:
            value = typed_value(name, texts.get(name, ""))
        except ValueError as exc:
            raise FieldProblem(name, str(exc)) from None
        problem = value_problem(name, value)
        if problem:
            raise FieldProblem(name, problem)
        if value not in (None, ""):
            data[name] = value
    return data


def reading_from_texts(
    texts: dict[str, str], base: Reading | None = None, page: str | None = None
) -> Reading | None:
    """The form as a Reading; None when nothing is recorded (no value and no note).

    ``base`` is the reading recorded so far and ``page`` the test waveform
    whose results the form was showing (see :func:`entry_texts`): the form's
    page replaces those results and every other waveform's results of
    ``base`` are kept.  Raises ValueError: :class:`FieldProblem` naming the field
    of a refused typed value, a ``ValidationError`` when the model refuses one.
    """
    data = _typed(texts, ENTRY_ORDER)
    further = [f.model_dump(exclude_defaults=True) for f in (base.further if base else [])]
    if base is not None and page is not None and page != base.waveform:
        own = {k: v for k, v in data.items() if k not in PAGE_FIELDS}
        results = {k: v for k, v in data.items() if k in PAGE_FIELDS}
        results.setdefault("waveform", chosen_waveform(texts))
        kept = [f for f in further if f.get("waveform") != page]
        if len(results) > 1:  # more than the waveform itself
            at = next((i for i, f in enumerate(further) if f.get("waveform") == page), len(kept))
            kept.insert(at, results)
        base_own = base.model_dump(exclude_defaults=True, exclude={"further"})
        for k in ("button", "note", "not_tested"):
            base_own.pop(k, None)
        data = {**base_own, **own}
        further = kept
    if further:
        data["further"] = further
    reading = Reading.model_validate(data)
    if not reading.has_values() and not reading.note:
        return None
    return reading


@dataclass(frozen=True)
class EntryVerdict:
    """One field of the form as typed.

    ``band`` is the band shown beside the field, ``need`` whether the rule set
    requires the test ("required", "optional" or "" where that does not apply),
    ``flag`` the finding's rule id when the value is outside its band,
    ``verdict`` the full sentence, and ``mark`` the verdict in one word: the text
    could not be read, the value is flagged, in band, or only recorded (either
    outcome is within the product standard).
    """

    band: str
    need: str
    flag: str | None
    verdict: str
    mark: Mark


def judge_entry(
    node: Any, name: str, text: str, waveform: str, rules: str, test_current: str | None = None
) -> EntryVerdict:
    """Judge the text typed in one field of a device's reading form."""
    flag: str | None = None
    band_text = verdict = problem = need = ""
    may_trip = False
    value: float | str | None
    try:
        value = typed_value(name, text)
    except ValueError as exc:
        value, problem = None, str(exc)
    else:
        problem = value_problem(name, value) or ""
        if problem:
            value = None  # refused, so never judged against the band
    if name in TEST_NAMES:
        band = time_band(node, group_of(name), waveform, rules, test_current or None)
        need = "required" if band.required else "optional"
        band_text, may_trip = band.text, band.may_trip
        j = judge_time(band, value)
        flag, verdict = j.flag, j.text
    elif name == "ramp_ma":
        rb = ramp_band(node, waveform)
        band_text, need = ramp_band_text(rb, "span"), "optional"
        j = judge_ramp(rb, value if not isinstance(value, str) else None)
        flag, verdict = j.flag, j.text
    elif name == "button":
        band_text, need = "must trip it", "optional"
        j = judge_button(value if isinstance(value, str) else None)
        flag, verdict = j.flag, (j.text if value else "")
    elif name == "waveform":
        band_text = "sets the bands above"
    elif name == "test_current":
        band_text = "half-wave/DC: r × IΔn, s scaled"
    elif name == "not_tested":
        band_text = "reason, instead of values"
    mark: Mark = ""
    if problem:
        verdict, flag, mark = problem, None, "unreadable"
    elif flag:
        mark = "flagged"
    elif value not in (None, "") and name in _JUDGED:
        mark = "recorded" if may_trip else "in band"
    return EntryVerdict(band_text, need, flag, verdict, mark)
