"""Floating a closed string: fill window, switch point and fill schedule.

Engine module: numpy arrays of SI floats; no units, no I/O.

With a check valve (float shoe, or float collar at the top of joint m) the
bore above the valve holds only what the crew puts in it.  Heights ``s``
here are measured up the string from the shoe [m]: the fill surface at
height ``s`` lies at depth ``Z_k - s`` at running step k.  When the crew
stops filling, the fluid goes down with the pipe, so ``s`` stays constant;
filling raises it.  ``s`` never falls (fluid cannot leave through the valve).

At each step the allowed fill heights form an interval (the fill window):

* collapse: ``DF_c (P_o - P_in) <= P_collapse`` on every rated joint above
  the valve (emptier pipe = more collapse load);
* check valve: ``P_o - P_in <= valve rating`` at the valve, where rated;
* running weight: string load ``>= minimum running weight`` (the string
  must still go down; emptier pipe = lighter);
* hoisting capacity: string load ``<= available capacity`` (fuller pipe =
  heavier).

The string load with fill is the empty-string load plus the weight of the
fill inside, ``rho_f g V(s)``: the fluid above the valve rests only on the
pipe's faces, so the pressure-area sum over those faces equals its weight
(the tests check this against ``rigplan.engine.axial``).

Sources: string mechanics (ADE 1986) (floating and fill-up conventions);
Bourgoyne et al., *Applied Drilling Engineering* (1986), ch. 7 (casing
design loads).  The schedule search is this project's own method.

Cost: the window and the collapse checks take ``O(N x S)`` for ``N`` joints
and ``S`` governing collapse sections (with the hole fluid at least as
heavy as the fill, the runs of equal rating weaker than everything below
them, usually one or two; otherwise every run of equal rating), so they
are quadratic only when nearly every joint above the valve is a section
of its own.
The schedule search steps from top-up to top-up (``O(T log N)`` for ``T``
top-ups) and evaluates its candidates together.
"""

from __future__ import annotations

import enum
from bisect import bisect_right
from dataclasses import dataclass, field

import numpy as np

from rigplan.engine.axial import StringGeometry, string_geometry, string_load_by_step
from rigplan.engine.findings import Finding, Kind, LimitName, Severity
from rigplan.engine.hydrostatics import collapse_load
from rigplan.engine.stringmodel import G, Closure, Hole, JointArrays

_EMPTY = 1e12  # a fill level deeper than any string [m]: empty above the valve
_BLOCK_ELEMENTS = 1 << 20  # largest (steps x sections) array built at once


#: Values derived from a string geometry, kept with it: ``id(geo) ->
#: (geo, {key: value})``.  Geometries are read-only (rigplan.engine.axial), so what
#: is derived from one alone stays valid; keys carry any other input.
_DERIVED: dict = {}
_DERIVED_SIZE = 16


def _derived(geo: StringGeometry, key, make):
    """``make()`` for this geometry and key, computed once."""
    entry = _DERIVED.get(id(geo))
    if entry is None or entry[0] is not geo:
        if len(_DERIVED) >= _DERIVED_SIZE:
            _DERIVED.clear()
        entry = (geo, {})
        _DERIVED[id(geo)] = entry
    values = entry[1]
    if key not in values:
        values[key] = make()
    return values[key]


def _read_only(*arrays):
    for a in arrays:
        a.flags.writeable = False
    return arrays


def _bore_volume_table(geo: StringGeometry):
    """Knots of the bore volume curve: heights of the joint tops above the
    shoe [m] (0 first) and the bore volume below each [m^3]."""
    def make():
        knots = np.concatenate(([0.0], geo.top))
        vols = np.concatenate(([0.0], np.cumsum(geo.bore_area * np.diff(knots))))
        return _read_only(knots, vols)

    return _derived(geo, "bore volume", make)


def _sections(geo: StringGeometry, allowable: np.ndarray, hole: Hole, fill_density: float):
    """:func:`_governing_sections` of :func:`collapse_sections` (first,
    last, allowable), computed once per geometry and allowable loads."""
    allowable = np.ascontiguousarray(allowable, dtype=float)
    heavier_outside = bool(hole.fluid_density >= fill_density)
    key = ("sections", allowable.tobytes(), heavier_outside)
    return _derived(geo, key, lambda: _read_only(*_governing_sections(
        collapse_sections(geo, allowable), hole, fill_density)))


def bore_volume_below(geo: StringGeometry, height):
    """Bore volume from the shoe up to a height above it [m^3].

    Piecewise linear through the joint tops: ``V(x) = sum A_b,i L_i`` over
    the joints below ``x`` plus the part of the joint holding ``x``.
    """
    knots, vols = _bore_volume_table(geo)
    return np.interp(height, knots, vols)


def height_for_bore_volume(geo: StringGeometry, volume):
    """Inverse of :func:`bore_volume_below` [m]."""
    knots, vols = _bore_volume_table(geo)
    return np.interp(volume, vols, knots)


def collapse_sections(geo: StringGeometry, allowable: np.ndarray):
    """Runs of consecutive joints above the valve with the same allowable
    collapse load [Pa].  Unrated joints (nan) are left out.  Returns arrays
    (first joint, last joint, allowable), 0-based."""
    idx = np.flatnonzero(geo.fill_side & np.isfinite(allowable))
    if len(idx) == 0:
        return np.zeros(0, int), np.zeros(0, int), np.zeros(0)
    a = allowable[idx]
    brk = np.flatnonzero((idx[1:] - idx[:-1] != 1) | (a[1:] != a[:-1])) + 1
    first = idx[np.concatenate(([0], brk))]
    last = idx[np.concatenate((brk - 1, [len(idx) - 1]))]
    return first, last, allowable[first]


