"""App first paint as a whole process in a terminal (figures printed; not a test).

Starts ``python -m tui open SITE`` on a pseudo-terminal of 160×45 and times from
the process start until a node label of the site has been written to
the terminal (the label of the first residual-current device, drawn only once
the tree is filled), against a bare Textual app (one Tree, one DataTable, the same file)
started the same way.  Each run is a fresh process, so imports, site loading,
the editing session and the first layout are all inside the figure.  The bare
app is what the same libraries cost with no application code: the yardstick.

Run: python bench/bench_tui_process.py [--repeat N]
"""

from __future__ import annotations

import argparse
import fcntl
import os
import pty
import select
import signal
import statistics
import struct
import sys
import tempfile
import termios
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))
sys.path.insert(0, str(ROOT / "bench"))

from model.site.tree import SiteIndex  # noqa: E402
from model.storage.sites import load_site, save_site  # noqa: E402


def _paint_time(argv: list[str], marker: bytes, timeout: float = 60.0) -> float:
    """Seconds from fork to ``marker`` appearing in the terminal output."""
    t0 = time.perf_counter()
    pid, fd = pty.fork()
    if pid == 0:  # the child: the program under test
        os.environ["TERM"] = "xterm-256color"
        os.environ.pop("TEXTUAL", None)
        os.chdir(ROOT)
        os.execv(sys.executable, [sys.executable, *argv])
    fcntl.ioctl(fd, termios.TIOCSWINSZ, struct.pack("HHHH", 45, 160, 0, 0))
    seen = b""
    try:
        while True:
            left = timeout - (time.perf_counter() - t0)
            if left <= 0:
                raise TimeoutError(f"{marker!r} never drawn; last output {seen[-300:]!r}")
            ready, _, _ = select.select([fd], [], [], left)
            if not ready:
                continue
            try:
                chunk = os.read(fd, 65536)
            except OSError:
                raise RuntimeError(f"the program ended before drawing {marker!r}") from None
            seen = seen[-4096:] + chunk
            if marker in seen:
                return time.perf_counter() - t0
    finally:
        os.kill(pid, signal.SIGKILL)
        os.waitpid(pid, 0)
        os.close(fd)


def main(repeat: int) -> None:
    from gen_site import generate_site  # type: ignore[import-not-found]

    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "g500.json"
        save_site(generate_site(500, seed=0), path)
        site = load_site(path)
        idx = SiteIndex.build(site)
        rcds = [n for n in idx.order if idx.by_id[n].kind in ("rccb", "rcbo")]
        first = idx.by_id[rcds[0]]
        marker = (first.label or first.id).encode()  # drawn only once the tree is filled
        ours_argv = ["-m", "tui", "open", str(path)]
        # the yardstick imports Textual and the core's loader only (bench/bare_app.py)
        bare_argv = [str(Path(__file__).resolve().parent / "bare_app.py"), str(path)]
        _paint_time(bare_argv, marker)  # warm the disk cache for both
        _paint_time(ours_argv, marker)
        ours: list[float] = []
        bare: list[float] = []
        for _ in range(repeat):
            bare.append(_paint_time(bare_argv, marker))
            ours.append(_paint_time(ours_argv, marker))
        for lock in Path(tmp).glob("*tripwise-lock"):
            lock.unlink()
        mo, mb = statistics.median(ours), statistics.median(bare)
        ratios = [o / b for o, b in zip(ours, bare, strict=True)]
        print(
            f"first paint of a 500-node tree, whole process in a 160x45 terminal (marker "
            f"{marker.decode()!r}): app median {mo * 1000:.0f} ms "
            f"({min(ours) * 1000:.0f}-{max(ours) * 1000:.0f}), bare Tree+DataTable "
            f"{mb * 1000:.0f} ms ({min(bare) * 1000:.0f}-{max(bare) * 1000:.0f}), "
            f"ratio of medians {mo / mb:.2f} (run by run {min(ratios):.2f}-{max(ratios):.2f}), "
            f"n={repeat}"
        )


if __name__ == "__main__":
    ap = argparse.ArgumentParser()
    ap.add_argument("--repeat", type=int, default=5)
    main(ap.parse_args().repeat)
