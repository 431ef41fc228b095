"""The command table: each command's module registers exactly that command, and a
command run loads only its own module (the start-up cost of the others is not paid)."""

from __future__ import annotations

import argparse
import importlib
import subprocess
import sys
from pathlib import Path

from tui.cli.main import COMMANDS, build_parser

ROOT = Path(__file__).resolve().parents[2]
SAMPLE = ROOT / "sample_sites" / "oak-lane-house.json"


def test_each_module_registers_the_command_it_is_listed_under() -> None:
    for name, module in COMMANDS.items():
        parser = argparse.ArgumentParser()
        sub = parser.add_subparsers(dest="command")
        importlib.import_module(module).register(sub)
        assert set(sub.choices) == {name}, module


def test_full_help_lists_every_command() -> None:
    parser = build_parser()
    assert set(parser._subparsers._group_actions[0].choices) == set(COMMANDS)  # type: ignore[union-attr]


def test_a_command_imports_only_its_own_module() -> None:
    code = (
        "import sys, io, contextlib\n"
        "from tui.cli.main import main, COMMANDS\n"
        "out = io.StringIO()\n"
        "with contextlib.redirect_stdout(out):\n"
        f"    rc = main(['check', {str(SAMPLE)!r}, '--json'])\n"
        "loaded = sorted(m for m in COMMANDS.values() if m in sys.modules)\n"
        "print(rc, ','.join(loaded), 'textual' in sys.modules)\n"
    )
    done = subprocess.run(
        [sys.executable, "-c", code], cwd=ROOT, capture_output=True, text=True, check=True
    )
    rc, loaded, textual = done.stdout.split()
    assert rc in {"0", "1"}
    assert loaded == "tui.cli.commands.check"
    assert textual == "False"


def test_a_site_path_alone_still_means_open(tmp_path: Path) -> None:
    # `tripwise SITE` is documented as `tripwise open SITE`; a missing file is refused
    # with exit 2 by the open command (so the shorthand reached it).
    done = subprocess.run(
        [sys.executable, "-m", "tui", str(tmp_path / "nope.json")],
        cwd=ROOT,
        capture_output=True,
        text=True,
    )
    assert done.returncode == 2, done.stderr
    assert "nope.json" in done.stderr
