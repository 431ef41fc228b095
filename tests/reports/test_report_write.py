"""write_report: never overwrites silently, never leaves a half file, names files sensibly."""

from __future__ import annotations

from pathlib import Path

import pytest

from model.reports.render import pdf_remedial
from model.reports.writer import ReportError, ReportExists, default_name, write_report
from model.storage.sites import load_site
from tests.reports.report_sites import awkward_site, copy_samples


def test_refuses_to_overwrite_without_force(tmp_path: Path) -> None:
    out = tmp_path / "list.md"
    out.write_bytes(b"the inspector's own notes\n")
    with pytest.raises(ReportExists):
        write_report(awkward_site(), "remedial", "md", out)
    assert out.read_bytes() == b"the inspector's own notes\n"
    assert write_report(awkward_site(), "remedial", "md", out, force=True) == out
    assert out.read_bytes().startswith(b"> **This document is a record")


@pytest.mark.parametrize("force", [False, True])
def test_failed_render_leaves_nothing_behind(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch, force: bool
) -> None:
    def boom(doc: object) -> bytes:
        raise RuntimeError("renderer failed")

    monkeypatch.setattr(pdf_remedial, "remedial_pdf", boom)
    existing = tmp_path / "old.pdf"
    existing.write_bytes(b"%PDF-1.4 older report")
    target = existing if force else tmp_path / "new.pdf"
    with pytest.raises(RuntimeError):
        write_report(awkward_site(), "remedial", "pdf", target, force=force)
    assert existing.read_bytes() == b"%PDF-1.4 older report"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["old.pdf"]


def test_unknown_kind_or_format_and_bad_folder(tmp_path: Path) -> None:
    with pytest.raises(ReportError, match="unknown report kind"):
        write_report(awkward_site(), "certificate", "pdf", tmp_path / "x.pdf")
    with pytest.raises(ReportError, match="unknown format"):
        write_report(awkward_site(), "sheet", "docx", tmp_path / "x.docx")
    with pytest.raises(ReportError, match="no such folder"):
        write_report(awkward_site(), "sheet", "csv", tmp_path / "missing" / "x.csv")
    with pytest.raises(ReportError, match="is a folder"):
        write_report(awkward_site(), "sheet", "csv", tmp_path)
    assert list(tmp_path.iterdir()) == []


def test_default_name_beside_the_site(tmp_path: Path) -> None:
    (path, *_) = copy_samples(tmp_path)
    site = load_site(path)
    visit = site.latest_visit()
    assert visit is not None
    name = default_name(path, site, "sheet", "csv")
    # the site's name ('Hollowmere Farm (invented demo)'), not the file's
    assert name == path.with_name(f"hollowmere-farm-invented-demo-sheet-{visit.date}.csv")


def test_every_document_renders_for_bare_sites(tmp_path: Path) -> None:
    """No visit, no residual-current device, no finding: every format still renders."""
    import json

    from model.reports.heading import STATEMENT
    from model.reports.writer import KIND_FORMATS, KINDS
    from model.storage.codec import parse_site
    from tests.reports.report_sites import awkward_raw, squash

    bare = {
        "format": "tripwise.site",
        "version": 2,
        "site": {"name": "Empty shed (invented)", "earthing": "TN-S"},
        "nodes": [{"id": "o", "kind": "origin"}],
    }
    no_visit = awkward_raw()
    no_visit["visits"] = []
    for raw in (bare, no_visit):
        site = parse_site(json.dumps(raw))
        for kind in KINDS:
            for fmt in KIND_FORMATS[kind]:  # the study is charts: PDF and Markdown only
                out = write_report(site, kind, fmt, tmp_path / f"{len(raw)}-{kind}.{fmt}")
                data = out.read_bytes()
                assert data
                if fmt in ("md", "txt", "csv"):
                    assert squash(STATEMENT) in squash(data.decode("utf-8-sig"))
    site = parse_site(json.dumps(no_visit))
    named = default_name(tmp_path / "a.json", site, "sheet", "pdf").name
    assert named == "maison-élodie-sons-invented-sheet-no-visit.pdf"
    nameless = parse_site(json.dumps({**bare, "site": {"name": " (?) ", "earthing": "TN-S"}}))
    assert (
        default_name(tmp_path / "a.json", nameless, "sheet", "pdf").name == "a-sheet-no-visit.pdf"
    )


def test_a_link_at_the_output_is_replaced_never_followed(tmp_path: Path) -> None:
    """A document never lands in the file a symbolic link points at (a site, say)."""
    precious = tmp_path / "site.json"
    precious.write_bytes(b'{"format": "tripwise.site"}')
    out = tmp_path / "list.md"
    out.symlink_to(precious)
    with pytest.raises(ReportExists):
        write_report(awkward_site(), "remedial", "md", out)
    assert out.is_symlink()
    write_report(awkward_site(), "remedial", "md", out, force=True)
    assert not out.is_symlink()
    assert out.read_bytes().startswith(b"> **This document is a record")
    assert precious.read_bytes() == b'{"format": "tripwise.site"}'
    assert sorted(p.name for p in tmp_path.iterdir()) == ["list.md", "site.json"]


def test_a_dangling_link_is_refused_without_force(tmp_path: Path) -> None:
    out = tmp_path / "list.md"
    out.symlink_to(tmp_path / "nowhere.md")
    with pytest.raises(ReportExists):
        write_report(awkward_site(), "remedial", "md", out)
    assert not (tmp_path / "nowhere.md").exists()
