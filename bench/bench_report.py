"""Benchmark: the PDF documents of large invented sites, whole ``tripwise report`` commands.

Targets: the remedial-work list of a site with 1,000 residual-current
devices and about 300 findings in under 2 s (median, the whole command, from
start to exit); the test sheet of the same site; the coordination study of a
generated site with residual-current and fuse/breaker pairs.

Each document is written by ``python -m tui report`` in a fresh process, so
the figure includes start-up, loading and checking the site, building and
rendering the document and writing it.  With ``--against REV`` the same
commands run from a checkout of ``REV`` (made with ``git archive`` in a
temporary folder) in alternation with this tree, so both are measured under
the same load; the ratio is new median / old median.  Every PDF written is
opened again (pypdf) and checked: its page count is the same on every run and
in both trees, and its last page reads 'page N of N'.

The sites are built here (invented data).  The benchmark block: 50 boards,
each fed by a 100 mA type S RCCB with 19 RCBOs of 30 mA below it.  On 5
boards the feed RCCB has no readings, so each of its 19 pairs gets a
band-overlap finding (and a pair chart); 100 RCBOs read slower than 300 ms
at 1 × IΔn (which also leaves their pair without a measured margin): about
300 findings in all.  The study site is ``bench/gen_site.py``'s
generate_site(STUDY_NODES, 7): fuses, MCBs and cascaded RCDs.

Run: python bench/bench_report.py [--against f5c9df4] [--runs 5] [--kinds remedial,sheet]
"""

from __future__ import annotations

import argparse
import datetime as dt
import os
import resource
import statistics
import subprocess
import sys
import tarfile
import tempfile
import time
from pathlib import Path
from typing import Any

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))
sys.path.insert(0, str(ROOT / "bench"))

from gen_site import generate_site  # noqa: E402

from model.site.models import SiteFile  # noqa: E402
from model.storage.sites import save_site  # noqa: E402

BOARDS, PER_BOARD, UNTESTED_FEEDS, SLOW = 50, 19, 5, 100
STUDY_NODES = 400
TARGET_S = {"remedial": 2.0}


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


def checkout(rev: str, into: Path) -> Path:
    """The tree of ``rev`` unpacked in ``into`` (git archive: no .git, nothing generated)."""
    tar = into / "tree.tar"
    with tar.open("wb") as out:
        subprocess.run(["git", "-C", str(ROOT), "archive", rev], stdout=out, check=True)
    with tarfile.open(tar) as t:
        t.extractall(into / "tree", filter="data")
    return into / "tree"


def run_once(tree: Path, site: Path, kind: str, out: Path) -> tuple[float, float]:
    """Wall and CPU seconds of one whole ``report`` command run from ``tree``."""
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    t0 = time.perf_counter()
    cmd = [sys.executable, "-m", "tui", "report", str(site), "--kind", kind]
    cmd += ["--out", str(out), "--force"]
    if "--no-plan" in (tree / "tui/cli/commands/report.py").read_text(encoding="utf-8"):
        cmd.append("--no-plan")  # the renderers alone; making the plan is bench_report_plan's
    subprocess.run(cmd, cwd=tree, check=True, stdout=subprocess.DEVNULL)
    wall = time.perf_counter() - t0
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    cpu = (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)
    return wall, cpu


def pdf_pages(path: Path) -> int:
    """Pages of the PDF as a reader opens it; fails unless the last page says 'page N of N'."""
    import pypdf

    reader = pypdf.PdfReader(path)
    n = len(reader.pages)
    last = "".join((reader.pages[-1].extract_text() or "").split())
    if f"page{n}of{n}" not in last:
        raise SystemExit(f"{path}: {n} pages, but the last page does not read 'page {n} of {n}'")
    return n


def floor_s(runs: int) -> float:
    """Median seconds of a bare interpreter importing the libraries a PDF report needs."""
    times = []
    for _ in range(runs):
        t0 = time.perf_counter()
        subprocess.run([sys.executable, "-c", "import fpdf, pydantic, numpy"], check=True)
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


def summary(times: list[float]) -> str:
    return f"{statistics.median(times):6.2f} s  ({min(times):.2f}–{max(times):.2f}, n={len(times)})"


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--against", metavar="REV", help="also run a checkout of REV, alternately")
    ap.add_argument("--runs", type=int, default=5, help="runs of each command (default 5)")
    ap.add_argument("--kinds", default="remedial,sheet,study", help="documents to write")
    args = ap.parse_args()
    kinds = [k for k in args.kinds.split(",") if k]
    with tempfile.TemporaryDirectory(prefix="tw-bench-") as tmp_s:
        tmp = Path(tmp_s)
        block, gen = tmp / "block.json", tmp / "generated.json"
        save_site(build_site(), block)
        save_site(generate_site(STUDY_NODES, 7), gen)
        trees = {"new": ROOT}
        if args.against:
            trees = {"old": checkout(args.against, tmp), "new": ROOT}
        print(
            f"{dt.datetime.now(dt.UTC):%Y-%m-%d %H:%M} UTC; load average "
            f"{os.getloadavg()[0]:.2f} on {os.cpu_count()} cores; old = {args.against or '-'}"
        )
        print(
            f"floor (python -c 'import fpdf, pydantic, numpy'): {floor_s(args.runs):.2f} s median"
        )
        for kind in kinds:
            site = gen if kind == "study" else block
            walls: dict[str, list[float]] = {t: [] for t in trees}
            cpus: dict[str, list[float]] = {t: [] for t in trees}
            pages: dict[str, set[int]] = {t: set() for t in trees}
            sizes: dict[str, int] = {}
            for _ in range(args.runs):
                for name, tree in trees.items():
                    out = tmp / f"{name}-{kind}.pdf"
                    wall, cpu = run_once(tree, site, kind, out)
                    walls[name].append(wall)
                    cpus[name].append(cpu)
                    pages[name].add(pdf_pages(out))
                    sizes[name] = out.stat().st_size
            every = set().union(*pages.values())
            if len(every) != 1:
                raise SystemExit(f"{kind}: page counts differ between runs or trees: {pages}")
            print(f"\n{kind} of {site.stem} site ({every.pop()} pages each)")
            for name in trees:
                print(
                    f"  {name}: wall {summary(walls[name])}  cpu {summary(cpus[name])}  "
                    f"{sizes[name] / 1024:7.1f} KiB"
                )
            if "old" in trees:
                ratio = statistics.median(walls["new"]) / statistics.median(walls["old"])
                print(f"  new / old (median wall): {ratio:.2f}")
            if kind in TARGET_S:
                met = statistics.median(walls["new"]) <= TARGET_S[kind]
                print(f"  target <= {TARGET_S[kind]:g} s median: {'met' if met else 'MISSED'}")


if __name__ == "__main__":
    main()
