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


def tight_running_loads(joints, hole, closure, fill_density, fill_level):
    """The running loads by a tight, straightforward loop: the baseline a
    careful programmer writes without numpy.

    Same results and conventions as :func:`reference_running_loads` (the
    pressure-area sum of the module docstring, ``dP`` at each joint's
    bottom, top and fill surface), but written to be quick in pure Python:
    inputs as lists once, the pressures inline (no function calls), each
    step's forces summed from the bottom joint up in one pass that also
    updates the envelopes, effective tension only at the string top.  Still
    one pass over the hanging joints per step: O(N^2) for N joints.
    """
    n, _lengths, weights, outer, inner, tops, valve, levels = _prepare(
        joints, hole, closure, fill_level)
    g = G
    rho_o = float(hole.fluid_density)
    lvl_o = float(hole.fluid_level)
    rho_f = float(fill_density)
    # joint j (0-based) holds hole fluid when the shoe is open or it is in
    # the shoe track below a float collar
    hole_side = [valve is None or (valve >= 1 and j + 1 <= valve) for j in range(n)]
    env_max = [-math.inf] * n
    env_step = [0] * n
    env_min = [math.inf] * n
    collapse_max = [-math.inf] * n
    shoe_depth = []
    string_load = []
    effective_top = []
    for k in range(n):
        shoe = tops[k + 1]
        h = levels[k]
        f = 0.0
        p_low = 0.0           # inside pressure just below the current face
        ao_low = ai_low = 0.0
        for j in range(k + 1):
            z_bot = shoe - tops[j]
            z_top = shoe - tops[j + 1]
            po = rho_o * g * (z_bot - lvl_o) if z_bot > lvl_o else 0.0
            if hole_side[j]:
                pi = po
            else:
                pi = rho_f * g * (z_bot - h) if z_bot > h else 0.0
            ao, ai = outer[j], inner[j]
            f += weights[j] + po * (ao_low - ao) + pi * ai - p_low * ai_low
            if f > env_max[j]:
                env_max[j] = f
                env_step[j] = k + 1
            if f < env_min[j]:
                env_min[j] = f
            po_top = rho_o * g * (z_top - lvl_o) if z_top > lvl_o else 0.0
            if hole_side[j]:
                pi_top = po_top
            else:
                pi_top = rho_f * g * (z_top - h) if z_top > h else 0.0
            dp = po - pi
            if po_top - pi_top > dp:
                dp = po_top - pi_top
            if not hole_side[j] and z_top < h < z_bot:
                dp_surface = rho_o * g * (h - lvl_o) if h > lvl_o else 0.0
                if dp_surface > dp:
                    dp = dp_surface
            if dp > collapse_max[j]:
                collapse_max[j] = dp
            # the inside pressure at this joint's top acts on the next face
            # from below (the same fluid column continues up the bore)
            p_low = pi_top
            ao_low, ai_low = ao, ai
        shoe_depth.append(shoe)
        string_load.append(f)
        effective_top.append(f + (po_top * outer[k] - pi_top * inner[k]))
    return {"shoe_depth": shoe_depth, "string_load": string_load,
            "envelope_max": env_max, "envelope_step": env_step, "envelope_min": env_min,
            "collapse_max": collapse_max, "effective_top": effective_top}


# ---------------------------------------------------------------------------
# The previous vectorized engine: interfaces x steps
# ---------------------------------------------------------------------------
#
# rigplan.engine.axial as it was before the running-sum form: the pressure
# force on every active interface (bottom end, OD or bore change, check
# valve) at every step, summed up the string, with suffix maxima for the
# envelopes, and the collapse envelope evaluated at the ends of every run of
# steps with a constant fill level or height.  Exact, vectorized, and
# O(N x I) for I active interfaces (O(N x E) for E runs of constant fill):
# quadratic when the section changes every few joints or the crew tops up
# every few joints.  Kept here, unchanged in its arithmetic, as the reference
# the engine is compared with (tests/test_reference_agreement.py,
# benchmarks/run.py) and as the third baseline of the benchmark.

from dataclasses import dataclass as _dataclass  # noqa: E402

import numpy as np  # noqa: E402

from rigplan.engine.axial import RunningLoads, _loads_at  # noqa: E402  (one kernel)
from rigplan.engine.hydrostatics import collapse_load  # noqa: E402
from rigplan.engine.stringmodel import Closure, Hole, JointArrays  # noqa: E402,F401

