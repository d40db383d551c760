"""The presentation layer (rigplan.present.wording): one unit system at a
time, every finding code worded, codes beside the texts in the JSON.

The demo jobs are invented; these tests never check a number from them,
only which units and codes appear.
"""

import json
import re
from pathlib import Path

import pytest

from rigplan.cli import main
from rigplan.engine.findings import Finding, Kind, Verdict
from rigplan.engine.floatplan import FloatCode
from rigplan.engine.grouting import GroutCode
from rigplan.engine.planner import PlanCode
from rigplan.engine.staging import StagingCode
from rigplan.files.job import DEMO_JOBS, JobCode, load_job, plan_job
from rigplan.present import wording as W
from _units import ft, lbf, psi

ROOT = Path(__file__).resolve().parents[1]
PLANS = sorted((ROOT / "strings").glob("*.toml"))
RIGS = ("mw80", "th30")

#: A number followed by a unit of the other system (or the unit as a
#: column title in brackets).
US_UNIT = re.compile(r"(\d\s*(ft|in|lbf|psi|ppg|gal|lb/ft)\b)|\[(ft|in|lbf|psi|ppg|gal|lb/ft)\]")
SI_UNIT = re.compile(r"(\d\s*(m|mm|kN|kPa|MPa|kg/m3|kg/m\^3|kg/m|L)\b)|\[(m|mm|kN|kPa|MPa|kg/m3|L)\]")


def _check_text(capsys, monkeypatch, plan, rig, units):
    monkeypatch.setenv("COLUMNS", "400")        # no wrapping between a number and its unit
    main(["check", str(plan), "--rig", rig, "--units", units])
    out = capsys.readouterr().out
    job = load_job(plan, rig)
    names = [x for x in (job.plan.name, job.plan.well, job.plan.site) if x]
    lines = []
    for line in out.splitlines():
        if line.lstrip("│ ").startswith(job.plan.name) or "CAUTION" in line:
            continue                            # the user's own names; the caution
        for name in names:
            line = line.replace(name, "")
        lines.append(line)
    return "\n".join(lines)


@pytest.mark.parametrize("rig", RIGS)
@pytest.mark.parametrize("plan", PLANS, ids=lambda p: p.stem)
def test_si_text_has_no_us_unit_and_us_text_no_si_unit(capsys, monkeypatch, plan, rig):
    si = _check_text(capsys, monkeypatch, plan, rig, "si")
    assert not US_UNIT.search(si), US_UNIT.search(si)
    assert re.search(r"\d (m|kN)\b", si)        # and it does show SI
    us = _check_text(capsys, monkeypatch, plan, rig, "us")
    assert not SI_UNIT.search(us), SI_UNIT.search(us)
    assert re.search(r"\d (ft|lbf)\b", us)


@pytest.mark.parametrize("rig", RIGS)
@pytest.mark.parametrize("plan", PLANS, ids=lambda p: p.stem)
def test_app_lines_keep_to_one_unit_system(plan, rig):
    # The lines the app's Overview shows come from the same layer.
    job = load_job(plan, rig)
    lp = plan_job(job.plan, job.rig)
    for system, other in (("si", US_UNIT), ("us", SI_UNIT)):
        lines = [W.governing_text(lp, system), W.path_text(lp, system), W.float_text(lp, system),
                 W.fill_plan_text(lp, system), W.next_action(lp, system),
                 *W.reason_lines(lp, system),
                 *(W.fill_instruction(lp, k, system) for k in range(lp.joints.n))]
        text = "\n".join(lines)
        assert not other.search(text), other.search(text)


def test_both_units_only_when_asked(capsys, monkeypatch, strings_dir):
    plan = strings_dir / "cv7-16in-floated.toml"
    both = _check_text(capsys, monkeypatch, plan, "mw80", "si")
    assert not US_UNIT.search(both)
    monkeypatch.setenv("COLUMNS", "400")
    main(["check", str(plan), "--rig", "mw80", "--units", "si", "--both-units"])
    out = capsys.readouterr().out
    assert re.search(r"\d kN \([\d,]+ lbf\)", out)           # SI first, US beside it


