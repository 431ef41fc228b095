"""Shared fixtures for the storage tests: generated sites on real files in tmp folders."""

from __future__ import annotations

from pathlib import Path

import pytest

from bench.gen_site import generate_site
from model.storage.sites import save_site


@pytest.fixture
def site_file(tmp_path: Path) -> Path:
    """A saved 120-node generated site."""
    p = tmp_path / "site.json"
    save_site(generate_site(120, seed=3), p)
    return p
