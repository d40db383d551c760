"""Archimedes for every joint: each joint is buoyed by the fluid its own
material displaces (rigplan.engine.rating.displaced_area, fed to the
pressure-area method through JointArrays.pressure_outside_area)."""

import math

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st
from numpy.testing import assert_allclose

from _units import ft, inch, lb_per_ft, lbf, psi
from rigplan.engine.axial import running_loads, true_force_at
from rigplan.engine.materials import get_material
from rigplan.engine.rating import rate_joints
from rigplan.engine.stringmodel import G, Closure, Hole, JointSpec

from _units import ppg as PPG                # 1 lb/US gal [kg/m^3] (NIST SP 811)


def _buoyed_weights(specs, arrays):
    """W_i (1 - rho_f / rho_i) per joint, without the fluid density: returns
    (W_i, W_i / rho_i) so that the buoyed weight is W - rho_f * (W / rho)."""
    rho = np.array([get_material(s.material).density for s in specs])
    return arrays.weight, arrays.weight / rho


def test_wire_wrap_screen_below_blank_by_hand():
    # Worked by hand (Archimedes; pressure-area method, Bourgoyne et al., Applied
    # Drilling Engineering (1986) ch. 7): 160 ft of stainless wire-wrap screen
    # (8 joints of 20 ft), OD 8.625 in, ID 7.625 in, 19 lb/ft entered, 304
    # stainless at 8,000 kg/m^3, below 82 joints of 20 ft of 10-3/4 in x
    # 0.365 in A53 B blank; open shoe at 1,800 ft in 9.4 ppg mud, hole full.
    #   screen metal A_s = 19 lb/ft / 8,000 kg/m^3 = 28.2746 kg/m / 8,000
    #                    = 3.5343e-3 m^2 = 5.478 in^2 (the tube section
    #                      between 8.625 and 7.625 in is 12.76 in^2);
    #   shoe pressure    = 0.051948 psi/ft/ppg x 9.4 ppg x 1,800 ft = 878.96 psi;
    #   force at the top of the screen section (joint 8), landed:
    #     F = 19 lbf/ft x 160 ft - 878.96 psi x 5.478 in^2
    #       = 3,040 - 4,815 = -1,775 lbf = -7.90 kN (compression);
    #   with the tube section it would be 3,040 - 11,216 = -8,176 lbf (-36.4 kN).
    #   force at the top of the bottom screen joint (joint 1):
    #     F = 380 - 4,815 = -4,435 lbf = -19.73 kN.
    screen = JointSpec("S", "screen", "ss304", od=8.625 * inch, wall=0.5 * inch,
                       length=20 * ft, bore=7.625 * inch, weight_per_length=19 * lb_per_ft * G,
                       tensile_rating=60000 * lbf, collapse_rating=300 * psi)
    blank = JointSpec("B", "blank", "a53b", od=10.75 * inch, wall=0.365 * inch,
                      length=20 * ft, weld_efficiency=1.0)
    specs = [screen] * 8 + [blank] * 82
    joints = rate_joints(specs)
    hole = Hole(fluid_density=9.4 * PPG)
    assert_allclose(joints.displaced_area[0] / inch ** 2, 5.478, atol=0.001)
    last = joints.n - 1
    f8, f1 = true_force_at(joints, hole, Closure(), 0.0, None, [7, 0], [last, last])
    assert_allclose(f8 / 1000, -7.90, atol=0.01)
    assert_allclose(f1 / 1000, -19.73, atol=0.01)
    # hook side: open-ended in one fluid, string load = sum W_i (1 - rho_f / rho_i)
    w, w_over_rho = _buoyed_weights(specs, joints)
    loads = running_loads(joints, hole, Closure())
    assert_allclose(loads.string_load, np.cumsum(w - hole.fluid_density * w_over_rho),
                    rtol=1e-9)


