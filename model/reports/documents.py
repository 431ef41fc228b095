"""The printed documents of a visit: the remedial-work list and the test sheet.

Each document is first built as plain data (:func:`build_remedial`,
:func:`build_sheet`); the renderers in ``model.reports.render.md``, ``render_csv``,
``render_txt`` and ``render_pdf`` only lay that data out.  :func:`write_report`
is the one entry the command line and the app call: it renders in memory and
writes through a temporary file and a rename, so a failed render never leaves a
half-written file nor touches an existing one, and it refuses to replace an
existing file unless asked to.

Every document carries :data:`STATEMENT` (a record of readings and checks, not a
certificate) and the generation time and tripwise version.
"""

from __future__ import annotations

import contextlib
import datetime as dt
import os
import re
import unicodedata
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path
from typing import Any, Literal

import numpy as np

from model import __version__
from model.reports.check_text import findings_by_board
from model.rules.bands import (
    GROUP_TITLE,
    group_of,
    judge_ramp,
    judge_reading,
    ramp_band,
    time_band,
)
from model.rules.checks import analyse
from model.rules.envelope import DeviceCurve, band_curve
from model.rules.findings import CAUTION, SEVERITIES, Analysis, CurrentRange, Finding, device_text
from model.rules.limits import BREAK_TIMES, NON_OPERATING_FRACTION, rule_set
from model.site.models import SiteFile, Visit
from model.site.terms import DID_NOT_TRIP, TEST_NAMES
from model.site.tree import SiteIndex

Kind = Literal["remedial", "sheet"]
Fmt = Literal["pdf", "md", "csv", "txt"]
KINDS: tuple[Kind, ...] = ("remedial", "sheet")
FORMATS: tuple[Fmt, ...] = ("pdf", "md", "csv", "txt")
KIND_TITLE: dict[str, str] = {"remedial": "Remedial work list", "sheet": "Test sheet"}
FORMAT_TITLE: dict[str, str] = {
    "pdf": "PDF",
    "md": "Markdown",
    "csv": "CSV (spreadsheet)",
    "txt": "Plain text",
}

#: Printed on every page (PDF) or at top and bottom (Markdown, text) of both documents.
STATEMENT = (
    "This document is a record of readings and checks made to support the inspector. "
    "It is NOT a certificate: the local wiring rules and licensed practice govern."
)

#: Marks of a recorded value against its band.
MARK_PASS = "pass"
MARK_OUT = "out of band"
MARK_NOT_JUDGED = "not judged"
MARK_FAIL = "fail"

BASIS_TEXT = {
    "standard": "",
    "common-practice": "common practice, not a requirement of the standard",
    "guidance": "guidance, not a requirement",
}

_CONTROL = re.compile(r"[\x00-\x1f\x7f-\x9f\u2028\u2029\u200b-\u200f\u202a-\u202e\u2066-\u2069]")


def clean(text: object) -> str:
    """User text fit for one printed line: control characters removed, whitespace collapsed.

    Line breaks and tabs become spaces; other control and bidirectional
    formatting characters are dropped, so a label prints as what it says.
    """
    s = unicodedata.normalize("NFC", str(text))
    s = re.sub(r"[\t\r\n\v\f\u2028\u2029]+", " ", s)
    s = _CONTROL.sub("", s)
    return re.sub(r" {2,}", " ", s).strip()


def clean_lines(text: object) -> str:
    """Like :func:`clean` but keeps line breaks (as ``\\n``): for notes written to CSV."""
    s = unicodedata.normalize("NFC", str(text)).replace("\r\n", "\n").replace("\r", "\n")
    return "\n".join(clean(line) for line in s.split("\n")).strip("\n")


def num_text(value: float) -> str:
    """A number as the shortest text that reads back to the same float ('312', '12.5')."""
    s = repr(float(value))
    return s[:-2] if s.endswith(".0") else s


# --------------------------------------------------------------------------- heading