def _governing_sections(sections, hole: Hole, fill_density: float):
    """The collapse sections that can govern, from :func:`collapse_sections`.

    With the hole fluid at least as heavy as the fill (``rho_o >= rho_f``)
    the collapse load ``P_o - P_in = rho_o g (z - h_o)+ - rho_f g (z - h)+``
    does not fall with depth wherever it is positive (slope ``rho_o g`` or
    ``(rho_o - rho_f) g >= 0`` below the annulus level, negative values
    above it), so a section with a deeper section of equal or smaller
    allowable load below it never sets a requirement or a utilization: only
    the sections weaker than every section below them are kept.  Otherwise
    (fill heavier than the hole fluid) all are kept.
    """
    first, last, r = sections
    if len(first) < 2 or not hole.fluid_density >= fill_density:
        return sections
    weakest_below = np.minimum.accumulate(np.concatenate(([np.inf], r[:-1])))
    keep = r < weakest_below
    return first[keep], last[keep], r[keep]


def collapse_required_height(geo: StringGeometry, hole: Hole, fill_density: float,
                             allowable: np.ndarray, valve_allowable: float = float("nan")):
    """Least fill height above the shoe [m] that keeps collapse within limits,
    at every step.

    For a section of equal allowable load ``R`` spanning heights
    ``[x_b, x_t]``, with ``P_o(x)`` the annulus pressure at height ``x``,
    ``P_o - P_in`` is largest at the section bottom, at its top, or at the
    fill surface (where the empty part above it sees ``P_o`` alone), so::

        s >= x_b + (P_o(x_b) - R) / (rho_f g)        when P_o(x_b) > R
        s >= x*  (where P_o(x*) = R)                  when x_b < x* <= x_t
        s >= x_t + (P_o(x_t) - R) / (rho_f g)        when x* > x_t

    Returns (required height per step [m], name of the binding limit per
    step: "collapse", "check valve" or "").  ``-inf`` means no requirement;
    ``+inf`` means none is possible (e.g. an air-filled string).
    """
    need, code = _collapse_required_height(geo, hole, fill_density, allowable, valve_allowable)
    return need, _LIMIT_NAMES[code]


#: Names of the limits that bound the fill from below, by code.
_LIMIT_NAMES = np.array(["", LimitName.COLLAPSE, LimitName.CHECK_VALVE,
                         LimitName.RUNNING_WEIGHT], dtype=object)


class FloatCode(enum.StrEnum):
    """Why a fill schedule fails (``FillSchedule.failure.code``)."""

    #: the fill carried down from above is over the window's upper side
    #: (context ``limit``: that side's :class:`LimitName`, "" for the pipe full)
    CARRIED_FILL_OVER = "float.carried_fill_over"
    #: the string with no fill above the valve is already over the window's
    #: upper side at this step: no fill plan helps (context ``limit``;
    #: quantity ``empty_load``, the empty string's load [N])
    EMPTY_STRING_OVER = "float.empty_string_over"
    #: no fill level keeps every limit at this step (context ``empty_limit``
    #: and ``full_limit``: the two sides that meet; ``full_limit`` is None when
    #: the window closes against the fill a later step allows)
    WINDOW_CLOSED = "float.window_closed"


def _collapse_required_height(geo, hole, fill_density, allowable, valve_allowable):
    """:func:`collapse_required_height` with the limit as a code into
    :data:`_LIMIT_NAMES` (int8 per step)."""
    n = len(geo.top)
    shoe = geo.top
    first, last, r = _sections(geo, allowable, hole, fill_density)
    rho_o, h_o = hole.fluid_density, hole.fluid_level
    grad_f = fill_density * G
    need = np.full(n, -np.inf)
    limit = np.zeros(n, dtype=np.int8)

    def from_face(p_face, x_face, allow):
        excess = p_face - allow
        with np.errstate(divide="ignore", invalid="ignore"):
            s = np.where(excess > 0,
                         np.where(grad_f > 0, x_face + excess / (grad_f if grad_f > 0 else 1.0),
                                  np.inf),
                         -np.inf)
        return s

    if len(first):
        # sections along the first axis, steps along the last
        k = np.arange(n)[None, :]
        in_hole = first[:, None] <= k
        x_b = geo.bottom[first][:, None]
        x_t = geo.top[np.minimum(last[:, None], k)]
        z_ref = shoe[None, :] - h_o
        p_b = rho_o * G * np.maximum(0.0, z_ref - x_b)
        p_t = rho_o * G * np.maximum(0.0, z_ref - x_t)
        s_a = from_face(p_b, x_b, r[:, None])
        if rho_o > 0:
            x_star = z_ref - r[:, None] / (rho_o * G)
        else:
            x_star = np.full_like(p_b, -np.inf)
        s_top = from_face(p_t, x_t, r[:, None])
        s_c = np.where(x_star <= x_b, -np.inf, np.where(x_star <= x_t, x_star, s_top))
        s_req = np.where(in_hole, np.maximum(s_a, s_c), -np.inf)
        need = s_req.max(axis=0)
        limit[np.isfinite(need) | (need == np.inf)] = 1        # collapse
    if np.isfinite(valve_allowable) and np.isfinite(geo.valve_height):
        xv = geo.valve_height
        p_v = rho_o * G * np.maximum(0.0, shoe - h_o - xv)
        s_v = from_face(p_v, xv, valve_allowable)
        s_v = np.where(shoe > xv, s_v, -np.inf)
        use = s_v > need
        need = np.where(use, s_v, need)
        limit[use] = 2                                          # check valve
    return need, limit


