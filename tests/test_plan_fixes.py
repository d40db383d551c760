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


# ---------------------------------------------------------------------------
# F5: an over-limit names the first step over it, not only the worst

def test_open_ended_over_limit_names_the_first_step_over_it():
    # Hand calculation identity (Archimedes): open-ended in a full hole each
    # plain joint hangs W - rho_f g A_s L, A_s = pi/4 (D^2 - d^2); k joints
    # hang k times that.  With the limit at 10.5 joints, step 11 is the first
    # over and step 24 (all joints) the worst.
    j = string()
    d_o, t = 16 * inch, 0.375 * inch
    area = np.pi / 4 * (d_o ** 2 - (d_o - 2 * t) ** 2)
    buoyed = float(j.weight[0]) - 1150.0 * 9.80665 * area * 12.0
    lp = plan_landing(j, HOLE, rig(10.5 * buoyed), Settings())
    (fails,) = [f for f in lp.reasons if f.code == PlanCode.OPEN_FAILS]
    over = fails.cause
    assert (over.get("first_step"), over.get("first_label"), over.step) == (11, "J11", 24)
    assert lp.open_check.limits[0].first_step == 11
    assert "over its limit from J11 at the floor (step 11; worst at J24, step 24)" in \
        finding_text(fails, "si")


# ---------------------------------------------------------------------------
# F4: one least margin for a float plan, on the hook

def test_float_schedule_margin_is_on_the_hook_like_the_governing_limit():
    # Hand calculation identity: the margin on the hook is
    # 1 - (string load + dead load) / (string limit + dead load); the fill
    # schedule, the float options and the governing limit use it alike.
    j = string()
    dead = 15e3
    peak = open_peak(j)
    rg = Rig("test rig", (HoistPath("main", mast_rating=0.8 * peak + dead, dead_load=dead),))
    lp = plan_landing(j, HOLE, rg, Settings(), closure=Closure(0))
    assert lp.verdict == Verdict.LANDS_FLOATED
    s = lp.best_float.schedule
    limit = lp.path.string_limit
    hook_margin = 1.0 - (s.string_load + dead) / (limit + dead)
    np.testing.assert_allclose(s.capacity_margin, hook_margin, rtol=0, atol=1e-12)
    g = lp.governing
    assert g.name == "hoisting capacity"
    assert s.least_margin == pytest.approx(g.margin, abs=1e-9)
    # not the string-load basis, which reads higher
    assert s.least_margin < 1.0 - float(s.string_load[g.step - 1]) / limit - 1e-3


# ---------------------------------------------------------------------------
# F10: a string too heavy even empty is not "carried fill over the capacity"

def test_string_too_heavy_even_empty_has_its_own_reason():
    # Hand calculation identity (Archimedes, closed at the shoe): an empty
    # closed joint hangs W - rho_f g (pi/4) D^2 L.  With the limit at 5.5
    # such joints the empty string is over from step 6, whatever the fill.
    d_o, t, length, rho = 8.625 * inch, 0.5 * inch, 6.0, 1000.0
    j = rate_joints([JointSpec(f"J{i + 1}", "blank", "a53b", od=d_o, wall=t, length=length,
                               weld_efficiency=0.85) for i in range(20)])
    hole = Hole(rho, diameter=12.25 * inch)
    empty = float(j.weight[0]) - rho * 9.80665 * np.pi / 4 * d_o ** 2 * length
    assert empty > 0
    lp = plan_landing(j, hole, rig(5.5 * empty), Settings(min_running_weight=0.0),
                      closure=Closure(0))
    assert lp.verdict == Verdict.CANNOT_LAND
    shoe = [o for o in lp.float_options if o.closure.valve_joint == 0]
    assert shoe and all(o.reason.code == "float.empty_string_over" for o in shoe)
    f = shoe[0].reason
    assert f.step == 6
    assert f.value("empty_load") == pytest.approx(6 * empty, rel=1e-9)
    text = finding_text(f, "si")
    assert text.startswith("even empty (no fill at all) the string is over the hoisting "
                           "capacity from step 6") and "carried fill" not in text


# ---------------------------------------------------------------------------
# F23: grout over the screens, and unrated screens in the grout check

def _screened(n=10, screens=(2, 3), rated=True):
    return rate_joints([JointSpec(
        f"J{i + 1}", "screen" if i + 1 in screens else "blank", "a53b", od=16 * inch,
        wall=0.375 * inch, length=10.0, weld_efficiency=0.85,
        tensile_rating=5e6 if i + 1 in screens else None,
        collapse_rating=(2e6 if rated else None) if i + 1 in screens else None,
        burst_rating=5e6 if i + 1 in screens else None) for i in range(n)])


