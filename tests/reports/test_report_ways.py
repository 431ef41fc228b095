"""The board way of each device in both documents, in every format (the demo sample
numbers its ways; numbering a board's ways is common practice)."""

from __future__ import annotations

import csv
import io
from pathlib import Path

from pypdf import PdfReader

from model.reports.remedial import build_remedial
from model.reports.render.csv import ENCODING
from model.reports.sheet import build_sheet
from model.reports.writer import render
from model.rules.checks import analyse
from model.storage.sites import load_site

SAMPLE = Path(__file__).resolve().parents[2] / "sample_sites" / "oak-lane-house.json"


def test_sheet_rows_carry_the_way() -> None:
    doc = build_sheet(load_site(SAMPLE))
    by_id = {r.device_id: r for r in doc.rows}
    assert by_id["rb3"].way == "3" and by_id["rb3"].named == "way 3 · RCBO W3"
    assert by_id["rc1"].way == "" and by_id["rc1"].named == "RCCB 1 (upstairs)"


def test_remedial_items_carry_the_way_of_each_node() -> None:
    site = load_site(SAMPLE)
    doc = build_remedial(site, analyse(site))
    item = next(i for i in doc.items if "rb3" in i.node_ids and "rc3" in i.node_ids)
    ways = dict(zip(item.node_labels, item.node_ways, strict=True))
    assert ways["RCBO W3"] == "3" and ways["Workshop feed RCCB"] == ""
    assert "way 3 · RCBO W3" in item.named_nodes


def test_csv_has_a_way_column() -> None:
    site = load_site(SAMPLE)
    sheet = list(csv.DictReader(io.StringIO(render(site, "sheet", "csv").decode(ENCODING))))
    assert {r["device"]: r["way"] for r in sheet if r["device"]}["rb2"] == "2"
    remedial = list(csv.DictReader(io.StringIO(render(site, "remedial", "csv").decode(ENCODING))))
    row = next(r for r in remedial if r["nodes"] == "rc3 rb2")
    assert row["ways"] == "; 2"  # one entry per label, '' where none is given


def test_text_markdown_and_pdf_print_the_way() -> None:
    site = load_site(SAMPLE)
    for kind in ("sheet", "remedial"):
        for fmt in ("txt", "md"):
            assert "way 3 · RCBO W3" in render(site, kind, fmt).decode("utf-8"), (kind, fmt)
        pdf = PdfReader(io.BytesIO(render(site, kind, "pdf")))
        text = " ".join(p.extract_text() for p in pdf.pages)
        assert "way 3" in text and "RCBO W3" in text, kind
