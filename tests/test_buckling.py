"""Tests for rigplan.engine.buckling: buckling below the neutral point.

Sources, as named beside each check:

* Lubinski (1950), "A study of the buckling of rotary drilling strings",
  API Drilling and Production Practice: first-order buckling of a vertical
  string, ``F = 1.94 (E I w^2)^(1/3)`` (coefficient from memory);
* Lubinski, Althouse and Logan (1962), "Helical buckling of tubing sealed in
  packers", JPT: helix pitch ``p = pi sqrt(8 E I / F)`` and bending stress
  ``r D F / (4 I)``;
* Dawson and Paslay (1984), "Drillpipe buckling in inclined holes", JPT:
  ``F = 2 sqrt(E I w sin(theta) / r)``;
* Chen, Lin and Cheatham (1990) and Wu and Juvkam-Wold (1993) for the
  helical thresholds (from memory);
* Lubinski (1951) for the effective force: the length in compression of a
  uniform open-ended string set down by ``S`` is ``S / w``.

Pipe sizes and unit factors: API 5DP / 5CT dimensions (from memory),
NIST SP 811 for the unit conversions.
"""

import math

import numpy as np
import pytest
from hypothesis import given, settings, strategies as st
from numpy.testing import assert_allclose

from rigplan.engine.axial import neutral_point_depth, step_profile
from rigplan.engine.buckling import (HELICAL, SINUSOIDAL, STRAIGHT, check_buckling,
                                     chen_helical_critical_load, dawson_paslay_critical_load,
                                     helical_bending_stress, helical_critical_load,
                                     helical_onset_vertical, helical_pitch, helical_shortening,
                                     lubinski_critical_load, radial_clearance,
                                     second_moment_of_area, sinusoidal_critical_load)
from rigplan.engine.stringmodel import G, Closure, Hole, JointArrays

from _units import ft as FT, inch as INCH, lbf as LBF, psi as PSI  # NIST SP 811
E_STEEL_PSI = 30e6                  # Young's modulus of steel, 30 x 10^6 psi (handbook value)


# ---------------------------------------------------------------------------
# formulas


def test_second_moment_of_area_drill_pipe():
    # 4-1/2 in 16.60 lb/ft drill pipe, bore 3.826 in (API 5DP, from memory):
    # I = pi/64 (4.5^4 - 3.826^4) = pi/64 (410.0625 - 214.2780) = 9.6106 in^4
    i = second_moment_of_area(4.5 * INCH, 3.826 * INCH)
    assert_allclose(i / INCH ** 4, math.pi / 64 * (4.5 ** 4 - 3.826 ** 4), rtol=1e-12)
    assert_allclose(i / INCH ** 4, 9.6106, atol=5e-4)


def test_lubinski_drill_pipe_in_mud_by_hand():
    # Lubinski (1950): F = 1.94 (E I w^2)^(1/3), US units worked by hand.
    # 4-1/2 in 16.60 lb/ft drill pipe in 10 ppg mud, buoyancy factor
    # 1 - 10/65.4 = 0.84709 (steel 65.4 ppg): w = 14.062 lb/ft = 1.17183 lb/in
    # E I = 30e6 x 9.6106 = 2.88318e8 lb in^2
    # E I w^2 = 2.88318e8 x 1.37319 = 3.95917e8; cube root = 734.26 lb
    # F = 1.94 x 734.26 = 1,424 lbf
    w_lb_in = 16.60 * (1 - 10 / 65.4) / 12
    i_in4 = math.pi / 64 * (4.5 ** 4 - 3.826 ** 4)
    f = lubinski_critical_load(E_STEEL_PSI * PSI, i_in4 * INCH ** 4, w_lb_in * LBF / INCH)
    assert_allclose(f / LBF, 1424.0, atol=1.0)
    # m = (E I / w)^(1/3) = (2.88318e8 / 1.17183)^(1/3) = 626.6 in = 52.2 ft;
    # F = 1.94 m w (the same figure by Lubinski's dimensionless unit m)
    m_in = (E_STEEL_PSI * i_in4 / w_lb_in) ** (1 / 3)
    assert_allclose(m_in / 12, 52.2, atol=0.05)
    assert_allclose(f / LBF, 1.94 * m_in * w_lb_in, rtol=1e-9)


