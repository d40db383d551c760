"""Command-line edges: display units by default, one-line usage errors,
cautions in every output, error lines with units.

Rules checked are the project's own (the rule is named beside each test):
every bad input is one line naming the file and key with units and range,
exit 2; every output carries the caution; an SI job is shown in SI.
Plans here are invented; no number from them is a check value.
"""

import json

import pytest

from rigplan.cli import main

SI_PLAN = '''version = 1
units = "si"
name = "SI edge"
[hole]
fluid_density = 1100
depth = 190
[[section]]
kind = "blank"
material = "a53b"
od = 273.1
wall = 9.27
joint_length = 6
count = 30
weld_efficiency = 0.85
'''


@pytest.fixture
def si_plan(tmp_path):
    p = tmp_path / "si.toml"
    p.write_text(SI_PLAN)
    return p


def test_si_plan_is_shown_in_si_by_default(si_plan, capsys):
    """Rule of the project: the display units default to the plan file's units."""
    main(["check", str(si_plan), "--rig", "mw80", "--brief"])
    out = capsys.readouterr().out
    assert " kN" in out and " lbf" not in out
    main(["check", str(si_plan), "--rig", "mw80", "--brief", "--units", "us"])
    out = capsys.readouterr().out
    assert " lbf" in out


def test_si_plan_report_is_on_a4_by_default(si_plan, tmp_path, capsys):
    """Rule of the project (README, --paper): A4 for SI, Letter for US units."""
    out = tmp_path / "si.json"
    main(["report", str(si_plan), "--rig", "mw80", "-o", str(out)])
    assert json.loads(out.read_text())["report"]["paper"] == "a4"
    main(["report", str(si_plan), "--rig", "mw80", "-o", str(out), "--units", "us"])
    assert json.loads(out.read_text())["report"]["paper"] == "letter"
    capsys.readouterr()


@pytest.mark.parametrize("cmd", ["check", "report", "place", "liner", "risk", "open"])
def test_bad_choice_is_one_line_naming_option_and_choices(cmd, si_plan, capsys):
    """Rule of the project: a bad input is one line, exit 2."""
    code = main([cmd, str(si_plan), "--rig", "mw80", "--units", "metric", "-o", "x.pdf"])
    err = capsys.readouterr().err.strip()
    assert code == 2
    assert len(err.splitlines()) == 1
    assert "--units" in err and "'us'" in err and "'si'" in err and "usage" not in err


API_PLAN = '''units = "us"
name = "API coupled"
[hole]
fluid_density = "8.8 ppg"
depth = "900 ft"
diameter = "12-1/4 in"
[[section]]
kind = "blank"
material = "k55"
od = "9-5/8 in"
wall = "0.352 in"
joint_length = "40 ft"
count = 20
connection = "threaded_coupled"
connection_rating = "423000 lbf"
weight_per_length = "36 lb/ft"
'''


def test_packet_states_the_engines_rating_basis_and_the_buckling_check(tmp_path, capsys):
    """API TR 5C3 rates API grades on the specified wall (its collapse constants
    and the 0.875 of internal yield carry the wall tolerance); the packet must
    say so, and say that buckling below the neutral point is checked (Lubinski
    1950), as the engine does."""
    plan = tmp_path / "api.toml"
    plan.write_text(API_PLAN)
    out = tmp_path / "api.md"
    main(["report", str(plan), "--rig", "mw80", "-o", str(out)])
    capsys.readouterr()
    text = out.read_text()
    assert "Buckling is not checked" not in text
    assert "Buckling below the neutral point is checked" in text and "Lubinski (1950)" in text
    assert "API-grade figures therefore sit below the API tables" not in text
    makeup = [ln for ln in text.splitlines() if ln.startswith("| 1-20 |")]
    assert makeup and "all three: specified wall" in makeup[0]


@pytest.mark.parametrize("suffix", ["csv", "md", "html", "json", "pdf"])
def test_every_report_format_carries_the_caution(suffix, tmp_path, capsys):
    """Rule of the project: every output carries the caution (a planning aid;
    verify against the rig maker's load chart and the pipe maker's ratings)."""
    from rigplan.present.wording import CAUTION
    plan = tmp_path / "api.toml"
    plan.write_text(API_PLAN)
    out = tmp_path / f"api.{suffix}"
    main(["report", str(plan), "--rig", "mw80", "-o", str(out)])
    capsys.readouterr()
    if suffix == "pdf":
        from pypdf import PdfReader
        text = " ".join(p.extract_text() for p in PdfReader(out).pages)
        assert "Planning aid only" in " ".join(text.split())
        return
    text = out.read_text()
    if suffix == "html":
        import html
        text = html.unescape(text)
    assert CAUTION in text
    if suffix == "csv":
        import csv
        rows = list(csv.reader(text.splitlines()))
        assert rows[-1] == [f"# CAUTION: {CAUTION}"]


