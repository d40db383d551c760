"""Fill window, fill schedule, switch point (rigplan.engine.floatplan).

The closed forms below are derived in each test from hydrostatics and the
pressure-area method (string mechanics (ADE 1986), "Floating and fill-up"), for a
uniform string with a float shoe, water inside and mud outside.
"""

import numpy as np
import pytest
from hypothesis import given, settings, strategies as st
from numpy.testing import assert_allclose

from rigplan.engine.axial import running_loads
from rigplan.engine.collapse import timoshenko
from rigplan.engine.floatplan import (bore_volume_below, empty_run, fill_schedule, fill_window,
                               height_for_bore_volume, switch_point)
from rigplan.engine.axial import string_geometry
from rigplan.engine.stringmodel import G, Closure, Hole, JointArrays

from _units import ft as FT, inch as INCH, lbf as LBF, psi as PSI  # NIST SP 811
STEEL = 7850.0
RHO_MUD, RHO_W = 1200.0, 998.2


def uniform(n, od=16 * INCH, wall=0.375 * INCH, length=6.0, collapse=np.nan):
    d = od - 2 * wall
    w = STEEL * G * np.pi / 4 * (od ** 2 - d ** 2) * length
    f = lambda v: np.full(n, float(v))
    return JointArrays(label=tuple(f"J{i + 1}" for i in range(n)), kind=("blank",) * n,
                       length=f(length), od=f(od), bore=f(d), weight=f(w),
                       collapse_rating=f(collapse), burst_rating=f(np.nan),
                       body_rating=f(np.nan), connection_rating=f(np.nan))


def test_collapse_load_at_the_valve_and_longest_empty_column():
    # Derived: float shoe at depth Z, water inside to level h, mud outside to
    # the floor: collapse load at the valve P_o - P_i = rho_m g Z - rho_w g (Z - h).
    # Setting it to R/DF gives the deepest allowed level
    #     h_max = Z - (rho_m g Z - R/DF) / (rho_w g).
    # Rating: Timoshenko, 16 in x 0.375 in, 35 ksi, 1 % ellipticity (about
    # 470 psi, common practice, no source), on the minimum wall (12.5 % under).
    r = float(timoshenko(16 * INCH, 0.875 * 0.375 * INCH, 35000 * PSI, 0.01))
    df = 1.125
    j = uniform(120, collapse=r)
    hole = Hole(RHO_MUD)
    w = fill_window(j, hole, Closure(0), RHO_W, string_limit=1e9, min_running_weight=-1e12,
                    collapse_factor=df)
    z = np.cumsum(j.length)
    h_max = z - (RHO_MUD * G * z - r / df) / (RHO_W * G)
    binding = RHO_MUD * G * z > r / df
    assert np.any(binding) and np.any(~binding)
    assert_allclose(w.max_fill_level[binding], h_max[binding], rtol=1e-12)
    assert all(w.empty_limit[k] == "collapse" for k in np.flatnonzero(binding))
    # where the empty pipe holds, it may run empty: the level may sit at the valve
    assert_allclose(w.max_fill_level[~binding], z[~binding], rtol=1e-12)
    # the window's collapse load at that level is exactly R/DF at the valve
    k = int(np.flatnonzero(binding)[-1])
    loads = running_loads(j, hole, Closure(0), RHO_W, w.max_fill_level)
    assert_allclose(loads.collapse_max[0] * df, r, rtol=1e-9)


