"""Collapse loads while grouting the annulus, and lift planning.

Engine module: numpy arrays of SI floats; no units, no I/O.

Geometry
--------
After landing, the shoe sits at depth ``Z`` (the string length) and joint 1
is at the bottom.  Heights ``x`` are measured up the string from the shoe
[m], so a point at height ``x`` lies at depth ``z = Z - x`` (the heights of
each joint's faces come from :func:`rigplan.engine.axial.string_geometry`).

Grout (or cement) of density ``rho_g`` fills the annulus from a base height
``b`` up to a top height ``t``; its top lies at depth ``T = Z - t``.  Above
it the annulus holds the hole fluid (``rho_o``, level ``h_o``) to the
surface.  Inside the casing is a fluid ``rho_i`` with its level ``h_i``.
Static fluid columns (general hydrostatics, string mechanics (ADE 1986)
"Hydrostatics")::

    P_ann(z) = rho_o g max(0, z - h_o)                       z <= T
    P_ann(z) = rho_o g max(0, T - h_o) + rho_g g (z - T)     z >  T
    P_in(z)  = rho_i g max(0, z - h_i)
    dP(z)    = P_ann(z) - P_in(z)                            (collapse load)

(string mechanics (ADE 1986), "Grouting": ``dP = P_grout - P_inside``, largest at
the bottom of the grout column, checked against the collapse ratings.)

Lifts
-----
A tall column may be placed in lifts.  Each lift is placed once the one
below has set: set grout carries its own weight and passes no hydrostatic
pressure to the next lift, and the casing it encases is supported, so a
lift from ``b`` to ``t`` loads only the casing above ``b`` and its
hydrostatic column starts at ``b`` (common practice, no source).  The
whole column at once is the lift ``b = 0, t = H``.

For a point below the grout top (``x < t``) the load splits into a part
that depends only on the grout top and a part that depends only on the
point::

    dP(x; t) = h(t) - c(x)
    h(t) = rho_o g max(0, Z - t - h_o) + rho_g g t
    c(x) = rho_g g x + rho_i g max(0, Z - x - h_i)

and for a point above it (``x >= t``) the load is the hole fluid's less the
inside fluid's, independent of ``t``.  Both are piecewise linear, with
breaks only at joint faces, at the grout top and at the two fluid levels,
so the extremes over a joint lie at those points, and the utilization as
the grout rises is piecewise linear in ``t`` with breaks at joint faces
and fluid levels.  Between two such breaks the largest utilization is the
maximum of linear functions of ``t``, so the height where it first reaches
1 is found in closed form: that is the tallest lift.

Validity: static columns after placement (no friction or surge while
pumping), grout treated as a fluid until it sets (no gel strength), one
fluid inside, incompressible fluids.  Heat of hydration weakens
thermoplastic casing: the collapse ratings of joints whose material has a
temperature-derating table are taken at the job temperature plus the
grout's ``temperature_rise`` (:func:`grouting_collapse_ratings`).

Sources: string mechanics (ADE 1986) ("Hydrostatics", "Collapse",
"Grouting"); Bourgoyne et al., *Applied Drilling Engineering* (1986), ch. 7,
collapse design load from the annulus column less the inside column (from
memory).  Placing in lifts so each sets before the next is common practice,
no source; the lift search is this project's own method.
"""

from __future__ import annotations

import enum
import math
from dataclasses import dataclass

import numpy as np

from rigplan.errors import InputError
from rigplan.engine.findings import Finding, Kind, Severity
from rigplan.engine.hydrostatics import hydrostatic_pressure
from rigplan.engine.stringmodel import G, GroutSpec, Hole, JointArrays

__all__ = [
    "annulus_pressure_with_grout",
    "grout_differential_pressure",
    "lift_collapse_loads",
    "grout_collapse_loads",
    "grout_utilization",
    "grouting_collapse_ratings",
    "SingleLift",
    "max_single_lift",
    "GroutPlan",
    "GroutCode",
    "plan_grout_lifts",
]


class GroutCode(enum.StrEnum):
    """What the grouting plan has to say (``GroutPlan.reason`` and ``.warnings``)."""

    LIGHTER_THAN_HOLE_FLUID = "grout.lighter_than_hole_fluid"  # grout_density, hole_fluid_density
    DESIGN_FACTOR_BELOW_1 = "grout.design_factor_below_1"      # context design_factor
    UNRATED_JOINTS = "grout.unrated_joints"                    # context labels (comma-separated)
    TOO_MANY_LIFTS = "grout.too_many_lifts"                    # context lifts; height
    OVERLOADED_BEFORE_GROUT = "grout.overloaded_before_grout"  # label; base, utilization
    NO_LIFT_POSSIBLE = "grout.no_lift_possible"                # label; base
    NOT_FEASIBLE = "grout.not_feasible"                        # cause: the reason
    #: the planned column reaches screen joints: context labels
    #: (comma-separated); quantities grout_top (depth), screen_top (depth of
    #: the top of the highest screen covered), screen_bottom (depth of the
    #: bottom of the lowest screen covered)
    OVER_SCREENS = "grout.over_screens"

