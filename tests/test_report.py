"""The job packet: `rigplan report` in every format, checked against `check --format json`.

The packet repeats the planner's numbers; these tests hold it to that (the
check's JSON is the reference: identity of the two outputs), to the page
layout the issue asks for, and to the geometry identities of the schematic
(shoe = sum of the joint lengths run; collar = shoe less the shoe track).
One PDF of the bundled floated demo is built per module and shared.
"""

from __future__ import annotations

import io
import json
import re
import shutil
import subprocess
import sys
from html.parser import HTMLParser
from pathlib import Path

import pytest

from rigplan.cli import main
from rigplan.present import wording as W

ROOT = Path(__file__).resolve().parents[1]
STRINGS = ROOT / "strings"
RIGS = ROOT / "rigs"
FLOATED = STRINGS / "cv7-16in-floated.toml"

pypdf = pytest.importorskip("pypdf")


def _json(capsys, *argv) -> dict:
    capsys.readouterr()
    main(["check", *map(str, argv), "--format", "json"])
    return json.loads(capsys.readouterr().out)


@pytest.fixture(scope="module")
def built(tmp_path_factory):
    """One PDF (and its check JSON) of the floated demo on its rig, US units."""
    d = tmp_path_factory.mktemp("packet")
    out = d / "plan.pdf"
    assert main(["report", str(FLOATED), "--rig", "mw80", "-o", str(out), "--revision", "C",
                 "--date", "2026-11-30", "--prepared-by", "P. Planner"]) == 0
    buf = io.StringIO()
    old = sys.stdout
    sys.stdout = buf
    try:
        main(["check", str(FLOATED), "--rig", "mw80", "--format", "json"])
    finally:
        sys.stdout = old
    reader = pypdf.PdfReader(str(out))
    texts = [" ".join(p.extract_text().split()) for p in reader.pages]
    return {"path": out, "reader": reader, "texts": texts, "doc": json.loads(buf.getvalue())}


def _page_of(texts, heading: str) -> int:
    for i, t in enumerate(texts):
        if heading in t:
            return i
    raise AssertionError(f"no page holds {heading!r}")


def test_pdf_opens_with_every_part_in_order(built):
    reader = built["reader"]
    titles = [o.title for o in reader.outline]
    # the order the issue sets out
    assert titles[:8] == ["Job plan: CV-7 production casing, floated", "Inputs",
                          "Well schematic", "Hoisting chain", "Charts", "Running schedule",
                          "Fill schedule", "Crew sheet"]
    n = len(reader.pages)
    for i, t in enumerate(built["texts"]):
        assert f"page {i + 1} of {n}" in t
    assert reader.pages[0].mediabox.width == pytest.approx(612)   # US Letter, 8.5 x 11 in
    assert reader.pages[0].mediabox.height == pytest.approx(792)
    assert reader.metadata.title.startswith("Job plan")


def test_cover_numbers_equal_the_check(built):
    doc, cover = built["doc"], built["texts"][0]
    assert doc["verdict"].upper() in cover
    assert f"{100 * doc['governing']['margin']:.1f} %" in cover
    assert W.fmt(doc["rig"]["string_limit"], "force", "us") in cover
    assert W.fmt(doc["rig"]["hook_limit"], "force", "us") in cover
    assert "Revision" in cover and "C" in cover and "2026-11-30" in cover
    assert "P. Planner" in cover and "Reviewed by" in cover
    assert "verify every figure against the rig maker's load chart" in cover


def test_crew_sheet_is_one_page_with_the_checks_hook_loads(built):
    texts, doc = built["texts"], built["doc"]
    i = _page_of(texts, "Crew sheet")
    page = texts[i]
    assert i == len(texts) - 1          # last page, one page: nothing runs over
    for step in doc["steps"]:
        h = step["hook_load"]
        hook = W.number(h, "force", "us", 0)
        # band: +/- 10 % of the predicted hook load (the app's default band;
        # common practice, no source)
        lo = W.number(0.9 * h, "force", "us", 0)
        hi = W.number(1.1 * h, "force", "us", 0)
        assert re.search(rf"\b{step['label']}\b.*\b{hook}\b.*{lo}-{hi}", page), step["label"]
    sched = doc["fill_schedule"]
    assert re.search(rf"\b{sched['fill_to_top_through'] + 1}\s+J{sched['fill_to_top_through'] + 1}"
                     r".*STOP filling", page)


