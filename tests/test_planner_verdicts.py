"""The planner's verdict logic, step by step, on small constructed strings.

The order of trial is the README's (*Verdicts*): the planned float
equipment, open-ended, other float positions, two stages, else cannot land;
a string longer than the hole cannot land, and a loaded unrated part means
landing cannot be confirmed.  The rigs here are a mast rating only, set as
a multiple of the open-ended peak string load the engine computes, so each
case sits clearly on one side of a limit (a share of 2 or 0.3, far from 1).
"""

import dataclasses

import numpy as np
import pytest

from rigplan.engine.axial import running_loads
from rigplan.engine.findings import Kind, LimitName, Verdict
from rigplan.engine.hoisting import HoistPath, LandingString, Rig
from rigplan.engine.planner import (PlanCode, PlanInputs, Trial, best_tried, cannot_land,
                                    check_hole_depth, check_open, check_unrated, choose_path,
                                    governing_limit, land_floated, plan_landing, try_float,
                                    try_open, try_other_floats, try_planned_float, try_stages,
                                    unrated_parts)
from rigplan.engine.rating import rate_joints
from rigplan.engine.stringmodel import Closure, Hole, JointSpec, Settings
from _units import inch

HOLE = Hole(1150.0, diameter=22 * inch)    # mud to the floor [kg/m^3], a 22 in bit


def string(n=24, screens=(), unrated_screens=False):
    """16 in x 0.375 in A53 B, 12 m joints; screens with entered ratings
    (no tensile rating with ``unrated_screens``)."""
    return rate_joints([JointSpec(
        f"J{i + 1}", "screen" if i + 1 in screens else "blank", "a53b", od=16 * inch,
        wall=0.375 * inch, length=12.0, weld_efficiency=0.85,
        tensile_rating=None if unrated_screens or i + 1 not in screens else 5e6,
        collapse_rating=2e6 if i + 1 in screens else None,
        burst_rating=5e6 if i + 1 in screens else None) for i in range(n)])


def open_peak(joints):
    return float(running_loads(joints, HOLE, Closure()).string_load.max())


def rig(limit, landing_string=None, *more):
    paths = (HoistPath("main", mast_rating=limit),) + more
    return Rig("test rig", paths, landing_string)


def codes(findings):
    return [f.code for f in findings]


def inputs(joints, rg, closure=Closure(), fixed=False, settings=Settings()):
    cap, hoist = choose_path(rg, None)
    return PlanInputs(joints, HOLE, rg, settings, closure, fixed, cap, hoist.dead_load,
                      running_loads(joints, HOLE, Closure()))


# ---------------------------------------------------------------------------
# each verdict

def test_lands_open_when_the_open_run_keeps_every_limit():
    j = string()
    lp = plan_landing(j, HOLE, rig(2 * open_peak(j)), Settings())
    assert lp.verdict == Verdict.LANDS_OPEN and lp.lands
    assert lp.reasons == () and lp.best_float is None and lp.chosen is lp.open_check


def test_lands_floated_when_the_open_run_is_too_heavy():
    j = string()
    lp = plan_landing(j, HOLE, rig(0.8 * open_peak(j)), Settings())
    assert lp.verdict == Verdict.LANDS_FLOATED
    assert codes(lp.reasons) == [PlanCode.OPEN_FAILS]
    assert lp.reasons[0].cause.get("limit") == LimitName.HOISTING
    assert lp.chosen is lp.best_float.check and lp.best_float.lands


def test_lands_in_stages_when_no_float_position_is_possible():
    # The top joint is a screen: no check valve can sit above it, so there
    # is no float option at all and the landing string is next.
    # Released, stage 1 stands on bottom in compression: its buckling check
    # needs the hole diameter.
    j = string(screens=(24,))
    peak = open_peak(j)
    lp = plan_landing(j, dataclasses.replace(HOLE, diameter=22 * inch),
                      rig(0.8 * peak, LandingString("drill pipe", 300.0, 10 * peak)), Settings())
    assert lp.float_options == ()
    assert lp.verdict == Verdict.LANDS_STAGED and lp.stages.feasible
    assert lp.governing.name in (LimitName.STAGE1_HOISTING, LimitName.LOWERING_HOISTING,
                                 LimitName.LANDING_STRING, LimitName.STAGE2_HOISTING)
    # the staged limit carries its real load and capacity
    assert lp.governing.joint == lp.stages.split
    assert 0 < lp.governing.load < lp.governing.capacity


