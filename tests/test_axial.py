"""Running loads by the pressure-area method (rigplan.engine.axial).

Each check names its source.  "Identity" checks are exact consequences of
the pressure-area method as stated in standard string mechanics (Bourgoyne et al., *Applied Drilling Engineering*, 1986)
(open end one fluid -> buoyancy factor; closed empty -> W - P A_o; zero
effective tension at an open shoe), which textbooks give as the definition
of buoyancy (Bourgoyne et al., Applied Drilling Engineering, 1986, ch. 7).
"""

import numpy as np
import pytest
from hypothesis import given, settings, strategies as st
from numpy.testing import assert_allclose

from rigplan.engine.axial import (neutral_point_depth, running_loads, step_profile,
                           string_geometry)
from rigplan.engine.hydrostatics import buoyancy_factor, hydrostatic_pressure
from rigplan.engine.stringmodel import G, Closure, Hole, JointArrays

from _units import ft as FT, inch as INCH, lbf as LBF, psi as PSI  # NIST SP 811
STEEL = 7850.0


def tube(n, od, wall, length, density=STEEL, bore=None):
    """A uniform string of n joints built from geometry."""
    d = od - 2 * wall if bore is None else bore
    w = density * G * np.pi / 4 * (od ** 2 - (od - 2 * wall) ** 2) * length
    f = lambda v: np.full(n, float(v))
    nan = f(np.nan)
    return JointArrays(label=tuple(f"J{i + 1}" for i in range(n)), kind=("blank",) * n,
                       length=f(length), od=f(od), bore=f(d), weight=f(w),
                       collapse_rating=nan, burst_rating=nan, body_rating=nan,
                       connection_rating=nan)


def test_open_end_one_fluid_reduces_to_buoyancy_factor():
    # Identity (string mechanics (ADE 1986); ADE ch. 7): F(0) = W_air (1 - rho_f/rho_s).
    j = tube(30, 10.75 * INCH, 0.25 * INCH, 6.1)
    hole = Hole(fluid_density=1150.0)
    r = running_loads(j, hole, Closure())
    w_air = np.cumsum(j.weight)
    assert_allclose(r.string_load, w_air * buoyancy_factor(1150.0, STEEL), rtol=1e-12)


def test_open_shoe_effective_tension_zero_and_true_force_compressive():
    # Identity: effective tension is zero at an open shoe; the true force there
    # is -P_shoe x steel area (string mechanics (ADE 1986), effective tension).
    j = tube(20, 16 * INCH, 0.375 * INCH, 6.0)
    hole = Hole(fluid_density=1200.0)
    p = step_profile(j, hole, Closure(), 20)
    a_s = np.pi / 4 * ((16 * INCH) ** 2 - (16 * INCH - 0.75 * INCH) ** 2)
    p_shoe = hydrostatic_pressure(120.0, 1200.0)
    assert abs(p.effective_bottom[0]) < 1e-6 * j.weight.sum()
    assert_allclose(p.true_force_bottom[0], -p_shoe * a_s, rtol=1e-12)


def test_closed_empty_is_air_weight_less_shoe_pressure_on_outside_area():
    # Identity: closed and empty, F(0) = W_air - P_shoe A_o (string mechanics (ADE 1986)).
    j = tube(25, 13.375 * INCH, 0.33 * INCH, 6.0)
    hole = Hole(fluid_density=1100.0)
    r = running_loads(j, hole, Closure(0), fill_density=998.2, fill_level=1e9)
    a_o = np.pi / 4 * (13.375 * INCH) ** 2
    expected = np.cumsum(j.weight) - hydrostatic_pressure(r.shoe_depth, 1100.0) * a_o
    assert_allclose(r.string_load, expected, rtol=1e-10)


def test_buoyancy_check_values_7in_1000ft():
    # Shared API 5C3 reference, "Buoyancy check (computed from first
    # principles)": 1,000 ft of 7 in x 0.317 in steel, 22.65 lb/ft, 9.0 lb/gal.
    # Open end: hook about 19,535 lbf, shoe about -3,115 lbf; closed empty:
    # about 4,639 lbf, shoe about -18,011 lbf.  Those figures use the
    # 0.052 psi/ft/ppg shortcut, so this test states the pressure with it.
    n = 25
    od, t = 7 * INCH, 0.317 * INCH
    w = 22.65 * 0.45359237 / FT * G * 40 * FT
    j = JointArrays(label=tuple(str(i) for i in range(n)), kind=("blank",) * n,
                    length=np.full(n, 40 * FT), od=np.full(n, od), bore=np.full(n, od - 2 * t),
                    weight=np.full(n, w), collapse_rating=np.full(n, np.nan),
                    burst_rating=np.full(n, np.nan), body_rating=np.full(n, np.nan),
                    connection_rating=np.full(n, np.nan))
    # density that gives exactly 0.052 psi/ft per lb/gal x 9.0
    rho = 9.0 * 0.052 * PSI / FT / G
    hole = Hole(fluid_density=rho)
    open_ = running_loads(j, hole, Closure())
    prof = step_profile(j, hole, Closure(), n)
    assert_allclose(open_.string_load[-1] / LBF, 19535, atol=15)
    assert_allclose(prof.true_force_bottom[0] / LBF, -3115, atol=15)
    closed = running_loads(j, hole, Closure(0), 0.0, 1e9)
    prof_c = step_profile(j, hole, Closure(0), n, 0.0, 1e9)
    assert_allclose(closed.string_load[-1] / LBF, 4639, atol=20)
    assert_allclose(prof_c.true_force_bottom[0] / LBF, -18011, atol=20)