#: Utilization above 1 by less than this counts as within the rating
#: (rounding of the closed-form lift heights) [-].
UTILIZATION_TOLERANCE = 1e-9

#: Lifts shorter than this fraction of the string length count as zero [-].
_ZERO_LIFT = 1e-9

#: Most lifts the planner will lay out before giving up.
_MAX_LIFTS = 10000

#: Elements per block when utilization is evaluated at many grout tops.
_BLOCK_ELEMENTS = 1 << 18


# ---------------------------------------------------------------------------
# input checks


def _check_number(where: str, value, what: str, unit: str, *, positive=False) -> float:
    try:
        v = float(value)
    except (TypeError, ValueError):
        raise InputError(where, f"expected {what} in {unit}, got {value!r}") from None
    if not math.isfinite(v):
        raise InputError(where, f"expected a finite {what} in {unit}, got {value!r}")
    if positive and v <= 0:
        raise InputError(where, f"expected {what} > 0 {unit}, got {value!r}")
    if not positive and v < 0:
        raise InputError(where, f"expected {what} >= 0 {unit}, got {value!r}")
    return v


def _string_heights(joints: JointArrays):
    """Bottom and top heights of each joint above the shoe [m] and Z [m].

    Same construction as :func:`rigplan.engine.axial.string_geometry` (cumulative
    lengths in running order), without its area checks, which grouting
    does not need.
    """
    if joints.n == 0:
        raise InputError("joints", "expected at least one joint in the string")
    length = np.asarray(joints.length, dtype=float)
    bad = ~np.isfinite(length) | (length <= 0)
    if np.any(bad):
        i = int(np.flatnonzero(bad)[0])
        raise InputError(f"joints[{joints.label[i]}].length",
                         f"expected a joint length > 0 m, got {length[i]!r}")
    top = np.cumsum(length)
    bottom = np.concatenate(([0.0], top[:-1]))
    return bottom, top, float(top[-1])


def _collapse_ratings(joints: JointArrays) -> np.ndarray:
    rating = np.asarray(joints.collapse_rating, dtype=float)
    bad = ~np.isnan(rating) & ~(rating > 0)
    if np.any(bad):
        i = int(np.flatnonzero(bad)[0])
        raise InputError(f"joints[{joints.label[i]}].collapse_rating",
                         f"expected a collapse rating > 0 Pa (nan when unrated), got {rating[i]!r}")
    return rating


def grouting_collapse_ratings(joints: JointArrays, temperature_rise=0.0) -> np.ndarray:
    """Collapse ratings while the grout sets [Pa]: thermoplastics derated for its heat.

    .. math:: P_g = P_j \\, f(T_j + \\Delta T) / f(T_j)

    Parameters
    ----------
    joints : JointArrays
        Rated string: ``collapse_rating`` at the job temperature
        ``rating_temperature`` [C], and each joint's ``derating`` table.
    temperature_rise : float, optional
        Rise of the casing temperature while the grout sets [K], >= 0
        (cement's heat of hydration).

    Returns
    -------
    ndarray
        Ratings [Pa]; unchanged for joints without a derating table (steel);
        nan (unrated) where unrated or where the table gives no rating at
        the higher temperature (PVC above 140 F).

    Notes
    -----
    Derating factors ``f`` from :func:`rigplan.engine.materials.temperature_factor`
    (PVC: the table cited in ``rigplan.engine.materials.TEMPERATURE_DERATING``).
    The heat of hydration of the grout is a known cause of PVC casing
    collapse while grouting (ASTM F480, from memory); the rise is the
    user's estimate, it is not computed here.
    """
    from rigplan.engine.materials import temperature_factor

    rating = _collapse_ratings(joints).copy()
    rise = _check_number("grout.temperature_rise", temperature_rise, "a temperature rise", "K")
    if rise == 0.0 or not joints.derating:
        return rating
    t0 = float(joints.rating_temperature)
    for table in set(joints.derating) - {""}:
        k = np.array([d == table for d in joints.derating], dtype=bool)
        f0 = temperature_factor(table, t0)
        f1 = temperature_factor(table, t0 + rise)
        rating[k] = rating[k] / f0 * f1        # nan past the table: unrated
    return rating


