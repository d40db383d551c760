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

Running-sum form
----------------
Heights ``x`` are measured up from the shoe.  At step ``k`` the shoe is at
``Z_k``, the annulus fluid reaches up to height ``U_k = Z_k - h_o`` and the
fill inside up to ``H_k = Z_k - h_k`` (``h_o``, ``h_k`` the depths of the two
surfaces).  With ``P_o = rho_o g (U_k - x)+`` and ``P_f = rho_f g (H_k - x)+``
the interface sum telescopes (the area steps of neighbouring interfaces
cancel) into two integrals of the string's areas::

    F(j, k) = sum_{i<=j} W_i - rho_o g S_j(U_k) + rho_f g Y_j(H_k)

    S(y) = int_0^y A_p(x) dx,   A_p = A_o above the valve, A_o - A_b below it
    Y(y) = int_{x_v}^y A_b(x) dx (the fill-side bore volume below height y)
    S_j(y) = S(min(y, T_j)) + A_p,j (y - T_j)+   (T_j: top of joint j)
    Y_j(y) = Y(min(y, T_j)) + A_b,j (y - T_j)+   (0 below the valve)

(the pressure below the cut acts as if the cut joint's section went on up
to the fluid surface).  ``S`` and ``Y`` are running sums over the joints, so
each force costs O(1) after O(N) set-up, the string load at every step
O(N), whatever the number of section changes.

