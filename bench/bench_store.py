"""Speed of the site store: journal append, full save and load (prints figures; not a test).

    python bench/bench_store.py [--dir FOLDER] [--repeat N]

Targets: a reading recorded (journal append + fsync) under 5 ms; a full save
of a 1,000-node site under 50 ms; loading a 10,000-node site under 300 ms.
Files are written in FOLDER (default: a new temporary folder), so the figures
include the real fsync cost of that disk.
"""

from __future__ import annotations

import argparse
import os
import shutil
import statistics
import sys
import tempfile
import time
from collections.abc import Callable
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from bench.gen_site import generate_site  # noqa: E402
from model.site.models import Reading
from model.site.terms import RCD_KINDS
from model.storage.session import EditSession  # noqa: E402
from model.storage.sites import load_site, save_site  # noqa: E402


def _median_ms(fn: Callable[[int], object], repeat: int) -> float:
    times = []
    for i in range(repeat):
        t0 = time.perf_counter()
        fn(i)
        times.append(time.perf_counter() - t0)
    return statistics.median(times) * 1000


def main() -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--dir", help="folder to write the test files in")
    ap.add_argument("--repeat", type=int, default=30)
    args = ap.parse_args()
    folder = Path(args.dir or tempfile.mkdtemp(prefix="tripwise-bench-"))
    folder.mkdir(parents=True, exist_ok=True)
    print(f"files in {folder}; {os.cpu_count()} CPUs; load average {os.getloadavg()[0]:.2f}")
    rows: list[tuple[str, float, str]] = []
    for n in (1_000, 10_000):
        site = generate_site(n, seed=0)
        p = folder / f"bench-{n}.json"
        if p.exists():
            p.unlink()
        save_site(site, p)
        size_kb = p.stat().st_size / 1024
        s = EditSession.open(p)
        visit = s.site.visits[-1].id
        rcds = [x.id for x in s.site.nodes if x.kind in RCD_KINDS]

        def append(i: int, s: EditSession = s, visit: str = visit, rcds: list[str] = rcds) -> None:
            s.set_reading(visit, rcds[i % len(rcds)], Reading(x1_0=10.0 + i, x5_0=8.0))

        rows.append((f"record one reading ({n} nodes)", _median_ms(append, args.repeat * 3), "< 5"))
        circuit = next(x for x in s.site.nodes if x.kind == "circuit")

        def upsert(i: int, s: EditSession = s, c: object = circuit) -> None:
            s.upsert_node(c.model_copy(update={"label": f"Circuit {i}"}))  # type: ignore[attr-defined]

        rows.append((f"upsert one node ({n} nodes)", _median_ms(upsert, args.repeat), ""))

        def replace(_i: int, s: EditSession = s) -> None:
            s.replace_site(s.site.model_copy(update={"nodes": list(reversed(s.site.nodes))}))

        rows.append((f"replace whole site ({n} nodes)", _median_ms(replace, 5), ""))

        def full_save(
            i: int, s: EditSession = s, visit: str = visit, rcds: list[str] = rcds
        ) -> None:
            s.set_reading(visit, rcds[0], Reading(x1_0=20.0 + i))
            t0 = time.perf_counter()
            s.save()
            full_save.took.append(time.perf_counter() - t0)  # type: ignore[attr-defined]

        full_save.took = []  # type: ignore[attr-defined]
        for i in range(args.repeat):
            full_save(i)
        save_ms = statistics.median(full_save.took) * 1000  # type: ignore[attr-defined]
        rows.append(
            (f"full save, {n} nodes ({size_kb:.0f} KiB)", save_ms, "< 50" if n == 1000 else "")
        )
        s.close()
        rows.append(
            (
                f"load_site, {n} nodes",
                _median_ms(lambda _i, p=p: load_site(p), args.repeat),
                "< 300" if n == 10_000 else "",
            )
        )

        def open_close(_i: int, p: Path = p) -> None:
            EditSession.open(p).close()

        rows.append(
            (f"EditSession.open + close, {n} nodes", _median_ms(open_close, args.repeat), "")
        )
    if not args.dir:
        shutil.rmtree(folder, ignore_errors=True)
    width = max(len(r[0]) for r in rows)
    for name, ms, target in rows:
        print(f"{name:<{width}}  {ms:8.2f} ms  {('target ' + target + ' ms') if target else ''}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
