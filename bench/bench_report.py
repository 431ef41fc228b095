"""Benchmark: render the documents of a large invented site.

Target: a site with 1,000 residual-current devices and about 300 findings
renders to PDF in under 5 s, and the PDF is under 2 MB.

The site is built here (invented data): 50 boards, each fed by a 100 mA
type S RCCB with 19 RCBOs of 30 mA below it.  On 5 boards the feed RCCB has
no readings, so each of its 19 pairs gets a band-overlap finding (and a pair
chart); 100 RCBOs read slower than 300 ms at 1 × IΔn (which also
leaves their pair without a measured margin): about 300 findings in all.

Run: python bench/bench_report.py
"""

from __future__ import annotations

import datetime as dt
import os
import sys
import time
from pathlib import Path
from typing import Any

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from model.reports.remedial import build_remedial  # noqa: E402
from model.reports.sheet import build_sheet  # noqa: E402
from model.reports.writer import render  # noqa: E402
from model.rules.checks import analyse  # noqa: E402
from model.site.models import SiteFile

BOARDS, PER_BOARD, UNTESTED_FEEDS, SLOW = 50, 19, 5, 100


def build_site() -> SiteFile:
    nodes: list[dict[str, Any]] = [{"id": "o", "kind": "origin", "label": "Intake"}]
    readings: dict[str, Any] = {}
    slow_left = SLOW
    for b in range(BOARDS):
        nodes.append(
            {
                "id": f"b{b}",
                "parent": "o",
                "kind": "board",
                "label": f"Board {b}",
                "place": f"Riser {b // 10}, floor {b % 10}",
            }
        )
        feed = f"f{b}"
        nodes.append(
            {
                "id": feed,
                "parent": f"b{b}",
                "kind": "rccb",
                "label": f"Feed RCCB {b}",
                "idn_ma": 100.0,
                "waveform": "A",
                "delay": "S",
                "rated_a": 63.0,
            }
        )
        if b >= UNTESTED_FEEDS:
            readings[feed] = {
                "x1_0": 210.0,
                "x1_180": 230.0,
                "x5_0": 90.0,
                "x5_180": 95.0,
                "button": "worked",
            }
        for k in range(PER_BOARD):
            d = f"r{b}-{k}"
            nodes.append(
                {
                    "id": d,
                    "parent": feed,
                    "kind": "rcbo",
                    "label": f"RCBO {b}.{k}",
                    "idn_ma": 30.0,
                    "waveform": "A",
                    "rated_a": 20.0,
                }
            )
            nodes.append(
                {
                    "id": f"c{b}-{k}",
                    "parent": d,
                    "kind": "circuit",
                    "use": "sockets",
                    "label": f"Flat {b}.{k} sockets",
                    "rated_a": 20.0,
                    "leakage_ma": 1.0,
                }
            )
            slow = slow_left > 0 and b >= UNTESTED_FEEDS and k % 2 == 0
            slow_left -= 1 if slow else 0
            readings[d] = {
                "half_0": "did not trip",
                "half_180": "did not trip",
                "x1_0": 18.0 + k,
                "x1_180": 320.0 if slow else 24.0,
                "x5_0": 9.0,
                "x5_180": 11.0,
                "ramp_ma": 22.5,
                "button": "worked",
                "note": "Invented reading for the benchmark.",
            }
    raw = {
        "format": "tripwise.site",
        "version": 2,
        "site": {"name": "Benchmark block (invented)", "earthing": "TN-C-S", "ze_ohm": 0.3},
        "nodes": nodes,
        "visits": [
            {
                "id": "v1",
                "date": "2026-11-01",
                "inspector": "Bench",
                "instrument": "x",
                "readings": readings,
            }
        ],
    }
    return SiteFile.model_validate(raw)


def main() -> None:
    site = build_site()
    t0 = time.perf_counter()
    result = analyse(site)
    t_an = time.perf_counter() - t0
    rcds = sum(1 for n in site.nodes if n.kind in ("rccb", "rcbo"))
    doc = build_remedial(site, result)
    print(
        f"site: {rcds} residual-current devices, {len(result.findings)} findings, "
        f"{len(doc.charts)} pair charts; analyse {t_an:.2f} s"
    )
    when = dt.datetime(2026, 11, 1, tzinfo=dt.UTC)
    for kind in ("remedial", "sheet"):
        for fmt in ("pdf", "md", "csv", "txt"):
            t0 = time.perf_counter()
            data = render(  # the renderers alone; bench_report_plan.py times the plan
                site,
                kind,
                fmt,
                generated=when,
                analysis=result if kind == "remedial" else None,
                plan=False,
            )
            dt_s = time.perf_counter() - t0
            extra = ""
            if fmt == "pdf":
                pages = data.count(b"/Type /Page\n") or data.count(b"/Type /Page")
                ok = dt_s < 5.0 and len(data) < 2 * 1024 * 1024
                extra = f"  ~{pages} pages  target <5 s and <2 MB: {'met' if ok else 'MISSED'}"
            print(f"{kind:9} {fmt:4} {dt_s:6.2f} s  {len(data) / 1024:8.1f} KiB{extra}")
    t0 = time.perf_counter()
    build_sheet(site)
    print(
        f"build_sheet alone {time.perf_counter() - t0:.2f} s; load average "
        f"{os.getloadavg()[0]:.2f} on {os.cpu_count()} cores"
    )


if __name__ == "__main__":
    main()
