"""Rate every joint of a string: weight, pressure areas and strength ratings.

:func:`rate_joints` turns the user's :class:`rigplan.engine.stringmodel.JointSpec`
list into the per-joint arrays of :class:`rigplan.engine.stringmodel.JointArrays`
that the load engine uses.  It picks a formula per joint by its material and
adds no physics of its own; the formulas live in :mod:`rigplan.engine.tubulars`,
:mod:`rigplan.engine.collapse`, :mod:`rigplan.engine.burst` and :mod:`rigplan.engine.connections`.

Each rating follows its own standard's convention, and says which basis
it used (:data:`rigplan.engine.stringmodel.RATING_BASES`):

* **API grades** (collapse method ``api_5c3``): collapse by the four API TR
  5C3 regimes and body yield ``0.7854 (D^2 - d^2) Y`` on the *specified*
  wall; internal yield ``0.875 x 2 Y t / D`` on the specified wall.  The
  5C3 collapse constants were fitted to give minimum values over the wall
  tolerance of API 5CT, and the internal-yield formula carries its own
  0.875, so the wall is not reduced first (API TR 5C3 / ISO/TR 10400).  A
  measured wall within the 12.5 % tolerance leaves the API ratings as they
  are; a measured wall *below* the minimum rates the joint as pipe whose
  specified wall is ``t_meas / 0.875`` (collapse and internal yield: the
  same minimum-value convention, continuous at the tolerance) and its body
  on ``t_meas``; basis ``measured wall``.
* **other steel** (ASTM A53, A139, A778, A312, HSLA strip casing; collapse
  method ``timoshenko``): Timoshenko collapse, Barlow ``2 Y t / D`` and body
  yield on the *minimum* wall the standard allows, ``(1 - u) t`` (u = 0.125),
  or on the measured wall when one is given: these standards state the
  specified wall and let it fall 12.5 % under, and the formulas have no
  tolerance built in.
* **thermoplastics** (``thermoplastic``): pressure rating ``2 S / (SDR - 1)``
  from the hydrostatic design stress (ASTM D2241 / D1785) and collapse by
  the elastic formula by SDR (ASTM F480), SDR on the minimum (or measured)
  wall, both derated for the job temperature by the material's derating
  table (entered maker's figures too: thermoplastic ratings are stated at
  73 F); the body in tension on the short-term tensile strength.
* entered ratings win (basis ``maker's figure``); screens (and any
  perforated pipe, entered as kind ``"screen"``) without an entered rating
  are unrated (nan), never given blank-pipe strength.
* weight and bore use the specified (nominal) wall; the fluid a joint
  displaces is its own material, ``W / (rho g)`` per length
  (``JointArrays.displaced_area``).
"""

from __future__ import annotations

import dataclasses
import enum
import math
import operator
from collections.abc import Mapping, Sequence

import numpy as np

from rigplan.engine.burst import barlow, thermoplastic_pressure_rating
from rigplan.engine.collapse import API_5C3_YIELD_RANGE, api_5c3, ellipticity_from_diameters, thermoplastic_sdr, timoshenko
from rigplan.engine.connections import connection_capacity
from rigplan.engine.findings import Finding, Kind, Severity
from rigplan.errors import InputError
from rigplan.engine.materials import (LIBRARY, REFERENCE_TEMPERATURE, Material, get_material,
                                      temperature_factor)
from rigplan.engine.stringmodel import CONNECTION_KINDS, G, JOINT_KINDS, JointArrays, JointSpec
from rigplan.engine.tubulars import body_yield, linear_mass, minimum_wall, sdr, steel_area

__all__ = [
    "RatingCode",
    "DEFAULT_ELLIPTICITY",
    "PERFORATED_KINDS",
    "rating_wall",
    "joint_weight",
    "joint_ellipticity",
    "rate_joints",
]

#: Ellipticity assumed for steel casing when none is measured or entered [-]
#: (1 %: common practice, no source).
DEFAULT_ELLIPTICITY = 0.01

#: Joint kinds that are perforated or slotted: no formula rating, ever.
PERFORATED_KINDS = ("screen",)

#: Relative slack before a measurement is flagged (rounding of a reading).
_FLAG_SLACK = 1e-9