@dataclass(frozen=True)
class FillWindow:
    """Allowed inside fill at every running step (index k-1 = step k), SI.

    min_fill_level / max_fill_level : shallowest / deepest allowed depth of
        the fill surface [m] (nan before the valve is in the hole or when
        the window is empty)
    min_volume / max_volume : fill volume above the valve at those levels [m^3]
    full_volume : bore volume above the valve with the pipe full [m^3]
    low_height / high_height : the window as fill heights above the shoe [m]
    empty_limit : what stops the pipe being left emptier ("collapse",
        "check valve", "running weight", or "" when it may run empty)
    weight_floor : the running-weight floor at each step [N]: the
        minimum running weight once the shoe hangs in fluid, never more than
        the string can weigh with all the fill it holds (``-inf`` while the
        string hangs in air)
    hold_height : the highest fill the pipe can hold at each step, as a
        height above the shoe [m]: its top, or the fill's balance with the
        hole at the valve (the valve height when nothing stays in)
    full_limit : what stops it being fuller ("hoisting capacity", "valve
        balance" -- fill whose head at the valve exceeds the hole's drains
        out through it -- or "")
    closing_limit : for an empty window, the limits that overlap
    feasible : the window is not empty
    """

    joint: np.ndarray
    shoe_depth: np.ndarray
    valve_in_hole: np.ndarray
    low_height: np.ndarray
    high_height: np.ndarray
    min_fill_level: np.ndarray
    max_fill_level: np.ndarray
    min_volume: np.ndarray
    max_volume: np.ndarray
    full_volume: np.ndarray
    empty_string_load: np.ndarray
    weight_floor: np.ndarray
    empty_limit: tuple
    full_limit: tuple
    closing_limit: tuple
    feasible: np.ndarray
    hold_height: np.ndarray | None = None


