"""``tripwise demo [NAME]``: copy a bundled invented sample site to the user's data folder and open it."""

from __future__ import annotations

import argparse
import os
import sys
from importlib import resources
from pathlib import Path

DEFAULT_DEMO = "oak-lane-house"


def data_dir() -> Path:
    base = os.environ.get("XDG_DATA_HOME") or str(Path.home() / ".local" / "share")
    return Path(base) / "tripwise" / "demo"


def sample_names() -> list[str]:
    root = resources.files("sample_sites")
    return sorted(p.name[:-5] for p in root.iterdir() if p.name.endswith(".json"))


def copy_sample(name: str, dest_dir: Path | None = None) -> Path:
    """Copy a bundled sample to a fresh file (never over an existing one) and return its path.

    Only a name from :func:`sample_names` is accepted (a path such as
    ``../../x`` is not a sample), so nothing outside the samples is read and
    nothing is written outside the demo folder.
    """
    if name not in sample_names():
        raise FileNotFoundError(name)
    src = resources.files("sample_sites") / f"{name}.json"
    if not src.is_file():
        raise FileNotFoundError(name)
    dest_dir = dest_dir or data_dir()
    dest_dir.mkdir(parents=True, exist_ok=True)
    n = 1
    while True:
        dest = dest_dir / (f"{name}.json" if n == 1 else f"{name}-{n}.json")
        try:
            with open(dest, "xb") as fh:
                fh.write(src.read_bytes())
            return dest
        except FileExistsError:
            n += 1


def register(sub: argparse._SubParsersAction) -> None:  # type: ignore[type-arg]
    p = sub.add_parser("demo", help="open a fresh copy of a bundled (invented) sample site")
    p.add_argument("name", nargs="?", default=DEFAULT_DEMO, help="sample name (see --list)")
    p.add_argument("--list", action="store_true", help="list the bundled samples")
    p.add_argument(
        "--check",
        action="store_true",
        help="print the check of the bundled sample instead of opening the app (copies nothing)",
    )
    p.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    if args.list:
        for n in sample_names():
            print(n)
        return 0
    if args.name not in sample_names():
        print(
            f"tripwise: no sample site {args.name!r}; choose from: {', '.join(sample_names())}",
            file=sys.stderr,
        )
        return 2
    if args.check:
        return _check_bundled(args.name)
    try:
        path = copy_sample(args.name)
    except FileNotFoundError:
        shown = args.name if len(args.name) <= 60 else args.name[:60] + "…"
        print(
            f"tripwise: no sample site {shown!r}; choose from: {', '.join(sample_names())}",
            file=sys.stderr,
        )
        return 2
    except OSError as exc:
        print(f"tripwise: cannot copy the demo site: {exc.strerror or exc}", file=sys.stderr)
        return 2
    written = f"Demo copy of the invented sample site written to {path}"
    print(written, file=sys.stderr)
    from tui.cli.commands.open import open_app

    return open_app(str(path), welcome=f"{written}. Your changes are saved there; q quits.")


def _check_bundled(name: str) -> int:
    """Check the bundled sample where it lies: it is only read, so nothing is copied or written."""
    from tui.cli.commands import check

    with resources.as_file(resources.files("sample_sites") / f"{name}.json") as path:
        print(f"Checking the bundled sample {path} (read only; nothing copied)", file=sys.stderr)
        return check.run(argparse.Namespace(site=str(path), json=False))
