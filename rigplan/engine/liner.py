"""A liner in an existing well: the old casing from a caliper log, the fit, the old casing's collapse.

Before a liner is run into an old well, the old casing is logged with an
X-Y (two-arm pair) or multi-arm caliper.  From the inside diameters read at
each depth this module gives the casing's shape (mean and smallest inside
diameter, ellipticity), its collapse rating at that shape, the zones where
it is worse than assumed, whether the liner passes with the clearance the
plan asks for, and the old casing's collapse margin under what is left
between it and the liner.

Everything is SI: depths [m] downward from the rig floor, diameters [m],
pressures [Pa].  Reading the LAS file is the files layer's job
(``rigplan.files.caliperlog``).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from rigplan.engine.collapse import timoshenko
from rigplan.engine.hydrostatics import hydrostatic_pressure


@dataclass(frozen=True)
class CasingShape:
    """The old casing's inside shape along the log.

    depth : log depths [m], increasing
    mean_id : mean inside diameter [m]
    min_id : smallest inside diameter read at that depth [m]
    max_id : largest inside diameter read at that depth [m]
    ellipticity : ``(Dmax - Dmin) / (Dmax + Dmin)`` of the inside [-]
    """

    depth: np.ndarray
    mean_id: np.ndarray
    min_id: np.ndarray
    max_id: np.ndarray
    ellipticity: np.ndarray


def shape_from_diameters(depth, diameters) -> CasingShape:
    """Shape of a casing from the inside diameters read across it at each depth.

    .. math:: e = \\frac{D_{max} - D_{min}}{D_{max} + D_{min}}, \\quad
              \\bar D = \\frac{1}{n} \\sum_k D_k

    Parameters
    ----------
    depth : array_like, shape (m,)
        Log depths [m], strictly increasing.
    diameters : array_like, shape (m, k)
        ``k >= 2`` inside diameters [m] read across the pipe at each depth
        (an X-Y caliper gives two; a multi-arm tool gives one per pair of
        opposite arms).  ``nan`` readings are ignored; a depth with fewer
        than two readings is dropped by the caller.

    Notes
    -----
    Ellipticity as Timoshenko and Gere define the initial ovality ``w0/R``
    (*Theory of Elastic Stability*, 2nd ed., 1961, ch. 7); the same
    definition as :func:`rigplan.engine.collapse.ellipticity_from_diameters`.
    A uniform wall is assumed, so the ovality of the bore is that of the
    pipe (valid while the wall is thin beside the diameter, D/t above ~10).

    Examples
    --------
    >>> s = shape_from_diameters([10.0], [[0.2050, 0.2010]])
    >>> round(float(s.ellipticity[0]), 5), round(float(s.min_id[0]), 4)
    (0.00985, 0.201)
    """
    z = np.asarray(depth, dtype=float)
    d = np.asarray(diameters, dtype=float)
    if d.ndim != 2 or d.shape[0] != z.shape[0] or d.shape[1] < 2:
        raise ValueError("diameters must be a (depths x readings) array with two or more readings")
    with np.errstate(invalid="ignore"):
        dmax = np.nanmax(d, axis=1)
        dmin = np.nanmin(d, axis=1)
        mean = np.nanmean(d, axis=1)
        e = (dmax - dmin) / (dmax + dmin)
    return CasingShape(depth=z, mean_id=mean, min_id=dmin, max_id=dmax, ellipticity=e)


def diameters_from_arms(radii) -> np.ndarray:
    """Diameters across the pipe from a multi-arm caliper's radii [m].

    An even number ``n`` of arms spaced evenly around the tool: arm ``k``
    and arm ``k + n/2`` read opposite walls, so the diameter across is the
    sum of their radii (tool centred: the sum does not depend on where the
    tool sits).

    >>> diameters_from_arms([[0.1, 0.1, 0.102, 0.1]]).tolist()
    [[0.202, 0.2]]
    """
    r = np.asarray(radii, dtype=float)
    if r.ndim != 2 or r.shape[1] < 4 or r.shape[1] % 2:
        raise ValueError("a multi-arm caliper needs an even number of arms, four or more")
    half = r.shape[1] // 2
    return r[:, :half] + r[:, half:]


@dataclass(frozen=True)
class OldCasing:
    """The existing casing the liner goes into, SI.

    od, wall : nominal outside diameter and specified wall [m]
    rating_wall : the wall its ratings use [m] (minimum wall unless measured)
    yield_strength, youngs_modulus, poisson : its material [Pa, Pa, -]
    top, bottom : depths of its top and bottom [m]
    ellipticity : assumed ellipticity where the log gives none [-]
    """

    od: float
    wall: float
    rating_wall: float
    yield_strength: float
    youngs_modulus: float
    poisson: float
    top: float
    bottom: float
    ellipticity: float = 0.01


def collapse_rating_along(casing: OldCasing, ellipticity) -> np.ndarray:
    """The old casing's collapse rating at each logged ellipticity [Pa].

    Timoshenko's first-yield collapse of an oval ring
    (:func:`rigplan.engine.collapse.timoshenko`; Timoshenko and Gere, 1961,
    ch. 7) on the rating wall, with the ellipticity read at each depth;
    where the log reads none, the assumed ellipticity.
    """
    e = np.asarray(ellipticity, dtype=float)
    e = np.where(np.isfinite(e), e, casing.ellipticity)
    return np.asarray(timoshenko(casing.od, casing.rating_wall, casing.yield_strength,
                                 np.clip(e, 0.0, 0.99), casing.youngs_modulus, casing.poisson),
                      dtype=float)


@dataclass(frozen=True)
class Zone:
    """A run of log depths where the casing is worse than assumed.

    top, bottom : depths [m]; max_ellipticity [-]; min_collapse_rating [Pa];
    min_id : the smallest inside diameter in the zone [m]
    """

    top: float
    bottom: float
    max_ellipticity: float
    min_collapse_rating: float
    min_id: float


def weak_zones(shape: CasingShape, rating, assumed_ellipticity: float,
               nominal_id: float, dent_fraction: float = 0.02) -> list[Zone]:
    """Contiguous depth ranges where the casing is oval or dented beyond the plan.

    A depth is weak when its ellipticity exceeds the plan's assumption or
    its smallest inside diameter is more than ``dent_fraction`` under the
    nominal inside diameter (a dent reads as a short, sharp loss of bore).
    The 2 % default is common practice, no source.
    """
    bad = (shape.ellipticity > assumed_ellipticity) | \
        (shape.min_id < nominal_id * (1.0 - dent_fraction))
    bad &= np.isfinite(shape.ellipticity)
    zones = []
    if not np.any(bad):
        return zones
    edges = np.flatnonzero(np.diff(np.concatenate(([0], bad.astype(np.int8), [0]))))
    for a, b in zip(edges[0::2], edges[1::2]):
        sl = slice(a, b)
        zones.append(Zone(top=float(shape.depth[a]), bottom=float(shape.depth[b - 1]),
                          max_ellipticity=float(np.max(shape.ellipticity[sl])),
                          min_collapse_rating=float(np.min(rating[sl])),
                          min_id=float(np.min(shape.min_id[sl]))))
    return zones


@dataclass(frozen=True)
class Fit:
    """Whether the liner passes the old casing, depth by depth.

    passing_od : the largest liner OD (body, couplings, centralizers) that
        must pass each log depth on the way down [m]
    clearance : smallest inside diameter less passing OD at each depth [m]
    fits : True when the clearance is at least the required one everywhere
    tightest_depth, tightest_min_id, tightest_clearance : where the
        clearance is least [m]
    refused_depth : the shallowest depth where the clearance is less than
        required (the liner stops there), nan when it fits
    required : the clearance asked for [m]
    """

    passing_od: np.ndarray
    clearance: np.ndarray
    fits: bool
    tightest_depth: float
    tightest_min_id: float
    tightest_clearance: float
    refused_depth: float
    required: float


def liner_passing_od(depth, joint_bottom, joint_od) -> np.ndarray:
    """The largest liner OD that has to pass each depth [m].

    A joint that lands with its bottom at ``b`` has passed every depth
    above ``b`` on the way down, so the OD that must pass depth ``z`` is the
    largest OD of the joints landing with their bottom below ``z``.  With
    joint 1 (the deepest) first, that is a running maximum from the bottom,
    looked up by depth in ``O((m + n) log n)``.

    >>> liner_passing_od([5.0, 15.0, 25.0], [20.0, 10.0], [0.17, 0.18]).tolist()
    [0.18, 0.17, 0.0]
    """
    z = np.asarray(depth, dtype=float)
    bottom = np.asarray(joint_bottom, dtype=float)      # joint 1 first: decreasing
    od = np.asarray(joint_od, dtype=float)
    running = np.maximum.accumulate(od)                 # largest OD of joints 1..k
    # number of joints whose bottom lies strictly below z
    k = np.searchsorted(-bottom, -z, side="left")
    return np.where(k > 0, running[np.maximum(k - 1, 0)], 0.0)


def liner_fit(shape: CasingShape, joint_bottom, joint_od, required_clearance: float) -> Fit:
    """The liner's fit against the logged bore (see :class:`Fit`).

    Clearance is diametral: smallest inside diameter read at a depth less
    the largest liner OD that must pass it.  Centralizers are taken as rigid
    (their full OD must pass), which errs on the safe side for bow-spring
    centralizers.
    """
    passing = liner_passing_od(shape.depth, joint_bottom, joint_od)
    clearance = np.where(passing > 0, shape.min_id - passing, np.inf)
    finite = np.isfinite(clearance)
    if not np.any(finite):
        nan = float("nan")
        return Fit(passing, clearance, True, nan, nan, nan, nan, required_clearance)
    i = int(np.argmin(np.where(finite, clearance, np.inf)))
    short = np.flatnonzero(finite & (clearance < required_clearance))
    return Fit(passing_od=passing, clearance=clearance, fits=short.size == 0,
               tightest_depth=float(shape.depth[i]), tightest_min_id=float(shape.min_id[i]),
               tightest_clearance=float(clearance[i]),
               refused_depth=float(shape.depth[short[0]]) if short.size else float("nan"),
               required=required_clearance)


@dataclass(frozen=True)
class OldCasingCollapse:
    """The old casing's collapse check with the liner in place.

    load : external less internal pressure at each log depth [Pa]
    utilization : design factor x load / rating at each depth [-]
    least_margin : 1 - the largest utilization [-]
    worst_depth : where it is reached [m]
    """

    load: np.ndarray
    utilization: np.ndarray
    least_margin: float
    worst_depth: float


def old_casing_collapse(shape: CasingShape, rating, outside_density: float,
                        outside_level: float, inside_density: float, inside_level: float,
                        design_factor: float, grout_density: float = float("nan"),
                        grout_top: float = float("nan")) -> OldCasingCollapse:
    """Collapse of the old casing under what is outside it against what is left inside.

    .. math:: p_c(z) = \\rho_o g (z - z_o)^+ - p_i(z), \\quad
              p_i(z) = \\rho_i g (z - z_i)^+ \\text{ above the grout top}, \\;
              p_i(z_g) + \\rho_g g (z - z_g) \\text{ below it}

    Outside: ground water (or the old annulus fluid) to its level.  Inside:
    the annulus between the old casing and the liner, fluid to its level
    over a grout column from ``grout_top`` down (none when ``grout_top`` is
    nan).  Hydrostatics as :func:`rigplan.engine.hydrostatics.hydrostatic_pressure`.
    Utilization ``DF x p_c / rating`` on the rating by depth; loads under
    zero do not collapse.
    """
    z = shape.depth
    p_out = hydrostatic_pressure(z, outside_density, outside_level)
    p_in = hydrostatic_pressure(np.minimum(z, grout_top) if np.isfinite(grout_top) else z,
                                inside_density, inside_level)
    if np.isfinite(grout_top) and np.isfinite(grout_density):
        p_in = p_in + hydrostatic_pressure(z, grout_density, grout_top)
    load = np.asarray(p_out - p_in, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        util = np.where(load > 0, design_factor * load / np.asarray(rating, float), 0.0)
    i = int(np.nanargmax(util)) if np.any(np.isfinite(util)) else 0
    return OldCasingCollapse(load=load, utilization=util,
                             least_margin=float(1.0 - util[i]) if util.size else float("nan"),
                             worst_depth=float(z[i]) if z.size else float("nan"))


def liner_ods(kind, od, connection, coupling_od=float("nan"), centralizer_od=float("nan"),
              centralizer_every: int = 0) -> np.ndarray:
    """The largest OD of each liner joint as it passes the old casing [m].

    The body OD; the coupling OD on joints with a coupled connection; the
    centralizer OD on every ``centralizer_every``-th joint from the bottom
    (joint 1 first).  Joint 1 first, as everywhere in the engine.
    """
    out = np.asarray(od, dtype=float).copy()
    if np.isfinite(coupling_od):
        coupled = np.array([c == "threaded_coupled" for c in connection], dtype=bool)
        out[coupled] = np.maximum(out[coupled], coupling_od)
    if centralizer_every and np.isfinite(centralizer_od):
        out[::centralizer_every] = np.maximum(out[::centralizer_every], centralizer_od)
    return out


@dataclass(frozen=True)
class LinerAssessment:
    """The old casing as logged and the liner's fit and collapse checks.

    shape : the logged shape within the old casing; rating : its collapse
    rating at each log depth [Pa]; zones : weak zones; fit : :class:`Fit`;
    old_collapse : :class:`OldCasingCollapse`
    """

    shape: CasingShape
    rating: np.ndarray
    zones: list
    fit: Fit
    old_collapse: OldCasingCollapse


def assess_liner(shape: CasingShape, casing: OldCasing, joint_bottom, joint_od,
                 required_clearance: float, collapse_design_factor: float,
                 outside_density: float, outside_level: float,
                 inside_density: float, inside_level: float,
                 grout_density: float = float("nan"),
                 grout_top: float = float("nan")) -> LinerAssessment:
    """All of a liner job's checks against the old casing, on the log's depths.

    The log is cut to the old casing's top and bottom; see
    :func:`collapse_rating_along`, :func:`weak_zones`, :func:`liner_fit` and
    :func:`old_casing_collapse` for each part.
    """
    inside = (shape.depth >= casing.top) & (shape.depth <= casing.bottom)
    if not np.any(inside):
        raise ValueError("the caliper log has no depth within the old casing")
    s = CasingShape(*(np.asarray(a)[inside] for a in (shape.depth, shape.mean_id, shape.min_id,
                                                      shape.max_id, shape.ellipticity)))
    rating = collapse_rating_along(casing, s.ellipticity)
    zones = weak_zones(s, rating, casing.ellipticity, casing.od - 2.0 * casing.wall)
    fit = liner_fit(s, joint_bottom, joint_od, required_clearance)
    old = old_casing_collapse(s, rating, outside_density, outside_level, inside_density,
                              inside_level, collapse_design_factor, grout_density, grout_top)
    return LinerAssessment(shape=s, rating=rating, zones=zones, fit=fit, old_collapse=old)