def test_empty_length_at_which_a_closed_string_weighs_nothing():
    # Derived: closed uniform string, float shoe at Z, water to level h:
    #   F(0) = w Z - rho_m g A_o Z + rho_w g A_i (Z - h) = 0
    #   => h0 = Z - (rho_m g A_o - w) Z / (rho_w g A_i)
    # With the minimum running weight 0 the window's deepest level is h0.
    j = uniform(80)
    hole = Hole(RHO_MUD)
    a_o = np.pi / 4 * j.od[0] ** 2
    a_i = np.pi / 4 * j.bore[0] ** 2
    wpl = j.weight[0] / j.length[0]
    z = np.cumsum(j.length)
    h0 = z - (RHO_MUD * G * a_o - wpl) * z / (RHO_W * G * a_i)
    w = fill_window(j, hole, Closure(0), RHO_W, string_limit=1e9, min_running_weight=0.0)
    assert_allclose(w.max_fill_level, h0, rtol=1e-10)
    assert all(lim == "running weight" for lim in w.empty_limit)
    loads = running_loads(j, hole, Closure(0), RHO_W, h0).string_load
    assert_allclose(loads, 0.0, atol=1e-6 * j.weight.sum())


def test_capacity_bound_is_the_shallowest_level():
    # Derived: F(0)(h) = F_empty + rho_w g A_i (Z - h) <= limit
    #   => h_min = Z - (limit - F_empty) / (rho_w g A_i), clipped at the floor.
    j = uniform(100)
    hole = Hole(RHO_MUD)
    limit = 150e3
    w = fill_window(j, hole, Closure(0), RHO_W, string_limit=limit)
    empty = running_loads(j, hole, Closure(0), RHO_W, 1e9).string_load
    a_i = np.pi / 4 * j.bore[0] ** 2
    z = np.cumsum(j.length)
    h_min = np.clip(z - (limit - empty) / (RHO_W * G * a_i), 0.0, None)
    ok = w.feasible
    assert_allclose(w.min_fill_level[ok], h_min[ok], rtol=1e-10, atol=1e-9)


def test_schedule_stays_in_window_and_never_removes_fluid():
    # String mechanics (ADE 1986): fluid cannot leave through the check valve, so the
    # fill height above the shoe never falls; every step keeps its window.
    r = float(timoshenko(16 * INCH, 0.875 * 0.375 * INCH, 35000 * PSI, 0.01))
    j = uniform(100, collapse=r)
    hole = Hole(RHO_MUD)
    limit = 240e3
    w = fill_window(j, hole, Closure(0), RHO_W, limit, 10e3, 1.125)
    s = fill_schedule(j, hole, Closure(0), RHO_W, limit, 10e3, 1.125, window=w)
    assert s.feasible
    z = np.cumsum(j.length)
    height = z - s.fill_level
    assert np.all(np.diff(height) >= -1e-9)
    tol = 1e-6
    assert np.all(s.fill_level >= np.nan_to_num(w.min_fill_level) - tol)
    assert np.all(s.fill_level <= w.max_fill_level + tol)
    loads = running_loads(j, hole, Closure(0), RHO_W, s.fill_level)
    assert_allclose(loads.string_load, s.string_load, rtol=1e-9)
    assert np.all(loads.string_load <= limit * (1 + 1e-12))
    assert np.all(loads.collapse_max * 1.125 <= r * (1 + 1e-9))
    assert len(s.top_ups) >= 1
    for t in s.top_ups:
        assert t.volume > 0
        # the volume added is the bore volume between the old and new surface
        k = t.joint - 1
        before = z[k] - height[k - 1]
        assert_allclose(t.volume, np.pi / 4 * j.bore[0] ** 2 * (before - t.level_after),
                        rtol=1e-9)


def test_switch_point_is_first_joint_over_the_limit():
    # Definition (string mechanics (ADE 1986)): the first joint at which the
    # open-ended load exceeds the capacity, where floating must begin.
    j = uniform(60)
    hole = Hole(RHO_MUD)
    load = running_loads(j, hole, Closure()).string_load
    per_joint = j.weight[0] * (1 - RHO_MUD / STEEL)
    limit = 20.5 * per_joint
    assert switch_point(load, limit) == 21
    assert switch_point(load, 1e12) == 0


