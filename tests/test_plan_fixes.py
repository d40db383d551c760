"""Crew-facing fixes of the landing plan: the check valve left out of an
open-ended or staged run, float equipment named twice, the first step over
a limit, one basis for the least margin, an empty string too heavy, grout
over the screens, the fill schedule volumes and a string as long as the hole.
"""

import dataclasses
import json
from pathlib import Path

import numpy as np
import pytest

from rigplan.cli import main
from rigplan.engine.axial import running_loads
from rigplan.engine.hoisting import HoistPath, LandingString, Rig
from rigplan.engine.planner import PlanCode, plan_landing
from rigplan.engine.findings import Verdict
from rigplan.engine.rating import rate_joints
from rigplan.engine.stringmodel import Closure, Hole, JointSpec, Settings
from rigplan.files.formats import InputError
from rigplan.files.formats.planfile import parse_plan
from rigplan.present.wording import finding_text
from _units import inch

STRINGS = Path(__file__).resolve().parent.parent / "strings"
HOLE = Hole(1150.0, diameter=22 * inch)


def string(n=24, screens=(), kinds=None):
    """16 in x 0.375 in A53 B, 12 m joints, screens with entered ratings."""
    kinds = kinds or {}
    return rate_joints([JointSpec(
        f"J{i + 1}", kinds.get(i + 1, "screen" if i + 1 in screens else "blank"), "a53b",
        od=16 * inch, wall=0.375 * inch, length=12.0, weld_efficiency=0.85,
        tensile_rating=5e6 if i + 1 in screens else None,
        collapse_rating=2e6 if i + 1 in screens else None,
        burst_rating=5e6 if i + 1 in screens else None) for i in range(n)])


def open_peak(joints):
    return float(running_loads(joints, HOLE, Closure()).string_load.max())


def rig(limit, landing_string=None):
    return Rig("test rig", (HoistPath("main", mast_rating=limit),), landing_string)


def leave_out(lp):
    return [f for f in lp.notes if f.code == PlanCode.LEAVE_VALVE_OUT]


# ---------------------------------------------------------------------------
# F21: the valve must come out when the plan shown runs open-ended
# (common practice, no source: an open-ended or staged plan is computed with
# the pipe full of hole fluid; a check valve in the string keeps it empty).

def test_staged_plan_with_a_planned_collar_tells_the_crew_to_leave_it_out():
    j = string(screens=(24,))
    peak = open_peak(j)
    lp = plan_landing(j, HOLE, rig(0.8 * peak, LandingString("drill pipe", 300.0, 10 * peak)),
                      Settings(), closure=Closure(5))
    assert lp.verdict == Verdict.LANDS_STAGED
    (f,) = leave_out(lp)
    assert f.get("valve_joint") == 5 and f.get("staged") is True
    text = finding_text(f, "us")
    assert "RUN WITHOUT THE CHECK VALVE" in text and "float collar at the top of J5" in text
    assert "in stages" in text


def test_open_plan_with_float_kinds_only_tells_the_crew_too():
    j = string(kinds={1: "float_shoe"})
    lp = plan_landing(j, HOLE, rig(2 * open_peak(j)), Settings())
    assert lp.verdict == Verdict.LANDS_OPEN
    (f,) = leave_out(lp)
    assert f.get("float_joints") == ("J1",) and f.get("staged") is False
    assert "float equipment joint J1" in finding_text(f, "si")


def test_floated_plan_keeps_its_valve():
    j = string()
    lp = plan_landing(j, HOLE, rig(0.8 * open_peak(j)), Settings(), closure=Closure(0))
    assert lp.verdict == Verdict.LANDS_FLOATED
    assert leave_out(lp) == []


def test_open_plan_without_float_equipment_says_nothing():
    j = string()
    lp = plan_landing(j, HOLE, rig(2 * open_peak(j)), Settings())
    assert leave_out(lp) == []