@dataclass(frozen=True)
class Heading:
    """What every document names at the top."""

    title: str
    site_name: str
    address: str
    client: str
    earthing: str
    rules_title: str
    visit_id: str | None
    visit_date: str | None
    inspector: str
    instrument: str
    generated: str
    version: str
    statement: str = STATEMENT

    def generated_line(self) -> str:
        return f"Generated {self.generated} by tripwise {self.version}"

    def facts(self) -> list[tuple[str, str]]:
        """(name, value) pairs for the heading block; empty values left out."""
        rows = [
            ("Site", self.site_name),
            ("Address", self.address),
            ("Client", self.client),
            ("Visit date", self.visit_date or "no visit recorded"),
            ("Inspector", self.inspector),
            ("Instrument", self.instrument),
            ("Earthing", self.earthing),
            ("Rules", self.rules_title),
        ]
        return [(k, v) for k, v in rows if v]


def _heading(site: SiteFile, visit: Visit | None, title: str, generated: dt.datetime) -> Heading:
    info = site.site
    return Heading(
        title=title,
        site_name=clean(info.name),
        address=clean(info.address),
        client=clean(info.client),
        earthing=info.earthing,
        rules_title=rule_set(info.rules).title,
        visit_id=None if visit is None else visit.id,
        visit_date=None if visit is None else visit.date,
        inspector="" if visit is None else clean(visit.inspector),
        instrument="" if visit is None else clean(visit.instrument),
        generated=generated.strftime("%Y-%m-%d %H:%M UTC"),
        version=__version__,
    )


def _now(generated: dt.datetime | None) -> dt.datetime:
    if generated is None:
        return dt.datetime.now(dt.UTC)
    if generated.tzinfo is None:
        return generated.replace(tzinfo=dt.UTC)
    return generated.astimezone(dt.UTC)


# --------------------------------------------------------------------------- remedial list


@dataclass(frozen=True)
class RemedialItem:
    """One piece of work (or investigation) arising from one finding."""

    number: int
    rule: str
    severity: str
    node_ids: tuple[str, ...]
    node_labels: tuple[str, ...]
    where: tuple[str, ...]
    message: str
    measured: str | None
    band: str | None
    action: str
    source: str
    basis: str
    #: Numbers of the pair charts (PDF) that show this item's pairs.
    charts: tuple[int, ...] = ()

    def charts_text(self) -> str:
        """'pair chart 3' or 'pair charts 3, 4, 5'; '' when there is none."""
        if not self.charts:
            return ""
        word = "pair chart" if len(self.charts) == 1 else "pair charts"
        return f"{word} {', '.join(str(n) for n in self.charts)}"

    @property
    def basis_note(self) -> str:
        """'' for a rule of the standard; otherwise what kind of advice it is."""
        return BASIS_TEXT.get(self.basis, self.basis)

    def source_text(self) -> str:
        note = self.basis_note
        return f"{self.source} ({note})" if note else self.source


@dataclass(frozen=True)
class BoardGroup:
    """The items of one board, worst first."""

    board_id: str
    label: str
    place: str
    items: tuple[RemedialItem, ...]


@dataclass(frozen=True)
class ChartPoint:
    """A reading drawn on a pair chart: time at the test current, or 'did not trip'."""

    device: Literal["up", "down"]
    test: str
    current_ma: float
    time_ms: float | None
    did_not_trip: bool


@dataclass(frozen=True)
class PairChart:
    """The two time-current bands of a series pair, with the measured points.

    Curves are sampled so that every step of the step-function reading is
    exact (each breakpoint appears just below and just above).  ``inf`` in a
    minimum means the device cannot trip there; in a maximum, a trip is not
    guaranteed.
    """

    number: int
    up_id: str
    down_id: str
    up_label: str
    down_label: str
    up_text: str
    down_text: str
    currents_ma: tuple[float, ...]
    up_min_ms: tuple[float, ...]
    up_max_ms: tuple[float, ...]
    down_min_ms: tuple[float, ...]
    down_max_ms: tuple[float, ...]
    ranges: tuple[CurrentRange, ...]
    points: tuple[ChartPoint, ...]
    i_max_ma: float
    verdict: str
    explanation: str


@dataclass(frozen=True)
class RemedialDoc:
    heading: Heading
    counts: dict[str, int]
    groups: tuple[BoardGroup, ...]
    charts: tuple[PairChart, ...]
    caution: str = CAUTION

    @property
    def items(self) -> list[RemedialItem]:
        return [i for g in self.groups for i in g.items]


