"""Joint placement: the running order that gives the rack's joints the largest least margin.

A rack of joints of one nominal kind (same material, OD, wall, bore and
connection) can be run in any order, but the joints are not equal once
they are gauged: each has its own collapse rating (wall and roundness) and
its own tension rating (wall, weld).  The positions in the string are not
equal either: collapse load is largest near the bottom, tension largest near
the top.  This module finds the order that minimizes the largest
utilization (equivalently, maximizes the least margin ``1 - u``) over the
whole run.

Method: a bottleneck assignment solved exactly
----------------------------------------------
Let slot ``s`` carry the collapse load ``C_s`` and the tension ``T_s`` (the
largest over every running step, design factors applied), and joint ``j``
offer the ratings ``Rc_j`` and ``Rt_j``.  Joint ``j`` in slot ``s`` has the
utilization ``u_js = max(C_s / Rc_j, T_s / Rt_j)``.  We want the perfect
matching of joints to slots whose largest ``u_js`` is smallest (the
*bottleneck assignment problem*; Gross, O., "The bottleneck assignment
problem", RAND P-1630, 1959; Burkard, Dell'Amico and Martello, *Assignment
Problems*, SIAM 2009, section 6.2).

For a threshold ``U`` the admissible pairs are those with ``Rc_j >= C_s/U``
and ``Rt_j >= T_s/U``: a two-dimensional dominance.  Whether a perfect
matching exists is decided exactly by a greedy pass (:func:`feasible_order`):
take the slots by decreasing collapse demand; the joints strong enough in
collapse for a slot are strong enough for every later slot too, so they form
a growing pool; give each slot the pool's joint with the *smallest* tension
rating that still suffices.  Exchange argument: if an optimal matching gives
the slot a joint ``j'`` and greedy picks ``j`` with ``Rt_j <= Rt_j'``, then
wherever ``j`` sits in the optimal matching (a later slot, whose pool
contains ``j'`` and whose tension demand ``j`` meets, so ``j'`` meets it too)
the two can be swapped; so greedy fails only when no matching exists.

Feasibility is monotone in ``U``, and the optimum is one of the ``u_js``, so
a binary search over the sorted candidate values (or, for very large racks,
over ``U`` itself to machine precision) gives the optimal order in
``O(n^2 log n)`` for the candidates or ``O(n log n)`` per test.  Nothing is
tried at random.  Small racks are checked against brute force in the tests.
"""

from __future__ import annotations

import bisect
from dataclasses import dataclass

import numpy as np

#: Largest rack for which every pair utilization is enumerated (exact search
#: over the candidate values); above it the threshold is bisected to machine
#: precision instead.
EXACT_CANDIDATES_MAX = 1500


@dataclass(frozen=True)
class Assignment:
    """The order found for one group of interchangeable joints.

    order : for each slot (in slot order), the index of the joint placed there
    max_utilization : the largest ``u_js`` of that order [-]
    """

    order: np.ndarray
    max_utilization: float


def pair_utilization(slot_collapse, slot_tension, joint_collapse, joint_tension) -> np.ndarray:
    """Utilization of every joint in every slot, ``u[s, j]`` [-].

    .. math:: u_{sj} = \\max\\left(\\frac{C_s}{R_{c,j}}, \\frac{T_s}{R_{t,j}}\\right)

    Loads ``C_s``, ``T_s`` [Pa, N] already carry their design factors and are
    clipped at zero (no load, no use of the rating); a rating of ``nan`` or
    0 under a positive load gives ``inf`` (the joint cannot take that slot).
    """
    c = np.maximum(np.asarray(slot_collapse, float), 0.0)[:, None]
    t = np.maximum(np.asarray(slot_tension, float), 0.0)[:, None]
    rc = np.nan_to_num(np.asarray(joint_collapse, float), nan=0.0)[None, :]
    rt = np.nan_to_num(np.asarray(joint_tension, float), nan=0.0)[None, :]
    with np.errstate(divide="ignore", invalid="ignore"):
        uc = np.where(c > 0, c / rc, 0.0)
        ut = np.where(t > 0, t / rt, 0.0)
    return np.maximum(uc, ut)