def test_check_valve_rating_limits_the_empty_column():
    # Derived: at a float shoe the valve holds P_o(Z) - P_i(Z); with a rating
    # Rv, h_max = Z - (rho_m g Z - Rv) / (rho_w g) where that is binding.
    j = uniform(100)
    hole = Hole(RHO_MUD)
    rv = 500 * PSI
    w = fill_window(j, hole, Closure(0, rv), RHO_W, 1e9, -1e12)
    z = np.cumsum(j.length)
    bind = RHO_MUD * G * z > rv
    assert_allclose(w.max_fill_level[bind], (z - (RHO_MUD * G * z - rv) / (RHO_W * G))[bind],
                    rtol=1e-12)
    assert w.empty_limit[int(np.flatnonzero(bind)[0])] == "check valve"


def test_air_filled_string_with_collapse_risk_has_no_window():
    # Derived: with nothing to add (fill density 0), a pipe whose empty
    # collapse load exceeds R/DF can never be made safe.
    j = uniform(150, collapse=2e6)
    w = fill_window(j, Hole(RHO_MUD), Closure(0), 0.0, 1e9, -1e12, 1.0)
    assert not np.all(w.feasible)
    k = int(np.flatnonzero(~w.feasible)[0])
    assert RHO_MUD * G * np.cumsum(j.length)[k] > 2e6


def test_empty_run_reports_collapse_and_floating():
    # Derived: empty collapse begins where rho_m g Z > R/DF; the empty string
    # load w Z - rho_m g A_o Z is negative from the first joint for this
    # thin pipe (w < rho_m g A_o per metre).
    r = 2.0e6
    j = uniform(100, collapse=r)
    e = empty_run(j, Hole(RHO_MUD), Closure(0), RHO_W, 0.0, 1.0)
    z = np.cumsum(j.length)
    assert e.collapse_step == int(np.flatnonzero(RHO_MUD * G * z > r)[0]) + 1
    assert e.negative_step == 1


def test_bore_volume_round_trip():
    # Identity: the height <-> volume map is monotone and invertible.
    j = uniform(10)
    geo = string_geometry(j, Closure(0))
    h = np.linspace(0, 60, 13)
    assert_allclose(height_for_bore_volume(geo, bore_volume_below(geo, h)), h, atol=1e-9)


@settings(max_examples=25, deadline=None)
@given(limit=st.floats(120e3, 600e3), mud=st.floats(1050, 1400))
def test_schedule_result_matches_pressure_area_engine(limit, mud):
    # Identity: the schedule's string load (empty load + fill weight) equals
    # the pressure-area sum with the same fill levels.
    j = uniform(60, collapse=3e6)
    hole = Hole(mud)
    s = fill_schedule(j, hole, Closure(2), RHO_W, limit, 0.0, 1.0)
    loads = running_loads(j, hole, Closure(2), RHO_W, np.nan_to_num(s.fill_level))
    assert_allclose(loads.string_load, s.string_load, rtol=1e-9, atol=1e-6)


def test_fill_cannot_stand_above_its_balance_with_the_hole():
    # Derived (hydrostatics, U-tube through the check valve): a float valve
    # holds pressure from below only, so the fill's head at the valve can be
    # at most the hole's there:  rho_f g (Z - h - x_v... ) <= P_o(valve), i.e.
    #   shallowest level h_min = Z - p_valve / (rho_f g)   (float shoe, x_v = 0).
    # (a) lost returns: hole fluid to 40 m below the floor, the same fluid
    #     inside: h_min = 40 m at every step below 40 m;
    # (b) fill heavier than the hole fluid, hole full: h_min = Z (1 - rho_o/rho_f).
    j = uniform(60)
    z = np.cumsum(j.length)
    w = fill_window(j, Hole(1150.0, fluid_level=40.0), Closure(0), 1150.0, 1e9, -1e12)
    deep = z > 40.0
    assert_allclose(w.min_fill_level[deep], 40.0, rtol=1e-12)
    assert all(w.full_limit[k] == "valve balance" for k in np.flatnonzero(deep))
    w2 = fill_window(j, Hole(1100.0), Closure(0), 1300.0, 1e9, -1e12)
    assert_allclose(w2.min_fill_level, z * (1 - 1100.0 / 1300.0), rtol=1e-12)


