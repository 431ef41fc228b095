"""Shared fixtures for the app tests: copies of the bundled samples, never the originals."""

from __future__ import annotations

import shutil
from pathlib import Path

import pytest

from model.site.models import SiteFile
from model.storage.sites import load_site, save_site

SAMPLES = Path(__file__).resolve().parents[2] / "sample_sites"


@pytest.fixture
def oak_lane(tmp_path: Path) -> Path:
    """A fresh copy of the invented Oak Lane sample."""
    dest = tmp_path / "oak lane.json"
    shutil.copyfile(SAMPLES / "oak-lane-house.json", dest)
    return dest


@pytest.fixture
def oak_lane_no_visits(tmp_path: Path) -> Path:
    """The Oak Lane sample with no visits recorded yet."""
    site = load_site(SAMPLES / "oak-lane-house.json")
    dest = tmp_path / "oak-fresh.json"
    save_site(site.model_copy(update={"visits": []}), dest)
    return dest


@pytest.fixture
def site(oak_lane: Path) -> SiteFile:
    """The invented Oak Lane sample, loaded from a fresh copy."""
    return load_site(oak_lane)


@pytest.fixture(autouse=True)
def own_settings_dir(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> Path:
    """Every app test keeps its user settings in its own folder, never the real one."""
    folder = tmp_path / "user-config"
    monkeypatch.setattr("tui.settings.settings_dir", lambda: folder)
    return folder
