"""App speed, measured in-process with Textual's test driver (figures printed; not a test).

1. Start-up: from ``make_app(SITE)`` to the first paint of the whole tree of a
   generated 500-node site (every node in the tree, laid out, the editing session
   ours), against a bare Textual app with one Tree and one DataTable filled from
   the same file (``bench/bare_app.py``), run by run in the same process.  Goal:
   ratio <= 1.5.  The session is closed and garbage collected between runs.
2. Keystroke to drawn verdict while typing readings on a 2,000-node site: from a
   key sent to the app to the first terminal update that holds the reading pad as
   that key left it, with its verdict (the too-slow flag where the value is over
   the band, checked in the drawn line).  Keys 80-100 ms apart (a person typing),
   and each key once the app is idle.  The first digit after Enter is reported
   apart: Enter records the value (journal, re-judging, save).  Goal: median
   <= 16 ms, p90 <= 33 ms.

Run: python bench/bench_tui.py [--repeat N]
"""

from __future__ import annotations

import argparse
import asyncio
import contextlib
import gc
import random
import statistics
import sys
import tempfile
import time
from pathlib import Path
from typing import Any

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))
sys.path.insert(0, str(Path(__file__).resolve().parent))

from bare_app import BareApp  # type: ignore[import-not-found]  # noqa: E402
from gen_site import generate_site  # type: ignore[import-not-found]  # noqa: E402
from textual import events  # noqa: E402
from textual.widgets import Tree  # noqa: E402
from textual.worker import WorkerCancelled  # noqa: E402

from model.storage.sites import save_site  # noqa: E402
from tui.app.shell import make_app  # noqa: E402
from tui.screens.readings import ReadingScreen  # noqa: E402


def _tree_size(tree: Tree[Any]) -> int:
    """Nodes held by a Tree widget (its root included)."""
    count, stack = 0, [tree.root]
    while stack:
        node = stack.pop()
        count += 1
        stack.extend(node.children)
    return count


async def _startup_app(path: Path, n_nodes: int) -> tuple[float, float]:
    """(seconds to the first paint of the whole tree, seconds until the app is idle)."""
    gc.collect()
    t0 = time.perf_counter()
    app = make_app(path)
    painted = _count_paints(app, n_nodes)
    try:
        async with app.run_test(size=(160, 45)) as pilot:
            await pilot.pause()
            idle = time.perf_counter() - t0
            # What was measured is the real editing screen of this very site: the
            # session is ours (not the "open elsewhere" dialog of a session left
            # open by an earlier run), and the tree holds every node, laid out.
            assert app.session is not None and not app.session.read_only, "no editing session"
            assert app.screen is app.screen_stack[0], f"a dialog is up: {app.screen!r}"
            assert _tree_size(app.main.tree) == n_nodes, _tree_size(app.main.tree)
            assert len(app.main.tree._tree_lines) == n_nodes  # every node on its line
            assert painted, "the tree was never drawn"
            elapsed = painted[0] - t0  # the first update that drew the whole tree
            await app.settle()
    finally:
        if app.session is not None:
            app.session.close()
    return elapsed, idle


async def _startup_bare(path: Path, n_nodes: int) -> tuple[float, float]:
    gc.collect()
    t0 = time.perf_counter()
    app = BareApp(path)
    painted = _count_paints(app, n_nodes)
    async with app.run_test(size=(160, 45)) as pilot:
        await pilot.pause()
        idle = time.perf_counter() - t0
        assert _tree_size(app.query_one(Tree)) == n_nodes
        assert len(app.query_one(Tree)._tree_lines) == n_nodes
        assert painted, "the tree was never drawn"
        elapsed = painted[0] - t0
    return elapsed, idle


def _count_paints(app: Any, n_lines: int) -> list[float]:
    """The times of the app's terminal updates that drew a whole tree (headless: composed,
    not written): updates made before the tree was filled and laid out do not count."""
    times: list[float] = []
    real = app._display

    def display(screen: Any, renderable: Any) -> None:
        if renderable is not None:
            trees = [w for w in screen.query(Tree) if w.region]
            lines = trees[0]._tree_lines_cached if trees else None
            if lines is not None and len(lines) == n_lines:
                times.append(time.perf_counter())
        real(screen, renderable)

    app._display = display
    return times


#: One round of typing on the reading form: (key, field it lands in, value there after it,
#: measured).  ``{d}``/``{e}`` are digits that change every round, so each Enter records.
ROUND: list[tuple[str, str, str, bool]] = [
    ("3", "x1_0", "3", True),
    ("2", "x1_0", "32", True),
    ("{d}", "x1_0", "32{d}", True),
    ("enter", "x1_180", "", False),
    ("2", "x1_180", "2", True),  # the first key after a value is recorded
    ("{e}", "x1_180", "2{e}", True),
    ("enter", "x5_0", "", False),
    ("up", "x1_180", "", False),
    ("up", "x1_0", "", False),
]


