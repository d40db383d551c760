"""Hydrostatic pressure of a fluid column and buoyancy factor.

Engine module: SI floats and numpy arrays only.
"""

from __future__ import annotations

import numpy as np

from rigplan.engine.stringmodel import G


def hydrostatic_pressure(depth, density, level=0.0):
    """Gauge pressure of a static fluid column at a depth.

    ``P(z) = rho * g * max(0, z - z_level)``

    Parameters
    ----------
    depth : float or array
        Depth below the rig floor [m].
    density : float or array
        Fluid density [kg/m^3], >= 0.
    level : float or array
        Depth of the top of the fluid column [m] (0 = full to the floor).

    Returns
    -------
    float or ndarray
        Gauge pressure [Pa]; zero above the fluid top.

    Notes
    -----
    Incompressible fluid at rest; valid for water-well depths where mud
    compressibility and temperature effects are negligible.  Source: any
    fluid-statics text; the oilfield form is 0.052 psi/ft per lb/gal
    (Bourgoyne et al., *Applied Drilling Engineering*, 1986, ch. 4).

    Examples
    --------
    Fresh water, 8.33 lb/gal, gives about 0.433 psi/ft:

    >>> ppg = 0.45359237 / 0.003785411784          # kg/m^3 per lb/gal
    >>> p = hydrostatic_pressure(0.3048, 8.33 * ppg)  # one foot down
    >>> round(float(p) / 6894.757293168361, 3)
    0.433
    """
    z = np.asarray(depth, dtype=float)
    return density * G * np.maximum(0.0, z - level)


def buoyancy_factor(fluid_density, pipe_density):
    """Buoyancy factor of an open-ended string in one fluid.

    ``BF = 1 - rho_fluid / rho_pipe``  [-]

    Valid for a string open at the bottom with the same fluid inside and
    out, fully submerged.  The pressure-area engine (``rigplan.engine.axial``)
    reduces to this case; see its tests.  Source: Bourgoyne et al.,
    *Applied Drilling Engineering* (1986), ch. 7; string mechanics (ADE 1986)
    ``BF = 1 - MW/65.4`` with MW in lb/gal for steel.

    >>> ppg = 0.45359237 / 0.003785411784
    >>> round(float(buoyancy_factor(10 * ppg, 65.4 * ppg)), 4)
    0.8471
    """
    if np.any(np.asarray(pipe_density) <= 0):
        raise ValueError("pipe density must be positive [kg/m^3]")
    return 1.0 - np.asarray(fluid_density, dtype=float) / pipe_density


def collapse_load(depth, hole_density, hole_level, fill_density, fill_level,
                  overwrite: bool = False):
    """Collapse load of hole fluid outside against fill inside at a depth.

    ``dP = rho_o g max(0, z - h_o) - rho_f g max(0, z - h_f)``  [Pa]

    Parameters
    ----------
    depth : float or array
        Depth below the floor [m]; not changed unless ``overwrite``.
    hole_density, hole_level : annulus fluid density [kg/m^3] and the
        depth of its top [m].
    fill_density, fill_level : inside fluid density [kg/m^3] and the depth
        of its surface [m] (arrays broadcast with ``depth``).
    overwrite : bool
        ``depth`` is a float array of the full broadcast shape that the
        caller no longer needs: work in it (saves a copy in hot loops).

    Returns
    -------
    ndarray
        ``P_o - P_in`` [Pa]; negative where the inside pressure is higher
        (a burst load).

    Notes
    -----
    Two static columns (:func:`hydrostatic_pressure`); the collapse load of
    API TR 5C3 and the string-mechanics texts is this differential
    (Bourgoyne et al., *Applied Drilling Engineering*, 1986, ch. 7).

    Examples
    --------
    10 lb/gal mud outside, empty pipe, 1,000 ft: about 520 psi.

    >>> ppg, ft, psi = 0.45359237 / 0.003785411784, 0.3048, 6894.757293168361
    >>> round(float(collapse_load(1000 * ft, 10 * ppg, 0.0, 0.0, 0.0)) / psi)
    519
    """
    if overwrite:
        z = depth
        shape = z.shape
    else:
        shape = np.broadcast_shapes(np.shape(depth), np.shape(fill_level))
        z = np.array(np.broadcast_to(depth, shape), dtype=float, ndmin=1)
    p_out = z - hole_level
    np.maximum(0.0, p_out, out=p_out)
    p_out *= hole_density * G
    z -= fill_level
    np.maximum(0.0, z, out=z)
    z *= fill_density * G
    p_out -= z
    return p_out.reshape(shape)