@pytest.mark.parametrize("old, new, key, words", [
    # the wall of half the od or more, od plausible: the wall is named, with units
    ("wall = 9.27", "wall = 140", "section[1].wall", ["140 mm", "273.1 mm", "less than"]),
    # an od in inches in an SI file (10.75 for 10.75 in): the od is named, with its range
    ("od = 273.1", "od = 10.75", "section[1].od", ["10.75 mm", "implausibly small",
                                                   "25.4 mm"]),
    ("depth = 190", "depth = 190\nfluid_level = 400", "hole.fluid_level",
     ["400 m", "190 m", "expected"]),
    # a bare number out of range: the unit it was read in is said
    ("wall = 9.27", "wall = 200", "section[1].wall", ["got 200 mm", "file's units"]),
])
def test_error_lines_name_the_right_key_with_units(old, new, key, words, tmp_path, capsys):
    """Rule of the project: one line naming the file and key, with what was
    expected in units and range (exit 2)."""
    p = tmp_path / "bad.toml"
    p.write_text(SI_PLAN.replace(old, new))
    assert main(["check", str(p), "--rig", "mw80"]) == 2
    err = capsys.readouterr().err.strip()
    assert len(err.splitlines()) == 1 and f"bad.toml: {key}:" in err
    for w in words:
        assert w in err, (w, err)


def test_tally_length_warning_names_the_tally_file_and_row(si_plan, tmp_path, capsys):
    """Rule of the project: a message names the file and row it comes from."""
    tally = tmp_path / "rack.tally.csv"
    tally.write_text("label,measured_length [ft],status\nJ1,20.1,run\nJ2,90,run\n")
    main(["check", str(si_plan), "--rig", "mw80", "--tally", str(tally), "--brief"])
    out = capsys.readouterr().out
    line = next(ln for ln in out.splitlines() if "J2: measured" in ln)
    assert f"{tally}: row 3: J2" in line and "si.toml" not in line


def test_brief_is_the_summary_the_edges_and_the_governing_joint(capsys):
    """Rule of the project (README, check --brief): the summary, the first and
    last 10 steps with the most loaded one, and one joint; no hoisting chain."""
    from pathlib import Path
    plan = Path(__file__).resolve().parents[1] / "strings" / "cv7-16in-floated.toml"
    main(["check", str(plan), "--rig", "mw80", "--brief", "--units", "us"])
    out = capsys.readouterr().out
    assert "Hoisting chain" not in out
    assert "utilization (design factors applied)" in out
    joint_rows = [ln for ln in out.split("utilization (design factors applied)")[-1]
                  .splitlines() if ln.startswith("│")]
    assert len(joint_rows) == 1
    steps = out.split("Running steps")[1].split("Least tension")[0]
    assert "│ 59 J59 │" in steps and "│ 30 J30 │" not in steps


def test_several_rigs_table_gives_the_string_limit_unit(capsys):
    """Rule of the project: every quantity shown with its unit."""
    from pathlib import Path
    plan = Path(__file__).resolve().parents[1] / "strings" / "cv7-16in-floated.toml"
    main(["check", str(plan), "--rig", "mw80", "--rig", "th30", "--units", "us"])
    assert "string limit [lbf]" in capsys.readouterr().out


def test_screen_depth_off_plan_is_warned_by_check_tally(tmp_path, capsys):
    """Rule of the project (the plan's screen_depth_tolerance, 2 ft by
    default): a joint set aside above the screens lifts them one joint
    (20 ft: the plan's joint length), so check --tally warns, naming the tally."""
    from pathlib import Path
    plan = Path(__file__).resolve().parents[1] / "strings" / "cv7-16in-floated.toml"
    tally = tmp_path / "aside.tally.csv"
    tally.write_text("label,status,note\nJ8,rejected,dented pin\n")
    main(["check", str(plan), "--rig", "mw80", "--tally", str(tally), "--brief",
          "--units", "us"])
    out = " ".join(capsys.readouterr().out.split())
    assert f"{tally}: screen J2-J5 lands -20.00 ft from its planned depth" in out
    tally.write_text("label,status,note\nJ8,run,\n")
    main(["check", str(plan), "--rig", "mw80", "--tally", str(tally), "--brief"])
    assert "from its planned depth" not in capsys.readouterr().out


@pytest.mark.parametrize("args", [
    ["check", "{plan}", "--rig", "mw80", "--rig", "th30", "--format", "json"],
    ["place", "{plan}", "--rig", "mw80", "--tally", "{rack}", "--format", "json"],
    ["place", "{plan}", "--rig", "mw80", "--tally", "{rack}", "-o", "{out}"],
])
def test_other_outputs_carry_the_caution(args, tmp_path, capsys):
    """Rule of the project: every output carries the caution."""
    from pathlib import Path
    from rigplan.present.wording import CAUTION
    strings = Path(__file__).resolve().parents[1] / "strings"
    out = tmp_path / "placed.tally.csv"
    fill = {"{plan}": str(strings / "cv7-16in-floated.toml"),
            "{rack}": str(strings / "cv7-16in-floated.rack.tally.csv"), "{out}": str(out)}
    main([fill.get(a, a) for a in args])
    text = capsys.readouterr().out
    assert CAUTION in text
    if out.exists():
        assert f"# CAUTION: {CAUTION}" in out.read_text()
