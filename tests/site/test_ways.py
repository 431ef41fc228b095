"""Ways: the board way a device sits in or a circuit leaves from, as inspectors number them.

Numbering a board's ways is common practice (a fact of the trade); the field is
optional text, so '3', '12' and 'L1-4' (a three-phase board's line and way) all fit.
"""

from __future__ import annotations

import json
from pathlib import Path
from typing import Any

import pytest

from model.site.fields import field_specs
from model.site.nodes import NODE_CLASSES, CircuitNode, McbNode, RcboNode
from model.storage.codec import SiteLoadError, dumps_site, parse_site

SAMPLE = Path(__file__).resolve().parents[2] / "sample_sites" / "oak-lane-house.json"


def _doc(version: int, **extra: Any) -> dict[str, Any]:
    return {
        "format": "tripwise.site",
        "version": version,
        "site": {"name": "Invented flat", "earthing": "TN-C-S", "ze_ohm": 0.35},
        "nodes": [
            {"id": "supply", "kind": "origin"},
            {"id": "cu", "parent": "supply", "kind": "board"},
            {
                "id": "rb1",
                "parent": "cu",
                "kind": "rcbo",
                "idn_ma": 30.0,
                "waveform": "A",
                "rated_a": 32.0,
                **extra,
            },
            {"id": "c1", "parent": "rb1", "kind": "circuit", "use": "sockets"},
        ],
        "visits": [],
    }


def test_a_version_1_file_means_what_it_meant() -> None:
    site = parse_site(json.dumps(_doc(1)))
    assert all(getattr(n, "way", "") == "" for n in site.nodes)
    # no way given: nothing is written for it
    assert '"way"' not in dumps_site(site)


@pytest.mark.parametrize("way", ["3", "12", "L1-4", "3+4", "TP 2"])
def test_a_way_is_kept_exactly_and_round_trips(way: str) -> None:
    site = parse_site(json.dumps(_doc(2, way=way)))
    assert site.node("rb1").way == way  # type: ignore[union-attr]
    again = parse_site(dumps_site(site))
    assert again.node("rb1").way == way  # type: ignore[union-attr]


@pytest.mark.parametrize(
    ("way", "words"),
    [
        ("3\n4", "one line"),
        (" 3", "begin or end with a space"),
        ("way number thirteen", "at most 12"),
        (3, "string"),  # a JSON number is not a way: the file says "3"
    ],
)
def test_a_bad_way_is_refused_with_the_reason(way: object, words: str) -> None:
    with pytest.raises(SiteLoadError) as info:
        parse_site(json.dumps(_doc(2, way=way)))
    assert "rb1" in str(info.value) or "way" in str(info.value)
    assert words in str(info.value).lower() or words in str(info.value)


def test_ways_exist_on_devices_in_a_board_and_circuits_only() -> None:
    with_way = {k for k, cls in NODE_CLASSES.items() if "way" in cls.model_fields}
    assert with_way == {"switch", "fuse", "mcb", "rccb", "rcbo", "cbr", "rcm", "circuit"}
    # a socket-outlet or portable RCD is not in a board's way: refused, not ignored
    doc = _doc(2)
    doc["nodes"].append(
        {"id": "s1", "parent": "c1", "kind": "srcd", "idn_ma": 30.0, "waveform": "A", "way": "4"}
    )
    with pytest.raises(SiteLoadError):
        parse_site(json.dumps(doc))


def test_forms_show_the_way_after_the_label() -> None:
    for cls in (McbNode, RcboNode, CircuitNode):
        names = [s.name for s in field_specs(cls)]
        assert names[:3] == ["id", "label", "way"], cls.__name__
        spec = next(s for s in field_specs(cls) if s.name == "way")
        assert spec.title == "Way" and spec.kind == "text" and spec.default == ""


def test_the_demo_sample_numbers_its_ways() -> None:
    site = parse_site(SAMPLE.read_bytes())
    assert site.node("m5").way == "6"  # type: ignore[union-attr]
    assert site.node("rb3").way == "3"  # type: ignore[union-attr]
