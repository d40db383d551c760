"""Buckling of the string below the neutral point, and the bending it adds.

Engine module: SI floats (numpy where it helps), no units library, no file
I/O, no words.  Forces in newtons [N] (compression given as a positive
magnitude where the name says so), stresses in pascals [Pa], lengths in
metres [m].

When a landed string is set down on bottom, the part below the neutral
point is in effective compression (Lubinski 1951: buckling follows the
effective force ``F_eff = F + P_o A_o - P_i A_i``, not the true force).  With
enough compression it leaves the straight form: first a lateral, snaking
(*sinusoidal*) shape, then, with more, a *helix* pressed against the hole
wall.  The helix bends the pipe with a curvature set by the radial
clearance and the compressive force, and that bending stress adds to the
axial stress in the extreme fibre.

Methods used
------------
* **Critical sinusoidal load, vertical hole** -- Lubinski (1950): a heavy
  string standing on a pinned lower end first buckles when the compressive
  force at its bottom reaches ``1.94 m w`` with ``m = (E I / w)^(1/3)``,
  that is ``F = 1.94 (E I w^2)^(1/3)``.
* **Critical sinusoidal load, inclined hole** -- Dawson and Paslay (1984):
  ``F = 2 sqrt(E I w sin(theta) / r)``, the pipe lying on the low side of
  the hole.  It tends to zero as the hole becomes vertical (the low side
  stops supporting the pipe), so it does *not* reduce to Lubinski's result;
  the larger of the two is used (common practice, no source), which is
  Lubinski's in a vertical hole.
* **Critical helical load** -- vertical: ``5.55 (E I w^2)^(1/3)`` (Wu and
  Juvkam-Wold, 1993, from memory); inclined: ``2 sqrt(2) sqrt(E I w
  sin(theta) / r)`` (Chen, Lin and Cheatham, 1990, from memory); the larger
  is used.  Mitchell (1988) shows the helix in a vertical hole with its
  contact force and end effects; the fully developed helix is the one of
  Lubinski, Althouse and Logan (1962).
* **Helix and its bending stress** -- Lubinski, Althouse and Logan (1962):
  pitch ``p = pi sqrt(8 E I / F)``; the helix of radius ``r`` (the radial
  clearance) has curvature ``4 pi^2 r / (p^2 + 4 pi^2 r^2) ~ r F / (2 E I)``,
  so the outer-fibre bending stress is ``sigma_b = E kappa D / 2 = r D F /
  (4 I)``, and the helix shortens the string by ``r^2 F^2 / (8 E I w)``.

Water wells are drilled vertical here: the planner uses ``theta = 0``, so
the sinusoidal and helical thresholds are Lubinski's and Wu and
Juvkam-Wold's.  The bending stress of the helix is applied wherever the
string is buckled, sinusoidal included: an upper bound for the sinusoidal
shape, whose curvature is smaller (common practice, no source).

References
----------
.. [1] A. Lubinski, "A study of the buckling of rotary drilling strings",
   API Drilling and Production Practice, 1950, pp. 178-214.
.. [2] A. Lubinski, W. S. Althouse and J. L. Logan, "Helical buckling of
   tubing sealed in packers", Journal of Petroleum Technology, June 1962,
   pp. 655-670.
.. [3] R. Dawson and P. R. Paslay, "Drillpipe buckling in inclined holes",
   Journal of Petroleum Technology, October 1984, pp. 1734-1738.
.. [4] R. F. Mitchell, "New concepts for helical buckling", SPE Drilling
   Engineering, September 1988, pp. 303-310.
.. [5] J. Wu and H. C. Juvkam-Wold, "Study of helical buckling of pipes in
   horizontal wells", SPE 25503, 1993 (vertical-well helical load), from
   memory.
.. [6] Y.-C. Chen, Y.-H. Lin and J. B. Cheatham, "Tubing and casing buckling
   in horizontal wells", Journal of Petroleum Technology, February 1990,
   pp. 140-141, from memory.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

__all__ = [
    "LUBINSKI_FIRST_ORDER",
    "WU_JUVKAM_WOLD_HELICAL_VERTICAL",
    "second_moment_of_area",
    "radial_clearance",
    "lubinski_critical_load",
    "dawson_paslay_critical_load",
    "helical_onset_vertical",
    "chen_helical_critical_load",
    "sinusoidal_critical_load",
    "helical_critical_load",
    "helical_pitch",
    "helical_bending_stress",
    "helical_shortening",
    "BucklingCheck",
    "check_buckling",
]

#: Lubinski's first-order buckling coefficient (bottom force over ``m w``,
#: ``m = (E I / w)^(1/3)``) for a vertical string pinned at its lower end
#: [-] (Lubinski 1950; his second order is 3.75).
LUBINSKI_FIRST_ORDER = 1.94

#: Helical-buckling coefficient of a vertical string (force over
#: ``(E I w^2)^(1/3)``) [-] (Wu and Juvkam-Wold 1993, from memory).
WU_JUVKAM_WOLD_HELICAL_VERTICAL = 5.55

#: Buckling modes per joint in :class:`BucklingCheck`.
STRAIGHT, SINUSOIDAL, HELICAL = 0, 1, 2


def _result(value):
    arr = np.asarray(value, dtype=float)
    return float(arr) if arr.ndim == 0 else arr


def second_moment_of_area(od, bore):
    """Second moment of area of a tube about a diameter.

    .. math:: I = \\frac{\\pi}{64} (D^4 - d^4)

    Parameters
    ----------
    od : float or array
        Outside diameter ``D`` [m].
    bore : float or array
        Inside diameter ``d`` [m], ``0 <= d < D``.

    Returns
    -------
    float or ndarray
        ``I`` [m^4].

    Notes
    -----
    Plain tube (Timoshenko and Gere, *Mechanics of Materials*); valid for a
    round tube of uniform wall.  A slotted or wire-wrapped screen is less
    stiff than the tube between its outside diameter and bore.

    Examples
    --------
    4-1/2 in drill pipe, 3.826 in bore: 9.61 in^4 (hand arithmetic):

    >>> i = second_moment_of_area(4.5 * 0.0254, 3.826 * 0.0254)
    >>> round(i / 0.0254**4, 2)
    9.61
    """
    d_o = np.asarray(od, dtype=float)
    d_i = np.asarray(bore, dtype=float)
    return _result(np.pi / 64.0 * (d_o ** 4 - d_i ** 4))


def radial_clearance(hole_diameter, od):
    """Radial clearance between the pipe and the hole wall.

    .. math:: r = (D_h - D) / 2

    Parameters
    ----------
    hole_diameter : float or array
        Hole (bit) diameter ``D_h`` [m]; nan when unknown.
    od : float or array
        Pipe outside diameter ``D`` [m].

    Returns
    -------
    float or ndarray
        ``r`` [m], not below 0 (a pipe as wide as the hole cannot bend
        sideways); nan when the hole diameter is unknown.

    Notes
    -----
    The bit diameter is the least the hole can be; a washed-out hole gives a
    larger clearance and more bending.  Couplings and centralizers, which
    hold the body off the wall, are not counted (more clearance is the
    conservative side for the bending stress).

    Examples
    --------
    >>> round(radial_clearance(0.3111, 0.2191), 4)
    0.046
    """
    r = 0.5 * (np.asarray(hole_diameter, dtype=float) - np.asarray(od, dtype=float))
    return _result(np.where(np.isnan(r), np.nan, np.maximum(r, 0.0)))


def lubinski_critical_load(modulus, moment, weight_per_length):
    """Critical (first-order) buckling load of a vertical string, Lubinski 1950.

    .. math::

        F_{cr} = 1.94\\, m\\, w = 1.94\\, (E I w^2)^{1/3},
        \\qquad m = (E I / w)^{1/3}

    Parameters
    ----------
    modulus : float or array
        Young's modulus ``E`` [Pa].
    moment : float or array
        Second moment of area ``I`` [m^4].
    weight_per_length : float or array
        Buoyed weight per length ``w`` [N/m] (the gradient of the effective
        tension); a value <= 0 gives 0 (a weightless or floating pipe has no
        stiffening weight).

    Returns
    -------
    float or ndarray
        Compressive force at the lower end at which the straight string
        first buckles [N].

    Notes
    -----
    Vertical hole; string long compared with ``m``, pinned (free to turn)
    at its lower end, loaded by its own buoyed weight and the compressive
    force at the bottom; elastic.  The force is the *effective* force
    (Lubinski 1951).  Source: Lubinski (1950), first-order buckling, from
    memory.

    Examples
    --------
    >>> f = lubinski_critical_load(200e9, 1e-5, 300.0)
    >>> round(f / (200e9 * 1e-5 * 300.0**2) ** (1 / 3), 2)
    1.94
    """
    w = np.maximum(np.asarray(weight_per_length, dtype=float), 0.0)
    e, i = np.asarray(modulus, dtype=float), np.asarray(moment, dtype=float)
    return _result(LUBINSKI_FIRST_ORDER * np.cbrt(e * i * w * w))


def dawson_paslay_critical_load(modulus, moment, weight_per_length, clearance, inclination):
    """Critical sinusoidal buckling load in an inclined hole, Dawson and Paslay 1984.

    .. math:: F_{cr} = 2 \\sqrt{\\frac{E I w \\sin\\theta}{r}}

    Parameters
    ----------
    modulus : float or array
        Young's modulus ``E`` [Pa].
    moment : float or array
        Second moment of area ``I`` [m^4].
    weight_per_length : float or array
        Buoyed weight per length ``w`` [N/m] (<= 0 gives 0).
    clearance : float or array
        Radial clearance ``r`` [m], > 0 (0 gives inf: no room to buckle).
    inclination : float or array
        Hole inclination from vertical ``theta`` [rad].

    Returns
    -------
    float or ndarray
        Compressive effective force at which the pipe lying on the low side
        buckles sinusoidally [N].

    Notes
    -----
    Straight inclined hole, pipe resting on the low side, long compared
    with the buckle wavelength.  Tends to 0 as ``theta`` -> 0: it does not
    apply to a vertical hole (use :func:`lubinski_critical_load`).

    Examples
    --------
    Horizontal hole, ``E I w / r = 1``: ``F = 2``.

    >>> dawson_paslay_critical_load(1.0, 1.0, 1.0, 1.0, 3.141592653589793 / 2)
    2.0
    """
    w = np.maximum(np.asarray(weight_per_length, dtype=float), 0.0)
    r = np.asarray(clearance, dtype=float)
    s = np.sin(np.asarray(inclination, dtype=float))
    with np.errstate(divide="ignore", invalid="ignore"):
        base = np.asarray(modulus, dtype=float) * np.asarray(moment, dtype=float) * w * s
        f = np.where(r > 0, 2.0 * np.sqrt(base / np.where(r > 0, r, 1.0)), np.inf)
    return _result(np.where(np.isnan(r), np.nan, f))


def helical_onset_vertical(modulus, moment, weight_per_length):
    """Compressive force at which a vertical string buckles helically.

    .. math:: F_{hel} = 5.55\\, (E I w^2)^{1/3}

    Parameters and units as :func:`lubinski_critical_load`; returns [N].

    Notes
    -----
    Vertical hole, long string, buoyed weight ``w`` > 0.  Source: Wu and
    Juvkam-Wold (1993), from memory.

    Examples
    --------
    >>> round(helical_onset_vertical(1.0, 1.0, 1.0), 2)
    5.55
    """
    w = np.maximum(np.asarray(weight_per_length, dtype=float), 0.0)
    e, i = np.asarray(modulus, dtype=float), np.asarray(moment, dtype=float)
    return _result(WU_JUVKAM_WOLD_HELICAL_VERTICAL * np.cbrt(e * i * w * w))


def chen_helical_critical_load(modulus, moment, weight_per_length, clearance, inclination):
    """Helical buckling load in an inclined hole, Chen, Lin and Cheatham 1990.

    .. math:: F_{hel} = 2 \\sqrt{2} \\sqrt{\\frac{E I w \\sin\\theta}{r}}

    Parameters and units as :func:`dawson_paslay_critical_load`; returns [N].

    Notes
    -----
    ``sqrt(2)`` times the Dawson and Paslay load; same validity (inclined
    hole, pipe on the low side).  Source: Chen, Lin and Cheatham (1990),
    from memory.

    Examples
    --------
    >>> round(chen_helical_critical_load(1.0, 1.0, 1.0, 1.0, 3.141592653589793 / 2), 4)
    2.8284
    """
    return _result(np.sqrt(2.0) * np.asarray(
        dawson_paslay_critical_load(modulus, moment, weight_per_length, clearance, inclination)))


def sinusoidal_critical_load(modulus, moment, weight_per_length, clearance, inclination=0.0):
    """The compressive effective force at which the string leaves the straight
    form [N]: the larger of :func:`lubinski_critical_load` and
    :func:`dawson_paslay_critical_load` (common practice, no source, for
    taking the larger; each from its own source).  Units as those functions.

    Examples
    --------
    Vertical: Lubinski's result.

    >>> round(sinusoidal_critical_load(1.0, 1.0, 1.0, 0.05), 2)
    1.94
    """
    lub = np.asarray(lubinski_critical_load(modulus, moment, weight_per_length))
    dp = np.asarray(dawson_paslay_critical_load(modulus, moment, weight_per_length, clearance,
                                                inclination))
    return _result(np.where(np.isnan(dp), lub, np.fmax(lub, dp)))


def helical_critical_load(modulus, moment, weight_per_length, clearance, inclination=0.0):
    """The compressive effective force above which the string is a helix
    [N]: the larger of :func:`helical_onset_vertical` and
    :func:`chen_helical_critical_load` (common practice, no source, for
    taking the larger).  Units as those functions.

    Examples
    --------
    >>> round(helical_critical_load(1.0, 1.0, 1.0, 0.05), 2)
    5.55
    """
    vert = np.asarray(helical_onset_vertical(modulus, moment, weight_per_length))
    chen = np.asarray(chen_helical_critical_load(modulus, moment, weight_per_length, clearance,
                                                 inclination))
    return _result(np.where(np.isnan(chen), vert, np.fmax(vert, chen)))


def helical_pitch(modulus, moment, force):
    """Pitch of the helix of a buckled string, Lubinski, Althouse and Logan 1962.

    .. math:: p = \\pi \\sqrt{\\frac{8 E I}{F}}

    Parameters
    ----------
    modulus : float or array
        Young's modulus ``E`` [Pa].
    moment : float or array
        Second moment of area ``I`` [m^4].
    force : float or array
        Compressive effective force ``F`` [N], > 0.

    Returns
    -------
    float or ndarray
        Length of one turn of the helix [m] (inf for ``F <= 0``).

    Notes
    -----
    Weightless pipe in a vertical hole, helix in full contact with the
    wall, small clearance compared with the pitch.  Source: Lubinski,
    Althouse and Logan (1962).

    Examples
    --------
    >>> round(helical_pitch(1.0, 1.0, 8.0), 6)   # pi sqrt(8 / 8)
    3.141593
    """
    f = np.asarray(force, dtype=float)
    with np.errstate(divide="ignore"):
        p = np.pi * np.sqrt(8.0 * np.asarray(modulus, dtype=float) * np.asarray(moment, dtype=float)
                            / np.where(f > 0, f, 0.0))
    return _result(np.where(f > 0, p, np.inf))


def helical_bending_stress(od, moment, clearance, force):
    """Outer-fibre bending stress of a helically buckled string, Lubinski,
    Althouse and Logan 1962.

    .. math:: \\sigma_b = \\frac{r D F}{4 I}

    Parameters
    ----------
    od : float or array
        Outside diameter ``D`` [m].
    moment : float or array
        Second moment of area ``I`` [m^4].
    clearance : float or array
        Radial clearance ``r`` [m] (the helix radius).
    force : float or array
        Compressive effective force ``F`` [N] (<= 0 gives 0).

    Returns
    -------
    float or ndarray
        Bending stress [Pa], added to the axial stress in compression on the
        inner side of the helix and in tension on the outer.

    Notes
    -----
    From the helix curvature ``kappa = 4 pi^2 r / p^2 = r F / (2 E I)``
    with the pitch of :func:`helical_pitch`, and ``sigma_b = E kappa D /
    2``; independent of ``E``.  Same validity as :func:`helical_pitch`;
    elastic.  Source: Lubinski, Althouse and Logan (1962).

    Examples
    --------
    >>> round(helical_bending_stress(0.2, 1e-5, 0.05, 1e5))   # 0.05 x 0.2 x 1e5 / 4e-5
    25000000
    """
    f = np.maximum(np.asarray(force, dtype=float), 0.0)
    return _result(np.asarray(clearance, dtype=float) * np.asarray(od, dtype=float) * f
                   / (4.0 * np.asarray(moment, dtype=float)))


def helical_shortening(clearance, modulus, moment, weight_per_length, force):
    """Shortening of a string by helical buckling of its lower part, Lubinski,
    Althouse and Logan 1962 (their Eq. 7).

    .. math:: \\Delta L = \\frac{r^2 F^2}{8 E I w}

    The helix of pitch ``p`` (:func:`helical_pitch`) shortens each unit
    length by ``2 pi^2 r^2 / p^2 = r^2 F / (4 E I)``; with the force falling
    by ``w`` per length up to the neutral point, ``F / w`` above the bottom,
    the integral gives the formula.

    Parameters
    ----------
    clearance : float or array
        Radial clearance ``r`` [m].
    modulus : float or array
        Young's modulus ``E`` [Pa].
    moment : float or array
        Second moment of area ``I`` [m^4].
    weight_per_length : float or array
        Weight per length ``w`` [N/m] of the pipe with its contents less the
        fluid it displaces, > 0.
    force : float or array
        Compressive effective force at the bottom ``F`` [N] (<= 0 gives 0).

    Returns
    -------
    float or ndarray
        Shortening [m] (a positive length).

    Notes
    -----
    Vertical hole, helix from the bottom up to the neutral point, which must
    lie inside the string (``F / w`` not more than its length); elastic, no
    friction.  Source: Lubinski, Althouse and Logan (1962).

    Examples
    --------
    >>> helical_shortening(1.0, 1.0, 1.0, 1.0, 4.0)   # 1 x 16 / 8
    2.0
    """
    f = np.maximum(np.asarray(force, dtype=float), 0.0)
    r = np.asarray(clearance, dtype=float)
    return _result(r * r * f * f / (8.0 * np.asarray(modulus, dtype=float)
                                     * np.asarray(moment, dtype=float)
                                     * np.asarray(weight_per_length, dtype=float)))


# ---------------------------------------------------------------------------
# the landed string


@dataclass(frozen=True)
class BucklingCheck:
    """Buckling below the neutral point of a landed string, SI units.

    Arrays are per joint (index j-1 = joint j).

    compressed_length : length of string in effective compression [m]
    sinusoidal_length : length whose compression exceeds the critical
        sinusoidal load (helical part included) [m]
    helical_length : length whose compression exceeds the helical load [m]
    clearance : radial clearance per joint [m] (nan: hole diameter unknown)
    compression : largest effective compression in each joint [N] (0: in
        tension throughout)
    sinusoidal_load, helical_load : critical loads of each joint [N] (nan:
        modulus unknown)
    mode : :data:`STRAIGHT`, :data:`SINUSOIDAL` or :data:`HELICAL` per joint
        (at its most compressed face)
    axial_stress : true axial force over the steel area at that face [Pa]
        (magnitude)
    bending_stress : helical bending stress there [Pa] (0 when straight;
        nan when buckled and the clearance is unknown)
    stress_utilization : ``design_factor (axial + bending) / yield`` for
        joints in effective compression [-] (nan: not in compression, or
        yield or bending unknown)
    unknown : joints in effective compression whose buckling or stress
        cannot be worked out (modulus, hole diameter or yield unknown)
    design_factor : the factor applied [-]
    max_set_down : largest set-down weight that keeps every screen straight
        and the combined stress of every joint now in compression within
        yield / design factor [N] (nan: not worked out)
    """

    compressed_length: float
    sinusoidal_length: float
    helical_length: float
    clearance: np.ndarray
    compression: np.ndarray
    sinusoidal_load: np.ndarray
    helical_load: np.ndarray
    mode: np.ndarray
    axial_stress: np.ndarray
    bending_stress: np.ndarray
    stress_utilization: np.ndarray
    unknown: np.ndarray
    design_factor: float
    max_set_down: float = float("nan")

    @property
    def buckles(self) -> bool:
        """True when some part of the string leaves the straight form."""
        return bool(np.any(self.mode > STRAIGHT))


def _length_over(threshold, f_bottom, f_top, length):
    """Length of each joint over which a force varying linearly from
    ``f_bottom`` to ``f_top`` exceeds ``threshold`` [m]."""
    lo = np.minimum(f_bottom, f_top)
    hi = np.maximum(f_bottom, f_top)
    with np.errstate(divide="ignore", invalid="ignore"):
        frac = np.where(hi > lo, (hi - threshold) / (hi - lo), (hi > threshold).astype(float))
    frac = np.clip(np.nan_to_num(frac, nan=0.0), 0.0, 1.0)
    return np.where(np.isnan(threshold), 0.0, frac * length)


def check_buckling(joints, profile, hole_diameter: float, modulus, design_factor: float = 1.0,
                   inclination: float = 0.0, set_down: float = float("nan"),
                   screens=None) -> BucklingCheck:
    """Buckling and combined stress below the neutral point of a landed string.

    For each joint in effective compression (``F_eff < 0`` at a face):

    * buoyed weight per length ``w = (T_eff,top - T_eff,bottom) / L``
      (the effective-tension gradient);
    * ``I`` on the rating wall (``joints.rating_wall``; the bore when not
      given) and the radial clearance to the hole (bit) diameter;
    * critical loads :func:`sinusoidal_critical_load` and
      :func:`helical_critical_load` at ``inclination``;
    * the mode at the most compressed face, and the lengths over which the
      compression exceeds each critical load (linear within a joint);
    * where buckled, :func:`helical_bending_stress` (an upper bound for the
      sinusoidal shape); ``sigma = |F_true| / A_s + sigma_b`` at that face,
      utilization ``design_factor sigma / Y``.

    Parameters
    ----------
    joints : JointArrays
        The string (od, bore, rating_wall, yield_strength, length).
    profile : rigplan.engine.axial.StepProfile
        Forces along the landed string, set-down weight included.
    hole_diameter : float
        Hole (bit) diameter [m]; nan when unknown.
    modulus : array
        Young's modulus per joint [Pa] (nan: unknown).
    design_factor : float
        Factor on the combined stress [-], >= 1.
    inclination : float
        Hole inclination [rad]; 0 for a vertical hole.
    set_down : float
        The set-down weight in ``profile`` [N]; with it, ``max_set_down`` is
        worked out.  A set-down weight changes the true and the effective
        force everywhere by the same amount (a reaction at the shoe), so
        a screen stays straight while ``S - (C_j - F_sin,j)`` is not
        exceeded, ``C_j`` its compression under ``S``; and the combined
        stress ``DF (|F| + d) / A_s + DF r D (C + d) / (4 I) = Y`` gives the
        change ``d`` a compressed joint allows (true force compressive; the
        bending term only once ``C + d`` passes ``F_sin``).
    screens : array of bool, optional
        Which joints are screens (for ``max_set_down``).

    Returns
    -------
    BucklingCheck

    Notes
    -----
    Statics, elastic, straight hole of the bit diameter, no friction or
    torque, couplings ignored.  Sources as in the module docstring.
    """
    k = int(profile.step)
    length = np.asarray(joints.length, dtype=float)[:k]
    od = np.asarray(joints.od, dtype=float)[:k]
    bore = np.asarray(joints.bore, dtype=float)[:k]
    if joints.rating_wall is not None:
        wall = np.asarray(joints.rating_wall, dtype=float)[:k]
        inner = np.where(np.isfinite(wall) & (wall > 0), od - 2.0 * wall, bore)
    else:
        inner = bore
    e = np.broadcast_to(np.asarray(modulus, dtype=float), (joints.n,))[:k]
    yield_strength = (np.full(k, np.nan) if joints.yield_strength is None
                      else np.asarray(joints.yield_strength, dtype=float)[:k])
    moment = np.asarray(second_moment_of_area(od, inner))
    area = 0.25 * np.pi * (od ** 2 - inner ** 2)
    r = np.asarray(radial_clearance(np.full(k, hole_diameter), od))

    et = np.asarray(profile.effective_top, dtype=float)
    eb = np.asarray(profile.effective_bottom, dtype=float)
    w = (et - eb) / length
    c_top, c_bottom = np.maximum(-et, 0.0), np.maximum(-eb, 0.0)
    bottom_worst = c_bottom >= c_top
    comp = np.maximum(c_top, c_bottom)
    true = np.where(bottom_worst, np.asarray(profile.true_force_bottom, dtype=float),
                    np.asarray(profile.true_force_top, dtype=float))
    in_comp = comp > 0.0

    f_sin = np.asarray(sinusoidal_critical_load(e, moment, w, r, inclination), dtype=float)
    f_hel = np.asarray(helical_critical_load(e, moment, w, r, inclination), dtype=float)
    if np.ndim(f_sin) == 0:
        f_sin, f_hel = np.full(k, float(f_sin)), np.full(k, float(f_hel))
    mode = np.where(comp > f_hel, HELICAL, np.where(comp > f_sin, SINUSOIDAL, STRAIGHT))
    mode = np.where(in_comp, mode, STRAIGHT)

    bend = np.where(mode > STRAIGHT, np.asarray(helical_bending_stress(od, moment, r, comp)), 0.0)
    axial = np.abs(true) / area
    with np.errstate(invalid="ignore", divide="ignore"):
        util = np.where(in_comp, design_factor * (axial + bend) / yield_strength, np.nan)
    unknown = in_comp & (np.isnan(f_sin) | np.isnan(bend) | ~np.isfinite(util))

    max_set_down = float("nan")
    if np.isfinite(set_down) and set_down > 0:
        allowed = [np.inf]
        if screens is not None:
            scr = np.asarray(screens, dtype=bool)[:k] & in_comp
            if np.any(scr):
                allowed.append(float(set_down - np.max(comp[scr] - f_sin[scr])))
        # the joint's combined stress grows with the set-down d added:
        # straight while C + d <= F_sin, then with the helix bending (a jump)
        bend_per_force = r * od / (4.0 * moment)
        compressive = true <= 0
        with np.errstate(invalid="ignore", divide="ignore"):
            spare = yield_strength / design_factor - axial
            d_straight = spare * area
            d_buckled = (spare - bend_per_force * comp) / (1.0 / area + bend_per_force)
            room = np.where(comp + d_buckled > f_sin, d_buckled,
                            np.minimum(d_straight, f_sin - comp))
        use = in_comp & compressive & np.isfinite(room)
        if np.any(use):
            allowed.append(float(set_down + np.min(room[use])))
        if not np.any(unknown):
            max_set_down = max(min(allowed), 0.0)

    return BucklingCheck(
        compressed_length=float(np.sum(_length_over(0.0, -eb, -et, length))),
        sinusoidal_length=float(np.sum(_length_over(f_sin, -eb, -et, length))),
        helical_length=float(np.sum(_length_over(f_hel, -eb, -et, length))),
        clearance=r, compression=comp, sinusoidal_load=f_sin, helical_load=f_hel,
        mode=mode.astype(int), axial_stress=np.where(in_comp, axial, np.nan),
        bending_stress=np.where(in_comp, bend, np.nan), stress_utilization=util,
        unknown=unknown, design_factor=float(design_factor), max_set_down=max_set_down,
    )
