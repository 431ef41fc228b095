"""``tripwise new SITE``: start an empty site file (an origin and default site details) and open it."""

from __future__ import annotations

import argparse
import os
import sys
from pathlib import Path

from model.site.models import SiteFile
from model.site.terms import FORMAT_NAME, FORMAT_VERSION
from tui.cli.commands.common import say


def empty_site(name: str) -> SiteFile:
    """A site with only its origin; earthing TN-C-S until the inspector says otherwise.

    The name comes from the file name: bytes that are not UTF-8 become U+FFFD and it is
    cut to the 200 characters a site name may have.
    """
    name = name.encode("utf-8", "surrogateescape").decode("utf-8", "replace").strip()[:200]
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
    from model.storage.files import SaveError, plain_os_error
    from model.storage.lock import LockHeld
    from model.storage.session import EditSession
    from model.storage.sidefiles import protected_reason

    path = Path(args.site)
    try:
        if os.path.islink(path) and not path.exists():
            say(
                f"cannot create {path}: it is a symbolic link to a file that does not exist; "
                "tripwise does not create a file at the far end of a link"
            )
            return 2
        if os.path.lexists(path):
            say(f"{path} already exists; not overwritten")
            return 2
        if not path.parent.is_dir():
            say(f"cannot create {path}: no folder {path.parent}")
            return 2
    except OSError as exc:
        say(f"cannot create {path}: {plain_os_error(exc)}")
        return 2
    refused = protected_reason(path, sites_too=False)
    if refused is not None:
        say(f"cannot create {path}: {refused}")
        return 2
    try:
        session = EditSession.create(path, empty_site(path.stem))
    except FileExistsError:
        say(f"{path} already exists; not overwritten")
        return 2
    except LockHeld as exc:
        say(f"cannot create {path}: {exc}")
        return 2
    except SaveError as exc:
        say(str(exc))
        return 2
    except OSError as exc:
        say(f"cannot create {path}: {plain_os_error(exc)}")
        return 2
    session.close()
    print(f"New site written to {path}", file=sys.stderr)
    if args.no_open:
        return 0
    from tui.cli.commands.open import open_app

    return open_app(str(path))