_BLOCK_ELEMENTS = 1 << 20
dataclass = _dataclass

@dataclass(frozen=True)
class InterfaceGeometry:
    """Derived geometry of a string in running order [m, m^2].

    ``bottom`` and ``top`` are heights of each joint's bottom and top face
    above the shoe; the shoe depth at step k (1-based) is ``top[k-1]``.
    ``fill_side`` marks the bores above the check valve.
    """

    bottom: np.ndarray
    top: np.ndarray
    outside_area: np.ndarray
    bore_area: np.ndarray
    fill_side: np.ndarray
    cum_weight: np.ndarray
    active: np.ndarray        # indices of active interfaces (sorted)
    section: np.ndarray       # per joint: index into ``active`` of its section
    valve_height: float       # height of the check valve above the shoe [m] (nan: open)


def _build_geometry(joints: JointArrays, closure: Closure) -> InterfaceGeometry:
    """:func:`_build_geometry` without the cache."""
    n = joints.n
    if n == 0:
        raise ValueError("the string has no joints")
    length = np.asarray(joints.length, dtype=float)
    if not (np.isfinite(length).all() and (length > 0).all()):
        raise ValueError("every joint length must be positive [m]")
    top = np.cumsum(length)
    bottom = np.concatenate(([0.0], top[:-1]))
    ao = 0.25 * np.pi * np.asarray(joints.od, dtype=float) ** 2
    ab = 0.25 * np.pi * np.asarray(joints.bore, dtype=float) ** 2
    if np.any(ab >= ao):
        raise ValueError("each joint's bore must be smaller than its outside diameter")
    fill_side = np.zeros(n, dtype=bool)
    valve_height = float("nan")
    m = closure.valve_joint
    if m is not None:
        if not 0 <= m < n:
            raise ValueError(
                f"float collar at joint {m} lies outside the string (joints 1..{n - 1} "
                "can carry a float collar; 0 is a float shoe)")
        fill_side[m:] = True
        valve_height = float(bottom[m])
    ao_low = np.concatenate(([0.0], ao[:-1]))
    ab_low = np.concatenate(([0.0], ab[:-1]))
    side_low = np.concatenate(([False], fill_side[:-1]))
    active_mask = (ao_low != ao) | (ab_low != ab) | (side_low != fill_side)
    active_mask[0] = True
    active = np.flatnonzero(active_mask)
    section = np.cumsum(active_mask) - 1     # index of the last active interface <= j
    return InterfaceGeometry(
        bottom=bottom, top=top, outside_area=ao, bore_area=ab, fill_side=fill_side,
        cum_weight=np.cumsum(np.asarray(joints.weight, dtype=float)),
        active=active, section=section, valve_height=valve_height,
    )


def _interface_terms(geo: InterfaceGeometry, rows: np.ndarray, hole: Hole,
                     fill_density: float, fill_level: np.ndarray) -> np.ndarray:
    """Pressure force [N] on each active interface at the given steps.

    ``rows`` are 0-based step indices; interfaces not yet in the hole (above
    the floor at that step) contribute zero.  Shape (I, len(rows)): the
    steps run along the last axis, so each operation loops over steps.
    """
    act = geo.active
    shoe = geo.top[rows]
    z = shoe[None, :] - geo.bottom[act][:, None]
    p_out = hole.fluid_density * G * np.maximum(0.0, z - hole.fluid_level)
    p_fill = fill_density * G * np.maximum(0.0, z - fill_level[rows][None, :])
    up_fill = geo.fill_side[act]
    low_fill = np.where(act > 0, geo.fill_side[np.maximum(act - 1, 0)], False)
    ao_up = geo.outside_area[act]
    ab_up = geo.bore_area[act]
    ao_low = np.where(act > 0, geo.outside_area[np.maximum(act - 1, 0)], 0.0)
    ab_low = np.where(act > 0, geo.bore_area[np.maximum(act - 1, 0)], 0.0)
    p_up = np.where(up_fill[:, None], p_fill, p_out)
    p_low = np.where(low_fill[:, None], p_fill, p_out)
    terms = (p_out * (ao_low - ao_up)[:, None] + p_up * ab_up[:, None]
             - p_low * ab_low[:, None])
    terms[act[:, None] > rows[None, :]] = 0.0
    return terms