def fill_window(joints: JointArrays, hole: Hole, closure: Closure, fill_density: float,
                string_limit: float, min_running_weight: float = 0.0,
                collapse_factor: float = 1.0) -> FillWindow:
    """Fill window at every running step for a string with a check valve.

    Parameters
    ----------
    joints, hole, closure : the string, the hole and the valve position
        (``closure.valve_joint`` must not be None).
    fill_density : fill fluid density [kg/m^3] (0 for air: no filling).
    string_limit : largest allowed string load [N] (hook capacity less the
        dead load, reserve and dynamic allowance).
    min_running_weight : least string load that still runs the pipe [N].
    collapse_factor : collapse design factor [-]; allowable = rating / DF.
    """
    if closure.is_open:
        raise ValueError("a fill window needs a float shoe or float collar")
    geo = string_geometry(joints, closure)
    n = len(geo.top)
    shoe = geo.top
    xv = geo.valve_height
    m = closure.valve_joint
    valve_in = np.arange(n) >= m
    # empty above the valve, the load does not depend on the fill fluid
    empty = _derived(geo, ("empty string load", hole.fluid_density, hole.fluid_level),
                     lambda: _read_only(string_load_by_step(geo, hole, 0.0, np.full(n, _EMPTY)))
                     )[0].copy()
    knots, vols = _bore_volume_table(geo)
    v_valve = float(np.interp(xv, knots, vols))
    full_vol = np.interp(shoe, knots, vols) - v_valve
    grad = fill_density * G
    with np.errstate(divide="ignore", invalid="ignore"):
        vol_cap = np.where(grad > 0, (string_limit - empty) / (grad if grad > 0 else 1.0),
                           np.where(empty <= string_limit, np.inf, -np.inf))
        vol_w = np.where(grad > 0, (min_running_weight - empty) / (grad if grad > 0 else 1.0),
                         np.where(empty >= min_running_weight, -np.inf, np.inf))
    s_cap = np.where(vol_cap >= full_vol, shoe,
                     np.where(vol_cap < 0, -np.inf,
                              np.interp(v_valve + np.maximum(vol_cap, 0), vols, knots)))
    # A check valve holds pressure from below only: fill whose head at the
    # valve exceeds the hole's there drains out through it until the two
    # balance (U-tube), so the fill can stand no higher than that.
    p_valve = hole.fluid_density * G * np.maximum(0.0, shoe - xv - hole.fluid_level)
    with np.errstate(divide="ignore", invalid="ignore"):
        s_drain = np.where(grad > 0, xv + p_valve / (grad if grad > 0 else 1.0), np.inf)
    # The heaviest the string can be made at each step: the fill as high as
    # the pipe holds it (to the top, or to its balance with the hole at the
    # valve; nothing while the valve hangs above the hole fluid).
    hold = np.where(valve_in, np.maximum(np.minimum(shoe, s_drain), xv), xv)
    hold_vol = np.maximum(np.interp(hold, knots, vols) - v_valve, 0.0)
    heaviest = empty + grad * hold_vol
    # The minimum running weight is there so that the string goes down: it
    # applies once the string hangs in fluid (the shoe below the fluid
    # level) and asks no more than the string can be made to weigh (a joint
    # is never refused for weighing what it weighs).  It cannot be met only
    # when the string floats with all the fill it can hold.
    in_fluid = shoe > hole.fluid_level
    floor = np.where(in_fluid, np.minimum(min_running_weight, np.maximum(heaviest, 0.0)),
                     -np.inf)
    with np.errstate(divide="ignore", invalid="ignore"):
        vol_w = np.where(grad > 0, (floor - empty) / (grad if grad > 0 else 1.0),
                         np.where(empty >= floor, -np.inf, np.inf))
    tol_v = 1e-12 * max(1.0, float(np.max(full_vol, initial=0.0)))
    vol_w = np.where((vol_w > hold_vol) & (vol_w <= hold_vol + tol_v), hold_vol, vol_w)
    s_w = np.where(vol_w <= 0, -np.inf,
                   np.where(vol_w > hold_vol, np.inf,
                            np.interp(v_valve + np.maximum(vol_w, 0), vols, knots)))
    allowable = np.asarray(joints.collapse_rating, dtype=float) / collapse_factor
    s_col, col_code = _collapse_required_height(geo, hole, fill_density, allowable,
                                                closure.valve_rating)
    # limits as codes: empty side into _LIMIT_NAMES, full side 1 = hoisting
    lo = np.full(n, xv)
    use = s_col > lo
    lo = np.where(use, s_col, lo)
    empty_code = np.where(use, col_code, 0)
    use = s_w > lo
    lo = np.where(use, s_w, lo)
    empty_code = np.where(use, 3, empty_code)                  # running weight
    tol_h = 1e-9 * max(1.0, float(shoe[-1]))
    hi = np.minimum(np.minimum(shoe, s_cap), s_drain)
    full_code = np.where(s_drain < np.minimum(shoe, s_cap) - tol_h, 2,
                         (s_cap < shoe).astype(np.int8)).astype(np.int8)
    tol = 1e-9 * max(1.0, float(shoe[-1]))
    feasible = (lo <= hi + tol) | ~valve_in
    # Where the window is empty, the limits that close it (message per pair).
    closing_code = np.where(feasible, empty_code, 4 + 3 * empty_code + full_code)
    in_hole = np.where(valve_in, 1, 0)
    with np.errstate(invalid="ignore"):
        ok = feasible & valve_in
        min_level = np.where(ok, shoe - hi, np.nan)
        max_level = np.where(ok, shoe - np.maximum(lo, xv), np.nan)
        vmin = np.where(ok, np.interp(np.clip(lo, xv, shoe), knots, vols) - v_valve, np.nan)
        vmax = np.where(ok, np.interp(np.clip(hi, xv, shoe), knots, vols) - v_valve, np.nan)
    return FillWindow(
        joint=np.arange(1, n + 1), shoe_depth=shoe.copy(), valve_in_hole=valve_in,
        low_height=np.where(valve_in, lo, np.nan), high_height=np.where(valve_in, hi, np.nan),
        min_fill_level=min_level, max_fill_level=max_level,
        min_volume=vmin, max_volume=vmax, full_volume=np.where(valve_in, full_vol, 0.0),
        empty_string_load=empty,
        weight_floor=floor,
        hold_height=np.where(valve_in, hold, np.nan),
        empty_limit=tuple(_LIMIT_NAMES[empty_code * in_hole]),
        full_limit=tuple(_FULL_NAMES[full_code * in_hole]),
        closing_limit=tuple(_CLOSING_NAMES[closing_code * in_hole]),
        feasible=feasible,
    )


#: Name of the limit that bounds the fill from above, by code.
_FULL_NAMES = np.array(["", LimitName.HOISTING, LimitName.VALVE_BALANCE], dtype=object)

#: What closes a step's window, by code: the empty-side name when the window
#: is open (0-3), else ``4 + 3 x empty-side code + full-side code`` written
#: ``"<empty side>+<full side>"`` ("full pipe" where the pipe full bounds it).
_CLOSING_NAMES = np.array(
    list(_LIMIT_NAMES)
    + [f"{low}+{high or 'full pipe'}" for low in _LIMIT_NAMES for high in _FULL_NAMES],
    dtype=object)


@dataclass(frozen=True)
class TopUp:
    """Fluid the crew adds with joint ``joint`` at the floor."""

    joint: int          # 1-based step (joint number) at which to add it
    volume: float       # [m^3]
    level_after: float  # depth of the fill surface after adding [m]
    before_joint: int = 0  # the joint it must go in before that joint is lowered
                           # (joint + 1; 0 when it is added with the last joint)


@dataclass(frozen=True)
class FillSchedule:
    """A crew-followable fill schedule and its result at every step, SI.

    fill_to_top_through : fill every joint above the valve to the top
        through this joint (0: never filled to the top -- never a joint at
        or below the valve; the string's last joint: never floated)
    top_ups : further additions after filling stops, each made with one
        joint at the floor before the next is lowered, so that joint goes
        in inside its window
    lowered_below_window : joints (1-based) lowered carrying less fill than
        their window asks, because the pipe could not hold it before (the
        valve just in the hole or above the hole fluid): filled on arrival
    fill_level, fill_volume : inside level [m] and volume above the valve
        [m^3] at each step (after any addition made at that step)
    string_load : true force at the string top [N]
    capacity_margin : (limit - load) / (limit + dead load) [-]: the margin on
        the hook, the planner's hoisting basis (``dead_load`` of the hoisting
        gear in both; 0: on the string load)
    collapse_utilization : largest DF x load / rating over rated joints [-]
    weight_margin : (load - minimum running weight) / limit [-]
    least_margin : smallest of all margins over all steps [-]
    least_margin_step : where it occurs (1-based)
    feasible : every step inside its window
    failure_step, failure : first step that cannot be kept inside the
        window, and why (a :class:`Finding` with a :class:`FloatCode`;
        0 and None when feasible)
    """

    fill_density: float
    fill_to_top_through: int
    top_ups: tuple
    fill_level: np.ndarray
    fill_volume: np.ndarray
    string_load: np.ndarray
    capacity_margin: np.ndarray
    collapse_utilization: np.ndarray
    weight_margin: np.ndarray
    least_margin: float
    least_margin_step: int
    feasible: bool
    failure_step: int = 0
    failure: Finding | None = None
    added_volume: float = 0.0
    notes: tuple = field(default_factory=tuple)
    lowered_below_window: tuple = ()