class RatingCode(enum.StrEnum):
    """Codes of the findings :func:`rate_joints` returns."""

    #: a measured wall under the minimum its standard allows, (1 - u) x the
    #: specified wall (quantities ``measured_wall``, ``minimum_wall``)
    WALL_UNDER_MINIMUM = "wall_under_minimum"
    #: a measured ellipticity above the one the plan assumed for the joint
    #: (quantities ``ellipticity``, ``assumed_ellipticity``)
    ELLIPTICITY_ABOVE_ASSUMED = "ellipticity_above_assumed"
    #: a thermoplastic joint above the last temperature of its derating table:
    #: its pressure and collapse ratings are unrated there (quantity ``temperature``)
    ABOVE_DERATING_TABLE = "above_derating_table"


def _is_given(value):
    return value is not None and not (isinstance(value, float) and math.isnan(value))


def _where(spec, field_name=None):
    label = spec.label if spec.label else "?"
    return f"joint {label}" + (f".{field_name}" if field_name else "")


def _check_spec(spec: JointSpec, material: Material) -> None:
    """Raise InputError naming the joint and field for any bad value."""
    if spec.kind not in JOINT_KINDS:
        raise InputError(_where(spec, "kind"),
                         f"unknown joint kind {spec.kind!r}; expected one of {', '.join(JOINT_KINDS)}")
    if spec.connection not in CONNECTION_KINDS:
        raise InputError(_where(spec, "connection"),
                         f"unknown connection {spec.connection!r}; expected one of "
                         f"{', '.join(CONNECTION_KINDS)}")

    def positive(name, value):
        if _is_given(value) and not value > 0:
            raise InputError(_where(spec, name), f"must be greater than 0; got {value!r}")

    for name in ("od", "wall", "length"):
        value = getattr(spec, name)
        if value is None or not value > 0:
            raise InputError(_where(spec, name), f"must be greater than 0 m; got {value!r}")
    if spec.wall >= spec.od / 2:
        raise InputError(_where(spec, "wall"),
                         f"wall {spec.wall:g} m must be less than half the od {spec.od:g} m")
    for name in ("measured_length", "measured_wall", "weight", "weight_per_length",
                 "collapse_rating", "burst_rating", "tensile_rating", "connection_rating",
                 "dmax", "dmin"):
        positive(name, getattr(spec, name))
    if _is_given(spec.measured_wall) and spec.measured_wall >= spec.od / 2:
        raise InputError(_where(spec, "measured_wall"),
                         f"measured wall {spec.measured_wall:g} m must be less than half the od "
                         f"{spec.od:g} m")
    if _is_given(spec.bore) and not 0 < spec.bore < spec.od:
        raise InputError(_where(spec, "bore"),
                         f"bore must lie between 0 and the od {spec.od:g} m; got {spec.bore!r}")
    if _is_given(spec.weld_efficiency) and not 0 < spec.weld_efficiency <= 1:
        raise InputError(_where(spec, "weld_efficiency"),
                         f"must satisfy 0 < efficiency <= 1 [-]; got {spec.weld_efficiency!r}")
    if _is_given(spec.ellipticity) and not 0 <= spec.ellipticity < 1:
        raise InputError(_where(spec, "ellipticity"),
                         f"must satisfy 0 <= ellipticity < 1 [-] (0.01 = 1 %); got {spec.ellipticity!r}")
    if _is_given(spec.dmax) != _is_given(spec.dmin):
        raise InputError(_where(spec, "dmax" if _is_given(spec.dmin) else "dmin"),
                         "give both dmax and dmin [m] (measured largest and smallest OD), or neither")
    if (material.collapse_method == "api_5c3" and not _is_given(spec.collapse_rating)
            and not math.isnan(material.yield_strength)):
        lo, hi = API_5C3_YIELD_RANGE
        if not lo <= material.yield_strength <= hi:
            raise InputError(_where(spec, "material"),
                             f"material {material.key!r}: yield strength "
                             f"{material.yield_strength:g} Pa is outside the 20 to 200 ksi range "
                             f"of the API TR 5C3 collapse formulas; enter a collapse rating or "
                             f"use another collapse method")
    if _is_given(spec.dmax) and spec.dmin > spec.dmax:
        raise InputError(_where(spec, "dmin"),
                         f"dmin {spec.dmin:g} m exceeds dmax {spec.dmax:g} m")


def is_api_convention(material: Material) -> bool:
    """True when the material is rated by API TR 5C3 (specified wall)."""
    return material.collapse_method == "api_5c3"


