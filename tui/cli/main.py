"""The ``tripwise`` command line.

Each sub-command lives in its own module under ``tui/cli/commands`` and exposes
``register(subparsers)``; the module list below is the whole command set.
Exit codes are public: 0 nothing found / done, 1 findings (or conflicts),
2 the input could not be used (message on stderr, never a traceback).
"""

from __future__ import annotations

import argparse
import importlib
import sys
from collections.abc import Sequence

from model import __version__
from tui.cli.output import SafeStream, guarded_output

COMMAND_MODULES = [
    "tui.cli.commands.check",
    "tui.cli.commands.schema",
    "tui.cli.commands.demo",
    "tui.cli.commands.compare",
    "tui.cli.commands.merge",
    "tui.cli.commands.import_readings",
    "tui.cli.commands.report",
    "tui.cli.commands.print_",
    "tui.cli.commands.open",
    "tui.cli.commands.new",
]

EXIT_OK, EXIT_FINDINGS, EXIT_BAD_INPUT = 0, 1, 2


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="tripwise",
        description="Residual-current protection checks for inspectors. Results support, and "
        "do not replace, your judgement and local wiring rules; nothing here is a certificate.",
    )
    parser.add_argument("--version", action="version", version=f"tripwise {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")
    for name in COMMAND_MODULES:
        importlib.import_module(name).register(sub)
    return parser


def main(argv: Sequence[str] | None = None) -> int:
    """Run one command; whatever it prints is shown safely (:mod:`tui.cli.output`)."""
    with guarded_output() as messages:
        return _run(argv, messages)


def _run(argv: Sequence[str] | None, messages: SafeStream) -> int:
    args_in = list(sys.argv[1:] if argv is None else argv)
    parser = build_parser()
    known = set(parser._subparsers._group_actions[0].choices) if parser._subparsers else set()  # type: ignore[union-attr]
    if args_in and not args_in[0].startswith("-") and args_in[0] not in known:
        args_in = ["open", *args_in] if "open" in known else args_in
    try:
        args = parser.parse_args(args_in)
    except SystemExit as exc:
        code = exc.code if isinstance(exc.code, int) else EXIT_BAD_INPUT
        return EXIT_BAD_INPUT if code not in (0,) else 0
    if not getattr(args, "func", None):
        parser.print_help()
        return EXIT_OK
    messages.one_line = True  # from here on, each message on stderr is one line
    try:
        return int(args.func(args))
    except KeyboardInterrupt:
        return 130
    except BrokenPipeError:
        return EXIT_OK
