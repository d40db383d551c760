"""Internal-pressure (burst) rating of pipe, in SI units."""

from __future__ import annotations

from rigplan.engine.tubulars import _as_result, _check_fraction, _check_positive, validate_tube

__all__ = ["barlow"]


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