def test_dawson_paslay_horizontal_and_inclined_by_hand():
    # Dawson and Paslay (1984): F = 2 sqrt(E I w sin(theta) / r).
    # Same pipe in an 8-1/2 in hole: r = (8.5 - 4.5)/2 = 2 in.  Horizontal:
    # E I w / r = 2.88318e8 x 1.17183 / 2 = 1.68931e8; sqrt = 12,997; F = 25,995 lbf.
    w_lb_in = 16.60 * (1 - 10 / 65.4) / 12
    i_in4 = math.pi / 64 * (4.5 ** 4 - 3.826 ** 4)
    args = (E_STEEL_PSI * PSI, i_in4 * INCH ** 4, w_lb_in * LBF / INCH, 2 * INCH)
    f90 = dawson_paslay_critical_load(*args, math.pi / 2)
    assert_allclose(f90 / LBF, 25_995, rtol=2e-4)
    # 30 degrees: sin = 1/2, F = 25,995 / sqrt(2) = 18,381 lbf
    assert_allclose(dawson_paslay_critical_load(*args, math.radians(30)) / LBF, 18_381,
                    rtol=2e-4)
    # Chen, Lin and Cheatham (1990): helical = sqrt(2) x Dawson-Paslay
    assert_allclose(chen_helical_critical_load(*args, math.pi / 2), math.sqrt(2) * f90,
                    rtol=1e-12)


def test_dawson_paslay_vanishes_in_a_vertical_hole_so_lubinski_governs():
    # Dawson and Paslay (1984): proportional to sqrt(sin theta), so 0 at
    # theta = 0 -- it does not tend to Lubinski's vertical result.  The
    # sinusoidal threshold used is the larger of the two.
    args = (200e9, 1e-5, 300.0, 0.05)
    assert dawson_paslay_critical_load(*args, 0.0) == 0.0
    assert_allclose(sinusoidal_critical_load(*args, 0.0), lubinski_critical_load(*args[:3]),
                    rtol=1e-12)
    assert_allclose(helical_critical_load(*args, 0.0), helical_onset_vertical(*args[:3]),
                    rtol=1e-12)
    # inclined far enough, Dawson-Paslay exceeds Lubinski and takes over
    assert_allclose(sinusoidal_critical_load(*args, math.pi / 2),
                    dawson_paslay_critical_load(*args, math.pi / 2), rtol=1e-12)


def test_vertical_thresholds_in_order():
    # Lubinski 1.94 < Wu and Juvkam-Wold 5.55 (helical after sinusoidal)
    e, i, w = 200e9, 2e-5, 400.0
    base = (e * i * w * w) ** (1 / 3)
    assert_allclose(lubinski_critical_load(e, i, w), 1.94 * base, rtol=1e-12)
    assert_allclose(helical_onset_vertical(e, i, w), 5.55 * base, rtol=1e-12)
    assert lubinski_critical_load(e, i, 0.0) == 0.0      # weightless: no stiffening
    assert lubinski_critical_load(e, i, -5.0) == 0.0     # floating pipe: clipped at 0


def test_helix_tubing_in_casing_worked_example():
    # Lubinski, Althouse and Logan (1962) equations worked by hand for
    # 2-3/8 in 4.7 lb/ft tubing (bore 1.995 in) in 5-1/2 in 17 lb/ft casing
    # (bore 4.892 in), the sizes of their tubing example (from memory; the
    # paper's own result figures are not recalled, so the expected values
    # are the hand arithmetic of its equations):
    #   I = pi/64 (2.375^4 - 1.995^4) = pi/64 (31.8167 - 15.8406) = 0.78422 in^4
    #   r = (4.892 - 2.375) / 2 = 1.2585 in
    #   F = 10,000 lbf compressive (effective)
    #   pitch p = pi sqrt(8 x 30e6 x 0.78422 / 10,000) = pi x 137.19 = 431.0 in
    #   sigma_b = r D F / (4 I) = 1.2585 x 2.375 x 10,000 / 3.13689 = 9,528 psi
    i = second_moment_of_area(2.375 * INCH, 1.995 * INCH)
    assert_allclose(i / INCH ** 4, 0.78422, rtol=2e-5)
    r = radial_clearance(4.892 * INCH, 2.375 * INCH)
    assert_allclose(r / INCH, 1.2585, rtol=1e-12)
    f = 10_000 * LBF
    p = helical_pitch(E_STEEL_PSI * PSI, i, f)
    assert_allclose(p / INCH, 431.0, rtol=2e-4)
    s = helical_bending_stress(2.375 * INCH, i, r, f)
    assert_allclose(s / PSI, 9528, rtol=2e-4)


