"""The coordination study and the test sheet's loop-impedance rows, written to real files."""

from __future__ import annotations

from pathlib import Path

import pypdf
import pytest

from model.reports.writer import ReportError, render, write_report
from model.rules.checks import analyse
from model.rules.findings import CAUTION
from model.storage.sites import load_site

ROOT = Path(__file__).resolve().parents[2]
EXAMPLE = ROOT / "tests" / "rules" / "wrenfield-lodge.json"
OAK = ROOT / "sample_sites" / "oak-lane-house.json"


def _pdf_text(path: Path) -> str:
    return "\n".join(p.extract_text() for p in pypdf.PdfReader(str(path)).pages)


def test_study_pdf_has_every_pair_with_verdict_and_data(tmp_path: Path) -> None:
    site = load_site(OAK)
    result = analyse(site)
    out = write_report(site, "study", "pdf", tmp_path / "study.pdf")
    text = " ".join(_pdf_text(out).split())
    assert "Coordination study" in text and "NOT a certificate" in text
    # every residual-current and overcurrent pair is there, numbered
    total = len(result.pairs) + len(result.oc_pairs)
    assert total == 18
    assert f"Pair {total}:" in text
    for p in result.oc_pairs:
        assert f"Verdict: {p.verdict}" in text
    assert "staircase" in text and "largest fault current 821 A" in text


def test_study_md_carries_ranges_data_and_loop_rows(tmp_path: Path) -> None:
    site = load_site(EXAMPLE)
    out = write_report(site, "study", "md", tmp_path / "study.md")
    text = out.read_text(encoding="utf-8")
    assert "**Verdict: not-selective**" in text
    assert "- not-selective: 274 A to 400 A" in text  # C40 under gG 80 A (README worked example)
    assert "measured at Workshop board on visit 2026-11-20" in text  # the data it rests on
    # one row per circuit: way, circuit, device, required time, Zs maximum, measured, mark
    assert (
        "| 2 | Workshop sockets (c-ws) | B16 | 0.4 s | 2.73 Ω (cold 2.19 Ω) | 2.31 Ω | too high |"
        in text
    )
    assert CAUTION.split(".")[0] in text


def test_test_sheet_md_gains_the_loop_table_before_the_caution(tmp_path: Path) -> None:
    text = render(load_site(EXAMPLE), "sheet", "md").decode("utf-8")
    table = text.index("## Loop impedance and disconnection")
    assert table < text.rindex("\n---\n")
    assert (
        "| 1 | Saw fuse (c-saw) | gG 20 A | 0.4 s | 1.48 Ω (cold 1.18 Ω) | 1.3 Ω | too high |"
        in text
    )


@pytest.mark.parametrize("fmt", ["csv", "txt"])
def test_study_refuses_formats_without_charts(tmp_path: Path, fmt: str) -> None:
    with pytest.raises(ReportError, match="pdf or md"):
        write_report(load_site(EXAMPLE), "study", fmt, tmp_path / f"s.{fmt}")
    assert not list(tmp_path.iterdir())


def test_remedial_list_carries_the_new_findings(tmp_path: Path) -> None:
    out = write_report(load_site(EXAMPLE), "remedial", "md", tmp_path / "r.md")
    text = out.read_text(encoding="utf-8")
    for rule in (
        "disconnection.zs-too-high",
        "breaking-capacity.too-low",
        "overcurrent.not-selective",
    ):
        assert rule in text.replace("\\", "")


@pytest.mark.parametrize("fmt", ["pdf", "txt"])
def test_test_sheet_pdf_and_text_carry_the_loop_table(tmp_path: Path, fmt: str) -> None:
    # BS 7671 Table 41.1 and 411.4.4: B16 at 230 V, 0.4 s: Ia = 5 × 16 A, Zs max =
    # 0.95 × 230 / 80 = 2.73 Ω, 0.8 × that = 2.19 Ω for a cold reading (common practice)
    out = write_report(load_site(EXAMPLE), "sheet", fmt, tmp_path / f"sheet.{fmt}")
    if fmt == "pdf":
        import pypdf

        text = " ".join(p.extract_text() for p in pypdf.PdfReader(out).pages)
    else:
        text = out.read_text(encoding="utf-8")
    flat = " ".join(text.split())
    assert "Loop impedance and disconnection" in flat
    assert "2.73 Ω (cold 2.19 Ω)" in flat and "Workshop sockets (c-ws)" in flat
    assert "too high" in flat