def feasible_order(slot_collapse, slot_tension, joint_collapse, joint_tension,
                   threshold: float) -> np.ndarray | None:
    """An order in which no joint's utilization exceeds ``threshold``, or None.

    Exact greedy test for the two-dimensional dominance matching described
    in the module notes; ``O(n log n)`` plus list insertions.  Loads [Pa, N]
    with design factors applied; ratings [Pa, N]; ``threshold`` [-] > 0.
    """
    c = np.maximum(np.asarray(slot_collapse, float), 0.0)
    t = np.maximum(np.asarray(slot_tension, float), 0.0)
    rc = np.nan_to_num(np.asarray(joint_collapse, float), nan=0.0)
    rt = np.nan_to_num(np.asarray(joint_tension, float), nan=0.0)
    n = len(c)
    # A joint fits slot s in collapse iff c_s / rc_j <= U, i.e. c_s <= U rc_j
    # (and the same in tension).  The product is widened by a few units in
    # the last place so that a threshold equal to some c_s / rc_j admits
    # that pair whatever the rounding; the caller measures the order found.
    with np.errstate(over="ignore", invalid="ignore"):
        widen = threshold * (1.0 + 8.0 * np.finfo(float).eps)
        cap_c = np.where(rc > 0, widen * rc, 0.0)
        cap_t = np.where(rt > 0, widen * rt, 0.0)
    slots = np.lexsort((-t, -c))            # decreasing collapse demand, ties: tension
    joints = np.argsort(-cap_c, kind="stable")
    pool_keys: list = []                     # sorted tension capacities in the pool
    pool_ids: list = []
    order = np.empty(n, dtype=int)
    p = 0
    for s in slots:
        while p < n and cap_c[joints[p]] >= c[s]:
            j = int(joints[p])
            i = bisect.bisect_left(pool_keys, cap_t[j])
            pool_keys.insert(i, cap_t[j])
            pool_ids.insert(i, j)
            p += 1
        i = bisect.bisect_left(pool_keys, t[s])
        if i == len(pool_keys):
            return None
        order[s] = pool_ids.pop(i)
        pool_keys.pop(i)
    return order


def bottleneck_assignment(slot_collapse, slot_tension, joint_collapse, joint_tension) -> Assignment:
    """The order of joints over slots that minimizes the largest utilization.

    Parameters
    ----------
    slot_collapse, slot_tension : array_like
        Per slot, the largest collapse load [Pa] and tension [N] over the
        run, design factors applied.
    joint_collapse, joint_tension : array_like
        Per joint, its collapse rating [Pa] and tension rating [N] (the
        smaller of body and connection); ``nan`` is unrated.

    Returns
    -------
    Assignment
        ``order[s]`` is the joint for slot ``s``; ``max_utilization`` is the
        optimum (``inf`` when some slot's load can be carried by no joint).

    Notes
    -----
    Bottleneck assignment by threshold search with the exact greedy test of
    :func:`feasible_order` (Burkard, Dell'Amico and Martello, *Assignment
    Problems*, SIAM 2009, section 6.2, threshold algorithm).

    Examples
    --------
    Two slots, two joints: the stronger joint in collapse goes where the
    collapse load is.

    >>> a = bottleneck_assignment([100.0, 10.0], [1.0, 1.0], [50.0, 200.0], [10.0, 10.0])
    >>> a.order.tolist(), a.max_utilization
    ([1, 0], 0.5)
    """
    n = len(slot_collapse)
    if n == 0:
        return Assignment(np.empty(0, dtype=int), 0.0)
    u = None
    if n <= EXACT_CANDIDATES_MAX:
        u = pair_utilization(slot_collapse, slot_tension, joint_collapse, joint_tension)
        cand = np.unique(u[np.isfinite(u)])
        if cand.size == 0 or cand[-1] == 0.0:
            order = feasible_order(slot_collapse, slot_tension, joint_collapse, joint_tension,
                                   1.0 if cand.size else np.inf)
            if order is None:
                return Assignment(np.arange(n), float("inf"))
            return Assignment(order, float(np.max(u[np.arange(n), order])))
        lo, hi = 0, cand.size - 1
        best = feasible_order(slot_collapse, slot_tension, joint_collapse, joint_tension, cand[hi])
        if best is None:   # some slot has no finite pairing at all
            return Assignment(np.arange(n), float("inf"))
        while lo < hi:
            mid = (lo + hi) // 2
            o = feasible_order(slot_collapse, slot_tension, joint_collapse, joint_tension,
                               cand[mid] if cand[mid] > 0 else np.finfo(float).tiny)
            if o is None:
                lo = mid + 1
            else:
                hi, best = mid, o
        order = best
    else:
        order = _bisect_threshold(slot_collapse, slot_tension, joint_collapse, joint_tension)
        if order is None:
            return Assignment(np.arange(n), float("inf"))
    value = float(np.max(_utilization_of(order, slot_collapse, slot_tension,
                                         joint_collapse, joint_tension)))
    return Assignment(order, value)