def _check_hole(hole: Hole):
    rho_o = _check_number("hole.fluid_density", hole.fluid_density, "a hole-fluid density", "kg/m^3")
    h_o = _check_number("hole.fluid_level", hole.fluid_level, "a hole-fluid level (depth below the floor)", "m")
    return rho_o, h_o


def _check_fluids(grout_density, inside_density, inside_level, collapse_factor):
    rho_g = _check_number("grout.density", grout_density, "a grout density", "kg/m^3", positive=True)
    rho_i = _check_number("grout.inside_density", inside_density, "an inside-fluid density", "kg/m^3")
    h_i = _check_number("grout.inside_level", inside_level,
                        "an inside-fluid level (depth below the floor)", "m")
    df = _check_number("design_factors.collapse", collapse_factor, "a collapse design factor", "[-]",
                       positive=True)
    return rho_g, rho_i, h_i, df


def _check_height(where: str, value, z_shoe: float, what: str) -> float:
    v = _check_number(where, value, what, "m")
    if v > z_shoe * (1.0 + 1e-12):
        raise InputError(where, f"expected {what} no higher than the top of the string "
                                f"({z_shoe:.3f} m above the shoe), got {v!r} m")
    return min(v, z_shoe)


# ---------------------------------------------------------------------------
# pressures


def annulus_pressure_with_grout(depth, grout_top_depth, grout_density, fluid_density,
                                fluid_level=0.0):
    """Annulus pressure with a grout column below the hole fluid.

    .. math::

        P(z) = \\rho_o g \\max(0, z - h_o)                     \\quad z \\le T

        P(z) = \\rho_o g \\max(0, T - h_o) + \\rho_g g (z - T)   \\quad z > T

    Parameters
    ----------
    depth : float or array_like
        Depth below the rig floor [m].
    grout_top_depth : float or array_like
        Depth of the top of the grout column ``T`` [m].
    grout_density : float
        Grout density ``rho_g`` [kg/m^3].
    fluid_density : float
        Density of the hole fluid above the grout ``rho_o`` [kg/m^3].
    fluid_level : float, optional
        Depth of the top of the hole fluid ``h_o`` [m] (0 = full).

    Returns
    -------
    float or ndarray
        Gauge pressure [Pa].

    Notes
    -----
    Static, incompressible columns; grout acts as a fluid until it sets.
    The grout column is taken to run on down to ``depth`` (the caller
    limits it to the shoe or to the set grout below).  Source: general
    hydrostatics, ``P = rho g h`` summed over stacked columns (mechanics
    reference, "Hydrostatics").

    Examples
    --------
    Water (1000 kg/m^3) full to the floor over 10 m of grout at 1800 kg/m^3
    topping at 90 m: at 100 m, ``g (1000 x 90 + 1800 x 10)``:

    >>> round(annulus_pressure_with_grout(100.0, 90.0, 1800.0, 1000.0) / 9.80665)
    108000
    """
    z = np.asarray(depth, dtype=float)
    t_depth = np.asarray(grout_top_depth, dtype=float)
    p_top = hydrostatic_pressure(np.minimum(z, t_depth), fluid_density, fluid_level)
    p = p_top + hydrostatic_pressure(z, grout_density, t_depth)
    return float(p) if p.ndim == 0 else p


def _inside_pressure(x, z_shoe, rho_i, h_i):
    return hydrostatic_pressure(z_shoe - x, rho_i, h_i)


def _mud_load(x, z_shoe, rho_o, h_o, rho_i, h_i):
    """dP at heights x above the grout top [Pa]."""
    return hydrostatic_pressure(z_shoe - x, rho_o, h_o) - _inside_pressure(x, z_shoe, rho_i, h_i)


def _grout_head(t, z_shoe, rho_o, h_o, rho_g):
    """h(t) = rho_o g max(0, Z - t - h_o) + rho_g g t [Pa]."""
    return hydrostatic_pressure(z_shoe - t, rho_o, h_o) + rho_g * G * t


def _point_load(x, t, z_shoe, rho_o, h_o, rho_g, rho_i, h_i):
    """dP at height x with the grout top at height t [Pa] (base below x)."""
    below = _grout_head(t, z_shoe, rho_o, h_o, rho_g) - rho_g * G * x \
        - _inside_pressure(x, z_shoe, rho_i, h_i)
    return np.where(x >= t, _mud_load(x, z_shoe, rho_o, h_o, rho_i, h_i), below)


