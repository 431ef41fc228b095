"""The PDF documents, read back with pypdf: every finding, the statement on every page."""

from __future__ import annotations

import datetime as dt
import json
import re
from pathlib import Path

import pypdf
import pytest

from model import __version__
from model.reports.heading import STATEMENT
from model.reports.remedial import build_remedial
from model.reports.writer import render, write_report
from model.rules.checks import analyse
from model.site.tree import SiteIndex
from model.storage.codec import parse_site
from model.storage.sites import load_site
from tests.reports.report_sites import (
    FORMULA_LABEL,
    MARKUP_LABEL,
    SAMPLES,
    UNICODE_LABEL,
    awkward_raw,
    awkward_site,
    big_raw,
    copy_samples,
    squash,
)

WHEN = dt.datetime(2026, 11, 20, 9, 30, tzinfo=dt.UTC)


def _pages(path: Path) -> list[str]:
    return [p.extract_text() or "" for p in pypdf.PdfReader(path).pages]


def _write(site, kind: str, tmp: Path, name: str) -> list[str]:
    out = write_report(site, kind, "pdf", tmp / name, generated=WHEN)
    assert out.read_bytes().startswith(b"%PDF-")
    return _pages(out)


def _check_furniture(pages: list[str]) -> None:
    total = len(pages)
    for n, text in enumerate(pages, start=1):
        flat = squash(text)
        assert squash(STATEMENT) in flat, f"statement missing on page {n}"
        assert f"page{n}of{total}" in flat, f"page number missing on page {n}"
        assert squash(f"Generated 2026-11-20 09:30 UTC by tripwise {__version__}") in flat


@pytest.mark.parametrize("sample", SAMPLES, ids=lambda p: p.stem)
def test_remedial_pdf_holds_every_finding(sample: Path, tmp_path: Path) -> None:
    (path,) = [p for p in copy_samples(tmp_path) if p.name == sample.name]
    site = load_site(path)
    result = analyse(site)
    assert result.findings, "the samples are built to raise findings"
    idx = SiteIndex.build(site)
    pages = _write(site, "remedial", tmp_path, "r.pdf")
    _check_furniture(pages)
    text = squash("".join(pages))
    for f in result.findings:
        assert squash(f.message) in text, f.rule
        assert squash(f.action) in text, f.rule
        assert f.rule in text
        for n in f.nodes:
            assert squash(idx.label(n)) in text
    assert squash(result.caution) in text


@pytest.mark.parametrize("sample", SAMPLES, ids=lambda p: p.stem)
def test_sheet_pdf_lists_every_device(sample: Path, tmp_path: Path) -> None:
    site = load_site(sample)
    pages = _write(site, "sheet", tmp_path, "s.pdf")
    _check_furniture(pages)
    text = squash("".join(pages))
    for dev in SiteIndex.build(site).rcds():
        assert squash(dev) in text


def test_unicode_labels_round_trip_into_pdf_text(tmp_path: Path) -> None:
    site = awkward_site()
    for kind in ("remedial", "sheet"):
        pages = _write(site, kind, tmp_path, f"{kind}.pdf")
        text = squash("".join(pages))
        for label in (UNICODE_LABEL, "Tableau général (Ω)", "Maison Élodie & <Sons> (invented)"):
            assert squash(label) in text, (kind, label)
        # markup in a label prints as the characters typed
        assert squash(MARKUP_LABEL) in text
    # the formula-like label is on a device without findings: on the sheet only
    assert squash(FORMULA_LABEL) in text


def test_did_not_trip_and_not_tested_are_printed_as_such(tmp_path: Path) -> None:
    pages = _write(awkward_site(), "sheet", tmp_path, "s.pdf")
    text = " ".join(pages)
    # a value may wrap inside its cell: compare without the line breaks
    assert squash("did not trip ✗") in squash(text)  # at 1 × IΔn: IEC 61008-1 Table 1
    assert squash("did not trip ✓") in squash(text)  # ½ × IΔn: IΔno = 0.5 IΔn, must not trip
    assert "not tested:" in text and "in use by the client" in text
    assert "First" in text and "@home" in text  # the note, in its narrow column


