"""``tripwise compare SITE [--from VISIT --to VISIT] [--json]``: two visits side by side."""

from __future__ import annotations

import argparse
import json
import sys

from model.visits.compare import CompareError, compare_visits
from model.visits.compare_words import compare_text
from tui.cli.commands.common import load_or_report


def register(sub: argparse._SubParsersAction) -> None:  # type: ignore[type-arg]
    p = sub.add_parser(
        "compare",
        help="compare two visits of a site: readings, devices tested, findings new and gone",
        description="Compare two visits of a site (default: the two latest). "
        "Exit codes: 0 compared, 2 file not loaded or unknown visit.",
    )
    p.add_argument("site", help="path to the site file (.json)")
    p.add_argument("--from", dest="from_id", metavar="VISIT", help="earlier visit id")
    p.add_argument("--to", dest="to_id", metavar="VISIT", help="later visit id")
    p.add_argument("--json", action="store_true", help="print one JSON object and nothing else")
    p.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    site = load_or_report(args.site)
    if site is None:
        return 2
    try:
        cmp = compare_visits(site, args.from_id, args.to_id)
    except CompareError as exc:
        print(f"tripwise: {args.site}: {exc}", file=sys.stderr)
        return 2
    if args.json:
        json.dump({"file": args.site, **cmp.as_json()}, sys.stdout, ensure_ascii=False, indent=2)
        sys.stdout.write("\n")
    else:
        sys.stdout.write(compare_text(cmp))
    return 0
