"""One format for computed currents: the same number in a chart's legend, its title and the text."""

from __future__ import annotations

import re
from pathlib import Path

import pypdf
import pytest

from model.reports.writer import FORMATS, render, write_report
from model.rules.findings import fmt_ma
from model.storage.sites import load_site
from tests.reports.report_sites import SAMPLES, squash

SCHOOL = next(p for p in SAMPLES if p.stem == "kestrel-hill-school")


@pytest.mark.parametrize(
    ("value_ma", "text"),
    [
        (6.0, "6 mA"),  # IEC 62955: the 6 mA DC detection level of an EV charger
        (10.5, "10.5 mA"),
        (15.0, "15 mA"),  # ½ IΔn of 30 mA (IEC 61008-1 IΔno)
        (150.0, "150 mA"),  # 5 IΔn of 30 mA (IEC 61008-1 Table 1)
        (267.44, "267 mA"),
        (999.7, "1 A"),
        (5000.0, "5 A"),  # the 5 A column of IEC 61008-1 Table 1
        (1500.0, "1.5 A"),
        (22_500.0, "22.5 A"),
        (500_000.0, "500 A"),  # the 500 A column of IEC 61008-1 Table 1
        (1_095_238.1, "1095 A"),  # 230 V / 0.21 Ω (Ohm's law), the school sample's fault current
        (10_952_381.0, "10952 A"),
    ],
)
def test_one_current_format_never_an_exponent(value_ma: float, text: str) -> None:
    assert fmt_ma(value_ma) == text
    assert "e" not in fmt_ma(value_ma).split()[0]


def test_chart_legend_and_finding_give_the_same_fault_current(tmp_path: Path) -> None:
    out = write_report(load_site(SCHOOL), "remedial", "pdf", tmp_path / "r.pdf")
    text = squash(" ".join(p.extract_text() for p in pypdf.PdfReader(out).pages))
    # TN-S, U0 230 V, Ze 0.21 Ω: prospective earth-fault current 230 / 0.21 = 1095 A (Ohm's law)
    assert squash("15 mA to 1095 A") in text  # the finding and the chart's title
    assert squash("faults up to 1095 A") in text  # the chart's legend
    assert not re.search(r"\d\.?\d*e[+-]\d", text), "a current printed with an exponent"


@pytest.mark.parametrize("sample", SAMPLES, ids=lambda p: p.stem)
def test_no_document_prints_a_number_with_an_exponent(sample: Path) -> None:
    site = load_site(sample)
    for kind in ("remedial", "sheet"):
        for fmt in FORMATS:
            if fmt == "pdf":
                continue  # measured above on the parsed PDF
            data = render(site, kind, fmt).decode("utf-8-sig")
            assert not re.search(r"\d\.?\d*e[+-]\d", data), f"{sample.stem} {kind} {fmt}"
