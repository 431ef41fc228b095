"""``tripwise new SITE``: start an empty site file (an origin and default site details) and open it."""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from model.site.models import SiteFile
from model.site.terms import FORMAT_NAME, FORMAT_VERSION


def empty_site(name: str) -> SiteFile:
    """A site with only its origin; earthing TN-C-S until the inspector says otherwise."""
    return SiteFile.model_validate(
        {
            "format": FORMAT_NAME,
            "version": FORMAT_VERSION,
            "site": {"name": name or "New site", "earthing": "TN-C-S"},
            "nodes": [{"id": "supply", "kind": "origin", "label": "Supply intake"}],
        }
    )


def register(sub: argparse._SubParsersAction) -> None:  # type: ignore[type-arg]
    p = sub.add_parser("new", help="start a new, empty site file and open it (never overwrites)")
    p.add_argument("site", help="path of the new site file (.json)")
    p.add_argument("--no-open", action="store_true", help="create the file only")
    p.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    from model.storage.session import EditSession

    path = Path(args.site)
    if path.exists():
        print(f"tripwise: {path} already exists; not overwritten", file=sys.stderr)
        return 2
    if not path.parent.is_dir():
        print(f"tripwise: cannot create {path}: no folder {path.parent}", file=sys.stderr)
        return 2
    try:
        session = EditSession.create(path, empty_site(path.stem))
    except FileExistsError:
        print(f"tripwise: {path} already exists; not overwritten", file=sys.stderr)
        return 2
    except OSError as exc:
        print(f"tripwise: cannot create {path}: {exc.strerror or exc}", file=sys.stderr)
        return 2
    session.close()
    print(f"New site written to {path}", file=sys.stderr)
    if args.no_open:
        return 0
    from tui.cli.commands.open import open_app

    return open_app(str(path))