def test_control_characters_never_reach_the_page(tmp_path: Path) -> None:
    raw = awkward_raw()
    for n in raw["nodes"]:
        if n["id"] == "rc2":
            n["label"] = "Bell\x07 and\x1b[31m escape\u202e reversed"
            break
    site = parse_site(json.dumps(raw))
    pages = _write(site, "remedial", tmp_path, "c.pdf")
    text = "".join(pages)
    assert "\x07" not in text and "\x1b" not in text and "\u202e" not in text
    assert "Bell and[31m escape reversed" in text


def test_pair_chart_for_every_cascade_pair(tmp_path: Path) -> None:
    site = parse_site(json.dumps(big_raw(boards=3, per_board=4)))
    result = analyse(site)
    doc = build_remedial(site, result, generated=WHEN)
    cascade_pairs = {
        (f.nodes[0], d)
        for f in result.findings
        if f.rule.startswith("cascade.")
        for d in f.nodes[1:]
        if result.pair(f.nodes[0], d) is not None
    }
    # Non-delayed 100 mA RCCBs above 30 mA RCBOs: every pair is named by a cascade finding
    # (BS 7671 536.4.1.4, common practice: the upstream device must be time-delayed).
    assert len(cascade_pairs) == 12
    assert {(c.up_id, c.down_id) for c in doc.charts} == cascade_pairs
    for c in doc.charts:
        # non-selective ranges are the analysis's own
        assert c.ranges == [(r.lo_ma, r.hi_ma) for r in result.pair(c.up_id, c.down_id).ranges]
        assert c.ranges, "a general 100 mA device above a 30 mA one overlaps (IEC 61008-1 T1)"
    pages = _write(site, "remedial", tmp_path, "big.pdf")
    _check_furniture(pages)
    text = squash("".join(pages))
    for c in doc.charts:
        assert squash(f"Pair chart {c.number}: {c.up_label} above {c.down_label}") in text


def test_chart_bands_come_from_the_envelope(tmp_path: Path) -> None:
    site = awkward_site()  # invented: 100 mA type S RCCB above 30 mA general RCBOs
    result = analyse(site)
    doc = build_remedial(site, result)
    assert doc.charts
    c = doc.charts[0]
    assert c.down_text == "30 mA, Type A, general"
    cur = list(c.currents_ma)
    # a general 30 mA device: no trip guaranteed below IΔn, 300 ms at IΔn, 150 ms from
    # 2 IΔn and 40 ms only from 0.25 A (IEC 61008-1 Ed.3 Table 1 and its note on 0.25 A
    # in place of 5 IΔn); it cannot trip at or below 0.5 IΔn (IΔno).
    down = {i: (lo, hi) for i, lo, hi in zip(cur, c.down_min, c.down_max, strict=True)}
    at = min(cur, key=lambda i: abs(i - 30.0 * 1.01))
    assert down[at][1] == pytest.approx(300.0)
    at5 = min(cur, key=lambda i: abs(i - 150.0 * 1.01))
    assert down[at5][1] == pytest.approx(150.0)
    at250 = min(cur, key=lambda i: abs(i - 250.0 * 1.01))
    assert down[at250][1] == pytest.approx(40.0)
    below = min(cur, key=lambda i: abs(i - 14.0))
    assert down[below][0] is None  # None: an infinite time


def test_pdf_is_rendered_without_core_fonts() -> None:
    data = render(awkward_site(), "remedial", "pdf")
    assert b"DejaVu" in data
    assert not re.search(rb"/BaseFont\s*/Helvetica", data)


def test_items_point_at_their_pair_charts() -> None:
    raw = big_raw(boards=1, per_board=3)
    site = parse_site(json.dumps(raw))
    doc = build_remedial(site, analyse(site))
    by_pair = {(c.up_id, c.down_id): c.number for c in doc.charts}
    for item in doc.items:
        if item.rule == "cascade.upstream-not-delayed":
            # one finding names the upstream device and all three downstream ones
            assert item.charts == tuple(by_pair[(item.node_ids[0], d)] for d in item.node_ids[1:])
            assert item.charts_text() == "pair charts 1, 2, 3"
        elif item.rule.startswith("cascade."):
            assert item.charts == (by_pair[item.node_ids[:2]],)
