"""The planned remedy in the remedial list and the coordination study, built from real files.

The plans are made by hand (``plan_sites``) of real device changes; each test
first holds the plan's claim against the real checks (the change made on a
copy and the site checked again), then reads what every renderer prints.
"""

from __future__ import annotations

import csv
import io
from pathlib import Path

import pypdf

from model.plan.changes import (
    PLAN_CAUTION,
    Unresolved,
    apply_changes,
    diff_findings,
    finding_key,
)
from model.reports.plan_part import REMAINING_TITLE
from model.reports.plan_part import TITLE as PLAN_TITLE
from model.reports.remedial import build_remedial
from model.reports.render.csv import ENCODING, REMEDIAL_COLUMNS
from model.reports.study import build_study
from model.reports.study_after import AFTER_LABEL, MADE_TITLE
from model.reports.writer import render, write_report
from model.rules.checks import analyse
from model.rules.findings import CAUTION
from model.storage.sites import load_site
from tests.reports.plan_sites import (
    M1_TEXT,
    OAK,
    RC2_TEXT,
    RCA_GONE_TEXT,
    RCA_S_TEXT,
    SELECTIVITY_REASON,
    annex_delay_plan,
    annex_removal_plan,
    oak_plan,
    write_annex,
)
from tests.reports.report_sites import squash


def _pdf_text(path: Path) -> str:
    return "\n".join(p.extract_text() or "" for p in pypdf.PdfReader(str(path)).pages)


def _oak():
    site = load_site(OAK)
    result = analyse(site)
    return site, result, oak_plan(result)


def test_the_oak_lane_plan_clears_what_it_claims() -> None:
    # BS 7671 531.3.3: Type AC only for fixed equipment with no DC component; a Type A
    # RCCB in its place clears the finding, and the change creates no finding.
    site, result, plan = _oak()
    after = analyse(apply_changes(site, plan.changes))
    diff = diff_findings(result.findings, after.findings, ["rc2"])
    cleared = {finding_key(f) for f in diff.cleared}
    assert set(plan.changes[0].clears) <= cleared
    assert diff.created == []
    assert not [f for f in after.findings if f.rule == "type.ac-unsuitable"]


def test_remedial_items_carry_the_planned_change_only_where_it_clears() -> None:
    site, result, plan = _oak()
    doc = build_remedial(site, result, plan=plan)
    by_rule = {i.rule: i for i in doc.items}
    ac = by_rule["type.ac-unsuitable"]
    assert ac.planned == f"{RC2_TEXT} (change 1 of 1 in the plan)"
    rows = ac.rows("in the PDF")
    names = [n for n, _, _ in rows]
    assert names.index("Planned change") == names.index("Action") + 1  # under the Action
    # an item the plan does not clear is as it was
    for rule in ("cascade.dc-blinding", "coverage.additional-protection", "reading.missing"):
        assert by_rule[rule].planned == ""
        assert "Planned change" not in [n for n, _, _ in by_rule[rule].rows("x")]
    assert [i.planned for i in build_remedial(site, result).items] == [""] * len(doc.items)
    assert doc.plan is not None
    assert [(s.number, s.text, s.items) for s in doc.plan.steps] == [(1, RC2_TEXT, (ac.number,))]
    left = doc.plan.remaining
    not_sel = [i for i in doc.items if i.node_ids == ("m9", "rb3")]
    assert [(r.items, r.reason) for r in left] == [((not_sel[0].number,), SELECTIVITY_REASON)]


def test_remedial_md_and_txt_print_the_change_the_plan_and_both_cautions() -> None:
    site, result, plan = _oak()
    md = render(site, "remedial", "md", analysis=result, plan=plan).decode("utf-8")
    plain = md.replace("\\", "")
    assert f"- **Planned change:** {RC2_TEXT} (change 1 of 1 in the plan)" in plain
    assert plain.count("**Planned change:**") == 1  # only the item the plan clears
    part = plain[plain.index(f"## {PLAN_TITLE}") : plain.index("## Series pairs")]
    assert f"1. **{RC2_TEXT}** (clears item " in part
    assert f"### {REMAINING_TITLE}" in part and SELECTIVITY_REASON in part
    assert PLAN_CAUTION in part
    closing = plain[plain.rindex("\n---\n") :]
    assert PLAN_CAUTION in closing and CAUTION in closing  # side by side at the close
    txt = render(site, "remedial", "txt", analysis=result, plan=plan).decode("utf-8")
    flat = " ".join(txt.split())
    assert f"Planned change: {RC2_TEXT} (change 1 of 1 in the plan)" in flat
    assert PLAN_TITLE.upper() in txt and f"Why: {SELECTIVITY_REASON}" in flat
    assert f"Caution: {PLAN_CAUTION} {CAUTION}" in flat


