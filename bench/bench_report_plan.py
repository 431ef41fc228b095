"""Benchmark: the documents with the planned remedy, against the same documents without it.

Two invented sites: the 500-node site of ``gen_site`` (seed 7) and the
1,000-device block of ``bench_report``.  For each: the plan alone
(``make_plan``), then the remedial list (PDF, Markdown) and the study
(Markdown, and PDF for the smaller site) with the plan (as ``tripwise report``
writes them by default) and with ``plan=False``; the difference is what the
plan costs a report (making it, and for the study analysing the changed site once).

Run: python bench/bench_report_plan.py
"""

from __future__ import annotations

import datetime as dt
import os
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))
sys.path.insert(0, str(Path(__file__).resolve().parent))

from bench_report import build_site as block_site  # noqa: E402
from gen_site import generate_site  # noqa: E402

from model.plan.search import make_plan  # noqa: E402
from model.reports.writer import render  # noqa: E402
from model.rules.checks import analyse  # noqa: E402
from model.site.models import SiteFile  # noqa: E402

WHEN = dt.datetime(2026, 11, 1, tzinfo=dt.UTC)


def _timed(site: SiteFile, kind: str, fmt: str, plan: object) -> tuple[float, int]:
    result = analyse(site)
    t0 = time.perf_counter()
    data = render(site, kind, fmt, generated=WHEN, analysis=result, plan=plan)  # type: ignore[arg-type]
    return time.perf_counter() - t0, len(data)


def run(name: str, site: SiteFile, docs: list[tuple[str, str]]) -> None:
    result = analyse(site)
    t0 = time.perf_counter()
    plan = make_plan(site, result)
    t_plan = time.perf_counter() - t0
    print(
        f"{name}: {len(site.nodes)} nodes, {len(result.findings)} findings; plan "
        f"{len(plan.changes)} change(s), {len(plan.remaining)} left, made in {t_plan:.2f} s"
    )
    for kind, fmt in docs:
        without, size0 = _timed(site, kind, fmt, False)
        with_plan, size1 = _timed(site, kind, fmt, True)
        print(
            f"  {kind:8} {fmt:3}  without plan {without:6.2f} s {size0 / 1024:8.1f} KiB   "
            f"with plan {with_plan:6.2f} s {size1 / 1024:8.1f} KiB"
        )


def main() -> None:
    run(
        "gen_site(500, seed 7)",
        generate_site(500, 7),
        [("remedial", "pdf"), ("remedial", "md"), ("study", "md"), ("study", "pdf")],
    )
    run(
        "bench_report block",
        block_site(),
        [("remedial", "pdf"), ("remedial", "md"), ("study", "md")],
    )
    print(f"load average {os.getloadavg()[0]:.2f} on {os.cpu_count()} cores")


if __name__ == "__main__":
    main()