def rating_wall(spec: JointSpec, material: Material):
    """Wall the joint's collapse rating is computed on, and its basis.

    Parameters
    ----------
    spec : JointSpec
        The joint.
    material : Material
        Its material (rating convention and wall under-tolerance ``u``).

    Returns
    -------
    wall : float
        API grades: the specified wall, or ``t_meas / (1 - u)`` for a
        measured wall under the minimum ``(1 - u) t``.  Other materials: the
        measured wall when given, else the minimum wall ``(1 - u) t`` [m].
    basis : str
        ``"specified wall"``, ``"minimum wall"`` or ``"measured wall"``.

    Notes
    -----
    API TR 5C3 (ISO/TR 10400): the collapse formulas take the specified
    wall (their constants give minimum values over the API 5CT tolerance);
    ASTM A53/A53M, A312/A312M and similar pipe standards allow the wall
    12.5 % under the specified thickness, which the Timoshenko and Barlow
    formulas do not allow for.

    Examples
    --------
    >>> from rigplan.engine.stringmodel import JointSpec
    >>> from rigplan.engine.materials import get_material
    >>> j = JointSpec("J1", "blank", "a53b", od=0.4064, wall=0.009525, length=6.0)
    >>> wall, basis = rating_wall(j, get_material("a53b"))
    >>> round(wall, 7), basis
    (0.0083344, 'minimum wall')
    >>> k = JointSpec("J2", "blank", "k55", od=0.244475, wall=0.0089916, length=12.0)
    >>> rating_wall(k, get_material("k55"))
    (0.0089916, 'specified wall')
    """
    u = material.wall_under_tolerance
    t_min = float(minimum_wall(spec.wall, u))
    measured = _is_given(spec.measured_wall)
    if is_api_convention(material):
        if measured and spec.measured_wall < t_min:
            return float(spec.measured_wall) / (1.0 - u), "measured wall"
        return float(spec.wall), "specified wall"
    if measured:
        return float(spec.measured_wall), "measured wall"
    return t_min, "minimum wall"


def joint_weight(spec: JointSpec, material: Material):
    """Air weight of a joint, and which rule gave it.

    Parameters
    ----------
    spec : JointSpec
        The joint (its run length is the measured length when given).
    material : Material
        Its material (density for the plain-end formula).

    Returns
    -------
    weight : float
        Air weight of the joint [N].
    how : str
        ``"entered weight"``, ``"entered weight per length"`` or
        ``"plain-end formula"`` (``rho g pi/4 (D^2 - d^2) L`` on the
        specified wall, :func:`rigplan.engine.tubulars.linear_mass`).

    Raises
    ------
    InputError
        If nothing gives a weight (no entry and no material density).

    Notes
    -----
    A tally or maker's weight wins over the formula (string-mechanics
    reference, weight): couplings, screens, centralizers, shoes and collars
    weigh more or less than plain-end pipe.
    """
    if _is_given(spec.weight):
        return float(spec.weight), "entered weight"
    if _is_given(spec.weight_per_length):
        return float(spec.weight_per_length) * spec.run_length, "entered weight per length"
    if math.isnan(material.density):
        raise InputError(_where(spec, "weight"),
                         f"material {material.key!r} has no density: enter the joint weight [N] "
                         f"or weight per length [N/m] from the maker's data")
    mass = linear_mass(spec.od, spec.wall, material.density)
    return mass * G * spec.run_length, "plain-end formula"


