"""Checks of the plain-Python running-load reference (benchmarks/reference.py)
against the identities of the pressure-area method, and of the vectorized
engine (rigplan.engine.axial) against that reference."""

from __future__ import annotations

import math

import numpy as np
import pytest
from numpy.testing import assert_allclose

from rigplan.engine.stringmodel import G, Closure, Hole, JointArrays

from benchmarks import reference as ref

# Exact unit definitions (NIST SP 811 appendix B).
from _units import ft as FT, inch as INCH, lbf as LBF, ppg as PPG, psi as PSI  # noqa: F401


def make_joints(length, od, bore, weight):
    """JointArrays built directly from arrays [m, m, m, N]; ratings unrated."""
    length = np.asarray(length, dtype=float)
    n = len(length)
    nan = np.full(n, np.nan)
    return JointArrays(
        label=tuple(f"J{i + 1}" for i in range(n)),
        kind=("blank",) * n,
        length=length,
        od=np.broadcast_to(np.asarray(od, dtype=float), (n,)).copy(),
        bore=np.broadcast_to(np.asarray(bore, dtype=float), (n,)).copy(),
        weight=np.broadcast_to(np.asarray(weight, dtype=float), (n,)).copy(),
        collapse_rating=nan.copy(), burst_rating=nan.copy(),
        body_rating=nan.copy(), connection_rating=nan.copy(),
    )


def steel_string(length, od, bore, rho_steel=7850.0):
    """Joints whose air weight is rho_s g (A_o - A_i) L (plain-end weight,
    string mechanics (ADE 1986) "Weight", ASTM A53/A53M plain-end formula)."""
    length = np.asarray(length, dtype=float)
    od = np.broadcast_to(np.asarray(od, dtype=float), length.shape)
    bore = np.broadcast_to(np.asarray(bore, dtype=float), length.shape)
    area = math.pi / 4.0 * (od ** 2 - bore ** 2)
    return make_joints(length, od, bore, rho_steel * G * area * length)


def mixed_steel_string(seed=1, n=12):
    """Telescoped string: sections of different OD and bore, varied tally
    lengths (three sections and a reducer joint between two of them)."""
    rng = np.random.default_rng(seed)
    length = rng.uniform(5.5, 6.5, n)
    od = np.empty(n)
    bore = np.empty(n)
    third = n // 3
    od[:third], bore[:third] = 0.2191, 0.2027          # bottom section
    od[third:2 * third], bore[third:2 * third] = 0.2191, 0.1985  # heavier wall
    od[2 * third], bore[2 * third] = 0.2731, 0.1985    # reducer joint
    od[2 * third + 1:], bore[2 * third + 1:] = 0.3239, 0.3049  # top section
    return steel_string(length, od, bore)


# ---------------------------------------------------------------------------
# Identities of the pressure-area method (string mechanics (ADE 1986))
# ---------------------------------------------------------------------------

@pytest.mark.parametrize("rho_fluid", [998.2, 1078.4, 1200.0])
def test_open_string_load_is_air_weight_times_buoyancy_factor(rho_fluid):
    # identity of the pressure-area method, string mechanics (ADE 1986): open-ended string,
    # one fluid inside and out, full to the floor: F(0) = W_air (1 - rho_f/rho_s),
    # for any mix of OD and bore of one steel density (Archimedes).
    joints = mixed_steel_string()
    hole = Hole(fluid_density=rho_fluid, fluid_level=0.0)
    out = ref.reference_running_loads(joints, hole, Closure(None), 998.2, None)
    w_air = np.cumsum(joints.weight)
    expected = w_air * (1.0 - rho_fluid / 7850.0)
    assert_allclose(out["string_load"], expected, rtol=1e-12, atol=0.0)
    assert_allclose(out["shoe_depth"], np.cumsum(joints.length), rtol=1e-14)
    # an open string has nothing to collapse it: inside = outside everywhere
    assert_allclose(out["collapse_max"], 0.0, atol=0.0)


