"""``tripwise --version`` and the package agree: both come from the installed metadata."""

from __future__ import annotations

from importlib.metadata import version

from sitekit import tripwise

import model


def test_version_comes_from_the_package_metadata() -> None:
    installed = version("tripwise")
    assert model.__version__ == installed
    out = tripwise("--version")
    assert out.returncode == 0
    assert out.stdout.strip() == f"tripwise {installed}"