def test_running_schedule_and_hoisting_chain_equal_the_check(built):
    texts, doc = built["texts"], built["doc"]
    i = _page_of(texts, "Running schedule")
    text = "\n".join(texts[i:i + 3])
    for step in doc["steps"][::7]:
        hook = W.number(step["hook_load"], "force", "us", 0)
        assert re.search(rf"\b{step['joint']}\s+{step['label']}\b.*\b{hook}\b", text)
    h = _page_of(texts, "Hoisting chain")
    chain = " ".join(texts[h:h + 2])
    for comp in doc["rig"]["components"]:
        assert comp["name"] in chain
        assert W.number(comp["string_limit"], "force", "us", 0) in chain


def test_same_input_same_pdf(built, tmp_path):
    again = tmp_path / "again.pdf"
    assert main(["report", str(FLOATED), "--rig", "mw80", "-o", str(again), "--revision", "C",
                 "--date", "2026-11-30", "--prepared-by", "P. Planner"]) == 0
    assert again.read_bytes() == built["path"].read_bytes()


def test_si_packet_on_a4_with_stages(tmp_path, capsys):
    out = tmp_path / "staged.pdf"
    plan = STRINGS / "cv9-14in-staged.toml"
    # lands in stages: stage 1 held on the landing string until its grout sets
    assert main(["report", str(plan), "--rig", "mw80", "--units", "si", "-o", str(out)]) == 0
    doc = _json(capsys, plan, "--rig", "mw80")
    reader = pypdf.PdfReader(str(out))
    assert reader.pages[0].mediabox.width == pytest.approx(595.3, abs=0.5)   # ISO 216 A4
    text = " ".join(" ".join(p.extract_text().split()) for p in reader.pages)
    assert "Stages and grouting" in text
    st = doc["stages"]
    assert f"joints 1-{st['split']} on the landing string" in text
    # 154 joints on A4: the crew sheet still takes one page, the last
    pages = [" ".join(p.extract_text().split()) for p in reader.pages]
    crew = [i for i, t in enumerate(pages) if t.startswith("Crew sheet")
            or " Crew sheet " in t[:200]]
    assert crew == [len(pages) - 1]
    assert f"{doc['steps'][-1]['label']} " in pages[-1]
    assert W.fmt(st["release_depth"], "length", "si", 1) in text


class _Figures(HTMLParser):
    def __init__(self):
        super().__init__()
        self.figures, self.svgs, self.stack = [], 0, []

    def handle_starttag(self, tag, attrs):
        a = dict(attrs)
        if tag == "figure":
            self.figures.append(a.get("data-figure"))
        if tag == "svg":
            self.svgs += 1
        if tag in ("table", "section", "figure"):
            self.stack.append(tag)

    def handle_endtag(self, tag):
        if tag in ("table", "section", "figure"):
            assert self.stack and self.stack[-1] == tag, f"</{tag}> closes {self.stack[-1:]}"
            self.stack.pop()


def test_html_parses_and_holds_each_chart(tmp_path, capsys):
    out = tmp_path / "plan.html"
    assert main(["report", str(FLOATED), "--rig", "mw80", "-o", str(out)]) == 0
    text = out.read_text()
    p = _Figures()
    p.feed(text)
    p.close()
    assert p.stack == []
    assert p.figures == ["schematic", "hook_load", "utilization", "fill_window"]
    assert p.svgs == 4
    assert "<script" not in text and "http" not in text.split("<svg", 1)[0]
    assert "@media print" in text and "break-inside: avoid" in text
    doc = _json(capsys, FLOATED, "--rig", "mw80")
    assert W.fmt(doc["rig"]["string_limit"], "force", "us") in text


GOLDEN = ROOT / "tests" / "golden"


@pytest.mark.parametrize("plan,rig,units,suffix", [
    ("cv7-16in-floated.toml", "mw80", "us", "md"),
    ("cv7-16in-floated.toml", "mw80", "us", "csv"),
    ("cv9-14in-staged.toml", "mw80", "si", "csv"),
])
def test_golden_files(tmp_path, plan, rig, units, suffix):
    # Byte-for-byte against the stored file: the wording and layout of the
    # demo packet change only on purpose (regenerate with
    # RIGPLAN_UPDATE_GOLDEN=1 and review the diff).
    out = tmp_path / f"out.{suffix}"
    assert main(["report", str(STRINGS / plan), "--rig", rig, "--units", units, "-o", str(out),
                 "--revision", "A", "--date", "2026-11-30"]) in (0, 1)
    golden = GOLDEN / f"{Path(plan).stem}-{units}.{suffix}"
    import os
    if os.environ.get("RIGPLAN_UPDATE_GOLDEN"):
        golden.parent.mkdir(exist_ok=True)
        shutil.copyfile(out, golden)
    assert out.read_text() == golden.read_text()


