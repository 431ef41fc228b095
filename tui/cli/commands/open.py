"""``tripwise open SITE [--read-only]`` (or just ``tripwise SITE``): open the app on a site file."""

from __future__ import annotations

import argparse
import sys

from model.storage.codec import SiteLoadError


def register(sub: argparse._SubParsersAction) -> None:  # type: ignore[type-arg]
    p = sub.add_parser("open", help="open the app on a site file (also: tripwise SITE)")
    p.add_argument("site", help="path to the site file (.json)")
    p.add_argument("--read-only", action="store_true", help="look only; change nothing")
    p.set_defaults(func=run)


def open_app(path: str, *, read_only: bool = False, welcome: str | None = None) -> int:
    """Run the app on a site file; exit code 2 with one line on stderr when it cannot be opened.

    ``welcome`` is shown in the app as it opens (the demo says where its copy is).
    """
    from tui.app.shell import make_app

    try:
        app = make_app(path, read_only=read_only, welcome=welcome)
    except SiteLoadError as exc:
        print(f"tripwise: cannot open {exc}", file=sys.stderr)
        return 2
    except OSError as exc:
        print(f"tripwise: cannot open {path}: {exc.strerror or exc}", file=sys.stderr)
        return 2
    try:
        app.run()
    finally:
        if app.session is not None:
            app.session.close()  # releases the lock; unsaved edits stay in the journal
    if app.return_code:
        return int(app.return_code)
    return 0


def run(args: argparse.Namespace) -> int:
    return open_app(args.site, read_only=args.read_only)
