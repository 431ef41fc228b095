"""Every read command over generated hostile site files and CSVs (seeded, time-bounded).

The generator and the checks are ``bench/fuzz_commands.py``; a longer run is
``python bench/fuzz_commands.py 3000``.  Commands run through the command
line's entry point (``tui.cli.main.main``) in this process, which is what
``python -m tui`` calls; the subprocess path is covered by the other CLI tests.
"""

from __future__ import annotations

import pytest

from bench.fuzz_commands import Tally, fuzz

#: Seconds the run may take; it stops at the first case past this (well under a minute).
BUDGET_S = 20.0


@pytest.fixture(scope="module")
def tally() -> Tally:
    return fuzz(400, seed=11, budget_s=BUDGET_S)


def test_enough_was_run(tally: Tally) -> None:
    assert tally.files >= 10 and tally.runs >= 10 * 11


@pytest.mark.parametrize(
    "kind",
    ["traceback", "exit code", "stderr lines", "silent refusal", "input changed", "stray files"],
)
def test_no_failure_of_this_kind(tally: Tally, kind: str) -> None:
    assert tally.failures[kind] == 0, tally.examples.get(kind)


@pytest.mark.parametrize("kind", ["stderr length", "stderr control"])
def test_stderr_is_short_and_clean(tally: Tally, kind: str) -> None:
    assert tally.failures[kind] == 0, tally.examples.get(kind)