def test_csv_rows_equal_the_check(tmp_path, capsys):
    import csv
    out = tmp_path / "run.csv"
    main(["report", str(FLOATED), "--rig", "mw80", "--units", "si", "-o", str(out)])
    doc = _json(capsys, FLOATED, "--rig", "mw80")
    rows = [r for r in csv.DictReader(out.open()) if not r["step"].startswith("#")]
    assert len(rows) == len(doc["steps"])
    for row, step in zip(rows, doc["steps"]):
        assert row["joint"] == step["label"]
        assert float(row["hook load [kN]"]) == pytest.approx(step["hook_load"] / 1e3, abs=0.051)
        assert float(row["shoe depth [m]"]) == pytest.approx(step["shoe_depth"], abs=0.006)


def test_json_is_the_check_plus_the_packet_facts(tmp_path, capsys):
    out = tmp_path / "plan.json"
    main(["report", str(FLOATED), "--rig", "mw80", "-o", str(out), "--revision", "B"])
    doc = _json(capsys, FLOATED, "--rig", "mw80")
    packet = json.loads(out.read_text())
    meta = packet.pop("report")
    doc.pop("exit_code")
    assert packet == doc
    assert meta["revision"] == "B" and meta["date"] is None and meta["written"] is None
    assert meta["paper"] == "letter"


def test_report_refuses_to_write_onto_an_input(tmp_path, capsys):
    plan = tmp_path / "job.toml"
    shutil.copyfile(FLOATED, plan)
    before = plan.read_bytes()
    assert main(["report", str(plan), "--rig", "mw80", "-o", str(plan.with_suffix(".json"))]) == 0
    tally = tmp_path / "tally.csv"
    shutil.copyfile(STRINGS / "cv3-8in-a53b.tally.csv", tally)
    t_before = tally.read_bytes()
    assert main(["report", str(STRINGS / "cv3-8in-a53b.toml"), "--rig", "th30", "--tally",
                 str(tally), "-o", str(tally)]) == 2
    err = capsys.readouterr().err
    assert str(tally) in err and "input" in err and err.count("\n") == 1
    assert tally.read_bytes() == t_before and plan.read_bytes() == before
    assert main(["report", str(plan), "--rig", "mw80", "-o", str(tmp_path / "x.docx")]) == 2
    assert ".pdf" in capsys.readouterr().err


def test_plan_report_table_is_read_and_kept(tmp_path):
    from rigplan.errors import InputError
    from rigplan.files.formats.planfile import parse_plan, plan_text
    text = FLOATED.read_text() + ('\n[report]\nrevision = "D"\ndate = 2026-12-01\n'
                                  'reviewed_by = "R. Reviewer"\n')
    plan = parse_plan(text, "job.toml").plan
    assert dict(plan.report) == {"revision": "D", "date": "2026-12-01",
                                 "reviewed_by": "R. Reviewer"}
    assert parse_plan(plan_text(plan, "us"), "again.toml").plan.report == plan.report
    with pytest.raises(InputError, match="report"):
        parse_plan(text.replace("revision =", "revison ="), "job.toml")
    path = tmp_path / "job.toml"
    path.write_text(text)
    md = tmp_path / "job.md"
    assert main(["report", str(path), "--rig", "mw80", "-o", str(md)]) == 0
    cover = md.read_text().split("\n## ")[0]
    assert "| Revision | D |" in cover and "| Date | 2026-12-01 |" in cover
    assert "R. Reviewer" in cover


def test_which_rig(capsys):
    doc = _json(capsys, FLOATED, "--rig", "mw80", "--rig", "th30")
    rigs = doc["rigs"]
    single = {}
    for r in rigs:
        one = _json(capsys, FLOATED, "--rig", "mw80" if r["rig"].startswith("MW") else "th30",
                    "--path", r["path"])
        single[(r["rig"], r["path"])] = one
        assert r["verdict"] == one["verdict"]
        assert r["margin"] == pytest.approx(one["governing"]["margin"])
        assert r["string_limit"] == pytest.approx(one["rig"]["string_limit"])
    chosen = [r for r in rigs if r["chosen"]]
    assert len(chosen) == 1 and chosen[0]["lands"]
    assert chosen[0]["margin"] == max(r["margin"] for r in rigs if r["lands"])
    assert doc["exit_code"] == 0
    folder = _json(capsys, FLOATED, "--rig", RIGS)
    assert sorted((r["rig"], r["path"]) for r in folder["rigs"]) == \
        sorted((r["rig"], r["path"]) for r in rigs)


