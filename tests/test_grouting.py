"""Tests for rigplan.engine.grouting.

Check values are derived by hand in each test from general hydrostatics
(``P = rho g h`` summed over stacked static columns; the project's
string mechanics (ADE 1986), "Hydrostatics" and "Grouting": ``dP = P_grout -
P_inside``, largest at the bottom of the grout column).  Collapse ratings
come from ``rigplan.engine.collapse.timoshenko`` (Timoshenko and Gere, *Theory of
Elastic Stability*, 2nd ed., 1961, ch. 7) on the minimum wall (12.5 %
under-tolerance, string mechanics (ADE 1986) "Collapse"); the closed forms do not
depend on where the rating comes from.  Placing grout in lifts on set grout
(no hydrostatic from the set grout, casing below it supported) is common
practice, no source.

Densities used (from memory, typical figures): fresh water 998.2 kg/m^3 at
20 C; drilling mud 1100 kg/m^3 (about 9.2 lb/gal); neat cement grout
1900 kg/m^3 (about 15.9 lb/gal).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import HealthCheck, assume, given, settings
from hypothesis import strategies as st
from numpy.testing import assert_allclose

from rigplan.engine.collapse import timoshenko
from rigplan.errors import InputError
from rigplan.engine.grouting import (
    GroutCode,
    annulus_pressure_with_grout,
    grout_collapse_loads,
    grout_differential_pressure,
    grout_utilization,
    lift_collapse_loads,
    max_single_lift,
    plan_grout_lifts,
)
from rigplan.engine.stringmodel import G, GroutSpec, Hole, JointArrays

# Exact unit definitions (NIST SP 811, appendix B).
from _units import inch as INCH, psi as PSI  # [m], [Pa] (NIST SP 811)

WATER = 998.2      # fresh water at 20 C [kg/m^3] (from memory)
MUD = 1100.0       # drilling mud [kg/m^3] (from memory, typical)
GROUT = 1900.0     # neat cement grout [kg/m^3] (from memory, typical)
DF = 1.125         # collapse design factor inside Lyons' 1.0-1.125 range

#: 16 in OD, 0.3125 in specified wall, 12.5 % under-tolerance, 35,000 psi
#: yield, 1 % ellipticity (water-well practice when none is measured:
#: common practice, no source).  About 1.50 MPa (217 psi).
R16 = timoshenko(16 * INCH, 0.875 * 0.3125 * INCH, 35000 * PSI, 0.01)
#: Same OD, 0.250 in specified wall: about 0.84 MPa (121 psi).
R16_THIN = timoshenko(16 * INCH, 0.875 * 0.250 * INCH, 35000 * PSI, 0.01)


def make_joints(length, rating, od=16 * INCH, wall=0.3125 * INCH):
    """JointArrays built directly [m, Pa]; weights are not used here."""
    length = np.asarray(length, dtype=float)
    n = len(length)
    nan = np.full(n, np.nan)
    return JointArrays(
        label=tuple(f"J{i + 1}" for i in range(n)),
        kind=("blank",) * n,
        length=length,
        od=np.full(n, od), bore=np.full(n, od - 2 * wall),
        weight=np.full(n, 1000.0),
        collapse_rating=np.broadcast_to(np.asarray(rating, dtype=float), (n,)).copy(),
        burst_rating=nan.copy(), body_rating=nan.copy(), connection_rating=nan.copy(),
    )


def uniform_string(n=40, length=6.0, rating=R16):
    return make_joints(np.full(n, length), rating)


# ---------------------------------------------------------------------------
# pressures


def test_annulus_pressure_stacked_columns():
    # General hydrostatics: mud full to 3 m, 1100 kg/m^3, over grout
    # 1900 kg/m^3 from 100 m down.  At 150 m:
    # g (1100 (100 - 3) + 1900 (150 - 100)) = g (106,700 + 95,000).
    p = annulus_pressure_with_grout(150.0, 100.0, GROUT, MUD, 3.0)
    assert_allclose(p, G * (1100.0 * 97.0 + 1900.0 * 50.0), rtol=1e-14)
    # Above the grout top only the mud acts: g 1100 (50 - 3).
    assert_allclose(annulus_pressure_with_grout(50.0, 100.0, GROUT, MUD, 3.0),
                    G * 1100.0 * 47.0, rtol=1e-14)
    # Grout top above a lost-returns fluid level (40 m): g 1900 (150 - 30).
    assert_allclose(annulus_pressure_with_grout(150.0, 30.0, GROUT, MUD, 40.0),
                    G * 1900.0 * 120.0, rtol=1e-14)


def test_differential_pressure_at_shoe_closed_form():
    # Hydrostatics, uniform fluids: dP(shoe) = rho_o g (T - h_o) + rho_g g H
    # - rho_i g (Z - h_i), with Z = 240, H = 100, T = 140, h_o = 3, h_i = 2.
    z, h, h_o, h_i = 240.0, 100.0, 3.0, 2.0
    expected = MUD * G * (z - h - h_o) + GROUT * G * h - WATER * G * (z - h_i)
    got = grout_differential_pressure(0.0, z, Hole(MUD, h_o), GROUT, h, WATER, h_i)
    assert_allclose(got, expected, rtol=1e-13)


# ---------------------------------------------------------------------------
# full column


def test_full_column_load_on_shoe_joint_closed_form():
    # String mechanics (ADE 1986) "Grouting" and hydrostatics: uniform string, water
    # full inside, mud above the grout (level h_o); the largest load on the
    # shoe joint is at the shoe:
    #   dP = rho_o g (T - h_o) + rho_g g H - rho_i g Z.
    joints = uniform_string()
    z, h, h_o = 240.0, 100.0, 3.0
    grout = GroutSpec(GROUT, h, WATER, 0.0)
    loads = grout_collapse_loads(joints, Hole(MUD, h_o), grout)
    expected = MUD * G * (z - h - h_o) + GROUT * G * h - WATER * G * z
    assert_allclose(loads[0], expected, rtol=1e-13)
    util = grout_utilization(joints, Hole(MUD, h_o), grout, DF)
    assert_allclose(util[0], DF * expected / R16, rtol=1e-13)


@pytest.mark.parametrize("rho_o, h_o, rho_g, height, rho_i, h_i", [
    (MUD, 8.7, GROUT, 13.0, WATER, 21.4),      # usual: grout > mud > water
    (1400.0, 0.0, 1000.0, 17.5, 1200.0, 0.0),  # worst point at the grout top
    (1000.0, 0.0, 1100.0, 9.0, 1300.0, 11.6),  # worst point at the inside level
])
def test_full_column_loads_match_dense_sampling(rho_o, h_o, rho_g, height, rho_i, h_i):
    # dP is piecewise linear along a joint (hydrostatics), so the per-joint
    # maximum must equal the largest of a dense sample of the pointwise
    # formula.  Mixed lengths; fluid levels and the grout top fall inside
    # joints.  The second and third fluid sets are contrived (grout lighter
    # than the inside fluid, inside heavier than the hole fluid) so that the
    # worst point sits at the grout top or at the inside level.
    lengths = np.array([5.5, 6.1, 4.0, 7.3, 6.0, 6.2, 3.1])
    joints = make_joints(lengths, R16)
    z = lengths.sum()
    hole = Hole(rho_o, h_o)
    grout = GroutSpec(rho_g, height, rho_i, h_i)
    loads = grout_collapse_loads(joints, hole, grout)
    top = np.cumsum(lengths)
    bottom = top - lengths
    for j in range(len(lengths)):
        x = np.linspace(bottom[j], top[j], 20001)
        dp = grout_differential_pressure(x, z, hole, rho_g, height, rho_i, h_i)
        # 20,000 samples along at most 7.3 m of linear pieces with slopes
        # under 2e4 Pa/m: sampling error below 10 Pa.
        assert loads[j] >= dp.max() - 1e-6
        assert_allclose(loads[j], dp.max(), rtol=0, atol=10.0)


def test_unrated_joint_gives_nan_utilization():
    # String mechanics (ADE 1986) "Collapse": a screen's rating is the maker's
    # figure; without it the joint is unrated (nan), never assumed.
    rating = np.full(10, R16)
    rating[3] = np.nan
    joints = make_joints(np.full(10, 6.0), rating)
    grout = GroutSpec(GROUT, 30.0, WATER)
    util = grout_utilization(joints, Hole(MUD), grout, DF)
    assert math.isnan(util[3])
    assert np.all(np.isfinite(np.delete(util, 3)))
    plan = plan_grout_lifts(joints, Hole(MUD), grout, DF)
    assert plan.unrated == ("J4",)
    assert any(w.code == GroutCode.UNRATED_JOINTS and "J4" in w.get("labels")
               for w in plan.warnings)


# ---------------------------------------------------------------------------
# tallest single lift


def test_max_single_lift_uniform_string_closed_form():
    # Hydrostatics: the largest load is at the shoe; the tallest lift solves
    #   R/DF = rho_o g (Z - H - h_o) + rho_g g H - rho_i g Z
    # so H = (R/DF - rho_o g (Z - h_o) + rho_i g Z) / ((rho_g - rho_o) g).
    joints = uniform_string()
    z, h_o = 240.0, 3.0
    h_hand = (R16 / DF - MUD * G * (z - h_o) + WATER * G * z) / ((GROUT - MUD) * G)
    assert 0 < h_hand < z - h_o        # grout top stays below the mud level
    lift = max_single_lift(joints, Hole(MUD, h_o), GROUT, WATER, 0.0, DF)
    assert_allclose(lift.height, h_hand, rtol=1e-12)
    assert lift.limited_by == 0
    assert not lift.overloaded_at_base
    # At that height the shoe is exactly at rating / DF.
    util = grout_utilization(joints, Hole(MUD, h_o), GroutSpec(GROUT, lift.height, WATER), DF)
    assert_allclose(util.max(), 1.0, rtol=0, atol=1e-9)


def test_max_single_lift_on_set_grout_closed_form():
    # Lift on set grout at height b (common practice, no source, for the
    # support below b).  Hydrostatics at the lowest loaded point x = b:
    #   R/DF = rho_o g (Z - t - h_o) + rho_g g (t - b) - rho_i g (Z - b)
    #   t = (R/DF - rho_o g (Z - h_o) + rho_i g (Z - b) + rho_g g b)
    #       / ((rho_g - rho_o) g)
    joints = uniform_string()
    z, h_o, b = 240.0, 3.0, 50.0
    t_hand = ((R16 / DF - MUD * G * (z - h_o) + WATER * G * (z - b) + GROUT * G * b)
              / ((GROUT - MUD) * G))
    assert b < t_hand < z - h_o
    lift = max_single_lift(joints, Hole(MUD, h_o), GROUT, WATER, 0.0, DF, base_height=b)
    assert_allclose(lift.top_height, t_hand, rtol=1e-12)
    assert_allclose(lift.height, t_hand - b, rtol=1e-12)
    # Joint 9 (index 8) holds the base at 50 m (joints are 6 m long).
    assert lift.limited_by == 8


def test_max_single_lift_grout_above_lost_returns_level():
    # Hole fluid only below 150 m (lost returns); once the grout top rises
    # above it nothing sits on the grout: dP(shoe) = rho_g g H - rho_i g Z,
    # so H = (R/DF + rho_i g Z) / (rho_g g) when Z - H < h_o.
    joints = uniform_string()
    z, h_o = 240.0, 150.0
    h_hand = (R16 / DF + WATER * G * z) / (GROUT * G)
    assert z - h_hand < h_o < z
    lift = max_single_lift(joints, Hole(MUD, h_o), GROUT, WATER, 0.0, DF)
    assert_allclose(lift.height, h_hand, rtol=1e-12)


def test_max_single_lift_weak_section_closed_form():
    # 10 strong joints (0.3125 in wall) at the bottom, then 30 thin ones
    # (0.250 in wall) from x_w = 60 m up; water full inside, mud full
    # outside.  At the thin section's bottom, with the grout top t above it
    # (hydrostatics):
    #   R_thin/DF = rho_o g (Z - t) + rho_g g (t - x_w) - rho_i g (Z - x_w)
    # and at the shoe (strong pipe):
    #   R/DF = rho_o g (Z - t) + rho_g g t - rho_i g Z.
    # The thin section's limit is the lower one, so it rules.
    rating = np.concatenate((np.full(10, R16), np.full(30, R16_THIN)))
    joints = make_joints(np.full(40, 6.0), rating)
    z, x_w = 240.0, 60.0
    t_thin = ((R16_THIN / DF - MUD * G * z + GROUT * G * x_w + WATER * G * (z - x_w))
              / ((GROUT - MUD) * G))
    t_shoe = (R16 / DF - MUD * G * z + WATER * G * z) / ((GROUT - MUD) * G)
    assert x_w < t_thin < t_shoe < z
    lift = max_single_lift(joints, Hole(MUD), GROUT, WATER, 0.0, DF)
    assert_allclose(lift.top_height, t_thin, rtol=1e-12)
    assert lift.limited_by == 10          # joint 11, the lowest thin joint


def test_max_single_lift_capped_at_string_top():
    # Light grout on a short string: the hand formula gives more than the
    # string length, so the lift stops at the top of the string.
    joints = uniform_string(n=10)
    h_hand = (R16 / DF - MUD * G * 60.0 + WATER * G * 60.0) / ((GROUT - MUD) * G)
    assert h_hand > 60.0
    lift = max_single_lift(joints, Hole(MUD), GROUT, WATER, 0.0, DF)
    assert lift.height == 60.0 and lift.limited_by is None


def test_max_single_lift_skips_unrated_joint():
    # An unrated screen at the shoe is skipped (not checked) but reported;
    # the next joint's bottom (x = 6 m) then limits the lift (hydrostatics):
    #   R/DF = rho_o g (Z - t) + rho_g g (t - 6) - rho_i g (Z - 6).
    rating = np.full(40, R16)
    rating[0] = np.nan
    joints = make_joints(np.full(40, 6.0), rating)
    z = 240.0
    t_hand = (R16 / DF - MUD * G * z + WATER * G * (z - 6.0) + GROUT * G * 6.0) / ((GROUT - MUD) * G)
    lift = max_single_lift(joints, Hole(MUD), GROUT, WATER, 0.0, DF)
    assert lift.unrated == ("J1",)
    assert_allclose(lift.top_height, t_hand, rtol=1e-12)
    assert lift.limited_by == 1


# ---------------------------------------------------------------------------
# lift planner


def _lift_utilization(joints, hole, grout, base, top):
    loads = lift_collapse_loads(joints, hole, grout.density, grout.inside_density,
                                grout.inside_level, base, top)
    return DF * loads / np.asarray(joints.collapse_rating)


def test_plan_lifts_follow_hand_recursion_and_stay_within_rating():
    # Uniform string, water full inside, mud full outside.  Each lift is
    # limited at its base b (hydrostatics):
    #   t - b = (R/DF - (rho_o - rho_i) g (Z - b)) / ((rho_g - rho_o) g)
    joints = uniform_string(n=60)          # Z = 360 m
    z, h = 360.0, 350.0
    hole = Hole(MUD)
    grout = GroutSpec(GROUT, h, WATER, 0.0)
    plan = plan_grout_lifts(joints, hole, grout, DF)

    expected, b = [], 0.0
    while b < h:
        t = min(h, b + (R16 / DF - (MUD - WATER) * G * (z - b)) / ((GROUT - MUD) * G))
        expected.append((b, t))
        b = t
    assert len(expected) >= 3
    assert plan.feasible and plan.reason is None
    assert plan.n_lifts == len(expected) == len(plan.lifts)
    assert_allclose(np.array(plan.lifts), np.array(expected), rtol=1e-11, atol=1e-9)
    assert not plan.full_column_ok
    assert_allclose(plan.max_single_lift, expected[0][1], rtol=1e-12)

    # Lifts cover [0, H] without gaps.
    assert plan.lifts[0][0] == 0.0
    assert_allclose(plan.lifts[-1][1], h, rtol=0, atol=1e-12)
    for (b0, t0), (b1, _) in zip(plan.lifts, plan.lifts[1:]):
        assert b1 == t0 and t0 > b0
    # Every state each lift passes through stays within rating / DF.
    for b, t in plan.lifts:
        for tt in np.linspace(b, t, 25):
            assert np.nanmax(_lift_utilization(joints, hole, grout, b, tt)) <= 1.0 + 1e-9
    # Each lift but the last ends with some joint at its rating / DF.
    for b, t in plan.lifts[:-1]:
        assert_allclose(np.nanmax(_lift_utilization(joints, hole, grout, b, t)), 1.0,
                        rtol=0, atol=1e-9)
    assert plan.lift_limited_by[-1] == ""
    assert all(lbl for lbl in plan.lift_limited_by[:-1])


def test_plan_single_lift_when_full_column_fits():
    joints = uniform_string()
    grout = GroutSpec(GROUT, 80.0, WATER)
    plan = plan_grout_lifts(joints, Hole(MUD), grout, DF)
    # Hand: H_max = (R/DF - (rho_o - rho_i) g Z)/((rho_g - rho_o) g) > 80 m.
    h_max = (R16 / DF - (MUD - WATER) * G * 240.0) / ((GROUT - MUD) * G)
    assert h_max > 80.0
    assert plan.full_column_ok and plan.feasible
    assert plan.lifts == ((0.0, 80.0),) and plan.n_lifts == 1
    assert_allclose(plan.max_single_lift, h_max, rtol=1e-12)
    assert_allclose(plan.grout_top_depth, 160.0, rtol=1e-14)


def test_plan_infeasible_when_hole_fluid_alone_overloads():
    # Empty casing in mud: at the shoe of 240 m, 1100 g 240 = 2.59 MPa,
    # over R/DF = 1.33 MPa before any grout goes in (hydrostatics).
    joints = uniform_string()
    grout = GroutSpec(GROUT, 100.0, 0.0, 240.0)
    assert MUD * G * 240.0 > R16 / DF
    plan = plan_grout_lifts(joints, Hole(MUD), grout, DF)
    assert not plan.feasible and plan.n_lifts == 0 and plan.lifts == ()
    assert plan.reason.code == GroutCode.OVERLOADED_BEFORE_GROUT and plan.reason.label == "J1"
    assert plan.max_single_lift == 0.0
    assert not plan.full_column_ok


def test_plan_warns_when_grout_lighter_than_hole_fluid():
    # A grout lighter than the fluid it should displace floats on it
    # (hydrostatics: the lighter column rises); warn, do not fail.
    joints = uniform_string(n=10)
    plan = plan_grout_lifts(joints, Hole(1200.0), GroutSpec(1150.0, 20.0, WATER), DF)
    assert any(w.code == GroutCode.LIGHTER_THAN_HOLE_FLUID for w in plan.warnings)
    assert plan.feasible


def test_plan_zero_height_column():
    plan = plan_grout_lifts(uniform_string(n=5), Hole(MUD), GroutSpec(GROUT, 0.0, WATER), DF)
    assert plan.lifts == () and plan.feasible and plan.full_column_ok


# ---------------------------------------------------------------------------
# bad input


@pytest.mark.parametrize("grout, hole, df, where", [
    (GroutSpec(-1.0, 10.0), Hole(MUD), DF, "grout.density"),
    (GroutSpec(GROUT, 61.0), Hole(MUD), DF, "grout.height"),
    (GroutSpec(GROUT, -1.0), Hole(MUD), DF, "grout.height"),
    (GroutSpec(GROUT, 10.0, WATER, -2.0), Hole(MUD), DF, "grout.inside_level"),
    (GroutSpec(GROUT, 10.0), Hole(float("nan")), DF, "hole.fluid_density"),
    (GroutSpec(GROUT, 10.0), Hole(MUD), 0.0, "design_factors.collapse"),
])
def test_bad_input_names_the_key(grout, hole, df, where):
    with pytest.raises(InputError) as err:
        plan_grout_lifts(uniform_string(n=10), hole, grout, df)
    assert err.value.where == where


def test_bad_rating_names_the_joint():
    rating = np.full(5, R16)
    rating[2] = 0.0
    with pytest.raises(InputError) as err:
        plan_grout_lifts(make_joints(np.full(5, 6.0), rating), Hole(MUD), GroutSpec(GROUT, 10.0), DF)
    assert err.value.where == "joints[J3].collapse_rating"


# ---------------------------------------------------------------------------
# properties


@st.composite
def grouting_case(draw):
    n = draw(st.integers(1, 6))
    lengths = np.array(draw(st.lists(st.floats(1.0, 15.0), min_size=n, max_size=n)))
    ratings = np.array(draw(st.lists(
        st.one_of(st.floats(2e5, 5e6), st.just(float("nan"))), min_size=n, max_size=n)))
    z = float(lengths.sum())
    hole = Hole(draw(st.floats(1000.0, 1400.0)), draw(st.floats(0.0, 1.2)) * z)
    rho_i = draw(st.floats(0.0, 1200.0))
    h_i = draw(st.floats(0.0, 1.0)) * z
    base = draw(st.floats(0.0, 1.0)) * z
    df = draw(st.floats(1.0, 1.5))
    return make_joints(lengths, ratings), hole, rho_i, h_i, base, df


@settings(max_examples=200, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(case=grouting_case(), rho_a=st.floats(900.0, 2400.0), rho_b=st.floats(900.0, 2400.0))
def test_heavier_grout_never_allows_taller_lift(case, rho_a, rho_b):
    # Hydrostatics: below the grout top dP rises with rho_g at every point
    # and every grout top, so the set of safe tops can only shrink.
    joints, hole, rho_i, h_i, base, df = case
    light, heavy = sorted((rho_a, rho_b))
    z = float(np.sum(joints.length))
    lift_light = max_single_lift(joints, hole, light, rho_i, h_i, df, base)
    lift_heavy = max_single_lift(joints, hole, heavy, rho_i, h_i, df, base)
    assert lift_heavy.height <= lift_light.height + 1e-9 * z


@settings(max_examples=100, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(case=grouting_case(), rho_g=st.floats(900.0, 2400.0))
def test_max_lift_agrees_with_brute_force(case, rho_g):
    # Brute force on the pointwise hydrostatic formula: every grout top up
    # to the lift is within rating / DF; a grid of tops beyond the first
    # failing one is never reached.
    joints, hole, rho_i, h_i, base, df = case
    lift = max_single_lift(joints, hole, rho_g, rho_i, h_i, df, base)
    z = float(np.sum(joints.length))
    top = np.cumsum(joints.length)
    bottom = top - joints.length
    rating = np.asarray(joints.collapse_rating)
    rated = np.isfinite(rating) & (top > base)
    assume(np.any(rated))

    def worst(t):
        u = 0.0
        for j in np.flatnonzero(rated):
            x = np.concatenate((np.linspace(max(bottom[j], base), top[j], 401),
                                np.clip([t, z - hole.fluid_level, z - h_i],
                                        max(bottom[j], base), top[j])))
            dp = grout_differential_pressure(x, z, hole, rho_g, t, rho_i, h_i)
            u = max(u, df * dp.max() / rating[j])
        return u

    if lift.overloaded_at_base:
        assert worst(base) > 1.0
        return
    for t in np.linspace(base, lift.top_height, 12):
        assert worst(t) <= 1.0 + 1e-9
    if lift.limited_by is not None:
        # Just above the returned top some joint is over its rating / DF.
        step = 1e-6 * z
        assert worst(min(z, lift.top_height + step)) > 1.0 - 1e-9


# ---------------------------------------------------------------------------
# heat of hydration: thermoplastic casing derated while the grout sets


def test_pvc_collapse_derated_for_the_heat_of_hydration():
    # PVC derating table (Uni-Bell Handbook of PVC Pipe, from memory): 1.00 at
    # 73.4 F, 0.62 at 100 F.  A PVC string rated at the 73.4 F job temperature
    # and a rise of 26.6 F (100 F while the grout sets) keeps 0.62 of its
    # collapse rating; steel keeps all of it.  Tallest single lift from the
    # shoe, uniform string, both fluids full (hydrostatics, module docstring):
    # H = (P/DF - rho_o g Z + rho_i g Z) / ((rho_g - rho_o) g).
    from rigplan.engine.grouting import grouting_collapse_ratings
    from rigplan.engine.rating import rate_joints
    from rigplan.engine.stringmodel import JointSpec
    od = 8.625 * INCH
    pvc = [JointSpec(f"P{i}", "blank", "pvc", od=od, wall=od / 17, length=6.0,
                     connection="spline") for i in range(20)]
    steel = JointSpec("S", "blank", "a53b", od=od, wall=0.25 * INCH, length=6.0)
    joints = rate_joints(pvc + [steel])
    rise = (100.0 - 73.4) / 1.8
    rated = grouting_collapse_ratings(joints, rise)
    assert_allclose(rated[:20], 0.62 * joints.collapse_rating[:20], rtol=1e-12)
    assert rated[20] == joints.collapse_rating[20]
    assert_allclose(grouting_collapse_ratings(joints, 0.0), joints.collapse_rating, rtol=0)
    only_pvc = rate_joints(pvc)
    z = 120.0
    p = 0.62 * only_pvc.collapse_rating[0]
    expected = (p / DF - MUD * G * z + WATER * G * z) / ((GROUT - MUD) * G)
    plan = plan_grout_lifts(only_pvc, Hole(fluid_density=MUD),
                            GroutSpec(density=GROUT, height=z, inside_density=WATER,
                                      temperature_rise=rise), DF)
    assert_allclose(plan.max_single_lift, expected, rtol=1e-9)
    cool = plan_grout_lifts(only_pvc, Hole(fluid_density=MUD),
                            GroutSpec(density=GROUT, height=z, inside_density=WATER), DF)
    assert cool.max_single_lift > plan.max_single_lift


def test_pvc_past_its_table_while_grouting_is_unrated():
    # PVC is not rated above 140 F (derating table, from memory): a job at
    # 110 F with a 40 F rise leaves no collapse rating: unrated, never assumed,
    # and the grouting plan lists the joints it could not check.
    from rigplan.engine.grouting import grouting_collapse_ratings
    from rigplan.engine.rating import rate_joints
    from rigplan.engine.stringmodel import JointSpec
    od = 8.625 * INCH
    pvc = [JointSpec(f"P{i}", "blank", "pvc", od=od, wall=od / 17, length=6.0,
                     connection="spline") for i in range(5)]
    joints = rate_joints(pvc, temperature=(110 - 32) / 1.8)
    assert np.all(np.isnan(grouting_collapse_ratings(joints, 40 / 1.8)))
    plan = plan_grout_lifts(joints, Hole(fluid_density=MUD),
                            GroutSpec(density=GROUT, height=10.0, inside_density=WATER,
                                      temperature_rise=40 / 1.8), DF)
    assert plan.unrated == tuple(f"P{i}" for i in range(5))
