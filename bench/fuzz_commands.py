"""Every read command over generated hostile site files and CSVs.

``python bench/fuzz_commands.py [COUNT] [--seed N] [--pdf]`` generates COUNT
hostile site files (and one hostile CSV for each), runs every command that
only reads (check, check --json, compare, compare --json, report of each kind
and format into a temporary folder, import-readings without --yes) on each,
through the command line's entry point in this process, and prints the
counts: files, runs, failures by kind, time.  A failure is a traceback, an
exit code outside {0, 1, 2}, more than one line on stderr, a line of 300
characters or more, a control character on stderr, an input file changed,
or a file left behind that the command was not asked to write.

The test suite (``tests/cli/test_fuzz_commands.py``) runs a short seeded run
of the same generator; a longer run is this script.  Everything generated is
invented.
"""

from __future__ import annotations

import argparse
import contextlib
import hashlib
import io
import json
import random
import re
import sys
import tempfile
import time
import traceback
from collections import Counter
from collections.abc import Iterator
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

ROOT = Path(__file__).resolve().parents[1]
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))

from bench.gen_site import generate_site  # noqa: E402
from model.site.models import site_to_dict  # noqa: E402
from model.site.sheet_columns import VALUE_COLUMNS  # noqa: E402
from model.storage.sites import load_site  # noqa: E402

#: Text that has hurt terminals, spreadsheets and parsers (all invented here).
HOSTILE_TEXT = [
    "\x1b]0;pwned\x07",
    "\x1b]52;c;ZWNobyBwd25lZA==\x07",
    "\x1b[2J\x1b[H",
    "\x9b31m",
    "a\u202eevil\u202c",
    "line\u2028break\u2029",
    "tab\tnew\nline\rcr",
    "\x00nul",
    "\x7fdel",
    "[bold red]markup[/]",
    '=HYPERLINK("x")',
    "\uff1dSUM(A1)",
    "+30",
    "-5",
    "😀 emoji",
    "٣٠",
    "1_000",
    "0,5",
    "1e3",
    "9" * 5000,
    "x" * 300,
    "",
    " ",
]
HOSTILE_NUMBERS: list[Any] = [
    1e308,
    -1e308,
    0,
    -0.0,
    10**40,
    -1,
    1e-320,
    "30",
    True,
    None,
    [1],
    {"v": 1},
]
CONTROL = re.compile(r"[\x00-\x08\x0b-\x1f\x7f-\x9f\u202a-\u202e\u2066-\u2069\u2028\u2029]")


@dataclass
class Case:
    name: str
    site: bytes
    csv: bytes


def _dump(doc: Any) -> bytes:
    return (json.dumps(doc, indent=1, ensure_ascii=False) + "\n").encode("utf-8", "surrogatepass")


def _walk(doc: Any, path: tuple[Any, ...] = ()) -> Iterator[tuple[tuple[Any, ...], Any]]:
    yield path, doc
    if isinstance(doc, dict):
        for k, v in doc.items():
            yield from _walk(v, (*path, k))
    elif isinstance(doc, list):
        for i, v in enumerate(doc):
            yield from _walk(v, (*path, i))


def _set(doc: Any, path: tuple[Any, ...], value: Any) -> None:
    for k in path[:-1]:
        doc = doc[k]
    doc[path[-1]] = value