def _utilization_of(order, slot_collapse, slot_tension, joint_collapse, joint_tension):
    """Per-slot utilization of a given order [-]."""
    order = np.asarray(order)
    c = np.maximum(np.asarray(slot_collapse, float), 0.0)
    t = np.maximum(np.asarray(slot_tension, float), 0.0)
    rc = np.nan_to_num(np.asarray(joint_collapse, float), nan=0.0)[order]
    rt = np.nan_to_num(np.asarray(joint_tension, float), nan=0.0)[order]
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.maximum(np.where(c > 0, c / rc, 0.0), np.where(t > 0, t / rt, 0.0))


def _bisect_threshold(slot_collapse, slot_tension, joint_collapse, joint_tension):
    """Large racks: bisect the threshold on a log scale to machine precision."""
    args = (slot_collapse, slot_tension, joint_collapse, joint_tension)
    hi_order = feasible_order(*args, np.finfo(float).max)
    if hi_order is None:
        return None
    hi = float(np.max(_utilization_of(hi_order, *args)))
    if hi == 0.0:
        return hi_order
    lo = hi * 1e-12
    best = hi_order
    for _ in range(200):
        if hi - lo <= hi * 4 * np.finfo(float).eps:
            break
        mid = 0.5 * (lo + hi)
        o = feasible_order(*args, mid)
        if o is None:
            lo = mid
        else:
            hi, best = float(np.max(_utilization_of(o, *args))), o
    return best


def interchangeable_groups(keys, movable) -> list[np.ndarray]:
    """Indices of the positions that may swap joints, one array per group.

    ``keys[i]`` is any hashable nominal description of position ``i`` (kind,
    material, OD, wall, bore, connection); ``movable[i]`` is False for the
    positions that stay where they are (shoe, float equipment, screens,
    reducers, the joint carrying a float collar).
    """
    groups: dict = {}
    for i, (k, m) in enumerate(zip(keys, movable)):
        if m:
            groups.setdefault(k, []).append(i)
    return [np.asarray(v, dtype=int) for v in groups.values() if len(v) > 1]


def fewest_moves(slot_collapse, slot_tension, joint_collapse, joint_tension,
                 threshold: float) -> np.ndarray | None:
    """An order within ``threshold`` that leaves as many joints where they are as it can.

    Joint ``i`` was tallied for slot ``i``; only joints whose own slot keeps
    them within the threshold may stay.  Starting from every joint free,
    each such joint in turn (the tightest fits first) is tried in its own
    slot, and stays there when the joints still free can fill the slots
    still open (:func:`feasible_order`, exact).  Every order returned keeps
    the threshold; the set of joints left in place is maximal (no other one
    could stay too), not proven maximum (that would be a weighted
    assignment).  None when nothing meets the threshold.
    """
    n = len(slot_collapse)
    sc, st = np.asarray(slot_collapse, float), np.asarray(slot_tension, float)
    jc, jt = np.asarray(joint_collapse, float), np.asarray(joint_tension, float)
    if feasible_order(sc, st, jc, jt, threshold) is None:
        return None
    u_own = _utilization_of(np.arange(n), sc, st, jc, jt)
    widen = threshold * (1.0 + 8.0 * np.finfo(float).eps) if np.isfinite(threshold) else threshold
    candidates = np.flatnonzero(u_own <= widen)
    candidates = candidates[np.argsort(-u_own[candidates], kind="stable")]
    free = np.ones(n, dtype=bool)
    for i in candidates:
        free[i] = False
        rest = np.flatnonzero(free)
        if rest.size and feasible_order(sc[rest], st[rest], jc[rest], jt[rest], threshold) is None:
            free[i] = True
    order = np.arange(n)
    rest = np.flatnonzero(free)
    if rest.size:
        order[rest] = rest[feasible_order(sc[rest], st[rest], jc[rest], jt[rest], threshold)]
    return order