def test_hook_load_falls_as_fill_level_drops():
    # Identity: less fluid above the valve -> less weight on the hook
    # (string mechanics (ADE 1986), floating and fill-up).
    j = tube(40, 16 * INCH, 0.375 * INCH, 6.0)
    hole = Hole(fluid_density=1150.0)
    loads = [running_loads(j, hole, Closure(0), 998.2, h).string_load[-1]
             for h in (0.0, 30.0, 90.0, 150.0, 240.0)]
    assert np.all(np.diff(loads) < 0)


def test_fill_adds_exactly_the_weight_of_the_fluid_inside():
    # Identity: a fluid column resting on the valve and shoulders weighs on the
    # pipe by its own weight (hydrostatics; string mechanics (ADE 1986)).
    j = tube(30, 12.75 * INCH, 0.375 * INCH, 6.0)
    hole = Hole(fluid_density=1100.0)
    empty = running_loads(j, hole, Closure(0), 998.2, 1e9).string_load
    part = running_loads(j, hole, Closure(0), 998.2, 50.0).string_load
    bore_area = np.pi / 4 * j.bore[0] ** 2
    col = np.clip(running_loads(j, hole, Closure()).shoe_depth - 50.0, 0, None)
    assert_allclose(part - empty, 998.2 * G * bore_area * col, rtol=1e-10, atol=1e-6)


def test_float_collar_shoe_track_holds_hole_fluid():
    # Identity: below a float collar the shoe track is open to the hole, so
    # with hole fluid also above the valve to the same level the string
    # loads equal the open string's (string mechanics (ADE 1986)).
    j = tube(20, 10.75 * INCH, 0.3 * INCH, 6.0)
    hole = Hole(fluid_density=1150.0, fluid_level=12.0)
    open_ = running_loads(j, hole, Closure())
    collar = running_loads(j, hole, Closure(3), 1150.0, 12.0)
    assert_allclose(collar.string_load, open_.string_load, rtol=1e-12)
    assert_allclose(collar.envelope_max, open_.envelope_max, rtol=1e-12)


def test_tapered_string_open_end_equals_sum_of_buoyed_weights():
    # Identity: an open tapered string in one fluid still hangs its buoyed
    # weight: the shoulder forces cancel against the bottom-end force
    # (Archimedes; ADE ch. 7).
    a = tube(10, 12.75 * INCH, 0.375 * INCH, 6.0)
    b = tube(10, 8.625 * INCH, 0.322 * INCH, 6.0)
    cat = lambda x, y: np.concatenate([x, y])
    j = JointArrays(label=a.label + b.label, kind=a.kind + b.kind,
                    length=cat(b.length, a.length), od=cat(b.od, a.od), bore=cat(b.bore, a.bore),
                    weight=cat(b.weight, a.weight), collapse_rating=cat(a.collapse_rating, b.collapse_rating),
                    burst_rating=cat(a.burst_rating, b.burst_rating),
                    body_rating=cat(a.body_rating, b.body_rating),
                    connection_rating=cat(a.connection_rating, b.connection_rating))
    hole = Hole(fluid_density=1200.0)
    r = running_loads(j, hole, Closure())
    assert_allclose(r.string_load, np.cumsum(j.weight) * (1 - 1200.0 / STEEL), rtol=1e-12)


def test_hook_load_peaks_before_landing_when_filling_stops():
    # String mechanics (ADE 1986): with a floated string the largest tension can come
    # before the last joint.  Fill 16 in x 0.375 in pipe to the top for 20
    # joints in 1,200 kg/m^3 mud, then stop: each further 6 m joint weighs
    # less (about 5.5 kN) than the mud it displaces (1,200 g A_o 6 m, about
    # 9.2 kN), so the string load peaks at step 20.
    j = tube(40, 16 * INCH, 0.375 * INCH, 6.0)
    hole = Hole(fluid_density=1200.0)
    shoe = np.cumsum(j.length)
    level = np.where(np.arange(40) < 20, 0.0, shoe - shoe[19])
    r = running_loads(j, hole, Closure(0), 998.2, level)
    assert int(np.argmax(r.string_load)) == 19
    assert r.string_load[-1] < r.string_load[19]
    a_o = np.pi / 4 * (16 * INCH) ** 2
    assert_allclose(np.diff(r.string_load[20:]), j.weight[0] - 1200.0 * G * a_o * 6.0,
                    rtol=1e-9)
    assert r.envelope_step[19] == 20