def interface_true_force_at(joints: JointArrays, hole: Hole, closure: Closure, fill_density: float,
                  fill_level, joint, step) -> np.ndarray:
    """True axial force at the top of joint ``joint`` at running step ``step`` [N].

    ``joint`` and ``step`` are arrays of 0-based indices of equal length
    with ``joint <= step``.  The pressure-area sum of the module docstring
    over the interfaces below each joint's top, ``O(I x distinct steps)``.
    """
    geo = _build_geometry(joints, closure)
    level = _fill_levels(geo, closure, fill_level)
    j = np.asarray(joint, dtype=int)
    k = np.asarray(step, dtype=int)
    if np.any(j > k):
        raise ValueError("a joint's top is loaded only from the step it enters the hole")
    # Many joints share a step (the last, or the step before a top-up):
    # sum the interface forces once per distinct step, then pick each
    # joint's section (the last active interface at or below its top).
    steps, where = np.unique(k, return_inverse=True)
    q = np.cumsum(_interface_terms(geo, steps, hole, fill_density, level), axis=0)
    return geo.cum_weight[j] + q[geo.section[j], where]


def _fill_levels(geo: InterfaceGeometry, closure: Closure, fill_level) -> np.ndarray:
    n = len(geo.top)
    if closure.is_open or fill_level is None:
        return np.zeros(n)
    level = np.broadcast_to(np.asarray(fill_level, dtype=float), (n,)).copy()
    if np.any(~np.isfinite(level)) or np.any(level < 0):
        raise ValueError("fill levels must be depths >= 0 below the floor [m]")
    return level


