"""The ``tripwise`` command line.

Each sub-command lives in its own module under ``tui/cli/commands`` and exposes
``register(subparsers)``; the module list below is the whole command set.
Exit codes are public: 0 nothing found / done, 1 findings (or conflicts),
2 the input could not be used (message on stderr, never a traceback).
"""

from __future__ import annotations

import argparse
import importlib
import os
import sys
from collections.abc import Sequence

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


class _ShowVersion(argparse.Action):
    """``--version``: the version is read from the package metadata only when asked for."""

    def __init__(self, option_strings: Sequence[str], dest: str, **kwargs: object) -> None:
        super().__init__(option_strings, dest, nargs=0, help="show the version and exit")

    def __call__(self, parser: argparse.ArgumentParser, *_: object) -> None:
        from model import __version__

        sys.stdout.write(f"tripwise {__version__}\n")
        parser.exit()


def build_parser(only: str | None = None) -> argparse.ArgumentParser:
    """The parser; with ``only``, just that command is registered (its module alone imported);
    with ``only=""`` none is (``tripwise --version`` needs no command)."""
    parser = argparse.ArgumentParser(
        prog="tripwise",
        description="Protection checks for inspectors (RCDs, fuses, breakers). Results support, and "
        "do not replace, your judgement and local wiring rules; nothing here is a certificate.",
    )
    parser.add_argument("--version", action=_ShowVersion)
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")
    if only == "":
        return parser
    for name in [COMMANDS[only]] if only in COMMANDS else COMMAND_MODULES:
        importlib.import_module(name).register(sub)
    return parser


def main(argv: Sequence[str] | None = None) -> int:
    """Run one command; whatever it prints is shown safely (:mod:`tui.cli.output`)."""
    # tripwise uses no pydantic plugins; without this, building the site's validators
    # first reads the entry points of every installed package to look for one.
    os.environ.setdefault("PYDANTIC_DISABLE_PLUGINS", "__all__")
    with guarded_output() as messages:
        return _run(argv, messages)


def _run(argv: Sequence[str] | None, messages: SafeStream) -> int:
    args_in = list(sys.argv[1:] if argv is None else argv)
    if args_in and not args_in[0].startswith("-") and args_in[0] not in COMMANDS:
        args_in = ["open", *args_in]
    if args_in == ["--version"]:
        parser = build_parser("")
    else:
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