def collapse_utilization_by_step(joints: JointArrays, hole: Hole, closure: Closure,
                                 fill_density: float, fill_level, collapse_factor: float):
    """Largest ``DF x (P_o - P_in) / rating`` over the rated joints in the
    hole at each step [-], evaluated at each equal-rating section's bottom,
    top and the fill surface (the only places the maximum can sit)."""
    geo = string_geometry(joints, closure)
    n = len(geo.top)
    if closure.is_open:
        return np.zeros(n)
    allowable = np.asarray(joints.collapse_rating, dtype=float) / collapse_factor
    sections = _sections(geo, allowable, hole, fill_density)
    if len(sections[0]) == 0:
        return np.zeros(n)
    level = np.broadcast_to(np.asarray(fill_level, dtype=float), (n,))
    return _collapse_utilization(geo, sections, hole, fill_density, np.arange(n), level)


def _collapse_utilization(geo: StringGeometry, sections, hole: Hole, fill_density: float,
                          rows: np.ndarray, level: np.ndarray,
                          empty: bool = False) -> np.ndarray:
    """:func:`collapse_utilization_by_step` at the 0-based steps ``rows``.

    ``sections`` are the governing sections (:func:`_governing_sections`
    of :func:`collapse_sections`: first, last, allowable [Pa]); ``level``
    the fill level at each of ``rows`` [m] (a step may appear more than
    once, with different levels).  At each step and
    section, ``dP = rho_o g (z - h_o)+ - rho_f g (z - level)+`` [Pa] at the
    section's bottom, its top and the fill surface, the largest over the
    three divided by the allowable (dividing by a positive number keeps the
    order, so this equals the largest of the three ratios); sections not
    yet in the hole count 0.  ``O(len(rows) x S)`` for ``S`` governing
    sections, in blocks of rows to bound memory.

    ``empty=True`` says the pipe is empty above the valve at every row
    (level below the shoe): then ``dP = rho_o g (z - h_o)+`` does not grow
    upward, so each section's bottom carries its largest load, exactly (the
    operations are monotone in depth), and only that point is evaluated.
    """
    first, last, r = sections
    out = np.zeros(len(rows))
    if len(first) == 0 or len(rows) == 0:
        return out
    h_o = hole.fluid_level
    # sections along the first axis, steps along the last
    x_b = geo.bottom[first][:, None]
    block = max(1, _BLOCK_ELEMENTS // len(first))
    for i0 in range(0, len(rows), block):
        k = rows[i0:i0 + block][None, :]
        shoe = geo.top[k]
        lv = level[i0:i0 + block][None, :]
        if empty:
            points = (x_b,)
        else:
            x_t = geo.top[np.minimum(last[:, None], k)]
            points = (x_b, x_t, np.clip(shoe - lv, x_b, x_t))
        worst = np.zeros((len(first), k.shape[1]))
        for x in points:
            np.maximum(worst, collapse_load(shoe - x, hole.fluid_density, h_o, fill_density, lv,
                                             overwrite=True),
                       out=worst)
        worst /= r[:, None]
        worst[first[:, None] > k] = 0.0
        out[i0:i0 + block] = worst.max(axis=0)
    return out


def _first_over(values: np.ndarray, start: int, threshold: float, stop: int | None = None):
    """Offset from ``start`` of the first ``values[i] > threshold`` with
    ``start <= i < stop`` (``stop - start`` when there is none).  Scans in
    doubling windows, so the cost follows the distance to the hit."""
    stop = len(values) if stop is None else min(stop, len(values))
    i, width = start, 64
    while i < stop:
        j = min(stop, i + width)
        hit = np.flatnonzero(values[i:j] > threshold)
        if len(hit):
            return i - start + int(hit[0])
        i, width = j, 2 * width
    return stop - start


def _evaluate(geo, table, sections, hole, fill_density, heights, throughs, full_col,
              string_limit, min_weight, empty_load, hold=None, dead_load=0.0):
    """Loads and margins of candidate schedules, all at once: row ``b`` of
    ``heights`` [m] is candidate ``b``, full to the top (level 0) through
    step ``throughs[b]``, whose collapse utilization there is ``full_col``
    (shared).  ``min_weight`` is the per-step running-weight floor (never
    above the full-pipe load).  Returns per-candidate rows of level, volume,
    load, capacity margin, collapse utilization and weight margin, the least
    margin of each and its 1-based step."""
    shoe = geo.top
    n = len(shoe)
    knots, vols = table
    v_valve = float(np.interp(geo.valve_height, knots, vols))
    vol = np.maximum(np.interp(heights, knots, vols) - v_valve, 0.0)
    load = empty_load + fill_density * G * vol
    level = shoe - heights
    rows = np.concatenate([np.arange(t, n) for t in throughs])
    util = _collapse_utilization(geo, sections, hole, fill_density, rows,
                                 np.concatenate([level[b, t:] for b, t in enumerate(throughs)]))
    col = np.empty_like(heights)
    pos = 0
    for b, t in enumerate(throughs):
        col[b, :t] = full_col[:t]
        col[b, t:] = util[pos:pos + n - t]
        pos += n - t
    # on the hook, as the planner's hoisting limit: dead load in both
    cap_margin = (string_limit - load) / (string_limit + dead_load)
    w_margin = (load - min_weight) / string_limit
    # A full pipe (or one as full as it holds, ``hold`` [m above the shoe])
    # cannot be made heavier: its weight margin sets no choice.
    top = shoe if hold is None else np.fmin(shoe, hold)
    full = heights >= top - 1e-9 * max(1.0, float(shoe[-1]))
    w_margin = np.where(full, np.inf, w_margin)
    margins = np.minimum(np.minimum(cap_margin, 1.0 - col), w_margin)
    at = np.argmin(margins, axis=1)
    least = margins[np.arange(len(heights)), at]
    return level, vol, load, cap_margin, col, w_margin, least, at + 1


def fill_schedule(joints: JointArrays, hole: Hole, closure: Closure, fill_density: float,
                  string_limit: float, min_running_weight: float = 0.0,
                  collapse_factor: float = 1.0, window: FillWindow | None = None,
                  shares=(1.0, 0.95, 0.9, 0.85, 0.8, 0.7, 0.6, 0.5),
                  fixed_heights=None, dead_load: float = 0.0) -> FillSchedule:
    """Fill schedule with the fewest top-ups and, among those, the largest
    least margin.

    ``fixed_heights`` [m above the shoe], when given, are the fill heights
    of the steps already run (a fact of the run, from :func:`record_heights`):
    the schedule keeps them and plans only the steps after them.

    Fill each joint to the top while the full string stays within every
    future step's window (the fluid cannot be taken out again), then stop.
    When the carried fill no longer keeps a step inside its window, top up
    to a height between the step's least allowed height and the lowest
    upper bound of all later steps; ``shares`` are the tried fractions of
    that band (1.0 = fill as high as every later step allows, fewest
    top-ups).  Each variant is evaluated and the best kept.
    """
    if window is None:
        window = fill_window(joints, hole, closure, fill_density, string_limit,
                             min_running_weight, collapse_factor)
    geo = string_geometry(joints, closure)
    n = len(geo.top)
    shoe = geo.top
    m = closure.valve_joint
    xv = geo.valve_height
    tol = 1e-9 * max(1.0, float(shoe[-1]))
    lo = np.where(window.valve_in_hole, window.low_height, -np.inf)
    hi = np.where(window.valve_in_hole, window.high_height, np.inf)
    hi_ahead = np.minimum.accumulate(hi[::-1])[::-1]
    # For the searches below: the highest floor so far (nan never binds) and
    # the lowest ceiling from each step on.
    lo_so_far = np.maximum.accumulate(np.where(np.isnan(lo), -np.inf, lo))
    hi_from = np.fmin.accumulate(hi[::-1])[::-1]
    neg_hi = -hi
    full_ok = (shoe <= hi_ahead + tol) & (lo <= shoe + tol)
    full_ok[:m] = True
    bad = np.flatnonzero(~full_ok)
    longest = n if len(bad) == 0 else int(bad[0])   # joints 1..longest may be full
    # Shared by every candidate: the bore volume curve, the collapse
    # sections and the collapse utilization with the pipe full.
    table = _bore_volume_table(geo)
    allowable = np.asarray(joints.collapse_rating, dtype=float) / collapse_factor
    sections = _sections(geo, allowable, hole, fill_density)
    # Stop filling once the carried fill would reach each share of the
    # longest full length (share 1: fill to the top as long as possible).
    if longest >= n or longest <= m:
        throughs = [longest] * len(shares)
    else:
        target = xv + np.asarray(shares, dtype=float) * (shoe[longest - 1] - xv)
        throughs = [max(m + 1, min(longest, int(i)))
                    for i in np.searchsorted(shoe, target + tol, side="right")]
    fixed = None if fixed_heights is None else np.asarray(fixed_heights, dtype=float)[:n]
    k0 = 0 if fixed is None else len(fixed)
    reported = None
    if k0:
        # Steps already run are facts: still filling to the top if the pipe
        # is full now, else filling stopped at the last full step.
        full = fixed >= shoe[:k0] - tol
        full_now = bool(full[-1]) and k0 > m
        throughs = [(max(t, k0) if longest > k0 else k0) if full_now else k0 for t in throughs]
        not_full = np.flatnonzero(~full[m:])
        reported = k0 if len(not_full) == 0 else m + int(not_full[0])
    most = max(throughs, default=0) if not k0 else 0
    full_col = _collapse_utilization(geo, sections, hole, fill_density, np.arange(most),
                                     (shoe - shoe)[:most])
    # The top-up search below steps from one top-up to the next (a few per
    # schedule, not one per joint) and reads single values.
    lo_at, ceiling_at = lo, np.minimum(hi_ahead, shoe)
    # the loop reads single values: plain lists are read ten times faster
    lo_so_far_l, hi_from_l = lo_so_far.tolist(), hi_from.tolist()
    lo_at_l, ceiling_at_l = lo_at.tolist(), ceiling_at.tolist()
    candidates = []      # (heights, top-ups, failure step, failure) per share tried
    for share, through in zip(shares, throughs):
        heights = np.empty(n)
        heights[:through] = shoe[:through]
        s = float(shoe[through - 1]) if through > 0 else xv
        if through > 0 and through <= m:
            s = xv
        if k0:
            heights[:k0] = fixed
            if through <= k0:
                s = max(float(fixed[-1]), xv)
        tops = []
        failure_step, failure = 0, None
        k = through
        while k < n:
            # next step whose floor is above the carried fill, and the first
            # step up to it whose ceiling is below it
            # (every floor before k is at or below the carried fill, so the
            # first floor above it is where the running highest floor passes
            # it; a scan settles the case where rounding says otherwise)
            nxt = bisect_right(lo_so_far_l, s + tol) - k
            if nxt < 0:
                nxt = _first_over(lo, k, s + tol)
            if hi_from_l[k] < s - tol:
                over = _first_over(neg_hi, k, -(s - tol), k + nxt + 1)
            else:
                over = n
            if over <= nxt and k + over < n:
                kk = k + over
                heights[k:kk] = s
                failure_step = kk + 1
                if hi[kk] < xv - tol:
                    # the ceiling is below the valve: even empty it is over
                    failure = Finding(FloatCode.EMPTY_STRING_OVER, Severity.REASON,
                                      step=kk + 1, label=str(joints.label[kk]),
                                      context={"limit": str(window.full_limit[kk])},
                                      quantities={"empty_load": (
                                          float(window.empty_string_load[kk]), Kind.FORCE)})
                else:
                    failure = Finding(FloatCode.CARRIED_FILL_OVER, Severity.REASON,
                                      step=kk + 1, context={"limit": str(window.full_limit[kk])})
                heights[kk:] = s
                break
            heights[k:k + nxt] = s
            k += nxt
            if k >= n:
                break
            floor = lo_at_l[k]
            # The fill joint k+1 needs goes in before it is lowered, with
            # joint k at the floor (0-based step k - 1), when the pipe there
            # can hold it; otherwise (the valve just in the hole, or above
            # the hole fluid) it is added as soon as joint k+1 is at the floor.
            at = k - 1 if k - 1 >= m and floor <= ceiling_at_l[k - 1] + tol else k
            ceiling = ceiling_at_l[at]
            if floor > ceiling + tol:
                failure_step = k + 1
                failure = Finding(FloatCode.WINDOW_CLOSED, Severity.REASON, step=k + 1,
                                  context={"empty_limit": str(window.empty_limit[k]),
                                           "full_limit": None if window.feasible[k]
                                           else str(window.full_limit[k])})
                heights[k:] = max(s, min(floor, shoe[k]))
                break
            new = floor + share * (ceiling - floor)
            new = max(new, s)
            tops.append((at, s, new))
            heights[at] = new
            s = new
        candidates.append((heights, tops, failure_step, failure))
        if failure_step:
            break
    throughs = throughs[:len(candidates)]
    level, vol, load, capm, col, wm, least, at = _evaluate(
        geo, table, sections, hole, fill_density, np.stack([c[0] for c in candidates]),
        [0] * len(candidates) if k0 else throughs, full_col, string_limit, window.weight_floor, window.empty_string_load,
        window.hold_height, dead_load)
    # The best: feasible, then the fewest top-ups, then the largest least
    # margin (to 4 decimals); the first tried on a tie.
    best = None
    for b, (_, tops, failure_step, _) in enumerate(candidates):
        key = (failure_step == 0, -len(tops), round(float(least[b]), 4))
        if best is None or key > best[0]:
            best = (key, b)
    b = best[1]
    _, tops, failure_step, failure = candidates[b]
    through = throughs[b]
    top_ups = ()
    if tops:
        steps, olds, news = (np.array(column) for column in zip(*tops))
        added = np.interp(news, *table) - np.interp(olds, *table)
        top_ups = tuple(TopUp(joint=int(k) + 1, volume=float(v), level_after=float(z),
                              before_joint=int(k) + 2 if int(k) + 1 < n else 0)
                        for k, v, z in zip(steps, added, shoe[steps] - news))
    # Each joint is lowered with the fill it carries from the step before
    # (the valve height before any filling): the steps where that is below
    # the window's floor go in outside the window, and are filled on arrival.
    # A joint held back only by the running weight, carried in as full as
    # the pipe held it the step before, goes in as heavy as it can: that is
    # not outside its window (fill cannot be added to a joint not yet run).
    carried = np.concatenate(([xv], candidates[b][0][:-1]))
    hold = np.where(window.valve_in_hole, window.hold_height, xv)
    carry_max = np.concatenate(([xv], hold[:-1]))
    by_weight = np.asarray(window.empty_limit, dtype=object) == "running weight"
    short = window.valve_in_hole & (carried < np.nan_to_num(lo, nan=-np.inf) - tol) \
        & ~(by_weight & (carried >= carry_max - tol))
    return FillSchedule(
        fill_density=fill_density,
        fill_to_top_through=(reported if reported is not None and through <= k0 else through)
        if through > m else 0, top_ups=top_ups,
        lowered_below_window=tuple(int(k) + 1 for k in np.flatnonzero(short)),
        fill_level=np.where(np.arange(n) >= m, level[b], np.nan),
        fill_volume=np.where(np.arange(n) >= m, vol[b], 0.0),
        string_load=load[b].copy(), capacity_margin=capm[b].copy(),
        collapse_utilization=col[b].copy(), weight_margin=wm[b].copy(),
        least_margin=float(least[b]), least_margin_step=int(at[b]),
        feasible=failure_step == 0, failure_step=failure_step, failure=failure,
        added_volume=float(vol[b, -1] if n else 0.0),
    )


@dataclass(frozen=True)
class FillRecord:
    """The fill already in the pipe: a fact of the run, SI.

    density : density of the fluid the crew put in [kg/m^3] (of a column
        of the same weight, when the pipe holds two fluids)
    volume : fill volume above the valve after each step already run
        (index k-1 = step k) [m^3]
    in_use : the fluid the crew is adding now [kg/m^3] (nan: ``density``)
    """

    density: float
    volume: np.ndarray
    in_use: float = float("nan")

    @property
    def steps(self) -> int:
        return len(self.volume)


def record_heights(joints: JointArrays, closure: Closure, record: FillRecord,
                   fill_density: float) -> np.ndarray:
    """Fill heights above the shoe [m] of the steps in ``record``, as a
    column of ``fill_density`` of the same weight.

    The fill above a check valve rests on the pipe, so its weight is all it
    adds to the string load (``rigplan.engine.axial``):
    ``rho_r g V_r = rho_f g V_eq`` gives ``V_eq = V_r rho_r / rho_f``, and
    the height is where the bore holds ``V_eq`` above the valve.  With the
    same fluid this is the recorded column itself; with another fluid the
    hook load and the pressure at the valve are those of the recorded
    fluid (for a uniform bore), the pressure along the column in between
    is that of the equivalent column (an approximation).  A column that
    would stand above the pipe's top is cut at the top (an understatement:
    see the code).
    """
    geo = string_geometry(joints, closure)
    knots, vols = _bore_volume_table(geo)
    v_valve = float(np.interp(geo.valve_height, knots, vols))
    ratio = record.density / fill_density if fill_density > 0 else 1.0
    v_eq = np.asarray(record.volume, dtype=float)[:len(geo.top)] * ratio
    height = np.interp(v_valve + np.maximum(v_eq, 0.0), vols, knots)
    # a heavier recorded fluid, as a lighter column, may stand above the
    # pipe's top: it is counted to the top only (the hook load is then
    # understated by at most (rho_r - rho_f) g times the part above)
    return np.minimum(height, geo.top[:len(height)])


def switch_point(string_load: np.ndarray, string_limit: float) -> int:
    """First joint (1-based) at which the string load exceeds the limit, or
    0 when it never does: the joint at which floating must begin."""
    over = np.flatnonzero(np.asarray(string_load) > string_limit)
    return int(over[0]) + 1 if len(over) else 0


@dataclass(frozen=True)
class EmptyRun:
    """What happens if a closed string is run with nothing added inside.

    collapse_step : first step at which an empty pipe exceeds a collapse
        rating / DF (0: never)
    float_step : first step at which the empty string load falls below the
        minimum running weight (0: never)
    negative_step : first step at which the empty string load is negative,
        i.e. it floats (0: never)
    longest_empty : the longest empty column above the valve allowed by
        collapse alone over the whole run [m] (inf: any)
    """

    collapse_step: int
    float_step: int
    negative_step: int
    longest_empty: float


def empty_run(joints: JointArrays, hole: Hole, closure: Closure, fill_density: float,
              min_running_weight: float, collapse_factor: float,
              window: FillWindow | None = None) -> EmptyRun:
    """First steps at which an unfilled closed string collapses or floats."""
    if window is None:
        window = fill_window(joints, hole, closure, fill_density, np.inf,
                             min_running_weight, collapse_factor)
    geo = string_geometry(joints, closure)
    n = len(geo.top)
    if closure.is_open:
        util = np.zeros(n)
    else:
        allowable = np.asarray(joints.collapse_rating, dtype=float) / collapse_factor

        def empty_util():
            # an empty pipe holds no fill: the result is the same for every
            # fill fluid, so it is worked out once per string and hole
            sections = _sections(geo, allowable, hole, 0.0)
            return _read_only(_collapse_utilization(geo, sections, hole, 0.0, np.arange(n),
                                                    np.full(n, _EMPTY), empty=True))[0]

        util = _derived(geo, ("empty collapse", hole.fluid_density, hole.fluid_level,
                              allowable.tobytes()), empty_util)
    load = window.empty_string_load
    valve_in = window.valve_in_hole

    def first(mask):
        idx = np.flatnonzero(mask & valve_in)
        return int(idx[0]) + 1 if len(idx) else 0

    need = np.where(valve_in, window.low_height, -np.inf)
    # collapse-limited: the fill surface may sit no deeper than shoe - need
    empty_len = np.where(np.isfinite(need) & (need > geo.valve_height),
                         geo.top - need, geo.top - geo.valve_height)
    col_bound = np.asarray(window.empty_limit, dtype=object) == "collapse"
    longest = float(np.min(empty_len[col_bound & valve_in])) if np.any(col_bound & valve_in) \
        else float("inf")
    return EmptyRun(collapse_step=first(util > 1.0 + 1e-12),
                    float_step=first(load < min_running_weight),
                    negative_step=first(load < 0.0),
                    longest_empty=max(longest, 0.0))