def grout_differential_pressure(height, string_length, hole: Hole, grout_density,
                                top_height, inside_density, inside_level=0.0):
    """Collapse load ``dP = P_ann - P_in`` at heights above the shoe.

    .. math::

        dP(x) = P_{ann}(Z - x) - \\rho_i g \\max(0, Z - x - h_i)

    with ``P_ann`` from :func:`annulus_pressure_with_grout` and the grout
    top at depth ``T = Z - t``.

    Parameters
    ----------
    height : float or array_like
        Height of the point above the shoe ``x`` [m], 0 <= x <= Z.
    string_length : float
        Shoe depth ``Z`` [m] (the landed string's length).
    hole : Hole
        Hole fluid density [kg/m^3] and level [m] above the grout.
    grout_density : float
        Grout density [kg/m^3].
    top_height : float
        Height of the grout top above the shoe ``t`` [m].
    inside_density : float
        Density of the fluid inside the casing [kg/m^3].
    inside_level : float, optional
        Depth of the inside fluid top ``h_i`` [m] (0 = full).

    Returns
    -------
    float or ndarray
        Collapse load [Pa] (negative where the inside pressure is larger).

    Notes
    -----
    Whole column from the shoe (no set grout below).  Source: mechanics
    reference, "Collapse" and "Grouting"; general hydrostatics.

    Examples
    --------
    At the shoe of a 100 m string, 20 m of 1900 kg/m^3 grout under water
    full outside and water full inside:
    ``g (1000 x 80 + 1900 x 20 - 1000 x 100) = 18,000 g``.

    >>> from rigplan.engine.stringmodel import Hole
    >>> p = grout_differential_pressure(0.0, 100.0, Hole(1000.0), 1900.0, 20.0, 1000.0)
    >>> round(p / 9.80665)
    18000
    """
    x = np.asarray(height, dtype=float)
    z = string_length - x
    p = annulus_pressure_with_grout(z, string_length - top_height, grout_density,
                                    hole.fluid_density, hole.fluid_level) \
        - hydrostatic_pressure(z, inside_density, inside_level)
    return float(p) if np.ndim(p) == 0 else p


# ---------------------------------------------------------------------------
# per-joint loads


def _candidate_points(lo, hi, t, z_shoe, h_o, h_i):
    """Heights where dP over [lo, hi] can be extreme (shape (..., m, 5))."""
    t = np.asarray(t, dtype=float)[..., None]
    lo_b = np.broadcast_to(lo, t.shape[:-1] + lo.shape)
    hi_b = np.broadcast_to(hi, lo_b.shape)
    return np.stack([lo_b, hi_b,
                     np.broadcast_to(np.clip(z_shoe - h_o, lo, hi), lo_b.shape),
                     np.broadcast_to(np.clip(z_shoe - h_i, lo, hi), lo_b.shape),
                     np.clip(t, lo, hi)], axis=-1)


def lift_collapse_loads(joints: JointArrays, hole: Hole, grout_density, inside_density,
                        inside_level, base_height, top_height) -> np.ndarray:
    """Largest collapse load on each joint for one grout lift [Pa].

    For the lift from ``b`` to ``t`` (heights above the shoe), each joint's
    load is the maximum of ``dP`` over its part above ``b``::

        dP(x) = h(t) - c(x)                         b <= x < t
        dP(x) = P_hole(Z - x) - P_in(Z - x)         x >= t

    (module docstring).  ``dP`` is piecewise linear in ``x``, so the maximum
    is taken over the joint's ends, the grout top and the two fluid levels
    where they fall inside the joint: exact for the static model.

    Parameters
    ----------
    joints : JointArrays
        String in running order (joint 1 at the shoe).
    hole : Hole
        Hole fluid above the grout: density [kg/m^3], level [m].
    grout_density : float
        Grout density [kg/m^3].
    inside_density : float
        Fluid inside the casing [kg/m^3].
    inside_level : float
        Depth of the inside fluid top [m] (0 = full).
    base_height : float
        Height above the shoe of the set grout below this lift [m]
        (0 for the first lift or the whole column).
    top_height : float
        Height above the shoe of this lift's top [m], >= base_height.

    Returns
    -------
    ndarray
        Collapse load per joint [Pa]; 0 for joints wholly encased in set
        grout below the base (supported, not loaded).

    Notes
    -----
    Source: string mechanics (ADE 1986) ("Grouting", "Hydrostatics"); lifts on set
    grout, common practice, no source.
    """
    bottom, top, z_shoe = _string_heights(joints)
    rho_o, h_o = _check_hole(hole)
    rho_g, rho_i, h_i, _ = _check_fluids(grout_density, inside_density, inside_level, 1.0)
    b = _check_height("grout.base_height", base_height, z_shoe, "a lift base height")
    t = _check_height("grout.height", top_height, z_shoe, "a grout top height")
    if t < b:
        raise InputError("grout.height", f"expected a grout top at or above the lift base "
                                         f"({b:.3f} m above the shoe), got {t!r} m")
    return _lift_loads(bottom, top, z_shoe, rho_o, h_o, rho_g, rho_i, h_i, b, t)