def test_slack_off_shortening_lubinski_althouse_logan_example():
    # Published example: Lubinski, Althouse and Logan (1962), in the text on
    # tubing free to move in the packer: "consider that 20,000 lb had been
    # slacked-off ... Using Eqs. 6 and 7, we obtain dL1 + dL2 = -49.7 in."
    # Eq. 6 is Hooke's law, dL1 = -F L / (E A_s); Eq. 7 the helical
    # shortening dL2 = -r^2 F^2 / (8 E I w).  The example's string, from
    # memory and not checked against the paper: 10,000 ft of 2-7/8 in
    # 6.5 lb/ft tubing (bore 2.441 in) in 7 in 26 lb/ft casing (bore
    # 6.276 in), w = 6.5 lb/ft.  By hand:
    #   A_s = pi/4 (2.875^2 - 2.441^2) = 1.8120 in^2
    #   I   = pi/64 (2.875^4 - 2.441^4) = 1.6110 in^4
    #   r   = (6.276 - 2.875) / 2 = 1.7005 in,  w = 6.5 / 12 = 0.54167 lb/in
    #   dL1 = 20,000 x 120,000 / (30e6 x 1.8120) = 44.15 in
    #   dL2 = 1.7005^2 x 20,000^2 / (8 x 30e6 x 1.6110 x 0.54167) = 5.52 in
    #   total 49.67 in, published 49.7 in.  The helix is 20,000 / 6.5 =
    #   3,077 ft long, inside the string (Eq. 7 valid).
    od, bore = 2.875 * INCH, 2.441 * INCH
    area = math.pi / 4 * (od ** 2 - bore ** 2)
    i = second_moment_of_area(od, bore)
    r = radial_clearance(6.276 * INCH, od)
    e = E_STEEL_PSI * PSI
    f = 20_000 * LBF
    w = 6.5 * LBF / FT
    hooke = f * 10_000 * FT / (e * area)
    helix = helical_shortening(r, e, i, w, f)
    assert_allclose(helix / INCH, 5.52, atol=0.01)
    assert_allclose((hooke + helix) / INCH, 49.7, atol=0.05)
    # the same shortening from the helix pitch (the Eq. 7 derivation):
    # integral of 2 pi^2 r^2 / p(F)^2 over the buckled length F / w
    z = np.linspace(0.0, f / w, 20001)
    per_length = 2 * math.pi ** 2 * r ** 2 / np.asarray(helical_pitch(e, i, f - w * z)) ** 2
    assert_allclose(np.trapezoid(per_length, z), helix, rtol=1e-6)


@settings(max_examples=60, deadline=None)
@given(st.floats(0.05, 0.6), st.floats(0.004, 0.03), st.floats(0.002, 0.1),
       st.floats(1e3, 5e5))
def test_bending_stress_is_the_helix_curvature(od, wall, clearance, force):
    # Identity of the method (Lubinski, Althouse and Logan 1962): a helix of
    # radius r and pitch p has curvature r / (r^2 + (p / 2 pi)^2); with the
    # pitch of a buckled string and r << p, E kappa D / 2 -> r D F / (4 I).
    e = 200e9
    i = second_moment_of_area(od, max(od - 2 * wall, 0.0))
    p = helical_pitch(e, i, force)
    kappa = clearance / (clearance ** 2 + (p / (2 * math.pi)) ** 2)
    exact = e * kappa * od / 2
    approx = helical_bending_stress(od, i, clearance, force)
    ratio = (clearance / (p / (2 * math.pi))) ** 2
    assert approx >= exact
    assert_allclose(exact, approx / (1 + ratio), rtol=1e-9)