def test_grout_column_reaching_the_screens_is_warned_with_its_depths():
    # Hand: 10 joints of 10 m, shoe at 100 m; screens J2-J3 span 10-30 m
    # above the shoe (depths 90 m to 70 m); a 45 m column tops out at 55 m.
    from rigplan.engine.grouting import GroutCode, plan_grout_lifts
    from rigplan.engine.stringmodel import GroutSpec
    g = plan_grout_lifts(_screened(), Hole(1100.0), GroutSpec(1500.0, 45.0), 1.0)
    (f,) = [w for w in g.warnings if w.code == GroutCode.OVER_SCREENS]
    assert f.get("labels") == "J2, J3"
    assert f.value("grout_top") == pytest.approx(55.0, abs=1e-9)
    assert f.value("screen_top") == pytest.approx(70.0, abs=1e-9)
    assert f.value("screen_bottom") == pytest.approx(90.0, abs=1e-9)
    assert "reaches the screens J2, J3" in finding_text(f, "si")
    # a column that stops below the lowest screen (10 m above the shoe) is not warned
    g = plan_grout_lifts(_screened(), Hole(1100.0), GroutSpec(1500.0, 10.0), 1.0)
    assert not [w for w in g.warnings if w.code == GroutCode.OVER_SCREENS]


def test_grout_check_with_unrated_screens_is_not_confirmed():
    # Unknown rating = unrated, never assumed (common practice, no source).
    from rigplan.engine.grouting import plan_grout_lifts
    from rigplan.engine.stringmodel import GroutSpec
    from rigplan.present.wording import grout_lift_text
    g = plan_grout_lifts(_screened(rated=False), Hole(1100.0), GroutSpec(1200.0, 5.0), 1.0)
    assert g.full_column_ok and g.unrated == ("J2", "J3")
    text = grout_lift_text(g)
    assert text.startswith("cannot confirm: J2, J3 have no collapse rating")
    assert "can be placed in one lift" not in text


# ---------------------------------------------------------------------------
# F11: the fill schedule gives the volume of a joint filled to the top

def test_fill_to_the_top_row_gives_the_joint_volume(tmp_path):
    # Hand calculation identity: bore volume of a joint = pi/4 d^2 L; 15.25 in
    # bore x 20 ft = 189.8 US gal (231 in^3 per US gal, NIST Handbook 44).
    from rigplan.present.packet.content import joint_fill_volumes
    j = rate_joints([JointSpec(f"J{i + 1}", "blank", "a53b", od=16 * inch, wall=0.375 * inch,
                               length=20 * 12 * inch, weld_efficiency=0.85) for i in range(6)])
    lo, hi = joint_fill_volumes(j, 2, 6)
    gal = 231 * inch ** 3
    assert lo / gal == pytest.approx(np.pi / 4 * 15.25 ** 2 * 240 / 231, rel=1e-12)
    assert lo / gal == pytest.approx(189.8, abs=0.05) and hi == lo
    assert np.isnan(joint_fill_volumes(j, 3, 3)[0])
    out = tmp_path / "cv7.md"
    assert main(["report", str(STRINGS / "cv7-16in-floated.toml"), "--rig", "mw80",
                 "-o", str(out)]) == 0
    row = next(x for x in out.read_text().splitlines()
               if x.startswith("| fill each joint to the top"))
    assert row.split("|")[3].strip() == "190 each"


# ---------------------------------------------------------------------------
# F19: a string exactly as long as the hole is not "longer than the hole"

def _plan_of_depth(depth):
    return ('units = "us"\nname = "t"\n[hole]\nfluid_density = "8.34 ppg"\n'
            f'depth = "{depth}"\n[[section]]\nkind = "blank"\nmaterial = "a53b"\n'
            'od = "8-5/8 in"\nwall = "0.322 in"\njoint_length = "20 ft"\ncount = 50\n')


def test_string_as_long_as_the_hole_reaches_bottom_and_says_so():
    # Hand: 50 x 20 ft = 1,000 ft exactly; the tolerance (5 mm) is stated.
    from rigplan.files.job import JobCode, length_warnings
    from rigplan.engine.planner import HOLE_DEPTH_TOLERANCE
    plan = parse_plan(_plan_of_depth("1000 ft"), "p.toml").plan
    codes = [f.code for f in length_warnings(plan)]
    assert JobCode.LONGER_THAN_HOLE not in codes and JobCode.AT_HOLE_BOTTOM in codes
    (f,) = [f for f in length_warnings(plan) if f.code == JobCode.AT_HOLE_BOTTOM]
    assert f.value("tolerance") == HOLE_DEPTH_TOLERANCE == 0.005
    assert "is as long as the hole (1,000.00 ft, within 0.016 ft)" in finding_text(f, "us")
    # a tenth of a foot short of the string: longer, and the tolerance is named
    plan = parse_plan(_plan_of_depth("999.9 ft"), "p.toml").plan
    (f,) = [f for f in length_warnings(plan) if f.code == JobCode.LONGER_THAN_HOLE]
    assert finding_text(f, "si").endswith("by more than 0.005 m")
