"""``tripwise compare`` text in the trade's words: tests by name, devices and findings by
label; ``--json`` keeps its keys and ids (a public interface)."""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

from model.storage.sites import load_site
from model.visits.compare import compare_visits
from model.visits.compare_words import compare_text

SAMPLE = Path(__file__).resolve().parents[2] / "sample_sites" / "oak-lane-house.json"


def test_text_names_tests_and_devices_as_the_trade_does() -> None:
    text = compare_text(compare_visits(load_site(SAMPLE)))
    # IEC 61008-1 names the tests by multiples of IΔn; the phase angle of the test current
    assert "1 × IΔn, 180°" in text and "½ × IΔn, 0°" in text and "ramp test" in text
    assert "x1_180" not in text and "half_0" not in text and "ramp_ma" not in text
    assert "RCBO W3 — tested on the later visit only" in text
    assert "(rc2)" not in text and "reading.too-slow" not in text
    assert "Not tested on either visit: RCBO W2" in text
    assert "REQUIRED    RCCB 2 (downstairs): 1 × IΔn test 312 ms is slower" in text
    assert max(len(line) for line in text.splitlines()[:-1]) <= 100


def test_json_keeps_its_keys(tmp_path: Path) -> None:
    out = subprocess.run(
        [sys.executable, "-m", "tui", "compare", str(SAMPLE), "--json"],
        capture_output=True,
        text=True,
        check=True,
        cwd=Path(__file__).resolve().parents[2],
    ).stdout
    doc = json.loads(out)
    rc2 = next(d for d in doc["devices"] if d["device"] == "rc2")
    assert {v["key"] for v in rc2["values"]} >= {"x1_180", "half_0", "ramp_ma"}
    assert any(f["rule"] == "reading.too-slow" for f in doc["findings"]["new"])


def test_a_further_waveforms_key_is_worded_with_its_waveform() -> None:
    from model.visits.compare import ValueChange
    from model.visits.compare_words import value_row

    # common practice: a test is named by its multiple of IΔn, phase angle and waveform
    row = value_row("rc1", ValueChange("x1_0 (half-wave)", 22.0, 27.0, 5.0, 22.7, "ms"))
    assert row.test == "1 × IΔn, 0° (half-wave)"
    assert row.old == "22 ms" and row.new == "27 ms"
