"""Timings of the visit tools on a large invented site; prints figures (not a test).

Run: python bench/bench_visits.py [BOARDS] [RCDS_PER_BOARD] [VISITS]
"""

from __future__ import annotations

import csv
import io
import os
import sys
import time
from pathlib import Path
from typing import Any

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from model.rules.checks import analyse  # noqa: E402
from model.rules.checks.context import Context  # noqa: E402
from model.rules.checks.trend import check_trend  # noqa: E402
from model.site.models import SiteFile
from model.site.sheet_columns import VALUE_COLUMNS  # noqa: E402
from model.visits.compare import compare_visits  # noqa: E402
from model.visits.import_csv import plan_import  # noqa: E402
from model.visits.merge import merge_sites  # noqa: E402


def big_site(boards: int, per_board: int, visits: int) -> dict[str, Any]:
    nodes: list[dict[str, Any]] = [{"id": "supply", "kind": "origin"}]
    rcds: list[str] = []
    for b in range(boards):
        nodes.append({"id": f"b{b}", "kind": "board", "parent": "supply"})
        for r in range(per_board):
            rid = f"b{b}-r{r}"
            rcds.append(rid)
            nodes.append(
                {"id": rid, "kind": "rcbo", "parent": f"b{b}", "idn_ma": 30, "waveform": "A"}
            )
            nodes.append({"id": f"{rid}-c", "kind": "circuit", "parent": rid, "use": "sockets"})
    vs = []
    for v in range(visits):
        readings = {
            rid: {"x1_0": 20.0 + v * 3 + i % 7, "x1_180": 22.0 + v * 4, "x5_0": 10.0 + v}
            for i, rid in enumerate(rcds)
        }
        vs.append({"id": f"v{v}", "date": f"{2010 + v}-06-01", "readings": readings})
    return {
        "format": "tripwise.site",
        "version": 2,
        "site": {"name": "Bench (invented)", "earthing": "TN-S"},
        "nodes": nodes,
        "visits": vs,
    }


def timed(label: str, fn: Any) -> Any:
    t0 = time.perf_counter()
    out = fn()
    print(f"{label:<44} {1000 * (time.perf_counter() - t0):9.1f} ms")
    return out


def main() -> None:
    boards, per_board, visits = (int(a) for a in (sys.argv[1:] + ["20", "25", "5"])[:3])
    doc = big_site(boards, per_board, visits)
    n_rcd = boards * per_board
    print(
        f"site: {len(doc['nodes'])} nodes, {n_rcd} RCDs, {visits} visits; "
        f"load average {os.getloadavg()[0]:.2f}, {os.cpu_count()} cores"
    )
    site = timed("validate site", lambda: SiteFile.model_validate(doc))
    timed("trend check alone", lambda: list(check_trend(Context.build(site))))
    timed("analyse (all checks)", lambda: analyse(site))
    timed("compare two latest visits", lambda: compare_visits(site))
    timed("merge with itself", lambda: merge_sites(site, site).merged())
    doc2 = big_site(boards, per_board, visits)
    for i, r in enumerate(doc2["visits"][-1]["readings"].values()):
        if i % 10 == 0:
            r["x1_0"] += 1.0
    other = SiteFile.model_validate(doc2)
    res = timed("merge divergent (10 % of devices differ)", lambda: merge_sites(site, other))
    timed(f"resolve {len(res.conflicts)} conflicts + validate", lambda: res.resolve("theirs"))
    timed("accounting", res.accounting)
    buf = io.StringIO()
    w = csv.writer(buf)
    w.writerow(["device", *VALUE_COLUMNS])
    for rid in doc["visits"][-1]["readings"]:
        w.writerow([rid, "", "", "25", "27", "11", "", "", "", "", "", ""])
    timed(f"plan import of {n_rcd} CSV rows", lambda: plan_import(site, buf.getvalue()))


if __name__ == "__main__":
    main()
