"""Readings typed into a spreadsheet, brought back into a visit.

The layout is our own test-sheet export: one header row; the first column
``device`` (the device id); value columns named with their units
(``half_0 [ms]`` ... ``x5_180 [ms]``, ``ramp [mA]``) and ``button``,
``waveform``, ``note``, ``not_tested``.  Any other column (label, board, type,
band and mark columns) is ignored.  A value cell holds a number,
``did not trip`` (timed tests only) or nothing; a leading ``'`` (the
spreadsheet's text guard) is stripped.

An empty cell leaves the value already recorded as it is: an import adds and
changes values, it never removes one.  Devices not in the file are left
alone.  Every row is checked (the device exists and is a residual-current
device, each value is valid for its column, the resulting reading is valid)
and *all* problems are reported, each with its row number and column; with
any problem nothing is applied.
"""

from __future__ import annotations

import csv
import io
from dataclasses import dataclass, field
from typing import Any, Literal

from pydantic import ValidationError

from model.site.history import find_visit, known_visits_text
from model.site.messages import error_text
from model.site.models import Reading, SiteFile, Visit, blank
from model.site.numbers import parse_number
from model.site.sheet_columns import DEVICE_COLUMN, VALUE_COLUMNS
from model.site.terms import (
    DID_NOT_TRIP,
    RCD_KINDS,
    TEST_NAMES,
    TEST_VALUE_KEYS,
    ButtonResult,
    TestWaveform,
    choices_of,
    or_list,
)
from model.storage.codec import SiteLoadError, dumps_site, parse_site

KEY_COLUMN: dict[str, str] = {v: k for k, v in VALUE_COLUMNS.items()}
IMPORT_KEYS: tuple[str, ...] = tuple(VALUE_COLUMNS.values())
MAX_CSV_BYTES = 10 * 1024 * 1024

#: Cell text (any case) -> the choice it records.
_WAVEFORMS: dict[str, str] = {w.lower(): w for w in choices_of(TestWaveform)}
_BUTTON: dict[str, str] = {b.lower(): b for b in choices_of(ButtonResult)}


class ImportTargetError(ValueError):
    """The site or visit to import into cannot be used; ``str()`` is one line."""


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


Status = Literal["added", "changed", "unchanged"]


@dataclass(frozen=True, slots=True)
class KeyChange:
    """What the import does to one value of one device."""

    device: str
    key: str
    old: Any
    new: Any
    status: Status


@dataclass
class ImportPlan:
    """The checked import: what will change, and the site after it."""

    visit_id: str
    visit_date: str
    changes: list[KeyChange]
    site: SiteFile
    used_columns: list[str] = field(default_factory=list)
    ignored_columns: list[str] = field(default_factory=list)
    rows: int = 0

    @property
    def changed(self) -> bool:
        return any(c.status != "unchanged" for c in self.changes)

    def counts(self) -> dict[str, int]:
        out: dict[str, int] = dict.fromkeys(choices_of(Status), 0)
        for c in self.changes:
            out[c.status] += 1
        return out


def _clean(cell: str) -> str:
    s = cell.strip()
    if s.startswith("'"):
        s = s[1:].strip()
    return s


def _number(text: str, what: str) -> tuple[float | None, str | None]:
    """The number in a cell, read as a typed one is; or the reason it is refused."""
    try:
        return parse_number(text), None
    except ValueError as exc:
        return None, f"{exc}; expected {what}"


def _cell_value(key: str, text: str) -> tuple[Any, str | None]:
    """(value, error) for one non-empty cell."""
    if key in TEST_NAMES:
        if text.lower() == DID_NOT_TRIP:
            return DID_NOT_TRIP, None
        return _number(text, f"a trip time in ms or {DID_NOT_TRIP!r}")
    if key == "ramp_ma":
        return _number(text, "a current in mA")
    if key == "button":
        b = _BUTTON.get(text.lower())
        return (b, None) if b else (None, f"{text!r} is not {or_list(map(repr, _BUTTON.values()))}")
    if key == "waveform":
        w = _WAVEFORMS.get(text.lower())
        return (w, None) if w else (None, f"{text!r} is not {or_list(_WAVEFORMS.values())}")
    return text, None  # note, not_tested


def _show(v: Any) -> str:
    if v is None:
        return "—"
    if isinstance(v, float):
        return f"{v:g}"
    return str(v)