def test_radial_clearance_unknown_and_tight():
    assert math.isnan(radial_clearance(float("nan"), 0.2))
    assert radial_clearance(0.2, 0.25) == 0.0     # no room: no bending
    assert helical_bending_stress(0.2, 1e-5, 0.0, 1e5) == 0.0


# ---------------------------------------------------------------------------
# a landed string


def _string(n, od, wall, length, density=7850.0, kinds=None, yield_pa=241e6):
    bore = od - 2 * wall
    w = density * G * math.pi / 4 * (od ** 2 - bore ** 2) * length
    full = lambda v: np.full(n, float(v))
    nan = full(np.nan)
    return JointArrays(label=tuple(f"J{i + 1}" for i in range(n)),
                       kind=tuple(kinds) if kinds else ("blank",) * n,
                       length=full(length), od=full(od), bore=full(bore), weight=full(w),
                       collapse_rating=nan, burst_rating=nan, body_rating=nan,
                       connection_rating=nan, yield_strength=full(yield_pa),
                       rating_wall=full(wall))


def test_landed_string_lengths_and_stress_by_hand():
    # Uniform steel casing, 8-5/8 in x 0.322 in, 100 joints of 20 ft, open
    # ended in fresh water (1000 kg/m3) full to the floor, 12-1/4 in bit,
    # set down S.  Effective force (Lubinski 1951): zero at an open shoe
    # before the set-down, gradient w = buoyed weight per length, so with S
    # set down the compressed length is S / w (neutral point S / w above
    # the shoe); the sinusoidal part is (S - F_sin) / w and the helical part
    # (S - F_hel) / w.
    od, wall, length, n = 8.625 * INCH, 0.322 * INCH, 20 * FT, 100
    j = _string(n, od, wall, length)
    hole = Hole(fluid_density=1000.0, diameter=12.25 * INCH)
    a_s = math.pi / 4 * (od ** 2 - (od - 2 * wall) ** 2)
    w = (7850.0 - 1000.0) * G * a_s                      # buoyed weight per length
    i = math.pi / 64 * (od ** 4 - (od - 2 * wall) ** 4)
    e = 200e9
    f_sin = 1.94 * (e * i * w * w) ** (1 / 3)            # Lubinski (1950)
    f_hel = 5.55 * (e * i * w * w) ** (1 / 3)            # Wu and Juvkam-Wold (1993)
    s = 2.0 * f_hel                                       # well into the helix
    prof = step_profile(j, hole, Closure(), n, slack_off=s)
    chk = check_buckling(j, prof, hole.diameter, np.full(n, e), design_factor=1.6)
    shoe = n * length
    assert_allclose(chk.compressed_length, s / w, rtol=1e-9)
    assert_allclose(neutral_point_depth(prof), shoe - s / w, rtol=1e-9)
    assert_allclose(chk.sinusoidal_length, (s - f_sin) / w, rtol=1e-9)
    assert_allclose(chk.helical_length, (s - f_hel) / w, rtol=1e-9)
    assert chk.mode[0] == HELICAL and chk.buckles
    assert chk.mode[-1] == STRAIGHT
    # Joint 1 bottom: compression S; true force there = -(P A_s) - S with
    # P = rho g z at the shoe (open end: pressure on the steel ring).
    r = (12.25 - 8.625) / 2 * INCH
    bend = r * od * s / (4 * i)                           # LAL 1962
    true = 1000.0 * G * shoe * a_s + s
    assert_allclose(chk.compression[0], s, rtol=1e-9)
    assert_allclose(chk.bending_stress[0], bend, rtol=1e-9)
    assert_allclose(chk.axial_stress[0], true / a_s, rtol=1e-9)
    assert_allclose(chk.stress_utilization[0], 1.6 * (true / a_s + bend) / 241e6, rtol=1e-9)
    # joints wholly in tension carry no buckling figures
    assert np.isnan(chk.stress_utilization[-1]) and chk.compression[-1] == 0.0
    assert not chk.unknown.any()