def interface_string_load_by_step(geo: InterfaceGeometry, hole: Hole, fill_density: float,
                        fill_level: np.ndarray) -> np.ndarray:
    """True force at the top of the string at every running step [N].

    ``F_k = sum_{i<=k} W_i + sum_{active i<=k} [ P_o(z_i) (A_o,i-1 - A_o,i)
    + P_in,i(z_i) A_b,i - P_in,i-1(z_i) A_b,i-1 ]`` at step k, the
    pressure-area sum of the module docstring taken at the string top
    (the hook load less the dead load of the hoisting gear).

    Parameters
    ----------
    geo : StringGeometry
        From :func:`string_geometry` (joints and check-valve position).
    hole : Hole
        Annulus fluid density [kg/m^3] and level [m].
    fill_density : float
        Fluid inside above the check valve [kg/m^3].
    fill_level : ndarray of N
        Depth of the inside fill surface at each step [m] (zeros for an
        open shoe, where it is not used).

    Returns
    -------
    ndarray of N
        ``running_loads(...).string_load`` [N], computed the same way (same
        operations, same order) but without the envelopes: ``O(N x I)``
        work for ``I`` active interfaces.  Static, vertical hole; sources as
        the module docstring.
    """
    n = len(geo.top)
    block = max(1, _BLOCK_ELEMENTS // max(1, len(geo.active)))
    level = np.broadcast_to(np.asarray(fill_level, dtype=float), (n,))
    out = np.empty(n)
    steps = np.arange(n)
    for r0 in range(0, n, block):
        rows = steps[r0:r0 + block]
        q = np.cumsum(_interface_terms(geo, rows, hole, fill_density, level), axis=0)
        out[rows] = geo.cum_weight[rows] + q[geo.section[rows], rows - r0]
    return out


#: The previous engine returns the same fields as today's (one definition).
InterfaceRunningLoads = RunningLoads


def interface_running_loads(joints: JointArrays, hole: Hole, closure: Closure,
                  fill_density: float = 0.0, fill_level=None) -> InterfaceRunningLoads:
    """True axial force at every connection at every running step.

    Parameters
    ----------
    joints : JointArrays
        String in running order, joint 1 first.
    hole : Hole
        Annulus fluid density [kg/m^3] and level [m].
    closure : Closure
        Open shoe, float shoe or float collar.
    fill_density : float
        Density of the fluid inside above the check valve [kg/m^3].
    fill_level : float or array of N
        Depth from the floor to the inside fill surface at each step [m]
        (0 = full; the valve depth or deeper = empty above the valve).
        Ignored for an open shoe.

    Returns
    -------
    RunningLoads

    Notes
    -----
    Pressure-area method (module docstring).  Static: no drag, no
    acceleration, no surge.  The reductions to the buoyancy factor
    (open end, one fluid) and to ``W_air - P_shoe A_o`` (closed, empty) are
    checked in the tests.
    """
    geo = _build_geometry(joints, closure)
    n = len(geo.top)
    level = _fill_levels(geo, closure, fill_level)
    n_act = len(geo.active)
    block = max(1, _BLOCK_ELEMENTS // max(1, n_act))

    string_load = np.empty(n)
    env_max = np.empty(n)
    env_step = np.empty(n, dtype=int)
    env_min = np.empty(n)
    env_min_step = np.empty(n, dtype=int)
    carry_max = np.full(n_act, -np.inf)
    carry_max_at = np.full(n_act, n, dtype=int)
    carry_min = np.full(n_act, np.inf)
    carry_min_at = np.full(n_act, n, dtype=int)
    steps = np.arange(n)
    # Walk the steps from the last block to the first so that suffix maxima
    # (largest force at a connection from the step it enters the hole on)
    # can be carried between blocks.
    for r1 in range(n, 0, -block):
        r0 = max(0, r1 - block)
        rows = steps[r0:r1]
        # q[i, r]: pressure forces on the active interfaces 0..i at step
        # rows[r] (interfaces along the first axis, steps along the last)
        q = np.cumsum(_interface_terms(geo, rows, hole, fill_density, level), axis=0)
        sec = geo.section[rows]
        string_load[rows] = geo.cum_weight[rows] + q[sec, rows - r0]
        for sign, carry, carry_at, out, out_step in (
                (1.0, carry_max, carry_max_at, env_max, env_step),
                (-1.0, carry_min, carry_min_at, env_min, env_min_step)):
            v = sign * q
            suffix = np.maximum.accumulate(v[:, ::-1], axis=1)[:, ::-1]
            suffix = np.maximum(suffix, sign * carry[:, None])
            at = np.where(v == suffix, rows[None, :], n)
            at = np.minimum.accumulate(at[:, ::-1], axis=1)[:, ::-1]
            at = np.where(at == n, carry_at[:, None], at)
            out[rows] = geo.cum_weight[rows] + sign * suffix[sec, rows - r0]
            out_step[rows] = at[sec, rows - r0] + 1
            carry[:] = sign * suffix[:, 0]
            carry_at[:] = at[:, 0]

    shoe = geo.top
    top_depth = 0.0
    p_out_top = hole.fluid_density * G * max(0.0, top_depth - hole.fluid_level)
    p_in_top = np.where(geo.fill_side, fill_density * G * np.maximum(0.0, top_depth - level),
                        p_out_top)
    effective_top = string_load + p_out_top * geo.outside_area - p_in_top * geo.bore_area

    cmax, cstep, bmax = collapse_envelope(geo, hole, fill_density, level)
    return InterfaceRunningLoads(
        shoe_depth=shoe.copy(), fill_level=level, string_load=string_load,
        effective_top=effective_top, envelope_max=env_max, envelope_step=env_step,
        envelope_min=env_min, envelope_min_step=env_min_step,
        collapse_max=cmax, collapse_step=cstep, burst_max=bmax,
    )


def _step_segments(geo: InterfaceGeometry, hole: Hole, level: np.ndarray):
    """Split the steps into runs with a constant fill level (level held by
    topping up) or a constant fill height above the shoe (fluid carried down
    with the pipe).  Returns a list of (first, last, mode) 0-based steps."""
    n = len(level)
    if n == 1:
        return [(0, 0, 0)]
    scale = 1e-9 * max(1.0, float(geo.top[-1]))
    height = geo.top - level
    same_level = np.abs(np.diff(level)) <= scale
    same_height = np.abs(np.diff(height)) <= scale
    mode = np.where(same_level, 1, np.where(same_height, 2, 0))
    change = np.flatnonzero(np.diff(mode) != 0) + 1
    starts = np.concatenate(([0], change))
    ends = np.concatenate((change, [n - 1]))
    segments = []
    covered = np.zeros(n, dtype=bool)
    for s, e in zip(starts, ends):
        m = int(mode[s])
        if m:
            segments.append((int(s), int(e), m))
            covered[s:e + 1] = True
    for k in np.flatnonzero(~covered):
        segments.append((int(k), int(k), 0))
    return segments


def collapse_envelope(geo: InterfaceGeometry, hole: Hole, fill_density: float,
                      level: np.ndarray):
    """Largest collapse and burst load on each joint over all steps.

    Within one joint at one step the load ``P_o - P_in`` is piecewise linear
    in height with breaks at the fill surface and the annulus fluid top, so
    its extremes lie at the joint's ends or those breaks.  Over a run of
    steps with a constant fill height above the shoe (fluid carried down
    with the pipe) it is monotone in shoe depth, so the run's first and last
    steps and each joint's entry step bound it.  Over a run with a constant
    fill level it is piecewise linear in shoe depth with breaks where a
    face passes a fluid surface, so the steps either side of each break are
    added.  Exact for the static model.

    Returns (collapse_max [Pa], step of it (1-based), burst_max [Pa]).
    """
    n = len(geo.top)
    cmax = np.zeros(n)
    cstep = np.arange(1, n + 1)
    bmax = np.zeros(n)
    fill_j = np.flatnonzero(geo.fill_side)
    if len(fill_j) == 0:
        return cmax, cstep, bmax
    segments = _step_segments(geo, hole, level)
    ends = np.unique([e for seg in segments for e in seg[:2]])
    wmax = np.full(len(fill_j), -np.inf)
    wstep = np.zeros(len(fill_j), dtype=int)
    bbest = np.full(len(fill_j), -np.inf)

    def take(k, worst, best):
        nonlocal wmax, wstep, bbest
        worst = np.where(np.isfinite(worst), worst, -np.inf)
        pick = np.argmax(worst, axis=0)
        cols = np.arange(worst.shape[1])
        wv = worst[pick, cols]
        better = wv > wmax
        wmax = np.where(better, wv, wmax)
        wstep = np.where(better, np.broadcast_to(k, worst.shape)[pick, cols], wstep)
        bbest = np.maximum(bbest, np.where(np.isfinite(best), -best, -np.inf).max(axis=0))

    # Run ends and single steps, all joints at once (in blocks of steps).
    block = max(1, _BLOCK_ELEMENTS // (4 * len(fill_j)))
    for i0 in range(0, len(ends), block):
        k = ends[i0:i0 + block][:, None]
        jj = fill_j[None, :]
        worst, best = _loads_at(geo, hole, fill_density, level, k, jj)
        outside = jj > k                      # joints not yet in the hole
        worst[outside] = -np.inf
        best[outside] = np.inf
        take(k, worst, best)
    # Each joint's entry step (it is then the top joint).
    k = fill_j[None, :]
    worst, best = _loads_at(geo, hole, fill_density, level, k, fill_j[None, :])
    take(k, worst, best)
    # Breaks inside runs of constant fill level.
    h_o = hole.fluid_level
    for first, last, mode in segments:
        if mode != 1 or last - first < 2:
            continue
        sel = np.flatnonzero(fill_j <= last)
        j = fill_j[sel]
        lo = np.maximum(first, j)
        hf = level[first]
        cands = []
        for surface in ((h_o,) if hf == h_o else (h_o, hf)):
            for b in (geo.bottom[j] + surface, geo.top[j] + surface):
                kk = np.searchsorted(geo.top, b)
                cands += [np.clip(kk - 1, lo, last), np.clip(kk, lo, last)]
        k = np.stack(cands, axis=0)
        # A joint whose candidates are all its entry step (taken above)
        # adds nothing: a repeated step never beats itself.
        new = np.any(k != j[None, :], axis=0)
        if not np.any(new):
            continue
        sel, j, k = sel[new], j[new], k[:, new]
        worst, best = _loads_at(geo, hole, fill_density, level, k, j[None, :])
        full_w = np.full((k.shape[0], len(fill_j)), -np.inf)
        full_b = np.full((k.shape[0], len(fill_j)), np.inf)
        full_k = np.zeros((k.shape[0], len(fill_j)), dtype=int)
        full_w[:, sel] = worst
        full_b[:, sel] = best
        full_k[:, sel] = k
        take(full_k, full_w, full_b)
    cmax[fill_j] = wmax
    cstep[fill_j] = wstep + 1
    bmax[fill_j] = bbest
    return cmax, cstep, bmax


