"""Numbers in a site file are read the same way whether or not the text holds
something that needs the careful number reading (a too-long or overflowing number)."""

from __future__ import annotations

import json

import pytest

from bench.gen_site import generate_site
from model.site.models import site_to_dict
from model.storage.codec import SiteLoadError, parse_site


def _text(notes: str = "") -> str:
    d = site_to_dict(generate_site(60, seed=3))
    d["site"]["notes"] = notes
    return json.dumps(d, indent=2)


def test_text_that_only_looks_risky_reads_the_same() -> None:
    plain = parse_site(_text("fine"))
    # a note mentioning 1e400 and a 50-digit number: the careful path, same site
    risky = parse_site(_text("1e400 and " + "9" * 50))
    assert risky.nodes == plain.nodes and risky.visits == plain.visits
    assert risky.site.notes.startswith("1e400")


@pytest.mark.parametrize(
    ("number", "expect"),
    [
        ("1e999", "too large"),
        ("-1E+400", "too large"),
        ("1" * 41, "more than 40 digits"),
        ("1" * 400 + ".5", "too large"),
    ],
)
def test_numbers_that_cannot_be_held_are_refused(number: str, expect: str) -> None:
    text = _text().replace('"ze_ohm": 0.35', f'"ze_ohm": {number}', 1)
    assert number in text
    with pytest.raises(SiteLoadError, match=expect):
        parse_site(text)
