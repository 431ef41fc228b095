"""`tripwise check --json` as a whole process: start-up, work, scaling, peak memory.

Figures printed, not a test.  Every run is a fresh process started the way a
user starts one (``python -m tui ...``), taken in turns with its yardsticks so a
busy machine slows all of them alike; medians are printed with min-max.

1. Start-up: ``check --json`` on a 20-node site and ``--version``, against
   ``python -c "import pydantic, numpy"`` (the libraries' own import floor) and a
   bare ``python -c pass``.  Ratio of medians, and the median of the per-turn
   ratios.
2. Work beyond start-up at 10,000 nodes: whole-process ``check --json`` minus the
   import floor; and the same work split in a fresh process into import (our
   modules, beyond pydantic and numpy), decode (read + JSON), validate (models),
   analyse, as_json and dump (the JSON text written to /dev/null through the
   command line's safe stream).
3. 50,000 / 10,000 nodes: the in-process work (decode to dump) and, as the
   machine's own yardstick, a bare pass over the same nodes (a dict of the
   parsed nodes by id).
4. Peak memory of ``check --json`` on 50,000 nodes: the process's max RSS
   (``getrusage(RUSAGE_CHILDREN)`` in a small helper interpreter that runs it),
   against ``python -c "import pydantic, numpy"`` measured the same way.

Each run's exit code is checked (1: the generated sites have findings), and the
JSON it printed is read back for its node count.  With ``--old DIR`` the same
figures are taken, in the same turns, for another copy of the source tree (for
instance ``git archive <commit> | tar -x -C DIR``), printed side by side.

The compiled bytecode of every tree lives under one temporary folder
(``PYTHONPYCACHEPREFIX``), written by a first untimed run: each process then
starts as an installed copy does, with its bytecode ready, and nothing is
written into the source trees.

Goals: start-up ≤ 1.5 × the import floor; work beyond start-up at 10k ≤ 350 ms;
50k / 10k ≤ 6.0; peak at 50k ≤ 160 MiB.

Run: python bench/bench_cli.py [--repeat N] [--old DIR] [--skip-50k]
"""

from __future__ import annotations

import argparse
import json
import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent

FLOOR = ["-c", "import pydantic, numpy"]
BARE = ["-c", "pass"]

#: The in-process split, run in a fresh interpreter from the tree under test.
SPLIT = r"""
import json, sys, time
t0 = time.perf_counter()
import pydantic, numpy
t1 = time.perf_counter()
import tui.cli.main, tui.cli.commands.check
from model.storage.files import read_site_bytes
from model.storage.codec import _decode_json, _file_version, _validate
from model.rules.checks import analyse
from tui.cli.output import SafeStream
try:
    from tui.cli.output import write_json
except ImportError:  # an older tree: what its check command did
    def write_json(doc, write):
        write(json.dumps(doc, ensure_ascii=False, indent=2) + "\n")
t2 = time.perf_counter()
path = sys.argv[1]
data = read_site_bytes(path)
raw = _decode_json(data, path)
_file_version(raw, path)
del data
t3 = time.perf_counter()
site = _validate(raw, path)
del raw
t4 = time.perf_counter()
result = analyse(site)
t5 = time.perf_counter()
doc = {"site": site.site.name, "file": path, **result.as_json()}
t6 = time.perf_counter()
with open("/dev/null", "w", encoding="utf-8") as sink:
    write_json(doc, SafeStream(sink).write)
t7 = time.perf_counter()
t8 = time.perf_counter()
by_id = {n.id: n for n in site.nodes}
t9 = time.perf_counter()
print(json.dumps({"floor": t1 - t0, "import": t2 - t1, "decode": t3 - t2, "validate": t4 - t3,
                  "analyse": t5 - t4, "as_json": t6 - t5, "dump": t7 - t6,
                  "bare_pass": t9 - t8, "nodes": len(by_id)}))
"""
PARTS = ["import", "decode", "validate", "analyse", "as_json", "dump"]


