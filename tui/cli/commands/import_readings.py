"""``tripwise import-readings SITE CSV [--visit ID] [--yes]``: readings from a spreadsheet.

The CSV is the test-sheet layout (see README).  Every row is checked first;
with any problem the first 50 are listed on stdout (row, column, why; a
long value cut), the rest counted, one line on stderr says so, and nothing
is written.  Otherwise the preview of what changes is printed, and the changes
are applied with ``--yes``, or after a "y" at the prompt when run in a
terminal, through an editing session as the app saves (the lock, and any
unsaved edits in the recovery journal kept).  Only a regular CSV file of at
most 10 MiB is read; at most 50 problems are listed, then counted.  Without ``--yes`` and without a terminal to ask, only the preview
is printed and nothing is written (exit 0: a dry run).  The site is written
as the app saves it; a site open in the app is not written (exit 2).
Exit codes: 0 done (applied, declined, dry run or nothing to change),
2 bad input (nothing written).
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from model.site.models import SiteFile
from model.storage.codec import SiteLoadError
from model.storage.files import FileRefused, read_regular
from model.storage.session import EditSession
from model.visits.import_cells import MAX_CSV_BYTES
from model.visits.import_csv import (
    CsvImportError,
    ImportTargetError,
    plan_import,
    preview_text,
)
from tui.cli.commands.common import save_or_report, say


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


#: Problems listed one by one; the rest are counted.
MAX_PROBLEMS_SHOWN = 50
#: Longest problem line shown (a long cell value is cut). [characters]
MAX_PROBLEM_CHARS = 200


def clip(text: str, limit: int = MAX_PROBLEM_CHARS) -> str:
    """``text`` cut to ``limit`` characters, saying how much was left out."""
    if len(text) <= limit:
        return text
    return f"{text[:limit]}… ({len(text) - limit:,} more characters not shown)"


def _read_site(path: str) -> SiteFile | None:
    """The site as an editor would see it: the file and any unsaved edits in its journal."""
    try:
        with EditSession.open(path, read_only=True) as s:
            if s.recovered:
                say(
                    f"note: {path} has {len(s.recovered)} edit(s) in its recovery journal not "
                    "yet in the file; the preview includes them"
                )
            return s.site
    except SiteLoadError as exc:
        say(f"cannot load {exc}")
        return None


def run(args: argparse.Namespace) -> int:
    site_path = Path(args.site)
    site = _read_site(args.site)
    if site is None:
        return 2
    try:
        data = read_regular(args.csv, MAX_CSV_BYTES, what="CSV file")
    except FileRefused as exc:
        say(f"{args.csv}: {exc.reason}")
        return 2
    try:
        plan = plan_import(site, data, args.visit)
    except ImportTargetError as exc:
        say(f"{args.site}: {exc}")
        return 2
    except CsvImportError as exc:
        # the list is the command's report (stdout); stderr has the one line of the refusal
        for err in exc.errors[:MAX_PROBLEMS_SHOWN]:
            print(f"{args.csv}: {clip(err.text())}")
        more = len(exc.errors) - MAX_PROBLEMS_SHOWN
        if more > 0:
            print(f"{args.csv}: … and {more:,} more problem(s) not listed")
        say(f"{len(exc.errors):,} problem(s) in {args.csv}; nothing written to {args.site}")
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
    if save_or_report(site_path, plan.site, replace=True, expect=site) != 0:
        return 2
    c = plan.counts()
    print(
        f"Written to {args.site}: visit {plan.visit_id}, {c['added']} value(s) added, "
        f"{c['changed']} changed."
    )
    return 0