def test_neutral_point_with_set_down_weight():
    # Identity (Lubinski 1951, effective force): for an open uniform string,
    # effective tension at height x above the shoe is w_b x; setting down S
    # puts the neutral point at x = S / w_b above the shoe.
    j = tube(30, 10.75 * INCH, 0.3 * INCH, 6.0)
    hole = Hole(fluid_density=1100.0)
    w_b = j.weight[0] / 6.0 * (1 - 1100.0 / STEEL)
    s = 40 * w_b
    p = step_profile(j, hole, Closure(), 30, slack_off=s)
    assert_allclose(neutral_point_depth(p), 180.0 - 40.0, rtol=1e-9)


def test_geometry_refuses_bad_strings():
    # common practice, no source: a bore not smaller than the OD, or a float
    # collar on the top joint, cannot be a string.
    j = tube(5, 10 * INCH, 0.3 * INCH, 6.0, bore=11 * INCH)
    with pytest.raises(ValueError, match="bore"):
        string_geometry(j, Closure())
    with pytest.raises(ValueError, match="float collar"):
        string_geometry(tube(5, 10 * INCH, 0.3 * INCH, 6.0), Closure(5))


@settings(max_examples=40, deadline=None)
@given(n=st.integers(2, 25), rho=st.floats(1000, 1500), level=st.floats(0, 60),
       fill=st.floats(0, 200))
def test_collapse_load_never_exceeds_empty_pipe_load(n, rho, level, fill):
    # Identity: fluid inside can only reduce the collapse load below that of
    # an empty pipe (P_in >= 0).
    j = tube(n, 16 * INCH, 0.375 * INCH, 6.0)
    hole = Hole(fluid_density=rho, fluid_level=level)
    part = running_loads(j, hole, Closure(0), 998.2, fill).collapse_max
    empty = running_loads(j, hole, Closure(0), 998.2, 1e9).collapse_max
    assert np.all(part <= empty + 1e-6)


def test_true_force_at_chosen_steps_matches_the_step_profile():
    # Identity of the pressure-area method (ADE 1986, ch. 7): the force at a
    # joint's top at a step is the same whether summed for chosen (joint,
    # step) pairs or along the whole string at that step.
    from rigplan.engine.axial import true_force_at
    a = tube(12, 12.75 * INCH, 0.375 * INCH, 6.0)
    b = tube(12, 16 * INCH, 0.375 * INCH, 6.0)
    cat = lambda x, y: np.concatenate([x, y])
    j = JointArrays(label=a.label + tuple(f"K{i}" for i in range(12)), kind=a.kind + b.kind,
                    length=cat(a.length, b.length), od=cat(a.od, b.od), bore=cat(a.bore, b.bore),
                    weight=cat(a.weight, b.weight),
                    collapse_rating=cat(a.collapse_rating, b.collapse_rating),
                    burst_rating=cat(a.burst_rating, b.burst_rating),
                    body_rating=cat(a.body_rating, b.body_rating),
                    connection_rating=cat(a.connection_rating, b.connection_rating))
    hole = Hole(fluid_density=1180.0, fluid_level=9.0)
    level = 30.0
    rng = np.random.default_rng(5)
    steps = rng.integers(0, 24, 40)
    joints = np.array([rng.integers(0, k + 1) for k in steps])
    got = true_force_at(j, hole, Closure(2), 998.2, level, joints, steps)
    want = [step_profile(j, hole, Closure(2), int(k) + 1, 998.2, level).true_force_top[i]
            for i, k in zip(joints, steps)]
    assert_allclose(got, want, rtol=1e-12, atol=1e-9 * np.max(np.abs(want)))


def test_fill_level_a_rounding_above_the_floor_is_the_floor():
    # A fill level computed as a difference of depths can come out -1e-14 m;
    # that is the floor, not an error (rounding of IEEE 754 doubles).
    from rigplan.engine.axial import _fill_levels, string_geometry
    import numpy as np
    from rigplan.engine.stringmodel import Closure, JointArrays
    n = 3
    j = JointArrays(label=("J1", "J2", "J3"), kind=("blank",) * 3, length=np.full(n, 6.0),
                    od=np.full(n, 0.2), bore=np.full(n, 0.18), weight=np.full(n, 2000.0),
                    collapse_rating=np.full(n, 1e6), burst_rating=np.full(n, 1e6),
                    body_rating=np.full(n, 1e6), connection_rating=np.full(n, 1e6))
    geo = string_geometry(j, Closure(valve_joint=0))
    lv = _fill_levels(geo, Closure(valve_joint=0), np.array([0.0, -1.4e-14, 3.0]))
    assert lv.tolist() == [0.0, 0.0, 3.0]
    import pytest
    with pytest.raises(ValueError):
        _fill_levels(geo, Closure(valve_joint=0), np.array([0.0, -0.01, 3.0]))
