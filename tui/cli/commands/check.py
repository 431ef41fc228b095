"""``tripwise check SITE [--json]``: run every check and print the findings."""

from __future__ import annotations

import argparse
import gc
import sys

from model.rules.checks import analyse
from model.site.models import SiteFile
from tui.cli.loading import load_or_report
from tui.cli.output import write_json


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
    # The site lives until the command ends: the collector need not walk its
    # objects again each time the findings and their JSON make it run.
    gc.freeze()
    try:
        return _report(args, site)
    finally:
        gc.unfreeze()  # (for a caller that goes on: a test running main())


def _report(args: argparse.Namespace, site: SiteFile) -> int:
    result = analyse(site)
    if args.json:
        doc = {"site": site.site.name, "file": args.site, **result.as_json()}
        # In pieces of about a megabyte (json.dump would make one system call a
        # token when the output is unbuffered; one string would double the peak).
        write_json(doc, sys.stdout.write)
    else:
        # The text report's module is needed only here (not for --json).
        from model.reports.check_text import check_text

        sys.stdout.write(check_text(site, result))
    return 1 if result.findings else 0