# ---------------------------------------------------------------------------
# Limits a crew can follow: a low hole-fluid level, and when top-ups go in.



def _carried_heights(schedule, shoe, valve_height):
    """Fill height above the shoe each joint is lowered with: what the
    step before left in the pipe (the valve height before any fill)."""
    height = shoe - np.nan_to_num(schedule.fill_level, nan=np.inf)
    height = np.maximum(height, valve_height)
    return np.concatenate(([valve_height], height[:-1])), height


def test_low_fluid_level_float_shoe_lands_without_filling_dry_pipe():
    # 16 in x 0.375 in casing in 20 ft joints (plain-end weight 62.58 lb/ft,
    # ASTM A53 Table X2 / the plain-end formula: 1,252 lbf a joint), a float
    # shoe, 9.6 ppg (1,150 kg/m3) mud standing 300 ft below the floor, water
    # fill, a 2,000 lbf minimum running weight (common practice, no source)
    # and an 80,000 lbf string limit, so the string cannot run open-ended.
    # Checks derived from hydrostatics and the pressure-area method
    # (Bourgoyne et al., Applied Drilling Engineering, 1986, ch. 7):
    # * a joint in air weighs its air weight whatever the valve: never refused;
    # * fill stands no higher than its balance with the hole at the valve
    #   (U-tube), so no fill is asked for while the shoe is above the mud;
    # * every joint is lowered with the fill carried from the step before,
    #   and that run is inside every limit (recomputed by the pressure-area
    #   engine, not by the schedule).
    from rigplan.engine.hoisting import HoistPath, Rig
    from rigplan.engine.planner import LANDS_FLOATED, plan_landing
    from rigplan.engine.stringmodel import Settings
    rating = float(timoshenko(16 * INCH, 0.875 * 0.375 * INCH, 35000 * PSI, 0.01))
    j = uniform(100, length=20 * FT, collapse=rating)
    j = JointArrays(**{**j.__dict__, "body_rating": np.full(100, 1e7),
                       "connection_rating": np.full(100, 1e7),
                       "burst_rating": np.full(100, 1e8)})
    assert_allclose(j.weight[0] / LBF, 62.58 * 20, rtol=2e-3)
    hole = Hole(1150.0, fluid_level=300 * FT)
    limit, w_min = 80000 * LBF, 2000 * LBF
    rig = Rig("test rig", (HoistPath("top head", top_head_pullup=limit, mast_rating=limit),))
    settings_ = Settings(fill_density=RHO_W, min_running_weight=w_min)
    lp = plan_landing(j, hole, rig, settings_, Closure(0))
    assert lp.verdict == LANDS_FLOATED
    assert lp.chosen.closure.valve_joint == 0          # the planned shoe, not a substitute
    s = lp.best_float.schedule
    shoe = np.cumsum(j.length)
    dry = shoe <= hole.fluid_level + 1e-9
    assert dry.sum() == 15                               # 300 ft of 20 ft joints
    # no fill instruction for dry pipe
    assert_allclose(s.fill_volume[dry], 0.0, atol=0.0)
    assert s.fill_to_top_through == 0 or s.fill_to_top_through > dry.sum()
    assert all(not dry[t.joint - 1] for t in s.top_ups)
    assert len(s.top_ups) >= 1
    # a joint in air is not held to the minimum running weight
    assert lp.best_float.window.feasible.all()
    # every joint lowered inside its window, by the pressure-area engine
    carried, after = _carried_heights(s, shoe, 0.0)
    assert s.lowered_below_window == ()
    for height in (carried, after):
        loads = running_loads(j, hole, Closure(0), RHO_W, shoe - height)
        wet = ~dry
        assert np.all(loads.string_load[wet] >= w_min * (1 - 1e-9))
        assert np.all(loads.string_load <= limit * (1 + 1e-9))
        assert np.all(loads.collapse_max * 1.125 <= rating * (1 + 1e-9))
    # fill never stands above its balance with the mud at the shoe:
    # rho_w (Z - h) <= rho_m (Z - h_o)
    assert np.all(RHO_W * after <= 1150.0 * np.maximum(shoe - hole.fluid_level, 0) + 1e-6)


