"""Checks of the scenario sweep (rigplan.engine.sweep) against the identities of the
pressure-area method, the Timoshenko first-yield equation and the scalar
engine (rigplan.engine.axial.running_loads, rigplan.engine.floatplan.fill_window)."""

from __future__ import annotations

import math

import numpy as np
import pytest
from numpy.testing import assert_allclose

from _units import ft, inch, lbf, psi
from rigplan.engine.axial import running_loads
from rigplan.engine.collapse import elastic_ring_collapse, timoshenko
from rigplan.errors import InputError
from rigplan.engine.floatplan import fill_window
from rigplan.engine.materials import get_material
from rigplan.engine.stringmodel import G, Closure, Hole, JointArrays
from rigplan.engine.sweep import UniformString, sweep_landing

#: 1 lb/gal in kg/m^3 (US gallon 231 in^3, NIST SP 811 appendix B).
from _units import ppg as PPG  # NIST SP 811
RHO_W = 998.2


def a53b_string(n=200, seed=3, od=16 * inch, wall=0.375 * inch):
    """A tally of ``n`` joints of A53 Grade B pipe (lengths 5.8 to 6.25 m)."""
    m = get_material("a53b")
    lengths = np.random.default_rng(seed).uniform(5.8, 6.25, n)
    return UniformString(od, wall, lengths, m.yield_strength, m.youngs_modulus, m.poisson,
                         m.density, m.wall_under_tolerance)


def scenarios(n=40, seed=5):
    rng = np.random.default_rng(seed)
    return (rng.uniform(0.875, 1.0, n), rng.uniform(998.2, 1400.0, n),
            rng.uniform(0.0, 0.03, n))


def engine_string(s: UniformString, wall: float, rating: float) -> JointArrays:
    """The same string as per-joint arrays for the scalar engine: plain-end
    weight rho_s g A_s L on the scenario's wall, one collapse rating."""
    n = len(s.lengths)
    bore = s.od - 2.0 * wall
    weight = s.density * G * math.pi / 4 * (s.od ** 2 - bore ** 2) * s.lengths
    nan = np.full(n, np.nan)
    return JointArrays(
        label=tuple(f"J{i + 1}" for i in range(n)), kind=("blank",) * n,
        length=s.lengths.copy(), od=np.full(n, s.od), bore=np.full(n, bore), weight=weight,
        collapse_rating=np.full(n, rating), burst_rating=nan.copy(), body_rating=nan.copy(),
        connection_rating=nan.copy())


def test_landed_load_is_air_weight_times_buoyancy_factor():
    # Identity of the pressure-area method for a uniform open-ended string,
    # one fluid inside and out, hole full: F(0) = W_air (1 - rho_m / rho_s)
    # (Bourgoyne et al., Applied Drilling Engineering, 1986, ch. 7, buoyancy
    # factor; string mechanics (ADE 1986), "Axial force by the pressure-area method").
    s = a53b_string()
    f, rho, e = scenarios()
    r = sweep_landing(s, f, rho, e, string_limit=1e9)
    wall = f * s.nominal_wall
    w_air = s.density * G * math.pi / 4 * (s.od ** 2 - (s.od - 2 * wall) ** 2) * s.shoe_depth
    assert_allclose(r.air_weight, w_air, rtol=1e-13)
    assert_allclose(r.string_load, w_air * (1.0 - rho / s.density), rtol=1e-12)
    assert_allclose(r.buoyancy_factor, 1.0 - rho / s.density, rtol=1e-14)


