"""The value columns of the test-sheet CSV: written by the reports, read back by the importer.

The CSV layout is a public interface (README, "The test-sheet CSV"); the
names a reading's values travel under are kept here once, so the sheet that
is written and the sheet that is read cannot drift apart.
"""

from __future__ import annotations

from model.site.terms import TEST_NAMES

#: The column that names the device of a row.
DEVICE_COLUMN = "device"
#: The column of the ramp test's trip current.
RAMP_COLUMN = "ramp [mA]"


def time_column(test: str) -> str:
    """The column of one timed test's trip time: 'x1_0 [ms]'."""
    return f"{test} [ms]"


#: Value columns -> the reading keys they record.
VALUE_COLUMNS: dict[str, str] = {
    **{time_column(t): t for t in TEST_NAMES},
    RAMP_COLUMN: "ramp_ma",
    "button": "button",
    "waveform": "waveform",
    "test_current": "test_current",
    "note": "note",
    "not_tested": "not_tested",
}
