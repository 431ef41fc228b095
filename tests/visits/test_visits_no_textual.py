"""The visits, compare, merge and import modules are model code: they never load textual."""

from __future__ import annotations

import subprocess
import sys

from tests.visits_helpers import REPO


def test_visit_modules_do_not_import_textual() -> None:
    code = (
        "import sys, model.rules.checks.trend, model.visits.compare, model.visits.merge, model.visits.import_csv, "
        "model.site.history; print('textual' in sys.modules)"
    )
    p = subprocess.run([sys.executable, "-c", code], cwd=REPO, capture_output=True, text=True)
    assert p.returncode == 0, p.stderr
    assert p.stdout.strip() == "False"
