"""model/ must run without the terminal interface."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


def test_model_does_not_import_textual() -> None:
    code = (
        "import sys, pkgutil, importlib, model\n"
        "for m in pkgutil.walk_packages(model.__path__, 'model.'):\n"
        "    importlib.import_module(m.name)\n"
        "bad = sorted(k for k in sys.modules if k == 'textual' or k.startswith('textual.') or k == 'tui' or k.startswith('tui.'))\n"
        "print(','.join(bad))\n"
    )
    out = subprocess.run(
        [sys.executable, "-c", code], cwd=ROOT, capture_output=True, text=True, check=True
    )
    assert out.stdout.strip() == ""