def test_cannot_land_without_a_landing_string():
    j = string(screens=(24,))
    lp = plan_landing(j, HOLE, rig(0.8 * open_peak(j)), Settings())
    assert lp.verdict == Verdict.CANNOT_LAND and not lp.lands
    assert codes(lp.reasons) == [PlanCode.OPEN_FAILS, PlanCode.NO_LANDING_STRING]


def test_cannot_confirm_when_a_loaded_part_is_unrated():
    j = string(screens=(1, 2), unrated_screens=True)
    lp = plan_landing(j, HOLE, rig(2 * open_peak(j)), Settings())
    assert lp.verdict == Verdict.CANNOT_CONFIRM and not lp.lands
    assert codes(lp.reasons) == [PlanCode.UNRATED_LOADED]
    assert {(u.joint, u.get("part")) for u in lp.unrated} == {(1, "tension"), (2, "tension")}


# ---------------------------------------------------------------------------
# each fallback

def test_planned_float_fails_but_the_string_lands_open():
    # Float shoe below screens: hole fluid comes in through them.
    j = string(screens=(3, 4))
    lp = plan_landing(j, HOLE, rig(2 * open_peak(j)), Settings(), closure=Closure(0))
    assert lp.verdict == Verdict.LANDS_OPEN
    assert codes(lp.reasons) == [PlanCode.OPTION_FAILS, PlanCode.RUN_WITHOUT_VALVE]
    failed = lp.reasons[0]
    assert failed.get("planned") and failed.get("valve_joint") == 0
    assert failed.cause.code == PlanCode.SCREEN_ABOVE_VALVE and failed.cause.joint == 4


def test_planned_float_fails_and_another_position_lands():
    # The planned collar sits below the top screen; a collar on the top
    # screen joint keeps the screens in the shoe track and floats.
    j = string(screens=(3, 4))
    lp = plan_landing(j, HOLE, rig(0.8 * open_peak(j)), Settings(), closure=Closure(2))
    assert lp.verdict == Verdict.LANDS_FLOATED
    assert lp.best_float.closure.valve_joint >= 4
    assert PlanCode.OPTION_FAILS in codes(lp.reasons)
    assert all(f.get("planned") for f in lp.reasons if f.code == PlanCode.OPTION_FAILS)


def test_float_equipment_in_the_hole_tries_nothing_else():
    j = string(screens=(3, 4))
    lp = plan_landing(j, HOLE, rig(0.8 * open_peak(j), LandingString("dp", 300.0, 1e9)),
                      Settings(), closure=Closure(2), fixed_closure=True)
    assert lp.verdict == Verdict.CANNOT_LAND and lp.stages is None
    assert codes(lp.reasons)[-1] == PlanCode.FIXED_CLOSURE
    assert {o.closure.valve_joint for o in lp.float_options} == {2}


def test_staged_setting_that_fails_says_why():
    j = string(screens=(24,))
    peak = open_peak(j)
    lp = plan_landing(j, HOLE, rig(0.8 * peak, LandingString("weak", 300.0, 0.01 * peak)),
                      Settings())
    assert lp.verdict == Verdict.CANNOT_LAND and not lp.stages.feasible
    assert codes(lp.reasons)[-1] == PlanCode.STAGED_FAILS
    assert lp.reasons[-1].cause.get("limit") == LimitName.LANDING_STRING


def test_string_longer_than_the_hole_cannot_land_whatever_else_holds():
    j = string()
    hole = dataclasses.replace(HOLE, depth=0.5 * float(np.sum(j.length)))
    lp = plan_landing(j, hole, rig(2 * open_peak(j)), Settings())
    assert lp.verdict == Verdict.CANNOT_LAND
    assert codes(lp.reasons)[0] == PlanCode.LONGER_THAN_HOLE
    assert lp.governing.name == LimitName.HOLE_DEPTH and lp.governing.kind == Kind.LENGTH
    # margin = (depth - length) / depth: the string is twice the hole
    assert lp.governing.margin == pytest.approx(-1.0)


# ---------------------------------------------------------------------------
# each step on its own

def test_choose_path_takes_the_strongest_or_the_named_one():
    rg = rig(1e5, None, HoistPath("aux", mast_rating=3e5))
    assert choose_path(rg, None)[0].path == "aux"
    assert choose_path(rg, "main")[0].path == "main"
    with pytest.raises(ValueError, match="no path 'x'"):
        choose_path(rg, "x")


