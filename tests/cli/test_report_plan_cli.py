"""``tripwise report``: the planned remedy is in the remedial list and the study by default,
and ``--no-plan`` leaves it out; exit codes as before."""

from __future__ import annotations

import shutil
from pathlib import Path

from sitekit import tripwise as _run

from model.plan.changes import PLAN_CAUTION

ROOT = Path(__file__).resolve().parents[2]


def _sample(tmp: Path) -> Path:
    dest = tmp / "oak.json"
    shutil.copyfile(ROOT / "sample_sites" / "oak-lane-house.json", dest)
    return dest


def test_report_carries_the_plan_unless_no_plan(tmp_path: Path) -> None:
    site = _sample(tmp_path)
    before = site.read_bytes()
    with_plan = tmp_path / "with.md"
    done = _run("report", str(site), "--format", "md", "--out", str(with_plan))
    assert done.returncode == 0, done.stderr
    text = with_plan.read_text(encoding="utf-8").replace("\\", "")
    assert "## Planned changes" in text and "**Planned change:**" in text
    assert PLAN_CAUTION in text
    without = tmp_path / "without.md"
    done = _run("report", str(site), "--format", "md", "--out", str(without), "--no-plan")
    assert done.returncode == 0, done.stderr
    plain = without.read_text(encoding="utf-8").replace("\\", "")
    assert "Planned change" not in plain and PLAN_CAUTION not in plain
    study = tmp_path / "study.md"
    done = _run("report", str(site), "--kind", "study", "--format", "md", "--out", str(study))
    assert done.returncode == 0, done.stderr
    assert "(not yet made)" in study.read_text(encoding="utf-8")
    assert site.read_bytes() == before  # the plan is never made on the site itself
