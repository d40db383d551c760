"""The command line: verdicts, exit codes, JSON keys, one-line input errors.

The demo jobs are invented; these tests check only that each gets the
verdict its scenario was built for (the acceptance criteria), never a
number from them.
"""

import json
from pathlib import Path

import pytest

from rigplan.cli import main

ROOT = Path(__file__).resolve().parents[1]
STRINGS = ROOT / "strings"
RIGS = ROOT / "rigs"

DEMOS = [
    ("cv3-8in-a53b.toml", "th30", "lands open", 0),
    ("cv7-16in-floated.toml", "mw80", "lands with float plan", 0),
    # staged split found, but stage 1 on bottom buckles its screens
    ("cv9-14in-staged.toml", "mw80", "lands in stages", 0),
]


def run_json(capsys, *args):
    code = main(["check", *args, "--format", "json"])
    out = capsys.readouterr().out
    return code, json.loads(out)


@pytest.mark.parametrize("plan,rig,verdict,code", DEMOS)
def test_demo_verdicts(capsys, plan, rig, verdict, code):
    got, doc = run_json(capsys, str(STRINGS / plan), "--rig", rig)
    assert doc["verdict"] == verdict
    assert got == code


def test_pvc_demo_says_floating_would_collapse(capsys):
    # Scenario built so that a float shoe left empty collapses the PVC.
    _, doc = run_json(capsys, str(STRINGS / "cv12-pvc-floated.toml"), "--rig", "th30")
    assert any("collapse" in note for note in doc["notes"])


def test_json_keys_and_si_values(capsys):
    _, doc = run_json(capsys, str(STRINGS / "cv7-16in-floated.toml"), "--rig", "mw80")
    for key in ("verdict", "governing", "steps", "connections", "joints", "fill_window",
                "fill_schedule", "stages", "grouting", "cautions"):
        assert key in doc
    step = doc["steps"][-1]
    for key in ("joint", "shoe_depth", "hook_load", "hook_limit"):
        assert key in step
    con = doc["connections"][0]
    for key in ("joint", "depth", "max_true_tension", "capacity", "utilization"):
        assert key in con
    jt = doc["joints"][0]
    for key in ("collapse_rating", "max_collapse_load", "burst_rating"):
        assert key in jt
    for key in ("joint", "min_fill_level", "max_fill_level", "closing_limit"):
        assert key in doc["fill_window"][0]
    # SI: shoe depth in metres equals the sum of the joint lengths in metres
    total = sum(j["length"] for j in doc["joints"])
    assert abs(step["shoe_depth"] - total) < 1e-6 * total
    # hook load = string load + dead load
    assert abs(step["hook_load"] - step["string_load"] - doc["rig"]["dead_load"]) < 1e-6


def test_text_output_has_verdict_table_and_cautions(capsys):
    code = main(["check", str(STRINGS / "cv3-8in-a53b.toml"), "--rig", "th30", "--units", "si"])
    out = capsys.readouterr().out
    assert code == 0
    assert "LANDS OPEN" in out and "Running steps" in out and "CAUTION" in out
    assert " m " in out or " m\n" in out


def test_exceeds_rig_exit_1(tmp_path, capsys):
    # A rig too small for anything: every plan fails, exit 1.
    rig = tmp_path / "tiny.toml"
    rig.write_text('name = "tiny"\nunits = "us"\n[[path]]\nname = "p"\n'
                   'mast_rating = "500 lbf"\ndead_load = "100 lbf"\n')
    code = main(["check", str(STRINGS / "cv3-8in-a53b.toml"), "--rig", str(rig)])
    capsys.readouterr()
    assert code == 1


BAD = [
    ("wall", 'wall = "9 in"', "wall"),
    ("negative length", 'joint_length = "-20 ft"', "joint_length"),
    ("zero density", None, "fluid_density"),
    ("ellipticity", "ellipticity = 1.0", "ellipticity"),
    ("material", 'material = "unobtainium"', "material"),
    ("unit", 'wall = "0.375 furlong"', "wall"),
]


def _plan(extra_section="", density='"9.0 ppg"'):
    return f'''units = "us"
name = "bad"
well = "B-1"
[hole]
fluid_density = {density}
[[section]]
kind = "blank"
material = "a53b"
od = "8-5/8 in"
wall = "0.25 in"
joint_length = "20 ft"
count = 5
weld_efficiency = 0.85
'''.replace('wall = "0.25 in"\n', 'wall = "0.25 in"\n' if "wall" not in extra_section else "") \
        .replace('joint_length = "20 ft"\n', 'joint_length = "20 ft"\n' if "joint_length" not in extra_section else "") \
        .replace('material = "a53b"\n', 'material = "a53b"\n' if "material" not in extra_section else "") \
        + extra_section + "\n"


@pytest.mark.parametrize("name,line,key", BAD)
def test_bad_input_one_line_exit_2(tmp_path, capsys, name, line, key):
    p = tmp_path / "bad.toml"
    if line is None:
        p.write_text(_plan(density='"0 ppg"'))
    else:
        p.write_text(_plan(line))
    code = main(["check", str(p), "--rig", "th30"])
    err = capsys.readouterr().err.strip()
    assert code == 2
    assert len(err.splitlines()) == 1
    assert "bad.toml" in err and key in err