def _lift_loads(bottom, top, z_shoe, rho_o, h_o, rho_g, rho_i, h_i, b, t):
    loaded = top > b
    lo = np.maximum(bottom, b)
    x = _candidate_points(lo, top, t, z_shoe, h_o, h_i)
    loads = _point_load(x, t, z_shoe, rho_o, h_o, rho_g, rho_i, h_i).max(axis=-1)
    return np.where(loaded, loads, 0.0)


def grout_collapse_loads(joints: JointArrays, hole: Hole, grout: GroutSpec) -> np.ndarray:
    """Largest collapse load on each joint with the full planned column [Pa].

    The whole column from the shoe to ``H = grout.height`` placed at once
    (grout top at depth ``T = Z - H``)::

        dP(z) = P_ann(z) - rho_i g max(0, z - h_i)

    maximized over each joint (see :func:`lift_collapse_loads` with base 0).
    With a uniform string, both fluids full and the grout top below the
    hole-fluid level the largest load is at the shoe:
    ``rho_o g (T - h_o) + rho_g g H - rho_i g Z``.

    Parameters
    ----------
    joints : JointArrays
        Landed string in running order.
    hole : Hole
        Hole fluid above the grout [kg/m^3, m].
    grout : GroutSpec
        Grout density [kg/m^3], column height [m], inside fluid [kg/m^3, m].

    Returns
    -------
    ndarray
        Collapse load per joint [Pa] (negative where the inside wins).

    Notes
    -----
    Source: string mechanics (ADE 1986), "Grouting" (largest at the bottom of the
    grout column); general hydrostatics.
    """
    return lift_collapse_loads(joints, hole, grout.density, grout.inside_density,
                               grout.inside_level, 0.0, grout.height)


def grout_utilization(joints: JointArrays, hole: Hole, grout: GroutSpec,
                      collapse_factor) -> np.ndarray:
    """Collapse utilization of each joint with the full planned column [-].

    ``u = DF_c dP / P_collapse``; the joint is within its rating when
    ``u <= 1``.

    Parameters
    ----------
    joints : JointArrays
        Landed string; ``collapse_rating`` [Pa], nan = unrated.
    hole : Hole
        Hole fluid above the grout [kg/m^3, m].
    grout : GroutSpec
        Grout and inside fluid [kg/m^3, m].
    collapse_factor : float
        Collapse design factor ``DF_c`` [-], > 0.

    Returns
    -------
    ndarray
        Utilization per joint [-]; nan for unrated joints (never assumed).

    Notes
    -----
    Load times design factor against rating as in string mechanics (ADE 1986)
    ("Floating and fill-up", criterion 1; "Collapse").
    """
    df = _check_number("design_factors.collapse", collapse_factor, "a collapse design factor", "[-]",
                       positive=True)
    rating = grouting_collapse_ratings(joints, grout.temperature_rise)
    return df * grout_collapse_loads(joints, hole, grout) / rating


# ---------------------------------------------------------------------------
# tallest single lift


@dataclass(frozen=True)
class SingleLift:
    """The tallest grout lift from a base, SI units.

    base_height : height above the shoe of the set grout below [m]
    height : tallest column that can be placed on it [m] (0 if none)
    top_height : ``base_height + height`` [m]
    limited_by : 0-based index of the joint that reaches its rating / DF
        first (None when the lift reaches the top of the string)
    overloaded_at_base : True when a joint above the base is already over
        its rating / DF before any grout of this lift is placed (hole fluid
        against the inside fluid alone)
    base_utilization : largest utilization above the base before the lift
        [-] (nan when no rated joint lies above the base)
    unrated : labels of joints above the base with no collapse rating,
        skipped (not checked)
    """

    base_height: float
    height: float
    top_height: float
    limited_by: int | None
    overloaded_at_base: bool
    base_utilization: float
    unrated: tuple


