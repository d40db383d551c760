"""Plain-Python reference for the running loads (pressure-area method).

This is the slow, obvious way to compute the loads: one running step at a
time, one joint at a time, with Python floats, the way a spreadsheet or a
first script does it (each row is the row below plus one joint).  It exists
to check the vectorized engine (``rigplan.engine.axial``) and to time it; nothing in
the application imports it.

Method: the free body of the string below a cut, fluid pressure acting only
on its horizontal faces (pressure-area method, with the sign conventions of
standard string mechanics (Bourgoyne et al., *Applied Drilling Engineering*, 1986), "Axial force by the pressure-area
method"):

* depth ``z`` downward from the rig floor [m], force positive in tension [N],
  gauge pressures [Pa];
* at running step ``k`` joints ``1..k`` hang, the shoe is at
  ``Z_k = L_1 + ... + L_k``, the bottom of joint ``i`` (interface ``i``) is at
  ``Z_k - (L_1 + ... + L_{i-1})`` and the top of joint ``j`` at
  ``Z_k - (L_1 + ... + L_j)``;
* outside: ``P_o(z) = rho_hole g max(0, z - z_hole)``;
* inside, below the check valve (or everywhere with an open shoe): hole fluid
  at ``P_o(z)``; above the valve: fill fluid
  ``rho_fill g max(0, z - h_k)``, empty (0) above the fill surface ``h_k``;
* true force at the top of joint ``j``::

      F_j = sum_{i<=j} W_i + sum_{i<=j} [ P_o(z_i) (A_o,i-1 - A_o,i)
                                         + P_in,i(z_i) A_i,i
                                         - P_in,i-1(z_i) A_i,i-1 ]

  with ``A = pi d^2 / 4`` and, at the bottom end (``i = 1``), no lower
  joint (its areas are 0);
* effective tension ``T = F + P_o(z) A_o - P_in(z) A_i`` at the same cut;
* collapse load ``dP = P_o - P_in``.
"""

from __future__ import annotations

import math

from rigplan.errors import InputError
from rigplan.engine.stringmodel import G

_QUARTER_PI = math.pi / 4.0


def _circle_area(d):
    """Area of a circle of diameter ``d`` [m] -> [m^2]: ``pi d^2 / 4``."""
    return _QUARTER_PI * d * d


def _hydrostatic(rho, level, z):
    """Gauge pressure [Pa] at depth ``z`` [m] under a column of density
    ``rho`` [kg/m^3] whose top is at depth ``level`` [m]:
    ``rho g max(0, z - level)`` (string mechanics (ADE 1986), "Hydrostatics")."""
    head = z - level
    if head <= 0.0:
        return 0.0
    return rho * G * head


def _prepare(joints, hole, closure, fill_level):
    """Inputs as plain Python lists; checks the fill schedule's length."""
    lengths = [float(x) for x in joints.length.tolist()]
    ods = [float(x) for x in joints.od.tolist()]
    bores = [float(x) for x in joints.bore.tolist()]
    weights = [float(x) for x in joints.weight.tolist()]
    n = len(lengths)
    valve = closure.valve_joint
    if valve is None:
        levels = [0.0] * n                      # ignored for an open shoe
    else:
        if valve < 0 or valve > n:
            raise InputError(
                "closure.valve_joint",
                f"expected 0 (float shoe) or a joint number 1..{n}, got {valve}")
        if fill_level is None:
            raise InputError(
                "fill_level",
                f"expected {n} fill-surface depths [m] (one per running step), got none")
        levels = [float(x) for x in (fill_level.tolist()
                                     if hasattr(fill_level, "tolist") else fill_level)]
        if len(levels) != n:
            raise InputError(
                "fill_level",
                f"expected {n} fill-surface depths [m] (one per running step), "
                f"got {len(levels)}")
        for k, h in enumerate(levels, start=1):
            if not math.isfinite(h) or h < 0.0:
                raise InputError(
                    f"fill_level[{k}]",
                    f"expected a depth below the floor >= 0 m, got {h!r}")
    if joints.displaced_area is None:
        outer = [_circle_area(d) for d in ods]
    else:   # the bore plus the joint's own material (Archimedes), JointArrays.pressure_outside_area
        outer = [_circle_area(b) + float(a) for b, a in zip(bores, joints.displaced_area.tolist())]
    inner = [_circle_area(d) for d in bores]
    # tops[j] = L_1 + ... + L_j, summed joint by joint (tops[0] = 0)
    tops = [0.0]
    for length in lengths:
        tops.append(tops[-1] + length)
    return n, lengths, weights, outer, inner, tops, valve, levels