def test_small_set_down_stays_straight():
    # Set-down under the Lubinski load: compressed but straight, no bending.
    od, wall, length, n = 8.625 * INCH, 0.322 * INCH, 20 * FT, 10
    j = _string(n, od, wall, length)
    hole = Hole(fluid_density=1000.0, diameter=12.25 * INCH)
    a_s = math.pi / 4 * (od ** 2 - (od - 2 * wall) ** 2)
    w = 6850.0 * G * a_s
    i = math.pi / 64 * (od ** 4 - (od - 2 * wall) ** 4)
    f_sin = 1.94 * (200e9 * i * w * w) ** (1 / 3)
    prof = step_profile(j, hole, Closure(), n, slack_off=0.5 * f_sin)
    chk = check_buckling(j, prof, hole.diameter, np.full(n, 200e9))
    assert chk.compressed_length > 0 and not chk.buckles
    assert chk.sinusoidal_length == 0.0 and chk.bending_stress[0] == 0.0
    # between the two thresholds: sinusoidal, bending taken by the helix formula
    prof = step_profile(j, hole, Closure(), n, slack_off=2 * f_sin)
    chk = check_buckling(j, prof, hole.diameter, np.full(n, 200e9))
    assert chk.mode[0] == SINUSOIDAL and chk.helical_length == 0.0
    assert chk.bending_stress[0] > 0


def test_unknown_hole_diameter_or_modulus_is_unknown_not_assumed():
    od, wall, length, n = 8.625 * INCH, 0.322 * INCH, 20 * FT, 10
    j = _string(n, od, wall, length)
    hole = Hole(fluid_density=1000.0)
    prof = step_profile(j, hole, Closure(), n, slack_off=200e3)
    chk = check_buckling(j, prof, float("nan"), np.full(n, 200e9))
    assert chk.buckles and chk.unknown[0] and np.isnan(chk.stress_utilization[0])
    chk = check_buckling(j, prof, 0.3, np.full(n, np.nan))
    assert chk.unknown[0]
    # no set-down: nothing in compression, nothing unknown
    prof = step_profile(j, hole, Closure(), n)
    chk = check_buckling(j, prof, float("nan"), np.full(n, np.nan))
    assert chk.compressed_length == 0.0 and not chk.unknown.any()


@settings(max_examples=40, deadline=None)
@given(st.floats(1e3, 5e5), st.floats(1e3, 5e5))
def test_more_set_down_never_shortens_the_buckled_length(s1, s2):
    # Property of the method: the effective compression grows with the
    # set-down weight everywhere, so every length and the stress grow too.
    lo, hi = sorted((s1, s2))
    od, wall, length, n = 8.625 * INCH, 0.322 * INCH, 20 * FT, 40
    j = _string(n, od, wall, length)
    hole = Hole(fluid_density=1100.0, diameter=12.25 * INCH)
    a = check_buckling(j, step_profile(j, hole, Closure(), n, slack_off=lo), hole.diameter,
                       np.full(n, 200e9))
    b = check_buckling(j, step_profile(j, hole, Closure(), n, slack_off=hi), hole.diameter,
                       np.full(n, 200e9))
    assert b.compressed_length >= a.compressed_length - 1e-9
    assert b.sinusoidal_length >= a.sinusoidal_length - 1e-9
    assert b.helical_length >= a.helical_length - 1e-9
    assert np.nan_to_num(b.stress_utilization[0]) >= np.nan_to_num(a.stress_utilization[0]) - 1e-12