def _utilization_minus_one(ts, lo, hi, allow, z_shoe, rho_o, h_o, rho_g, rho_i, h_i):
    """u - 1 at every candidate point for each grout top in ``ts``:
    shape (len(ts), m, 5)."""
    x = _candidate_points(lo, hi, ts, z_shoe, h_o, h_i)
    t = np.asarray(ts, dtype=float)[:, None, None]
    return _point_load(x, t, z_shoe, rho_o, h_o, rho_g, rho_i, h_i) / allow[None, :, None] - 1.0


def max_single_lift(joints: JointArrays, hole: Hole, grout_density, inside_density,
                    inside_level, collapse_factor, base_height=0.0,
                    temperature_rise=0.0) -> SingleLift:
    """Tallest grout column that keeps every rated joint within rating / DF.

    The grout top rises from the base ``b``; every height it passes must
    keep ``DF_c dP(x; t) <= P_collapse,j`` at every point of every rated
    joint above ``b``.  For a point below the grout top,
    ``dP(x; t) = h(t) - c(x)`` (module docstring), linear in ``t`` between
    joint faces and the fluid levels, so per joint the limit solves

    .. math::

        \\rho_o g \\max(0, Z - t - h_o) + \\rho_g g t
            = \\frac{P_{collapse,j}}{DF_c} + c(x_j)

    at the joint's critical point ``x_j`` (its lowest point above the base
    when the grout is heavier than the inside fluid); the lift top is the
    least such ``t`` over the joints, found interval by interval in closed
    form, and capped at the top of the string.  Uniform string, both
    fluids full, ``b = 0``, grout heavier than the hole fluid:
    ``H = (P/DF - rho_o g Z + rho_i g Z) / ((rho_g - rho_o) g)``.  With
    grout lighter than the hole fluid the load below the grout falls as
    its top rises under the hole-fluid surface, so the state before the
    lift (``base_utilization``) is then the one to watch.

    Parameters
    ----------
    joints : JointArrays
        Landed string in running order; ``collapse_rating`` [Pa], nan =
        unrated (skipped, listed in ``unrated``).
    hole : Hole
        Hole fluid above the grout [kg/m^3, m].
    grout_density : float
        Grout density [kg/m^3], > 0.
    inside_density : float
        Fluid inside the casing [kg/m^3].
    inside_level : float
        Depth of the inside fluid top [m] (0 = full).
    collapse_factor : float
        Collapse design factor [-], > 0.
    base_height : float, optional
        Height above the shoe of the top of grout already set [m]; the
        casing below it is encased and not loaded.
    temperature_rise : float, optional
        Heat of hydration: rise of the casing temperature [K]
        (:func:`grouting_collapse_ratings`).

    Returns
    -------
    SingleLift
        ``height`` [m] is the tallest column above ``base_height``.

    Notes
    -----
    Exact for the static model (module docstring), to rounding.  Source:
    string mechanics (ADE 1986) ("Grouting", "Hydrostatics"); lifts on set grout,
    common practice, no source; the interval search is the project's own.
    """
    bottom, top, z_shoe = _string_heights(joints)
    rho_o, h_o = _check_hole(hole)
    rho_g, rho_i, h_i, df = _check_fluids(grout_density, inside_density, inside_level,
                                          collapse_factor)
    b = _check_height("grout.base_height", base_height, z_shoe, "a lift base height")
    rating = grouting_collapse_ratings(joints, temperature_rise)
    return _max_lift(joints, bottom, top, z_shoe, rating, rho_o, h_o, rho_g, rho_i, h_i, df, b)


