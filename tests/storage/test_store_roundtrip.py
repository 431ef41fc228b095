"""Save then load gives the same site, and a second save gives the same bytes."""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from bench.gen_site import generate_site
from model.site.models import Reading
from model.site.terms import DID_NOT_TRIP, FORMAT_VERSION
from model.storage.codec import dumps_site
from model.storage.session import EditSession
from model.storage.sites import load_site, save_site
from tests.storage.helpers import rcd_ids

SIZES = [4, 5, 9, 17, 40, 120, 333, 1000]


@pytest.mark.parametrize("n_nodes", SIZES)
@pytest.mark.parametrize("seed", range(8))
def test_save_load_round_trip(tmp_path: Path, n_nodes: int, seed: int) -> None:
    site = generate_site(n_nodes, seed)
    p = tmp_path / "s.json"
    save_site(site, p)
    first = p.read_bytes()
    loaded = load_site(p)
    assert loaded == site
    save_site(loaded, p)
    assert p.read_bytes() == first
    # the canonical text is also what a fresh dump gives, and it is plain JSON
    assert dumps_site(loaded).encode("utf-8") == first
    assert json.loads(first)["version"] == FORMAT_VERSION


def test_generated_sites_have_requested_size_and_cascades() -> None:
    for n in (4, 50, 1000, 3000):
        site = generate_site(n, seed=n)
        assert len(site.nodes) == n
    site = generate_site(1000, seed=0)
    by_id = {n.id: n for n in site.nodes}

    def depth(node_id: str) -> int:
        d, cur = 0, by_id[node_id]
        while True:
            d += cur.kind in {"rccb", "rcbo", "srcd", "prcd", "cbr"}
            if cur.parent is None:
                return d
            cur = by_id[cur.parent]

    depths = {depth(i) for i in by_id}
    assert max(depths) in (3, 4, 5)
    assert {n.use for n in site.nodes if n.kind == "circuit"} >= {"sockets", "lighting", "shower"}
    assert site.visits and site.visits[-1].readings


trip = st.one_of(
    st.none(),
    st.just(DID_NOT_TRIP),
    st.floats(min_value=0.001, max_value=10_000, allow_nan=False, allow_infinity=False),
)
readings = st.builds(
    Reading,
    half_0=trip,
    x1_0=trip,
    x1_180=trip,
    x5_0=trip,
    ramp_ma=st.one_of(st.none(), st.floats(min_value=0.01, max_value=100_000)),
    button=st.sampled_from([None, "worked", "failed"]),
    waveform=st.sampled_from(["AC", "half-wave", "smooth-dc"]),
    note=st.text(max_size=40),
)


@settings(
    max_examples=60, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture]
)
@given(
    seed=st.integers(0, 50),
    edits=st.lists(st.tuples(st.integers(0, 10_000), st.one_of(st.none(), readings)), max_size=8),
)
def test_edits_round_trip_through_journal_and_file(
    tmp_path_factory: pytest.TempPathFactory, seed: int, edits: list[tuple[int, Reading | None]]
) -> None:
    p = tmp_path_factory.mktemp("rt") / "site ü.json"
    sess = EditSession.create(p, generate_site(60, seed))
    ids = rcd_ids(sess.site)
    visit = sess.site.visits[-1].id
    for k, reading in edits:
        sess.set_reading(visit, ids[k % len(ids)], reading)
    expected = sess.site
    sess.close()
    # replayed from the journal
    again = EditSession.open(p)
    assert again.site == expected
    assert len(again.recovered) == len(edits)
    again.save()
    again.close()
    # and written to the file
    assert load_site(p) == expected
    before = p.read_bytes()
    save_site(load_site(p), p)
    assert p.read_bytes() == before
