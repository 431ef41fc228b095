"""The PDF drawing helpers: log axes, lines with their straight runs left out, text placed
as fpdf2's ``cell`` places it, and the test sheet's rows kept whole on a page."""

from __future__ import annotations

import json
import math
import re
from pathlib import Path

import numpy as np
import pypdf
import pytest

from model.reports.charts import pair_chart_data
from model.reports.heading import Heading
from model.reports.oc_chart import oc_chart_data
from model.reports.render.pdf_axes import LogAxes, _bends, times_array
from model.reports.render.pdf_base import ReportPdf
from model.reports.sheet import build_sheet
from model.reports.writer import write_report
from model.rules.checks import analyse
from model.rules.envelope import DeviceCurve, band_curve
from model.rules.overcurrent.bands import Band, band_at, band_of
from model.storage.codec import parse_site
from model.storage.sites import load_site
from tests.reports.report_sites import SAMPLES, big_raw, squash


def _heading() -> Heading:
    return build_sheet(load_site(SAMPLES[0])).heading


def test_log_axes_put_each_decade_an_equal_step_apart() -> None:
    # a logarithmic scale: equal ratios are equal distances (definition; common practice)
    ax = LogAxes(10.0, 20.0, 120.0, 60.0, 10.0, 1000.0, 1.0, 10_000.0)
    xs = ax.xs(np.array([10.0, 100.0, 1000.0]))
    np.testing.assert_allclose(xs, [10.0, 70.0, 130.0], rtol=1e-12)
    ys = ax.ys(np.array([1.0, 100.0, 10_000.0, math.inf]))
    np.testing.assert_allclose(ys, [80.0, 50.0, 20.0, 20.0], rtol=1e-12)  # infinity: the top
    assert ax.x(100.0) == pytest.approx(70.0) and ax.y(0.0) == pytest.approx(80.0)


def test_straight_runs_lose_their_inner_points_and_every_corner_stays() -> None:
    # a step drawn with a sample just either side of it, as the chart builder samples
    x = np.array([0.0, 10.0, 20.0, 30.0 - 3e-5, 30.0, 30.0 + 3e-5, 40.0, 50.0])
    y = np.array([5.0, 5.0, 5.0, 5.0, 5.0, 1.0, 1.0, 1.0])
    keep = _bends(x, y)
    assert keep.tolist() == [True, False, False, False, True, True, False, True]
    # a slope sampled finely keeps only its ends; a bend in it stays
    sx = np.linspace(0.0, 40.0, 41)
    sy = np.where(sx <= 20.0, 2.0 * sx, 40.0 + 0.5 * (sx - 20.0))
    kept = np.flatnonzero(_bends(sx, sy)).tolist()
    assert kept == [0, 20, 40]


def _on_path(px: float, py: float, path: list[tuple[float, float]]) -> float:
    """Distance of a point from a polyline. [mm]"""
    best = math.inf
    for (ax, ay), (bx, by) in zip(path, path[1:], strict=False):
        dx, dy = bx - ax, by - ay
        t = 0.0 if dx == dy == 0 else ((px - ax) * dx + (py - ay) * dy) / (dx * dx + dy * dy)
        t = min(max(t, 0.0), 1.0)
        best = min(best, math.hypot(px - (ax + t * dx), py - (ay + t * dy)))
    return best


@pytest.mark.parametrize("sample", SAMPLES, ids=lambda p: p.stem)
def test_band_edges_drawn_through_every_sample(sample: Path) -> None:
    """Leaving points out of a line never moves it: each sample of a band's edges lies on
    the drawn line (within 0.001 mm, below the 0.01 pt the page is written in)."""
    site = load_site(sample)
    result = analyse(site)
    for pair in result.pairs[:4]:
        c = pair_chart_data(site, result, pair.up, pair.down, span="page")
        ax = LogAxes(30.0, 40.0, 160.0, 62.0, c.currents_ma[0], c.currents_ma[-1], 5.0, 1e4)
        cur = np.array(c.currents_ma)
        for edge in (c.up_max, c.down_max, c.up_min, c.down_min):
            t = times_array(edge)
            known = np.isfinite(t)
            xs, ys = ax.xs(cur[known]), ax.ys(t[known])
            keep = _bends(xs, ys)
            path = list(zip(xs[keep].tolist(), ys[keep].tolist(), strict=True))
            assert len(path) <= len(xs)
            for px, py in zip(xs.tolist(), ys.tolist(), strict=True):
                assert _on_path(px, py, path) < 1e-3, (sample.stem, pair.up, pair.down)