def _max_lift(joints, bottom, top, z_shoe, rating, rho_o, h_o, rho_g, rho_i, h_i, df, b):
    above = top > b
    unrated = tuple(joints.label[i] for i in np.flatnonzero(above & np.isnan(rating)))
    idx = np.flatnonzero(above & np.isfinite(rating))
    nan = float("nan")
    if len(idx) == 0 or b >= z_shoe:
        return SingleLift(b, z_shoe - b, z_shoe, None, False, nan, unrated)
    lo = np.maximum(bottom[idx], b)
    hi = top[idx]
    allow = rating[idx] / df
    args = (lo, hi, allow, z_shoe, rho_o, h_o, rho_g, rho_i, h_i)

    breaks = np.concatenate(([b, z_shoe], lo, hi, [z_shoe - h_o, z_shoe - h_i]))
    breaks = np.unique(breaks[(breaks >= b) & (breaks <= z_shoe)])

    g0 = _utilization_minus_one(breaks[:1], *args)[0]
    base_util = float(g0.max()) + 1.0
    if g0.max() > 0.0:
        j = int(idx[np.unravel_index(np.argmax(g0), g0.shape)[0]])
        return SingleLift(b, 0.0, b, j, True, base_util, unrated)

    block = max(2, _BLOCK_ELEMENTS // (5 * len(idx)))
    prev = g0
    for s in range(1, len(breaks), block):
        ts = breaks[s:s + block]
        g = _utilization_minus_one(ts, *args)
        over = np.flatnonzero(g.reshape(len(ts), -1).max(axis=1) > 0.0)
        if len(over) == 0:
            prev = g[-1]
            continue
        k = int(over[0])
        g_lo = prev if k == 0 else g[k - 1]
        g_hi = g[k]
        t_lo, t_hi = breaks[s + k - 1], breaks[s + k]
        # Each candidate is linear in t on [t_lo, t_hi]: u - 1 = g_lo + (g_hi - g_lo) f.
        g_lo = np.minimum(g_lo, 0.0)
        rising = g_hi > 0.0
        frac = np.full(g_hi.shape, np.inf)
        frac[rising] = -g_lo[rising] / (g_hi[rising] - g_lo[rising])
        pick = np.unravel_index(np.argmin(frac), frac.shape)
        t_max = float(min(max(t_lo + float(frac[pick]) * (t_hi - t_lo), t_lo), t_hi))
        return SingleLift(b, t_max - b, t_max, int(idx[pick[0]]), False, base_util, unrated)
    return SingleLift(b, z_shoe - b, z_shoe, None, False, base_util, unrated)


# ---------------------------------------------------------------------------
# lift plan


@dataclass(frozen=True)
class GroutPlan:
    """Collapse check of the planned grout column and its lifts, SI units.

    Index j-1 of the arrays is joint j.

    planned_height : planned grout column above the shoe ``H`` [m]
    grout_top_depth : depth of the planned grout top ``T = Z - H`` [m]
    collapse_load : largest collapse load on each joint with the whole
        column placed at once [Pa]
    utilization : ``DF_c x collapse_load / rating`` per joint [-] (nan =
        unrated)
    full_column_ok : every rated joint within rating / DF with the whole
        column in one lift (final state, tolerance ``UTILIZATION_TOLERANCE``)
    max_single_lift : tallest first lift from the shoe [m] (checks every
        height the grout top passes)
    lifts : ``(base_height, top_height)`` of each lift, heights above the
        shoe [m]; each is the tallest allowed on the set grout below it,
        the last ends at ``planned_height``
    lift_limited_by : label of the joint that sets each lift's height, ""
        where the lift reaches the planned height or the string top
    n_lifts : number of lifts
    feasible : the lifts reach the planned height
    reason : why not (a :class:`Finding` with a :class:`GroutCode`), None
        when feasible
    unrated : labels of joints with no collapse rating (not checked)
    warnings : findings for the driller (not errors)
    """

    planned_height: float
    grout_top_depth: float
    collapse_load: np.ndarray
    utilization: np.ndarray
    full_column_ok: bool
    max_single_lift: float
    lifts: tuple
    lift_limited_by: tuple
    n_lifts: int
    feasible: bool
    reason: Finding | None
    unrated: tuple
    warnings: tuple


def plan_grout_lifts(joints: JointArrays, hole: Hole, grout: GroutSpec,
                     collapse_factor) -> GroutPlan:
    """Check the planned grout column and lay it out in the fewest lifts.

    Full column: :func:`grout_collapse_loads` and :func:`grout_utilization`.
    Lifts: starting at the shoe, each lift is the tallest allowed
    (:func:`max_single_lift`) on the set grout below, capped at the planned
    height ``H``::

        t_k = min(H, t_{k-1} + max_single_lift(base = t_{k-1})),  t_0 = 0

    Taking the tallest lift each time also gives the fewest lifts: a
    higher base never loads the casing above it more than a lower one.  If
    a lift of zero height results, no grout can be placed there: the plan
    is not feasible and ``reason`` says which joint stops it.

    Parameters
    ----------
    joints : JointArrays
        Landed string in running order; ``collapse_rating`` [Pa].
    hole : Hole
        Hole fluid above the grout [kg/m^3, m].
    grout : GroutSpec
        Grout density [kg/m^3], planned column ``H`` [m] (0 <= H <= Z), the
        inside fluid [kg/m^3] and its level [m].
    collapse_factor : float
        Collapse design factor [-], > 0.

    Returns
    -------
    GroutPlan

    Notes
    -----
    Static model of the module docstring.  Sources: string mechanics (ADE 1986)
    ("Grouting"); lifts on set grout, common practice, no source.
    """
    bottom, top, z_shoe = _string_heights(joints)
    rho_o, h_o = _check_hole(hole)
    rho_g, rho_i, h_i, df = _check_fluids(grout.density, grout.inside_density,
                                          grout.inside_level, collapse_factor)
    h_plan = _check_height("grout.height", grout.height, z_shoe, "a grout column height")
    rating = grouting_collapse_ratings(joints, grout.temperature_rise)

    loads = _lift_loads(bottom, top, z_shoe, rho_o, h_o, rho_g, rho_i, h_i, 0.0, h_plan)
    util = df * loads / rating
    rated = np.isfinite(rating)
    full_ok = bool(np.all(util[rated] <= 1.0 + UTILIZATION_TOLERANCE))
    unrated = tuple(joints.label[i] for i in np.flatnonzero(np.isnan(rating)))

    warnings = []
    if rho_g < rho_o:
        warnings.append(Finding(GroutCode.LIGHTER_THAN_HOLE_FLUID, Severity.WARNING,
                                quantities={"grout_density": (rho_g, Kind.DENSITY),
                                            "hole_fluid_density": (rho_o, Kind.DENSITY)}))
    if df < 1.0:
        warnings.append(Finding(GroutCode.DESIGN_FACTOR_BELOW_1, Severity.WARNING,
                                quantities={"design_factor": (df, Kind.RATIO)}))
    if unrated:
        warnings.append(Finding(GroutCode.UNRATED_JOINTS, Severity.WARNING,
                                context={"labels": ", ".join(unrated)}))
    # Grout around a screen seals the intake: the annular seal belongs above
    # the screens and their filter pack (common practice, no source).
    from rigplan.engine.rating import PERFORATED_KINDS
    tol = _ZERO_LIFT * z_shoe
    covered = [i for i, k in enumerate(joints.kind)
               if k in PERFORATED_KINDS and bottom[i] < h_plan - tol]
    if covered:
        warnings.append(Finding(
            GroutCode.OVER_SCREENS, Severity.WARNING, joint=covered[0] + 1,
            label=joints.label[covered[0]],
            context={"labels": ", ".join(joints.label[i] for i in covered)},
            quantities={"grout_top": (z_shoe - h_plan, Kind.DEPTH),
                        "screen_top": (z_shoe - float(max(top[i] for i in covered)), Kind.DEPTH),
                        "screen_bottom": (z_shoe - float(min(bottom[i] for i in covered)),
                                          Kind.DEPTH)}))

    lifts, limited, reason = [], [], None
    eps = _ZERO_LIFT * z_shoe
    first = None
    b = 0.0
    while b < h_plan - eps:
        if len(lifts) >= _MAX_LIFTS:
            reason = Finding(GroutCode.TOO_MANY_LIFTS, Severity.REASON,
                             quantities={"height": (h_plan, Kind.LENGTH)},
                             context={"lifts": _MAX_LIFTS})
            break
        lift = _max_lift(joints, bottom, top, z_shoe, rating, rho_o, h_o, rho_g, rho_i, h_i, df, b)
        if first is None:
            first = lift.height
        if lift.height <= eps:
            j = int(lift.limited_by)
            base = {"base": (float(b), Kind.LENGTH)}
            if lift.overloaded_at_base:
                reason = Finding(GroutCode.OVERLOADED_BEFORE_GROUT, Severity.REASON,
                                 joint=j + 1, label=joints.label[j],
                                 quantities={**base, "utilization": (lift.base_utilization,
                                                                     Kind.RATIO)})
            else:
                reason = Finding(GroutCode.NO_LIFT_POSSIBLE, Severity.REASON,
                                 joint=j + 1, label=joints.label[j], quantities=base)
            break
        t = float(min(h_plan, lift.top_height))
        lifts.append((float(b), t))
        capped = t >= h_plan or lift.limited_by is None
        limited.append("" if capped else joints.label[lift.limited_by])
        b = t
    if first is None:
        first = _max_lift(joints, bottom, top, z_shoe, rating, rho_o, h_o, rho_g, rho_i, h_i,
                          df, 0.0).height
    feasible = reason is None
    if not feasible:
        warnings.append(Finding(GroutCode.NOT_FEASIBLE, Severity.WARNING, cause=reason))

    return GroutPlan(
        planned_height=h_plan, grout_top_depth=z_shoe - h_plan, collapse_load=loads,
        utilization=util, full_column_ok=full_ok, max_single_lift=float(first),
        lifts=tuple(lifts), lift_limited_by=tuple(limited), n_lifts=len(lifts),
        feasible=feasible, reason=reason, unrated=unrated, warnings=tuple(warnings),
    )
