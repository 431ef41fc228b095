"""Hand-made plans for the report tests, on the bundled Oak Lane sample and a small site.

Every plan here is made of real :class:`DeviceChange` values that
:func:`model.plan.changes.apply_changes` makes on a copy of the site; what
each one clears is checked against the real checks by the tests.  The
annex site is invented for these tests.
"""

from __future__ import annotations

import json
from pathlib import Path
from typing import Any

from model.plan.changes import (
    REMOVED,
    DeviceChange,
    FieldChange,
    Plan,
    Unresolved,
    finding_key,
)
from model.rules.findings import Analysis, Finding

ROOT = Path(__file__).resolve().parents[2]
OAK = ROOT / "sample_sites" / "oak-lane-house.json"

#: The change an electrician quotes for Oak Lane's RCCB 2 (Type AC where BS 7671 531.3.3
#: asks for Type A or better).
RC2_TEXT = (
    'replace RCCB "RCCB 2 (downstairs)" (30 mA, Type AC, general) with a 30 mA Type A general RCCB'
)
M1_TEXT = 'replace MCB "Lights MCB" (B6) with a 30 mA Type A RCBO B6'
RCA_S_TEXT = 'replace RCCB "Annex RCCB" (30 mA, Type A, general) with a 300 mA Type A type S RCCB'
RCA_GONE_TEXT = 'remove RCCB "Annex RCCB": each circuit below has its own 30 mA RCBO'
SELECTIVITY_REASON = (
    "a selectivity range the standard data cannot settle needs the maker's selectivity table"
)

#: A small domestic board (invented): a 30 mA general RCCB over a 30 mA RCBO for the
#: sockets and a plain MCB for the lights.
ANNEX: dict[str, Any] = {
    "format": "tripwise.site",
    "version": 2,
    "site": {
        "name": "Annex (invented test site)",
        "earthing": "TN-C-S",
        "u0_v": 230.0,
        "ze_ohm": 0.35,
        "rules": "uk-bs7671-2022",
        "domestic": True,
    },
    "nodes": [
        {"id": "supply", "kind": "origin", "label": "Supply"},
        {"id": "db", "kind": "board", "parent": "supply", "label": "Annex board"},
        {
            "id": "rcA",
            "kind": "rccb",
            "parent": "db",
            "label": "Annex RCCB",
            "idn_ma": 30,
            "waveform": "A",
            "rated_a": 63,
        },
        {
            "id": "rbS",
            "kind": "rcbo",
            "parent": "rcA",
            "label": "Sockets RCBO",
            "way": "1",
            "idn_ma": 30,
            "waveform": "A",
            "rated_a": 32,
            "curve": "B",
        },
        {
            "id": "c-s",
            "kind": "circuit",
            "parent": "rbS",
            "label": "Annex sockets",
            "use": "sockets",
            "rated_a": 32,
        },
        {
            "id": "m1",
            "kind": "mcb",
            "parent": "rcA",
            "label": "Lights MCB",
            "way": "2",
            "rated_a": 6,
            "curve": "B",
        },
        {
            "id": "c-l",
            "kind": "circuit",
            "parent": "m1",
            "label": "Annex lights",
            "use": "lighting",
            "rated_a": 6,
        },
    ],
    "visits": [],
}


def write_annex(tmp: Path) -> Path:
    path = tmp / "annex.json"
    path.write_text(json.dumps(ANNEX, indent=1), encoding="utf-8")
    return path


def _one(analysis: Analysis, rule: str, first: str) -> Finding:
    found = [f for f in analysis.findings if f.rule == rule and f.nodes[0] == first]
    assert len(found) == 1, (rule, first, [f.rule for f in analysis.findings])
    return found[0]


def oak_plan(analysis: Analysis) -> Plan:
    """Oak Lane: RCCB 2 Type AC -> Type A (clears its type.ac-unsuitable); the
    overcurrent pair MCB 9 / RCBO W3 left for the maker's table."""
    ac = _one(analysis, "type.ac-unsuitable", "rc2")
    change = DeviceChange(
        "rc2", (FieldChange("rc2", "waveform", "AC", "A"),), (finding_key(ac),), RC2_TEXT
    )
    left = [
        f
        for f in analysis.findings
        if f.rule == "overcurrent.not-selective" and f.nodes == ("m9", "rb3")
    ]
    return Plan([change], [Unresolved(left[0], SELECTIVITY_REASON)])


def _m1_rcbo(clears: tuple[Any, ...] = ()) -> DeviceChange:
    fields = (
        FieldChange("m1", "kind", "mcb", "rcbo"),
        FieldChange("m1", "idn_ma", None, 30),
        FieldChange("m1", "waveform", None, "A"),
    )
    return DeviceChange("m1", fields, clears, M1_TEXT)


def annex_delay_plan(analysis: Analysis) -> Plan:
    """Annex: the lights get their own 30 mA RCBO, the RCCB becomes 300 mA type S.

    For display only: it makes a new pair (the RCCB over the new RCBO) whose bands
    overlap, so a planner must not propose it; the study shows such a pair.
    """
    clears = tuple(
        finding_key(f)
        for f in analysis.findings
        if f.rule in ("cascade.ratio-below-3", "cascade.upstream-not-delayed")
    )
    rca = DeviceChange(
        "rcA",
        (FieldChange("rcA", "idn_ma", 30, 300), FieldChange("rcA", "delay", "general", "S")),
        clears,
        RCA_S_TEXT,
    )
    return Plan([_m1_rcbo(), rca])


def annex_removal_plan(analysis: Analysis) -> Plan:
    """Annex: the lights get their own 30 mA RCBO, then the RCCB (now only a duplicate) goes."""
    clears = tuple(finding_key(f) for f in analysis.findings if f.rule.startswith("cascade."))
    gone = DeviceChange("rcA", (FieldChange("rcA", REMOVED, "rccb", None),), clears, RCA_GONE_TEXT)
    return Plan([_m1_rcbo(), gone])
