"""The remedial list in words a client and an electrician read without a glossary.

Each item's rows are named Found, Measured, Limit, Action, Reference; readings
are named as the trade names the test ('1 × IΔn, 180°', after IEC 61008-1's
tests at IΔn and 0°/180°), never by the site file's keys; check ids are kept
out of the items' words (small at the side in the PDF, listed at the end of
Markdown and text, a column of their own in CSV).
"""

from __future__ import annotations

import csv
import io
import re
from pathlib import Path

import pypdf
import pytest

from model.reports.writer import render, write_report
from model.rules.checks import analyse
from model.site.terms import TEST_VALUE_KEYS
from model.storage.sites import load_site
from tests.reports.report_sites import SAMPLES

RAW_KEY = re.compile(r"\b(" + "|".join(re.escape(k) for k in TEST_VALUE_KEYS if "_" in k) + r")\b")
OLD_NAMES = ("Wrong:", "To do:", "Band:", "Rests on:")


def _rule_ids(sample: Path) -> set[str]:
    return {f.rule for f in analyse(load_site(sample)).findings}


@pytest.mark.parametrize("sample", SAMPLES, ids=lambda p: p.stem)
@pytest.mark.parametrize("fmt", ["md", "txt"])
def test_text_formats_use_trade_words_and_list_ids_at_the_end(sample: Path, fmt: str) -> None:
    text = render(load_site(sample), "remedial", fmt).decode("utf-8")
    words = text.replace("*", "").replace("\\", "")
    assert not RAW_KEY.search(words), RAW_KEY.search(words)
    for old in OLD_NAMES:
        assert old not in words
    for name in ("Found:", "Action:", "Reference:"):
        assert name in words
    body, _, appendix = words.partition("Check ids (for reference")
    assert appendix, "the list of check ids is missing"
    for rule in _rule_ids(sample):
        assert rule not in body, f"{rule} printed among the items"
        assert rule in appendix


def test_trend_readings_are_named_as_the_trade_names_them() -> None:
    oak = next(p for p in SAMPLES if p.stem == "oak-lane-house")
    text = render(load_site(oak), "remedial", "txt").decode("utf-8")
    # RCCB 2 on the invented sample: 180 ms then 312 ms at 1 × IΔn, 180°
    assert "1 × IΔn, 180° 180 ms" in " ".join(text.split())
    assert "Limit:" in text and "Measured:" in text


def test_csv_keeps_the_ids_in_their_own_column() -> None:
    oak = next(p for p in SAMPLES if p.stem == "oak-lane-house")
    data = render(load_site(oak), "remedial", "csv").decode("utf-8-sig")
    rows = [r for r in csv.DictReader(io.StringIO(data)) if r["number"]]
    assert list(rows[0])[:3] == ["number", "severity", "rule"]
    # the column names are a public interface and stay as they were
    assert {"message", "measured", "band", "action"} <= set(rows[0])
    assert {r["rule"] for r in rows} == _rule_ids(oak)
    for r in rows:
        assert not RAW_KEY.search(r["message"] + r["measured"] + r["band"])


def test_pdf_names_rows_in_trade_words(tmp_path: Path) -> None:
    oak = next(p for p in SAMPLES if p.stem == "oak-lane-house")
    out = write_report(load_site(oak), "remedial", "pdf", tmp_path / "r.pdf")
    text = " ".join(p.extract_text() for p in pypdf.PdfReader(out).pages)
    for name in ("Found", "Measured", "Limit", "Action", "Reference"):
        assert re.search(rf"\b{name}\b", text)
    assert "Wrong" not in text and "To do" not in text and "Rests on" not in text
    assert not RAW_KEY.search(text)
