"""``tripwise check SITE [--json]``: run every check and print the findings."""

from __future__ import annotations

import argparse
import json
import sys

from model.reports.check_text import check_text
from model.rules.checks import analyse
from tui.cli.commands.common import load_or_report


def register(sub: argparse._SubParsersAction) -> None:  # type: ignore[type-arg]
    p = sub.add_parser(
        "check",
        help="check a site and list findings (exit 0 none, 1 findings, 2 bad file)",
        description="Check a site file. Exit codes: 0 no findings, 1 findings, 2 file not loaded.",
    )
    p.add_argument("site", help="path to the site file (.json)")
    p.add_argument("--json", action="store_true", help="print one JSON object and nothing else")
    p.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    site = load_or_report(args.site)
    if site is None:
        return 2
    result = analyse(site)
    if args.json:
        doc = {"site": site.site.name, "file": args.site, **result.as_json()}
        # Built whole, then written once: json.dump writes piece by piece, one
        # system call each when the output is unbuffered.
        sys.stdout.write(json.dumps(doc, ensure_ascii=False, indent=2) + "\n")
    else:
        sys.stdout.write(check_text(site, result))
    return 1 if result.findings else 0
