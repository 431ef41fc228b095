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

#: Every sub-command and the module that registers it.  Only the module of the
#: command being run is imported (a start-up cost the user would otherwise pay
#: for every command); ``tripwise --help`` and an unknown word load them all.
COMMANDS: dict[str, str] = {
    "check": "tui.cli.commands.check",
    "schema": "tui.cli.commands.schema",
    "demo": "tui.cli.commands.demo",
    "compare": "tui.cli.commands.compare",
    "merge": "tui.cli.commands.merge",
    "import-readings": "tui.cli.commands.import_readings",
    "report": "tui.cli.commands.report",
    "print": "tui.cli.commands.print_",
    "open": "tui.cli.commands.open",
    "new": "tui.cli.commands.new",
    "plan": "tui.cli.commands.plan",
}
COMMAND_MODULES = list(COMMANDS.values())

EXIT_OK, EXIT_FINDINGS, EXIT_BAD_INPUT = 0, 1, 2


def build_parser(only: str | None = None) -> argparse.ArgumentParser:
    """The parser; with ``only``, just that command is registered (its module alone imported)."""
    parser = argparse.ArgumentParser(
        prog="tripwise",
        description="Protection checks for inspectors (RCDs, fuses, breakers). Results support, and "
        "do not replace, your judgement and local wiring rules; nothing here is a certificate.",
    )
    parser.add_argument("--version", action="version", version=f"tripwise {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")
    for name in [COMMANDS[only]] if only in COMMANDS else COMMAND_MODULES:
        importlib.import_module(name).register(sub)
    return parser


def main(argv: Sequence[str] | None = None) -> int:
    """Run one command; whatever it prints is shown safely (:mod:`tui.cli.output`)."""
    with guarded_output() as messages:
        return _run(argv, messages)


def _run(argv: Sequence[str] | None, messages: SafeStream) -> int:
    args_in = list(sys.argv[1:] if argv is None else argv)
    if args_in and not args_in[0].startswith("-") and args_in[0] not in COMMANDS:
        args_in = ["open", *args_in]
    parser = build_parser(args_in[0] if args_in else None)
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