def _decode(data: bytes | str) -> str:
    if isinstance(data, str):
        return data.lstrip("\ufeff")
    if len(data) > MAX_CSV_BYTES:
        raise CsvImportError([RowError(0, None, f"file is over {MAX_CSV_BYTES // 2**20} MB")])
    try:
        return data.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        raise CsvImportError([RowError(0, None, f"not UTF-8 text (byte {exc.start})")]) from None


def _target_visit(site: SiteFile, visit_id: str | None) -> Visit:
    """The visit to import into: the one named, or the latest."""
    if visit_id is None:
        visit = site.latest_visit()
        if visit is None:
            raise ImportTargetError("the site has no visits; add a visit before importing readings")
        return visit
    found = find_visit(site, visit_id)
    if found is None:
        raise ImportTargetError(f"no visit {visit_id!r}; known visits: {known_visits_text(site)}")
    return found


def _records(data: bytes | str) -> list[list[str]]:
    """The CSV's rows, the header first (which must not be empty)."""
    text = _decode(data)
    try:
        records = list(csv.reader(io.StringIO(text, newline="")))
    except csv.Error as exc:
        raise CsvImportError([RowError(0, None, f"not readable as CSV: {exc}")]) from None
    if not records or not any(c.strip() for c in records[0]):
        raise CsvImportError([RowError(1, None, "no header row")])
    return records


def _columns(header: list[str]) -> tuple[int, dict[int, str]]:
    """(the device column, {position: value column}) of a header; every problem raised."""
    errors: list[RowError] = []
    columns: dict[int, str] = {}
    device_col: int | None = None
    seen: dict[str, int] = {}
    for i, name in enumerate(header):
        if name in seen and (name in VALUE_COLUMNS or name == DEVICE_COLUMN):
            errors.append(RowError(1, name, "column appears twice"))
        seen.setdefault(name, i)
        if name == DEVICE_COLUMN and device_col is None:
            device_col = i
        elif name in VALUE_COLUMNS and name not in columns.values():
            columns[i] = name
    if device_col is None:
        hint = (
            " (the file looks semicolon- or tab-separated; the test sheet is comma-separated)"
            if len(header) == 1 and (";" in header[0] or "\t" in header[0])
            else ""
        )
        errors.append(RowError(1, DEVICE_COLUMN, "the header has no 'device' column" + hint))
    elif device_col != 0:
        errors.append(RowError(1, DEVICE_COLUMN, "'device' must be the first column"))
    if not columns:
        errors.append(
            RowError(1, None, "no reading columns (expected e.g. 'x1_0 [ms]', 'ramp [mA]')")
        )
    if errors:
        raise CsvImportError(errors)
    assert device_col is not None
    return device_col, columns