def _chart_pairs(analysis: Analysis) -> list[tuple[str, str]]:
    """Series pairs named by a ``cascade.*`` finding, in order of first mention."""
    out: list[tuple[str, str]] = []
    for f in analysis.findings:
        if not f.rule.startswith("cascade.") or len(f.nodes) < 2:
            continue
        up = f.nodes[0]
        for down in f.nodes[1:]:
            key = (up, down)
            if key not in out and analysis.pair(up, down) is not None:
                out.append(key)
    return out


def _chart_grid(lo_ma: float, hi_ma: float, breaks: list[float]) -> np.ndarray:
    grid = np.geomspace(lo_ma, hi_ma, 120)
    b = np.asarray([x for x in breaks if lo_ma < x < hi_ma], dtype=np.float64)
    pts = np.concatenate([grid, b * (1 - 1e-6), b * (1 + 1e-6)])
    return np.unique(np.clip(pts, lo_ma, hi_ma))


def _breakpoints(node: Any) -> list[float]:
    idn = float(node.idn_ma)
    out = [NON_OPERATING_FRACTION * idn]
    for p in BREAK_TIMES:
        out.append(p.current_ma(idn))
    return out


def _points(role: Literal["up", "down"], node: Any, visit: Visit | None) -> list[ChartPoint]:
    if visit is None:
        return []
    r = visit.readings.get(node.id)
    if r is None or r.not_tested is not None or r.waveform != "AC":
        return []
    out: list[ChartPoint] = []
    for t in TEST_NAMES:
        v = getattr(r, t)
        if v is None:
            continue
        mult = {"half": 0.5, "x1": 1.0, "x5": 5.0}[group_of(t)]
        cur = mult * float(node.idn_ma)
        if v == DID_NOT_TRIP:
            out.append(ChartPoint(role, t, cur, None, True))
        else:
            out.append(ChartPoint(role, t, cur, float(v), False))
    return out


def _tuple(a: np.ndarray) -> tuple[float, ...]:
    return tuple(float(x) for x in a)


def pair_chart(
    number: int, idx: SiteIndex, analysis: Analysis, up: str, down: str, visit: Visit | None
) -> PairChart:
    """The data of one pair chart (bands from :func:`model.rules.envelope.band_curve`)."""
    pa = analysis.pair(up, down)
    assert pa is not None
    un, dn = idx.node(up), idx.node(down)
    lo = 0.4 * float(dn.idn_ma)
    hi = max(pa.i_max_ma, 10.0 * float(un.idn_ma), 2.0 * lo)
    hi = min(hi, 1.0e6)
    grid = _chart_grid(lo, hi, _breakpoints(un) + _breakpoints(dn))
    u_min, u_max = band_curve(DeviceCurve.of(un), grid)
    d_min, d_max = band_curve(DeviceCurve.of(dn), grid)
    return PairChart(
        number=number,
        up_id=up,
        down_id=down,
        up_label=clean(idx.label(up)),
        down_label=clean(idx.label(down)),
        up_text=device_text(un),
        down_text=device_text(dn),
        currents_ma=_tuple(grid),
        up_min_ms=_tuple(u_min),
        up_max_ms=_tuple(u_max),
        down_min_ms=_tuple(d_min),
        down_max_ms=_tuple(d_max),
        ranges=pa.ranges,
        points=tuple(_points("up", un, visit) + _points("down", dn, visit)),
        i_max_ma=pa.i_max_ma,
        verdict=pa.verdict,
        explanation=clean(pa.explanation),
    )


def build_remedial(
    site: SiteFile, analysis: Analysis, *, generated: dt.datetime | None = None
) -> RemedialDoc:
    """The remedial-work list: one item per finding, grouped by board, worst first."""
    idx = SiteIndex.build(site)
    visit = site.latest_visit()
    pairs = _chart_pairs(analysis)
    charts = [pair_chart(n, idx, analysis, u, d, visit) for n, (u, d) in enumerate(pairs, start=1)]
    chart_of = {(c.up_id, c.down_id): c.number for c in charts}
    groups: list[BoardGroup] = []
    number = 0
    for board, fs in findings_by_board(site, analysis):
        items: list[RemedialItem] = []
        for f in fs:
            number += 1
            items.append(_item(number, idx, f, chart_of))
        bnode = idx.by_id.get(board)
        place = clean(getattr(bnode, "place", "")) if bnode is not None else ""
        label = clean(idx.label(board)) if bnode is not None else clean(board)
        groups.append(BoardGroup(board, label, place, tuple(items)))
    counts: dict[str, int] = {s: 0 for s in SEVERITIES}
    for f in analysis.findings:
        counts[f.severity] += 1
    return RemedialDoc(
        heading=_heading(site, visit, KIND_TITLE["remedial"], _now(generated)),
        counts=counts,
        groups=tuple(groups),
        charts=tuple(charts),
        caution=analysis.caution,
    )