def test_open_string_effective_tension_is_buoyed_weight_below():
    # identity of the pressure-area method, string mechanics (ADE 1986): effective tension is
    # zero at the bottom of an open-ended string and its gradient is the buoyed
    # weight per length, so T_eff(top of joint j) - buoyed weight of joints
    # 1..j = T_eff(shoe) = 0 at every step.
    joints = mixed_steel_string(seed=4, n=15)
    rho = 1150.0
    hole = Hole(fluid_density=rho, fluid_level=0.0)
    eff = ref.reference_effective_tension(joints, hole, Closure(None), 998.2, None)
    force = ref.reference_true_force(joints, hole, Closure(None), 998.2, None)
    buoyed = np.cumsum(joints.weight * (1.0 - rho / 7850.0))
    scale = float(np.sum(joints.weight))
    for k in range(1, joints.n + 1):
        row = np.array(eff[k - 1])
        assert row.shape == (k,)
        assert_allclose(row - buoyed[:k], 0.0, atol=1e-12 * scale)
        # the true force is lower by the pressure on the steel area at the cut
        # (it is compressive near the shoe): F = T_eff - P (A_o - A_i)
        tops = np.cumsum(joints.length)[k - 1] - np.cumsum(joints.length)[:k]
        steel = math.pi / 4 * (joints.od[:k] ** 2 - joints.bore[:k] ** 2)
        assert_allclose(np.array(force[k - 1]),
                        buoyed[:k] - rho * G * tops * steel,
                        rtol=0.0, atol=1e-12 * scale)


@pytest.mark.parametrize("hole_level", [0.0, 14.0])
def test_closed_empty_string_load_is_air_weight_less_shoe_pressure_on_od(hole_level):
    # identity of the pressure-area method, string mechanics (ADE 1986): closed-ended, empty
    # string: F(0) = W_air - P_o(Z) A_o.  Bore changes carry no load when the
    # inside is empty, so the bore varies here; the OD is uniform.
    rng = np.random.default_rng(7)
    n = 10
    length = rng.uniform(5.8, 6.3, n)
    bore = rng.choice([0.2027, 0.1985, 0.1937], n)
    joints = steel_string(length, 0.2191, bore)
    hole = Hole(fluid_density=1100.0, fluid_level=hole_level)
    shoe = np.cumsum(length)
    for levels in (shoe.tolist(), (shoe + 50.0).tolist()):   # at / below the valve
        out = ref.reference_running_loads(joints, hole, Closure(0), 1000.0, levels)
        p_shoe = 1100.0 * G * np.maximum(0.0, shoe - hole_level)
        a_o = math.pi / 4 * 0.2191 ** 2
        assert_allclose(out["string_load"], np.cumsum(joints.weight) - p_shoe * a_o,
                        rtol=1e-12, atol=1e-9)
        # collapse at the bottom of an empty string is the full outside pressure
        assert_allclose(out["collapse_max"][0], p_shoe[-1], rtol=1e-12)


def test_fill_column_adds_its_weight_and_load_falls_as_level_drops():
    # identity of the pressure-area method, string mechanics (ADE 1986): on a float shoe the
    # inside fluid acts on the bore area at the bottom end, P_i(Z) A_i, so the
    # string load rises by rho_fill g (Z - h) A_i over the empty string (the
    # weight of the fill column), and falls as the fill surface h goes deeper.
    n = 8
    joints = steel_string(np.full(n, 6.0), 0.2191, 0.2027)
    hole = Hole(fluid_density=1080.0)
    rho_fill = 1000.0
    a_i = math.pi / 4 * 0.2027 ** 2
    z = 6.0 * n
    empty = ref.reference_running_loads(joints, hole, Closure(0), rho_fill,
                                        [6.0 * k for k in range(1, n + 1)])
    last = []
    for h in np.linspace(0.0, z, 13):
        levels = [0.0] * (n - 1) + [float(h)]
        out = ref.reference_running_loads(joints, hole, Closure(0), rho_fill, levels)
        assert_allclose(out["string_load"][-1] - empty["string_load"][-1],
                        rho_fill * G * (z - h) * a_i, rtol=1e-10, atol=1e-8)
        last.append(out["string_load"][-1])
    assert np.all(np.diff(last) < 0.0)


def test_valve_with_equal_pressures_both_sides_carries_nothing():
    # identity of the pressure-area method, string mechanics (ADE 1986): a check valve with
    # the same fluid at the same level on both sides sees equal pressures, so
    # a float shoe or float collar filled with hole fluid to the hole level
    # gives the open-shoe forces at every joint and every step.
    joints = mixed_steel_string(seed=9, n=12)
    hole = Hole(fluid_density=1090.0, fluid_level=3.0)
    levels = [3.0] * joints.n
    open_f = ref.reference_true_force(joints, hole, Closure(None), 1090.0, None)
    scale = float(np.sum(joints.weight))
    for valve in (0, 1, 3, 12):
        closed_f = ref.reference_true_force(joints, hole, Closure(valve), 1090.0, levels)
        for row_o, row_c in zip(open_f, closed_f):
            assert_allclose(row_c, row_o, rtol=0.0, atol=1e-12 * scale)