def displaced_area(spec: JointSpec, material: Material, weight: float, how: str) -> float:
    """Cross-section of the joint's own material: the area that displaces fluid [m^2].

    .. math:: A_s = \\frac{W}{\\rho g L}

    Parameters
    ----------
    spec : JointSpec
        The joint (run length ``L`` [m]).
    material : Material
        Its material (density ``rho`` [kg/m^3]).
    weight : float
        The joint's air weight ``W`` [N] from :func:`joint_weight`.
    how : str
        Which rule gave the weight (:func:`joint_weight`).

    Returns
    -------
    float
        ``W / (rho g L)`` for an entered weight (a screen's weight per
        length, coupled casing at its nominal weight, a joint weight) when
        the material's density is known; the tube section ``pi t (D - t)``
        when the weight comes from that geometry (the same value); the
        tube between the OD and the bore when the density is unknown (the
        best the data give).

    Notes
    -----
    Archimedes' principle: a body in a fluid is buoyed by the weight of the
    fluid it displaces, which for a joint is the volume of its own material
    ``W / (rho g)``, couplings and wire wrap included; not the tube between
    the entered OD and bore.  Valid for a joint of one material; a float
    shoe's cement or a centralizer's bow springs count at the joint's
    material density.

    Examples
    --------
    19 lb/ft of stainless (8,000 kg/m^3) displaces 5.48 in^2:

    >>> from rigplan.engine.stringmodel import JointSpec
    >>> from rigplan.engine.materials import get_material
    >>> w = 19 * 0.45359237 * 9.80665 / 0.3048            # [N/m]
    >>> j = JointSpec("S1", "screen", "ss304", od=0.219075, wall=0.0127, length=6.096,
    ...               weight_per_length=w)
    >>> weight, how = joint_weight(j, get_material("ss304"))
    >>> round(displaced_area(j, get_material("ss304"), weight, how) / 0.0254**2, 2)
    5.48
    """
    if how == "plain-end formula":
        return float(steel_area(spec.od, spec.wall))
    if not math.isnan(material.density):
        return float(weight) / (material.density * G * spec.run_length)
    bore = spec.bore if _is_given(spec.bore) else spec.od - 2.0 * spec.wall
    return math.pi / 4.0 * (spec.od ** 2 - bore ** 2)


def joint_ellipticity(spec: JointSpec, default_ellipticity=DEFAULT_ELLIPTICITY):
    """Ellipticity used for a Timoshenko rating [-].

    From the measured ``dmax``/``dmin`` when given
    (:func:`rigplan.engine.collapse.ellipticity_from_diameters`), else the entered
    ``ellipticity``, else ``default_ellipticity``.
    """
    if _is_given(spec.dmax) and _is_given(spec.dmin):
        return ellipticity_from_diameters(spec.dmax, spec.dmin)
    if _is_given(spec.ellipticity):
        return float(spec.ellipticity)
    return float(default_ellipticity)


#: JointSpec fields a rating depends on (all but the label, the lengths, the
#: tally note and the rejection flag).
_RATING_FIELDS = tuple(f.name for f in dataclasses.fields(JointSpec)
                       if f.name not in ("label", "length", "measured_length", "note", "rejected"))
_rating_key = operator.attrgetter(*_RATING_FIELDS)


