"""Tube geometry, plain-end weight and pipe-body yield, in SI units.

Every function takes SI floats or numpy arrays (broadcast together) and
returns a Python ``float`` for scalar input or an ``ndarray`` otherwise.
Bad dimensions raise ``ValueError`` with a one-line message; the formats
layer turns these into :class:`rigplan.errors.InputError` naming the file and
row.  ``nan`` inputs are allowed and propagate (``nan`` means unrated).

Symbols: ``D`` outside diameter, ``t`` wall, ``d = D - 2 t`` bore.
"""

from __future__ import annotations

import numpy as np

__all__ = [
    "validate_tube",
    "minimum_wall",
    "steel_area",
    "outside_area",
    "bore_area",
    "linear_mass",
    "body_yield",
    "sdr",
    "plain_end_weight_a53_us",
    "plain_end_mass_a53",
]


def _as_result(value):
    """Python float for a 0-d result, the ndarray otherwise."""
    arr = np.asarray(value, dtype=float)
    return float(arr) if arr.ndim == 0 else arr


def _first_bad(mask, *arrays):
    """Values of ``arrays`` at the first True element of ``mask`` (and its index)."""
    mask = np.asarray(mask)
    if mask.ndim == 0:
        return None, [float(np.asarray(a, dtype=float)) for a in arrays]
    idx = tuple(int(i) for i in np.argwhere(mask)[0])
    shape = mask.shape
    values = [float(np.broadcast_to(np.asarray(a, dtype=float), shape)[idx]) for a in arrays]
    return (idx[0] if len(idx) == 1 else idx), values


def _at(index):
    return "" if index is None else f" (element {index})"


def _check_positive(name, value, unit):
    """Raise ValueError if any non-nan element of ``value`` is <= 0."""
    arr = np.asarray(value, dtype=float)
    bad = arr <= 0
    if np.any(bad):
        index, (v,) = _first_bad(bad, arr)
        raise ValueError(f"{name} must be greater than 0 {unit}; got {v:g} {unit}{_at(index)}")
    return arr


def _check_fraction(name, value, low_inclusive=True, high=1.0, high_inclusive=False):
    """Raise ValueError unless ``0 <= value < high`` (bounds as flagged); nan allowed."""
    arr = np.asarray(value, dtype=float)
    low_bad = arr < 0 if low_inclusive else arr <= 0
    high_bad = arr > high if high_inclusive else arr >= high
    bad = low_bad | high_bad
    if np.any(bad):
        index, (v,) = _first_bad(bad, arr)
        lo = "0 <=" if low_inclusive else "0 <"
        hi = "<=" if high_inclusive else "<"
        raise ValueError(f"{name} must satisfy {lo} {name} {hi} {high:g} [-]; got {v:g}{_at(index)}")
    return arr


def validate_tube(od, wall):
    """Check tube dimensions and return them as float arrays.

    Parameters
    ----------
    od : float or array_like
        Outside diameter [m], > 0.
    wall : float or array_like
        Wall thickness [m], 0 < wall < od/2.

    Returns
    -------
    od, wall : ndarray
        The inputs as float arrays (not broadcast).

    Raises
    ------
    ValueError
        If a diameter or wall is zero or negative, or the wall is half the
        outside diameter or more (no bore).  ``nan`` passes (unrated).

    Examples
    --------
    >>> validate_tube(0.2, 0.1)
    Traceback (most recent call last):
    ...
    ValueError: wall must be less than half the outside diameter; got wall 0.1 m with od 0.2 m
    """
    od = _check_positive("od", od, "m")
    wall = _check_positive("wall", wall, "m")
    bad = wall >= od / 2.0
    if np.any(bad):
        index, (t, d) = _first_bad(bad, wall, od)
        raise ValueError(
            f"wall must be less than half the outside diameter; got wall {t:g} m with od {d:g} m"
            f"{_at(index)}"
        )
    return od, wall