def _item(
    number: int, idx: SiteIndex, f: Finding, chart_of: dict[tuple[str, str], int]
) -> RemedialItem:
    known = [n for n in f.nodes if n in idx.by_id]
    charts: tuple[int, ...] = ()
    if f.rule.startswith("cascade.") and len(f.nodes) >= 2:
        found = (chart_of.get((f.nodes[0], d)) for d in f.nodes[1:])
        charts = tuple(n for n in found if n is not None)
    return RemedialItem(
        number=number,
        rule=f.rule,
        severity=f.severity,
        node_ids=f.nodes,
        node_labels=tuple(clean(idx.label(n)) for n in known),
        where=tuple(clean(idx.path_text(n)) for n in known),
        message=clean(f.message),
        measured=None if f.measured is None else clean(f.measured),
        band=None if f.band is None else clean(f.band),
        action=clean(f.action),
        source=clean(f.source),
        basis=f.basis,
        charts=charts,
    )


# --------------------------------------------------------------------------- test sheet


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

    def cell(self, name: str) -> SheetCell:
        for c in self.tests:
            if c.name == name:
                return c
        raise KeyError(name)

    @property
    def out_of_band(self) -> list[str]:
        """Names of the values outside their band (button included)."""
        out = [c.name for c in (*self.tests, self.ramp) if c.mark == MARK_OUT]
        if self.button_mark == MARK_FAIL:
            out.append("button")
        return out


@dataclass(frozen=True)
class SheetDoc:
    heading: Heading
    rows: tuple[SheetRow, ...]
    required_groups: tuple[str, ...]
    rules_source: str
    caution: str = CAUTION


def _mark(flag: str | None, value: object, judged: bool) -> str:
    if value is None:
        return ""
    if flag is not None:
        return MARK_OUT
    return MARK_PASS if judged else MARK_NOT_JUDGED


def build_sheet(site: SiteFile, *, generated: dt.datetime | None = None) -> SheetDoc:
    """The test sheet of the latest visit: one row per residual-current device, tree order."""
    idx = SiteIndex.build(site)
    visit = site.latest_visit()
    rules = site.site.rules
    rows: list[SheetRow] = []
    for dev in idx.rcds():
        node = idx.node(dev)
        reading = visit.readings.get(dev) if visit is not None else None
        waveform = reading.waveform if reading is not None else "AC"
        judged = judge_reading(node, reading, rules) if reading is not None else {}
        cells: list[SheetCell] = []
        for t in TEST_NAMES:
            g = group_of(t)
            band = time_band(node, g, waveform, rules)
            value = getattr(reading, t) if reading is not None else None
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
        ramp_v = reading.ramp_ma if reading is not None else None
        jr = judge_ramp(rb, ramp_v)
        ramp = SheetCell(
            "ramp_ma",
            "Ramp",
            ramp_v,
            rb.text,
            _mark(jr.flag, ramp_v, True),
            jr.flag,
            False,
            short=f"{rb.low_ma:g} < I ≤ {rb.high_ma:g} mA",
        )
        button = reading.button if reading is not None else None
        bmark = "" if button is None else (MARK_FAIL if button == "failed" else MARK_PASS)
        rows.append(
            SheetRow(
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
                if reading is None or reading.not_tested is None
                else clean(reading.not_tested),
                test_waveform=None if reading is None else reading.waveform,
                tests=tuple(cells),
                ramp=ramp,
                button=button,
                button_mark=bmark,
                note="" if reading is None else clean_lines(reading.note),
            )
        )
    rs = rule_set(rules)
    return SheetDoc(
        heading=_heading(site, visit, KIND_TITLE["sheet"], _now(generated)),
        rows=tuple(rows),
        required_groups=tuple(GROUP_TITLE[g] for g in rs.required_tests),
        rules_source=rs.test_source,
    )