def test_bundled_staged_plan_names_it_in_json_and_on_the_crew_sheet(tmp_path, capsys):
    assert main(["check", str(STRINGS / "cv9-14in-staged.toml"), "--rig", "mw80",
                 "--format", "json"]) == 0
    doc = json.loads(capsys.readouterr().out)
    assert doc["verdict"] == "lands in stages"
    k = doc["note_codes"].index("plan.leave_valve_out")
    assert doc["notes"][k].startswith("RUN WITHOUT THE CHECK VALVE")
    assert main(["check", str(STRINGS / "cv9-14in-staged.toml"), "--rig", "mw80"]) == 0
    assert "crew action: RUN WITHOUT THE CHECK VALVE" in capsys.readouterr().out
    out = tmp_path / "cv9.md"
    assert main(["report", str(STRINGS / "cv9-14in-staged.toml"), "--rig", "mw80",
                 "-o", str(out)]) == 0
    crew = out.read_text().split("Crew sheet", 1)[1]
    assert "RUN WITHOUT THE CHECK VALVE" in crew


# ---------------------------------------------------------------------------
# F18: joint kinds and [float_equipment] must name the same valve
# (common practice, no source: one check valve, in one place).

PLAN = """
units = "us"
name = "t"
[hole]
fluid_density = "9.0 ppg"
depth = "500 ft"
[[section]]
kind = "{k1}"
material = "a53b"
od = "8-5/8 in"
wall = "0.250 in"
joint_length = "20 ft"
count = {n1}
[[section]]
kind = "{k2}"
material = "a53b"
od = "8-5/8 in"
wall = "0.250 in"
joint_length = "20 ft"
count = 1
[[section]]
kind = "blank"
material = "a53b"
od = "8-5/8 in"
wall = "0.250 in"
joint_length = "20 ft"
count = 8
"""


def plan_text(k1="blank", n1=1, k2="blank", table=""):
    return PLAN.format(k1=k1, n1=n1, k2=k2) + table


def refused(text):
    with pytest.raises(InputError) as err:
        parse_plan(text, "p.toml")
    msg = str(err.value)
    assert "\n" not in msg
    return msg


COLLAR3 = '[float_equipment]\ntype = "float_collar"\ncollar_joint = 3\n'
SHOE = '[float_equipment]\ntype = "float_shoe"\n'


def test_float_shoe_joint_under_a_planned_collar_is_refused():
    msg = refused(plan_text(k1="float_shoe", table=COLLAR3))
    assert msg.startswith("p.toml: section[1].kind: J1 is a float_shoe joint but "
                          "[float_equipment] places a float collar on J3")


def test_two_float_shoe_joints_are_refused():
    msg = refused(plan_text(k1="float_shoe", n1=2, table=SHOE))
    assert msg.startswith("p.toml: section[1].kind: 2 joints are of kind \"float_shoe\"")


def test_float_collar_joint_where_the_table_puts_none_is_refused():
    msg = refused(plan_text(k2="float_collar", table=SHOE))
    assert msg.startswith("p.toml: section[2].kind: J2 is a float_collar joint but "
                          "[float_equipment] places a float shoe")
    msg = refused(plan_text(k2="float_collar", table=COLLAR3))
    assert "places a float collar on J3" in msg and "collar_joint = 2" in msg


def test_float_shoe_off_the_bottom_is_refused():
    msg = refused(plan_text(k2="float_shoe", table=SHOE))
    assert msg.startswith("p.toml: section[2].kind: J2 is of kind \"float_shoe\"")


def test_agreeing_float_kinds_are_accepted():
    r = parse_plan(plan_text(k1="float_shoe", table=SHOE), "p.toml")
    assert r.plan.closure.valve_joint == 0
    r = parse_plan(plan_text(k1="shoe", k2="float_collar",
                             table=COLLAR3.replace("= 3", "= 2")), "p.toml")
    assert r.plan.closure.valve_joint == 2