def test_coupled_casing_displaces_its_couplings():
    # Archimedes: 9-5/8 in 36 lb/ft K-55 with couplings weighs more than its
    # plain-end tube (35.0 lb/ft by ASTM A53/API 5L 10.69 (D - t) t); the steel
    # of the couplings displaces fluid too, so 1,000 ft in 9.0 ppg carries
    # 36 x 1,000 x (1 - 9.0 x 119.826 / 7,850) = 31,054 lbf, not the 31,206
    # lbf of 36 lb/ft buoyed as a plain tube of 9.625 x 0.352 in (10.254 in^2
    # of steel, 67.32 lb/ft^3 of mud: 36,000 - 4,794).
    specs = [JointSpec(f"J{i}", "blank", "k55", od=9.625 * inch, wall=0.352 * inch,
                       length=40 * ft, weight_per_length=36 * lb_per_ft * G,
                       connection="threaded_coupled", connection_rating=400000 * lbf)
             for i in range(25)]
    joints = rate_joints(specs)
    loads = running_loads(joints, Hole(fluid_density=9.0 * PPG), Closure())
    assert_allclose(loads.string_load[-1] / lbf, 36000 * (1 - 9.0 * PPG / 7850), rtol=1e-9)
    assert_allclose(loads.string_load[-1] / lbf, 31054, atol=1)


_PALETTE = ("a53b", "screen", "coupled", "shoe", "pvc", "ss316l")


@st.composite
def _joint(draw, i):
    kind = draw(st.sampled_from(_PALETTE))
    od = draw(st.floats(4.5, 20.0)) * inch
    wall = od * draw(st.floats(0.02, 0.12))
    length = draw(st.floats(2.0, 45.0)) * ft
    label = f"J{i}"
    if kind == "screen":
        w = draw(st.floats(5.0, 60.0)) * lb_per_ft * G
        return JointSpec(label, "screen", "ss304", od=od, wall=wall, length=length,
                         bore=od - 2 * wall * draw(st.floats(0.5, 1.0)), weight_per_length=w,
                         tensile_rating=1e5, collapse_rating=1e6)
    if kind == "coupled":
        from rigplan.engine.tubulars import linear_mass
        w = linear_mass(od, wall, 7850.0) * G * draw(st.floats(1.0, 1.1))
        return JointSpec(label, "blank", "k55", od=od, wall=wall, length=length,
                         weight_per_length=w, connection="threaded_coupled",
                         connection_rating=1e6)
    if kind == "shoe":
        return JointSpec(label, "float_shoe", "a53b", od=od, wall=wall, length=length,
                         weight=draw(st.floats(100.0, 5000.0)), connection="integral")
    material = {"a53b": "a53b", "pvc": "pvc", "ss316l": "ss316l"}[kind]
    return JointSpec(label, "blank", material, od=od, wall=wall, length=length,
                     weld_efficiency=1.0)


@st.composite
def _string(draw):
    n = draw(st.integers(1, 25))
    return [draw(_joint(i)) for i in range(1, n + 1)]


@settings(max_examples=60, deadline=None)
@given(specs=_string(), rho_f=st.floats(800.0, 2000.0))
def test_open_ended_hook_load_is_the_sum_of_buoyed_weights(specs, rho_f):
    # Archimedes' principle, open-ended in one fluid (hole full): at every
    # running step the string load is sum_{i<=k} W_i (1 - rho_f / rho_i), for
    # any mix of screens, coupled casing, entered joint weights and plain pipe.
    joints = rate_joints(specs)
    loads = running_loads(joints, Hole(fluid_density=rho_f), Closure())
    w, w_over_rho = _buoyed_weights(specs, joints)
    expected = np.cumsum(w - rho_f * w_over_rho)
    scale = np.cumsum(w)
    assert np.all(np.abs(loads.string_load - expected) <= 1e-9 * scale)


def test_fill_volumes_keep_the_real_bore():
    # The bore of a screen entered as 7.625 in stays the bore the fluid fills
    # (pi/4 d^2); only the outer pressure-area face follows the metal.
    screen = JointSpec("S", "screen", "ss304", od=8.625 * inch, wall=0.5 * inch,
                       length=20 * ft, bore=7.625 * inch, weight_per_length=19 * lb_per_ft * G)
    joints = rate_joints([screen])
    assert_allclose(joints.bore[0], 7.625 * inch, rtol=1e-15)
    assert_allclose(joints.pressure_outside_area[0],
                    math.pi / 4 * (7.625 * inch) ** 2 + joints.displaced_area[0], rtol=1e-15)