def _stats(ms: list[float]) -> str:
    s = sorted(ms)
    p90 = s[min(len(s) - 1, int(round(0.9 * (len(s) - 1))))]
    return (
        f"median {statistics.median(s):.1f} ms, p90 {p90:.1f} ms, "
        f"{s[0]:.1f}-{s[-1]:.1f} ms, n={len(s)}"
    )


def _key_event(key: str) -> events.Key:
    char = {"enter": "\r", "up": None}.get(key, key)
    event = events.Key(key, char)
    return event


async def _app_idle(app: Any, pilot: Any) -> None:
    """Until nothing is pending: no checks or save waiting on a timer or running."""
    for _ in range(400):
        for worker in list(app.workers):
            with contextlib.suppress(WorkerCancelled):  # a newer run of the checks took over
                await worker.wait()
        await pilot.pause()
        if app._analysis_timer is None and app._save_timer is None and not app.workers:
            break
        await asyncio.sleep(0.05)
    await asyncio.sleep(0.05)


async def _typing(path: Path, rounds: int, mode: str, seed: int = 1) -> dict[str, list[float]]:
    """Type ``rounds`` rounds of readings into the form and time each key to its drawn verdict.

    ``mode`` "realistic": keys 80-100 ms apart whatever the app is doing; "idle": each
    key once the app has nothing pending.  A key is drawn when the terminal update
    after it holds the pad as that key left it, with the verdict of the checks.
    """
    rng = random.Random(seed)
    app = make_app(path)
    renders: list[tuple[float, str, str, str | None, str]] = []
    displays: list[tuple[float, int]] = []
    sent: list[tuple[float, str, str, bool, bool]] = []
    recorded: list[float] = []
    try:
        async with app.run_test(size=(160, 45)) as pilot:
            await app.settle()
            general = [d for d in app.index.rcds() if app.index.by_id[d].delay == "general"]
            app.main.select(general[0])
            await pilot.press("r")
            screen = app.screen
            assert isinstance(screen, ReadingScreen), screen
            assert len(app.index.order) == 2000
            pad = screen.pad
            real_line, real_display = pad.render_line, app._display
            rows = [name for name, _, _ in pad.fields]

            def timed_line(y: int) -> Any:
                out = real_line(y)
                name = pad.current
                if 0 <= y < len(rows) and rows[y] == name:
                    renders.append(
                        (
                            time.perf_counter(),
                            name,
                            pad.values[name],
                            screen.flags.get(name),
                            out.text,
                        )
                    )
                return out

            def timed_display(scr: Any, renderable: Any) -> None:
                if renderable is not None:
                    displays.append((time.perf_counter(), len(renders)))
                real_display(scr, renderable)

            pad.render_line = timed_line  # type: ignore[method-assign]
            app._display = timed_display  # type: ignore[method-assign]
            pad.go("x1_0")
            await _app_idle(app, pilot)
            after_enter = False
            for i in range(rounds):
                d, e = str(i % 10), str((i + 3) % 10)
                for key, field, value, measured in ROUND:
                    key, value = key.format(d=d, e=e), value.format(d=d, e=e)
                    if mode == "idle":
                        await _app_idle(app, pilot)
                    else:
                        await asyncio.sleep(rng.uniform(0.080, 0.100))
                    t0 = time.perf_counter()
                    app._driver.send_message(_key_event(key))
                    sent.append((t0, field, value, measured, after_enter))
                    after_enter = key == "enter"
                    if key == "enter":
                        recorded.append(t0)
            await _app_idle(app, pilot)
            # every value typed is in the session, as typed (the last round's x1_180)
            visit = app.site.latest_visit()
            last = visit.readings[screen.device_id] if visit is not None else None
            want = float(f"2{(rounds - 1 + 3) % 10}")
            assert last is not None and last.x1_180 == want, (last, want)
    finally:
        if app.session is not None:
            app.session.close()
    out: dict[str, list[float]] = {"all": [], "after_enter": [], "flagged": []}
    subsumed = 0
    for k, (t0, field, value, measured, after_enter) in enumerate(sent):
        if not measured:
            continue
        drawn, exact = _drawn(k, sent, renders, displays)
        assert drawn is not None, f"key {k} ({field}={value!r}) was never drawn"
        ms = (drawn - t0) * 1000
        if exact is None:  # the next key came before a paint: drawn with the next key's state
            subsumed += 1
        else:
            _, _, _, flag, line = exact
            # IEC 61008-1 Table 1: 320-329 ms at IΔn is over the 300 ms of a general
            # device; 2-32 ms and 20-29 ms are within it
            too_slow = field == "x1_0" and len(value) == 3
            assert (flag == "reading.too-slow") == too_slow, (field, value, flag)
            assert ("too slow" in line) == too_slow, line
            if too_slow:
                out["flagged"].append(ms)
        out["all"].append(ms)
        if after_enter:
            out["after_enter"].append(ms)
    out["subsumed"] = [float(subsumed)]
    return out