def test_check_open_gives_the_open_failure_first():
    j = string()
    ok = check_open(inputs(j, rig(2 * open_peak(j))))
    assert ok.chosen.ok and ok.reasons == () and ok.verdict is None
    bad = check_open(inputs(j, rig(0.5 * open_peak(j))))
    assert not bad.chosen.ok and codes(bad.reasons) == [PlanCode.OPEN_FAILS]


def test_try_open_decides_only_when_nothing_has():
    j = string()
    inp = inputs(j, rig(2 * open_peak(j)))
    trial = check_open(inp)
    assert try_open(inp, trial, trial.chosen).verdict == Verdict.LANDS_OPEN
    decided = dataclasses.replace(trial, verdict=Verdict.LANDS_FLOATED)
    assert try_open(inp, decided, trial.chosen) is decided


def test_try_planned_float_is_skipped_for_an_open_shoe():
    j = string()
    inp = inputs(j, rig(0.8 * open_peak(j)))
    trial = check_open(inp)
    assert try_planned_float(inp, trial) is trial
    floated = try_planned_float(dataclasses.replace(inp, closure=Closure(0)), trial)
    assert floated.verdict == Verdict.LANDS_FLOATED and floated.best.closure.valve_joint == 0


def test_land_floated_and_best_tried():
    j = string()
    inp = inputs(j, rig(0.8 * open_peak(j)))
    trial = check_open(inp)
    opts = [try_float(j, HOLE, Closure(0), rho, inp.limit, inp.settings) for rho in (998.2, 1150.0)]
    landed = land_floated(trial, opts)
    assert landed.verdict == Verdict.LANDS_FLOATED and landed.best in opts
    assert land_floated(trial, [dataclasses.replace(o, lands=False) for o in opts]) is None
    best = best_tried(opts)
    assert best is max((o.check for o in opts), key=lambda c: min(x.margin for x in c.limits))


def test_try_other_floats_records_every_failure():
    # 40 joints, a rig for 30 % of the open-ended load: left empty enough
    # to stay under it, the pipe collapses, so no position floats.
    j = string(n=40)
    inp = inputs(j, rig(0.3 * open_peak(j)))
    start = check_open(inp)
    trial = try_other_floats(inp, start)
    assert trial.verdict is None and trial.options
    assert codes(trial.reasons).count(PlanCode.OPTION_FAILS) == len(trial.options)
    # no option got as far as a full check: the open run stays the one shown
    assert best_tried(trial.options) is None and trial.chosen is start.chosen


def test_try_stages_and_cannot_land():
    j = string()
    inp = inputs(j, rig(0.8 * open_peak(j)))
    trial = try_stages(inp, check_open(inp))
    assert codes(trial.reasons)[-1] == PlanCode.NO_LANDING_STRING
    assert cannot_land(trial).verdict == Verdict.CANNOT_LAND
    decided = dataclasses.replace(trial, verdict=Verdict.LANDS_OPEN)
    assert cannot_land(decided) is decided and try_stages(inp, decided) is decided


def test_check_hole_depth_and_governing_limit():
    j = string()
    inp = inputs(j, rig(2 * open_peak(j)))
    trial = try_open(inp, check_open(inp), check_open(inp).chosen)
    assert check_hole_depth(inp, trial) is trial          # depth not given: no check
    short = dataclasses.replace(inp, hole=dataclasses.replace(HOLE, depth=10.0))
    over = check_hole_depth(short, trial)
    assert over.verdict == Verdict.CANNOT_LAND and governing_limit(over).name == LimitName.HOLE_DEPTH
    assert governing_limit(trial).name == LimitName.HOISTING


def test_check_unrated_only_turns_a_landing_verdict():
    j = string(screens=(1,), unrated_screens=True)
    inp = inputs(j, rig(2 * open_peak(j)))
    trial = try_open(inp, check_open(inp), check_open(inp).chosen)
    unrated = unrated_parts(inp, trial)
    assert unrated and all(u.code == PlanCode.UNRATED_PART for u in unrated)
    assert check_unrated(trial, unrated).verdict == Verdict.CANNOT_CONFIRM
    failed = dataclasses.replace(trial, verdict=Verdict.CANNOT_LAND)
    assert check_unrated(failed, unrated) is failed
    assert check_unrated(trial, ()) is trial


def test_trial_add_returns_a_new_trial():
    j = string()
    trial = Trial(chosen=check_open(inputs(j, rig(2 * open_peak(j)))).chosen)
    more = trial.add(*check_open(inputs(j, rig(0.5 * open_peak(j)))).reasons)
    assert trial.reasons == () and codes(more.reasons) == [PlanCode.OPEN_FAILS]