def test_cover_lists_the_other_rigs(tmp_path):
    out = tmp_path / "plan.md"
    assert main(["report", str(FLOATED), "--rig", "th30", "--rig", "mw80", "-o", str(out)]) == 0
    cover = out.read_text().split("\n## ")[0]
    assert "| Rig | MW-80" in cover
    assert "Rigs and hoisting paths considered" in cover and "TH-30" in cover


def test_as_run_record(tmp_path, capsys):
    from rigplan.files.runlog import RunLog
    plan = tmp_path / "job.toml"
    shutil.copyfile(FLOATED, plan)
    doc = _json(capsys, plan, "--rig", "mw80")
    with RunLog.for_plan(plan) as log:
        log.record_run("J1", 6.10)
        log.reject("J2", "dented pin end")
        log.record_run("J3", None)
        pred = doc["steps"][0]["hook_load"]
        log.observe(1, pred * 1.02, pred)
        log.observe(2, pred * 1.5, pred * 1.01)
    out = tmp_path / "asrun.md"
    assert main(["report", str(plan), "--rig", "mw80", "--as-run", "-o", str(out),
                 "--units", "si"]) in (0, 1)
    text = out.read_text()
    record = text.split("## Record of the run")[1]
    assert "| J2 | screen | 6.10 |  |  | set aside | dented pin end |" in record
    assert re.search(r"\| J1 \| sump \| 6\.10 \| 6\.10 \| 0\.00 \| run #1 \|", record)
    alarms = record.split("### Alarms raised")[1]
    assert alarms.count("\n| 2 |") == 1 and "\n| 1 |" not in alarms
    assert "### Landed depths against the plan" in record


def test_schematic_geometry_identities(capsys):
    from rigplan.files.job import load_job, plan_job
    from rigplan.present.packet.schematic import governing_step, well_schematic
    job = load_job(FLOATED, "mw80")
    lp = plan_job(job.plan, job.rig)
    s = well_schematic(lp)
    lengths = lp.joints.length
    # identity: landed shoe = sum of the joint lengths run
    assert s.mark("shoe").depth == pytest.approx(float(lengths.sum()))
    # identity: a collar on joint m sits the shoe track's length above the shoe
    m = lp.chosen.closure.valve_joint
    assert s.mark("float collar").depth == pytest.approx(float(lengths.sum() - lengths[:m].sum()))
    screens = s.boxes_of("screen")
    assert len(screens) == 1
    assert screens[0].bottom - screens[0].top == pytest.approx(float(lengths[1:5].sum()))
    k = governing_step(lp)
    at = well_schematic(lp, k)
    assert at.mark("shoe").depth == pytest.approx(float(lp.chosen.loads.shoe_depth[k - 1]))
    assert at.mark("fill level inside").depth == pytest.approx(
        max(0.0, float(lp.chosen.loads.fill_level[k - 1])), abs=1e-9)
    # the step shown is the governing limit's step, or else the fill
    # schedule's least-margin step (a limit of one joint has no step)
    doc = _json(capsys, FLOATED, "--rig", "mw80")
    want = doc["governing"]["step"] or doc["fill_schedule"]["least_margin_step"]
    assert k == want


def test_report_libraries_load_only_when_writing():
    code = ("import sys, rigplan.cli, rigplan.present.packet, rigplan.present.packet.schematic; "
            "print([m for m in ('matplotlib', 'reportlab') if m in sys.modules])")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "[]"


def test_as_run_record_keeps_an_undone_alarm(tmp_path, capsys):
    # a reading that left its band and was then undone stays in the record,
    # marked as withdrawn; a reading inside the band that was undone does not
    # become an alarm
    from rigplan.files.runlog import RunLog
    plan = tmp_path / "job.toml"
    shutil.copyfile(FLOATED, plan)
    doc = _json(capsys, plan, "--rig", "mw80")
    with RunLog.for_plan(plan) as log:
        log.record_run("J1", 6.10)
        pred = doc["steps"][0]["hook_load"]
        log.observe(1, pred * 1.5, pred)        # 50 % over: outside a 10 % band
        log.undo()
        log.observe(1, pred * 1.01, pred)       # inside
        log.undo()
    out = tmp_path / "asrun.md"
    assert main(["report", str(plan), "--rig", "mw80", "--as-run", "-o", str(out),
                 "--units", "si"]) in (0, 1)
    record = out.read_text().split("## Record of the run")[1]
    alarms = record.split("### Alarms raised")[1].split("\n## ")[0]
    assert "No reading left its band" not in alarms
    assert alarms.count("\n| 1 |") == 1 and "withdrawn (undone) at" in alarms