def _holds_hole_fluid(valve, j):
    """True when joint ``j`` (1-based) is below the check valve (or the shoe
    is open), so its bore holds hole fluid at the outside pressure."""
    return valve is None or (valve >= 1 and j <= valve)


def _step_rows(joints, hole, closure, fill_density, fill_level):
    """Yield, for each running step k = 1..N, the per-joint rows
    ``(F_top, T_top, dP_max)`` for joints 1..k.  Plain loops throughout."""
    n, _lengths, weights, outer, inner, tops, valve, levels = _prepare(
        joints, hole, closure, fill_level)
    rho_o = float(hole.fluid_density)
    lvl_o = float(hole.fluid_level)
    rho_f = float(fill_density)

    for k in range(1, n + 1):
        shoe = tops[k]
        h = levels[k - 1]

        def p_in(j, z):
            if _holds_hole_fluid(valve, j):
                return _hydrostatic(rho_o, lvl_o, z)
            return _hydrostatic(rho_f, h, z)

        forces = []
        effective = []
        collapse = []
        f = 0.0
        for j in range(1, k + 1):
            z_bot = shoe - tops[j - 1]
            z_top = shoe - tops[j]
            ao_up = outer[j - 1]
            ai_up = inner[j - 1]
            if j == 1:
                ao_low = 0.0
                ai_low = 0.0
                p_low = 0.0
            else:
                ao_low = outer[j - 2]
                ai_low = inner[j - 2]
                p_low = p_in(j - 1, z_bot)
            p_out = _hydrostatic(rho_o, lvl_o, z_bot)
            p_up = p_in(j, z_bot)
            f = f + weights[j - 1] + p_out * (ao_low - ao_up) + p_up * ai_up - p_low * ai_low
            forces.append(f)

            p_out_top = _hydrostatic(rho_o, lvl_o, z_top)
            effective.append(f + p_out_top * ao_up - p_in(j, z_top) * ai_up)

            # dP(z) = P_o(z) - P_in(z) is piecewise linear along the joint; its
            # largest value is at the bottom, the top or the fill surface
            dp = p_out - p_up
            dp_top = p_out_top - p_in(j, z_top)
            if dp_top > dp:
                dp = dp_top
            if not _holds_hole_fluid(valve, j) and z_top < h < z_bot:
                # inside empty above the fill surface: P_in(h) = 0 there
                dp_surface = _hydrostatic(rho_o, lvl_o, h) - 0.0
                if dp_surface > dp:
                    dp = dp_surface
            collapse.append(dp)
        yield shoe, forces, effective, collapse


def reference_true_force(joints, hole, closure, fill_density, fill_level):
    """True axial force at the top of every hanging joint at every running step.

    ``F[k-1][j-1]`` is the force [N] (tension positive) at the top of joint
    ``j`` when joints ``1..k`` hang (``j <= k``), from the free body of joints
    ``1..j``::

        F_j = sum_{i=1..j} W_i
              + sum_{i=1..j} [ P_o(z_i) (A_o,i-1 - A_o,i)
                               + P_in,i(z_i) A_i,i - P_in,i-1(z_i) A_i,i-1 ]

    where ``z_i`` is the depth of the bottom of joint ``i``, ``A = pi d^2/4``
    and joint 0 does not exist (areas 0).  With a float shoe the bottom end
    carries the fill fluid on joint 1's bore; at a float collar the two sides
    of the valve hold different fluids.

    Parameters
    ----------
    joints : rigplan.engine.stringmodel.JointArrays
        ``length`` [m], ``od`` and ``bore`` [m] (pressure-area diameters),
        ``weight`` [N] air weight per joint; index 0 = joint 1 (bottom).
    hole : rigplan.engine.stringmodel.Hole
        ``fluid_density`` [kg/m^3], ``fluid_level`` [m] below the floor.
    closure : rigplan.engine.stringmodel.Closure
        ``valve_joint``: None open shoe, 0 float shoe, m >= 1 float collar at
        the top of joint m.
    fill_density : float
        Density of the fluid the crew puts inside above the valve [kg/m^3].
    fill_level : sequence of float or None
        Per running step k = 1..N, depth [m] from the floor to the inside fill
        surface above the valve (0 = full; at or below the valve = empty).
        Ignored (may be None) for an open shoe.

    Returns
    -------
    list of list of float
        ``F[k-1][j-1]`` [N] for ``1 <= j <= k <= N``.

    Notes
    -----
    Valid for a string hanging straight in a vertical hole with static fluids
    (no surge, drag or wall friction); the fill surface is flat.  Source:
    pressure-area method as stated in standard string mechanics (Bourgoyne et al., *Applied Drilling Engineering*, 1986)
    (free body of the string below the cut, fluid acting only on horizontal
    faces); its reductions (buoyancy factor for an open string, ``W - P A_o``
    for a closed empty one) are checked in tests/test_reference_agreement.py.
    """
    return [forces for _, forces, _, _ in
            _step_rows(joints, hole, closure, fill_density, fill_level)]