def test_remedial_without_a_plan_is_as_before() -> None:
    site, result, _ = _oak()
    md = render(site, "remedial", "md", analysis=result, plan=False).decode("utf-8")
    assert "Planned change" not in md and PLAN_TITLE not in md
    assert PLAN_CAUTION not in md.replace("\\", "")


def test_remedial_csv_gains_the_planned_change_column_last(tmp_path: Path) -> None:
    site, result, plan = _oak()
    data = render(site, "remedial", "csv", analysis=result, plan=plan)
    rows = list(csv.DictReader(io.StringIO(data.decode(ENCODING))))
    assert REMEDIAL_COLUMNS[-1] == "planned_change"
    planned = {r["rule"]: r["planned_change"] for r in rows if r["number"]}
    assert planned.pop("type.ac-unsuitable") == f"{RC2_TEXT} (change 1 of 1 in the plan)"
    assert set(planned.values()) == {""}
    assert "NOT a certificate" in rows[-1]["notes"]  # the statement stays in `notes`


def test_remedial_pdf_names_the_change_under_the_item_and_in_the_plan(tmp_path: Path) -> None:
    site, result, plan = _oak()
    out = tmp_path / "remedial.pdf"
    out.write_bytes(render(site, "remedial", "pdf", analysis=result, plan=plan))
    text = squash(_pdf_text(out))
    assert text.count(squash(RC2_TEXT)) == 2  # under its item, and in the plan's list
    row = squash("Planned change " + RC2_TEXT)
    assert text.count(row) == 1  # one item carries it: the one the plan clears
    item_at = text.index(squash("RCCB 2 (downstairs) is Type AC"))
    assert item_at < text.index(row) < text.rindex(squash(PLAN_TITLE))
    assert squash(PLAN_CAUTION) in text and squash(REMAINING_TITLE) in text
    plain = tmp_path / "plain.pdf"
    plain.write_bytes(render(site, "remedial", "pdf", analysis=result, plan=False))
    assert squash("Planned change") not in squash(_pdf_text(plain))
    assert squash(PLAN_CAUTION) not in squash(_pdf_text(plain))


def test_annex_plans_against_the_real_checks(tmp_path: Path) -> None:
    site = load_site(write_annex(tmp_path))
    result = analyse(site)
    before = {f.rule for f in result.findings}
    # IEC 61008-1 Table 1: a general-type device has no minimum non-actuating time, so
    # a 30 mA general RCCB over a 30 mA RCBO cannot discriminate (common practice).
    assert {"cascade.ratio-below-3", "cascade.upstream-not-delayed"} <= before
    # the removal plan clears every cascade finding, creates none, and keeps a 30 mA
    # RCD on the sockets and the lights (BS 7671 411.3.3 sockets, 411.3.4 domestic lighting)
    plan = annex_removal_plan(result)
    after_site = apply_changes(site, plan.changes)
    after = analyse(after_site)
    diff = diff_findings(result.findings, after.findings, [dc.node for dc in plan.changes])
    assert diff.created == []
    assert set(plan.changes[1].clears) <= {finding_key(f) for f in diff.cleared}
    assert not [f for f in after.findings if f.rule.startswith(("cascade.", "coverage."))]
    by_id = {n.id: n for n in after_site.nodes}
    for circuit, device in (("c-s", "rbS"), ("c-l", "m1")):
        assert by_id[circuit].parent == device
        assert by_id[device].kind == "rcbo" and by_id[device].idn_ma == 30  # type: ignore[union-attr]
    # the display-only delay plan makes a new pair (the RCCB over the lights' new RCBO):
    # the study shows it (a plan from the planner never creates a finding; this one is a
    # hand-made display case)
    delay = annex_delay_plan(result)
    after = analyse(apply_changes(site, delay.changes))
    made = diff_findings(result.findings, after.findings, ["m1", "rcA"]).created
    assert [(f.rule, f.nodes) for f in made] == [("cascade.band-overlap", ("rcA", "m1"))]