def test_top_up_goes_in_before_the_joint_that_needs_it():
    # Hand-computed window, uniform string, float shoe, hole full of mud,
    # water fill, no collapse rating (pressure-area method, Bourgoyne et al.
    # 1986, ch. 7): with fill height s above the shoe at shoe depth Z,
    #   F(Z, s) = (w - rho_m g A_o) Z + rho_w g A_i s
    # so the running weight W_min and the limit give
    #   lo(Z) = (W_min - (w - rho_m g A_o) Z) / (rho_w g A_i)
    #   hi(Z) = min(Z, (limit - (w - rho_m g A_o) Z) / (rho_w g A_i)).
    # The crew fills each joint to the top while the full string stays
    # under the limit at every later step (through joint t), then carries
    # s = Z_t.  The first joint k with lo(Z_k) > Z_t needs a top-up: it must
    # go in with joint k-1 at the floor, before joint k is lowered.
    n, length = 160, 6.0
    j = uniform(n, length=length)
    hole = Hole(RHO_MUD)
    limit, w_min = 240e3, 10e3
    a_o = np.pi / 4 * j.od[0] ** 2
    a_i = np.pi / 4 * j.bore[0] ** 2
    net = j.weight[0] / length - RHO_MUD * G * a_o          # empty, per metre [N/m]
    per_fill = RHO_W * G * a_i                               # fill, per metre [N/m]
    assert net < 0 < net + per_fill                          # floats empty, sinks full
    z = length * np.arange(1, n + 1)
    lo = (w_min - net * z) / per_fill
    hi = np.minimum(z, (limit - net * z) / per_fill)
    full_ok = z <= np.minimum.accumulate(hi[::-1])[::-1]
    t = int(np.flatnonzero(~full_ok)[0])                     # joints 1..t full
    k = int(np.flatnonzero(lo > z[t - 1])[0]) + 1            # first joint needing more
    s = fill_schedule(j, hole, Closure(0), RHO_W, limit, w_min, 1.0, shares=(1.0,))
    assert s.feasible
    assert s.fill_to_top_through == t
    first = s.top_ups[0]
    assert first.joint == k - 1 and first.before_joint == k
    # the fill carried into joint k is inside its window, and the level
    # after the top-up is inside the window of joint k-1
    height_after = z[k - 2] - first.level_after
    assert lo[k - 1] <= height_after + 1e-9 <= hi[k - 2] + 2e-9
    # volume: the bore between the old and new fill surface
    assert_allclose(first.volume, a_i * (height_after - z[t - 1]), rtol=1e-9)
    carried, _ = _carried_heights(s, z, 0.0)
    assert np.all(carried[t:] >= lo[t:] - 1e-9)
    assert s.lowered_below_window == ()


# ---------------------------------------------------------------------------
# As run: the fluid already in the pipe is a fact of the run