def test_quantities_by_kind_with_thousands_separators():
    # NIST SP 811 (2008), Appendix B: 1 lbf = 4.4482216152605 N, 1 ft = 0.3048 m,
    # 1 psi = 6894.757293168361 Pa.
    assert W.fmt(25000 * lbf, Kind.FORCE, "us") == "25,000 lbf"
    assert W.fmt(1600 * ft, Kind.DEPTH, "us", 0) == "1,600 ft"
    assert W.fmt(1600 * ft, Kind.DEPTH, "si", 1) == "487.7 m"
    assert W.fmt(1500 * psi, Kind.PRESSURE, "us") == "1,500 psi"
    assert W.fmt(1600 * ft, Kind.LENGTH, "us+si", 0) == "1,600 ft (487.68 m)"
    assert W.fmt(float("nan"), Kind.FORCE, "us") == "n/a"
    assert W.fmt(float("nan"), Kind.FORCE, "us", missing="unrated") == "unrated"
    # fractions one way everywhere: one decimal, a space, the percent sign
    assert W.percent(0.1234) == "12.3 %" and W.fmt(-1.5, Kind.RATIO, "si") == "-150.0 %"
    # what a prompt starts with reads back with the parser: no separators
    assert W.plain(25000 * lbf, Kind.FORCE, "us", 0) == "25000 lbf"


CODE_ENUMS = (PlanCode, FloatCode, StagingCode, GroutCode, JobCode)


def _sample(code):
    q = {"fill_density": (1150.0, Kind.DENSITY), "longest_empty": (100.0, Kind.LENGTH),
         "string_length": (500.0, Kind.LENGTH), "hole_depth": (490.0, Kind.DEPTH),
         "grout_density": (1500.0, Kind.DENSITY), "hole_fluid_density": (1600.0, Kind.DENSITY),
         "design_factor": (0.9, Kind.RATIO), "height": (30.0, Kind.LENGTH),
         "base": (10.0, Kind.LENGTH), "utilization": (1.2, Kind.RATIO),
         "measured": (6.0, Kind.LENGTH), "planned": (12.0, Kind.LENGTH),
         "load": (1e5, Kind.FORCE), "capacity": (9e4, Kind.FORCE), "margin": (-0.1, Kind.RATIO),
         "set_down": (4e4, Kind.FORCE), "max_set_down": (3e4, Kind.FORCE),
         "shift": (-5.0, Kind.LENGTH), "tolerance": (0.6, Kind.LENGTH),
         "empty_load": (5e4, Kind.FORCE),
         "grout_top": (100.0, Kind.DEPTH), "screen_top": (150.0, Kind.DEPTH),
         "screen_bottom": (160.0, Kind.DEPTH)}
    ctx = {"limit": "collapse", "valve_joint": 3, "planned": True, "count": 2, "part": "burst",
           "component": "mast", "path": "main", "empty_limit": "collapse",
           "full_limit": "hoisting capacity", "labels": "J4", "lifts": 10, "message": "m",
           "source": "plan.toml"}
    cause = Finding(StagingCode.SINGLE_JOINT)
    return Finding(code, joint=4, step=4, label="J4", quantities=q, context=ctx, cause=cause)


@pytest.mark.parametrize("code", [c for e in CODE_ENUMS for c in e], ids=str)
def test_every_finding_code_is_worded(code):
    text = W.finding_text(_sample(code), "us")
    assert text and code.value not in text
    assert not SI_UNIT.search(text)


def test_json_keeps_its_keys_and_adds_codes(capsys, strings_dir):
    main(["check", str(strings_dir / "cv7-16in-floated.toml"), "--rig", "th30",
          "--format", "json"])
    doc = json.loads(capsys.readouterr().out)
    assert doc["verdict"] == Verdict.CANNOT_LAND
    for key, codes in (("reasons", "reason_codes"), ("notes", "note_codes"),
                       ("warnings", "warning_codes"), ("unrated", "unrated_codes")):
        assert len(doc[codes]) == len(doc[key])
    assert PlanCode.OPEN_FAILS in doc["reason_codes"]
    assert doc["reasons"][doc["reason_codes"].index(PlanCode.OPEN_FAILS)].startswith("open-ended")
    failing = [o for o in doc["float_options"] if not o["lands"]]
    assert failing and all(o["reason_code"] and o["reason"] for o in failing)
    assert doc["governing"]["where"] and doc["governing"]["name"] == "hoisting capacity"


def test_demo_table_is_the_readme_table(repo_root):
    # The verdicts `rigplan demo` holds the demo jobs to are the README's.
    readme = (repo_root / "README.md").read_text()
    for plan, rig, verdict in DEMO_JOBS:
        row = next(line for line in readme.splitlines() if line.startswith(f"| `{plan}`"))
        cells = [c.strip() for c in row.strip("|").split("|")]
        assert cells[1] == f"`{rig.removesuffix('.toml')}`"
        assert cells[2].startswith(verdict.value), (plan, cells[2])


def test_demo_exits_0_when_every_verdict_is_the_promised_one(capsys):
    assert main(["demo"]) == 0
    out = capsys.readouterr().out
    assert "promises" not in out
