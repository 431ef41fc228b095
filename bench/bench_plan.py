"""Remedy planning time for the generated 500-node site.

Prints the median and the min–max of several runs of ``make_plan`` (the site's
own analysis given, as the command gives it), how many nodes the planned site
has, how many changes and devices the plan makes, how many findings it clears
and leaves, how many candidates were screened, and the time of one full check
of the same site for scale.
Target: a plan for a 500-node site in seconds, not minutes.
Run: python bench/bench_plan.py [--repeat N] [--nodes N]
"""

from __future__ import annotations

import argparse
import statistics
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))
sys.path.insert(0, str(Path(__file__).resolve().parent))

from gen_site import generate_site  # noqa: E402

from model.plan.changes import apply_changes, diff_findings  # noqa: E402
from model.plan.evaluate import compare  # noqa: E402
from model.plan.greedy import Search  # noqa: E402
from model.plan.search import make_plan  # noqa: E402
from model.rules.checks import analyse  # noqa: E402


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--repeat", type=int, default=3)
    ap.add_argument("--nodes", type=int, default=500)
    args = ap.parse_args()
    site = generate_site(args.nodes, seed=1)
    assert len(site.nodes) == args.nodes, len(site.nodes)
    analysis = analyse(site)
    checks = []
    for _ in range(args.repeat):
        t0 = time.perf_counter()
        analyse(site)
        checks.append(time.perf_counter() - t0)
    times = []
    plan = None
    for _ in range(args.repeat):
        t0 = time.perf_counter()
        plan = make_plan(site, analysis)
        times.append(time.perf_counter() - t0)
    assert plan is not None
    search = Search(site, analysis)
    search.run()
    after = analyse(apply_changes(site, plan.changes))
    changed = [dc.node for dc in plan.changes]
    d = diff_findings(analysis.findings, after.findings, changed)
    replaced = [dc.node for dc in plan.changes if dc.fields[0].field == "replaced"]
    got = compare(analysis.findings, after.findings, changed, replaced)
    cleared = sum(len(dc.clears) for dc in plan.changes)
    print(f"site: {len(site.nodes)} nodes, {len(analysis.findings)} findings")
    print(
        f"full check: median {statistics.median(checks) * 1000:.0f} ms "
        f"(min {min(checks) * 1000:.0f}, max {max(checks) * 1000:.0f})"
    )
    print(
        f"make_plan: median {statistics.median(times):.2f} s "
        f"(min {min(times):.2f}, max {max(times):.2f}) over {args.repeat} runs"
    )
    print(
        f"plan: {len(plan.changes)} changes on {len({dc.node for dc in plan.changes})} devices, "
        f"clearing {cleared} findings, {len(plan.remaining)} remaining; "
        f"{search.evaluations} screenings"
    )
    print(
        f"re-check of the planned site: {len(got.created)} new or worse findings; "
        f"{len(d.created) - len(got.created)} kept with fewer devices listed; "
        f"{len(d.to_test)} changed devices to test"
    )


if __name__ == "__main__":
    main()
