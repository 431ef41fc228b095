"""The cells of a readings CSV: what each holds, and the problems found, by row and column.

Used by :mod:`model.visits.import_csv`.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any, Literal

from pydantic import ValidationError

from model.site.messages import error_text
from model.site.models import Reading
from model.site.numbers import parse_number
from model.site.sheet_columns import DEVICE_COLUMN, VALUE_COLUMNS
from model.site.terms import (
    DID_NOT_TRIP,
    TEST_NAMES,
    ButtonResult,
    TestCurrent,
    TestWaveform,
    choices_of,
    or_list,
)

MAX_CSV_BYTES = 10 * 1024 * 1024

#: Cell text (any case) -> the choice it records.
_WAVEFORMS: dict[str, str] = {w.lower(): w for w in choices_of(TestWaveform)}
_BUTTON: dict[str, str] = {b.lower(): b for b in choices_of(ButtonResult)}


_CURRENT: dict[str, str] = {c.lower(): c for c in choices_of(TestCurrent)}


@dataclass(frozen=True, slots=True)
class RowError:
    """One problem in the CSV: its row (the header is row 1), column and why."""

    row: int
    column: str | None
    message: str

    def text(self) -> str:
        where = f"row {self.row}" + (f", column {self.column!r}" if self.column else "")
        return f"{where}: {self.message}"


class CsvImportError(ValueError):
    """The CSV has problems; ``errors`` lists every one.  Nothing was applied."""

    def __init__(self, errors: list[RowError]) -> None:
        self.errors = errors
        super().__init__(f"{len(errors)} problem(s) in the CSV: " + errors[0].text())


def clean(cell: str) -> str:
    s = cell.strip()
    if s.startswith("'"):
        s = s[1:].strip()
    return s


def number(text: str, what: str) -> tuple[float | None, str | None]:
    """The number in a cell, read as a typed one is; or the reason it is refused."""
    try:
        return parse_number(text), None
    except ValueError as exc:
        return None, f"{exc}; expected {what}"


def cell_value(key: str, text: str) -> tuple[Any, str | None]:
    """(value, error) for one non-empty cell."""
    if key in TEST_NAMES:
        if text.lower() == DID_NOT_TRIP:
            return DID_NOT_TRIP, None
        return number(text, f"a trip time in ms or {DID_NOT_TRIP!r}")
    if key == "ramp_ma":
        return number(text, "a current in mA")
    if key == "button":
        b = _BUTTON.get(text.lower())
        return (b, None) if b else (None, f"{text!r} is not {or_list(map(repr, _BUTTON.values()))}")
    if key == "waveform":
        w = _WAVEFORMS.get(text.lower())
        return (w, None) if w else (None, f"{text!r} is not {or_list(_WAVEFORMS.values())}")
    if key == "test_current":
        c = _CURRENT.get(text.lower())
        return (c, None) if c else (None, f"{text!r} is not {or_list(_CURRENT.values())}")
    return text, None  # note, not_tested


def show(v: Any) -> str:
    if v is None:
        return "—"
    if isinstance(v, float):
        return f"{v:g}"
    return str(v)


def decode(data: bytes | str) -> str:
    if isinstance(data, str):
        return data.lstrip("\ufeff")
    if len(data) > MAX_CSV_BYTES:
        raise CsvImportError([RowError(0, None, f"file is over {MAX_CSV_BYTES // 2**20} MB")])
    try:
        return data.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        raise CsvImportError([RowError(0, None, f"not UTF-8 text (byte {exc.start})")]) from None


Status = Literal["added", "changed", "unchanged"]


@dataclass(frozen=True, slots=True)
class KeyChange:
    """What the import does to one value of one device."""

    device: str
    key: str
    old: Any
    new: Any
    status: Status
    #: The test waveform of a further row's results (None: the reading's own).
    waveform: str | None = None


#: The keys a further row of a device may carry: one test waveform's results.
FURTHER_KEYS = frozenset({*TEST_NAMES, "ramp_ma", "waveform", "test_current"})


def plan_further_row(
    rec_no: int,
    first: int,
    dev: str,
    base: Reading | None,
    values: dict[str, Any],
    errors: list[RowError],
) -> tuple[Reading, list[KeyChange]] | None:
    """A further row of one device (its first row is ``first``): the results of
    another test waveform, added to ``base``.  Problems are added to ``errors``."""
    wf = values.get("waveform")
    if wf is None:
        errors.append(
            RowError(
                rec_no,
                DEVICE_COLUMN,
                f"device {dev!r} is already given in row {first}; a further row of a device "
                "gives another test waveform's results and needs its waveform",
            )
        )
        return None
    for key in values:
        if key not in FURTHER_KEYS:
            col = next(c for c, k in VALUE_COLUMNS.items() if k == key)
            errors.append(RowError(rec_no, col, f"give it on the device's first row (row {first})"))
    if base is None:
        errors.append(
            RowError(rec_no, DEVICE_COLUMN, f"device {dev!r} has no values in row {first}")
        )
        return None
    if wf == base.waveform:
        errors.append(
            RowError(rec_no, "waveform", f"the {wf} results of {dev!r} are given in row {first}")
        )
    if errors and errors[-1].row == rec_no:
        return None
    merged = base.model_dump(exclude_defaults=True)
    sets = merged.setdefault("further", [])
    entry = next((f for f in sets if f["waveform"] == wf), None)
    if entry is None:
        entry = {"waveform": wf}
        sets.append(entry)
    old_set = base.results_for(wf)
    entry.update(values)
    try:
        reading = Reading.model_validate(merged)
    except ValidationError as exc:
        for detail in exc.errors():
            loc = detail.get("loc", ())
            key = str(loc[2]) if len(loc) > 2 else "waveform"
            col = next((c for c, k in VALUE_COLUMNS.items() if k == key), "waveform")
            errors.append(RowError(rec_no, col, error_text(detail)))
        return None
    changes = []
    for key, new in values.items():
        if key == "waveform":
            continue
        before = None if old_set is None else getattr(old_set, key)
        status: Status = "added" if before is None else "unchanged" if before == new else "changed"
        changes.append(KeyChange(dev, key, before, new, status, wf))
    return reading, changes