The force envelope of a joint, the largest and least ``F(j, k)`` over
``k >= j``, follows from how ``F`` depends on ``U_k`` (rising with ``k``)
and ``H_k``: below the valve ``F`` does not depend on the fill and falls as
``U_k`` rises, so its extremes sit at ``k = j`` and ``k = N``.  Above the
valve, with the fill height never falling (fluid cannot leave through a
check valve), the steps ``k >= j`` split into at most four runs by whether
``U_k`` and ``H_k`` have passed ``T_j``; in each run ``F`` is a fixed
function of the step plus a constant per joint, so a range-maximum query
(sparse table, O(N log N)) per distinct cross-section gives each run's
extreme step, and the joint's envelope is the best of those few steps,
evaluated exactly.  The collapse and burst envelopes (``P_o - P_in`` over
each joint's length and the steps) are found the same way.  Fill heights
that fall between steps (no plan makes them) are evaluated at every
(joint, step) pair instead, O(N^2) in bounded blocks.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from rigplan.engine.hydrostatics import collapse_load, hydrostatic_pressure
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
    """Derived geometry of a string in running order [m, m^2, m^3, N].

    ``bottom`` and ``top`` are heights of each joint's bottom and top face
    above the shoe; the shoe depth at step k (1-based) is ``top[k-1]``.
    ``fill_side`` marks the bores above the check valve.  ``knots`` are the
    heights 0, top[0], ..., top[-1]; ``pressure_volume`` and ``fill_volume``
    the running sums ``S`` and ``Y`` of the module docstring at the knots;
    ``pressure_area`` and ``fill_area`` the per-joint ``A_p`` and ``A_b``
    (0 below the valve).
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
    knots: np.ndarray = None
    pressure_area: np.ndarray = None
    fill_area: np.ndarray = None
    pressure_volume: np.ndarray = None
    fill_volume: np.ndarray = None


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
                 "active", "section", "knots", "pressure_area", "fill_area",
                 "pressure_volume", "fill_volume"):
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
    pressure_area = np.where(fill_side, ao, ao - ab)
    fill_area = np.where(fill_side, ab, 0.0)
    return StringGeometry(
        bottom=bottom, top=top, outside_area=ao, bore_area=ab, fill_side=fill_side,
        cum_weight=np.cumsum(np.asarray(joints.weight, dtype=float)),
        active=active, section=section, valve_height=valve_height,
        knots=np.concatenate(([0.0], top)), pressure_area=pressure_area, fill_area=fill_area,
        pressure_volume=np.concatenate(([0.0], np.cumsum(pressure_area * length))),
        fill_volume=np.concatenate(([0.0], np.cumsum(fill_area * length))),
    )


@dataclass(frozen=True)
class _Surfaces:
    """The two fluid surfaces at every step, as heights above the shoe [m],
    and the running sums up to them: ``rho_o g S(U_k)`` and
    ``rho_f g Y(H_k)`` [N] (module docstring)."""

    outside: np.ndarray       # U_k
    fill: np.ndarray          # H_k
    outside_force: np.ndarray
    fill_force: np.ndarray
    grad_o: float             # rho_o g [N/m^3]
    grad_f: float             # rho_f g [N/m^3]


def _surfaces(geo: StringGeometry, hole: Hole, fill_density: float,
              level: np.ndarray) -> _Surfaces:
    u = geo.top - hole.fluid_level
    h = geo.top - level
    grad_o = hole.fluid_density * G
    grad_f = fill_density * G
    return _Surfaces(u, h, grad_o * np.interp(u, geo.knots, geo.pressure_volume),
                     grad_f * np.interp(h, geo.knots, geo.fill_volume), grad_o, grad_f)


def _force(geo: StringGeometry, surf: _Surfaces, j, k) -> np.ndarray:
    """True force at the top of joints ``j`` at steps ``k`` (0-based,
    broadcast, ``j <= k``) [N]: ``F(j, k)`` of the module docstring."""
    top = geo.top[j]
    u = surf.outside[k]
    h = surf.fill[k]
    out = np.where(u >= top,
                   surf.grad_o * (geo.pressure_volume[j + 1] + geo.pressure_area[j] * (u - top)),
                   surf.outside_force[k])
    fill = np.where(h >= top,
                    surf.grad_f * (geo.fill_volume[j + 1] + geo.fill_area[j] * (h - top)),
                    surf.fill_force[k])
    return geo.cum_weight[j] - out + fill


def true_force_at(joints: JointArrays, hole: Hole, closure: Closure, fill_density: float,
                  fill_level, joint, step) -> np.ndarray:
    """True axial force at the top of joint ``joint`` at running step ``step`` [N].

    ``joint`` and ``step`` are arrays of 0-based indices of equal length
    with ``joint <= step``.  ``F(j, k)`` of the module docstring (the
    pressure-area sum in running-sum form), O(1) per pair after O(N) set-up.
    """
    geo = string_geometry(joints, closure)
    level = _fill_levels(geo, closure, fill_level)
    j = np.asarray(joint, dtype=int)
    k = np.asarray(step, dtype=int)
    if np.any(j > k):
        raise ValueError("a joint's top is loaded only from the step it enters the hole")
    return _force(geo, _surfaces(geo, hole, fill_density, level), j, k)


#: Rounding allowed on a fill level at the floor [m].
FLOOR_TOLERANCE = 1e-9


def _fill_levels(geo: StringGeometry, closure: Closure, fill_level) -> np.ndarray:
    n = len(geo.top)
    if closure.is_open or fill_level is None:
        return np.zeros(n)
    level = np.broadcast_to(np.asarray(fill_level, dtype=float), (n,)).copy()
    # A level worked out as a difference of depths can come out a few units
    # in the last place above the floor: that is the floor (1 nm tolerance).
    level[(level < 0) & (level >= -FLOOR_TOLERANCE)] = 0.0
    if np.any(~np.isfinite(level)) or np.any(level < 0):
        raise ValueError("fill levels must be depths >= 0 below the floor [m]")
    return level


def string_load_by_step(geo: StringGeometry, hole: Hole, fill_density: float,
                        fill_level: np.ndarray) -> np.ndarray:
    """True force at the top of the string at every running step [N].

    ``F_k = sum_{i<=k} W_i + sum_{active i<=k} [ P_o(z_i) (A_o,i-1 - A_o,i)
    + P_in,i(z_i) A_b,i - P_in,i-1(z_i) A_b,i-1 ]`` at step k, the
    pressure-area sum of the module docstring taken at the string top
    (the hook load less the dead load of the hoisting gear), evaluated in
    its running-sum form ``F(k, k)``.

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
        ``running_loads(...).string_load`` [N], the same formula, without
        the envelopes: O(N).  Static, vertical hole; sources as the module
        docstring.
    """
    n = len(geo.top)
    level = np.broadcast_to(np.asarray(fill_level, dtype=float), (n,))
    k = np.arange(n)
    return _force(geo, _surfaces(geo, hole, fill_density, level), k, k)


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
    Pressure-area method (module docstring), O(N log N) for fill heights
    that never fall.  Static: no drag, no acceleration, no surge.  The
    reductions to the buoyancy factor (open end, one fluid) and to
    ``W_air - P_shoe A_o`` (closed, empty) are checked in the tests.
    """
    geo = string_geometry(joints, closure)
    n = len(geo.top)
    level = _fill_levels(geo, closure, fill_level)
    surf = _surfaces(geo, hole, fill_density, level)
    steps = np.arange(n)
    string_load = _force(geo, surf, steps, steps)

    env_max = np.empty(n)
    env_step = np.empty(n, dtype=int)
    env_min = np.empty(n)
    env_min_step = np.empty(n, dtype=int)
    # Below the valve F(j, k) does not depend on the fill and falls as the
    # annulus surface rises past the joint (strictly once U_k > 0).
    below = np.flatnonzero(~geo.fill_side)
    if len(below):
        env_max[below] = string_load[below]
        env_step[below] = below + 1
        last = np.full(len(below), n - 1)
        env_min[below] = _force(geo, surf, below, last)
        falls = surf.grad_o > 0 and surf.outside[-1] > 0
        env_min_step[below] = n if falls else below + 1
    above = np.flatnonzero(geo.fill_side)
    rising = _rising_fill(surf.fill, above)
    if len(above):
        if rising is None:
            envelopes = _fill_side_envelopes_everywhere(geo, surf, above)
        else:
            envelopes = _fill_side_envelopes(geo, surf, above, rising)
        (env_max[above], env_step[above], env_min[above], env_min_step[above]) = envelopes

    shoe = geo.top
    top_depth = 0.0
    p_out_top = float(hydrostatic_pressure(top_depth, hole.fluid_density, hole.fluid_level))
    p_in_top = np.where(geo.fill_side, hydrostatic_pressure(top_depth, fill_density, level),
                        p_out_top)
    effective_top = string_load + p_out_top * geo.outside_area - p_in_top * geo.bore_area

    cmax, cstep, bmax = collapse_envelope(geo, hole, fill_density, level)
    return RunningLoads(
        shoe_depth=shoe.copy(), fill_level=level, string_load=string_load,
        effective_top=effective_top, envelope_max=env_max, envelope_step=env_step,
        envelope_min=env_min, envelope_min_step=env_min_step,
        collapse_max=cmax, collapse_step=cstep, burst_max=bmax,
    )


def _rising_fill(fill: np.ndarray, above: np.ndarray):
    """The fill heights made non-decreasing from the valve's first step on
    (``-inf`` before it), or None when they fall by more than round-off
    (fluid leaving through the valve, which no plan makes)."""
    if len(above) == 0:
        return None
    m = int(above[0])
    tail = fill[m:]
    scale = 1e-9 * max(1.0, float(np.max(np.abs(tail))) if len(tail) else 1.0)
    rising = np.full(len(fill), -np.inf)
    rising[m:] = np.maximum.accumulate(tail)
    if np.any(rising[m:] - tail > scale):
        return None
    return rising


def _range_arg(values: np.ndarray, lo: np.ndarray, hi: np.ndarray, largest: bool) -> np.ndarray:
    """First index of the largest (``largest``) or least value in
    ``values[lo:hi]`` for each query (``lo`` where the range is empty).

    A sparse table of arg-extremes over the span the queries touch:
    ``O(L log L)`` to build for a span of ``L`` steps, O(1) per query.
    """
    out = np.array(lo, dtype=int, copy=True)
    ok = hi > lo
    if not np.any(ok):
        return out
    lo_, hi_ = lo[ok], hi[ok]
    s0, s1 = int(lo_.min()), int(hi_.max())
    v = values[s0:s1] if largest else -values[s0:s1]
    length = hi_ - lo_
    p = np.floor(np.log2(length)).astype(int)
    p += (np.left_shift(1, p + 1) <= length)
    p -= (np.left_shift(1, p) > length)
    found = np.empty(len(lo_), dtype=int)
    level = np.arange(len(v))
    top = int(p.max())
    for q in range(top + 1):
        sel = np.flatnonzero(p == q)
        if len(sel):
            i1 = level[lo_[sel] - s0]
            i2 = level[hi_[sel] - s0 - (1 << q)]
            found[sel] = np.where(v[i2] > v[i1], i2, i1)
        if q < top:
            half = 1 << q
            a, b = level[:len(level) - half], level[half:]
            level = np.where(v[b] > v[a], b, a)
    out[ok] = found + s0
    return out


def _suffix_arg(values: np.ndarray, largest: bool) -> np.ndarray:
    """Per start ``s``: the first index of the largest (least) of
    ``values[s:]``."""
    n = len(values)
    v = values if largest else -values
    best = np.maximum.accumulate(v[::-1])[::-1]
    at = np.where(v == best, np.arange(n), n)
    return np.minimum.accumulate(at[::-1])[::-1]


def _pick(values: np.ndarray, steps: np.ndarray, largest: bool, n: int):
    """The extreme of each column of ``values`` (candidates x joints) and
    the first step that gives it."""
    best = values.max(axis=0) if largest else values.min(axis=0)
    step = np.where(values == best, steps, n).min(axis=0)
    return best, step


def _groups(first: np.ndarray, second: np.ndarray):
    """Indices of the joints with equal ``(first, second)`` pairs, group by
    group (runs of equal pairs found first: strings come in sections)."""
    if len(first) == 0:
        return []
    change = np.flatnonzero((np.diff(first) != 0) | (np.diff(second) != 0)) + 1
    starts = np.concatenate(([0], change))
    runs = np.diff(np.concatenate((starts, [len(first)])))
    _, inverse = np.unique(np.stack((first[starts], second[starts]), axis=1), axis=0,
                           return_inverse=True)
    label = np.repeat(inverse.ravel(), runs)
    order = np.argsort(label, kind="stable")
    bounds = np.flatnonzero(np.diff(label[order])) + 1
    return np.split(order, bounds)


def _fill_side_envelopes(geo: StringGeometry, surf: _Surfaces, above: np.ndarray,
                         rising: np.ndarray):
    """Largest and least ``F(j, k)`` over ``k >= j`` for joints above the
    valve, the fill height never falling (``rising``), and their first
    steps (1-based).

    ``a_j`` is the first step with ``U_k >= T_j`` (the joint's top under the
    annulus surface), ``b_j`` the first with ``H_k >= T_j`` (under the fill).
    On ``[j, min(a, b))`` the force is ``W_j - rho_o g S(U_k) + rho_f g
    Y(H_k)``; on ``[a, b)`` ``const - rho_o g A_p,j U_k + rho_f g Y(H_k)``;
    on ``[b, a)`` ``const - rho_o g S(U_k) + rho_f g A_b,j H_k``; from
    ``max(a, b)`` on ``const - rho_o g A_p,j U_k + rho_f g A_b,j H_k``.  The
    step part of each depends on the joint only through its areas, so one
    range query per distinct cross-section finds each run's extreme step
    (an empty run gives a step of another run).  The four candidates are
    evaluated exactly.
    """
    n = len(geo.top)
    j = above
    top = geo.top[j]
    a = np.maximum(np.searchsorted(surf.outside, top, side="left"), j)
    b = np.maximum(np.searchsorted(rising, top, side="left"), j)
    ab_lo, ab_hi = np.minimum(a, b), np.maximum(a, b)
    base = -surf.outside_force + surf.fill_force                       # on [j, min(a, b))
    area_p, area_b = geo.pressure_area[j], geo.fill_area[j]
    groups = _groups(area_p, area_b)
    results = []
    for largest in (True, False):
        cands = [_range_arg(base, j, ab_lo, largest)]
        run_ab = np.empty(len(j), dtype=int)        # [a, b): per distinct A_p
        run_ba = np.empty(len(j), dtype=int)        # [b, a): per distinct A_b
        tail = np.empty(len(j), dtype=int)          # [max(a, b), n): per (A_p, A_b)
        for g in groups:
            ap, fb = area_p[g[0]], area_b[g[0]]
            v_ab = -surf.grad_o * ap * surf.outside + surf.fill_force
            run_ab[g] = _range_arg(v_ab, a[g], b[g], largest)
            v_ba = -surf.outside_force + surf.grad_f * fb * surf.fill
            run_ba[g] = _range_arg(v_ba, b[g], a[g], largest)
            v_tail = -surf.grad_o * ap * surf.outside + surf.grad_f * fb * surf.fill
            tail[g] = _suffix_arg(v_tail, largest)[np.minimum(ab_hi[g], n - 1)]
        cands += [np.clip(x, j, n - 1) for x in (run_ab, run_ba, tail)]
        steps = np.stack(cands)
        values = _force(geo, surf, j[None, :], steps)
        best, step = _pick(values, steps, largest, n)
        results += [best, step + 1]
    return results


def _fill_side_envelopes_everywhere(geo: StringGeometry, surf: _Surfaces, above: np.ndarray):
    """:func:`_fill_side_envelopes` by evaluating every (joint, step) pair,
    in blocks of joints: for fill heights that fall between steps."""
    n = len(geo.top)
    out = [np.empty(len(above)), np.empty(len(above), dtype=int),
           np.empty(len(above)), np.empty(len(above), dtype=int)]
    block = max(1, _BLOCK_ELEMENTS // n)
    k = np.arange(n)[:, None]
    for i0 in range(0, len(above), block):
        j = above[i0:i0 + block][None, :]
        values = _force(geo, surf, np.minimum(j, k), k)
        steps = np.broadcast_to(k, values.shape)
        for slot, (largest, fill) in enumerate(((True, -np.inf), (False, np.inf))):
            v = np.where(k >= j, values, fill)
            best, step = _pick(v, steps, largest, n)
            out[2 * slot][i0:i0 + block] = best
            out[2 * slot + 1][i0:i0 + block] = step + 1
    return out


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

    At step k the load at height x is ``dP = rho_o g (U_k - x)+ - rho_f g
    (H_k - x)+`` (heights above the shoe, ``U_k`` and ``H_k`` the annulus
    and fill surfaces).  Along a joint ``[x_0, x_1]`` it is piecewise linear
    with a convex kink at ``U_k`` and a concave one at ``H_k``, so its
    largest value lies at ``x_0``, ``x_1`` or ``H_k``, its least at ``x_0``,
    ``x_1`` or ``U_k``.  Over the steps, with the fill height never falling:
    at a fixed ``x`` the load is 0 until a surface passes ``x``, then rises
    with ``U_k`` alone, or falls with ``H_k`` alone, then follows
    ``rho_o g U_k - rho_f g H_k``, whose extremes over the remaining steps
    are suffix extremes of one array; at ``x = H_k`` it is
    ``rho_o g (U_k - H_k)+`` over the steps whose fill surface lies in the
    joint (a range maximum), and at ``x = U_k`` likewise.  The candidate
    steps are evaluated at all the points with
    :func:`rigplan.engine.hydrostatics.collapse_load`.  Exact for the static
    model; O(N log N).  Fill heights that fall between steps are evaluated at
    every (joint, step) pair instead.

    Returns (collapse_max [Pa], step of it (1-based), burst_max [Pa]).
    """
    n = len(geo.top)
    cmax = np.zeros(n)
    cstep = np.arange(1, n + 1)
    bmax = np.zeros(n)
    fill_j = np.flatnonzero(geo.fill_side)
    if len(fill_j) == 0:
        return cmax, cstep, bmax
    u = geo.top - hole.fluid_level
    h = geo.top - level
    rising = _rising_fill(h, fill_j)
    if rising is None:
        wmax, wstep, bbest = _collapse_everywhere(geo, hole, fill_density, level, fill_j)
    else:
        j = fill_j
        x0, x1 = geo.bottom[j], geo.top[j]
        last = n - 1
        clip = lambda x: np.clip(x, j, last)  # noqa: E731
        d = hole.fluid_density * G * u - fill_density * G * h
        gap = u - h
        worst_k, worst_x, best_k, best_x = [], [], [], []
        for steps, faces, suffix, largest in ((worst_k, worst_x, _suffix_arg(d, True), True),
                                              (best_k, best_x, _suffix_arg(d, False), False)):
            # at a face: 0 until a surface passes it; then rising with U
            # alone (largest just before the fill passes), or falling with H
            # alone (least just before the annulus passes); then d + const
            for face in (x0, x1):
                a_u = np.searchsorted(u, face, side="right")
                a_h = np.searchsorted(rising, face, side="right")
                edge = a_h if largest else a_u
                both = np.minimum(np.maximum(np.maximum(a_u, a_h), j), last)
                for k in (j, clip(edge - 1), clip(edge), suffix[both]):
                    steps.append(k)
                    faces.append(face)
            # at a surface inside the joint: rho_o g (U - H)+ at the fill
            # surface (largest), -rho_f g (H - U)+ at the annulus one (least)
            surface = rising if largest else u
            lo = np.maximum(np.searchsorted(surface, x0, side="left"), j)
            hi = np.searchsorted(surface, x1, side="right")
            k = clip(_range_arg(gap, lo, hi, largest))
            steps.append(k)
            faces.append(np.clip(geo.top[k] - (level[k] if largest else hole.fluid_level),
                                 x0, x1))
        loads = []
        for ks, xs in ((worst_k, worst_x), (best_k, best_x)):
            k = np.stack(ks)
            zs = geo.top[k]
            loads.append((k, collapse_load(zs - np.stack(xs), hole.fluid_density,
                                           hole.fluid_level, fill_density, level[k],
                                           overwrite=True)))
        (k, worst), (_, best) = loads
        worst = np.where(np.isfinite(worst), worst, -np.inf)
        wmax, wstep = _pick(worst, k, True, n)
        bbest = np.where(np.isfinite(best), -best, -np.inf).max(axis=0)
    cmax[fill_j] = wmax
    cstep[fill_j] = wstep + 1
    bmax[fill_j] = bbest
    return cmax, cstep, bmax


def _collapse_everywhere(geo, hole, fill_density, level, fill_j):
    """:func:`collapse_envelope`'s extremes from every (joint, step) pair, in
    blocks of joints: for fill heights that fall between steps."""
    n = len(geo.top)
    wmax = np.empty(len(fill_j))
    wstep = np.empty(len(fill_j), dtype=int)
    bbest = np.empty(len(fill_j))
    block = max(1, _BLOCK_ELEMENTS // (4 * n))
    k = np.arange(n)[:, None]
    for i0 in range(0, len(fill_j), block):
        j = fill_j[i0:i0 + block][None, :]
        worst, best = _loads_at(geo, hole, fill_density, level, np.maximum(k, j), j)
        worst = np.where(k >= j, np.where(np.isfinite(worst), worst, -np.inf), -np.inf)
        best = np.where(k >= j, best, np.inf)
        v, s = _pick(worst, np.broadcast_to(k, worst.shape), True, n)
        wmax[i0:i0 + block] = v
        wstep[i0:i0 + block] = s
        bbest[i0:i0 + block] = np.where(np.isfinite(best), -best, -np.inf).max(axis=0)
    return wmax, wstep, bbest


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
        return hydrostatic_pressure(z, hole.fluid_density, hole.fluid_level)

    def p_in(z):
        pf = hydrostatic_pressure(z, fill_density, fill_level)
        return np.where(fill, pf, p_out(z))

    ao_low = np.concatenate(([0.0], ao[:-1]))
    ab_low = np.concatenate(([0.0], ab[:-1]))
    pin_b = p_in(z_bottom)
    pin_low = np.concatenate(([0.0], np.where(fill[:-1],
                                              hydrostatic_pressure(z_bottom[1:], fill_density,
                                                                   fill_level),
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
