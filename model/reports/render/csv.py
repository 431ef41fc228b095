"""CSV renderings of the test sheet and the remedial-work list.

The test sheet's layout is read back by ``tripwise import-readings``: one
header row, units in the column names, the device id first, value cells a
plain number, ``did not trip`` or empty, and every mark in a column of its own.
The file is UTF-8 with a byte-order mark so that spreadsheet programs which
otherwise guess a legacy code page show Ω, µ, × and accented names correctly;
Python reads it with ``encoding="utf-8-sig"`` (which also accepts a file
without the mark).

A text cell that begins with ``=``, ``+``, ``-``, ``@``, a tab or a carriage
return, or with the full-width or small forms of ``= + - @`` (``＝``, ``﹦``
…, which some spreadsheets also read as the start of a formula), is written
with a leading apostrophe, so a spreadsheet shows it as text and never
evaluates it.
Value cells are never prefixed (a reading is never negative).

The last row has an empty ``device`` (or ``number``) cell and carries in its
``note`` (or ``notes``) cell the not-a-certificate statement, the generation
time and the tripwise version; readers skip rows whose first cell is empty.
"""

from __future__ import annotations

import csv
import io

from model.reports.remedial import RemedialDoc
from model.reports.sheet import SheetCell, SheetDoc
from model.reports.text import num_text
from model.rules.bands import GROUPS
from model.site.sheet_columns import DEVICE_COLUMN, RAMP_COLUMN, time_column
from model.site.terms import DID_NOT_TRIP, TEST_NAMES

ENCODING = "utf-8-sig"
_FORMULA_START = (
    *("=", "+", "-", "@", "\t", "\r"),
    *("\uff1d", "\uff0b", "\uff0d", "\uff20"),  # full-width = + - @
    *("\ufe66", "\ufe62", "\ufe63", "\ufe6b"),  # small = + - @
)


def text_cell(value: object) -> str:
    """A text cell a spreadsheet never evaluates as a formula."""
    s = "" if value is None else str(value)
    return "'" + s if s.startswith(_FORMULA_START) else s


def value_cell(value: float | str | None) -> str:
    """A reading: a plain number, 'did not trip', or empty."""
    if value is None:
        return ""
    if value == DID_NOT_TRIP:
        return DID_NOT_TRIP
    assert isinstance(value, float | int)
    return num_text(value)


def sheet_columns() -> list[str]:
    """The header row of the test-sheet CSV, in order."""
    cols = [
        DEVICE_COLUMN,
        "board",
        "label",
        "way",
        "kind",
        "idn [mA]",
        "type",
        "delay",
        "visit",
        "waveform",
        "test_current",
    ]
    for g in GROUPS:
        for t in TEST_NAMES:
            if t.startswith(g + "_"):
                cols += [time_column(t), f"{t} mark"]
        cols += [f"{g} band", f"{g} required"]
    cols += [RAMP_COLUMN, "ramp mark", "ramp band", "button", "button mark", "not_tested", "note"]
    return cols


SHEET_COLUMNS: tuple[str, ...] = tuple(sheet_columns())

REMEDIAL_COLUMNS: tuple[str, ...] = (
    "number",
    "severity",
    "rule",
    "board",
    "place",
    "nodes",
    "labels",
    "ways",
    "where",
    "message",  # headed "Found" on the printed copy; the column name is public
    "measured",
    "band",  # headed "Limit" on the printed copy
    "action",
    "source",
    "basis",
    "done",
    "notes",
    "planned_change",  # added last: the planned change(s) that clear the item, or empty
)


def _statement(doc: RemedialDoc | SheetDoc) -> str:
    note = doc.heading.visit_note()
    return f"{doc.heading.statement} {doc.heading.generated_line()}." + (f" {note}" if note else "")


def _write(rows: list[list[str]]) -> bytes:
    buf = io.StringIO(newline="")
    w = csv.writer(buf, lineterminator="\r\n")
    w.writerows(rows)
    return buf.getvalue().encode(ENCODING)


def sheet_csv(doc: SheetDoc) -> bytes:
    """The test sheet as CSV (layout in :data:`SHEET_COLUMNS`; see the module docstring)."""
    rows: list[list[str]] = [list(SHEET_COLUMNS)]
    visit = doc.heading.visit_id or ""
    for r in doc.rows:
        cells: dict[str, SheetCell] = {c.name: c for c in r.tests}
        row = [
            text_cell(r.device_id),
            text_cell(r.board),
            text_cell(r.label),
            text_cell(r.way),
            r.kind,
            num_text(r.idn_ma),
            r.waveform_type,
            r.delay,
            text_cell(visit if r.recorded else ""),
            r.test_waveform or "",
            r.test_current or "",
        ]
        for g in GROUPS:
            group_cells = [cells[t] for t in TEST_NAMES if t.startswith(g + "_")]
            for c in group_cells:
                row += [value_cell(c.value), c.mark]
            row += [text_cell(group_cells[0].band), "yes" if group_cells[0].required else "no"]
        row += [
            value_cell(r.ramp.value),
            r.ramp.mark,
            text_cell(r.ramp.band),
            r.button or "",
            r.button_mark,
            text_cell(r.not_tested or ""),
            text_cell(r.note),
        ]
        rows.append(row)
    last = [""] * len(SHEET_COLUMNS)
    last[-1] = _statement(doc)
    rows.append(last)
    return _write(rows)


def remedial_csv(doc: RemedialDoc) -> bytes:
    """The remedial-work list as CSV, one row per item (columns :data:`REMEDIAL_COLUMNS`)."""
    rows: list[list[str]] = [list(REMEDIAL_COLUMNS)]
    for g in doc.groups:
        for i in g.items:
            rows.append(
                [
                    str(i.number),
                    i.severity,
                    i.rule,
                    text_cell(g.label),
                    text_cell(g.place),
                    text_cell(" ".join(i.node_ids)),
                    text_cell("; ".join(i.node_labels)),
                    text_cell("; ".join(i.node_ways)),
                    text_cell("; ".join(i.where)),
                    text_cell(i.message),
                    text_cell(i.measured or ""),
                    text_cell(i.band or ""),
                    text_cell(i.action),
                    text_cell(i.source),
                    i.basis,
                    "",
                    "",
                    text_cell(i.planned),
                ]
            )
    last = [""] * len(REMEDIAL_COLUMNS)
    last[REMEDIAL_COLUMNS.index("notes")] = _statement(doc)
    rows.append(last)
    return _write(rows)
