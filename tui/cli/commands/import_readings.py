"""``tripwise import-readings SITE CSV [--visit ID] [--yes]``: readings from a spreadsheet.

The CSV is the test-sheet layout (see README).  Every row is checked first;
with any problem each one is listed (row, column, why) and nothing is
written.  Otherwise the preview of what changes is printed, and the changes
are applied with ``--yes``, or after a "y" at the prompt when run in a
terminal.  Without ``--yes`` and without a terminal to ask, only the preview
is printed and nothing is written (exit 0: a dry run).  The site is written
as the app saves it; a site open in the app is not written (exit 2).
Exit codes: 0 done (applied, declined, dry run or nothing to change),
2 bad input (nothing written).
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from model.storage.lock import LockHeld
from model.visits.import_csv import CsvImportError, ImportTargetError, plan_import, preview_text
from tui.cli.commands.common import load_or_report, report_held, write_site


def register(sub: argparse._SubParsersAction) -> None:  # type: ignore[type-arg]
    p = sub.add_parser(
        "import-readings",
        help="import readings typed into the test-sheet CSV into a visit (preview first)",
        description="Import readings from a CSV in the test-sheet layout into a visit. "
        "Prints what changes; applies with --yes (or at the prompt in a terminal). "
        "Exit codes: 0 done or dry run, 2 bad input (nothing written).",
    )
    p.add_argument("site", help="path to the site file (.json)")
    p.add_argument("csv", help="the CSV file")
    p.add_argument("--visit", metavar="ID", help="visit to import into (default: the latest)")
    p.add_argument("--yes", action="store_true", help="apply without asking")
    p.set_defaults(func=run)


def _ask(question: str) -> bool:
    try:
        answer = input(question)
    except EOFError:
        return False
    return answer.strip().lower() in ("y", "yes")


def run(args: argparse.Namespace) -> int:
    site_path = Path(args.site)
    site = load_or_report(args.site)
    if site is None:
        return 2
    try:
        original = site_path.read_bytes()
    except OSError as exc:
        print(f"tripwise: cannot read {args.site}: {exc.strerror or exc}", file=sys.stderr)
        return 2
    csv_path = Path(args.csv)
    try:
        data = csv_path.read_bytes()
    except FileNotFoundError:
        print(f"tripwise: cannot read {args.csv}: no such file", file=sys.stderr)
        return 2
    except OSError as exc:
        print(f"tripwise: cannot read {args.csv}: {exc.strerror or exc}", file=sys.stderr)
        return 2
    try:
        plan = plan_import(site, data, args.visit)
    except ImportTargetError as exc:
        print(f"tripwise: {args.site}: {exc}", file=sys.stderr)
        return 2
    except CsvImportError as exc:
        for err in exc.errors:
            print(f"tripwise: {args.csv}: {err.text()}", file=sys.stderr)
        print(
            f"tripwise: {len(exc.errors)} problem(s) in {args.csv}; nothing written to {args.site}",
            file=sys.stderr,
        )
        return 2
    sys.stdout.write(preview_text(plan))
    if not plan.changed:
        print("Nothing to change; nothing written.")
        return 0
    if not args.yes:
        if not (sys.stdin.isatty() and sys.stdout.isatty()):
            print("Not applied: run again with --yes to write these changes. Nothing written.")
            return 0
        if not _ask(f"Apply these changes to {args.site}? [y/N] "):
            print("Not applied. Nothing written.")
            return 0
    try:
        if site_path.read_bytes() != original:
            print(
                f"tripwise: {args.site} changed on disk while importing; nothing written "
                "(run the import again)",
                file=sys.stderr,
            )
            return 2
        write_site(site_path, plan.site, replace=True)
    except LockHeld as exc:
        return report_held(args.site, exc)
    except OSError as exc:
        print(f"tripwise: cannot write {args.site}: {exc.strerror or exc}", file=sys.stderr)
        return 2
    c = plan.counts()
    print(
        f"Written to {args.site}: visit {plan.visit_id}, {c['added']} value(s) added, "
        f"{c['changed']} changed."
    )
    return 0
