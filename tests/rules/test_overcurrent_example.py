"""The worked example of README ("Overcurrent: a worked example"), on an invented site.

The figures README quotes are asserted here, each against its published source.
"""

from __future__ import annotations

from pathlib import Path

import pytest

from model.rules.checks import analyse
from model.storage.sites import load_site

SITE = Path(__file__).with_name("wrenfield-lodge.json")


@pytest.fixture(scope="module")
def result():
    return analyse(load_site(SITE))


def test_worked_example_findings(result) -> None:
    got = {(f.rule, f.nodes) for f in result.findings if "." in f.rule}
    assert ("breaking-capacity.too-low", ("f-old",)) in got  # BS 7671 434.5.1: 1 kA at 1.4 kA
    assert ("disconnection.zs-too-high", ("c-saw", "f-saw")) in got
    assert ("disconnection.zs-too-high", ("c-ws", "m-ws")) in got
    assert ("overcurrent.not-selective", ("cut", "m-sub")) in got
    assert ("disconnection.zs-not-shown", ("c-heat", "f-old")) in got


def test_worked_example_disconnection_rows(result) -> None:
    rows = {r.circuit: r for r in result.oc.disconnection}
    # IEC 60898-1 Table 7 test e, BS 7671 411.4.4: B32 0.95 × 230 / 160 = 1.37 Ω, 0.8 × = 1.09 Ω
    assert rows["c-ring"].zs_max_ohm == pytest.approx(1.366, abs=1e-3)
    assert rows["c-ring"].mark == "pass"
    # latest visit's cold 2.31 Ω wins over the node's 2.4 Ω; B16 limit 0.8 × 2.73 = 2.19 Ω
    assert rows["c-ws"].measured_ohm == 2.31 and rows["c-ws"].limit_ohm == pytest.approx(
        2.185, abs=1e-3
    )
    # IEC 60269-1 gates (from memory): 20 A Ia at 0.4 s between Imax(5 s) 85 A and Imax(0.1 s) 200 A
    assert rows["c-saw"].ia_a == pytest.approx(147.7, abs=0.1)
    assert rows["c-heat"].mark == "not known"  # BS 3036: no public points


def test_worked_example_breaking_and_pairs(result) -> None:
    marks = {b.device: b.mark for b in result.oc.breaking}
    # BS 7671 536.4.201: 6 kA breakers at 8 kA covered by the unit's 16 kA conditional rating
    assert marks == {"cut": "ok", "m-ring": "covered", "m-sub": "covered", "f-saw": "ok",
                     "m-ws": "ok", "f-old": "too low"}  # fmt: skip
    verdicts = {(p.up, p.down): p.verdict for p in result.oc_pairs}
    assert verdicts[("cut", "f-saw")] == "selective"  # IEC 60269-1 7.8: 80 A over 20 A gG
    assert verdicts[("cut", "m-ring")] == "partial"
    assert verdicts[("cut", "m-sub")] == "not-selective"
    assert verdicts[("m-sub", "f-old")] == "not-shown"
    ws = next(p for p in result.oc_pairs if (p.up, p.down) == ("m-sub", "m-ws"))
    assert ws.i_max_a == pytest.approx(1400.0)  # the visit's measured 1.4 kA wins over 1.2 kA