def minimum_wall(wall, under_tolerance):
    """Minimum wall allowed by a pipe standard's under-tolerance.

    .. math:: t_{min} = t (1 - u)

    Parameters
    ----------
    wall : float or array_like
        Specified (nominal) wall [m], > 0.
    under_tolerance : float or array_like
        Permitted under-run as a fraction of the specified wall [-],
        0 <= u < 1 (0.125 for ASTM A53/A53M, ASTM A312/A312M and API 5CT).

    Returns
    -------
    float or ndarray
        Minimum wall [m].

    Notes
    -----
    ASTM A53/A53M, ASTM A312/A312M and API 5CT let the wall at any point be
    12.5 % under the specified thickness; ratings for checks use this
    minimum unless a measured wall is given.

    Examples
    --------
    >>> round(minimum_wall(0.375 * 0.0254, 0.125) / 0.0254, 6)
    0.328125
    """
    wall = _check_positive("wall", wall, "m")
    u = _check_fraction("under_tolerance", under_tolerance)
    return _as_result(wall * (1.0 - u))


def steel_area(od, wall):
    """Cross-sectional area of the tube wall.

    .. math:: A_s = \\frac{\\pi}{4} (D^2 - d^2) = \\pi t (D - t)

    Parameters
    ----------
    od : float or array_like
        Outside diameter [m].
    wall : float or array_like
        Wall thickness [m], 0 < wall < od/2.

    Returns
    -------
    float or ndarray
        Steel (wall) area [m^2].

    Notes
    -----
    Exact geometry for a round tube of uniform wall.

    Examples
    --------
    7 in x 0.317 in casing has 6.6555 in^2 of steel (API TR 5C3 body
    yield 0.7854 (D^2 - d^2)):

    >>> round(steel_area(7 * 0.0254, 0.317 * 0.0254) / 0.0254**2, 4)
    6.6555
    """
    od, wall = validate_tube(od, wall)
    return _as_result(np.pi * wall * (od - wall))


def outside_area(od):
    """Area enclosed by the outside diameter.

    .. math:: A_o = \\frac{\\pi}{4} D^2

    Parameters
    ----------
    od : float or array_like
        Outside diameter [m], > 0.

    Returns
    -------
    float or ndarray
        Outside area [m^2].

    Examples
    --------
    >>> round(outside_area(1.0), 6)
    0.785398
    """
    od = _check_positive("od", od, "m")
    return _as_result(np.pi / 4.0 * od**2)


def bore_area(od, wall):
    """Area of the bore.

    .. math:: A_i = \\frac{\\pi}{4} (D - 2 t)^2

    Parameters
    ----------
    od : float or array_like
        Outside diameter [m].
    wall : float or array_like
        Wall thickness [m], 0 < wall < od/2.

    Returns
    -------
    float or ndarray
        Bore area [m^2].

    Examples
    --------
    >>> round(bore_area(1.0, 0.25), 6)
    0.19635
    """
    od, wall = validate_tube(od, wall)
    return _as_result(np.pi / 4.0 * (od - 2.0 * wall) ** 2)


def linear_mass(od, wall, density):
    """Plain-end mass per length of a round tube.

    .. math:: m' = \\rho \\frac{\\pi}{4} (D^2 - d^2), \\quad d = D - 2 t

    Parameters
    ----------
    od : float or array_like
        Outside diameter [m].
    wall : float or array_like
        Wall thickness [m], 0 < wall < od/2 (use the specified wall for weight).
    density : float or array_like
        Material density [kg/m^3], > 0.

    Returns
    -------
    float or ndarray
        Mass per length [kg/m]; multiply by g for weight per length [N/m].

    Notes
    -----
    Plain end: no couplings, upsets or weld beads.  In US units this is
    ``w [lb/ft] = k (D - t) t`` with ``k = 12 pi rho [lb/in^3]``; ASTM A53/A53M
    and API 5L use k = 10.69 (0.2836 lb/in^3, 7850 kg/m^3).

    Examples
    --------
    ASTM A53/A53M plain-end weight, 0.0246615 (D - t) t kg/m with mm, for
    168.3 mm x 7.11 mm (6 in Sch 40): 28.26 kg/m.

    >>> round(linear_mass(0.1683, 0.00711, 7850.0), 2)
    28.26
    """
    od, wall = validate_tube(od, wall)
    density = _check_positive("density", density, "kg/m^3")
    return _as_result(density * np.pi * wall * (od - wall))


