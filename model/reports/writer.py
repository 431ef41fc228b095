"""Writing a document to a file: the one entry the command line and the app call.

:func:`write_report` builds the document (:mod:`model.reports.remedial`,
:mod:`model.reports.sheet`), renders it in memory with the renderer of the
format (``model.reports.render``), and writes it through a temporary file and
a rename, so a failed render never leaves a half-written file nor touches an
existing one; it refuses to replace an existing file unless asked to.

The renderers are imported only when a document is rendered, so importing
this module does not load the PDF library.
"""

from __future__ import annotations

import datetime as dt
from collections.abc import Callable
from pathlib import Path
from typing import Any, Literal

from model.reports import remedial, sheet, study
from model.reports.remedial import build_remedial
from model.reports.sheet import build_sheet
from model.reports.study import build_study
from model.rules.checks import analyse
from model.rules.findings import Analysis
from model.site.models import SiteFile
from model.storage.files import SaveError, write_atomic

Kind = Literal["remedial", "sheet", "study"]
Fmt = Literal["pdf", "md", "csv", "txt"]
KINDS: tuple[Kind, ...] = ("remedial", "sheet", "study")
FORMATS: tuple[Fmt, ...] = ("pdf", "md", "csv", "txt")
KIND_TITLE: dict[str, str] = {
    "remedial": remedial.TITLE,
    "sheet": sheet.TITLE,
    "study": study.TITLE,
}
#: The formats each kind can be written in (the study is a document of charts).
KIND_FORMATS: dict[str, tuple[str, ...]] = {
    "remedial": ("pdf", "md", "csv", "txt"),
    "sheet": ("pdf", "md", "csv", "txt"),
    "study": ("pdf", "md"),
}
FORMAT_TITLE: dict[str, str] = {
    "pdf": "PDF",
    "md": "Markdown",
    "csv": "CSV (spreadsheet)",
    "txt": "Plain text",
}


class ReportError(Exception):
    """A report could not be written.  ``str()`` is one line fit for a user."""


class ReportExists(ReportError, FileExistsError):
    """The target file exists and overwriting was not asked for."""


def default_name(site_path: Path, site: SiteFile, kind: str, fmt: str) -> Path:
    """``<site stem>-<kind>-<visit date>.<ext>`` beside the site file."""
    visit = site.latest_visit()
    date = visit.date if visit is not None else "no-visit"
    return Path(site_path).with_name(f"{Path(site_path).stem}-{kind}-{date}.{fmt}")


def render(
    site: SiteFile,
    kind: str,
    fmt: str,
    *,
    generated: dt.datetime | None = None,
    analysis: Analysis | None = None,
) -> bytes:
    """The bytes of one document in one format."""
    if kind not in KINDS:
        raise ReportError(f"unknown report kind {kind!r}; choose {' or '.join(KINDS)}")
    if fmt not in FORMATS:
        raise ReportError(f"unknown format {fmt!r}; choose one of {', '.join(FORMATS)}")
    if fmt not in KIND_FORMATS[kind]:
        raise ReportError(
            f"the {KIND_TITLE[kind].lower()} is written as {' or '.join(KIND_FORMATS[kind])}, "
            f"not {fmt}"
        )
    if kind == "study":
        from model.reports.render import md_study, pdf_study

        result = analysis if analysis is not None else analyse(site)
        doc_study = build_study(site, result, generated=generated)
        return (pdf_study.study_pdf if fmt == "pdf" else md_study.study_md)(doc_study)
    renderer = _renderer(kind, fmt)
    if kind == "remedial":
        doc: Any = build_remedial(
            site, analysis if analysis is not None else analyse(site), generated=generated
        )
    else:
        doc = build_sheet(site, generated=generated)
        if fmt == "md":
            from model.reports.render.md_study import zs_table_md
            from model.reports.zs_sheet import build_zs_rows

            rows = build_zs_rows(site, analysis if analysis is not None else analyse(site))
            text = renderer(doc).decode("utf-8")
            cut = text.rfind("\n---\n")  # the table goes before the closing caution
            cut = len(text) if cut < 0 else cut
            table = "\n".join(["", *zs_table_md(rows)])
            return (text[:cut] + table + text[cut:]).encode("utf-8")
    return renderer(doc)


def _renderer(kind: str, fmt: str) -> Callable[[Any], bytes]:
    if fmt == "pdf":
        if kind == "remedial":
            from model.reports.render import pdf_remedial

            return pdf_remedial.remedial_pdf
        from model.reports.render import pdf_sheet

        return pdf_sheet.sheet_pdf
    if fmt == "md":
        from model.reports.render import md as render_md

        return render_md.remedial_md if kind == "remedial" else render_md.sheet_md
    if fmt == "csv":
        from model.reports.render import csv as render_csv

        return render_csv.remedial_csv if kind == "remedial" else render_csv.sheet_csv
    from model.reports.render import txt as render_txt

    return render_txt.remedial_txt if kind == "remedial" else render_txt.sheet_txt


def write_report(
    site: SiteFile,
    kind: str,
    fmt: str,
    out_path: Path,
    *,
    force: bool = False,
    generated: dt.datetime | None = None,
) -> Path:
    """Render one document and write it to ``out_path``; return the path written.

    The document is rendered in memory first, then written by
    :func:`model.storage.files.write_atomic` (the one atomic writer; a link at
    ``out_path`` is replaced, never followed): a failure at any step leaves no partial file and
    does not touch an existing one.  Without ``force`` an existing file is
    never replaced (:class:`ReportExists`).
    """
    out = Path(out_path)
    if out.is_dir():
        raise ReportError(f"{out}: is a folder; give a file name")
    if out.exists() and not force:
        raise ReportExists(f"{out}: already exists; use --force to replace it (nothing written)")
    if not out.parent.is_dir():
        raise ReportError(f"{out.parent}: no such folder")
    data = render(site, kind, fmt, generated=generated)
    try:
        write_atomic(out, data, replace=force, backup=False, follow_links=False)
    except FileExistsError:
        raise ReportExists(
            f"{out}: already exists; use --force to replace it (nothing written)"
        ) from None
    except SaveError as exc:
        err = exc.os_error
        reason = (err.strerror or str(err)) if err is not None else exc.reason
        raise ReportError(f"{out}: cannot write ({reason})") from None
    except OSError as exc:
        raise ReportError(f"{out}: cannot write ({exc.strerror or exc})") from None
    return out
