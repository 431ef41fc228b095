"""Re-judging one device after a reading equals the full analysis of the new site.

Each case changes one device's reading the way the editing session does
(``apply_op`` with a ``set-reading`` op), re-judges that device from the
analysis before, and holds the result to a full ``analyse`` of the new site:
findings (their order too), pairs, counts.  The values typed are chosen
against the published bands so that the findings really change.
"""

from __future__ import annotations

import dataclasses
import json

import pytest

from bench.gen_site import generate_site
from model.rules.checks import analyse
from model.rules.findings import Analysis
from model.rules.partial import rejudge_reading
from model.site.models import Reading, SiteFile
from model.site.ops import SetReading, UpsertNode, apply_op, validated_op
from model.site.terms import DID_NOT_TRIP
from tests.sitekit import SAMPLES

SAMPLE_NAMES = sorted(p.stem for p in SAMPLES.glob("*.json"))

#: Readings typed on a device, chosen against the bands they meet.
TYPED: list[tuple[str, Reading | None]] = [
    # IEC 61008-1 Table 1: a general device must trip within 300 ms at IΔn
    ("too slow at IΔn", Reading(x1_0=320.0, x1_180=25.0)),
    # IEC 61008-1 Table 1: no trip at IΔn is a failure (urgent in this tool)
    ("did not trip", Reading(x1_0=DID_NOT_TRIP)),
    # IEC 61008-1 Table 1: 40 ms at 5 IΔn for a general device; within band
    ("within band", Reading(x1_0=22.0, x1_180=24.0, x5_0=12.0, x5_180=13.0)),
    # IEC 61008-1: IΔno = 0.5 IΔn, the device must not trip at half its rating
    ("tripped at half", Reading(half_0=18.0, x1_0=25.0)),
    # common practice: a not-tested reason stands for the test with the reason
    ("not tested", Reading(not_tested="locked room (invented)")),
    ("removed", None),
]


def _set(site: SiteFile, device: str, reading: Reading | None) -> SiteFile:
    visit = site.latest_visit()
    assert visit is not None
    op = SetReading.model_construct(
        op="set-reading", visit=visit.id, device=device, reading=reading
    )
    return apply_op(site, validated_op(op))


def _load(name: str) -> SiteFile:
    return SiteFile.model_validate(json.loads((SAMPLES / f"{name}.json").read_text("utf-8")))


def _devices(a: Analysis, limit: int) -> list[str]:
    """Devices in series pairs first (their readings reach other findings), then the rest."""
    assert a.index is not None
    paired = [d for p in a.pairs for d in (p.down, p.up)]
    rest = list(a.index.rcds())
    return list(dict.fromkeys(paired + rest))[:limit]


def _assert_same(partial: Analysis | None, full: Analysis) -> None:
    assert partial is not None
    assert partial.findings == full.findings
    assert partial.pairs == full.pairs
    assert partial.counts() == full.counts()
    assert partial.worst_by_node() == full.worst_by_node()
    assert partial == full


@pytest.mark.parametrize("name", SAMPLE_NAMES)
def test_sample_sites_rejudged_equal_the_full_analysis(name: str) -> None:
    site = _load(name)
    if site.latest_visit() is None:
        pytest.skip("no visit to record on")
    before = analyse(site)
    changed = 0
    for dev in _devices(before, 8):
        for _, reading in TYPED:
            new = _set(site, dev, reading)
            full = analyse(new)
            _assert_same(rejudge_reading(new, before, dev), full)
            changed += full.findings != before.findings
    assert changed > 0  # the typed values did change what the checks say


@pytest.mark.parametrize(("n_nodes", "seed"), [(120, 1), (300, 2), (400, 7)])
def test_generated_sites_rejudged_equal_the_full_analysis(n_nodes: int, seed: int) -> None:
    site = generate_site(n_nodes, seed=seed)
    before = analyse(site)
    assert before.pairs, "a generated site has series pairs"
    for dev in _devices(before, 10):
        for _, reading in TYPED[:4]:
            new = _set(site, dev, reading)
            _assert_same(rejudge_reading(new, before, dev), analyse(new))


def test_a_chain_of_readings_rejudged_one_at_a_time() -> None:
    # the app re-judges after each value from the last result, never a full analysis between
    site = generate_site(300, seed=5)
    current = analyse(site)
    for i, dev in enumerate(_devices(current, 12)):
        _, reading = TYPED[i % len(TYPED)]
        site = _set(site, dev, reading)
        nxt = rejudge_reading(site, current, dev)
        assert nxt is not None
        current = nxt
    _assert_same(current, analyse(site))


def test_the_new_verdict_is_there_and_the_old_one_gone() -> None:
    site = _load("oak-lane-house")
    before = analyse(site)
    dev = _devices(before, 1)[0]
    slow = _set(site, dev, Reading(x1_0=320.0, x1_180=25.0))
    after = rejudge_reading(slow, before, dev)
    assert after is not None
    # IEC 61008-1 Table 1: 320 ms at IΔn is over the 300 ms of a general device
    assert any(f.rule == "reading.too-slow" and f.nodes == (dev,) for f in after.findings)
    good = _set(slow, dev, Reading(x1_0=22.0, x1_180=24.0, x5_0=12.0, x5_180=13.0))
    again = rejudge_reading(good, after, dev)
    assert again is not None
    # IEC 61008-1 Table 1: 22-24 ms at IΔn and 12-13 ms at 5 IΔn are within band
    assert not any(f.rule == "reading.too-slow" and f.nodes == (dev,) for f in again.findings)
    assert again.counts()["required"] < after.counts()["required"]


def test_the_analysis_before_is_not_enough_on_its_own() -> None:
    # what the equality tests stand on: a changed reading does change the full analysis,
    # so returning the analysis before (or leaving the pairs alone) would fail them
    site = generate_site(300, seed=2)
    before = analyse(site)
    stale = 0
    for dev in _devices(before, 10):
        new = _set(site, dev, Reading(x1_0=DID_NOT_TRIP))
        full = analyse(new)
        stale += before.findings != full.findings
        stale_pairs = dataclasses.replace(rejudge_reading(new, before, dev), pairs=before.pairs)  # type: ignore[arg-type]
        if full.pairs != before.pairs:
            assert stale_pairs != full
    assert stale == 10


def test_anything_but_one_device_s_readings_is_left_to_the_full_analysis() -> None:
    site = _load("oak-lane-house")
    before = analyse(site)
    dev = _devices(before, 1)[0]
    # a device's rating changed: not a reading, so no shortcut
    node = site.nodes[[n.id for n in site.nodes].index(dev)]
    bigger = node.model_copy(update={"idn_ma": 100.0})
    changed = apply_op(
        site, validated_op(UpsertNode.model_construct(op="upsert-node", node=bigger))
    )
    assert rejudge_reading(changed, before, dev) is None
    # two devices' readings changed: re-judging one of them would miss the other
    other = _devices(before, 2)[1]
    two = _set(_set(site, dev, Reading(x1_0=320.0)), other, Reading(x1_0=320.0))
    assert rejudge_reading(two, before, dev) is None
    # a node that is not a residual-current device has no readings to re-judge
    board = next(n.id for n in site.nodes if n.kind == "board")
    assert rejudge_reading(site, before, board) is None
