"""``tripwise plan SITE [--json] [--out NEW [--force]]``: device changes that clear findings."""

from __future__ import annotations

import argparse
import datetime as dt
import json
import os
import sys
from pathlib import Path

from model.plan.changes import apply_changes
from model.plan.search import make_plan
from model.plan.text import plan_notes, plan_text
from model.rules.checks import analyse
from model.site.ops import InvalidEdit
from model.storage.files import plain_os_error
from tui.cli.commands.common import load_or_report, save_or_report, say


def register(sub: argparse._SubParsersAction) -> None:  # type: ignore[type-arg]
    p = sub.add_parser(
        "plan",
        help="plan device changes that clear findings (exit 0 a plan, 1 nothing to improve, "
        "2 bad input)",
        description="Search the standard choices (IΔn, waveform type, delay, MCB to RCBO, "
        "removal of a duplicate RCD, larger upstream rating, breaking capacity) for the fewest "
        "device changes that clear findings without creating any, each re-checked. With --out "
        "the changed site is written as a new file (never over SITE; an existing file only "
        "with --force), the plan recorded in its notes. Exit codes: 0 a plan was made, "
        "1 nothing could be improved, 2 bad input or refused.",
    )
    p.add_argument("site", help="path to the site file (.json)")
    p.add_argument("--json", action="store_true", help="print one JSON object and nothing else")
    p.add_argument("--out", metavar="NEW", help="write the site with the plan made as a new file")
    p.add_argument(
        "--force", action="store_true", help="with --out: replace NEW if it exists (never SITE)"
    )
    p.set_defaults(func=run)


def _same_file(a: Path, b: Path) -> bool:
    """Whether ``a`` is ``b`` (the same path, or the same file through a link)."""
    try:
        if os.path.abspath(a) == os.path.abspath(b):
            return True
        return a.exists() and a.samefile(b)
    except OSError:
        return False


def _refuse_out(out: Path, site_path: Path, force: bool) -> str | None:
    """Why ``--out`` cannot be written, or None."""
    if _same_file(out, site_path) or (
        os.path.islink(out) and _same_file(Path(os.path.realpath(out)), site_path)
    ):
        return f"{out}: not written: it is the site file itself (the plan never changes SITE)"
    try:
        if os.path.lexists(out) and not force:
            return f"{out} already exists; not overwritten (add --force to replace it)"
        if out.exists() and out.is_dir():
            return f"{out} is a folder; give a file name"
        if not out.parent.is_dir():
            return f"cannot write {out}: no folder {out.parent}"
    except OSError as exc:
        return f"cannot write {out}: {plain_os_error(exc)}"
    return None


def run(args: argparse.Namespace) -> int:
    if args.force and not args.out:
        say("--force goes with --out NEW; nothing done")
        return 2
    out = Path(args.out) if args.out else None
    if out is not None:
        refused = _refuse_out(out, Path(args.site), args.force)
        if refused is not None:
            say(refused)
            return 2
    site = load_or_report(args.site)
    if site is None:
        return 2
    analysis = analyse(site)
    plan = make_plan(site, analysis)
    if out is not None and plan.changes:
        try:
            changed = apply_changes(site, plan.changes)
        except InvalidEdit as exc:  # the plan was made on a copy: this is not expected
            say(f"cannot make the plan on a copy of {args.site}: {exc}; nothing written")
            return 2
        when = dt.datetime.now(dt.UTC).strftime("%Y-%m-%d %H:%M UTC")
        info = changed.site.model_copy(
            update={"notes": plan_notes(site, plan, Path(args.site).name, when)}
        )
        changed = changed.model_copy(update={"site": info})
        code = save_or_report(out, changed, replace=args.force)
        if code:
            return code
    if args.json:
        doc = {"site": site.site.name, "file": args.site, **plan.as_json()}
        if out is not None:
            doc["out"] = str(out) if plan.changes else None
        sys.stdout.write(json.dumps(doc, ensure_ascii=False, indent=2) + "\n")
    else:
        text = plan_text(site, plan)
        if out is not None:
            text += (
                f"\nThe site with these changes was written to {out}.\n"
                if plan.changes
                else f"\nNothing to change: {out} was not written.\n"
            )
        sys.stdout.write(text)
    return 0 if plan.changes else 1