def test_handbook_buoyancy_example_7in_23lb():
    # 1,000 ft of 7 in x 0.317 in (22.65 lb/ft plain end, ASTM A53/A53M
    # plain-end formula 10.69 (D - t) t) in 9.0 lb/gal mud: buoyancy factor
    # 1 - 9.0/65.4 with steel at 65.4 lb/gal (oilfield handbook value, from
    # memory; Bourgoyne et al. 1986 ch. 7) -> about 22,650 x 0.8624 =
    # 19,534 lbf.  7850 kg/m^3 is 65.5 lb/gal, hence the 2e-3 tolerance.
    m = get_material("a53b")
    s = UniformString(7 * inch, 0.317 * inch, [5 * ft] * 200, m.yield_strength,
                      m.youngs_modulus, m.poisson, m.density, m.wall_under_tolerance)
    r = sweep_landing(s, [1.0], [9.0 * PPG], [0.01], string_limit=1e9)
    assert_allclose(r.air_weight[0] / lbf, 10.69 * (7 - 0.317) * 0.317 * 1000, rtol=2e-3)
    assert_allclose(r.string_load[0] / lbf, 22650 * (1 - 9.0 / 65.4), rtol=2e-3)


def test_landed_load_matches_scalar_engine_with_lost_returns():
    # The sweep against rigplan.engine.axial.running_loads on the same string, one
    # scenario at a time, with the annulus fluid top 30 m below the floor
    # (pressure-area method, string mechanics (ADE 1986) conventions).
    s = a53b_string(n=120)
    f, rho, e = scenarios(n=4)
    r = sweep_landing(s, f, rho, e, string_limit=1e9, fluid_level=30.0)
    for i in range(4):
        joints = engine_string(s, float(r.wall[i]), float(r.collapse_rating[i]))
        loads = running_loads(joints, Hole(fluid_density=float(rho[i]), fluid_level=30.0),
                              Closure())
        assert_allclose(r.string_load[i], loads.string_load[-1], rtol=1e-12)
        assert_allclose(s.shoe_depth, loads.shoe_depth[-1], rtol=1e-14)


def test_collapse_rating_is_timoshenko_at_the_actual_wall():
    # Timoshenko and Gere, Theory of Elastic Stability (1961), ch. 7: the
    # sweep rates each scenario at its own wall; with no ellipticity the
    # first-yield equation factors as (p - 2 Sy/r)(p - p_cr) = 0, so the
    # rating is the smaller of hoop yield and elastic ring buckling.
    s = a53b_string()
    f, rho, e = scenarios(n=6)
    r = sweep_landing(s, f, rho, e, string_limit=1e9)
    for i in range(6):
        assert_allclose(r.collapse_rating[i],
                        timoshenko(s.od, f[i] * s.nominal_wall, s.yield_strength, e[i],
                                   s.youngs_modulus, s.poisson), rtol=1e-14)
    round_pipe = sweep_landing(s, f, rho, np.zeros(6), string_limit=1e9)
    wall = f * s.nominal_wall
    hoop = 2 * s.yield_strength / (s.od / wall - 1)
    ring = elastic_ring_collapse(s.od, wall, s.youngs_modulus, s.poisson)
    assert_allclose(round_pipe.collapse_rating, np.minimum(hoop, ring), rtol=1e-12)
    # a thinner wall and a more oval pipe both rate lower
    assert np.all(np.diff(sweep_landing(s, [0.875, 0.95, 1.0], [1100.0], [0.01],
                                        1e9).collapse_rating) > 0)
    assert np.all(np.diff(sweep_landing(s, [1.0], [1100.0], [0.0, 0.01, 0.02],
                                        1e9).collapse_rating) < 0)