def _drawn(
    k: int,
    sent: list[tuple[float, str, str, bool, bool]],
    renders: list[tuple[float, str, str, str | None, str]],
    displays: list[tuple[float, int]],
) -> tuple[float | None, tuple[float, str, str, str | None, str] | None]:
    """(when key ``k`` was first drawn, the pad's render then if it shows exactly key ``k``).

    Drawn: the first terminal update after the key whose pad shows the state that key
    left, or a later key's (keys not yet handled are drawn together).
    """
    t0 = sent[k][0]

    def shows(render: tuple[float, str, str, str | None, str], j: int) -> bool:
        _, field, value, measured, _ = sent[j]
        return render[1] == field and (not measured or render[2] == value)

    for t_disp, n_renders in displays:
        if t_disp <= t0 or n_renders == 0:
            continue
        render = renders[n_renders - 1]
        if render[0] <= t0:
            continue
        if shows(render, k):
            return t_disp, render
        later = [j for j in range(k + 1, len(sent)) if sent[j][0] < render[0]]
        if any(shows(render, j) for j in later):
            return t_disp, None
    return None, None


async def main(repeat: int, part: str) -> None:
    with tempfile.TemporaryDirectory() as tmp:
        p500 = Path(tmp) / "g500.json"
        p2000 = Path(tmp) / "g2000.json"
        save_site(generate_site(500, seed=0), p500)
        save_site(generate_site(2000, seed=0), p2000)
        if part in ("all", "startup"):
            await _startup(p500, repeat)
        if part in ("all", "typing"):
            await _typing_both(p2000, repeat)


async def _startup(p500: Path, repeat: int) -> None:
    await _startup_bare(p500, 500)  # warm imports and caches for both
    await _startup_app(p500, 500)
    runs: list[tuple[tuple[float, float], tuple[float, float]]] = []
    for _ in range(repeat):
        bare = await _startup_bare(p500, 500)
        runs.append((await _startup_app(p500, 500), bare))
    for k, what in ((0, "the first paint of the whole tree"), (1, "the app idle after it")):
        ours = [o[k] for o, _ in runs]
        bare = [b[k] for _, b in runs]
        ratios = [o / b for o, b in zip(ours, bare, strict=True)]
        m_ours, m_bare = statistics.median(ours), statistics.median(bare)
        print(
            f"start-up to {what}, 500 nodes, in-process: app median "
            f"{m_ours * 1000:.0f} ms ({min(ours) * 1000:.0f}-{max(ours) * 1000:.0f}), bare "
            f"Tree+DataTable {m_bare * 1000:.0f} ms ({min(bare) * 1000:.0f}-"
            f"{max(bare) * 1000:.0f}), ratio of medians {m_ours / m_bare:.2f} (run by run "
            f"{min(ratios):.2f}-{max(ratios):.2f}), n={repeat}; goal <= 1.5"
        )


async def _typing_both(p2000: Path, repeat: int) -> None:
    rounds = max(6, repeat * 2)
    for mode in ("realistic", "idle"):
        got = await _typing(p2000, rounds if mode == "realistic" else max(4, rounds // 2), mode)
        gaps = "keys 80-100 ms apart" if mode == "realistic" else "each key once idle"
        print(f"keystroke to drawn verdict, 2,000 nodes, {gaps}: {_stats(got['all'])}")
        print(f"  first digit after Enter (the value just recorded): {_stats(got['after_enter'])}")
        print(f"  keys that draw the too-slow flag: {_stats(got['flagged'])}")
        print(f"  keys drawn only with the key after them: {got['subsumed'][0]:.0f}")
    print("goal: median <= 16 ms, p90 <= 33 ms")


if __name__ == "__main__":
    ap = argparse.ArgumentParser()
    ap.add_argument("--repeat", type=int, default=5)
    ap.add_argument("--part", choices=("all", "startup", "typing"), default="all")
    args = ap.parse_args()
    asyncio.run(main(args.repeat, args.part))
