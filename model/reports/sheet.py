"""The test sheet as data: one row per residual-current device of the latest visit.

:func:`build_sheet` reads every recorded value against its band
(:mod:`model.rules.bands`) and marks it; the renderers in
``model.reports.render`` only lay the rows out.
"""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass
from typing import Any

from model.reports.heading import Heading, build_heading
from model.reports.text import clean, clean_lines, with_way
from model.reports.zs_sheet import ZsRow
from model.rules.bands import (
    GROUP_TITLE,
    group_of,
    judge_ramp,
    judge_results,
    ramp_band,
    ramp_band_text,
    time_band,
)
from model.rules.findings import CAUTION, device_text
from model.rules.limits import rule_set
from model.site.models import SiteFile, Visit
from model.site.terms import DID_NOT_TRIP, TEST_NAMES
from model.site.tree import SiteIndex

TITLE = "Test sheet"

#: Marks of a recorded value against its band.
MARK_PASS = "pass"
MARK_OUT = "out of band"
MARK_NOT_JUDGED = "not judged"
MARK_FAIL = "fail"


@dataclass(frozen=True)
class SheetCell:
    """One recorded value with its band and mark.

    ``value`` is a time [ms] or current [mA] as recorded, ``'did not trip'``,
    or None when nothing was recorded.  ``mark`` is ``pass``, ``out of band``,
    ``not judged`` or '' (nothing recorded).
    """

    name: str
    title: str
    value: float | str | None
    band: str
    mark: str
    flag: str | None
    required: bool
    #: A shorter form of the band for narrow columns ('' when ``band`` is short already).
    short: str = ""

    def value_text(self, unit: str = "ms") -> str:
        if self.value is None:
            return ""
        if self.value == DID_NOT_TRIP:
            return DID_NOT_TRIP
        assert isinstance(self.value, float | int)
        return f"{self.value:g} {unit}"


@dataclass(frozen=True)
class SheetRow:
    """One residual-current device on the test sheet."""

    device_id: str
    board: str
    label: str
    kind: str
    idn_ma: float
    waveform_type: str
    delay: str
    type_text: str
    recorded: bool
    not_tested: str | None
    test_waveform: str | None
    tests: tuple[SheetCell, ...]
    ramp: SheetCell
    button: str | None
    button_mark: str
    #: The reading's note; line breaks kept (renderers other than CSV join the lines).
    note: str
    #: Half-wave or smooth DC: whether the test was at the rated multiple or scaled.
    test_current: str | None = None
    #: True for a row of a further test waveform's results (same device, same visit).
    further: bool = False
    #: The board's way the device is in, as numbered on site ('' when not given).
    way: str = ""

    @property
    def named(self) -> str:
        """The label with the way in front ('way 3 · RCCB 1'), as the documents print it."""
        return with_way(self.label, self.way)


@dataclass(frozen=True)
class SheetDoc:
    heading: Heading
    rows: tuple[SheetRow, ...]
    required_groups: tuple[str, ...]
    rules_source: str
    caution: str = CAUTION
    #: One row per circuit fed through an overcurrent device (Zs against its maximum).
    zs_rows: tuple[ZsRow, ...] = ()


def _mark(flag: str | None, value: object, judged: bool) -> str:
    if value is None:
        return ""
    if flag is not None:
        return MARK_OUT
    return MARK_PASS if judged else MARK_NOT_JUDGED


def build_sheet(
    site: SiteFile, *, generated: dt.datetime | None = None, later: Visit | None = None
) -> SheetDoc:
    """The test sheet of the latest visit: one row per residual-current device, tree order."""
    idx = SiteIndex.build(site)
    visit = site.latest_visit()
    rules = site.site.rules
    rows: list[SheetRow] = []
    for dev in idx.rcds():
        node = idx.node(dev)
        reading = visit.readings.get(dev) if visit is not None else None
        rows.append(_row(idx, dev, node, reading, reading, rules))
        for extra in reading.further if reading is not None else []:
            rows.append(_row(idx, dev, node, reading, extra, rules))
    rs = rule_set(rules)
    return SheetDoc(
        heading=build_heading(site, visit, TITLE, generated, later),
        rows=tuple(rows),
        required_groups=tuple(GROUP_TITLE[g] for g in rs.required_tests),
        rules_source=rs.test_source,
    )


def _row(idx: SiteIndex, dev: str, node: Any, reading: Any, results: Any, rules: str) -> SheetRow:
    """One row: a reading's own results (``results is reading``) or one further waveform's."""
    own = results is reading
    waveform = results.waveform if results is not None else "AC"
    tc = results.test_current if results is not None else None
    judged = judge_results(node, results, rules) if results is not None else {}
    cells: list[SheetCell] = []
    for t in TEST_NAMES:
        g = group_of(t)
        band = time_band(node, g, waveform, rules, tc)
        value = getattr(results, t) if results is not None else None
        j = judged.get(t)
        flag = j.flag if j is not None else None
        title = f"{GROUP_TITLE[g]} {t.split('_')[1]}°"
        cells.append(
            SheetCell(
                t,
                title,
                value,
                band.text,
                _mark(flag, value, not band.may_trip),
                flag,
                band.required,
            )
        )
    rb = ramp_band(node, waveform)
    ramp_v = results.ramp_ma if results is not None else None
    jr = judge_ramp(rb, ramp_v)
    ramp = SheetCell(
        "ramp_ma",
        "Ramp",
        ramp_v,
        rb.text,
        _mark(jr.flag, ramp_v, rb.applies),
        jr.flag,
        False,
        short=ramp_band_text(rb, "inequality"),
    )
    button = reading.button if (reading is not None and own) else None
    bmark = "" if button is None else (MARK_FAIL if button == "failed" else MARK_PASS)
    return SheetRow(
        device_id=dev,
        board=clean(idx.board_label(dev)),
        label=clean(idx.label(dev)),
        kind=str(node.kind),
        idn_ma=float(node.idn_ma),
        waveform_type=str(node.waveform),
        delay=str(node.delay),
        type_text=device_text(node),
        recorded=reading is not None,
        not_tested=None
        if reading is None or reading.not_tested is None or not own
        else clean(reading.not_tested),
        test_waveform=None if reading is None else waveform,
        tests=tuple(cells),
        ramp=ramp,
        button=button,
        button_mark=bmark,
        note="" if reading is None or not own else clean_lines(reading.note),
        test_current=tc,
        further=not own,
        way=clean(getattr(node, "way", "")),
    )
