"""Crash safety for real: a child process edits and saves, and is killed with SIGKILL.

After every kill the site must open (replaying the journal), and every edit
the child reported as saved (through a pipe, only after the edit method had
returned) must be there.  The child is forked from the test process, so it
starts in a millisecond and hundreds of kills fit in a few seconds.
"""

from __future__ import annotations

import os
import random
import select
import signal
import time
from pathlib import Path

import pytest

import model.storage.session as session_mod
from bench.gen_site import generate_site
from model.site.models import Reading
from model.storage.files import backup_path
from model.storage.journal import journal_path
from model.storage.session import EditSession
from model.storage.sites import load_site, save_site
from tests.storage.helpers import rcd_ids

MIN_KILLS = 200
TIME_BUDGET_S = 45.0


def _child(path: Path, wfd: int, seed: int, first_seq: int, save_prob: float) -> None:
    """Edit forever, reporting each edit after it returned; never returns."""
    code = 0
    try:
        rng = random.Random(seed)
        sess = EditSession.open(path)
        ids = rcd_ids(sess.site)
        circuits = [n.id for n in sess.site.nodes if n.kind == "circuit"]
        visit = sess.site.visits[-1].id
        seq = first_seq
        while True:
            seq += 1
            r = rng.random()
            if r < save_prob:
                sess.save()
                os.write(wfd, b"saved\n")
            elif r < save_prob + 0.04:
                node = sess.site.node(rng.choice(circuits))
                sess.upsert_node(node.model_copy(update={"label": f"seq {seq}"}))
                os.write(wfd, f"node {node.id} {seq}\n".encode())
            else:
                dev = rng.choice(ids)
                reading = Reading(x1_0=float(1 + seq % 9000), x5_0=12.5, note=f"seq {seq}")
                sess.set_reading(visit, dev, reading)
                os.write(wfd, f"reading {dev} {seq}\n".encode())
    except BaseException as exc:  # reported to the parent, which fails the test
        code = 3
        try:
            os.write(wfd, f"ERR {type(exc).__name__}: {exc}\n".encode())
        finally:
            os._exit(code)
    os._exit(code)


def _seq_of(text: str) -> int:
    assert text.startswith("seq "), text
    return int(text[4:])


@pytest.mark.skipif(not hasattr(os, "fork"), reason="needs fork")
@pytest.mark.parametrize(
    ("save_prob", "compact_bytes", "min_kills"),
    [
        (0.06, None, MIN_KILLS),  # frequent full saves
        (0.01, 40_000, 100),  # long journals, compacted often (a 150-node site is ~35 kB)
    ],
)
def test_sigkill_at_random_moments_loses_nothing_reported(
    tmp_path: Path,
    monkeypatch: pytest.MonkeyPatch,
    save_prob: float,
    compact_bytes: int | None,
    min_kills: int,
) -> None:
    if compact_bytes is not None:
        monkeypatch.setattr(session_mod, "COMPACT_BYTES", compact_bytes)  # inherited by the child
    path = tmp_path / "van site.json"
    save_site(generate_site(150, seed=5), path)
    rng = random.Random(1234)
    latest_reading: dict[str, int] = {}
    latest_label: dict[str, int] = {}
    in_file_at_save: dict[str, int] = {}
    kills = 0
    saves_seen = 0
    replays = 0
    compactions = 0
    started = time.monotonic()
    while kills < min_kills or (kills < 2 * min_kills and time.monotonic() - started < 6):
        assert time.monotonic() - started < TIME_BUDGET_S, f"only {kills} kills in the time budget"
        rfd, wfd = os.pipe()
        first_seq = (kills + 1) * 1_000_000
        pid = os.fork()
        if pid == 0:  # pragma: no cover - the child
            os.close(rfd)
            _child(path, wfd, seed=kills, first_seq=first_seq, save_prob=save_prob)
        os.close(wfd)
        want = rng.choice([0, 0, 1, 2, 3, 5, 8, 13, 21, 34])
        buf = b""
        got = 0
        while got < want:
            ready, _, _ = select.select([rfd], [], [], 10.0)
            assert ready, "the child stopped reporting"
            chunk = os.read(rfd, 65536)
            assert chunk, "the child ended on its own"
            buf += chunk
            got = buf.count(b"\n")
        # The random kill moment (not a synchronisation): anywhere in the next few edits.
        time.sleep(rng.uniform(0, 0.004))
        os.kill(pid, signal.SIGKILL)
        _, status = os.waitpid(pid, 0)
        assert os.WIFSIGNALED(status), f"child exited by itself (status {status}): {buf[-300:]!r}"
        kills += 1
        while True:
            chunk = os.read(rfd, 65536)
            if not chunk:
                break
            buf += chunk
        os.close(rfd)
        for line in buf.decode().split("\n")[:-1]:  # a cut-off last report is not counted
            assert not line.startswith("ERR"), line
            words = line.split()
            if words[0] == "reading":
                latest_reading[words[1]] = max(latest_reading.get(words[1], 0), int(words[2]))
            elif words[0] == "node":
                latest_label[words[1]] = max(latest_label.get(words[1], 0), int(words[2]))
            else:
                saves_seen += 1
                in_file_at_save = dict(latest_reading)

        # the file itself is always a whole, valid site, and so is its backup;
        # it holds at least every reading reported before the last reported save
        on_disk = load_site(path).visits[-1].readings
        for dev, seq in in_file_at_save.items():
            assert _seq_of(on_disk[dev].note) >= seq, f"kill {kills}: saved {dev} not in the file"
        if backup_path(path).exists():
            load_site(backup_path(path))
        jp = journal_path(path)
        if jp.exists() and b'"replace-site"' in jp.read_bytes()[:200_000]:
            compactions += 1
        sess = EditSession.open(path)
        try:
            replays += bool(sess.recovered)
            readings = sess.site.visits[-1].readings
            for dev, seq in latest_reading.items():
                assert dev in readings, f"kill {kills}: reading for {dev} (seq {seq}) lost"
                assert _seq_of(readings[dev].note) >= seq, f"kill {kills}: {dev} went back"
            for node_id, seq in latest_label.items():
                assert _seq_of(sess.site.node(node_id).label) >= seq, f"kill {kills}: {node_id}"
        finally:
            sess.close()
    leftovers = [p.name for p in tmp_path.iterdir() if p.name.endswith(".tmp")]
    assert len(leftovers) <= 2, leftovers  # stray temporary files are cleaned on open
    assert kills >= min_kills
    assert saves_seen > 5 and replays > 50, (saves_seen, replays)  # both paths were exercised
    if compact_bytes is not None:
        assert compactions > 5, compactions
    assert latest_reading
    print(f"{kills} kills, {saves_seen} saves, {replays} replays, {compactions} compacted")
