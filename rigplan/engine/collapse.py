"""Collapse resistance of casing under external pressure, in SI units.

Methods, each named for its source:

* :func:`timoshenko` -- yield of the most stressed fibre of an initially
  oval tube (Timoshenko and Gere); the usual method for water-well steel.
* :func:`api_5c3` -- the four empirical regimes of API TR 5C3 (ISO 10400)
  for API casing grades, with :func:`api_5c3_regime` and
  :func:`api_5c3_constants`; :func:`axial_reduced_yield` gives the yield
  strength to use under axial stress.
* :func:`thermoplastic_sdr` -- elastic ring buckling by dimension ratio for
  thermoplastic casing (ASTM F480).

All take SI floats or numpy arrays (broadcast together) and return a Python
``float`` for scalar input or an ``ndarray``.  Bad input raises
``ValueError`` with a one-line message; ``nan`` propagates (unrated).

Screens, perforated and slotted pipe have no formula here: their collapse
rating is the maker's figure, entered by the user.
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np

from rigplan.engine.tubulars import _as_result, _at, _check_fraction, _check_positive, _first_bad, validate_tube

__all__ = [
    "ellipticity_from_diameters",
    "elastic_ring_collapse",
    "timoshenko",
    "thermoplastic_sdr",
    "Api5c3Constants",
    "api_5c3_constants",
    "api_5c3",
    "api_5c3_regime",
    "axial_reduced_yield",
]

#: Pascal per psi (NIST SP 811: 1 lbf/in^2 = 6.894757 kPa, from lbf and inch).
_PSI = 6894.757293168361

#: Young's modulus of steel, 30,000,000 psi [Pa] (common practice, no source).
STEEL_YOUNGS_MODULUS = 2.0684e11

#: Yield-strength range [Pa] over which the API TR 5C3 regime breaks stay in
#: order (yield < plastic < transition < elastic): 20,000 to 200,000 psi.
API_5C3_YIELD_RANGE = (20000.0 * _PSI, 200000.0 * _PSI)

#: Elastic-collapse constant of API TR 5C3 [psi].
_API_ELASTIC = 46.95e6


def _check_poisson(poisson):
    arr = np.asarray(poisson, dtype=float)
    bad = (arr < 0) | (arr >= 0.5)
    if np.any(bad):
        index, (v,) = _first_bad(bad, arr)
        raise ValueError(f"poisson must satisfy 0 <= poisson < 0.5 [-]; got {v:g}{_at(index)}")
    return arr


def ellipticity_from_diameters(dmax, dmin):
    """Ellipticity (out-of-roundness) from the largest and smallest OD.

    .. math:: e = \\frac{D_{max} - D_{min}}{D_{max} + D_{min}}

    Parameters
    ----------
    dmax : float or array_like
        Largest measured outside diameter [m], > 0.
    dmin : float or array_like
        Smallest measured outside diameter [m], 0 < dmin <= dmax.

    Returns
    -------
    float or ndarray
        Ellipticity [-], 0 <= e < 1; it equals the initial radial deviation
        over the mean radius used by :func:`timoshenko`.

    Notes
    -----
    Definition used by Timoshenko and Gere, *Theory of Elastic Stability*,
    2nd ed. (1961), ch. 7, for the initial ovality ``w0 / R``: an oval with
    semi-axes ``R + w0`` and ``R - w0`` has ``Dmax - Dmin = 4 w0`` and
    ``Dmax + Dmin = 4 R``.  The ovality ``(Dmax - Dmin) / Dmean`` quoted in
    pipe specifications is twice this figure; give :func:`timoshenko` this
    one.

    Examples
    --------
    >>> round(ellipticity_from_diameters(0.4100, 0.4019), 4)
    0.01
    """
    dmax = _check_positive("dmax", dmax, "m")
    dmin = _check_positive("dmin", dmin, "m")
    bad = dmin > dmax
    if np.any(bad):
        index, (hi, lo) = _first_bad(bad, dmax, dmin)
        raise ValueError(
            f"dmin must not exceed dmax; got dmax {hi:g} m and dmin {lo:g} m{_at(index)}"
        )
    return _as_result((dmax - dmin) / (dmax + dmin))


def elastic_ring_collapse(od, wall, youngs_modulus=STEEL_YOUNGS_MODULUS, poisson=0.3):
    """Elastic buckling pressure of a long, perfectly round tube.

    .. math:: p_{cr} = \\frac{2 E}{1 - \\nu^2} \\frac{1}{r^3}, \\quad r = D/t - 1

    Parameters
    ----------
    od : float or array_like
        Outside diameter [m].
    wall : float or array_like
        Wall thickness [m], 0 < wall < od/2.
    youngs_modulus : float or array_like, optional
        Young's modulus [Pa]; default 30e6 psi (steel).
    poisson : float or array_like, optional
        Poisson's ratio [-], 0 <= nu < 0.5; default 0.3 (steel).

    Returns
    -------
    float or ndarray
        Critical external pressure [Pa].

    Notes
    -----
    Timoshenko and Gere, *Theory of Elastic Stability*, 2nd ed. (1961),
    ch. 7 (long ring under uniform pressure, plane strain), with ``r`` the
    mean diameter over the wall.  Thin-wall theory: meaningful where the
    tube collapses elastically, D/t above about 25 for mild steel.

    Examples
    --------
    16 in x 0.375 in steel, E = 30e6 psi, nu = 0.3: 911 psi (common practice,
    no source).

    >>> psi, inch = 6894.757293168361, 0.0254
    >>> round(elastic_ring_collapse(16 * inch, 0.375 * inch, 30e6 * psi, 0.3) / psi)
    911
    """
    od, wall = validate_tube(od, wall)
    e_mod = _check_positive("youngs_modulus", youngs_modulus, "Pa")
    nu = _check_poisson(poisson)
    r = od / wall - 1.0
    return _as_result(2.0 * e_mod / (1.0 - nu**2) / r**3)


def timoshenko(od, wall, yield_strength, ellipticity,
               youngs_modulus=STEEL_YOUNGS_MODULUS, poisson=0.3):
    """Collapse pressure of an oval tube by first yield (Timoshenko).

    The pressure at which the most stressed fibre of a tube with initial
    ellipticity ``e`` reaches yield is the smaller root of

    .. math::

        p^2 - \\left[\\frac{2 S_y}{r} + (1 + 3 e r) p_{cr}\\right] p
            + \\frac{2 S_y p_{cr}}{r} = 0,

        p_{cr} = \\frac{2 E}{(1 - \\nu^2) r^3}, \\quad r = \\frac{D}{t} - 1

    Parameters
    ----------
    od : float or array_like
        Outside diameter [m].
    wall : float or array_like
        Wall thickness [m], 0 < wall < od/2 (the minimum wall for ratings).
    yield_strength : float or array_like
        Specified minimum yield strength [Pa], > 0.
    ellipticity : float or array_like
        Initial ellipticity ``(Dmax - Dmin)/(Dmax + Dmin)`` [-], 0 <= e < 1
        (see :func:`ellipticity_from_diameters`).
    youngs_modulus : float or array_like, optional
        Young's modulus [Pa]; default 30e6 psi (steel).
    poisson : float or array_like, optional
        Poisson's ratio [-], 0 <= nu < 0.5; default 0.3.

    Returns
    -------
    float or ndarray
        Collapse pressure [Pa].

    Notes
    -----
    Source: S. Timoshenko and J. Gere, *Theory of Elastic Stability*, 2nd ed.
    (1961), ch. 7, ring with initial ellipticity.  For ``e = 0`` the result is
    the smaller of the hoop-yield pressure ``2 S_y / r`` and ``p_cr``.  The
    quadratic always has real roots for ``e >= 0``; the smaller one is taken
    in the cancellation-free form ``2 c / (b + sqrt(b^2 - 4 c))``.

    Validity: thin-ring theory, D/t above about 10; first yield is a lower
    bound on the collapse of thick or very oval pipe.  Water-well practice
    commonly assumes 1 % ellipticity when none is measured (common practice,
    no source).

    Examples
    --------
    16 in x 0.375 in, Sy = 35,000 psi, 1 % ellipticity: about 470 psi
    (common practice, no source).

    >>> psi, inch = 6894.757293168361, 0.0254
    >>> round(timoshenko(16 * inch, 0.375 * inch, 35000 * psi, 0.01, 30e6 * psi) / psi)
    470
    """
    od, wall = validate_tube(od, wall)
    sy = _check_positive("yield_strength", yield_strength, "Pa")
    e = _check_fraction("ellipticity", ellipticity)
    e_mod = _check_positive("youngs_modulus", youngs_modulus, "Pa")
    nu = _check_poisson(poisson)
    r = od / wall - 1.0
    p_cr = 2.0 * e_mod / (1.0 - nu**2) / r**3
    p_y = 2.0 * sy / r
    b = p_y + (1.0 + 3.0 * e * r) * p_cr
    c = p_y * p_cr
    disc = np.maximum(b * b - 4.0 * c, 0.0)
    return _as_result(2.0 * c / (b + np.sqrt(disc)))


def thermoplastic_sdr(sdr, youngs_modulus, poisson):
    """Elastic collapse of thermoplastic casing by dimension ratio.

    .. math:: p = \\frac{2 E}{1 - \\nu^2} \\frac{1}{(SDR - 1)^3}

    Parameters
    ----------
    sdr : float or array_like
        Dimension ratio, outside diameter over minimum wall [-], > 2.
    youngs_modulus : float or array_like
        Young's modulus of the compound [Pa] (PVC 12454: 400,000 psi).
    poisson : float or array_like
        Poisson's ratio [-], 0 <= nu < 0.5 (PVC: 0.38).

    Returns
    -------
    float or ndarray
        Hydraulic collapse pressure [Pa] (short-term, at 73 F / 23 C).

    Notes
    -----
    Elastic ring buckling (Timoshenko and Gere, *Theory of Elastic
    Stability*, 1961, ch. 7) written with ``SDR - 1`` as the mean diameter
    over wall; ASTM F480 (appendix on collapse, from memory) tabulates
    casing collapse this way with E = 400,000 psi and nu = 0.38.  A variant
    in circulation writes ``1 / [SDR (SDR - 1)^2]`` (about 5 % lower at SDR
    21); the ``(SDR - 1)^3`` form is the one a published table follows:
    the Maryland depth limits for PVC casing by SDR (COMAR 26.04.04.17,
    Table 1) fall by 7.98 from SDR 13.5 to SDR 26, as ``(SDR - 1)^3`` does
    (8.00), not the variant (7.70).  No ovality and no yield limit.  Rated at
    73.4 F / 23 C and short-term: the modulus of PVC falls with temperature
    (grout heat of hydration) and with load duration; rigplan derates the
    result by :func:`rigplan.engine.materials.temperature_factor`.  Valid
    for thin-walled casing (SDR 13.5 and above).

    Examples
    --------
    SDR 21, PVC 12454: about 117 psi.

    >>> psi = 6894.757293168361
    >>> round(thermoplastic_sdr(21.0, 400000 * psi, 0.38) / psi)
    117
    """
    ratio = np.asarray(sdr, dtype=float)
    bad = ratio <= 2.0
    if np.any(bad):
        index, (v,) = _first_bad(bad, ratio)
        raise ValueError(
            f"sdr (outside diameter over wall) must be greater than 2 [-]; got {v:g}{_at(index)}"
        )
    e_mod = _check_positive("youngs_modulus", youngs_modulus, "Pa")
    nu = _check_poisson(poisson)
    return _as_result(2.0 * e_mod / (1.0 - nu**2) / (ratio - 1.0) ** 3)


class Api5c3Constants(NamedTuple):
    """Empirical collapse constants of API TR 5C3 for one yield strength.

    A, B, F, G are dimensionless; C is a pressure [Pa] (tabulated in psi);
    dt_yp, dt_pt, dt_te are the D/t breaks between the yield/plastic,
    plastic/transition and transition/elastic regimes [-].
    """

    A: float
    B: float
    C: float
    F: float
    G: float
    dt_yp: float
    dt_pt: float
    dt_te: float


def _check_api_yield(yield_strength):
    sy = _check_positive("yield_strength", yield_strength, "Pa")
    lo, hi = API_5C3_YIELD_RANGE
    bad = (sy < lo) | (sy > hi)
    if np.any(bad):
        index, (v,) = _first_bad(bad, sy)
        raise ValueError(
            f"yield_strength {v:g} Pa ({v / _PSI / 1000:.1f} ksi) is outside the 20 to 200 ksi "
            f"range where the API TR 5C3 collapse constants hold{_at(index)}"
        )
    return sy


def _constants_psi(y):
    """A, B, C [psi], F, G and the regime breaks for yield ``y`` [psi] (arrays)."""
    a = 2.8762 + 0.10679e-5 * y + 0.21301e-10 * y**2 - 0.53132e-16 * y**3
    b = 0.026233 + 0.50609e-6 * y
    c = -465.93 + 0.030867 * y - 0.10483e-7 * y**2 + 0.36989e-13 * y**3
    q = b / a
    s = 3.0 * q / (2.0 + q)
    f = _API_ELASTIC * s**3 / (y * (s - q) * (1.0 - s) ** 2)
    g = f * b / a
    k = b + c / y
    dt_yp = (np.sqrt((a - 2.0) ** 2 + 8.0 * k) + (a - 2.0)) / (2.0 * k)
    dt_pt = y * (a - f) / (c + y * (b - g))
    dt_te = (2.0 + q) / (3.0 * q)
    return a, b, c, f, g, dt_yp, dt_pt, dt_te


def api_5c3_constants(yield_strength):
    """API TR 5C3 collapse constants A, B, C, F, G and regime breaks.

    With the yield strength ``Y`` in psi:

    .. math::

        A = 2.8762 + 0.10679 \\times 10^{-5} Y + 0.21301 \\times 10^{-10} Y^2
            - 0.53132 \\times 10^{-16} Y^3

        B = 0.026233 + 0.50609 \\times 10^{-6} Y

        C = -465.93 + 0.030867 Y - 0.10483 \\times 10^{-7} Y^2
            + 0.36989 \\times 10^{-13} Y^3

        F = \\frac{46.95 \\times 10^6 \\, [3 (B/A) / (2 + B/A)]^3}
                 {Y [3 (B/A)/(2 + B/A) - B/A] [1 - 3 (B/A)/(2 + B/A)]^2},
        \\quad G = F B / A

        (D/t)_{yp} = \\frac{\\sqrt{(A-2)^2 + 8 (B + C/Y)} + (A - 2)}{2 (B + C/Y)},
        \\quad (D/t)_{pt} = \\frac{Y (A - F)}{C + Y (B - G)},
        \\quad (D/t)_{te} = \\frac{2 + B/A}{3 B/A}

    Parameters
    ----------
    yield_strength : float or array_like
        Minimum yield strength, or the axial-reduced yield of
        :func:`axial_reduced_yield` [Pa], 20 to 200 ksi.

    Returns
    -------
    Api5c3Constants
        A, B, F, G [-], C [Pa], and the D/t breaks [-] (floats, or arrays
        for array input).

    Raises
    ------
    ValueError
        For a yield strength outside 20 to 200 ksi, where the fitted
        constants no longer give ordered regimes.

    Notes
    -----
    API TR 5C3 (ISO/TR 10400), collapse formulas for API casing; the
    bulletin's per-grade table rounds these to four figures.

    Examples
    --------
    J-55 (55,000 psi): A = 2.991, B = 0.0541, C = 1206 psi (API TR 5C3 table).

    >>> k = api_5c3_constants(55000 * 6894.757293168361)
    >>> round(k.A, 3), round(k.B, 4), round(k.C / 6894.757293168361)
    (2.991, 0.0541, 1206)
    """
    sy = _check_api_yield(yield_strength)
    values = _constants_psi(sy / _PSI)
    a, b, c, f, g, yp, pt, te = values
    return Api5c3Constants(*(_as_result(v) for v in (a, b, c * _PSI, f, g, yp, pt, te)))


_REGIMES = ("yield", "plastic", "transition", "elastic")


def _api_5c3_parts(od, wall, yield_strength):
    od, wall = validate_tube(od, wall)
    sy = _check_api_yield(yield_strength)
    y = sy / _PSI
    a, b, c, f, g, yp, pt, te = _constants_psi(y)
    x = od / wall
    p_yield = 2.0 * y * (x - 1.0) / x**2
    p_plastic = y * (a / x - b) - c
    p_transition = y * (f / x - g)
    p_elastic = _API_ELASTIC / (x * (x - 1.0) ** 2)
    conditions = [x <= yp, x <= pt, x <= te, x > te]
    return conditions, [p_yield, p_plastic, p_transition, p_elastic]


def api_5c3(od, wall, yield_strength):
    """Collapse resistance of API casing by the API TR 5C3 regimes.

    With ``x = D/t`` and ``Y`` in psi (see :func:`api_5c3_constants`):

    .. math::

        P_y = 2 Y \\frac{x - 1}{x^2} \\quad (x \\le (D/t)_{yp})

        P_p = Y \\left(\\frac{A}{x} - B\\right) - C
            \\quad ((D/t)_{yp} < x \\le (D/t)_{pt})

        P_t = Y \\left(\\frac{F}{x} - G\\right)
            \\quad ((D/t)_{pt} < x \\le (D/t)_{te})

        P_e = \\frac{46.95 \\times 10^6}{x (x - 1)^2}
            \\quad (x > (D/t)_{te})

    Parameters
    ----------
    od : float or array_like
        Outside diameter [m].
    wall : float or array_like
        Wall thickness [m], 0 < wall < od/2: the specified wall.  The
        constants were fitted to give minimum collapse values over the API
        5CT wall tolerance, so the wall is not reduced first (API TR 5C3).
    yield_strength : float or array_like
        Minimum yield strength [Pa], 20 to 200 ksi; under axial stress pass
        :func:`axial_reduced_yield` instead.

    Returns
    -------
    float or ndarray
        Collapse resistance [Pa] (not rounded; the tables round to 10 psi).

    Notes
    -----
    API TR 5C3 (ISO/TR 10400).  The constants were fitted for the API
    grades H-40 to P-110 and above; the regime breaks stay ordered for 20 to
    200 ksi, outside which ``ValueError`` is raised.  The regimes meet
    continuously at the breaks.

    Examples
    --------
    7 in 23 lb/ft J-55 (0.317 in wall): 3,270 psi, plastic (API casing
    tables, from memory, recomputed).

    >>> psi, inch = 6894.757293168361, 0.0254
    >>> round(api_5c3(7 * inch, 0.317 * inch, 55000 * psi) / psi, -1)
    3270.0
    """
    conditions, values = _api_5c3_parts(od, wall, yield_strength)
    return _as_result(np.select(conditions, values, default=np.nan) * _PSI)


def api_5c3_regime(od, wall, yield_strength):
    """Name of the API TR 5C3 collapse regime that applies.

    Parameters
    ----------
    od : float or array_like
        Outside diameter [m].
    wall : float or array_like
        Wall thickness [m], 0 < wall < od/2.
    yield_strength : float or array_like
        Minimum (or axial-reduced) yield strength [Pa], 20 to 200 ksi.

    Returns
    -------
    str or ndarray of str
        ``"yield"``, ``"plastic"``, ``"transition"`` or ``"elastic"``
        (``"unrated"`` where an input is nan).

    Notes
    -----
    Regime breaks in D/t from :func:`api_5c3_constants` (API TR 5C3).

    Examples
    --------
    16 in 65 lb/ft H-40 (0.375 in wall) collapses elastically:

    >>> psi, inch = 6894.757293168361, 0.0254
    >>> api_5c3_regime(16 * inch, 0.375 * inch, 40000 * psi)
    'elastic'
    """
    conditions, _ = _api_5c3_parts(od, wall, yield_strength)
    names = np.select(conditions, list(_REGIMES), default="unrated")
    return str(names) if names.ndim == 0 else names


def axial_reduced_yield(yield_strength, axial_stress):
    """Yield strength of axial-stress equivalent grade (API TR 5C3 Ypa).

    .. math::

        Y_{pa} = Y \\left[\\sqrt{1 - 0.75 (S_a / Y)^2} - 0.5 \\, S_a / Y\\right]

    Parameters
    ----------
    yield_strength : float or array_like
        Minimum yield strength [Pa], > 0.
    axial_stress : float or array_like
        Axial stress in the pipe body [Pa], positive in tension,
        ``|S_a| <= Y``.

    Returns
    -------
    float or ndarray
        Reduced yield strength [Pa] to use in place of ``Y`` in
        :func:`api_5c3` (and its constants).

    Notes
    -----
    API TR 5C3 (ISO/TR 10400), collapse under axial stress (Hencky-von
    Mises ellipse).  Tension lowers the collapse yield (to 0 at ``S_a = Y``);
    compression raises it slightly between 0 and ``-Y``.

    Examples
    --------
    Axial tension at half the yield strength: Ypa = 0.6514 Y.

    >>> round(axial_reduced_yield(1.0, 0.5), 4)
    0.6514
    """
    sy = _check_positive("yield_strength", yield_strength, "Pa")
    sa = np.asarray(axial_stress, dtype=float)
    ratio = sa / sy
    bad = np.abs(ratio) > 1.0
    if np.any(bad):
        index, (s, y) = _first_bad(bad, sa, sy)
        raise ValueError(
            f"axial_stress must lie between -yield_strength and +yield_strength; got {s:g} Pa "
            f"with yield {y:g} Pa{_at(index)}"
        )
    return _as_result(sy * (np.sqrt(1.0 - 0.75 * ratio**2) - 0.5 * ratio))


def api_5c3_under_axial_stress(od, wall, yield_strength, axial_stress):
    """API TR 5C3 collapse resistance under axial tension [Pa].

    The collapse formulas are evaluated with the yield of the axial-stress
    equivalent grade ``Ypa`` (:func:`axial_reduced_yield`) in place of
    ``Y``.  No credit is taken for compression (``S_a < 0`` counts as 0).
    Where ``Ypa`` falls below the range the 5C3 constants are fitted for
    (:data:`API_5C3_YIELD_RANGE`), the lesser of the yield-collapse formula
    with ``Ypa`` and the elastic formula is used: the two regimes that
    govern at low yield (the plastic and transition fits do not extend
    there).

    Parameters
    ----------
    od, wall : float or array_like
        Outside diameter and the rating wall [m].
    yield_strength : float or array_like
        Minimum yield strength [Pa].
    axial_stress : float or array_like
        Axial stress in the pipe body [Pa], positive in tension.

    Returns
    -------
    float or ndarray
        Collapse resistance [Pa].

    Notes
    -----
    API TR 5C3 (ISO/TR 10400), collapse under axial stress.  Validity: the
    API grades (yield 40 to 110 ksi); ``|S_a| <= Y``.

    Examples
    --------
    Without axial stress it is the plain API TR 5C3 rating; tension lowers
    it (7 in x 0.317 in J-55, 3,270 psi in the API tables):

    >>> psi, inch = 6894.757293168361, 0.0254
    >>> round(float(api_5c3_under_axial_stress(7 * inch, 0.317 * inch, 55e3 * psi, 0.0)) / psi, -1)
    3270.0
    >>> bool(api_5c3_under_axial_stress(7 * inch, 0.317 * inch, 55e3 * psi, 20e3 * psi)
    ...      < api_5c3(7 * inch, 0.317 * inch, 55e3 * psi))
    True
    """
    od = np.asarray(od, dtype=float)
    wall = np.asarray(wall, dtype=float)
    sy = np.asarray(yield_strength, dtype=float)
    od, wall, sy, sa = np.broadcast_arrays(od, wall, sy, np.asarray(axial_stress, dtype=float))
    sa = np.clip(sa, 0.0, sy)
    ypa = np.atleast_1d(np.asarray(axial_reduced_yield(sy, sa), dtype=float))
    od1, wall1 = np.atleast_1d(od), np.atleast_1d(wall)
    out = np.empty(ypa.shape)
    fitted = ypa >= API_5C3_YIELD_RANGE[0]
    if np.any(fitted):
        out[fitted] = api_5c3(od1[fitted], wall1[fitted], ypa[fitted])
    low = ~fitted
    if np.any(low):
        x = od1[low] / wall1[low]
        p_yield = 2.0 * ypa[low] * (x - 1.0) / x ** 2
        p_elastic = _API_ELASTIC * _PSI / (x * (x - 1.0) ** 2)
        out[low] = np.minimum(p_yield, p_elastic)
    return _as_result(out.reshape(np.shape(od)) if np.ndim(od) else out[0])
