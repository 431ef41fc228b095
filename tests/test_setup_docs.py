"""README's set-up lines: two commands, Python 3.11 and a virtual environment, the same
test command as CI, and pytest settings that keep the closing summary line."""

from __future__ import annotations

import re
import tomllib
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


def _setup_commands() -> list[str]:
    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    head = readme.split("\n## ", 1)[0]  # before the first section
    return [b.strip() for b in re.findall(r"```sh\n(.*?)```", head, flags=re.S)]


def test_two_setup_commands_in_a_virtual_environment() -> None:
    run, test = _setup_commands()  # exactly two
    for cmd in (run, test):
        assert "\n" not in cmd and cmd.startswith("python3 -m venv .venv && . .venv/bin/activate")
    assert run.endswith("tripwise demo")
    assert test.endswith("python -m pytest")
    head = (ROOT / "README.md").read_text(encoding="utf-8").split("\n## ", 1)[0]
    assert "Python 3.11 or newer" in head and "`q` saves and quits" in head


def test_ci_runs_the_readme_test_command() -> None:
    ci = (ROOT / ".ci" / "run").read_text(encoding="utf-8").strip().splitlines()
    test = _setup_commands()[1]
    assert ci[-1] == test.rsplit("&& ", 1)[1]
    assert "-e '.[test]'" in test and any("-e '.[test]'" in line for line in ci)


def test_pytest_settings_keep_the_summary_and_set_the_loop_scope() -> None:
    opts = tomllib.loads((ROOT / "pyproject.toml").read_text(encoding="utf-8"))
    ini = opts["tool"]["pytest"]["ini_options"]
    assert ini["asyncio_default_fixture_loop_scope"] == "function"
    assert "-q" not in ini.get("addopts", "").split()
    assert "platformdirs" in " ".join(opts["project"]["dependencies"])