def place_joints(groups, slot_collapse, slot_tension, joint_collapse, joint_tension,
                 enough: float = 0.0) -> np.ndarray:
    """The running order (a permutation of positions) that minimizes the largest utilization.

    Each group of interchangeable positions is solved on its own by
    :func:`bottleneck_assignment`: groups share no joints, so the least
    margin over the string is the least of the groups' optima and each is
    made as large as it can be.  ``slot_*`` are per position (the loads of
    the position, whichever joint runs there); ``joint_*`` are per joint as
    tallied (index = tallied position).  ``enough`` [-]: a utilization that
    need not be bettered (another limit of the plan already governs at that
    level), so no joint is moved to go below it.  Among the orders that
    reach the target, :func:`fewest_moves` keeps as many joints where they
    were tallied as it can.  Returns ``perm`` with ``perm[i]`` the tallied
    index of the joint to run at position ``i``.
    """
    n = len(slot_collapse)
    perm = np.arange(n)
    sc, st = np.asarray(slot_collapse, float), np.asarray(slot_tension, float)
    jc, jt = np.asarray(joint_collapse, float), np.asarray(joint_tension, float)
    for g in groups:
        a = bottleneck_assignment(sc[g], st[g], jc[g], jt[g])
        if not np.isfinite(a.max_utilization):
            continue
        target = max(a.max_utilization, float(enough))
        tallied = float(np.max(_utilization_of(np.arange(len(g)), sc[g], st[g], jc[g], jt[g])))
        if tallied <= target:
            continue                      # the tallied order already meets the target
        order = fewest_moves(sc[g], st[g], jc[g], jt[g], target)
        perm[g] = g[order if order is not None else a.order]
    return perm


# ---------------------------------------------------------------------------
# the whole string

#: Joint kinds that stay where the plan puts them: shoes, float equipment,
#: screens at their intervals, reducers, sumps and centralizer subs.  Only
#: blank casing joints of one nominal description are interchangeable.
MOVABLE_KINDS = ("blank",)

#: JointSpec fields that belong to the individual joint (measured on the
#: rack or on site), not to its nominal description.
_PER_JOINT_FIELDS = ("label", "length", "measured_length", "measured_wall", "ellipticity",
                     "dmax", "dmin", "rejected", "note", "weight")


def nominal_key(spec) -> tuple:
    """The nominal description of a joint: joints with equal keys may swap places."""
    import dataclasses
    return tuple((f.name, getattr(spec, f.name)) for f in dataclasses.fields(spec)
                 if f.name not in _PER_JOINT_FIELDS)


@dataclass(frozen=True)
class PlacementResult:
    """The proposed running order of a rack and what it gains.

    perm : ``perm[i]`` is the tallied running position (0-based) of the joint
        proposed for running position ``i`` (joint ``i + 1``)
    labels : joint labels in the proposed order, bottom joint first
    least_margin_tallied, least_margin_proposed : the least of the tension
        and collapse margins ``1 - u`` over every joint and step [-], design
        factors applied, from the full plan of each order
    governing_margin_tallied, governing_margin_proposed : the plans'
        governing margins (hoisting capacity included) [-]
    movable : how many positions could take another joint
    moved : how many positions get another joint than tallied
    governing_tallied, governing_proposed : the governing ``Limit`` of each plan
    """

    perm: np.ndarray
    labels: tuple
    least_margin_tallied: float
    least_margin_proposed: float
    governing_margin_tallied: float
    governing_margin_proposed: float
    movable: int
    moved: int
    governing_tallied: object = None
    governing_proposed: object = None