@pytest.mark.parametrize("df", [1.0, 1.125])
def test_longest_empty_column_matches_fill_window(df):
    # Float shoe, water inside below the fill surface, mud outside: the
    # longest empty column from the closed form
    # rho_m g Z - rho_w g (Z - h) = R / DF (string mechanics (ADE 1986), "Floating and
    # fill-up", collapse bound) against the deepest allowed fill level of
    # rigplan.engine.floatplan.fill_window at the landed step, same string, same
    # rating, no hoisting or running-weight limit.
    s = a53b_string(n=150)
    f = np.array([0.875, 0.93, 1.0, 1.0])
    rho = np.array([1080.0, 1150.0, 1010.0, 1300.0])
    e = np.array([0.0, 0.01, 0.005, 0.02])
    r = sweep_landing(s, f, rho, e, string_limit=1e9, fill_density=RHO_W,
                      collapse_factor=df)
    for i in range(4):
        joints = engine_string(s, float(r.wall[i]), float(r.collapse_rating[i]))
        w = fill_window(joints, Hole(fluid_density=float(rho[i])), Closure(0), RHO_W,
                        string_limit=1e12, min_running_weight=-1e12, collapse_factor=df)
        if r.collapses_full[i]:
            assert not w.feasible[-1]
            assert r.longest_empty[i] == 0.0
        else:
            assert_allclose(r.longest_empty[i], w.max_fill_level[-1], rtol=1e-9, atol=1e-9)
            # at that level the shoe carries exactly the allowable load
            # (or the whole string may be empty)
            z = s.shoe_depth
            dp = rho[i] * G * z - RHO_W * G * (z - r.longest_empty[i])
            if r.longest_empty[i] < z:
                assert_allclose(dp, r.collapse_rating[i] / df, rtol=1e-9)
    assert r.collapses_full.any() and not r.collapses_full.all()


def test_whole_string_may_run_empty_when_shallow():
    # A short string in light mud: rho_m g Z below R / DF, so nothing needs
    # filling (empty column = shoe depth); same closed form as above.
    s = a53b_string(n=10)
    r = sweep_landing(s, [1.0], [1050.0], [0.01], string_limit=1e9, collapse_factor=1.125)
    assert 1050.0 * G * s.shoe_depth < r.collapse_rating[0] / 1.125
    assert r.longest_empty[0] == s.shoe_depth


def test_pass_fail_against_string_limit():
    # pass when the landed string load is within the limit (the limit is a
    # load [N]; equality passes, as in the planner's margin >= 0)
    s = a53b_string()
    r0 = sweep_landing(s, [0.875, 1.0], [1100.0], [0.01], string_limit=1e9)
    limit = float(r0.string_load[0])
    r = sweep_landing(s, [0.875, 1.0], [1100.0], [0.01], string_limit=limit)
    assert r.passes.tolist() == [True, False]


@pytest.mark.parametrize("kwargs, where", [
    (dict(wall_factor=[1.0, 0.8]), "wall_factor[1]"),
    (dict(fluid_density=[1100.0, -1.0]), "fluid_density[1]"),
    (dict(ellipticity=[1.0]), "ellipticity[0]"),
])
def test_bad_scenarios_name_the_entry(kwargs, where):
    s = a53b_string(n=5)
    args = dict(wall_factor=[1.0], fluid_density=[1100.0], ellipticity=[0.01])
    args.update(kwargs)
    with pytest.raises(InputError) as err:
        sweep_landing(s, string_limit=1e9, **args)
    assert err.value.where == where


def test_bad_string_names_the_field():
    m = get_material("a53b")
    with pytest.raises(InputError) as err:
        UniformString(16 * inch, 0.375 * inch, [6.0, 0.0], m.yield_strength,
                      m.youngs_modulus, m.poisson, m.density, 0.125)
    assert err.value.where == "string.lengths[1]"


def test_sweep_is_independent_of_the_other_scenarios():
    # vectorized evaluation: one scenario alone gives the same numbers as
    # inside a batch of 10,000
    s = a53b_string()
    f, rho, e = scenarios(n=10000, seed=9)
    r = sweep_landing(s, f, rho, e, string_limit=5e6, collapse_factor=1.125)
    for i in (0, 4321, 9999):
        one = sweep_landing(s, [f[i]], [rho[i]], [e[i]], string_limit=5e6,
                            collapse_factor=1.125)
        for name in ("string_load", "collapse_rating", "longest_empty"):
            assert_allclose(getattr(one, name)[0], getattr(r, name)[i], rtol=1e-15)
    assert r.string_load.shape == (10000,)
    assert np.all(r.collapse_rating / psi > 50) and np.all(r.collapse_rating / psi < 2000)