def rate_joints(specs: Sequence[JointSpec], materials: Mapping[str, Material] | None = None,
                default_ellipticity: float = DEFAULT_ELLIPTICITY,
                temperature: float = REFERENCE_TEMPERATURE) -> JointArrays:
    """Per-joint weights, pressure areas and ratings for a string.

    A string usually holds a few kinds of joint in many lengths, so each
    distinct joint (all but its label, length and tally note) is rated once
    and its weight scaled by length; the result is identical to rating every
    joint on its own (:func:`rate_each_joint`, which also gives the error
    messages).

    Parameters
    ----------
    specs : sequence of JointSpec
        Joints in running order (joint 1 first).  Every spec given is rated;
        leave rejected joints out (``StringPlan.running_joints()``).
    materials : mapping of str to Material, optional
        Material library; default :data:`rigplan.engine.materials.LIBRARY`.
    default_ellipticity : float, optional
        Ellipticity for Timoshenko ratings when a joint gives none [-];
        default 0.01 (common practice, no source).
    temperature : float, optional
        Job temperature [C] at which thermoplastic ratings are derated;
        default 23 C (73.4 F), the temperature they are stated at.

    Returns
    -------
    JointArrays
        ``length`` [m] (measured when given), ``od`` and ``bore`` [m]
        (bore: entered, else ``od - 2 wall`` on the specified wall),
        ``weight`` [N] (entered, else entered per length x length, else the
        plain-end formula on the specified wall), ``displaced_area``
        [m^2] (:func:`displaced_area`), and the ratings by the conventions
        of the module docstring:

        * ``collapse_rating`` [Pa]: entered; else nan for screens and for
          materials rated only by entry; else by ``material.collapse_method``
          on :func:`rating_wall` -- ``timoshenko`` (ellipticity from
          dmax/dmin, the joint's entry or the default), ``api_5c3``, or
          ``thermoplastic`` by SDR (derated);
        * ``burst_rating`` [Pa]: entered; nan for screens; API grades
          ``0.875 x 2 Y t / D``; thermoplastics ``2 S / (SDR - 1)``
          (derated); other steel Barlow ``2 Y t_min / D``;
        * ``body_rating`` [N]: entered tensile rating; nan for screens;
          else ``Y A_s`` (API: specified wall; others: minimum wall; a
          measured wall as the module docstring says);
        * ``connection_rating`` [N]:
          :func:`rigplan.engine.connections.connection_capacity` with the body
          rating;
        * ``collapse_method``: the method used per joint
          (``"entered"``, ``"unrated"``, ``"timoshenko"``, ``"api_5c3"``,
          ``"thermoplastic"``);
        * ``collapse_basis``, ``burst_basis``, ``tension_basis``: what each
          rating rests on (``RATING_BASES``);
        * ``findings``: :class:`RatingCode` findings (a measured wall under
          the standard's minimum, an ellipticity above the assumption, a
          thermoplastic joint above its derating table).

    Raises
    ------
    InputError
        Naming the joint and field (``"joint J12.wall"``) for an unknown
        material, kind or connection, a value out of range, or a joint with
        no weight (no entry and a material without density).

    Notes
    -----
    A formula whose material data is nan (unknown modulus, yield or design
    stress) gives nan and the basis ``"unrated"``.  Perforated or slotted
    pipe must be entered as kind ``"screen"``: the data model has no other
    perforation flag.

    Examples
    --------
    >>> from rigplan.engine.stringmodel import JointSpec
    >>> j = JointSpec("J1", "blank", "a53b", od=0.4064, wall=0.009525, length=6.0,
    ...               weld_efficiency=0.85)
    >>> arrays = rate_joints([j])
    >>> arrays.collapse_method
    ('timoshenko',)
    >>> round(float(arrays.connection_rating[0] / arrays.body_rating[0]), 2)
    0.85
    """
    specs = tuple(specs)
    if len(specs) < 8:
        return rate_each_joint(specs, materials, default_ellipticity, temperature)
    lengths = [s.run_length for s in specs]
    if not all(isinstance(x, (int, float)) and math.isfinite(x) and x > 0 for x in lengths):
        return rate_each_joint(specs, materials, default_ellipticity, temperature)   # raises, naming the joint
    index = {}
    which = []
    first = []
    for i, s in enumerate(specs):
        key = _rating_key(s)
        k = index.setdefault(key, len(index))
        if k == len(first):
            first.append(i)
        which.append(k)
    if len(index) * 2 > len(specs):
        return rate_each_joint(specs, materials, default_ellipticity, temperature)
    uniq = [dataclasses.replace(specs[i], label=specs[i].label, length=1.0, measured_length=None)
            for i in first]
    try:
        base = rate_each_joint(uniq, materials, default_ellipticity, temperature)
    except (InputError, ValueError):
        return rate_each_joint(specs, materials, default_ellipticity, temperature)   # the message names the joint
    w = np.asarray(which)
    length = np.asarray(lengths, dtype=float)
    fixed = np.array([u.weight is not None for u in uniq], dtype=bool)[w]
    weight = np.where(fixed, base.weight[w], base.weight[w] * length)
    # a fixed joint weight over its own length: the base was rated on 1 m
    displaced = np.where(fixed, base.displaced_area[w] / length, base.displaced_area[w])
    findings = []
    if base.findings:                 # each distinct joint's findings, for every copy
        members = {}
        for i, k in enumerate(which):
            members.setdefault(k, []).append(i)
        for f in base.findings:
            findings.extend(dataclasses.replace(f, joint=i + 1, label=specs[i].label)
                            for i in members[f.joint - 1])
        findings.sort(key=lambda f: f.joint)
    return JointArrays(
        label=tuple(s.label for s in specs), kind=tuple(s.kind for s in specs),
        length=length, od=base.od[w], bore=base.bore[w], weight=weight,
        collapse_rating=base.collapse_rating[w], burst_rating=base.burst_rating[w],
        body_rating=base.body_rating[w], connection_rating=base.connection_rating[w],
        collapse_method=tuple(base.collapse_method[i] for i in which),
        yield_strength=base.yield_strength[w], rating_wall=base.rating_wall[w],
        displaced_area=displaced,
        collapse_basis=tuple(base.collapse_basis[i] for i in which),
        burst_basis=tuple(base.burst_basis[i] for i in which),
        tension_basis=tuple(base.tension_basis[i] for i in which),
        derating=tuple(base.derating[i] for i in which),
        rating_temperature=base.rating_temperature, findings=tuple(findings),
        modulus=base.modulus[w],
    )