def test_missing_plan_and_rig_exit_2(tmp_path, capsys):
    assert main(["check", str(tmp_path / "nope.toml"), "--rig", "th30"]) == 2
    assert main(["check", str(STRINGS / "cv3-8in-a53b.toml"), "--rig", "no-such-rig"]) == 2
    err = capsys.readouterr().err
    assert "nope.toml" in err and "no-such-rig" in err


def test_report_html(tmp_path, capsys):
    out = tmp_path / "plan.html"
    assert main(["report", str(STRINGS / "cv7-16in-floated.toml"), "--rig", "mw80",
                 "-o", str(out)]) == 0
    text = out.read_text()
    assert "<html" in text.lower() and "caution" in text.lower()


def test_screen_above_a_float_shoe_cannot_float(tmp_path, capsys):
    # Common practice, no source: slotted or wire-wrap screen lets hole fluid
    # into the bore, so a check valve below it floats nothing; the float
    # collar must sit on the top screen joint or above.
    plan = tmp_path / "scr.toml"
    plan.write_text('''units = "us"
name = "screens"
well = "S-1"
[hole]
fluid_density = "9.4 ppg"
[[section]]
kind = "screen"
material = "ss304"
od = "16 in"
wall = "0.375 in"
joint_length = "20 ft"
count = 3
weld_efficiency = 0.85
tensile_rating = "90000 lbf"
collapse_rating = "200 psi"
weight_per_length = "38 lb/ft"
[[section]]
kind = "blank"
material = "a53b"
od = "16 in"
wall = "0.375 in"
joint_length = "20 ft"
count = 60
weld_efficiency = 0.85
[float_equipment]
type = "float_shoe"
''')
    code, doc = run_json(capsys, str(plan), "--rig", "th30")
    shoe = [o for o in doc["float_options"] if o["closure"] == "float shoe"]
    assert shoe and not shoe[0]["lands"] and "screen above the check valve" in shoe[0]["reason"]
    # the planner offers a float collar on the top screen joint instead
    assert any(o["valve_joint"] == 3 for o in doc["float_options"])


def test_tally_and_as_run_override_planned_lengths(tmp_path, capsys):
    # Rule of the trade (common practice, no source): a measured tally
    # length beats the nominal one.  Lengths are compared in metres after
    # the exact foot (NIST SP 811: 1 ft = 0.3048 m).
    import shutil
    from rigplan.files.runlog import RunLog, log_path_for
    plan = tmp_path / "cv7.toml"
    shutil.copy(STRINGS / "cv7-16in-floated.toml", plan)
    tally = tmp_path / "t.csv"
    tally.write_text("label,measured_length [ft],status\nJ1,21.5,run\nJ7,19.25,run\n")
    _, doc = run_json(capsys, str(plan), "--rig", "mw80", "--tally", str(tally))
    lengths = {j["label"]: j["length"] for j in doc["joints"]}
    assert abs(lengths["J1"] - 21.5 * 0.3048) < 1e-9
    assert abs(lengths["J7"] - 19.25 * 0.3048) < 1e-9
    with RunLog(log_path_for(plan)) as log:
        log.record_run("J1", 6.2)
        log.reject("J2", "dented")
    _, doc = run_json(capsys, str(plan), "--rig", "mw80", "--as-run")
    labels = [j["label"] for j in doc["joints"]]
    assert "J2" not in labels and abs(doc["joints"][0]["length"] - 6.2) < 1e-12
    # the float collar stays on its joint (J5) with J2 set aside
    assert doc["fill_schedule"]["valve_joint"] == labels.index("J5") + 1


def test_tally_slip_is_flagged_and_a_string_longer_than_the_hole_cannot_land(tmp_path, capsys):
    # Common practice, no source: a casing string longer than the drilled
    # hole cannot be landed; a tally length far from the joint's planned
    # length is a slip to check (60 typed for 20.06); a length no joint has
    # (2006 ft) is refused outright (rigplan.files.ranges: joint_length).
    import shutil
    plan = tmp_path / "cv3.toml"
    shutil.copy(STRINGS / "cv3-8in-a53b.toml", plan)
    shutil.copy(STRINGS / "cv3-8in-a53b.tally.csv", tmp_path / "cv3-8in-a53b.tally.csv")
    tally = tmp_path / "slip.csv"
    tally.write_text("label,measured_length [ft],status\nJ8,2006,run\n")
    code, doc = run_json(capsys, str(plan), "--rig", "th30", "--tally", str(tally))
    assert code == 2 and doc["error"].startswith(f"{tally}: row 2, measured_length")
    tally.write_text("label,measured_length [ft],status\nJ8,60,run\n")
    code, doc = run_json(capsys, str(plan), "--rig", "th30", "--tally", str(tally))
    assert any("J8" in w and "check the tally" in w for w in doc["warnings"])
    assert doc["verdict"] == "cannot land" and code == 1
    assert doc["governing"]["name"] == "hole depth"
