"""``tripwise report SITE``: write the remedial-work list or the test sheet to a file."""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from model.reports.writer import (
    FORMATS,
    KIND_TITLE,
    KINDS,
    ReportError,
    UnknownVisit,
    default_name,
    report_visit,
    write_report,
)
from tui.cli.commands.common import load_or_report


def register(sub: argparse._SubParsersAction) -> None:  # type: ignore[type-arg]
    p = sub.add_parser(
        "report",
        help="write the remedial-work list, the test sheet or the coordination study",
        description="Write a document of the latest visit, or of an earlier one with --visit "
        "(the site as it stood then; the heading says a later visit exists). Without --out "
        "the file goes beside the site file as <site name>-<kind>-<visit date>.<format>. An "
        "existing file is never replaced without --force. The remedial list and the study carry the "
        "planned device changes unless --no-plan. Exit codes: 0 written, 2 bad input "
        "or refused.",
    )
    p.add_argument("site", help="path to the site file (.json)")
    p.add_argument(
        "--kind", choices=KINDS, default="remedial", help="which document (default remedial)"
    )
    p.add_argument(
        "--format", dest="fmt", choices=FORMATS, default="pdf", help="file format (default pdf)"
    )
    p.add_argument(
        "--visit",
        metavar="ID",
        help="the visit to report (default the latest; see its id in the app)",
    )
    p.add_argument("--out", help="file to write (default: beside the site file)")
    p.add_argument("--force", action="store_true", help="replace the file if it exists")
    p.add_argument(
        "--no-plan",
        dest="plan",
        action="store_false",
        help="leave out the planned device changes (the remedial list and the study carry them "
        "by default)",
    )
    p.set_defaults(func=run)


def _same_file(a: Path, b: Path) -> bool:
    try:
        return a.exists() and a.samefile(b)
    except OSError:
        return False


def run(args: argparse.Namespace) -> int:
    site = load_or_report(args.site)
    if site is None:
        return 2
    try:
        report_visit(site, args.visit)
    except UnknownVisit as exc:
        print(f"tripwise: {args.site}: {exc}", file=sys.stderr)
        return 2
    out = (
        Path(args.out)
        if args.out
        else default_name(Path(args.site), site, args.kind, args.fmt, args.visit)
    )
    if _same_file(out, Path(args.site)):
        print(f"tripwise: {out}: not written there: it is the site file", file=sys.stderr)
        return 2
    try:
        written = write_report(
            site, args.kind, args.fmt, out, force=args.force, visit=args.visit, plan=args.plan
        )
    except ReportError as exc:
        print(f"tripwise: {exc}", file=sys.stderr)
        return 2
    print(f"{KIND_TITLE[args.kind]} written to {written}")
    return 0
