"""``tripwise print SITE``: send the PDF of a document to the system print queue with ``lp``."""

from __future__ import annotations

import argparse
import shutil
import subprocess
import sys
import tempfile
from pathlib import Path

from model.reports.writer import KIND_TITLE, KINDS, ReportError, write_report
from tui.cli.commands.common import load_or_report

NO_LP = (
    "tripwise: there is no 'lp' command on this system, so nothing can be sent to a print "
    "queue; write a PDF with 'tripwise report SITE --format pdf' and print that instead"
)


def register(sub: argparse._SubParsersAction) -> None:  # type: ignore[type-arg]
    p = sub.add_parser(
        "print",
        help="print the remedial-work list or the test sheet (PDF through lp)",
        description="Render the PDF of a document and send it to the system print queue with "
        "lp. Exit codes: 0 queued, 2 bad input, no lp, or lp refused.",
    )
    p.add_argument("site", help="path to the site file (.json)")
    p.add_argument(
        "--kind", choices=KINDS, default="remedial", help="which document (default remedial)"
    )
    p.add_argument("--printer", "-d", help="print queue name (default: the system's default)")
    p.add_argument("--copies", "-n", type=int, default=1, help="number of copies (default 1)")
    p.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    lp = shutil.which("lp")
    if lp is None:
        print(NO_LP, file=sys.stderr)
        return 2
    if not 1 <= args.copies <= 99:
        print("tripwise: --copies must be between 1 and 99", file=sys.stderr)
        return 2
    site = load_or_report(args.site)
    if site is None:
        return 2
    with tempfile.TemporaryDirectory(prefix="tripwise-print-") as tmp:
        pdf = Path(tmp) / f"{Path(args.site).stem}-{args.kind}.pdf"
        try:
            write_report(site, args.kind, "pdf", pdf)
        except ReportError as exc:
            print(f"tripwise: {exc}", file=sys.stderr)
            return 2
        cmd = [lp, "-n", str(args.copies), "-t", f"{site.site.name}: {KIND_TITLE[args.kind]}"]
        if args.printer:
            cmd += ["-d", args.printer]
        cmd += ["--", str(pdf)]
        try:
            done = subprocess.run(cmd, capture_output=True, text=True, timeout=120, check=False)
        except (OSError, subprocess.TimeoutExpired) as exc:
            print(f"tripwise: could not run lp: {exc}", file=sys.stderr)
            return 2
    if done.returncode != 0:
        why = (done.stderr or done.stdout).strip().splitlines()
        print(
            f"tripwise: lp refused the job (exit {done.returncode})"
            + (f": {why[-1]}" if why else ""),
            file=sys.stderr,
        )
        return 2
    queued = done.stdout.strip()
    print(f"{KIND_TITLE[args.kind]} sent to the print queue" + (f" ({queued})" if queued else ""))
    return 0
