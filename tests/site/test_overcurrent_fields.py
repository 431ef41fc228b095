"""The overcurrent fields of the site file (format version 2, all optional)."""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from pydantic import ValidationError
from sitekit import build, circuit, node, site_doc

from model.site.fields import field_specs
from model.site.nodes import CbrNode, FuseNode
from model.storage.codec import dumps_site, parse_site
from model.storage.sites import load_site


def _doc() -> dict:
    return site_doc(
        [
            node("cut", "o", "fuse", rated_a=100.0, fuse_type="gG", breaking_ka=33.0),
            node("cu", "cut", "board", pscc_ka=3.2, conditional_ka=16.0),
            node(
                "m1",
                "cu",
                "mcb",
                rated_a=32.0,
                curve="B",
                breaking_ka=6.0,
                ia_a=160.0,
                maker_selectivity=[{"upstream": "cut", "limit_a": 2000.0, "source": "table 4"}],
                maker_backup=[{"upstream": "cut", "up_to_ka": 16.0}],
            ),
            circuit("c1", "m1", "sockets", zs_ohm=0.5),
        ],
        visits=[
            {
                "id": "v1",
                "date": "2026-11-30",
                "measurements": {"c1": {"zs_ohm": 0.61}, "cu": {"pscc_ka": 2.9, "warm": True}},
            }
        ],
        pscc_ka=None,
    )


def test_every_field_round_trips(tmp_path: Path) -> None:
    doc = _doc()
    doc["site"].pop("pscc_ka")
    site = parse_site(json.dumps(doc))
    again = parse_site(dumps_site(site))
    assert again == site
    m1 = again.node("m1")
    assert m1.breaking_ka == 6.0 and m1.ia_a == 160.0
    assert m1.maker_selectivity[0].limit_a == 2000.0
    assert again.node("cu").conditional_ka == 16.0
    assert again.visits[0].measurements["cu"].warm is True
    assert again.visits[0].measurements["c1"].warm is False  # cold unless marked


def test_version_1_file_keeps_its_meaning(tmp_path: Path) -> None:
    doc = {
        "format": "tripwise.site",
        "version": 1,
        "site": {"name": "Old", "earthing": "TN-S"},
        "nodes": [
            {"id": "o", "kind": "origin"},
            {"id": "f", "parent": "o", "kind": "fuse", "rated_a": 60},
        ],
    }
    p = tmp_path / "old.json"
    p.write_text(json.dumps(doc), encoding="utf-8")
    site = load_site(p)
    f = site.node("f")
    assert f.rated_a == 60 and f.fuse_type is None and f.breaking_ka is None
    assert f.maker_curve == [] and site.node("o").pscc_ka is None


@pytest.mark.parametrize(
    "change, words",
    [
        (
            {
                "maker_curve": [
                    {"i_a": 100, "min_s": 2, "max_s": 1},
                    {"i_a": 200, "min_s": 0.1, "max_s": 0.5},
                ]
            },
            "longer than",
        ),
        (
            {
                "maker_curve": [
                    {"i_a": 100, "min_s": 1, "max_s": 2},
                    {"i_a": 90, "min_s": 0.1, "max_s": 0.5},
                ]
            },
            "must rise",
        ),
        ({"maker_curve": [{"i_a": 100, "min_s": 1, "max_s": 2}]}, "two points"),
        ({"breaking_ka": "6"}, "number"),
        (
            {"maker_selectivity": [{"upstream": "c1", "limit_a": 100}]},
            "not an overcurrent device upstream",
        ),
    ],
)
def test_bad_overcurrent_data_is_refused_with_the_reason(change: dict, words: str) -> None:
    doc = _doc()
    doc["site"].pop("pscc_ka")
    doc["nodes"][3].update(change)
    with pytest.raises(ValidationError) as exc:
        build(doc["nodes"][1:], doc["visits"])
    assert words in str(exc.value)


def test_measurements_go_where_they_are_taken() -> None:
    doc = _doc()
    doc["site"].pop("pscc_ka")
    doc["visits"][0]["measurements"] = {"m1": {"zs_ohm": 0.3}, "c1": {"pscc_ka": 1.0}}
    with pytest.raises(ValidationError) as exc:
        build(doc["nodes"][1:], doc["visits"])
    text = str(exc.value)
    assert "zs_ohm is measured at a circuit, not a mcb" in text
    assert "pscc_ka is measured at a board or the origin, not a circuit" in text


def test_cbr_settings_are_checked() -> None:
    base = {"id": "b", "parent": "o", "kind": "cbr", "idn_ma": 300.0, "waveform": "A"}
    assert (
        CbrNode.model_validate({**base, "ir_a": 100.0, "isd_a": 800.0, "tsd_s": 0.2}).tsd_s == 0.2
    )
    with pytest.raises(ValidationError, match="below the setting ir_a"):
        CbrNode.model_validate({**base, "ir_a": 100.0, "ii_a": 50.0})
    with pytest.raises(ValidationError, match="only with a short-time pick-up"):
        CbrNode.model_validate({**base, "tsd_s": 0.2})


def test_forms_show_numbers_and_choices_but_not_the_makers_tables() -> None:
    names = {s.name: s for s in field_specs(FuseNode)}
    assert names["fuse_type"].choices == ("gG", "bs3036", "bs1361", "other")
    assert names["breaking_ka"].unit == "kA"
    assert "maker_curve" not in names and "maker_selectivity" not in names
