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
import os
import re
import unicodedata
from collections.abc import Callable
from dataclasses import replace
from pathlib import Path
from typing import Any, Literal

from model.plan.changes import Plan
from model.reports import remedial, sheet, study
from model.reports.remedial import build_remedial
from model.reports.sheet import build_sheet
from model.reports.study import build_study
from model.rules.checks import analyse
from model.rules.findings import Analysis
from model.site.history import cut_at, find_visit, known_visits_text
from model.site.models import SiteFile, Visit
from model.storage.files import SaveError, plain_os_error, write_atomic
from model.storage.sidefiles import protected_reason

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


class UnknownVisit(ReportError, KeyError):
    """The visit asked for is not in the site.  ``str()`` lists the known visit ids."""

    def __str__(self) -> str:
        return str(self.args[0])


_UNSAFE = re.compile(r"[^\w]+")
SLUG_MAX = 60


def site_slug(site_path: Path, site: SiteFile) -> str:
    """The site's name made safe for a file name; the site file's stem when nothing is left.

    Letters and digits (any script) are kept and lower-cased; every other run
    of characters becomes one '-'; at most 60 characters:
    'Kestrel Hill Primary School (invented demo)' -> 'kestrel-hill-primary-school-invented-demo'.
    """
    name = unicodedata.normalize("NFC", site.site.name).casefold()
    slug = _UNSAFE.sub("-", name.replace("_", "-")).strip("-")[:SLUG_MAX].strip("-")
    return slug or Path(site_path).stem


def report_visit(site: SiteFile, visit_id: str | None) -> tuple[SiteFile, Visit | None]:
    """The site as it stood at ``visit_id`` (its later visits left out), and the latest visit
    when that is a later one (else None).  ``visit_id`` None means the latest visit.

    Raises :class:`UnknownVisit` naming the known visit ids.
    """
    latest = site.latest_visit()
    if visit_id is None or (latest is not None and latest.id == visit_id):
        return site, None
    if find_visit(site, visit_id) is None:
        raise UnknownVisit(
            f"no visit {visit_id!r} in this site; known visits: {known_visits_text(site)}"
        )
    return cut_at(site, visit_id), latest


def default_name(
    site_path: Path, site: SiteFile, kind: str, fmt: str, visit_id: str | None = None
) -> Path:
    """``<site name slug>-<kind>-<visit date>.<ext>`` beside the site file.

    The visit is ``visit_id`` (default the latest); a second visit on one day
    (id ``DATE-2``) gives its id in place of the date, so the two do not collide.
    """
    visit = site.latest_visit() if visit_id is None else find_visit(site, visit_id)
    if visit is None:
        stamp = "no-visit"
    elif visit.id.startswith(visit.date) and visit.id != visit.date:
        stamp = visit.id
    else:
        stamp = visit.date
    name = f"{site_slug(site_path, site)}-{kind}-{stamp}.{fmt}"
    return Path(site_path).with_name(name)


def render(
    site: SiteFile,
    kind: str,
    fmt: str,
    *,
    generated: dt.datetime | None = None,
    analysis: Analysis | None = None,
    visit: str | None = None,
    plan: Plan | bool = True,
) -> bytes:
    """The bytes of one document in one format, of ``visit`` (default the latest).

    A document of an earlier visit is built from the site as it stood then
    (:func:`report_visit`) and says in its heading that a later visit exists;
    ``analysis`` is used only for the latest visit.

    ``plan``: True (the default) makes the planned remedy of the site as shown
    (:func:`model.plan.search.make_plan`) for the remedial list and the study;
    False leaves it out; a :class:`Plan` is used as given (it must have been made
    for the site as shown).  The test sheet never carries a plan.
    """
    if kind not in KINDS:
        raise ReportError(f"unknown report kind {kind!r}; choose {' or '.join(KINDS)}")
    if fmt not in FORMATS:
        raise ReportError(f"unknown format {fmt!r}; choose one of {', '.join(FORMATS)}")
    if fmt not in KIND_FORMATS[kind]:
        raise ReportError(
            f"the {KIND_TITLE[kind].lower()} is written as {' or '.join(KIND_FORMATS[kind])}, "
            f"not {fmt}"
        )
    shown, later = report_visit(site, visit)
    if later is not None:
        analysis = None
    if kind == "study":
        from model.reports.render import md_study, pdf_study

        result = analysis if analysis is not None else analyse(shown)
        made = _plan_of(shown, result, plan)
        doc_study = build_study(shown, result, generated=generated, plan=made)
        return (pdf_study.study_pdf if fmt == "pdf" else md_study.study_md)(doc_study)
    renderer = _renderer(kind, fmt)
    if kind == "remedial":
        result = analysis if analysis is not None else analyse(shown)
        doc: Any = build_remedial(
            shown,
            result,
            generated=generated,
            later=later,
            plan=_plan_of(shown, result, plan),
        )
    else:
        from model.reports.zs_sheet import build_zs_rows

        rows = build_zs_rows(shown, analysis if analysis is not None else analyse(shown))
        doc = replace(build_sheet(shown, generated=generated, later=later), zs_rows=tuple(rows))
        if fmt == "md":
            from model.reports.render.md_study import zs_table_md

            text = renderer(doc).decode("utf-8")
            cut = text.rfind("\n---\n")  # the table goes before the closing caution
            cut = len(text) if cut < 0 else cut
            table = "\n".join(["", *zs_table_md(rows)])
            return (text[:cut] + table + text[cut:]).encode("utf-8")
    return renderer(doc)


def _plan_of(site: SiteFile, analysis: Analysis, plan: Plan | bool) -> Plan | None:
    """The plan a document carries: made here (True), none (False) or the one given."""
    if plan is False:
        return None
    if plan is True:
        from model.plan.search import make_plan

        return make_plan(site, analysis)
    return plan


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
    visit: str | None = None,
    plan: Plan | bool = True,
) -> Path:
    """Render one document of ``visit`` (default the latest) to ``out_path``; return the path.

    ``plan`` as for :func:`render` (by default the remedial list and the study carry
    the planned remedy).

    The document is rendered in memory first, then written by
    :func:`model.storage.files.write_atomic` (the one atomic writer; a link at
    ``out_path`` is replaced, never followed): a failure at any step leaves no partial file and
    does not touch an existing one.  Without ``force`` an existing file is
    never replaced (:class:`ReportExists`), and never, even with ``force``,
    a site file or its backup, journal or lock (:class:`ReportError`).
    """
    report_visit(site, visit)  # an unknown visit is refused before anything else
    out = Path(out_path)
    refused = protected_reason(out)
    if refused is not None:
        raise ReportError(f"{out}: not written there: {refused}; choose another file name")
    try:
        if out.is_dir():
            raise ReportError(f"{out}: is a folder; give a file name")
        if os.path.lexists(out) and not force:
            raise ReportExists(
                f"{out}: already exists; use --force to replace it (nothing written)"
            )
        if not out.parent.is_dir():
            raise ReportError(f"{out.parent}: no such folder")
    except ReportError:
        raise
    except OSError as exc:
        raise ReportError(f"{out}: cannot write ({plain_os_error(exc)})") from None
    data = render(site, kind, fmt, generated=generated, visit=visit, plan=plan)
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