def test_fill_record_keeps_the_fill_already_run(tmp_path):
    # The fill above a check valve rests on the pipe, so it adds its weight
    # rho g V to the string load (pressure-area method, Bourgoyne et al.
    # 1986, ch. 7).  After k joints filled with one fluid, a change of the
    # fill fluid in the settings applies to the joints not yet run: the
    # string loads of steps 1..k are those the run had (the same fluid
    # weight), and the later steps are planned with the new fluid.  The run
    # log is built here (rigplan.files.runlog).
    import dataclasses
    from pathlib import Path
    from rigplan.files.job import fill_record_of, load_job, plan_as_run
    from rigplan.files.runlog import RunLog, log_path_for
    root = Path(__file__).resolve().parents[1]
    plan = tmp_path / "floated.toml"
    plan.write_text((root / "strings" / "cv7-16in-floated.toml").read_text())
    job = load_job(plan, root / "rigs" / "mw80.toml")
    base = job.plan
    labels = [j.label for j in base.running_joints()]
    k = 30
    with RunLog(log_path_for(plan)) as log:
        for label in labels[:k]:
            log.record_run(label, None)
        state = log.state()
    before = plan_as_run(base, job.rig, state)
    assert before.verdict == "lands with float plan"
    rho_before = before.best_float.fill_density
    # the settings change: the other fill fluid, no alternatives
    rho_new = 998.2 if rho_before > 1100 else 1150.0
    changed = dataclasses.replace(base, settings=dataclasses.replace(
        base.settings, fill_density=rho_new, fill_density_alternatives=()))
    record = fill_record_of(before, k)
    assert record.steps == k and record.density == rho_before
    after = plan_as_run(changed, job.rig, state, fill_record=record)
    assert after.best_float.fill_density == rho_new
    m = before.chosen.closure.valve_joint
    assert m is not None and k > m
    # steps already run: the same string load (the same fluid weight inside)
    assert_allclose(after.chosen.loads.string_load[:k], before.chosen.loads.string_load[:k],
                    rtol=1e-9)
    # later steps: the empty string load plus the weight of the recorded
    # fluid plus the weight of what is added, in the fluid added
    sch = after.best_float.schedule
    rho_m = sch.fill_density                       # the column modelled
    assert rho_m == max(rho_before, rho_new)
    empty = after.best_float.window.empty_string_load
    weight = G * rho_m * np.asarray(sch.fill_volume)
    assert_allclose(after.chosen.loads.string_load[k:], empty[k:] + weight[k:], rtol=1e-6)
    assert np.all(weight[k:] >= G * rho_before * record.volume[-1] * (1 - 1e-9))
    # without the record the fluid the plan chose is kept (no switch mid-run)
    again = plan_as_run(changed, job.rig, state)
    assert again.best_float is None or again.best_float.fill_density in (rho_new, rho_before)


def test_a_mud_weight_change_mid_run_keeps_the_fill_fluid(tmp_path):
    # Fill fluids are compared only before the first joint (common practice,
    # no source: the crew keeps the fluid it has rigged up); after a change
    # of the hole fluid mid-run the fluid in the pipe and the fluid added
    # stay the same, and the steps run keep their fill.
    import dataclasses
    from pathlib import Path
    from rigplan.files.job import fill_record_of, load_job, plan_as_run
    from rigplan.files.runlog import RunLog, log_path_for
    root = Path(__file__).resolve().parents[1]
    plan = tmp_path / "floated.toml"
    plan.write_text((root / "strings" / "cv7-16in-floated.toml").read_text())
    job = load_job(plan, root / "rigs" / "mw80.toml")
    base = job.plan
    k = 11
    with RunLog(log_path_for(plan)) as log:
        for j in base.running_joints()[:k]:
            log.record_run(j.label, None)
        state = log.state()
    before = plan_as_run(base, job.rig, state)
    record = fill_record_of(before, k)
    heavier = dataclasses.replace(base, hole=dataclasses.replace(
        base.hole, fluid_density=base.hole.fluid_density + 60.0))
    after = plan_as_run(heavier, job.rig, state, fill_record=record)
    assert after.best_float is not None
    assert after.best_float.fill_density == before.best_float.fill_density
    # the fill volumes of the steps run are the record's
    assert_allclose(after.best_float.schedule.fill_volume[:k], record.volume, rtol=1e-9,
                    atol=1e-12)