def _mutate(doc: dict[str, Any], rng: random.Random) -> tuple[str, bytes]:
    """One hostile variant of a valid site document: (what was done, the bytes)."""
    leaves = [(p, v) for p, v in _walk(doc) if p and not isinstance(v, dict | list)]
    how = rng.choice(
        ["text", "text", "number", "kind", "drop", "truncate", "flip", "deep", "utf8", "dupkey"]
    )
    if how == "text":
        for _ in range(rng.randint(1, 4)):
            p, v = rng.choice([x for x in leaves if isinstance(x[1], str)] or leaves)
            _set(doc, p, rng.choice(HOSTILE_TEXT) + (v if isinstance(v, str) else ""))
        return how, _dump(doc)
    if how == "number":
        p, _v = rng.choice([x for x in leaves if isinstance(x[1], int | float)] or leaves)
        _set(doc, p, rng.choice(HOSTILE_NUMBERS))
        return how, _dump(doc)
    if how == "kind":
        node = rng.choice(doc["nodes"])
        node["kind"] = rng.choice(HOSTILE_TEXT) + "x" * rng.choice([0, 10, 100_000])
        return how, _dump(doc)
    if how == "drop":
        p, _v = rng.choice(leaves)
        parent = doc
        for k in p[:-1]:
            parent = parent[k]
        del parent[p[-1]]
        return how, _dump(doc)
    data = bytearray(_dump(doc))
    if how == "truncate":
        return how, bytes(data[: rng.randrange(len(data))])
    if how == "flip":
        for _ in range(rng.randint(1, 20)):
            data[rng.randrange(len(data))] = rng.randrange(256)
        return how, bytes(data)
    if how == "deep":
        depth = rng.choice([50, 900, 5000, 100_000])
        return how, b'{"format": "tripwise.site", "nodes": ' + b"[" * depth + b"]" * depth + b"}"
    if how == "utf8":
        at = rng.randrange(len(data))
        return how, bytes(data[:at]) + bytes([0xC3, 0x28, 0xFF]) + bytes(data[at:])
    text = data.decode("utf-8", "replace")
    return how, text.replace('"site": {', '"site": {"name": "twice", ', 1).encode()


def hostile_csv(doc: dict[str, Any], rng: random.Random) -> bytes:
    """A CSV in the test-sheet layout with hostile cells, rows and bytes."""
    cols = ["device", *VALUE_COLUMNS]
    ids = [n.get("id", "x") for n in doc.get("nodes", []) if isinstance(n, dict)] or ["x"]
    rows = [",".join(cols)]
    for _ in range(rng.randint(0, 30)):
        cells = [str(rng.choice(ids + ["nope", ""]))]
        for _c in VALUE_COLUMNS:
            r = rng.random()
            if r < 0.5:
                cells.append("")
            elif r < 0.75:
                cells.append(f"{rng.uniform(0, 400):.1f}")
            else:
                cells.append(rng.choice(HOSTILE_TEXT))
        if rng.random() < 0.1:
            cells = cells[: rng.randint(0, len(cells))]
        rows.append(",".join('"' + c.replace('"', '""') + '"' for c in cells))
    data = ("\r\n".join(rows) + "\r\n").encode("utf-8")
    if rng.random() < 0.1:
        data = b"\xef\xbb\xbf" + data
    if rng.random() < 0.05:
        data = data.replace(b",", b"\xff", 3)
    return data


def hostile_cases(count: int, seed: int = 0) -> Iterator[Case]:
    """``count`` hostile (site file, CSV) pairs; the same seed gives the same cases."""
    rng = random.Random(seed)
    bases = [site_to_dict(generate_site(n, s)) for n, s in ((12, 1), (30, 2), (60, 3))]
    for k in range(count):
        doc = json.loads(json.dumps(rng.choice(bases)))
        if k % 10 == 0:
            how, data = "valid", _dump(doc)
        else:
            how, data = _mutate(doc, rng)
        yield Case(f"{k}-{how}", data, hostile_csv(doc, rng))


def commands(site: str, csv: str, out: str, *, pdf: bool) -> list[list[str]]:
    """Every read command for one site file, and the plan with its new file (all to ``out``)."""
    fmts = ["md", "csv", "txt"] + (["pdf"] if pdf else [])
    runs = [
        ["check", site],
        ["check", "--json", site],
        ["compare", site],
        ["compare", "--json", site],
        ["import-readings", site, csv],
        ["plan", "--json", site, "--out", f"{out}/plan.json"],
    ]
    for kind in ("remedial", "sheet"):
        for fmt in fmts:
            runs.append(
                ["report", site, "--kind", kind, "--format", fmt, "--out", f"{out}/{kind}.{fmt}"]
            )
    return runs


@dataclass
class Tally:
    files: int = 0
    runs: int = 0
    failures: Counter[str] = field(default_factory=Counter)
    examples: dict[str, str] = field(default_factory=dict)
    exits: Counter[int] = field(default_factory=Counter)
    seconds: float = 0.0

    def fail(self, kind: str, what: str) -> None:
        self.failures[kind] += 1
        self.examples.setdefault(kind, what[:500])


def _digest(p: Path) -> str:
    return hashlib.sha256(p.read_bytes()).hexdigest()