def _least_pipe_margin(plan) -> float:
    u = np.fmax(plan.chosen.tension_utilization, plan.chosen.collapse_utilization)
    u = u[np.isfinite(u)]
    return float(1.0 - np.max(u)) if u.size else float("nan")


def _governing_margin(plan) -> float:
    return float(plan.governing.margin) if plan.governing is not None else float("nan")


#: The limits the order of the joints changes (each joint's own ratings).
PIPE_LIMITS = ("connection tension", "collapse")


def _other_limits_margin(plan) -> float:
    """The least margin of the plan's limits that the order does not change [-]."""
    other = [lim.margin for lim in plan.chosen.limits if str(lim.name) not in PIPE_LIMITS
             and np.isfinite(lim.margin)]
    return float(min(other)) if other else float("inf")


def best_running_order(specs, plan_for, closure=None, iterations: int = 3) -> PlacementResult:
    """The running order of ``specs`` that maximizes the least pipe margin.

    Parameters
    ----------
    specs : sequence of JointSpec
        The running joints as tallied (rejected joints left out), joint 1 first.
    plan_for : callable
        ``plan_for(specs) -> LandingPlan``: plans a string in the job's hole,
        on its rig and path, with its settings (the caller binds them).
    closure : Closure, optional
        The float equipment: the joint carrying a float collar stays put.
    iterations : int
        Rounds of placement on the loads of the latest order (loads move a
        little with the joints' lengths and weights); the best full plan wins
        and the tallied order is kept unless another is better.

    Notes
    -----
    Each round solves :func:`place_joints` exactly for the slot loads of the
    current order (the bottleneck assignment); the margins reported are
    those of the complete plan of each order.  Joints move only as far as
    the whole run gains: once another limit (hoisting, screen buckling ...)
    governs, a better pipe margin changes nothing, and the fewest joints are
    moved that reach the best least margin of the run.
    """
    specs = list(specs)
    n = len(specs)
    valve = None if closure is None else closure.valve_joint
    movable = [s.kind in MOVABLE_KINDS and (valve is None or i != valve - 1)
               for i, s in enumerate(specs)]
    groups = interchangeable_groups([nominal_key(s) for s in specs], movable)
    tallied = plan_for(specs)
    base = (_least_pipe_margin(tallied), _governing_margin(tallied))
    best_perm, best_val, best_plan = np.arange(n), base, tallied
    perm, plan = np.arange(n), tallied
    if groups:
        for _ in range(max(1, iterations)):
            d = plan.settings.design
            loads = plan.chosen.loads
            joints = plan.joints
            rc = np.asarray(joints.collapse_rating, float)
            rt = np.fmin(joints.connection_rating, joints.body_rating)
            rt = np.where(np.isnan(joints.connection_rating) | np.isnan(joints.body_rating),
                          np.nan, rt)
            enough = max(0.0, 1.0 - _other_limits_margin(plan))
            step = place_joints(groups, d.collapse * np.maximum(loads.collapse_max, 0.0),
                                d.tension * np.maximum(loads.envelope_max, 0.0), rc, rt,
                                enough=enough)
            if np.array_equal(step, np.arange(n)):
                break
            perm = perm[step]
            plan = plan_for([specs[i] for i in perm])
            val = (_least_pipe_margin(plan), _governing_margin(plan))
            if (min(val[0], _other_limits_margin(plan)) >
                    min(best_val[0], _other_limits_margin(best_plan)) + 1e-12):
                best_perm, best_val, best_plan = perm.copy(), val, plan
    return PlacementResult(
        perm=best_perm, labels=tuple(specs[i].label for i in best_perm),
        least_margin_tallied=base[0], least_margin_proposed=best_val[0],
        governing_margin_tallied=base[1], governing_margin_proposed=best_val[1],
        movable=int(sum(len(g) for g in groups)),
        moved=int(np.count_nonzero(best_perm != np.arange(n))),
        governing_tallied=tallied.governing, governing_proposed=best_plan.governing)