def test_float_collar_shoe_track_is_open_to_the_hole():
    # identity of the pressure-area method, string mechanics (ADE 1986): below a float collar
    # the shoe track holds hole fluid; with the bore above the collar empty,
    # F(0) = W_air - P_o(Z) (A_o - A_i) - P_o(Z_c) A_i for a uniform string
    # (open bottom end, plus the empty bore's area closed at the collar depth).
    n, m = 9, 2
    joints = steel_string(np.full(n, 6.1), 0.2191, 0.2027)
    rho = 1100.0
    hole = Hole(fluid_density=rho)
    a_o = math.pi / 4 * 0.2191 ** 2
    a_i = math.pi / 4 * 0.2027 ** 2
    out = ref.reference_running_loads(joints, hole, Closure(m), 1000.0, [1e6] * n)
    for k in range(1, n + 1):
        z = 6.1 * k
        z_c = max(0.0, z - 6.1 * m)
        expected = (np.sum(joints.weight[:k]) - rho * G * z * (a_o - a_i)
                    - rho * G * z_c * a_i)
        assert_allclose(out["string_load"][k - 1], expected, rtol=1e-12)
    # the shoe track sees no collapse load; the joint above the collar sees
    # the outside pressure at its bottom with nothing inside
    assert_allclose(out["collapse_max"][:m], 0.0, atol=0.0)
    assert_allclose(out["collapse_max"][m], rho * G * 6.1 * (n - m), rtol=1e-12)


def test_collapse_load_at_the_fill_surface_inside_a_joint():
    # identity of the pressure-area method, string mechanics (ADE 1986): dP = P_o - P_i; with a
    # fill fluid heavier than the hole fluid dP falls below the fill surface,
    # so inside a part-filled joint the largest dP is at the surface,
    # P_o(h) with the inside empty there.
    joints = steel_string(np.full(3, 10.0), 0.2191, 0.2027)
    hole = Hole(fluid_density=1000.0)
    h = 24.0                                   # inside joint 1 at step 3
    out = ref.reference_running_loads(joints, hole, Closure(0), 1500.0,
                                      [10.0, 20.0, h])
    assert_allclose(out["collapse_max"][0], 1000.0 * G * h, rtol=1e-12)
    # and a joint wholly above the surface (empty) sees P_o at its bottom
    assert_allclose(out["collapse_max"][1], 1000.0 * G * 20.0, rtol=1e-12)


def test_collapse_load_of_a_joint_filled_heavier_than_the_hole_is_at_its_top():
    # identity of the pressure-area method, string mechanics (ADE 1986): dP = P_o - P_i, the
    # collapse check takes max_z dP(z) over each joint.  Filled to the floor
    # with a fluid heavier than the hole fluid, dP = (rho_o - rho_f) g z < 0
    # below the floor, so each joint's largest dP is at its top: 0 at the step
    # when that joint is held at the floor (its top at z = 0).
    n = 4
    joints = steel_string(np.full(n, 6.0), 0.2191, 0.2027)
    hole = Hole(fluid_density=1000.0)
    out = ref.reference_running_loads(joints, hole, Closure(0), 1500.0, [0.0] * n)
    assert_allclose(out["collapse_max"], 0.0, atol=1e-9)
    # one step only (the bottom joint at step 1 is at 0..6 m): still 0, and the
    # bottom alone would give -500 g 6
    one = steel_string([6.0], 0.2191, 0.2027)
    out1 = ref.reference_running_loads(one, hole, Closure(0), 1500.0, [0.0])
    assert out1["collapse_max"][0] == 0.0


def test_envelope_is_max_and_min_over_steps_and_first_step():
    # identity of the pressure-area method, string mechanics (ADE 1986): the envelope of a
    # connection is the largest true tension at any running step.  Empty
    # floated string: the top joint's force falls as more pipe displaces fluid
    # (W_air - P_o A_o), so the largest force at joint 1 is at step 1.
    n = 6
    joints = steel_string(np.full(n, 6.0), 0.3239, 0.3049)   # thin wall floats
    hole = Hole(fluid_density=1100.0)
    out = ref.reference_running_loads(joints, hole, Closure(0), 1000.0, [1e3] * n)
    force = ref.reference_true_force(joints, hole, Closure(0), 1000.0, [1e3] * n)
    for j in range(n):
        column = [force[k][j] for k in range(j, n)]
        assert out["envelope_max"][j] == max(column)
        assert out["envelope_min"][j] == min(column)
        assert out["envelope_step"][j] == j + 1 + column.index(max(column))
    assert out["envelope_step"][0] == 1
    assert out["string_load"][-1] < 0.0      # it floats: the planner must say so
    assert_allclose(out["effective_top"], out["string_load"], rtol=1e-12)


