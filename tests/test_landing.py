"""Landing depths of the shoe, the float collar and the screens (engine).

Checks rest on the identity of a string of end-to-end joints hung from the
rig floor: the shoe lands at the sum of the joint lengths, the top of joint
m at the sum of the lengths above it (the tally arithmetic of casing
running, common practice, no source), and on agreement with the planner's
own landed profile, computed by another route.
"""

import math

import numpy as np
import pytest
from numpy.testing import assert_allclose

from _units import ft
from rigplan.engine.landing import joint_depths, landing_picture, screen_groups


def test_joint_depths_are_sums_of_the_lengths_above():
    lengths = [20.1 * ft, 19.8 * ft, 20.4 * ft, 20.0 * ft]
    top, bottom = joint_depths(lengths)
    # identity: bottom of joint 1 = sum of all lengths; top of the top joint = 0
    assert_allclose(bottom[0], sum(lengths), rtol=1e-15)
    assert top[-1] == 0.0
    assert_allclose(bottom - top, lengths, rtol=1e-12)
    assert_allclose(top[:-1], bottom[1:], rtol=0, atol=0)    # end to end, no gap


def test_screen_interval_moves_with_a_long_joint_and_is_flagged():
    labels = ["J1", "J2", "J3", "J4", "J5", "J6"]
    planned = [20 * ft] * 6
    screen = [False, True, True, False, False, False]
    run = list(planned)
    run[4] = 21.5 * ft                      # J5 taped 1.5 ft long: above the screens
    p = landing_picture(labels, planned, screen, 3, labels, run, 3, 130 * ft, 1.0 * ft)
    shoe, collar, scr = p.rows
    # everything below J5 lands 1.5 ft deeper (identity of the sums)
    assert_allclose([shoe.shift, collar.shift, scr.shift], [1.5 * ft] * 3, rtol=1e-12)
    assert scr.labels == ("J2", "J3") and scr.moved
    assert_allclose(p.shoe_off_bottom, 130 * ft - 121.5 * ft, rtol=1e-12)
    # within a 2 ft tolerance it is not flagged
    p2 = landing_picture(labels, planned, screen, 3, labels, run, 3, 130 * ft, 2.0 * ft)
    assert p2.moved == ()


def test_set_aside_joint_below_the_screen_lifts_it():
    labels = ["J1", "J2", "J3", "J4"]
    planned = [6.0, 6.0, 6.0, 6.0]
    screen = [False, False, True, False]
    # J2 set aside: the string is one joint shorter, J3 lands 6 m higher
    p = landing_picture(labels, planned, screen, None, ["J1", "J3", "J4"], [6.0, 6.0, 6.0],
                        None, math.nan, 0.6)
    shoe, scr = p.rows
    assert shoe.bottom == 18.0 and shoe.planned_bottom == 24.0
    assert (scr.planned_top, scr.planned_bottom, scr.top, scr.bottom) == (6.0, 12.0, 6.0, 12.0)
    # the screen itself sits at the same depth from the top; the shoe rises
    assert not scr.moved and math.isnan(p.shoe_off_bottom)
    assert screen_groups(labels, screen) == [("J3",)]


def test_agrees_with_the_planners_landed_profile():
    from test_tui import write_job
    from rigplan.files.job import load_job, plan_job
    import tempfile
    from pathlib import Path
    with tempfile.TemporaryDirectory() as d:
        plan, rig = write_job(Path(d))
        job = load_job(plan, rig)
        lp = plan_job(job.plan, job.rig)
    specs = job.plan.running_joints()
    top, bottom = joint_depths([j.run_length for j in specs])
    assert_allclose(bottom, lp.landed.bottom_depth, rtol=1e-12)
    assert_allclose(top, lp.landed.top_depth, rtol=1e-12, atol=1e-9)