# --------------------------------------------------------------------------- writing


class ReportError(Exception):
    """A report could not be written.  ``str()`` is one line fit for a user."""


class ReportExists(ReportError, FileExistsError):
    """The target file exists and overwriting was not asked for."""


def default_name(site_path: Path, site: SiteFile, kind: str, fmt: str) -> Path:
    """``<site stem>-<kind>-<visit date>.<ext>`` beside the site file."""
    visit = site.latest_visit()
    date = visit.date if visit is not None else "no-visit"
    return Path(site_path).with_name(f"{Path(site_path).stem}-{kind}-{date}.{fmt}")


def render(
    site: SiteFile,
    kind: str,
    fmt: str,
    *,
    generated: dt.datetime | None = None,
    analysis: Analysis | None = None,
) -> bytes:
    """The bytes of one document in one format."""
    if kind not in KINDS:
        raise ReportError(f"unknown report kind {kind!r}; choose {' or '.join(KINDS)}")
    if fmt not in FORMATS:
        raise ReportError(f"unknown format {fmt!r}; choose one of {', '.join(FORMATS)}")
    renderer = _renderer(kind, fmt)
    if kind == "remedial":
        doc: Any = build_remedial(
            site, analysis if analysis is not None else analyse(site), generated=generated
        )
    else:
        doc = build_sheet(site, generated=generated)
    return renderer(doc)


def _renderer(kind: str, fmt: str) -> Callable[[Any], bytes]:
    if fmt == "pdf":
        from model.reports.render import pdf as render_pdf

        return render_pdf.remedial_pdf if kind == "remedial" else render_pdf.sheet_pdf
    if fmt == "md":
        from model.reports.render import md as render_md

        return render_md.remedial_md if kind == "remedial" else render_md.sheet_md
    if fmt == "csv":
        from model.reports.render import csv as render_csv

        return render_csv.remedial_csv if kind == "remedial" else render_csv.sheet_csv
    from model.reports.render import txt as render_txt

    return render_txt.remedial_txt if kind == "remedial" else render_txt.sheet_txt


def write_report(
    site: SiteFile,
    kind: str,
    fmt: str,
    out_path: Path,
    *,
    force: bool = False,
    generated: dt.datetime | None = None,
) -> Path:
    """Render one document and write it to ``out_path``; return the path written.

    The document is rendered in memory first, then written to a temporary file
    in the same folder, flushed, and renamed into place: a failure at any step
    leaves no partial file and does not touch an existing one.  Without
    ``force`` an existing file is never replaced (:class:`ReportExists`).
    """
    out = Path(out_path)
    if out.is_dir():
        raise ReportError(f"{out}: is a folder; give a file name")
    if out.exists() and not force:
        raise ReportExists(f"{out}: already exists; use --force to replace it (nothing written)")
    if not out.parent.is_dir():
        raise ReportError(f"{out.parent}: no such folder")
    data = render(site, kind, fmt, generated=generated)
    tmp = out.with_name(f".{out.name}.tmp-{os.getpid()}")
    try:
        with open(tmp, "xb") as fh:
            fh.write(data)
            fh.flush()
            os.fsync(fh.fileno())
        if force:
            os.replace(tmp, out)
        else:
            _place_new(tmp, out)
    except FileExistsError:
        _unlink(tmp)
        raise ReportExists(
            f"{out}: already exists; use --force to replace it (nothing written)"
        ) from None
    except OSError as exc:
        _unlink(tmp)
        raise ReportError(f"{out}: cannot write ({exc.strerror or exc})") from None
    except BaseException:
        _unlink(tmp)
        raise
    return out


def _place_new(tmp: Path, out: Path) -> None:
    """Move ``tmp`` to ``out`` only if ``out`` does not exist (atomically where links work)."""
    try:
        os.link(tmp, out)
    except FileExistsError:
        raise
    except OSError:
        if out.exists():
            raise FileExistsError(str(out)) from None
        os.replace(tmp, out)
        return
    _unlink(tmp)


def _unlink(p: Path) -> None:
    with contextlib.suppress(OSError):
        p.unlink()