def plan_import(site: SiteFile, data: bytes | str, visit_id: str | None = None) -> ImportPlan:
    """Check a readings CSV against the site and work out what it changes.

    Raises :class:`ImportTargetError` when the visit is unknown (or the site
    has none) and :class:`CsvImportError` with every problem of the file.
    The site passed in is not modified.
    """
    visit = _target_visit(site, visit_id)
    records = _records(data)
    header = [_clean(c) for c in records[0]]
    device_col, columns = _columns(header)
    ignored = [h for i, h in enumerate(header) if i != device_col and i not in columns and h]

    errors: list[RowError] = []
    by_id = {n.id: n for n in site.nodes}
    given_in: dict[str, int] = {}
    new_readings: dict[str, Reading] = {}
    changes: list[KeyChange] = []
    rows = 0
    for rec_no, rec in enumerate(records[1:], start=2):
        if not any(c.strip() for c in rec):
            continue
        dev_cell = _clean(rec[device_col]) if device_col < len(rec) else ""
        if not dev_cell and not any(
            _clean(rec[i]) for i, name in columns.items() if name != "note" and i < len(rec)
        ):
            # no device and no values: the sheet's closing statement row, or a note line
            continue
        rows += 1
        row_errors: list[RowError] = []
        if len(rec) > len(header) and any(c.strip() for c in rec[len(header) :]):
            row_errors.append(
                RowError(rec_no, None, f"{len(rec)} cells but the header has {len(header)} columns")
            )
        dev = _clean(rec[device_col]) if device_col < len(rec) else ""
        node = by_id.get(dev)
        if not dev:
            row_errors.append(RowError(rec_no, DEVICE_COLUMN, "no device id"))
        elif dev in given_in:
            row_errors.append(
                RowError(
                    rec_no, DEVICE_COLUMN, f"device {dev!r} is already given in row {given_in[dev]}"
                )
            )
        elif node is None:
            row_errors.append(RowError(rec_no, DEVICE_COLUMN, f"no device {dev!r} in this site"))
        elif node.kind not in RCD_KINDS:
            row_errors.append(
                RowError(
                    rec_no,
                    DEVICE_COLUMN,
                    f"{dev!r} is a {node.kind}; readings are for residual-current devices",
                )
            )
        if dev and dev not in given_in:
            given_in[dev] = rec_no
        values: dict[str, Any] = {}
        for i, col in columns.items():
            cell = _clean(rec[i]) if i < len(rec) else ""
            if not cell:
                continue
            key = VALUE_COLUMNS[col]
            v, err = _cell_value(key, cell)
            if err:
                row_errors.append(RowError(rec_no, col, err))
            else:
                values[key] = v
        if row_errors:
            errors.extend(row_errors)
            continue
        old = visit.readings.get(dev)
        if old is None and not any(k != "waveform" for k in values):
            continue  # an untested device's empty row: nothing to record
        merged = {} if old is None else old.model_dump(exclude_defaults=True)
        merged.update(values)
        cleared_not_tested = (
            old is not None
            and old.not_tested is not None
            and "not_tested" not in values
            and any(k in values for k in TEST_VALUE_KEYS)
        )
        if cleared_not_tested:
            # tested after all: the values replace the earlier not-tested reason (shown)
            merged.pop("not_tested", None)
        try:
            reading = Reading.model_validate(merged)
        except ValidationError as exc:
            reported: set[str] = set()
            for detail in exc.errors():
                loc = detail.get("loc", ())
                key = str(loc[0]) if loc else "not_tested"
                if key in reported:  # one message per cell (a union gives one per branch)
                    continue
                reported.add(key)
                msg = error_text(detail)
                col = KEY_COLUMN.get(key, KEY_COLUMN["not_tested"])
                errors.append(RowError(rec_no, col, msg))
            continue
        new_readings[dev] = reading
        if cleared_not_tested:
            assert old is not None
            changes.append(KeyChange(dev, "not_tested", old.not_tested, None, "changed"))
        for key in IMPORT_KEYS:
            if key not in values:
                continue
            before = None if old is None else getattr(old, key)
            status: Status = (
                "added" if blank(before) else "unchanged" if before == values[key] else "changed"
            )
            changes.append(KeyChange(dev, key, before, values[key], status))
    if errors:
        raise CsvImportError(errors)

    readings = dict(visit.readings)
    readings.update(new_readings)
    new_visit = visit.model_copy(update={"readings": readings})
    visits = [new_visit if v is visit else v for v in site.visits]
    updated = site.model_copy(update={"visits": visits})
    try:
        checked = parse_site(dumps_site(updated))
    except SiteLoadError as exc:  # pragma: no cover - every row was checked above
        raise CsvImportError([RowError(0, None, exc.message)]) from None
    return ImportPlan(
        visit_id=visit.id,
        visit_date=visit.date,
        changes=changes,
        site=checked,
        used_columns=[header[i] for i in sorted(columns)],
        ignored_columns=ignored,
        rows=rows,
    )


def preview_text(plan: ImportPlan) -> str:
    """What the import will do, device by device and value by value."""
    c = plan.counts()
    lines = [
        f"Import into visit {plan.visit_id} ({plan.visit_date}): {plan.rows} row(s); "
        f"{c['added']} value(s) added, {c['changed']} changed, {c['unchanged']} unchanged.",
    ]
    if plan.ignored_columns:
        lines.append("Columns ignored: " + ", ".join(plan.ignored_columns))
    current = None
    for ch in plan.changes:
        if ch.device != current:
            current = ch.device
            lines.append(f"  {ch.device}")
        what = f"{_show(ch.old)} → {_show(ch.new)}" if ch.status == "changed" else _show(ch.new)
        lines.append(f"    {ch.status:<9} {KEY_COLUMN[ch.key]:<14} {what}")
    return "\n".join(lines) + "\n"