def reference_effective_tension(joints, hole, closure, fill_density, fill_level):
    """Effective tension at the top of every hanging joint at every step.

    ``T[k-1][j-1] = F[k-1][j-1] + P_o(z) A_o,j - P_in,j(z) A_i,j`` [N] at the
    depth ``z`` [m] of the top of joint ``j`` at step ``k`` (same parameters
    and validity as :func:`reference_true_force`).  For an open string in one
    fluid it is the buoyed weight of joints ``1..j`` (string mechanics (ADE 1986),
    "Effective tension").
    """
    return [eff for _, _, eff, _ in
            _step_rows(joints, hole, closure, fill_density, fill_level)]


def reference_running_loads(joints, hole, closure, fill_density, fill_level):
    """Running loads of every joint over the whole run, by plain loops.

    Same parameters as :func:`reference_true_force` (``joints`` [m, N],
    ``hole`` [kg/m^3, m], ``closure``, ``fill_density`` [kg/m^3],
    ``fill_level`` [m] per step).

    Returns
    -------
    dict of lists (index 0 = step 1 or joint 1)
        ``shoe_depth[k]`` [m]: ``Z_k = L_1 + ... + L_k``.
        ``string_load[k]`` [N]: true force at the top of joint k at step k
        (the hook load less the dead load of the hoisting gear).
        ``envelope_max[j]`` [N]: largest true force at the top of joint j over
        the steps ``k >= j``; ``envelope_step[j]``: the 1-based step where it
        first occurs.
        ``envelope_min[j]`` [N]: smallest true force there (most compressive).
        ``collapse_max[j]`` [Pa]: largest ``P_o - P_in`` over the steps and
        over the joint's length (string mechanics (ADE 1986), collapse check
        ``max_z dP(z)``): at its bottom, its top and, for a joint holding fill
        fluid whose fill surface lies within it, at the fill surface (inside
        empty above it).  Not clipped at 0: a negative value means the inside
        pressure exceeds the outside one all along the joint.  Joints below
        the valve (open to the hole) see 0.
        ``effective_top[k]`` [N]: effective tension at the top of joint k at
        step k, ``F + P_o A_o - P_in A_i``.

    Notes
    -----
    Validity and source as :func:`reference_true_force`.  ``dP`` is linear in
    depth between the joint's ends, the fill surface and the hole-fluid level,
    and cannot peak at the hole-fluid level (above it ``dP = -P_in`` does not
    rise with depth), so the three points above give the joint's largest value.
    A joint filled with fluid heavier than the hole fluid sees it at its top.
    """
    n = joints.n
    shoe_depth = []
    string_load = []
    effective_top = []
    env_max = [-math.inf] * n
    env_step = [0] * n
    env_min = [math.inf] * n
    collapse_max = [-math.inf] * n
    for k, (shoe, forces, effective, collapse) in enumerate(
            _step_rows(joints, hole, closure, fill_density, fill_level), start=1):
        shoe_depth.append(shoe)
        string_load.append(forces[k - 1])
        effective_top.append(effective[k - 1])
        for j in range(k):
            f = forces[j]
            if f > env_max[j]:
                env_max[j] = f
                env_step[j] = k
            if f < env_min[j]:
                env_min[j] = f
            if collapse[j] > collapse_max[j]:
                collapse_max[j] = collapse[j]
    return {
        "shoe_depth": shoe_depth,
        "string_load": string_load,
        "envelope_max": env_max,
        "envelope_step": env_step,
        "envelope_min": env_min,
        "collapse_max": collapse_max,
        "effective_top": effective_top,
    }
