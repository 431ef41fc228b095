"""The "what if" view's work on generated sites of 500 and 5,000 nodes.

For each size: one trial (a device change made on a scratch copy, checked with every
check, findings matched before and after; the analysis before is the app's, so not
counted); the options of one device and of the devices one finding names (the view lists
these first); and, for 500 nodes, the plan of the whole site (the view adds the plan's
change when it is made, and keeps the plan until the site changes).  Prints the median
of several runs.  The view runs all of these in workers: the screen stays usable.
Run: python bench/bench_what_if.py [--repeat N]
"""

from __future__ import annotations

import argparse
import statistics
import sys
import time
from collections.abc import Callable
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))
sys.path.insert(0, str(Path(__file__).resolve().parent))

from gen_site import generate_site  # noqa: E402

from model.plan.changes import DeviceChange, FieldChange  # noqa: E402
from model.plan.trial import run_trial  # noqa: E402
from model.rules.checks import analyse  # noqa: E402


def median_ms(fn: Callable[[], object], repeat: int) -> float:
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        times.append((time.perf_counter() - t0) * 1000)
    return statistics.median(times)


def measure(n: int, repeat: int) -> None:
    from model.plan.choices import options_for_device, options_for_finding
    from model.plan.search import make_plan

    site = generate_site(n, seed=1)
    before = analyse(site)
    rcd = next(x for x in site.nodes if x.kind == "rccb")
    was = rcd.waveform  # type: ignore[union-attr]
    change = DeviceChange(
        rcd.id, (FieldChange(rcd.id, "waveform", was, "B" if was != "B" else "A"),)
    )
    trial_ms = median_ms(lambda: run_trial(site, [change], before), repeat)
    print(f"{n:>6} nodes: one trial {trial_ms:8.1f} ms (median of {repeat})")
    finding = before.findings[0]
    dev_ms = median_ms(lambda: options_for_device(site, before, rcd.id), 1)
    find_ms = median_ms(lambda: options_for_finding(site, before, finding), 1)
    print(f"        options of a device {dev_ms:8.1f} ms; of a finding's devices {find_ms:8.1f} ms")
    if n <= 1_000:  # the plan of the whole site: made once per state of the site, then kept
        plan_ms = median_ms(lambda: make_plan(site, before), 1)
        print(f"        the plan of the whole site {plan_ms:8.1f} ms (one run)")


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--repeat", type=int, default=5)
    args = ap.parse_args()
    for n in (500, 5_000):
        measure(n, args.repeat)


if __name__ == "__main__":
    main()
