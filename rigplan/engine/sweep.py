"""Scenario sweep for a string of one material: many what-ifs at once.

Engine module: numpy arrays of SI floats; no units library, no I/O.

For one string (a single size and material, joint lengths from the tally)
and arrays of scenarios -- actual wall within the standard's tolerance,
hole-fluid density and ellipticity -- :func:`sweep_landing` computes, all
scenarios at once:

* the landed string load of the open-ended string by the pressure-area
  method (for this uniform string it equals the air weight times the
  buoyancy factor);
* the Timoshenko collapse rating of the pipe at the scenario's wall and
  ellipticity (:func:`rigplan.engine.collapse.timoshenko`);
* the longest empty column a float shoe allows before collapse, with water
  (or another fill fluid) inside below the fill surface;
* pass or fail of the landed load against a string limit.

Every scenario is a whole string at the scenario's wall: the wall is taken
as measured, so weight, bore and rating all use it (rigplan rules: a
measured wall replaces the minimum wall).  Cost ``O(S)`` for ``S``
scenarios, whatever the number of joints (their lengths enter only through
the shoe depth and the air weight).

Sources: pressure-area method and buoyancy factor, Bourgoyne et al.,
*Applied Drilling Engineering*, SPE Textbook vol. 2 (1986), ch. 7, with the
sign conventions of standard string mechanics (Bourgoyne et al., *Applied Drilling Engineering*, 1986) (depth down from the
floor, tension positive, gauge pressure); Timoshenko and Gere, *Theory of
Elastic Stability*, 2nd ed. (1961), ch. 7 (collapse of an oval tube); wall
under-tolerance 12.5 % as in ASTM A53/A53M and API 5CT (from memory).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from rigplan.engine.collapse import timoshenko
from rigplan.errors import InputError
from rigplan.engine.stringmodel import G

__all__ = ["UniformString", "SweepResult", "sweep_landing"]


@dataclass(frozen=True)
class UniformString:
    """A string of one size and material, SI units.

    od : outside diameter [m]
    nominal_wall : specified wall [m]
    lengths : joint lengths in running order [m] (the tally)
    yield_strength : specified minimum yield strength [Pa]
    youngs_modulus : Young's modulus [Pa]
    poisson : Poisson's ratio [-]
    density : material density [kg/m^3] (plain-end weight)
    under_tolerance : fraction the wall may be under the specified wall [-]
        (0.125 for ASTM A53 and API 5CT pipe)
    """

    od: float
    nominal_wall: float
    lengths: np.ndarray
    yield_strength: float
    youngs_modulus: float
    poisson: float
    density: float
    under_tolerance: float

    def __post_init__(self):
        def positive(name, value, unit):
            if not (isinstance(value, (int, float, np.floating)) and math.isfinite(value)
                    and value > 0):
                raise InputError(f"string.{name}", f"expected a number > 0 {unit}, got {value!r}")

        for name, unit in (("od", "m"), ("nominal_wall", "m"), ("yield_strength", "Pa"),
                           ("youngs_modulus", "Pa"), ("density", "kg/m^3")):
            positive(name, getattr(self, name), unit)
        if not self.nominal_wall < self.od / 2:
            raise InputError("string.nominal_wall",
                             f"expected a wall under half the od ({self.od / 2:g} m), "
                             f"got {self.nominal_wall!r} m")
        if not (isinstance(self.poisson, (int, float, np.floating)) and 0 <= self.poisson < 0.5):
            raise InputError("string.poisson", f"expected 0 <= poisson < 0.5 [-], got {self.poisson!r}")
        u = self.under_tolerance
        if not (isinstance(u, (int, float, np.floating)) and 0 <= u < 1):
            raise InputError("string.under_tolerance",
                             f"expected a fraction 0 <= u < 1 [-] (0.125 = 12.5 %), got {u!r}")
        lengths = np.asarray(self.lengths, dtype=float)
        if lengths.ndim != 1 or len(lengths) == 0:
            raise InputError("string.lengths", "expected a list of joint lengths [m], got none")
        bad = ~(np.isfinite(lengths) & (lengths > 0))
        if np.any(bad):
            i = int(np.flatnonzero(bad)[0])
            raise InputError(f"string.lengths[{i}]",
                             f"expected a joint length > 0 m, got {lengths[i]!r}")
        object.__setattr__(self, "lengths", lengths)

    @property
    def shoe_depth(self) -> float:
        """Depth of the shoe when landed [m]: the sum of the joint lengths."""
        return float(np.sum(self.lengths))


@dataclass(frozen=True)
class SweepResult:
    """One entry per scenario, SI units.

    wall : actual wall [m]
    air_weight : air weight of the string [N]
    buoyancy_factor : ``1 - rho_m / rho_s`` [-]
    string_load : landed open-ended true force at the top [N] (hook load
        less the dead load of the hoisting gear)
    collapse_rating : Timoshenko collapse pressure at the wall [Pa]
    longest_empty : longest empty column above the fill surface a float
        shoe allows before collapse [m], 0 to the shoe depth
    collapses_full : True where even a pipe full of fill fluid exceeds the
        allowable collapse load at the shoe (no float plan helps)
    passes : landed string load within the string limit
    shoe_depth : shoe depth [m] (the same for every scenario)
    """

    wall: np.ndarray
    air_weight: np.ndarray
    buoyancy_factor: np.ndarray
    string_load: np.ndarray
    collapse_rating: np.ndarray
    longest_empty: np.ndarray
    collapses_full: np.ndarray
    passes: np.ndarray
    shoe_depth: float


def _scenario_array(name, value, lo, hi, unit, lo_open=False, hi_open=False):
    """A scenario input as a float array, every entry in its range, else
    InputError naming the first bad entry."""
    arr = np.atleast_1d(np.asarray(value, dtype=float))
    if arr.ndim != 1:
        raise InputError(name, f"expected a 1-d array of values [{unit}], got shape {arr.shape}")
    ok = np.isfinite(arr) & ((arr > lo) if lo_open else (arr >= lo)) \
        & ((arr < hi) if hi_open else (arr <= hi))
    if not np.all(ok):
        i = int(np.flatnonzero(~ok)[0])
        lo_s = "(" if lo_open else "["
        hi_s = ")" if hi_open else "]"
        raise InputError(f"{name}[{i}]",
                         f"expected a value in {lo_s}{lo:g}, {hi:g}{hi_s} {unit}, got {arr[i]!r}")
    return arr


def sweep_landing(string: UniformString, wall_factor, fluid_density, ellipticity,
                  string_limit: float, fill_density: float = 998.2,
                  collapse_factor: float = 1.0, fluid_level: float = 0.0) -> SweepResult:
    """Landed load, collapse rating and float-shoe empty column per scenario.

    With ``Z`` the shoe depth, ``t = f t_nom`` the actual wall
    (``1 - u <= f <= 1``), ``d = D - 2 t``, ``A_o = pi D^2 / 4``,
    ``A_b = pi d^2 / 4``, ``A_s = A_o - A_b``:

    * air weight ``W = rho_s g A_s Z`` (plain-end weight, ASTM A53/A53M);
    * landed string load, open shoe, hole fluid inside and out, by the
      pressure-area method (weights plus the pressure on the horizontal
      faces; this uniform string has one, its bottom end)::

          F(0) = W - P_o(Z) A_o + P_i(Z) A_b,   P_i(Z) = P_o(Z) = rho_m g (Z - h_o)+

      which is ``W (1 - rho_m / rho_s)``, the buoyancy factor, when the
      hole is full (``h_o = 0``);
    * collapse rating ``R``: :func:`rigplan.engine.collapse.timoshenko` at ``t``
      and the scenario's ellipticity;
    * float shoe, fill fluid ``rho_w`` inside below the fill surface at
      depth ``h``, empty above: the collapse load
      ``dP(z) = rho_m g (z - h_o)+ - rho_w g (z - h)+`` is largest at the
      shoe or at the fill surface, so the longest empty column solves::

          rho_m g (Z - h_o) - rho_w g (Z - h) = R / DF      (shoe)
          rho_m g (h - h_o) = R / DF                       (fill surface)

      taking the smaller root, clipped to ``[0, Z]``; when even ``h = 0``
      overloads the shoe, ``collapses_full`` is set and the column is 0;
    * ``passes``: ``F(0) <= string_limit``.

    Parameters
    ----------
    string : UniformString
        Size, material and tally of the string [m, Pa, kg/m^3].
    wall_factor : array_like
        Actual wall over the specified wall [-], each within
        ``[1 - under_tolerance, 1]``.
    fluid_density : array_like
        Hole (annulus) fluid density [kg/m^3], > 0.
    ellipticity : array_like
        Initial ellipticity ``(Dmax - Dmin)/(Dmax + Dmin)`` [-], 0 <= e < 1.
    string_limit : float
        Largest allowed string load [N] (hook capacity less the dead load).
    fill_density : float
        Fluid the crew puts inside above the float shoe [kg/m^3], > 0;
        default fresh water 998.2 kg/m^3 (20 C).
    collapse_factor : float
        Collapse design factor DF [-], > 0.
    fluid_level : float
        Depth of the annulus fluid top below the floor [m], >= 0.

    The three scenario arrays broadcast together (length-1 arrays repeat).

    Returns
    -------
    SweepResult

    Notes
    -----
    Static loads, vertical hole, no drag; thin-ring collapse theory (D/t
    above about 10).  Sources: module docstring.

    Examples
    --------
    1,000 ft of 7 in x 0.317 in steel in 9.0 lb/gal mud, open-ended: about
    19,535 lbf, the air weight 22,650 lbf times 1 - 9.0/65.4 (Bourgoyne et
    al., 1986, ch. 7 buoyancy factor, 65.4 lb/gal steel).

    >>> ft, inch, lbf, ppg = 0.3048, 0.0254, 4.4482216152605, 119.826427
    >>> s = UniformString(7 * inch, 0.317 * inch, [5 * ft] * 200, 55000 * 6894.757,
    ...                   30e6 * 6894.757, 0.3, 7850.0, 0.125)
    >>> r = sweep_landing(s, [1.0], [9.0 * ppg], [0.01], 1e9)
    >>> round(float(r.string_load[0] / lbf), -1)
    19540.0
    """
    u = string.under_tolerance
    f = _scenario_array("wall_factor", wall_factor, 1.0 - u, 1.0, "[-]")
    rho_m = _scenario_array("fluid_density", fluid_density, 0.0, np.inf, "kg/m^3",
                            lo_open=True, hi_open=True)
    e = _scenario_array("ellipticity", ellipticity, 0.0, 1.0, "[-]", hi_open=True)
    try:
        f, rho_m, e = np.broadcast_arrays(f, rho_m, e)
    except ValueError:
        raise InputError("scenarios", f"expected wall_factor, fluid_density and ellipticity of "
                                      f"one length (or 1), got {len(f)}, {len(rho_m)}, "
                                      f"{len(e)}") from None
    for name, value, unit in (("fill_density", fill_density, "kg/m^3"),
                              ("collapse_factor", collapse_factor, "[-]")):
        if not (math.isfinite(value) and value > 0):
            raise InputError(name, f"expected a number > 0 {unit}, got {value!r}")
    if not (math.isfinite(fluid_level) and fluid_level >= 0):
        raise InputError("fluid_level", f"expected a depth >= 0 m, got {fluid_level!r}")
    if math.isnan(string_limit):
        raise InputError("string_limit", "expected a string load limit [N], got nan")

    z = string.shoe_depth
    d_o = string.od
    wall = f * string.nominal_wall
    bore = d_o - 2.0 * wall
    a_o = 0.25 * math.pi * d_o * d_o
    a_b = 0.25 * math.pi * bore * bore
    a_s = a_o - a_b
    air_weight = string.density * G * a_s * z
    p_shoe = rho_m * G * max(0.0, z - fluid_level)
    # pressure-area sum: joint weights, then the bottom face (outside
    # pressure up on the whole end, bore pressure down on the bore area)
    load = air_weight - p_shoe * a_o + p_shoe * a_b
    rating = np.asarray(timoshenko(d_o, wall, string.yield_strength, e,
                                   string.youngs_modulus, string.poisson), dtype=float)
    allow = rating / collapse_factor
    rho_w = float(fill_density)
    # shoe: rho_m g (Z - h_o)+ - rho_w g (Z - h) = R/DF  ->  h
    h_shoe = z - (p_shoe - allow) / (rho_w * G)
    # fill surface: rho_m g (h - h_o) = R/DF  ->  h
    h_surface = fluid_level + allow / (rho_m * G)
    longest = np.minimum(h_shoe, h_surface)
    collapses_full = p_shoe - rho_w * G * z > allow
    longest = np.where(collapses_full, 0.0, np.clip(longest, 0.0, z))
    return SweepResult(
        wall=wall, air_weight=air_weight, buoyancy_factor=1.0 - rho_m / string.density,
        string_load=load, collapse_rating=rating, longest_empty=longest,
        collapses_full=collapses_full, passes=load <= string_limit, shoe_depth=z,
    )