class Tree:
    """One copy of the source, run with its own bytecode folder."""

    def __init__(self, label: str, root: Path, cache: Path) -> None:
        self.label, self.root = label, root
        self.env = {**os.environ, "PYTHONPATH": str(root), "PYTHONPYCACHEPREFIX": str(cache)}
        self.env.pop("PYTHONDONTWRITEBYTECODE", None)

    def run(self, argv: list[str], *, expect: int = 0) -> tuple[float, str]:
        """Seconds of wall time and the stdout of one fresh process."""
        t0 = time.perf_counter()
        done = subprocess.run(
            [sys.executable, *argv], cwd=self.root, env=self.env, capture_output=True
        )
        elapsed = time.perf_counter() - t0
        if done.returncode != expect:
            raise SystemExit(
                f"{self.label}: {argv[:3]} exited {done.returncode} (expected {expect}): "
                f"{done.stderr[-500:]!r}"
            )
        return elapsed, done.stdout.decode("utf-8")

    def peak_kib(self, argv: list[str], *, expect: int) -> tuple[int, str]:
        """Max RSS of one run [KiB], and its stdout.

        Read by a small helper interpreter with ``getrusage(RUSAGE_CHILDREN)`` after
        its one child ends: a child forked straight from this process would count
        the pages it shares with this process before it starts the program.
        """
        with tempfile.TemporaryFile() as out:
            done = subprocess.run(
                [sys.executable, "-c", _PEAK, str(expect), sys.executable, *argv],
                cwd=self.root,
                env=self.env,
                stdout=out,
                stderr=subprocess.PIPE,
            )
            if done.returncode != 0:
                raise SystemExit(f"{self.label}: {argv[:3]}: {done.stderr[-500:]!r}")
            kib = int(done.stderr.decode().strip().splitlines()[-1])
            out.seek(0)
            return kib, out.read().decode("utf-8")


#: The helper that runs one command and says its peak memory (last line on stderr).
_PEAK = r"""
import resource, subprocess, sys
code = subprocess.run(sys.argv[2:], stderr=subprocess.DEVNULL).returncode
if code != int(sys.argv[1]):
    sys.exit(f"exited {code}")
print(resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss, file=sys.stderr)
"""

#: Writes the generated sites (this process imports none of tripwise, so that its
#: own size is no part of any child's figures).
_GENERATE = r"""
import sys
from gen_site import generate_site
from model.storage.codec import dumps_site
for arg in sys.argv[1:]:
    n, path = arg.split("=", 1)
    with open(path, "w", encoding="utf-8") as fh:
        fh.write(dumps_site(generate_site(int(n), seed=1)))
"""


def _stats(values: list[float]) -> str:
    return (
        f"{statistics.median(values) * 1000:7.0f} ms "
        f"({min(values) * 1000:.0f}-{max(values) * 1000:.0f})"
    )