def test_bad_fill_schedule_is_refused():
    joints = steel_string(np.full(3, 6.0), 0.2191, 0.2027)
    hole = Hole(fluid_density=1000.0)
    with pytest.raises(ref.InputError, match="fill_level"):
        ref.reference_running_loads(joints, hole, Closure(0), 1000.0, [0.0, 0.0])
    with pytest.raises(ref.InputError, match="fill_level"):
        ref.reference_running_loads(joints, hole, Closure(0), 1000.0, None)


# ---------------------------------------------------------------------------
# first-principles buoyancy check (ADE 1986, ch. 7): 1,000 ft of 7 in x 0.317 in, 22.65 lb/ft, 9.0 lb/gal
# ---------------------------------------------------------------------------

def api_check_string(n_joints):
    length = 1000.0 * FT / n_joints
    return make_joints(np.full(n_joints, length), 7.0 * INCH,
                       (7.0 - 2 * 0.317) * INCH, 22.65 * LBF / FT * length)


# The published figures of the check use the oilfield shortcut 0.052 psi/ft
# per lb/gal (string mechanics (ADE 1986), "Hydrostatics"): 9.0 lb/gal -> 0.468 psi/ft.  The
# fluid density below gives exactly that gradient; with it the figures are
# reproduced to their rounding (1 lbf).
RHO_SHORTCUT = 0.052 * 9.0 * PSI / FT / G            # [kg/m^3]


@pytest.mark.parametrize("n_joints", [1, 25])
def test_api_5c3_buoyancy_check_open_end(n_joints):
    # buoyancy check from first principles (ADE 1986, ch. 7): open end, hook load about 19,535 lbf,
    # true force at the shoe about -3,115 lbf; W_air * BF (1 - MW/65.4,
    # string mechanics (ADE 1986)) agrees at the top.
    joints = api_check_string(n_joints)
    hole = Hole(fluid_density=RHO_SHORTCUT)
    out = ref.reference_running_loads(joints, hole, Closure(None), RHO_SHORTCUT, None)
    force = ref.reference_true_force(joints, hole, Closure(None), RHO_SHORTCUT, None)
    hook = out["string_load"][-1] / LBF
    shoe = (force[-1][0] - joints.weight[0]) / LBF   # bottom-end force alone
    assert_allclose(hook, 19535.0, atol=1.0)
    assert_allclose(shoe, -3115.0, atol=1.0)
    assert_allclose(hook, 22650.0 * (1 - 9.0 / 65.4), rtol=5e-4)


@pytest.mark.parametrize("n_joints", [1, 25])
def test_api_5c3_buoyancy_check_closed_empty(n_joints):
    # buoyancy check from first principles (ADE 1986, ch. 7): closed end, empty: hook load about
    # 4,639 lbf, force at the shoe about -18,011 lbf.
    joints = api_check_string(n_joints)
    hole = Hole(fluid_density=RHO_SHORTCUT)
    empty = [float(x) for x in np.cumsum(joints.length)]
    out = ref.reference_running_loads(joints, hole, Closure(0), 1000.0, empty)
    force = ref.reference_true_force(joints, hole, Closure(0), 1000.0, empty)
    hook = out["string_load"][-1] / LBF
    shoe = (force[-1][0] - joints.weight[0]) / LBF
    assert_allclose(hook, 4639.0, atol=1.0)
    assert_allclose(shoe, -18011.0, atol=1.0)


def test_api_5c3_buoyancy_check_exact_density():
    # buoyancy check from first principles (ADE 1986, ch. 7), with 9.0 lb/gal converted exactly
    # (0.051948 psi/ft per lb/gal, as that section states): the pressures are
    # 0.1 % lower than with the 0.052 shortcut, so the figures move by up to
    # 0.1 % of the pressure force (18,011 lbf -> about 18 lbf).
    joints = api_check_string(25)
    hole = Hole(fluid_density=9.0 * PPG)
    out_open = ref.reference_running_loads(joints, hole, Closure(None), 9.0 * PPG, None)
    empty = [float(x) for x in np.cumsum(joints.length)]
    out_closed = ref.reference_running_loads(joints, hole, Closure(0), 1000.0, empty)
    assert_allclose(out_open["string_load"][-1] / LBF, 19535.0, atol=5.0)
    assert_allclose(out_closed["string_load"][-1] / LBF, 4639.0, atol=20.0)


