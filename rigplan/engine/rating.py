"""Rate every joint of a string: weight, pressure areas and strength ratings.

:func:`rate_joints` turns the user's :class:`rigplan.engine.stringmodel.JointSpec`
list into the per-joint arrays of :class:`rigplan.engine.stringmodel.JointArrays`
that the load engine uses.  It picks a formula per joint by its material and
adds no physics of its own; the formulas live in :mod:`rigplan.engine.tubulars`,
:mod:`rigplan.engine.collapse`, :mod:`rigplan.engine.burst` and :mod:`rigplan.engine.connections`.

Rules applied (rigplan rules; string mechanics (ADE 1986)):

* ratings use the minimum wall -- the measured wall when given, else the
  specified wall less the material's under-tolerance;
* weight and pressure bore use the specified (nominal) wall;
* entered ratings win; screens (and any perforated pipe, entered as kind
  ``"screen"``) without an entered rating are unrated (nan), never given
  blank-pipe strength.
"""

from __future__ import annotations

import dataclasses
import math
import operator
from collections.abc import Mapping, Sequence

import numpy as np

from rigplan.engine.burst import barlow
from rigplan.engine.collapse import API_5C3_YIELD_RANGE, api_5c3, ellipticity_from_diameters, thermoplastic_sdr, timoshenko
from rigplan.engine.connections import connection_capacity
from rigplan.errors import InputError
from rigplan.engine.materials import LIBRARY, Material, get_material
from rigplan.engine.stringmodel import CONNECTION_KINDS, G, JOINT_KINDS, JointArrays, JointSpec
from rigplan.engine.tubulars import body_yield, linear_mass, minimum_wall, sdr