def _check_doc(text: str, nodes: int) -> None:
    """The run printed one JSON document for a site of ``nodes`` nodes."""
    doc = json.loads(text)
    name = doc["site"]
    if f"{nodes}/" not in name or "findings" not in doc:
        raise SystemExit(f"unexpected output for the {nodes}-node site: {name!r}")


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--repeat", type=int, default=15)
    ap.add_argument("--old", type=Path, help="another source tree, measured side by side")
    ap.add_argument("--skip-50k", action="store_true")
    args = ap.parse_args()
    with tempfile.TemporaryDirectory() as tmp_name:
        tmp = Path(tmp_name)
        cache = tmp / "pycache"
        trees = [Tree("new", ROOT, cache)]
        if args.old is not None:
            trees.insert(0, Tree("old", args.old.resolve(), cache))
        sizes = (20, 10_000) if args.skip_50k else (20, 10_000, 50_000)
        sites = {n: tmp / f"g{n}.json" for n in sizes}
        subprocess.run(
            [sys.executable, "-c", _GENERATE, *(f"{n}={p}" for n, p in sites.items())],
            cwd=ROOT,
            env={**os.environ, "PYTHONPATH": f"{ROOT}{os.pathsep}{ROOT / 'bench'}"},
            check=True,
        )
        check = {n: ["-m", "tui", "check", "--json", str(p)] for n, p in sites.items()}
        version = ["-m", "tui", "--version"]
        # untimed: bytecode written, disk cache warm
        for tree in trees:
            tree.run(BARE)
            tree.run(FLOOR)
            tree.run(check[20], expect=1)
            tree.run(version)
            tree.run(["-c", SPLIT, str(sites[20])])

        # 1. start-up, and 2. the whole-process 10k figure, in turns
        floor, bare = [], []
        ours: dict[str, dict[str, list[float]]] = {
            t.label: {"check20": [], "version": [], "check10k": []} for t in trees
        }
        for _ in range(args.repeat):
            floor.append(trees[0].run(FLOOR)[0])
            bare.append(trees[0].run(BARE)[0])
            for tree in trees:
                got = ours[tree.label]
                secs, out = tree.run(check[20], expect=1)
                _check_doc(out, 20)
                got["check20"].append(secs)
                secs, out = tree.run(version)
                if not out.startswith("tripwise "):
                    raise SystemExit(f"--version printed {out!r}")
                got["version"].append(secs)
                secs, out = tree.run(check[10_000], expect=1)
                _check_doc(out, 10_000)
                got["check10k"].append(secs)
        mf = statistics.median(floor)
        print(f"start-up, {args.repeat} turns; python -c pass {_stats(bare)}")
        print(f"  import floor (python -c 'import pydantic, numpy') {_stats(floor)}")
        for tree in trees:
            got = ours[tree.label]
            for key, what in (("check20", "check --json, 20 nodes"), ("version", "--version")):
                turns = [a / b for a, b in zip(got[key], floor, strict=True)]
                print(
                    f"  [{tree.label}] {what:24s} {_stats(got[key])}  ratio to the floor "
                    f"{statistics.median(got[key]) / mf:.2f} (per turn median "
                    f"{statistics.median(turns):.2f}, {min(turns):.2f}-{max(turns):.2f})"
                )
        print("work beyond start-up, check --json on 10,000 nodes (whole process - floor):")
        for tree in trees:
            got = ours[tree.label]["check10k"]
            beyond = [a - b for a, b in zip(got, floor, strict=True)]
            print(f"  [{tree.label}] whole {_stats(got)}; beyond the floor {_stats(beyond)}")

        # 2. the split, and 3. the 50k / 10k scaling, in fresh processes
        split_sizes = [n for n in sizes if n >= 10_000]
        splits: dict[tuple[str, int], list[dict[str, float]]] = {}
        split_repeat = max(3, args.repeat // 3)
        for _ in range(split_repeat):
            for n in split_sizes:
                for tree in trees:
                    _, out = tree.run(["-c", SPLIT, str(sites[n])])
                    row = json.loads(out)
                    if row["nodes"] != n:
                        raise SystemExit(f"the split read {row['nodes']} nodes, not {n}")
                    splits.setdefault((tree.label, n), []).append(row)
        print(f"in-process split, fresh process each, {split_repeat} runs (medians, ms):")
        for n in split_sizes:
            for tree in trees:
                rows = splits[(tree.label, n)]
                med = {k: statistics.median(r[k] for r in rows) for k in [*PARTS, "bare_pass"]}
                total = sum(med[k] for k in PARTS)
                parts = ", ".join(f"{k} {med[k] * 1000:.0f} ({med[k] / total:.0%})" for k in PARTS)
                print(f"  [{tree.label}] {n:>6} nodes: total {total * 1000:.0f} ms = {parts}")
        if 50_000 in sizes:
            print("50,000 / 10,000 nodes (decode to dump, in-process; medians):")
            for tree in trees:

                def work(n: int, label: str = tree.label) -> float:
                    return statistics.median(
                        sum(r[k] for k in PARTS if k != "import") for r in splits[(label, n)]
                    )

                def bare_pass(n: int, label: str = tree.label) -> float:
                    return statistics.median(r["bare_pass"] for r in splits[(label, n)])

                print(
                    f"  [{tree.label}] check {work(50_000) / work(10_000):.2f}; a bare pass "
                    f"over the nodes {bare_pass(50_000) / bare_pass(10_000):.2f}"
                )

            # 4. peak memory at 50k
            floor_kib = [trees[0].peak_kib(FLOOR, expect=0)[0] for _ in range(3)]
            print(
                f"peak memory (max RSS), check --json on 50,000 nodes; import floor "
                f"{statistics.median(floor_kib) / 1024:.0f} MiB"
            )
            peaks: dict[str, list[int]] = {t.label: [] for t in trees}
            for _ in range(3):
                for tree in trees:
                    kib, out = tree.peak_kib(check[50_000], expect=1)
                    _check_doc(out, 50_000)
                    peaks[tree.label].append(kib)
            for tree in trees:
                got = peaks[tree.label]
                print(
                    f"  [{tree.label}] {statistics.median(got) / 1024:.0f} MiB "
                    f"({min(got) / 1024:.0f}-{max(got) / 1024:.0f})"
                )


if __name__ == "__main__":
    main()