# ---------------------------------------------------------------------------
# The vectorized engine against the reference
# ---------------------------------------------------------------------------

def random_case(seed):
    """A small random string: sections of different OD and bore, tally
    lengths, a random closure, hole level and fill schedule."""
    rng = np.random.default_rng(seed)
    n = int(rng.integers(1, 25))
    length = rng.uniform(2.0, 12.5, n)
    sizes = [(0.1683, 0.1541), (0.2191, 0.2027), (0.2191, 0.1985),
             (0.2731, 0.2545), (0.3239, 0.3049)]
    section = rng.integers(0, len(sizes), n)
    od = np.array([sizes[s][0] for s in section])
    bore = np.array([sizes[s][1] for s in section])
    weight = rng.uniform(100.0, 900.0, n) * length
    joints = make_joints(length, od, bore, weight)
    hole = Hole(fluid_density=float(rng.uniform(998.0, 1400.0)),
                fluid_level=float(rng.choice([0.0, rng.uniform(0.0, 20.0)])))
    # a float collar needs a joint above it: top of joint 1..n-1
    collar = int(rng.integers(1, n)) if n >= 2 else 0
    valve = [None, 0, collar][int(rng.integers(0, 3))]
    shoe = np.cumsum(length)
    fill = (rng.uniform(0.0, 1.2, n) * shoe).tolist()
    return joints, hole, Closure(valve), float(rng.uniform(998.0, 1300.0)), fill


def _engine():
    axial = pytest.importorskip("rigplan.engine.axial",
                                reason="rigplan.engine.axial is not written yet")
    if not hasattr(axial, "running_loads"):
        pytest.skip("rigplan.engine.axial has no running_loads yet")
    return axial.running_loads


@pytest.mark.parametrize("seed", range(40))
def test_engine_agrees_with_reference(seed):
    # The reference is checked above against the identities of the
    # pressure-area method (string mechanics (ADE 1986)) and the first-principles buoyancy check (ADE 1986, ch. 7).
    # rtol 1e-9 as the engine's stated accuracy.  atol: each force is a sum of
    # terms as large as the total weight and P_shoe * A_o; where they nearly
    # cancel (near the neutral point, a string close to floating) a different
    # summation order (cumulative sums against a joint-by-joint loop) changes
    # the round-off by about 1e-16 of the largest term, which no relative
    # tolerance can absorb.  1e-9 of the largest force (or pressure) is far
    # above that round-off and far below any physical error.
    running_loads = _engine()
    joints, hole, closure, rho_fill, fill = random_case(seed)
    expected = ref.reference_running_loads(joints, hole, closure, rho_fill, fill)
    got = running_loads(joints, hole, closure, rho_fill, np.array(fill))
    force = ref.reference_true_force(joints, hole, closure, rho_fill, fill)
    f_scale = max(abs(f) for row in force for f in row)
    p_scale = max(1.0, max(abs(p) for p in expected["collapse_max"]))
    for name in ("shoe_depth", "string_load", "envelope_max", "envelope_min"):
        scale = float(np.max(np.abs(expected["shoe_depth"]))) \
            if name == "shoe_depth" else f_scale
        assert_allclose(np.asarray(getattr(got, name), dtype=float), expected[name],
                        rtol=1e-9, atol=1e-9 * scale, err_msg=name)
    assert_allclose(np.asarray(got.collapse_max, dtype=float), expected["collapse_max"],
                    rtol=1e-9, atol=1e-9 * p_scale, err_msg="collapse_max")
    # envelope_step: ties within round-off may pick another step, so check that
    # the engine's step is in the joint's range and carries the maximum force
    steps = np.asarray(got.envelope_step)
    for j in range(joints.n):
        k = int(steps[j])
        assert j + 1 <= k <= joints.n, f"envelope_step[{j}] = {k}"
        assert_allclose(force[k - 1][j], expected["envelope_max"][j],
                        rtol=1e-9, atol=1e-9 * f_scale, err_msg=f"envelope_step[{j}]")
    if hasattr(got, "effective_top"):
        assert_allclose(np.asarray(got.effective_top, dtype=float),
                        expected["effective_top"], rtol=1e-9, atol=1e-9 * f_scale)