def test_study_md_shows_the_touched_pair_after_the_change(tmp_path: Path) -> None:
    site = load_site(write_annex(tmp_path))
    result = analyse(site)
    plan = annex_delay_plan(result)
    after = analyse(apply_changes(site, plan.changes))
    verdict_after = after.pair("rcA", "rbS")
    assert verdict_after is not None
    assert result.pair("rcA", "rbS").verdict == "not-selective"  # type: ignore[union-attr]
    assert verdict_after.verdict != "not-selective"
    md = render(site, "study", "md", analysis=result, plan=plan).decode("utf-8").replace("\\", "")
    pair = md[md.index("### 1. Annex RCCB") :]
    assert pair.index("**Verdict: not-selective**") < pair.index(f"#### {AFTER_LABEL}")
    after_part = pair[pair.index(f"#### {AFTER_LABEL}") :]
    assert f"Change: {RCA_S_TEXT}" in after_part
    assert f"**Verdict: {verdict_after.verdict}**" in after_part
    # the new RCBO makes a pair with the RCCB above it: shown among the pairs made
    made = md[md.index(f"## {MADE_TITLE}") :]
    assert "Annex RCCB (300 mA, Type A, type S) over Lights MCB (30 mA, Type A, general)" in made
    assert f"Made by: {M1_TEXT}; {RCA_S_TEXT}" in made
    assert PLAN_CAUTION in md[md.rindex("\n---\n") :]


def test_study_pdf_says_a_removed_device_dissolves_the_pair(tmp_path: Path) -> None:
    site = load_site(write_annex(tmp_path))
    result = analyse(site)
    plan = annex_removal_plan(result)
    doc = build_study(site, result, plan=plan)
    a = doc.after_of("rcA", "rbS")
    assert a is not None and a.verdict == "" and a.rcd_chart is None
    assert a.gone == "no longer a pair: Annex RCCB is removed by the plan"
    out = write_report(site, "study", "pdf", tmp_path / "study.pdf", plan=plan)
    text = squash(_pdf_text(out))
    assert squash(AFTER_LABEL) in text
    assert squash(f"Change: {RCA_GONE_TEXT}") in text
    assert squash("Verdict after: none — no longer a pair: Annex RCCB is removed") in text
    assert squash(PLAN_CAUTION) in text


def test_study_pdf_draws_the_after_chart_of_a_touched_pair(tmp_path: Path) -> None:
    site = load_site(write_annex(tmp_path))
    result = analyse(site)
    plan = annex_delay_plan(result)
    verdict = analyse(apply_changes(site, plan.changes)).pair("rcA", "rbS")
    assert verdict is not None
    out = write_report(site, "study", "pdf", tmp_path / "study.pdf", plan=plan)
    pages = [squash(p.extract_text() or "") for p in pypdf.PdfReader(str(out)).pages]
    text = "".join(pages)
    before_at = text.index(squash("Pair chart 1: Annex RCCB above Sockets RCBO"))
    after_at = text.index(squash("Pair chart 1 after: Annex RCCB above Sockets RCBO"))
    assert before_at < text.index(squash(AFTER_LABEL)) < after_at
    assert squash(f"Verdict after: {verdict.verdict}") in text
    assert squash(MADE_TITLE) in text
    plain = write_report(site, "study", "pdf", tmp_path / "plain.pdf", plan=False)
    assert squash(AFTER_LABEL) not in squash(_pdf_text(plain))


def test_findings_alike_left_by_the_plan_each_name_their_own_item() -> None:
    # Oak Lane has two reading.trend findings of RCCB 2 (same rule, same device): each
    # remaining entry names its own item, and a long text is cut (the item has it all).
    site, result, plan = _oak()
    trends = [f for f in result.findings if f.rule == "reading.trend"]
    assert len(trends) == 2
    plan.remaining.extend(Unresolved(f, "needs a test") for f in trends)
    doc = build_remedial(site, result, plan=plan)
    numbers = [i.number for i in doc.items if i.rule == "reading.trend"]
    assert doc.plan is not None
    left = [r for r in doc.plan.remaining if r.reason == "needs a test"]
    assert [r.items for r in left] == [(numbers[0],), (numbers[1],)]
    assert all(len(r.message) <= 152 for r in left)
    assert left[0].message.endswith(" …") and left[0].message[:-2] in trends[0].message


def test_the_top_of_the_list_says_what_the_plan_clears() -> None:
    site, result, plan = _oak()
    total = len(result.findings)
    line = f"1 planned device change clears 1 of the {total} item(s)"
    md = render(site, "remedial", "md", analysis=result, plan=plan).decode("utf-8")
    assert line in md.split("## ")[0]  # before the first board
    txt = render(site, "remedial", "txt", analysis=result, plan=plan).decode("utf-8")
    assert line in " ".join(txt.split())
    assert (
        "planned device" not in render(site, "remedial", "md", analysis=result, plan=False).decode()
    )
