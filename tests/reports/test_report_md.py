"""Markdown and text documents: the same items as the PDF, escaped so labels stay text."""

from __future__ import annotations

import html
import re
from pathlib import Path

import pypdf
import pytest
from markdown_it import MarkdownIt

from model.reports.heading import STATEMENT
from model.reports.remedial import build_remedial
from model.reports.writer import render
from model.rules.checks import analyse
from model.storage.sites import load_site
from tests.reports.report_sites import MARKUP_LABEL, SAMPLES, awkward_site, squash


def _html(md: bytes) -> str:
    return MarkdownIt("commonmark").render(md.decode("utf-8"))


def _text_of(html_doc: str) -> str:
    return html.unescape(re.sub(r"<[^>]+>", " ", html_doc))


def _sites() -> list:
    return [load_site(p) for p in SAMPLES] + [awkward_site()]


@pytest.mark.parametrize("site", _sites(), ids=lambda s: s.site.name[:20])
def test_markdown_holds_the_same_items_as_the_pdf(site, tmp_path: Path) -> None:
    result = analyse(site)
    md_text = squash(_text_of(_html(render(site, "remedial", "md"))))
    pdf_path = tmp_path / "r.pdf"
    pdf_path.write_bytes(render(site, "remedial", "pdf"))
    pdf_text = squash("".join(p.extract_text() for p in pypdf.PdfReader(pdf_path).pages))
    doc = build_remedial(site, result)
    assert len(doc.items) == len(result.findings)
    for f in result.findings:
        for part in (f.rule, f.message, f.action):
            assert squash(part) in md_text, part
            assert squash(part) in pdf_text, part
    assert md_text.startswith(squash(STATEMENT))
    assert md_text.count(squash(STATEMENT)) == 2  # top and bottom


def test_markup_in_labels_stays_text() -> None:
    site = awkward_site()
    for kind in ("remedial", "sheet"):
        out = _html(render(site, kind, "md"))
        assert "<b>" not in out and "<em>x</em>" not in out and "<sons>" not in out.lower()
        assert MARKUP_LABEL in _text_of(out)
        assert "Maison Élodie & <Sons> (invented)" in _text_of(out)


def test_markdown_sheet_has_every_value() -> None:
    site = awkward_site()
    text = _text_of(_html(render(site, "sheet", "md")))
    r = site.latest_visit().readings["rc2"]
    for v in (r.x1_0, r.x1_180, r.x5_0, r.x5_180):
        assert f"{v:g} ms" in text
    assert "312 ms ✗ out of band (≤ 300 ms)" in text  # IEC 61008-1 Table 1: ≤ 300 ms at IΔn
    assert "not tested: + socket circuit in use" in text


def test_text_documents_carry_statement_top_and_bottom() -> None:
    site = awkward_site()
    result = analyse(site)
    for kind in ("remedial", "sheet"):
        text = render(site, kind, "txt").decode("utf-8")
        flat = squash(text)
        assert flat.count(squash(STATEMENT)) == 2
        assert flat.startswith("=" * 10)
        assert "tripwise" in text.splitlines()[-2]
        assert "\x1b" not in text
    flat = squash(render(site, "remedial", "txt").decode("utf-8"))
    for f in result.findings:
        assert squash(f.message) in flat and squash(f.action) in flat


@pytest.mark.parametrize("fmt", ["md", "txt"])
def test_series_pair_that_meets_the_rule_is_worded_not_guaranteed(fmt: str) -> None:
    # 100 mA S over 30 mA meets 3:1 and a delay (BS 7671 536.4.1.4, common practice);
    # IEC 61008-1 Table 1 with its 0.25 A note leaves 50-250 mA unguaranteed
    site = load_site(Path(__file__).resolve().parents[2] / "sample_sites" / "oak-lane-house.json")
    text = " ".join(render(site, "remedial", fmt).decode("utf-8").split())
    assert "not guaranteed between 50 mA and 250 mA; confirm by testing both devices" in text
    assert "selectivity not guaranteed over 50 mA to 250 mA" not in text
