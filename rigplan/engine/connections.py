"""Tension capacity of the connection at the top of a joint, in SI units.

A connection is as strong as the user can show: a field butt weld by its
joint efficiency times the pipe-body yield, every threaded, spline-lock or
flush joint by the rating entered from the maker's data.  Without that data
the connection is *unrated* (``nan``), never assumed as strong as the pipe.
"""

from __future__ import annotations

import math

import numpy as np

from rigplan.engine.stringmodel import CONNECTION_KINDS
from rigplan.engine.tubulars import _as_result, _at, _first_bad

__all__ = [
    "UW12_BUTT_WELD_EFFICIENCY",
    "ENTERED_RATING_KINDS",
    "butt_weld_capacity",
    "connection_capacity",
]

#: Joint efficiencies of double-welded butt joints (ASME BPVC Section VIII
#: Div. 1, UW-12, Table UW-12 joint type 1): full, spot and no radiography.
#: Reference points only: the efficiency of a casing weld comes from its own
#: procedure and inspection, and is entered per joint.
UW12_BUTT_WELD_EFFICIENCY = {
    "full_radiography": 1.0,
    "spot_radiography": 0.85,
    "no_radiography": 0.70,
}

#: Connection kinds whose capacity is only known from an entered rating.
ENTERED_RATING_KINDS = ("threaded_coupled", "spline", "flush")


def butt_weld_capacity(body_yield, efficiency):
    """Tension capacity of a field butt weld.

    .. math:: F_w = \\eta \\, F_{body}

    Parameters
    ----------
    body_yield : float or array_like
        Pipe-body yield of the thinner joint at the weld, from the minimum
        wall [N], >= 0.
    efficiency : float or array_like
        Weld joint efficiency [-], 0 < eta <= 1, from the weld procedure
        and inspection.

    Returns
    -------
    float or ndarray
        Weld tension capacity [N].

    Notes
    -----
    Joint-efficiency method as in ASME BPVC Section VIII Div. 1, UW-12,
    whose table gives 1.0 / 0.85 / 0.70 for double-welded butt joints with
    full, spot and no radiography (:data:`UW12_BUTT_WELD_EFFICIENCY`):
    reference points only, not a rating of any casing weld.

    Examples
    --------
    >>> butt_weld_capacity(1.0e6, UW12_BUTT_WELD_EFFICIENCY["no_radiography"])
    700000.0
    """
    body = np.asarray(body_yield, dtype=float)
    bad = body < 0
    if np.any(bad):
        index, (v,) = _first_bad(bad, body)
        raise ValueError(f"body_yield must not be negative [N]; got {v:g} N{_at(index)}")
    eta = np.asarray(efficiency, dtype=float)
    bad = (eta <= 0) | (eta > 1)
    if np.any(bad):
        index, (v,) = _first_bad(bad, eta)
        raise ValueError(
            f"weld efficiency must satisfy 0 < efficiency <= 1 [-]; got {v:g}{_at(index)}"
        )
    return _as_result(eta * body)


def _given(value):
    return value is not None and not (np.ndim(value) == 0 and math.isnan(float(value)))


def connection_capacity(connection_kind, body_yield, weld_efficiency=None, entered_rating=None):
    """Tension capacity of a connection, or nan when it is unrated.

    Parameters
    ----------
    connection_kind : str
        One of :data:`rigplan.engine.stringmodel.CONNECTION_KINDS`.
    body_yield : float or array_like
        Pipe-body rating [N] (by the material's convention: the specified
        wall for API grades, the minimum or measured wall for other pipe).
    weld_efficiency : float, optional
        Butt-weld joint efficiency [-], 0 < eta <= 1.
    entered_rating : float or array_like, optional
        Tension rating entered for this connection from the maker's data or
        a weld qualification [N], > 0.

    Returns
    -------
    float or ndarray
        Capacity [N]:

        * an entered rating, when given, for any kind but ``"none"``;
        * ``"butt_weld"``: ``efficiency * body_yield``; nan without an
          efficiency;
        * ``"threaded_coupled"``, ``"spline"``, ``"flush"``: nan without an
          entered rating;
        * ``"integral"`` (same piece): ``body_yield``;
        * ``"none"`` (nothing above): inf.

    Raises
    ------
    ValueError
        For an unknown kind or an out-of-range efficiency or rating.

    Notes
    -----
    An unrated connection is reported as unrated, never silently taken as
    strong as the pipe (rigplan rule; see the string mechanics (ADE 1986),
    tension capacity).  Weld efficiencies: ASME BPVC Section VIII Div. 1,
    UW-12 as a reference point only.

    Examples
    --------
    >>> connection_capacity("butt_weld", 1.0e6, weld_efficiency=0.85)
    850000.0
    >>> connection_capacity("spline", 1.0e6)
    nan
    >>> connection_capacity("none", 1.0e6)
    inf
    """
    if connection_kind not in CONNECTION_KINDS:
        raise ValueError(
            f"unknown connection kind {connection_kind!r}; expected one of "
            f"{', '.join(CONNECTION_KINDS)}"
        )
    body = np.asarray(body_yield, dtype=float)
    if connection_kind == "none":
        return _as_result(np.full(body.shape, np.inf))
    if _given(entered_rating):
        rating = np.asarray(entered_rating, dtype=float)
        bad = rating <= 0
        if np.any(bad):
            index, (v,) = _first_bad(bad, rating)
            raise ValueError(
                f"entered connection rating must be greater than 0 N; got {v:g} N{_at(index)}"
            )
        return _as_result(np.broadcast_to(rating, np.broadcast(rating, body).shape).copy())
    if connection_kind == "integral":
        return _as_result(body.copy())
    if connection_kind == "butt_weld" and _given(weld_efficiency):
        return butt_weld_capacity(body, weld_efficiency)
    # butt weld without efficiency, or an entered-rating kind without a rating
    return _as_result(np.full(body.shape, np.nan))