def rate_each_joint(specs: Sequence[JointSpec], materials: Mapping[str, Material] | None = None,
                    default_ellipticity: float = DEFAULT_ELLIPTICITY,
                    temperature: float = REFERENCE_TEMPERATURE) -> JointArrays:
    """:func:`rate_joints`, one joint at a time (the reference behaviour)."""
    table = LIBRARY if materials is None else materials
    specs = tuple(specs)

    mats = []
    for spec in specs:
        if not isinstance(spec, JointSpec):
            raise TypeError(f"rate_joints expects JointSpec items; got {type(spec).__name__}")
        try:
            material = get_material(spec.material, table)
        except KeyError as err:
            raise InputError(_where(spec, "material"), err.args[0]) from None
        _check_spec(spec, material)
        mats.append(material)

    n = len(specs)
    length = np.array([s.run_length for s in specs], dtype=float)
    od = np.array([s.od for s in specs], dtype=float)
    wall = np.array([s.wall for s in specs], dtype=float)
    bore = np.array([s.bore if _is_given(s.bore) else s.od - 2.0 * s.wall for s in specs],
                    dtype=float)
    weights = [joint_weight(s, m) for s, m in zip(specs, mats)]
    weight = np.array([w for w, _ in weights], dtype=float)
    displaced = np.array([displaced_area(s, m, w, how) for (w, how), s, m
                          in zip(weights, specs, mats)], dtype=float)
    walls = [rating_wall(s, m) for s, m in zip(specs, mats)]
    t_rate = np.array([w for w, _ in walls], dtype=float)
    wall_basis = np.array([b for _, b in walls], dtype=object)
    measured = np.array([_is_given(s.measured_wall) for s in specs], dtype=bool)
    t_meas = np.array([s.measured_wall if _is_given(s.measured_wall) else np.nan for s in specs],
                      dtype=float)
    sy = np.array([m.yield_strength for m in mats], dtype=float)
    e_mod = np.array([m.youngs_modulus for m in mats], dtype=float)
    nu = np.array([m.poisson for m in mats], dtype=float)
    design_stress = np.array([m.design_stress for m in mats], dtype=float)
    convention = np.array([m.collapse_method for m in mats], dtype=object)
    api = convention == "api_5c3"
    plastic = convention == "thermoplastic"
    under_tol = np.array([m.wall_under_tolerance for m in mats], dtype=float)
    ellipticity = np.array([joint_ellipticity(s, default_ellipticity) for s in specs],
                           dtype=float)
    derating = tuple(m.temperature_derating for m in mats)
    factor = np.ones(n)
    for table in set(derating) - {""}:
        k = np.array([d == table for d in derating], dtype=bool)
        factor[k] = temperature_factor(table, temperature)

    def entered(name):
        return np.array([getattr(s, name) if _is_given(getattr(s, name)) else np.nan
                         for s in specs], dtype=float)

    perforated = np.array([s.kind in PERFORATED_KINDS for s in specs], dtype=bool)

    # collapse ---------------------------------------------------------------
    collapse = entered("collapse_rating")
    method = np.array(
        ["entered" if _is_given(s.collapse_rating)
         else "unrated" if (s.kind in PERFORATED_KINDS or m.collapse_method == "entered")
         else m.collapse_method
         for s, m in zip(specs, mats)],
        dtype=object,
    )
    for name, formula in (
        ("timoshenko", lambda k: timoshenko(od[k], t_rate[k], sy[k], ellipticity[k],
                                            e_mod[k], nu[k])),
        ("api_5c3", lambda k: api_5c3(od[k], t_rate[k], sy[k])),
        ("thermoplastic", lambda k: thermoplastic_sdr(sdr(od[k], t_rate[k]), e_mod[k], nu[k])),
    ):
        k = method == name
        if np.any(k):
            collapse[k] = formula(k)
    collapse = collapse * factor          # thermoplastics at the job temperature
    # a formula without the data it needs (nan modulus or yield) is unrated
    method[np.isnan(collapse)] = "unrated"
    collapse_basis = np.where(method == "entered", "maker's figure",
                              np.where(method == "unrated", "unrated", wall_basis))

    # burst ------------------------------------------------------------------
    burst = entered("burst_rating")
    burst_basis = np.where(np.isnan(burst), "unrated", "maker's figure").astype(object)
    formula_burst = np.isnan(burst) & ~perforated
    k = formula_burst & api
    if np.any(k):   # API TR 5C3 internal yield, 0.875 x 2 Y t / D on the (equivalent) specified wall
        burst[k] = barlow(od[k], t_rate[k], sy[k], wall_factor=0.875)
    k = formula_burst & plastic
    if np.any(k):   # ISO equation from the hydrostatic design stress (nan: unrated)
        ok = k & np.isfinite(design_stress)
        burst[ok] = thermoplastic_pressure_rating(sdr(od[ok], t_rate[ok]), design_stress[ok])
    k = formula_burst & ~api & ~plastic
    if np.any(k):   # Barlow on the minimum or measured wall: no further factor
        burst[k] = barlow(od[k], t_rate[k], sy[k], wall_factor=1.0)
    burst = burst * factor
    k = formula_burst & np.isfinite(burst)
    burst_basis[k] = wall_basis[k]
    burst_basis[np.isnan(burst)] = "unrated"

    # body -------------------------------------------------------------------
    body = entered("tensile_rating")
    tension_basis = np.where(np.isnan(body), "unrated", "maker's figure").astype(object)
    k = np.isnan(body) & ~perforated
    if np.any(k):
        # API: specified wall, or the measured wall under the minimum; others:
        # the minimum or measured wall
        t_body = np.where(api, np.where(measured & (wall_basis == "measured wall"), t_meas, wall),
                          t_rate)
        body[k] = body_yield(od[k], t_body[k], sy[k])
        ok = k & np.isfinite(body)
        tension_basis[ok] = wall_basis[ok]

    # connection at each joint's top -------------------------------------------
    connection = np.array(
        [connection_capacity(s.connection, body[i], s.weld_efficiency, s.connection_rating)
         for i, s in enumerate(specs)],
        dtype=float,
    )

    findings = []
    for i, (s, m) in enumerate(zip(specs, mats)):
        findings.extend(_joint_findings(i, s, m, default_ellipticity, factor[i], temperature,
                                        t_meas[i], under_tol[i], ellipticity[i]))

    return JointArrays(
        label=tuple(s.label for s in specs),
        kind=tuple(s.kind for s in specs),
        length=length,
        od=od,
        bore=bore,
        weight=weight,
        collapse_rating=collapse,
        burst_rating=burst,
        body_rating=body,
        connection_rating=connection,
        collapse_method=tuple(str(x) for x in method),
        yield_strength=sy, rating_wall=t_rate, modulus=e_mod,
        displaced_area=displaced,
        collapse_basis=tuple(str(x) for x in collapse_basis),
        burst_basis=tuple(str(x) for x in burst_basis),
        tension_basis=tuple(str(x) for x in tension_basis),
        derating=derating,
        rating_temperature=float(temperature),
        findings=tuple(findings),
    )