def body_yield(od, wall, yield_strength):
    """Pipe-body yield strength in tension.

    .. math:: F_y = S_y \\frac{\\pi}{4} (D^2 - d^2)

    Parameters
    ----------
    od : float or array_like
        Outside diameter [m].
    wall : float or array_like
        Wall thickness [m], 0 < wall < od/2: the specified wall for API
        grades, the minimum or measured wall for other steel.
    yield_strength : float or array_like
        Specified minimum yield strength [Pa], > 0.

    Returns
    -------
    float or ndarray
        Axial load at which the body reaches yield [N].

    Notes
    -----
    API TR 5C3 (ISO 10400) pipe-body yield, ``0.7854 (D^2 - d^2) Y``; the
    API tables use the specified wall, as rigplan does for API grades; other
    steel is rated on the minimum wall its standard allows (12.5 % under).

    Examples
    --------
    7 in x 0.317 in J-55 on the specified wall: 366,000 lbf in the API tables.

    >>> psi, inch, lbf = 6894.757293168361, 0.0254, 4.4482216152605
    >>> round(body_yield(7 * inch, 0.317 * inch, 55000 * psi) / lbf, -3)
    366000.0
    """
    od, wall = validate_tube(od, wall)
    sy = _check_positive("yield_strength", yield_strength, "Pa")
    return _as_result(sy * np.pi * wall * (od - wall))


def sdr(od, wall):
    """Standard dimension ratio, outside diameter over wall.

    .. math:: SDR = D / t

    Parameters
    ----------
    od : float or array_like
        Outside diameter [m].
    wall : float or array_like
        Wall thickness [m], 0 < wall < od/2.

    Returns
    -------
    float or ndarray
        Dimension ratio [-], > 2.

    Notes
    -----
    ASTM F480 names thermoplastic casing by SDR on the minimum wall.

    Examples
    --------
    >>> sdr(0.1683, 0.1683 / 21)
    21.0
    """
    od, wall = validate_tube(od, wall)
    return _as_result(od / wall)


def plain_end_weight_a53_us(od_in, wall_in):
    """ASTM A53/A53M and API 5L plain-end weight in US customary units.

    .. math:: w = 10.69 (D - t) t

    Parameters
    ----------
    od_in : float or array_like
        Outside diameter [in].
    wall_in : float or array_like
        Specified wall [in].

    Returns
    -------
    float or ndarray
        Plain-end weight [lb/ft].

    Notes
    -----
    Not SI: kept for checking against pipe tables printed in US units.  The
    constant 10.69 corresponds to steel of 0.2836 lb/in^3 (7850 kg/m^3).

    Examples
    --------
    6.625 in x 0.280 in (6 in Sch 40) weighs 18.99 lb/ft in the A53 tables:

    >>> round(plain_end_weight_a53_us(6.625, 0.280), 2)
    18.99
    """
    od, wall = validate_tube(od_in, wall_in)
    return _as_result(10.69 * (od - wall) * wall)


def plain_end_mass_a53(od, wall):
    """ASTM A53/A53M and API 5L plain-end mass per length, SI form.

    .. math:: m' = 0.0246615 (D_{mm} - t_{mm}) t_{mm}

    Parameters
    ----------
    od : float or array_like
        Outside diameter [m].
    wall : float or array_like
        Specified wall [m].

    Returns
    -------
    float or ndarray
        Plain-end mass per length [kg/m].

    Notes
    -----
    The standards state the formula with millimetres; it is applied here
    with the diameter and wall converted from metres.  It equals
    :func:`linear_mass` for 7850 kg/m^3.

    Examples
    --------
    >>> round(plain_end_mass_a53(0.1683, 0.00711), 2)
    28.26
    """
    od, wall = validate_tube(od, wall)
    return _as_result(0.0246615 * (od * 1e3 - wall * 1e3) * wall * 1e3)
