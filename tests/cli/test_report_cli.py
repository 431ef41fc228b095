"""``tripwise report`` and ``tripwise print`` run as a user runs them."""

from __future__ import annotations

import os
import shutil
import sys
from pathlib import Path

import pypdf
from sitekit import tripwise as _run

from model.reports.heading import STATEMENT
from model.storage.sites import load_site
from tests.reports.report_sites import squash, write_awkward

ROOT = Path(__file__).resolve().parents[2]


def _sample(tmp: Path, name: str = "oak lane (copy).json") -> Path:
    dest = tmp / name
    shutil.copyfile(ROOT / "sample_sites" / "oak-lane-house.json", dest)
    return dest


def test_default_file_name_beside_the_site(tmp_path: Path) -> None:
    site_path = _sample(tmp_path)
    date = load_site(site_path).latest_visit().date
    done = _run("report", str(site_path))
    assert done.returncode == 0, done.stderr
    # named after the site ('Oak Lane House (invented demo)'), not the file
    out = tmp_path / f"oak-lane-house-invented-demo-remedial-{date}.pdf"
    assert out.is_file() and str(out) in done.stdout
    assert squash(STATEMENT) in squash(pypdf.PdfReader(out).pages[0].extract_text())
    for kind, fmt in (("sheet", "csv"), ("sheet", "md"), ("remedial", "txt")):
        assert _run("report", str(site_path), "--kind", kind, "--format", fmt).returncode == 0
        assert (tmp_path / f"oak-lane-house-invented-demo-{kind}-{date}.{fmt}").is_file()


def test_refuses_to_overwrite_without_force(tmp_path: Path) -> None:
    site_path = _sample(tmp_path)
    out = tmp_path / "sheet.csv"
    out.write_bytes(b"keep me\r\n")
    done = _run("report", str(site_path), "--kind", "sheet", "--format", "csv", "--out", str(out))
    assert done.returncode == 2
    assert "already exists" in done.stderr and "--force" in done.stderr
    assert "Traceback" not in done.stderr
    assert out.read_bytes() == b"keep me\r\n"
    forced = _run(
        "report", str(site_path), "--kind", "sheet", "--format", "csv", "--out", str(out), "--force"
    )
    assert forced.returncode == 0, forced.stderr
    assert out.read_bytes().startswith(b"\xef\xbb\xbfdevice,")


def test_bad_input_exit_2(tmp_path: Path) -> None:
    missing = _run("report", str(tmp_path / "nope.json"))
    assert missing.returncode == 2 and "no such file" in missing.stderr
    bad_fmt = _run("report", str(_sample(tmp_path)), "--format", "docx")
    assert bad_fmt.returncode == 2
    no_dir = _run("report", str(_sample(tmp_path)), "--out", str(tmp_path / "no" / "x.pdf"))
    assert no_dir.returncode == 2 and "no such folder" in no_dir.stderr
    assert list(tmp_path.glob("*.pdf")) == []


def test_unicode_site_name_and_path(tmp_path: Path) -> None:
    site_path = write_awkward(tmp_path, "Café Ω.json")
    done = _run("report", str(site_path), "--kind", "sheet")
    assert done.returncode == 0, done.stderr
    (out,) = tmp_path.glob("maison-élodie-sons-invented-sheet-*.pdf")
    text = "".join(p.extract_text() for p in pypdf.PdfReader(out).pages)
    assert "Maison Élodie & <Sons> (invented)" in text


def test_print_without_lp_is_refused_clearly(tmp_path: Path) -> None:
    empty = tmp_path / "bin"
    empty.mkdir()
    env = {**os.environ, "PATH": str(empty)}
    done = _run("print", str(_sample(tmp_path)), env=env)
    assert done.returncode == 2
    assert "no 'lp' command" in done.stderr
    assert "Traceback" not in done.stderr


def test_print_hands_a_pdf_to_lp(tmp_path: Path) -> None:
    bindir = tmp_path / "bin"
    bindir.mkdir()
    record = tmp_path / "job.pdf"
    fake = bindir / "lp"
    fake.write_text(
        f"#!{sys.executable}\n"
        "import shutil, sys\n"
        f"shutil.copyfile(sys.argv[-1], {str(record)!r})\n"
        f"open({str(tmp_path / 'args.txt')!r}, 'w').write(repr(sys.argv[1:]))\n"
        "print('request id is fake-1 (1 file(s))')\n"
    )
    fake.chmod(0o755)
    env = {**os.environ, "PATH": f"{bindir}{os.pathsep}{os.environ.get('PATH', '')}"}
    done = _run("print", str(_sample(tmp_path)), "--kind", "sheet", "-d", "office", env=env)
    assert done.returncode == 0, done.stderr
    assert "fake-1" in done.stdout
    assert record.read_bytes().startswith(b"%PDF-")
    args = (tmp_path / "args.txt").read_text()
    assert "'-d', 'office'" in args
    # the temporary PDF is gone once the job is queued (lp keeps its own copy)
    assert not Path(eval(args)[-1]).exists()  # noqa: S307 - our own repr


def test_print_reports_lp_failure(tmp_path: Path) -> None:
    bindir = tmp_path / "bin"
    bindir.mkdir()
    fake = bindir / "lp"
    fake.write_text(
        f"#!{sys.executable}\nimport sys\nprint('lp: The printer or class does not exist.', "
        "file=sys.stderr)\nsys.exit(1)\n"
    )
    fake.chmod(0o755)
    env = {**os.environ, "PATH": str(bindir)}
    done = _run("print", str(_sample(tmp_path)), "-d", "nowhere", env=env)
    assert done.returncode == 2
    assert "lp refused the job" in done.stderr and "does not exist" in done.stderr


def test_report_of_an_earlier_visit_and_a_bad_visit(tmp_path: Path) -> None:
    site_path = _sample(tmp_path)
    done = _run("report", str(site_path), "--visit", "2023-05-09", "--format", "md")
    assert done.returncode == 0, done.stderr
    out = tmp_path / "oak-lane-house-invented-demo-remedial-2023-05-09.md"
    assert out.is_file() and str(out) in done.stdout
    assert "a later visit (2026-11-14) exists" in " ".join(out.read_text("utf-8").split())
    bad = _run("report", str(site_path), "--visit", "v9")
    assert bad.returncode == 2
    assert "no visit 'v9'" in bad.stderr and "known visits: 2023-05-09, 2026-11-14" in bad.stderr
    assert len(bad.stderr.strip().splitlines()) == 1 and "Traceback" not in bad.stderr
    assert sorted(p.name for p in tmp_path.iterdir()) == sorted([out.name, site_path.name])
