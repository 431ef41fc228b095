"""Full-check time for generated sites of 1,000, 10,000 and 50,000 nodes.

Prints the median of several runs for each size and the 50k / 10k ratio, and
the time of the overcurrent part (pairs of fuses and breakers, disconnection,
breaking capacity), which the full check includes.
Targets: 10,000 nodes under 200 ms; 50,000 under 5.5 × the 10,000 figure.
Run: python bench/bench_check.py [--repeat N]
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

from model.rules.checks import Context, analyse  # noqa: E402
from model.rules.checks.overcurrent import overcurrent_analysis  # noqa: E402
from model.site.terms import RCD_KINDS  # noqa: E402


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--repeat", type=int, default=7)
    args = ap.parse_args()
    medians: dict[int, float] = {}
    baseline: dict[int, float] = {}
    oc_median: dict[int, float] = {}
    for n in (1_000, 10_000, 50_000):
        site = generate_site(n, seed=1)
        analyse(site)  # warm-up
        # the machine's own scaling: one dict of the nodes by id, nothing else
        walks = []
        for _ in range(args.repeat):
            t0 = time.perf_counter()
            by_id = {x.id: x for x in site.nodes}
            walks.append(time.perf_counter() - t0)
        baseline[n] = statistics.median(walks)
        del by_id
        times = []
        for _ in range(args.repeat):
            t0 = time.perf_counter()
            result = analyse(site)
            times.append(time.perf_counter() - t0)
        medians[n] = statistics.median(times)
        oc_times = []
        for _ in range(args.repeat):
            ctx = Context.build(site, result.index)
            t0 = time.perf_counter()
            oc = overcurrent_analysis(ctx)
            oc_times.append(time.perf_counter() - t0)
        oc_median[n] = statistics.median(oc_times)
        rcds = sum(1 for x in site.nodes if x.kind in RCD_KINDS)
        print(
            f"{len(site.nodes):>6} nodes  {rcds:>6} RCDs  {len(result.pairs):>6} pairs  "
            f"{len(result.findings):>6} findings  median {medians[n] * 1000:8.1f} ms"
            f"  (min {min(times) * 1000:.1f}, max {max(times) * 1000:.1f})"
        )
        print(
            f"{'':>6}        overcurrent part (in the full check): {len(oc.pairs):>6} pairs  "
            f"{len(oc.disconnection):>6} circuits  median {oc_median[n] * 1000:8.1f} ms"
        )
    ratio = medians[50_000] / medians[10_000]
    print(f"10k target < 200 ms: {medians[10_000] * 1000:.1f} ms")
    print(f"50k / 10k ratio: {ratio:.2f} (target < 5.5, linear = 5.0)")
    base = baseline[50_000] / baseline[10_000]
    print(
        f"baseline (dict of nodes by id) 50k / 10k ratio: {base:.2f} "
        "(what memory effects alone do to a linear pass on this machine)"
    )


if __name__ == "__main__":
    main()
