"""Time of ``analyse()`` in-process on generated sites of 1,000, 10,000 and 50,000 nodes.

For each size: the nodes, RCDs, pairs and findings counted (so the figure is
known to be of the work it says), the median and min–max of the full
analysis (wall clock, and the process's own CPU time, which a loaded machine
disturbs less), and the overcurrent part's median (pairs of fuses and
breakers, disconnection, breaking capacity; included in the full figure).
Then the 50k / 10k ratio, and the same ratio for a bare loop (a dict of the
nodes by id), which is what memory effects alone do to a linear pass here.

``--baseline DIR`` measures another checkout (e.g. ``git worktree add`` or
``git archive`` of main) side by side: the two are run in turns, a fresh
process each, so a shared, loaded machine weighs on both alike.

Targets: 10,000 nodes ≤ 150 ms median; 50k / 10k ≤ 6.0.
Run: python bench/bench_check.py [--repeat N] [--rounds R] [--baseline DIR]
"""

from __future__ import annotations

import argparse
import json
import statistics
import subprocess
import sys
import time
from pathlib import Path
from typing import Any

ROOT = Path(__file__).resolve().parent.parent
SIZES = (1_000, 10_000, 50_000)


def measure(root: Path, sizes: list[int], repeat: int) -> dict[str, Any]:
    """Run in a fresh process with ``root`` first on the path: times of every size."""
    sys.path.insert(0, str(root / "bench"))
    sys.path.insert(0, str(root))
    from gen_site import generate_site

    from model.rules.checks import Context, analyse
    from model.rules.checks.overcurrent import overcurrent_analysis
    from model.site.terms import RCD_KINDS

    out: dict[str, Any] = {}
    for n in sizes:
        site = generate_site(n, seed=1)
        result = analyse(site)  # warm-up
        walks = []
        for _ in range(repeat):
            t0 = time.perf_counter()
            by_id = {x.id: x for x in site.nodes}
            walks.append(time.perf_counter() - t0)
        del by_id
        wall, cpu = [], []
        for _ in range(repeat):
            t0, c0 = time.perf_counter(), time.process_time()
            result = analyse(site)
            cpu.append(time.process_time() - c0)
            wall.append(time.perf_counter() - t0)
        oc_times = []
        for _ in range(repeat):
            ctx = Context.build(site, result.index)
            t0 = time.perf_counter()
            oc = overcurrent_analysis(ctx)
            oc_times.append(time.perf_counter() - t0)
        out[str(n)] = {
            "nodes": len(site.nodes),
            "rcds": sum(1 for x in site.nodes if x.kind in RCD_KINDS),
            "pairs": len(result.pairs),
            "oc_pairs": len(oc.pairs),
            "findings": len(result.findings),
            "wall": wall,
            "cpu": cpu,
            "oc": oc_times,
            "walk": walks,
        }
    return out


def run_worker(root: Path, sizes: list[int], repeat: int) -> dict[str, Any]:
    cmd = [sys.executable, __file__, "--worker", str(root), "--repeat", str(repeat)]
    cmd += ["--sizes", ",".join(map(str, sizes))]
    done = subprocess.run(cmd, check=True, capture_output=True, text=True, cwd=root)
    return json.loads(done.stdout)  # type: ignore[no-any-return]


def merge(runs: list[dict[str, Any]]) -> dict[str, Any]:
    """The runs of one checkout together: counts from the first, every timing pooled."""
    out: dict[str, Any] = {}
    for size in runs[0]:
        first = runs[0][size]
        pooled = {k: [t for r in runs for t in r[size][k]] for k in ("wall", "cpu", "oc", "walk")}
        for r in runs[1:]:
            assert r[size]["findings"] == first["findings"], "the runs analysed different sites"
        out[size] = {**first, **pooled}
    return out


def ms(values: list[float]) -> float:
    return statistics.median(values) * 1000.0


def report(name: str, data: dict[str, Any]) -> None:
    print(f"{name}:")
    for d in data.values():
        print(
            f"  {d['nodes']:>6} nodes {d['rcds']:>6} RCDs {d['pairs']:>6} RCD pairs "
            f"{d['oc_pairs']:>6} oc pairs {d['findings']:>6} findings | median "
            f"{ms(d['wall']):8.1f} ms (min {min(d['wall']) * 1000:.1f}, max "
            f"{max(d['wall']) * 1000:.1f}) cpu {ms(d['cpu']):8.1f} ms | overcurrent part "
            f"{ms(d['oc']):7.1f} ms"
        )
    if "10000" in data and "50000" in data:
        big, mid = data["50000"], data["10000"]
        print(
            f"  50k / 10k: {ms(big['wall']) / ms(mid['wall']):.2f} wall, "
            f"{ms(big['cpu']) / ms(mid['cpu']):.2f} cpu (target ≤ 6.0); bare loop "
            f"{ms(big['walk']) / ms(mid['walk']):.2f}"
        )


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0] if __doc__ else None)
    ap.add_argument("--repeat", type=int, default=7, help="timed runs per size per round")
    ap.add_argument("--rounds", type=int, default=1, help="fresh processes per checkout")
    ap.add_argument("--sizes", default=",".join(map(str, SIZES)))
    ap.add_argument("--baseline", type=Path, help="another checkout, measured in turns")
    ap.add_argument("--worker", type=Path, help=argparse.SUPPRESS)
    args = ap.parse_args()
    sizes = [int(s) for s in args.sizes.split(",")]
    if args.worker is not None:
        json.dump(measure(args.worker, sizes, args.repeat), sys.stdout)
        return
    roots = {"this tree": ROOT}
    if args.baseline is not None:
        roots["baseline"] = args.baseline.resolve()
    runs: dict[str, list[dict[str, Any]]] = {name: [] for name in roots}
    for _ in range(args.rounds):
        for name, root in roots.items():
            runs[name].append(run_worker(root, sizes, args.repeat))
    merged = {name: merge(r) for name, r in runs.items()}
    for name, data in merged.items():
        report(f"{name} ({roots[name]})", data)
    if "baseline" in merged:
        new, old = merged["this tree"], merged["baseline"]
        for size in new:
            if new[size]["findings"] != old[size]["findings"]:
                print(f"  NOTE: {size} nodes: the two found different numbers of findings")
            print(
                f"  {size:>6} nodes: baseline / this tree = "
                f"{ms(old[size]['wall']) / ms(new[size]['wall']):.2f} wall, "
                f"{ms(old[size]['cpu']) / ms(new[size]['cpu']):.2f} cpu"
            )


if __name__ == "__main__":
    main()
