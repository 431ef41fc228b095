"""Documents of any visit: the site as it stood then, said so in the heading, named by its date."""

from __future__ import annotations

import csv
import io
from pathlib import Path

import pypdf
import pytest

from model.reports.writer import (
    FORMATS,
    UnknownVisit,
    default_name,
    render,
    write_report,
)
from model.rules.checks import analyse
from model.site.history import cut_at
from model.storage.sites import load_site
from tests.reports.report_sites import SAMPLES, squash

OAK = next(p for p in SAMPLES if p.stem == "oak-lane-house")
EARLIER, LATEST = "2023-05-09", "2026-11-14"  # the invented Oak Lane sample's two visits
NOTE = f"a later visit ({LATEST}) exists"


def _rules(site) -> list[str]:  # type: ignore[no-untyped-def]
    return sorted(f.rule for f in analyse(site).findings)


def test_an_earlier_visit_reports_the_site_as_it_stood(tmp_path: Path) -> None:
    site = load_site(OAK)
    data = render(site, "remedial", "csv", visit=EARLIER).decode("utf-8-sig")
    rows = [r for r in csv.DictReader(io.StringIO(data)) if r["number"]]
    # the findings of the site cut at the earlier visit, and only those
    assert sorted(r["rule"] for r in rows) == _rules(cut_at(site, EARLIER))
    # the trend on RCCB 2 (180 ms then 312 ms at 1 × IΔn 180°) exists only from the later visit
    assert "reading.trend" in _rules(site)
    assert "reading.trend" not in {r["rule"] for r in rows}
    last = data.strip().splitlines()[-1]
    assert NOTE in last


def test_the_earlier_sheet_shows_that_visits_readings(tmp_path: Path) -> None:
    site = load_site(OAK)
    data = render(site, "sheet", "csv", visit=EARLIER).decode("utf-8-sig")
    rows = {r["device"]: r for r in csv.DictReader(io.StringIO(data)) if r["device"]}
    assert rows["rc2"]["visit"] == EARLIER
    assert rows["rc2"]["x1_180 [ms]"] == "180"  # as recorded on the earlier visit
    assert rows["rb3"]["visit"] == ""  # first tested on the later visit


@pytest.mark.parametrize("fmt", FORMATS)
def test_every_format_says_a_later_visit_exists(fmt: str, tmp_path: Path) -> None:
    site = load_site(OAK)
    for kind in ("remedial", "sheet"):
        out = write_report(site, kind, fmt, tmp_path / f"{kind}.{fmt}", visit=EARLIER)
        if fmt == "pdf":
            pages = [p.extract_text() for p in pypdf.PdfReader(out).pages]
            assert squash(NOTE) in squash(pages[0])
            assert all(squash(f"visit {EARLIER}") in squash(p) for p in pages)  # page header
        else:
            text = out.read_bytes().decode("utf-8-sig")
            assert squash(NOTE) in squash(text)
        latest = render(site, kind, fmt)
        assert b"a later visit" not in latest


def test_naming_the_latest_visit_is_the_same_as_naming_none() -> None:
    site = load_site(OAK)
    assert render(site, "remedial", "md", visit=LATEST) == render(site, "remedial", "md")


def test_unknown_visit_lists_the_known_ones(tmp_path: Path) -> None:
    site = load_site(OAK)
    with pytest.raises(UnknownVisit) as err:
        write_report(site, "sheet", "pdf", tmp_path / "x.pdf", visit="2024-01-01")
    assert (
        str(err.value) == f"no visit '2024-01-01' in this site; known visits: {EARLIER}, {LATEST}"
    )
    assert list(tmp_path.iterdir()) == []


def test_default_name_follows_the_visit() -> None:
    site = load_site(OAK)
    name = default_name(OAK, site, "sheet", "pdf", EARLIER).name
    assert name == f"oak-lane-house-invented-demo-sheet-{EARLIER}.pdf"
    same_day = site.model_copy(
        update={"visits": [*site.visits, site.visits[-1].model_copy(update={"id": f"{LATEST}-2"})]}
    )
    assert default_name(OAK, same_day, "sheet", "pdf").name.endswith(f"-sheet-{LATEST}-2.pdf")