__all__ = [
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


def rating_wall(spec: JointSpec, material: Material):
    """Wall used for the joint's ratings, and how it was found.

    Parameters
    ----------
    spec : JointSpec
        The joint.
    material : Material
        Its material (for the wall under-tolerance).

    Returns
    -------
    wall : float
        Measured wall when given, else ``wall * (1 - under_tolerance)`` [m].
    how : str
        ``"measured"`` or ``"specified less <u> %"``.

    Examples
    --------
    >>> from rigplan.engine.stringmodel import JointSpec
    >>> from rigplan.engine.materials import get_material
    >>> j = JointSpec("J1", "blank", "a53b", od=0.4064, wall=0.009525, length=6.0)
    >>> wall, how = rating_wall(j, get_material("a53b"))
    >>> round(wall, 7), how
    (0.0083344, 'specified less 12.5 %')
    """
    if _is_given(spec.measured_wall):
        return float(spec.measured_wall), "measured"
    u = material.wall_under_tolerance
    return float(minimum_wall(spec.wall, u)), f"specified less {100 * u:g} %"


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
                default_ellipticity: float = DEFAULT_ELLIPTICITY) -> JointArrays:
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

    Returns
    -------
    JointArrays
        ``length`` [m] (measured when given), ``od`` and ``bore`` [m]
        (bore: entered, else ``od - 2 wall`` on the specified wall),
        ``weight`` [N] (entered, else entered per length x length, else the
        plain-end formula on the specified wall), and the ratings:

        * ``collapse_rating`` [Pa]: entered; else nan for screens and for
          materials rated only by entry; else by ``material.collapse_method``
          on the minimum wall -- ``timoshenko`` (ellipticity from dmax/dmin,
          the joint's entry or the default), ``api_5c3``, or
          ``thermoplastic`` by SDR;
        * ``burst_rating`` [Pa]: entered; nan for screens; else Barlow
          ``2 Sy t_min / D`` (the minimum wall already holds the
          tolerance, so no further 0.875);
        * ``body_rating`` [N]: entered tensile rating; nan for screens;
          else ``Sy A_s`` on the minimum wall;
        * ``connection_rating`` [N]:
          :func:`rigplan.engine.connections.connection_capacity` with the body
          rating;
        * ``collapse_method``: the method used per joint
          (``"entered"``, ``"unrated"``, ``"timoshenko"``, ``"api_5c3"``,
          ``"thermoplastic"``).

    Raises
    ------
    InputError
        Naming the joint and field (``"joint J12.wall"``) for an unknown
        material, kind or connection, a value out of range, or a joint with
        no weight (no entry and a material without density).

    Notes
    -----
    API TR 5C3 collapse and body yield applied to the minimum wall are lower
    than the API tables, which use the specified wall (the 5C3 burst formula
    carries the tolerance as its 0.875 factor, so Barlow on the minimum wall
    matches the tables).  A formula whose material data is nan (unknown
    modulus or yield) gives nan and the method ``"unrated"``.  Perforated or
    slotted pipe must be entered as kind ``"screen"``: the data model has no
    other perforation flag.

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
        return rate_each_joint(specs, materials, default_ellipticity)
    lengths = [s.run_length for s in specs]
    if not all(isinstance(x, (int, float)) and math.isfinite(x) and x > 0 for x in lengths):
        return rate_each_joint(specs, materials, default_ellipticity)   # raises, naming the joint
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
        return rate_each_joint(specs, materials, default_ellipticity)
    uniq = [dataclasses.replace(specs[i], label=specs[i].label, length=1.0, measured_length=None)
            for i in first]
    try:
        base = rate_each_joint(uniq, materials, default_ellipticity)
    except (InputError, ValueError):
        return rate_each_joint(specs, materials, default_ellipticity)   # the message names the joint
    w = np.asarray(which)
    length = np.asarray(lengths, dtype=float)
    fixed = np.array([u.weight is not None for u in uniq], dtype=bool)[w]
    weight = np.where(fixed, base.weight[w], base.weight[w] * length)
    return JointArrays(
        label=tuple(s.label for s in specs), kind=tuple(s.kind for s in specs),
        length=length, od=base.od[w], bore=base.bore[w], weight=weight,
        collapse_rating=base.collapse_rating[w], burst_rating=base.burst_rating[w],
        body_rating=base.body_rating[w], connection_rating=base.connection_rating[w],
        collapse_method=tuple(base.collapse_method[i] for i in which),
        yield_strength=base.yield_strength[w], rating_wall=base.rating_wall[w],
        modulus=base.modulus[w],
    )


def rate_each_joint(specs: Sequence[JointSpec], materials: Mapping[str, Material] | None = None,
                    default_ellipticity: float = DEFAULT_ELLIPTICITY) -> JointArrays:
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

    length = np.array([s.run_length for s in specs], dtype=float)
    od = np.array([s.od for s in specs], dtype=float)
    bore = np.array([s.bore if _is_given(s.bore) else s.od - 2.0 * s.wall for s in specs],
                    dtype=float)
    weight = np.array([joint_weight(s, m)[0] for s, m in zip(specs, mats)], dtype=float)
    t_min = np.array([rating_wall(s, m)[0] for s, m in zip(specs, mats)], dtype=float)
    sy = np.array([m.yield_strength for m in mats], dtype=float)
    e_mod = np.array([m.youngs_modulus for m in mats], dtype=float)
    nu = np.array([m.poisson for m in mats], dtype=float)
    ellipticity = np.array([joint_ellipticity(s, default_ellipticity) for s in specs],
                           dtype=float)

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
        ("timoshenko", lambda k: timoshenko(od[k], t_min[k], sy[k], ellipticity[k],
                                            e_mod[k], nu[k])),
        ("api_5c3", lambda k: api_5c3(od[k], t_min[k], sy[k])),
        ("thermoplastic", lambda k: thermoplastic_sdr(sdr(od[k], t_min[k]), e_mod[k], nu[k])),
    ):
        k = method == name
        if np.any(k):
            collapse[k] = formula(k)
    # a formula without the data it needs (nan modulus or yield) is unrated
    method[np.isnan(collapse)] = "unrated"

    # burst ------------------------------------------------------------------
    burst = entered("burst_rating")
    k = np.isnan(burst) & ~perforated
    if np.any(k):
        burst[k] = barlow(od[k], t_min[k], sy[k], wall_factor=1.0)

    # body -------------------------------------------------------------------
    body = entered("tensile_rating")
    k = np.isnan(body) & ~perforated
    if np.any(k):
        body[k] = body_yield(od[k], t_min[k], sy[k])

    # connection at each joint's top -------------------------------------------
    connection = np.array(
        [connection_capacity(s.connection, body[i], s.weld_efficiency, s.connection_rating)
         for i, s in enumerate(specs)],
        dtype=float,
    )

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
        yield_strength=sy, rating_wall=t_min, modulus=e_mod,
    )