def run_one(argv: list[str]) -> tuple[int | None, str, str]:
    """Run ``tripwise ARGV`` in this process: (exit code or None on an exception, stdout, stderr)."""
    from tui.cli.main import main

    out, err = io.StringIO(), io.StringIO()
    code: int | None
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        saved_in, sys.stdin = sys.stdin, io.StringIO("")
        try:
            code = main(argv)
        except SystemExit as exc:
            code = exc.code if isinstance(exc.code, int) else None
        except BaseException:  # noqa: BLE001 - counted as a traceback
            code = None
            err.write(traceback.format_exc())
        finally:
            sys.stdin = saved_in
    return code, out.getvalue(), err.getvalue()


def fuzz(count: int, seed: int = 0, *, pdf: bool = False, budget_s: float | None = None) -> Tally:
    """Run the commands over ``count`` cases (stopping early when ``budget_s`` runs out)."""
    tally = Tally()
    started = time.monotonic()
    with tempfile.TemporaryDirectory(prefix="tripwise-fuzz-") as tmp:
        root = Path(tmp)
        for case in hostile_cases(count, seed):
            if budget_s is not None and time.monotonic() - started > budget_s:
                break
            work = root / case.name
            (work / "out").mkdir(parents=True)
            site, csv = work / "site.json", work / "sheet.csv"
            site.write_bytes(case.site)
            csv.write_bytes(case.csv)
            inputs = {site: _digest(site), csv: _digest(csv)}
            tally.files += 1
            for argv in commands(str(site), str(csv), str(work / "out"), pdf=pdf):
                tally.runs += 1
                code, _out, err = run_one(argv)
                label = f"{case.name}: {' '.join(a[len(str(work)) :] if a.startswith(str(work)) else a for a in argv)}"
                if code is None or "Traceback" in err:
                    tally.fail("traceback", f"{label}\n{err}")
                    continue
                tally.exits[code] += 1
                if code not in (0, 1, 2):
                    tally.fail("exit code", f"{label}: {code}")
                lines = err.rstrip("\n").split("\n") if err else []  # U+2028 counts as control
                if len(lines) > 1:
                    tally.fail("stderr lines", f"{label}: {lines[:3]}")
                if any(len(x) >= 300 for x in lines):
                    tally.fail("stderr length", f"{label}: {max(len(x) for x in lines)}")
                if any(CONTROL.search(x) for x in lines):
                    tally.fail("stderr control", f"{label}: {lines!r}"[:500])
                if code == 2 and not lines:
                    tally.fail("silent refusal", label)
            for p, d in inputs.items():
                if _digest(p) != d:
                    tally.fail("input changed", f"{case.name}: {p.name}")
            made = {x.name for x in (work / "out").iterdir()}
            expected = {
                f"{k}.{f}" for k in ("remedial", "sheet") for f in ("md", "csv", "txt", "pdf")
            } | {"plan.json"}
            planned = work / "out" / "plan.json"
            if planned.exists():
                try:
                    load_site(planned)
                except Exception as exc:  # noqa: BLE001 - any failure to reopen is the finding
                    tally.fail("plan file unreadable", f"{case.name}: {exc}"[:500])
            left = {x.name for x in work.iterdir()} - {"site.json", "sheet.csv", "out"}
            if left or made - expected:
                tally.fail("stray files", f"{case.name}: {sorted(left | (made - expected))}")
    tally.seconds = time.monotonic() - started
    return tally


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("count", type=int, nargs="?", default=3000)
    ap.add_argument("--seed", type=int, default=0)
    ap.add_argument("--pdf", action="store_true", help="also write PDFs (slow)")
    ap.add_argument("--budget", type=float, help="stop starting new files after this many seconds")
    args = ap.parse_args(argv)
    t = fuzz(args.count, args.seed, pdf=args.pdf, budget_s=args.budget)
    print(f"files {t.files}, runs {t.runs}, time {t.seconds:.1f} s")
    print("exit codes: " + ", ".join(f"{k}: {v}" for k, v in sorted(t.exits.items())))
    print("failures: " + (", ".join(f"{k}: {v}" for k, v in t.failures.items()) or "none"))
    for kind, example in t.examples.items():
        print(f"--- first {kind}:\n{example}")
    return 1 if t.failures else 0


if __name__ == "__main__":
    raise SystemExit(main())
