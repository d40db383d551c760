"""Planner checks that combine loads (rigplan.engine.planner)."""

import numpy as np
from numpy.testing import assert_allclose

from rigplan.engine.axial import step_profile
from rigplan.engine.collapse import api_5c3, axial_reduced_yield
from rigplan.engine.hoisting import HoistPath, Rig
from rigplan.engine.planner import check_run, collapse_rating_under_tension
from rigplan.engine.axial import running_loads
from rigplan.engine.rating import rate_joints
from rigplan.engine.stringmodel import Closure, Hole, JointSpec, Settings

from _units import inch as INCH  # NIST SP 811


def j55_string(n=40):
    # 13-3/8 in x 0.380 in J-55 (the API casing size of the 5C3 check table)
    return rate_joints([JointSpec(f"K{i + 1}", "blank", "j55", od=13.375 * INCH,
                                  wall=0.380 * INCH, length=12.0,
                                  connection="threaded_coupled", connection_rating=2.2e6)
                        for i in range(n)])


def test_api_collapse_rating_reduced_for_axial_tension():
    # API TR 5C3 (ISO/TR 10400), collapse under axial stress: use
    # Ypa = Y [sqrt(1 - 0.75 (Sa/Y)^2) - 0.5 Sa/Y] in the collapse formulas,
    # Sa = axial tension / steel area of the rating wall (the specified wall
    # for API grades, API TR 5C3).  The
    # tension is taken independently from the step profile at the step where
    # each joint's collapse load peaks.
    j = j55_string()
    hole = Hole(1300.0)
    closure = Closure(0)
    loads = running_loads(j, hole, closure, 998.2, 200.0)    # float shoe, level at 200 m
    rated = collapse_rating_under_tension(j, loads, hole, closure, 998.2)
    checked = 0
    for i in range(j.n):
        k = int(loads.collapse_step[i])
        f = step_profile(j, hole, closure, k, 998.2, 200.0).true_force_top[i]
        t = j.rating_wall[i]
        area = np.pi / 4 * (j.od[i] ** 2 - (j.od[i] - 2 * t) ** 2)
        sa = max(f / area, 0.0)
        expected = min(j.collapse_rating[i],
                       float(api_5c3(j.od[i], t, axial_reduced_yield(j.yield_strength[i], sa))))
        assert_allclose(rated[i], expected, rtol=1e-12)
        checked += sa > 0
    assert checked > 0                        # some joints are in tension
    assert np.all(rated <= j.collapse_rating)


def test_check_run_uses_the_reduced_rating():
    # The collapse utilization reported is DF x load / reduced rating.
    j = j55_string()
    hole = Hole(1300.0)
    loads = running_loads(j, hole, Closure(0), 998.2, 1e9)
    settings = Settings()
    chk = check_run(j, loads, Closure(0), 2e6, settings, hole, 998.2)
    reduced = collapse_rating_under_tension(j, loads, hole, Closure(0), 998.2)
    use = loads.collapse_max > 0
    assert_allclose(chk.collapse_utilization[use],
                    settings.design.collapse * loads.collapse_max[use] / reduced[use], rtol=1e-12)


def test_weak_connection_lowers_the_fill_until_it_holds():
    # Mechanics of floating (ADE 1986, ch. 7): fluid left out of a closed
    # string takes its weight off every connection above the valve.  With
    # threaded connections rated below the full-pipe load (times the tension
    # design factor) but a strong rig, the float plan must leave the pipe
    # part empty so that every connection keeps DF x load <= rating.
    from rigplan.engine.planner import try_float
    import dataclasses
    base = [JointSpec(f"J{i + 1}", "blank", "a53b", od=16 * INCH, wall=0.5 * INCH,
                      length=12.0, connection="threaded_coupled", connection_rating=1.0)
            for i in range(60)]
    hole = Hole(1150.0)
    settings = Settings(fill_density=998.2)
    full = running_loads(rate_joints(base), hole, Closure(0), 998.2, 0.0)
    rating = 0.8 * settings.design.tension * full.envelope_max.max()   # full would be over
    j = rate_joints([dataclasses.replace(s, connection_rating=rating) for s in base])
    opt = try_float(j, hole, Closure(0), 998.2, 5e6, settings)
    assert opt.lands
    assert np.nanmax(opt.check.tension_utilization) <= 1.0 + 1e-9
    assert np.nanmax(opt.schedule.fill_level) > 0            # left part empty