def test_chart_bands_are_those_of_the_standard_reading() -> None:
    # the chart's cached tables give what band_curve gives (IEC 61008-1 Table 1 reading)
    site = load_site(SAMPLES[0])
    result = analyse(site)
    pair = result.pairs[0]
    c = pair_chart_data(site, result, pair.up, pair.down, span="page")
    node = next(n for n in site.nodes if n.id == pair.up)
    lo, hi = band_curve(DeviceCurve.of(node), np.array(c.currents_ma))
    np.testing.assert_array_equal(times_array(c.up_min), lo)
    np.testing.assert_array_equal(times_array(c.up_max), hi)


def _td_positions(pdf: ReportPdf) -> list[tuple[float, float]]:
    data = bytes(pdf.pages[pdf.page].contents).decode("latin-1")
    return [(float(a), float(b)) for a, b in re.findall(r"BT ([\d.]+) ([\d.]+) Td", data)]


@pytest.mark.parametrize("align", ["L", "C", "R"])
def test_text_line_sets_text_where_cell_would(align: str) -> None:
    texts = ["Board 3", "30 mA, Type A, general", "Zs 0.82 Ω ≤ 1.37 Ω", "½ × IΔn 180°"]
    placed = []
    for way in ("cell", "text_line"):
        pdf = ReportPdf(_heading(), "portrait")
        pdf.add_page()
        for n, text in enumerate(texts):
            pdf.font(7.2 + n, n % 2 == 1)
            if way == "cell":
                pdf.set_xy(20.0, 40.0 + 6 * n)
                pdf.cell(60.0, 4.4, text, align=align)
            else:
                pdf.text_line(20.0, 40.0 + 6 * n, 60.0, 4.4, text, align)
            assert pdf.get_x() == pytest.approx(80.0)
        placed.append(_td_positions(pdf))
    assert len(placed[0]) == len(texts)
    for a, b in zip(*placed, strict=True):
        assert a == pytest.approx(b, abs=0.011)  # pt, the page's own rounding


def test_sheet_rows_of_a_device_stay_on_one_page(tmp_path: Path) -> None:
    """Every device's label and its id (the row beneath) print on the same page, and
    every page of the devices' table starts with the headings (common practice for a
    test form: a value is read against its heading and its band)."""
    site = parse_site(json.dumps(big_raw(boards=12, per_board=10)))  # no label inside another
    out = write_report(site, "sheet", "pdf", tmp_path / "sheet.pdf")
    reader = pypdf.PdfReader(out)
    assert len(reader.pages) >= 4
    pages = [squash(p.extract_text() or "") for p in reader.pages]
    devices = [n for n in site.nodes if n.kind in ("rccb", "rcbo")]
    for dev in devices:
        label = squash(dev.label or dev.id)
        on = [n for n, text in enumerate(pages) if label in text]
        assert on, dev.id
        assert any(squash(dev.id) in pages[n] for n in on), dev.id
    for n, text in enumerate(pages):
        assert "Board" in text and "Ramp" in text, f"headings missing on page {n + 1}"
        if squash("Loop impedance and disconnection") in text:
            break  # the circuits' table follows the devices' table


def test_fuse_and_breaker_chart_bands_are_those_of_the_rules() -> None:
    # each pair's curves are band_at's reading of the device's band (IEC 60898-1 Table 7,
    # IEC 60269 gate currents), whichever pair asked for the band first
    site = load_site(next(p for p in SAMPLES if p.stem == "oak-lane-house"))
    result = analyse(site)
    assert result.oc_pairs
    for pair in result.oc_pairs:
        c = oc_chart_data(site, result, pair.up, pair.down)
        for node_id, curves in (
            (pair.up, (c.up_min, c.up_max, c.up_min_rig, c.up_max_rig)),
            (pair.down, (c.down_min, c.down_max, c.down_min_rig, c.down_max_rig)),
        ):
            band = band_of(next(n for n in site.nodes if n.id == node_id))
            if not isinstance(band, Band):
                continue
            ref = band_at(band, np.array(c.currents_a))
            for key, got in zip(("min_est", "max_est", "min_rig", "max_rig"), curves, strict=True):
                np.testing.assert_array_equal(times_array(got), ref[key])