def _joint_findings(i, spec, material, default_ellipticity, factor, temperature, t_meas,
                    under_tolerance, ellipticity):
    """Findings of one joint's rating (index ``i`` in running order)."""
    out = []
    common = dict(severity=Severity.WARNING, joint=i + 1, label=spec.label)
    if not math.isnan(t_meas):
        t_min = spec.wall * (1.0 - under_tolerance)
        if t_meas < t_min * (1.0 - _FLAG_SLACK):
            out.append(Finding(RatingCode.WALL_UNDER_MINIMUM, quantities={
                "measured_wall": (t_meas, Kind.DIAMETER), "minimum_wall": (t_min, Kind.DIAMETER),
                "specified_wall": (spec.wall, Kind.DIAMETER)},
                context={"material": material.key}, **common))
    if _is_given(spec.dmax) and _is_given(spec.dmin):
        assumed = (float(spec.ellipticity) if _is_given(spec.ellipticity)
                   else float(default_ellipticity))
        if ellipticity > assumed * (1.0 + _FLAG_SLACK) + _FLAG_SLACK:
            out.append(Finding(RatingCode.ELLIPTICITY_ABOVE_ASSUMED, quantities={
                "ellipticity": (ellipticity, Kind.RATIO),
                "assumed_ellipticity": (assumed, Kind.RATIO),
                "od_max": (spec.dmax, Kind.DIAMETER), "od_min": (spec.dmin, Kind.DIAMETER)},
                **common))
    if math.isnan(factor):
        out.append(Finding(RatingCode.ABOVE_DERATING_TABLE, quantities={
            "temperature": (temperature, Kind.TEMPERATURE)},
            context={"material": material.key}, **common))
    return out