# ---------------------------------------------------------------------------
# The running-sum engine against the previous interface-by-interface engine
# ---------------------------------------------------------------------------

def sectioned_case(seed):
    """A random string whose section changes every 1 to 11 joints, a random
    closure, annulus level (full, shallow or deep) and fill: a plan-like
    schedule (full, then carried with top-ups), a random rising fill height,
    or (one case in three) a fill height that falls between steps."""
    rng = np.random.default_rng(seed)
    n = int(rng.integers(1, 90))
    length = rng.uniform(2.0, 12.5, n)
    sizes = [(0.1683, 0.1541), (0.2191, 0.2027), (0.2191, 0.1985),
             (0.2731, 0.2545), (0.3239, 0.3049)]
    every = int(rng.integers(1, 12))
    section = np.repeat(rng.integers(0, len(sizes), n // every + 1), every)[:n]
    od = np.array([sizes[s][0] for s in section])
    bore = np.array([sizes[s][1] for s in section])
    joints = make_joints(length, od, bore, rng.uniform(100.0, 900.0, n) * length)
    hole = Hole(fluid_density=float(rng.uniform(998.0, 1400.0)),
                fluid_level=float(rng.choice([0.0, rng.uniform(0.0, 40.0),
                                              rng.uniform(0.0, 300.0)])))
    collar = int(rng.integers(1, n)) if n >= 2 else 0
    valve = [None, 0, collar][int(rng.integers(0, 3))]
    shoe = np.cumsum(length)
    kind = int(rng.integers(0, 3))
    if kind == 0:
        height = np.empty(n)
        s = 0.0
        through = int(rng.integers(0, n + 1))
        top_up = int(rng.integers(1, 8))
        for k in range(n):
            if k < through:
                s = shoe[k]
            elif (k - through) % top_up == 0:
                s = max(s, float(rng.uniform(s, shoe[k])))
            height[k] = s
        fill = np.maximum(shoe - height, 0.0)
    elif kind == 1:
        fill = np.maximum(shoe - np.maximum.accumulate(rng.uniform(-20.0, 1.0, n) * shoe), 0.0)
    else:
        fill = rng.uniform(0.0, 1.2, n) * shoe
    return joints, hole, Closure(valve), float(rng.uniform(0.0, 1600.0)), fill


@pytest.mark.parametrize("seed", range(60))
def test_running_sums_agree_with_interface_sums(seed):
    # Same pressure-area sum (string mechanics, ADE 1986, ch. 7) in two
    # arrangements: interface by interface (the previous engine, kept in
    # benchmarks/reference.py) and as running sums of areas.  They differ
    # only in round-off: 1e-12 of the largest force (pressure) of the run.
    from rigplan.engine.axial import running_loads, true_force_at
    case = sectioned_case(seed)
    old = ref.interface_running_loads(*case)
    new = running_loads(*case)
    f_scale = max(1.0, float(np.max(np.abs(old.envelope_max))),
                  float(np.max(np.abs(old.envelope_min))))
    p_scale = max(1.0, float(np.max(np.abs(old.collapse_max))),
                  float(np.max(np.abs(old.burst_max))))
    for name, scale in (("string_load", f_scale), ("effective_top", f_scale),
                        ("envelope_max", f_scale), ("envelope_min", f_scale),
                        ("collapse_max", p_scale), ("burst_max", p_scale)):
        assert_allclose(getattr(new, name), getattr(old, name), rtol=0.0,
                        atol=1e-12 * scale, err_msg=name)
    # a step may differ only where two steps tie within round-off: the
    # force at the engine's step is the envelope
    n = case[0].n
    joints = np.arange(n)
    for steps, env in ((new.envelope_step, old.envelope_max),
                       (new.envelope_min_step, old.envelope_min)):
        assert np.all((steps >= joints + 1) & (steps <= n))
        assert_allclose(true_force_at(*case, joints, steps - 1), env, rtol=0.0,
                        atol=1e-12 * f_scale)
    from rigplan.engine.axial import _loads_at, string_geometry
    geo = string_geometry(case[0], case[2])
    above = np.flatnonzero(geo.fill_side)
    if len(above):
        worst, _ = _loads_at(geo, case[1], case[3], new.fill_level,
                             new.collapse_step[above] - 1, above)
        assert_allclose(worst, old.collapse_max[above], rtol=0.0, atol=1e-12 * p_scale)
