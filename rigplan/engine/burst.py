"""Internal-pressure (burst) rating of pipe, in SI units.

* :func:`barlow` -- yield of the wall in hoop tension, for steel (API TR 5C3
  internal yield on the specified wall with its 0.875; other steel on the
  minimum or measured wall with the factor 1).
* :func:`thermoplastic_pressure_rating` -- the long-term pressure rating of
  thermoplastic pipe from its hydrostatic design stress (ISO equation, ASTM
  D2241 / D1785).
"""

from __future__ import annotations

import numpy as np

from rigplan.engine.tubulars import (_as_result, _at, _check_fraction, _check_positive, _first_bad,
                                     validate_tube)

__all__ = ["barlow", "thermoplastic_pressure_rating"]


def barlow(od, wall, yield_strength, wall_factor=0.875):
    """Internal yield pressure by Barlow's formula.

    .. math:: p_b = k \\frac{2 S_y t}{D}

    Parameters
    ----------
    od : float or array_like
        Outside diameter [m].
    wall : float or array_like
        Wall thickness [m], 0 < wall < od/2.
    yield_strength : float or array_like
        Specified minimum yield strength [Pa], > 0.
    wall_factor : float or array_like, optional
        Fraction of ``wall`` that carries the load [-], 0 < k <= 1.  The
        default 0.875 applies the 12.5 % under-tolerance to a *specified*
        wall, as API TR 5C3 does; pass 1.0 when ``wall`` is already the
        minimum or a measured wall.

    Returns
    -------
    float or ndarray
        Internal pressure at which the wall reaches yield [Pa].

    Notes
    -----
    API TR 5C3 (ISO/TR 10400) internal yield pressure, ``0.875 * 2 Y t / D``.
    Thin-wall hoop stress taken on the outside diameter.  Valid for
    thin-walled pipe (D/t above about 10); in thicker pipe the bore yields
    first (Lame) at a lower pressure than this formula gives.

    Examples
    --------
    7 in 23 lb/ft J-55 (0.317 in): 4,360 psi in the API tables (from memory,
    recomputed).

    >>> psi, inch = 6894.757293168361, 0.0254
    >>> round(barlow(7 * inch, 0.317 * inch, 55000 * psi) / psi, -1)
    4360.0
    """
    od, wall = validate_tube(od, wall)
    sy = _check_positive("yield_strength", yield_strength, "Pa")
    k = _check_fraction("wall_factor", wall_factor, low_inclusive=False, high_inclusive=True)
    return _as_result(k * 2.0 * sy * wall / od)


def thermoplastic_pressure_rating(sdr, design_stress):
    """Pressure rating of thermoplastic pipe by the ISO equation.

    .. math:: P = \\frac{2 S}{SDR - 1}

    Parameters
    ----------
    sdr : float or array_like
        Standard dimension ratio, average outside diameter over the minimum
        wall [-], > 2.
    design_stress : float or array_like
        Hydrostatic design stress of the compound [Pa] (PVC 1120: 2,000
        psi at 73.4 F), > 0.

    Returns
    -------
    float or ndarray
        Long-term internal pressure rating for water [Pa] at the design
        stress's temperature (derate with
        :func:`rigplan.engine.materials.temperature_factor`).

    Notes
    -----
    ISO equation ``2 S / P = SDR - 1`` as used by ASTM D2241 (pressure
    classes of SDR-PR pipe) and ASTM D1785 (appendix); hoop stress on the
    mean diameter.  Long-term (50-year) rating: the short-term burst is
    several times higher and is not a working pressure.  Valid for
    thin-walled pipe, SDR 11 and above.

    Examples
    --------
    PVC 1120 SDR 21: pressure class 200 psi (ASTM D2241).

    >>> psi = 6894.757293168361
    >>> round(thermoplastic_pressure_rating(21.0, 2000 * psi) / psi)
    200
    """
    ratio = np.asarray(sdr, dtype=float)
    bad = ratio <= 2.0
    if np.any(bad):
        index, (v,) = _first_bad(bad, ratio)
        raise ValueError(
            f"sdr (outside diameter over wall) must be greater than 2 [-]; got {v:g}{_at(index)}"
        )
    s = _check_positive("design_stress", design_stress, "Pa")
    return _as_result(2.0 * s / (ratio - 1.0))
