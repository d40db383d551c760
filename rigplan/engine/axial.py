"""Axial force in a hanging string by the pressure-area method.

Engine module: numpy arrays of SI floats; no units, no I/O.

Method
------
Fluid pressure acts on the string only through its horizontal faces.  Cut the
string at the top of joint ``j`` and take joints 1..j as a free body.  With
joint 1 at the bottom and "interface" ``i`` the bottom face of joint ``i``
(interface 1 is the bottom end, below which there is no steel), the true
axial force at the cut is::

    F(j) = sum_{i<=j} W_i
         + sum_{i<=j} [ P_o(z_i) (A_o,i-1 - A_o,i)
                        + P_in,i(z_i) A_b,i - P_in,i-1(z_i) A_b,i-1 ]

with ``A_o`` the outer area (``JointArrays.pressure_outside_area``: the bore
plus the joint's own material, so each joint is buoyed by the fluid its
material displaces) and ``A_b = pi d^2/4`` the bore area,
``A_o,0 = A_b,0 = 0``, ``P_o`` the annulus pressure and ``P_in,i`` the
pressure of whatever fills the bore of joint ``i`` (hole fluid below the
check valve, fill fluid above it).  A check valve is simply an interface
where the fluid changes; a float shoe is a valve at interface 1.

Effective tension ``T_eff = F + P_o A_o - P_in A_b`` at the same depth.

Sources: Lubinski, "Influence of tension and compression on straightness
and buckling of tubular goods in oil wells", API Drilling and Production
Practice (1951) (effective force); Bourgoyne et al., *Applied Drilling
Engineering* (1986), ch. 7 (pressure-area method, buoyancy); the project's
string mechanics (ADE 1986) for the sign conventions (depth down, tension positive).

Cost
----
Only interfaces where something changes (the bottom end, an OD or bore
change, the check valve) carry a pressure force.  Between two such
"active" interfaces the force differs only by the air weight of the joints
between, so the true force at every connection at every step needs
``O(N x I)`` work, ``N`` joints and ``I`` active interfaces, not
``O(N^2)``.  It is quadratic only when every joint changes cross-section.
The collapse envelope evaluates every joint above the valve at the ends of
each run of steps with a constant fill level or height: ``O(N x E)`` for
``E`` runs, quadratic only when the fill changes at every joint (a top-up
with each joint).  Memory is bounded by processing the steps in blocks.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from rigplan.engine.hydrostatics import collapse_load
from rigplan.engine.stringmodel import G, Closure, Hole, JointArrays

_BLOCK_ELEMENTS = 1 << 20

#: The last few geometries built: ``(joints, valve_joint, copies of the
#: input arrays, geometry)``.  A plan asks for the same string's geometry
#: many times (every float position and fill fluid); a hit needs the same
#: JointArrays object with unchanged lengths, diameters and weights.
_GEOMETRY_CACHE: list = []
_GEOMETRY_CACHE_SIZE = 8


@dataclass(frozen=True)
class StringGeometry:
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


def string_geometry(joints: JointArrays, closure: Closure) -> StringGeometry:
    """Heights, areas and the active interfaces of a string.

    Parameters
    ----------
    joints : JointArrays
        The string in running order (index 0 is joint 1, at the bottom).
    closure : Closure
        Check-valve position: None (open shoe), 0 (float shoe) or m >= 1
        (float collar at the top of joint m).

    The result's arrays are read-only: it may be shared with later calls
    for the same, unchanged string.
    """
    valve = closure.valve_joint
    inputs = (joints.length, joints.od, joints.bore, joints.weight,
              joints.od if joints.displaced_area is None else joints.displaced_area)
    for entry in tuple(_GEOMETRY_CACHE):
        if entry[0] is joints and entry[1] == valve and all(
                a.shape == np.shape(b) and bool((a == b).all()) for a, b in zip(entry[2], inputs)):
            return entry[3]
    geo = _build_geometry(joints, closure)
    for name in ("bottom", "top", "outside_area", "bore_area", "fill_side", "cum_weight",
                 "active", "section"):
        getattr(geo, name).flags.writeable = False
    _GEOMETRY_CACHE.insert(0, (joints, valve, tuple(np.array(a, dtype=float) for a in inputs),
                               geo))
    del _GEOMETRY_CACHE[_GEOMETRY_CACHE_SIZE:]
    return geo


def _build_geometry(joints: JointArrays, closure: Closure) -> StringGeometry:
    """:func:`string_geometry` without the cache."""
    n = joints.n
    if n == 0:
        raise ValueError("the string has no joints")
    length = np.asarray(joints.length, dtype=float)
    if not (np.isfinite(length).all() and (length > 0).all()):
        raise ValueError("every joint length must be positive [m]")
    top = np.cumsum(length)
    bottom = np.concatenate(([0.0], top[:-1]))
    ao = np.asarray(joints.pressure_outside_area, dtype=float)   # bore + own material (Archimedes)
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
    return StringGeometry(
        bottom=bottom, top=top, outside_area=ao, bore_area=ab, fill_side=fill_side,
        cum_weight=np.cumsum(np.asarray(joints.weight, dtype=float)),
        active=active, section=section, valve_height=valve_height,
    )


def _interface_terms(geo: StringGeometry, rows: np.ndarray, hole: Hole,
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


def true_force_at(joints: JointArrays, hole: Hole, closure: Closure, fill_density: float,
                  fill_level, joint, step) -> np.ndarray:
    """True axial force at the top of joint ``joint`` at running step ``step`` [N].

    ``joint`` and ``step`` are arrays of 0-based indices of equal length
    with ``joint <= step``.  The pressure-area sum of the module docstring
    over the interfaces below each joint's top, ``O(I x distinct steps)``.
    """
    geo = string_geometry(joints, closure)
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


def _fill_levels(geo: StringGeometry, closure: Closure, fill_level) -> np.ndarray:
    n = len(geo.top)
    if closure.is_open or fill_level is None:
        return np.zeros(n)
    level = np.broadcast_to(np.asarray(fill_level, dtype=float), (n,)).copy()
    if np.any(~np.isfinite(level)) or np.any(level < 0):
        raise ValueError("fill levels must be depths >= 0 below the floor [m]")
    return level


def string_load_by_step(geo: StringGeometry, hole: Hole, fill_density: float,
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


@dataclass(frozen=True)
class RunningLoads:
    """Loads over a whole run, SI units.  Index k-1 is running step k;
    index j-1 is joint j (its top connection for the force envelopes).

    shoe_depth : depth of the shoe at each step [m]
    fill_level : inside fill level at each step [m] (0 for an open string)
    string_load : true force at the top of the string at each step [N]
        (the hook load less the dead load of the hoisting gear)
    effective_top : effective tension at the top of the string [N]
    envelope_max, envelope_step : largest true force at each joint's top
        over all steps [N] and the 1-based step where it first occurs
    envelope_min, envelope_min_step : least true force (most compressive)
    collapse_max, collapse_step : largest collapse load P_o - P_in on each
        joint over all steps [Pa] and where it occurs
    burst_max : largest burst load P_in - P_o on each joint [Pa]
    """

    shoe_depth: np.ndarray
    fill_level: np.ndarray
    string_load: np.ndarray
    effective_top: np.ndarray
    envelope_max: np.ndarray
    envelope_step: np.ndarray
    envelope_min: np.ndarray
    envelope_min_step: np.ndarray
    collapse_max: np.ndarray
    collapse_step: np.ndarray
    burst_max: np.ndarray


def running_loads(joints: JointArrays, hole: Hole, closure: Closure,
                  fill_density: float = 0.0, fill_level=None) -> RunningLoads:
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
    geo = string_geometry(joints, closure)
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
    return RunningLoads(
        shoe_depth=shoe.copy(), fill_level=level, string_load=string_load,
        effective_top=effective_top, envelope_max=env_max, envelope_step=env_step,
        envelope_min=env_min, envelope_min_step=env_min_step,
        collapse_max=cmax, collapse_step=cstep, burst_max=bmax,
    )


def _step_segments(geo: StringGeometry, hole: Hole, level: np.ndarray):
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


def _loads_at(geo, hole, fill_density, level, k, j):
    """Extreme collapse loads on joints ``j`` (above the valve) at steps
    ``k`` (broadcast arrays of 0-based indices): max and min of
    ``P_o - P_in`` over each joint's bottom, top, fill surface and annulus
    fluid top [Pa]."""
    zs = geo.top[k]
    lv = level[k]
    x0 = geo.bottom[j]
    x1 = geo.top[j]
    h_o = hole.fluid_level
    points = [x0, x1, np.clip(zs - lv, x0, x1)]
    if h_o > 0:
        points.append(np.clip(zs - h_o, x0, x1))
    worst = best = None
    for p in points:
        d = collapse_load(zs - p, hole.fluid_density, h_o, fill_density, lv,
                          overwrite=True)
        if worst is None:
            worst, best = d, d.copy()
        else:
            np.maximum(worst, d, out=worst)
            np.minimum(best, d, out=best)
    return worst, best


def collapse_envelope(geo: StringGeometry, hole: Hole, fill_density: float,
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


@dataclass(frozen=True)
class StepProfile:
    """Forces along the string at one running step, SI units.

    Index j-1 is joint j (only joints 1..k are in the hole).
    top_depth : depth of each joint's top [m]
    true_force_top / true_force_bottom : true axial force just below the top
        face / just above the bottom face of each joint [N]
    effective_top / effective_bottom : effective tension there [N]
    """

    step: int
    top_depth: np.ndarray
    bottom_depth: np.ndarray
    true_force_top: np.ndarray
    true_force_bottom: np.ndarray
    effective_top: np.ndarray
    effective_bottom: np.ndarray


def step_profile(joints: JointArrays, hole: Hole, closure: Closure, step: int,
                 fill_density: float = 0.0, fill_level: float = 0.0,
                 slack_off: float = 0.0) -> StepProfile:
    """True and effective force along the string at running step ``step``.

    ``slack_off`` [N] is weight set down on bottom: it reduces the true
    force everywhere by that amount (a reaction at the shoe).
    """
    n = joints.n
    if not 1 <= step <= n:
        raise ValueError(f"step must be 1..{n}")
    geo = string_geometry(joints, closure)
    sub = np.arange(step)
    shoe = geo.top[step - 1]
    z_bottom = shoe - geo.bottom[sub]
    z_top = shoe - geo.top[sub]
    ao, ab = geo.outside_area[sub], geo.bore_area[sub]
    fill = geo.fill_side[sub]

    def p_out(z):
        return hole.fluid_density * G * np.maximum(0.0, z - hole.fluid_level)

    def p_in(z):
        pf = fill_density * G * np.maximum(0.0, z - fill_level)
        return np.where(fill, pf, p_out(z))

    ao_low = np.concatenate(([0.0], ao[:-1]))
    ab_low = np.concatenate(([0.0], ab[:-1]))
    pin_b = p_in(z_bottom)
    pin_low = np.concatenate(([0.0], np.where(fill[:-1],
                                              fill_density * G * np.maximum(0.0, z_bottom[1:] - fill_level),
                                              p_out(z_bottom[1:]))))
    face = p_out(z_bottom) * (ao_low - ao) + pin_b * ab - pin_low * ab_low
    below_faces = np.cumsum(face)
    w = np.asarray(joints.weight, dtype=float)[sub]
    f_bottom = np.cumsum(w) - w + below_faces - slack_off
    f_top = f_bottom + w
    e_top = f_top + p_out(z_top) * ao - p_in(z_top) * ab
    e_bottom = f_bottom + p_out(z_bottom) * ao - pin_b * ab
    return StepProfile(step=step, top_depth=z_top, bottom_depth=z_bottom,
                       true_force_top=f_top, true_force_bottom=f_bottom,
                       effective_top=e_top, effective_bottom=e_bottom)


def neutral_point_depth(profile: StepProfile) -> float:
    """Depth [m] where the effective tension passes through zero.

    Effective tension is linear along a uniform joint, so the crossing is
    found by linear interpolation between the faces.  Returns ``nan`` when
    the whole string is in effective tension, and ``0.0`` when the whole
    string is in effective compression (more set down than it weighs).
    Source: Lubinski (1951); the neutral point for buckling is where the
    effective force is zero.
    """
    eb, et = profile.effective_bottom, profile.effective_top
    zb, zt = profile.bottom_depth, profile.top_depth
    if np.all(eb >= 0) and np.all(et >= 0):
        return float("nan")
    if np.all(eb <= 0) and np.all(et <= 0):
        return 0.0
    # Scan upward from the shoe for the first joint whose top is in tension.
    crossing = np.flatnonzero((eb <= 0) & (et > 0))
    if len(crossing) == 0:
        crossing = np.flatnonzero((eb < 0) | (et < 0))
        i = int(crossing[-1])
        return float(zt[i])
    i = int(crossing[-1])
    frac = -eb[i] / (et[i] - eb[i])
    return float(zb[i] + frac * (zt[i] - zb[i]))
