"""``tripwise merge BASE.json OTHER.json [--out FILE] [--take ours|theirs] [--force] [--json]``.

Merges two copies of one site edited apart (two laptops on one site).  Both
inputs are only read.  The result is written to ``--out`` (default
``<base stem>-merged.json`` beside BASE) as the app saves a site (editing
lock, atomic save), never over an existing file unless ``--force`` is given,
never over either input, and never over a site open in the app.
Exit codes: 0 merged (clean, or every conflict settled by ``--take``),
1 conflicts listed and nothing written, 2 bad input.
"""

from __future__ import annotations

import argparse
import json
import os
import sys
from pathlib import Path
from typing import Any

from model.rules.findings import CAUTION
from model.storage.files import plain_os_error
from model.visits.merge import merge_sites
from model.visits.merge_conflicts import Conflict, MergeError, version_text
from model.visits.merge_result import MergeResult
from tui.cli.commands.common import load_or_report, save_or_report, say


def register(sub: argparse._SubParsersAction) -> None:  # type: ignore[type-arg]
    p = sub.add_parser(
        "merge",
        help="merge two copies of one site edited apart (exit 0 merged, 1 conflicts, 2 bad input)",
        description="Merge two copies of one site. BASE is 'ours', OTHER is 'theirs'; both are "
        "left untouched. Exit codes: 0 merged, 1 conflicts left unmerged (nothing written), "
        "2 bad input.",
    )
    p.add_argument("base", help="our copy of the site file (.json)")
    p.add_argument("other", help="their copy of the same site (.json)")
    p.add_argument(
        "--out", help="where to write the merged site (default: <BASE stem>-merged.json)"
    )
    p.add_argument(
        "--take",
        choices=("ours", "theirs"),
        help="settle every conflict by taking this copy's version",
    )
    p.add_argument("--force", action="store_true", help="allow --out to replace an existing file")
    p.add_argument("--json", action="store_true", help="print one JSON object and nothing else")
    p.set_defaults(func=run)


def default_out(base: str) -> Path:
    b = Path(base)
    return b.with_name(f"{b.stem}-merged.json")


def _same_file(a: Path, b: Path) -> bool:
    try:
        return a.resolve() == b.resolve() or (a.exists() and b.exists() and a.samefile(b))
    except (OSError, RuntimeError):  # RuntimeError: a symbolic link loop
        return False


def conflict_lines(c: Conflict) -> list[str]:
    lines = [f"  [{c.id}] {c.what}", f"      where: {c.where}"]
    for name, a, b in c.differences():
        lines.append(f"      {name}: ours {version_text(a, 70)}  |  theirs {version_text(b, 70)}")
    return lines


def _emit_json(doc: dict[str, Any]) -> None:
    json.dump(doc, sys.stdout, ensure_ascii=False, indent=2)
    sys.stdout.write("\n")


def run(args: argparse.Namespace) -> int:
    out = Path(args.out) if args.out else default_out(args.base)
    for src in (args.base, args.other):
        if _same_file(out, Path(src)):
            print(
                f"tripwise: --out {out} is one of the inputs; inputs are never overwritten",
                file=sys.stderr,
            )
            return 2
    try:
        is_dir, exists = out.is_dir(), os.path.lexists(out)
    except OSError as exc:
        say(f"cannot write {out}: {plain_os_error(exc)}")
        return 2
    if is_dir:
        print(f"tripwise: --out {out} is a folder, not a file", file=sys.stderr)
        return 2
    if exists and not args.force:
        print(
            f"tripwise: {out} already exists; choose another --out or add --force", file=sys.stderr
        )
        return 2
    base = load_or_report(args.base)
    if base is None:
        return 2
    other = load_or_report(args.other)
    if other is None:
        return 2
    result: MergeResult = merge_sites(base, other)
    doc: dict[str, Any] = {
        "base": args.base,
        "other": args.other,
        "out": str(out),
        **result.as_json(),
        "taken": None,
        "written": False,
    }
    if result.conflicts and args.take is None:
        if args.json:
            _emit_json(doc)
        else:
            print(
                f"{len(result.conflicts)} conflict(s) between {args.base} (ours) and "
                f"{args.other} (theirs); nothing written:"
            )
            for c in result.conflicts:
                print("\n".join(conflict_lines(c)))
            print("Settle them in the app, or run again with --take ours or --take theirs.")
        return 1
    try:
        merged = result.resolve(args.take or "ours")
    except MergeError as exc:
        if args.json:
            _emit_json({**doc, "error": str(exc)})
        else:
            print(f"tripwise: {exc}; nothing written", file=sys.stderr)
        return 1
    if save_or_report(out, merged, replace=args.force) != 0:
        return 2
    s = result.summary()
    doc.update(taken=args.take if result.conflicts else None, written=True)
    if args.json:
        _emit_json(doc)
        return 0
    if result.conflicts:
        print(
            f"{len(result.conflicts)} conflict(s) settled by taking {args.take} "
            f"({'BASE' if args.take == 'ours' else 'OTHER'}) for each:"
        )
        for c in result.conflicts:
            print("\n".join(conflict_lines(c)))
    else:
        print("Merged with no conflicts.")
    print(
        f"Readings: {s['ours_values']} value(s) from ours, {s['theirs_values']} from theirs; "
        f"{s['in_conflicts']} were in conflicts (listed above)."
    )
    print(f"Written to {out}; {args.base} and {args.other} are unchanged.")
    print(f"Caution: {CAUTION}")
    return 0