def test_max_set_down_keeps_the_limits_exactly():
    # The set-down weight shifts the effective and the true force by the same
    # amount everywhere (a reaction at the shoe: Lubinski 1951), so the
    # largest set-down that keeps a screen straight is S - (C - F_sin), and
    # re-checking with it puts the screen exactly at its critical load.
    od, wall, length, n = 8.625 * INCH, 0.322 * INCH, 20 * FT, 60
    kinds = ["screen"] * 3 + ["blank"] * (n - 3)
    j = _string(n, od, wall, length, kinds=kinds)
    hole = Hole(fluid_density=1000.0, diameter=12.25 * INCH)
    screens = np.array([k == "screen" for k in kinds])
    e = np.full(n, 200e9)
    s = 150e3
    chk = check_buckling(j, step_profile(j, hole, Closure(), n, slack_off=s), hole.diameter, e,
                         1.6, set_down=s, screens=screens)
    assert chk.mode[0] > STRAIGHT
    smax = chk.max_set_down
    assert 0 < smax < s
    again = check_buckling(j, step_profile(j, hole, Closure(), n, slack_off=smax),
                           hole.diameter, e, 1.6, set_down=smax, screens=screens)
    worst = np.max(again.compression[:3] - again.sinusoidal_load[:3])
    stress = np.nanmax(again.stress_utilization)
    # at the largest set-down one of the two limits is just reached
    assert (abs(worst) < 1e-6 * s) or abs(stress - 1.0) < 1e-9
    assert worst <= 1e-6 * s and stress <= 1.0 + 1e-9
    assert_allclose(again.max_set_down, smax, rtol=1e-9)


# ---------------------------------------------------------------------------
# in the plan: a limit in the verdict, not a note


def _plan(set_down, hole_diameter=12.25 * INCH):
    from rigplan.engine.hoisting import HoistPath, Rig
    from rigplan.engine.planner import plan_landing
    from rigplan.engine.stringmodel import DesignFactors, Settings
    od, wall, length, n = 8.625 * INCH, 0.322 * INCH, 20 * FT, 60
    kinds = ["screen"] * 3 + ["blank"] * (n - 3)
    j = _string(n, od, wall, length, kinds=kinds)
    j = JointArrays(**{**j.__dict__, "modulus": np.full(n, 200e9),
                       "collapse_rating": np.full(n, 5e6), "burst_rating": np.full(n, 5e6),
                       "body_rating": np.full(n, 2e6), "connection_rating": np.full(n, 2e6)})
    rig = Rig("r", paths=(HoistPath("p", mast_rating=2e6),))
    hole = Hole(fluid_density=1000.0, diameter=hole_diameter)
    settings = Settings(set_down_weight=set_down, design=DesignFactors())
    return plan_landing(j, hole, rig, settings)


def test_set_down_that_buckles_a_screen_is_a_limit_in_the_verdict():
    # Lubinski (1950) critical load of the screens (as built in _string):
    # a set-down far above it buckles them -> cannot land, the limit governs,
    # and the crew is told the most it may set down; at that weight it lands.
    from rigplan.engine.findings import LimitName, Verdict
    from rigplan.engine.planner import PlanCode
    lp = _plan(150e3)
    assert lp.verdict == Verdict.CANNOT_LAND
    assert lp.governing.name == LimitName.SCREEN_BUCKLING and lp.governing.joint == 1
    assert lp.governing.margin < 0
    codes = [f.code for f in lp.reasons]
    assert PlanCode.OVER_LIMIT in codes and PlanCode.SET_DOWN_TOO_HEAVY in codes
    smax = [f for f in lp.reasons if f.code == PlanCode.SET_DOWN_TOO_HEAVY][0].value("max_set_down")
    assert_allclose(smax, lp.buckling.max_set_down, rtol=1e-12)
    ok = _plan(smax * (1 - 1e-6))
    assert ok.verdict == Verdict.LANDS_OPEN
    names = {lim.name for lim in ok.chosen.limits}
    assert {LimitName.SCREEN_BUCKLING, LimitName.BUCKLING_STRESS} <= names


def test_no_set_down_no_buckling_check_and_unknown_hole_is_unrated():
    from rigplan.engine.findings import Verdict
    assert _plan(0.0).buckling is None
    lp = _plan(150e3, hole_diameter=float("nan"))
    # buckled, but the bending stress needs the hole diameter: not assumed
    assert lp.buckling.unknown.any()
    assert any(f.context.get("part") == "buckling" for f in lp.unrated)
    assert lp.verdict in (Verdict.CANNOT_LAND, Verdict.CANNOT_CONFIRM)
