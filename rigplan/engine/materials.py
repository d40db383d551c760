"""Material library for casing and screen: strength, stiffness, density, tolerance.

Each :class:`Material` carries SI values and, for every number, the text of
its source in ``sources`` (standard and table, ``"from memory"`` where a value
was recalled and not checked against the printed standard, or ``"common
practice, no source"``).  ``nan`` means *unknown*: any rating that needs it is
unrated.

User additions (from a material file, read by the formats layer) go in with
:func:`register_material`; :func:`get_material` looks a key up.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

__all__ = [
    "COLLAPSE_METHODS",
    "FAMILIES",
    "Material",
    "LIBRARY",
    "get_material",
    "register_material",
    "known_keys",
    "TEMPERATURE_DERATING",
    "REFERENCE_TEMPERATURE",
    "JOB_TEMPERATURE_RANGE",
    "temperature_factor",
]

#: Pascal per psi (NIST SP 811, from the pound-force and the inch).
_PSI = 6894.757293168361
_KSI = 1000.0 * _PSI
_NAN = float("nan")

#: How a material's collapse rating is obtained (see :mod:`rigplan.engine.rating`).
COLLAPSE_METHODS = ("timoshenko", "api_5c3", "thermoplastic", "entered")

#: Material families.
FAMILIES = ("steel", "stainless", "hsla", "api", "pvc", "fiberglass")

#: Numeric fields; each needs an entry in ``Material.sources``.
_NUMERIC_FIELDS = ("density", "yield_strength", "youngs_modulus", "poisson", "wall_under_tolerance")


#: Temperature at which the ratings of thermoplastic pipe are stated [C]
#: (73.4 F; ASTM D1785, D2241 and F480 rate at 73.4 F / 23 C).
REFERENCE_TEMPERATURE = 23.0

#: Job temperatures a plan may state [C]: from freezing to 60 C (140 F), the
#: highest temperature of the PVC derating table below.
JOB_TEMPERATURE_RANGE = (0.0, 60.0)


def _f_to_c(deg_f):
    return (deg_f - 32.0) * 5.0 / 9.0


#: Temperature derating tables: key -> (temperatures [C], factors [-], source).
#: A rating at the reference temperature times the factor at the service
#: temperature, interpolated linearly; 1.0 at or below the first entry; nan
#: above the last one (not recommended for service there: unrated).
TEMPERATURE_DERATING = {
    "pvc": (
        tuple(_f_to_c(t) for t in (73.4, 80.0, 90.0, 100.0, 110.0, 120.0, 130.0, 140.0)),
        (1.00, 0.88, 0.75, 0.62, 0.50, 0.40, 0.30, 0.22),
        "PVC temperature derating factors for pressure ratings, 73 F 1.00, 80 F 0.88, 90 F "
        "0.75, 100 F 0.62, 110 F 0.50, 120 F 0.40, 130 F 0.30, 140 F 0.22; 140 F the highest "
        "recommended service temperature (Uni-Bell PVC Pipe Association, Handbook of PVC Pipe, "
        "and the PVC pipe makers' technical manuals that reprint it, from memory).  Applied "
        "to collapse as well as pressure: the modulus and the strength of PVC both fall with "
        "temperature (common practice, no source; the factors are those of the long-term "
        "pressure rating, conservative for short-term collapse)",
    ),
}


def temperature_factor(table, temperature):
    """Derating factor of a thermoplastic rating at a service temperature.

    .. math:: f(T) = \\text{linear interpolation of the table};
        \\; f = 1 \\; (T \\le T_0); \\; \\text{unrated} \\; (T > T_{max})

    Parameters
    ----------
    table : str
        Key of :data:`TEMPERATURE_DERATING` (``"pvc"``); ``""`` means no
        derating (factor 1).
    temperature : float or array_like
        Service temperature [C].

    Returns
    -------
    float or ndarray
        Factor on the rating at 73.4 F / 23 C [-], 0 < f <= 1.  Nothing is
        gained below 73 F (the factor stays 1); above the table's last
        temperature (140 F / 60 C for PVC) the material is not recommended
        and has no rating: nan (unrated, never assumed).

    Notes
    -----
    PVC factors from the derating table cited in :data:`TEMPERATURE_DERATING`
    (from memory); valid 73 to 140 F.

    Examples
    --------
    PVC at 100 F (37.8 C): 0.62.

    >>> round(temperature_factor("pvc", (100 - 32) * 5 / 9), 2)
    0.62
    """
    import numpy as np

    t = np.asarray(temperature, dtype=float)
    if not table:
        out = np.ones_like(t)
    else:
        temps, factors, _ = TEMPERATURE_DERATING[table]
        out = np.interp(t, temps, factors, left=1.0, right=np.nan)
        out = np.where(t > temps[-1] + 1e-9, np.nan, out)
        out = np.where(np.isnan(t), np.nan, out)
    return float(out) if out.ndim == 0 else out


@dataclass(frozen=True)
class Material:
    """A pipe material as used for ratings, SI units.

    Attributes
    ----------
    key : str
        Library key (lower case, e.g. ``"a53b"``).
    name : str
        Human-readable name with its standard.
    density : float
        Density [kg/m^3] (nan = unknown: the weight must be entered).
    yield_strength : float
        Specified minimum yield strength [Pa] (for PVC the tensile strength
        of its cell class) (nan = unrated).
    youngs_modulus : float
        Young's modulus [Pa] (nan = unknown).
    poisson : float
        Poisson's ratio [-] (nan = unknown).
    wall_under_tolerance : float
        Fraction by which the wall may fall under the specified wall [-],
        e.g. 0.125.
    collapse_method : str
        ``"timoshenko"``, ``"api_5c3"``, ``"thermoplastic"`` or
        ``"entered"`` (only an entered rating counts).
    family : str
        One of :data:`FAMILIES`.
    sources : dict
        Field name -> source of that value.
    design_stress : float
        Hydrostatic design stress of a thermoplastic compound [Pa] (PVC 1120
        / 12454: 2,000 psi at 73 F), the long-term hoop stress its pressure
        rating is computed from; nan for metals or when unknown (then a
        thermoplastic burst rating is unrated).
    temperature_derating : str
        Key of :data:`TEMPERATURE_DERATING` whose factors derate this
        material's pressure and collapse ratings above 73 F; ``""`` for none.
    """

    key: str
    name: str
    density: float
    yield_strength: float
    youngs_modulus: float
    poisson: float
    wall_under_tolerance: float
    collapse_method: str
    family: str
    sources: dict = field(default_factory=dict, hash=False)
    design_stress: float = _NAN
    temperature_derating: str = ""

    def __post_init__(self):
        where = f"material {self.key!r}"
        if not isinstance(self.key, str) or not self.key.strip():
            raise ValueError(f"material key must be a non-empty string; got {self.key!r}")
        if self.collapse_method not in COLLAPSE_METHODS:
            raise ValueError(
                f"{where}: collapse_method must be one of {', '.join(COLLAPSE_METHODS)}; "
                f"got {self.collapse_method!r}"
            )
        if self.family not in FAMILIES:
            raise ValueError(
                f"{where}: family must be one of {', '.join(FAMILIES)}; got {self.family!r}"
            )
        for name, unit in (("density", "kg/m^3"), ("yield_strength", "Pa"),
                           ("youngs_modulus", "Pa")):
            value = float(getattr(self, name))
            if not math.isnan(value) and value <= 0:
                raise ValueError(f"{where}: {name} must be greater than 0 {unit} (or nan); got {value:g}")
        nu = float(self.poisson)
        if not math.isnan(nu) and not 0 <= nu < 0.5:
            raise ValueError(f"{where}: poisson must satisfy 0 <= poisson < 0.5 [-] (or nan); got {nu:g}")
        u = float(self.wall_under_tolerance)
        if math.isnan(u) or not 0 <= u < 1:
            raise ValueError(
                f"{where}: wall_under_tolerance must satisfy 0 <= u < 1 [-] (e.g. 0.125); got {u:g}"
            )
        s = float(self.design_stress)
        if not math.isnan(s) and s <= 0:
            raise ValueError(f"{where}: design_stress must be greater than 0 Pa (or nan); got {s:g}")
        if not math.isnan(s) and not self.sources.get("design_stress"):
            raise ValueError(f"{where}: no source given for design_stress")
        if self.temperature_derating and self.temperature_derating not in TEMPERATURE_DERATING:
            raise ValueError(
                f"{where}: temperature_derating must be one of "
                f"{', '.join(TEMPERATURE_DERATING)} or empty; got {self.temperature_derating!r}")
        missing = [name for name in _NUMERIC_FIELDS if not self.sources.get(name)]
        if missing:
            raise ValueError(f"{where}: no source given for {', '.join(missing)}")


# --- shared property sets, each with its source ---------------------------

_CARBON_STEEL = dict(
    density=7850.0,
    youngs_modulus=30.0e6 * _PSI,
    poisson=0.3,
)
_CARBON_STEEL_SOURCES = {
    "density": "ASTM A53/A53M and API 5L plain-end weight formula, 10.69 (D - t) t lb/ft "
               "(0.0246615 (D - t) t kg/m with mm), which implies 0.2836 lb/in^3 = 7850 kg/m^3",
    "youngs_modulus": "30,000,000 psi for carbon steel: common practice, no source",
    "poisson": "0.3 for carbon steel: common practice, no source",
}

_STAINLESS = dict(
    density=8000.0,
    youngs_modulus=28.0e6 * _PSI,
    poisson=0.29,
)
_STAINLESS_SOURCES = {
    "density": "8.00 g/cm^3 for 300-series austenitic stainless, handbook value, from memory "
               "(US weight tables use k = 10.93, about 0.290 lb/in^3)",
    "youngs_modulus": "28,000,000 psi (193 GPa) for 304/316 at room temperature, from memory",
    "poisson": "0.29 for austenitic stainless, from memory",
    "wall_under_tolerance": "ASTM A312/A312M: wall at any point not more than 12.5 % under the "
                            "specified wall, from memory; ASTM A778 states its own tolerance "
                            "(not checked here), so the A312 value is used for both",
}

_API_TOLERANCE = ("API 5CT (ISO 11960) wall-thickness tolerance -12.5 %, from memory")


def _steel(key, name, yield_ksi, yield_source, family="steel", collapse_method="timoshenko",
           tolerance_source="ASTM A53/A53M: minimum wall not more than 12.5 % under the "
                            "specified wall, from memory",
           collapse_source="Timoshenko and Gere (1961) ch. 7, the usual method for water-well "
                           "steel casing (string mechanics (ADE 1986))"):
    sources = dict(_CARBON_STEEL_SOURCES)
    sources.update(yield_strength=yield_source, wall_under_tolerance=tolerance_source,
                   collapse_method=collapse_source)
    return Material(key=key, name=name, yield_strength=yield_ksi * _KSI,
                    wall_under_tolerance=0.125, collapse_method=collapse_method,
                    family=family, sources=sources, **_CARBON_STEEL)


def _stainless(key, name, yield_ksi, yield_mpa):
    sources = dict(_STAINLESS_SOURCES)
    sources.update(
        yield_strength=f"ASTM A312/A312M tensile requirements, {name.split()[1]}: "
                       f"{yield_ksi} ksi [{yield_mpa} MPa] minimum yield; ASTM A778 grades "
                       f"carry the same minimum, from memory",
        collapse_method="Timoshenko and Gere (1961) ch. 7 with the stainless yield and modulus",
    )
    return Material(key=key, name=name, yield_strength=yield_ksi * _KSI,
                    wall_under_tolerance=0.125, collapse_method="timoshenko",
                    family="stainless", sources=sources, **_STAINLESS)


def _api(key, grade, yield_ksi):
    return _steel(
        key, f"API 5CT {grade} casing", yield_ksi,
        f"API 5CT (ISO 11960) Table C.5 tensile requirements, {grade}: {yield_ksi},000 psi "
        f"minimum yield (table number from memory)",
        family="api", collapse_method="api_5c3", tolerance_source=_API_TOLERANCE,
        collapse_source="API TR 5C3 (ISO/TR 10400) collapse regimes for API grades",
    )


_BUILT_IN = (
    _steel("a53b", "ASTM A53 Grade B steel pipe", 35,
           "ASTM A53/A53M Table 2 tensile requirements, Grade B: 35,000 psi [240 MPa] minimum "
           "yield, from memory"),
    _steel("hsla", "ASTM A1011 HSLAS Grade 50 Class 1 (welded casing from HSLA strip)", 50,
           "ASTM A1011/A1011M HSLAS Grade 50 Class 1: 50,000 psi [340 MPa] minimum yield, "
           "from memory (ASTM A1018 HSLAS Grade 50 carries the same minimum)",
           family="hsla",
           tolerance_source="12.5 % as for ASTM A53 pipe; the strip standard does not govern the "
                            "pipe wall: common practice, no source"),
    _stainless("ss304", "Stainless 304 (ASTM A312 / A778)", 30, 205),
    _stainless("ss304l", "Stainless 304L (ASTM A312 / A778)", 25, 170),
    _stainless("ss316", "Stainless 316 (ASTM A312 / A778)", 30, 205),
    _stainless("ss316l", "Stainless 316L (ASTM A312 / A778)", 25, 170),
    _api("h40", "H-40", 40),
    _api("j55", "J-55", 55),
    _api("k55", "K-55", 55),
    _api("n80", "N-80", 80),
    _api("l80", "L-80", 80),
    _api("p110", "P-110", 110),
    Material(
        key="pvc",
        name="PVC 12454 well casing (ASTM F480, ASTM D1784 cell class 12454)",
        density=1400.0,
        yield_strength=7000.0 * _PSI,
        youngs_modulus=400000.0 * _PSI,
        poisson=0.38,
        wall_under_tolerance=0.0,
        collapse_method="thermoplastic",
        family="pvc",
        design_stress=2000.0 * _PSI,
        temperature_derating="pvc",
        sources={
            "design_stress": "hydrostatic design stress of PVC 1120 (cell class 12454), 2,000 psi "
                             "[13.8 MPa] for water at 73.4 F: hydrostatic design basis 4,000 psi "
                             "times the 0.5 service factor (ASTM D2241 and D1785 appendices; "
                             "Moser, Buried Pipe Design, pressure pipe: S = HDB / 2), from memory",
            "density": "about 1.40 g/cm^3 for rigid PVC compound, from memory",
            "yield_strength": "ASTM D1784 cell class 12454, tensile strength class 4: at least "
                              "7,000 psi [48.3 MPa], from memory; short-term strength for the "
                              "body in tension only: pressure ratings use the design stress",
            "youngs_modulus": "ASTM D1784 cell class 12454, modulus class 5: at least 400,000 psi "
                              "[2,758 MPa]; the modulus ASTM F480 uses for collapse, from memory",
            "poisson": "0.38, the value ASTM F480 uses in its collapse appendix, from memory",
            "wall_under_tolerance": "ASTM F480 lists minimum walls with a plus-only tolerance, so "
                                    "the specified wall is the minimum (0 %), from memory",
            "collapse_method": "ASTM F480 collapse by SDR (elastic ring buckling), from memory",
        },
    ),
    Material(
        key="fiberglass_user",
        name="Fiberglass (FRP) casing rated by the user from the maker's data",
        density=_NAN,
        yield_strength=_NAN,
        youngs_modulus=_NAN,
        poisson=_NAN,
        wall_under_tolerance=0.0,
        collapse_method="entered",
        family="fiberglass",
        sources={
            "density": "unknown: enter the joint weight from the maker's data",
            "yield_strength": "unrated: enter tensile ratings from the maker's data",
            "youngs_modulus": "unknown: collapse must be entered from the maker's data",
            "poisson": "unknown",
            "wall_under_tolerance": "0: the entered maker's ratings already allow for the wall "
                                    "tolerance (common practice, no source)",
            "collapse_method": "entered: no published formula for FRP casing is applied",
        },
    ),
)

#: Known materials by key (built-ins plus any added with :func:`register_material`).
LIBRARY: dict = {m.key: m for m in _BUILT_IN}


def known_keys(materials=None):
    """Sorted keys of ``materials`` (default: :data:`LIBRARY`).

    Parameters
    ----------
    materials : mapping, optional
        Key -> :class:`Material`.

    Returns
    -------
    list of str
    """
    return sorted(LIBRARY if materials is None else materials)


def get_material(key, materials=None):
    """Look a material up by key.

    Parameters
    ----------
    key : str
        Material key (case-insensitive, surrounding blanks ignored).
    materials : mapping, optional
        Key -> :class:`Material`; default :data:`LIBRARY`.

    Returns
    -------
    Material

    Raises
    ------
    KeyError
        For an unknown key; the message lists the known keys.

    Examples
    --------
    >>> get_material("J55").name
    'API 5CT J-55 casing'
    """
    table = LIBRARY if materials is None else materials
    for candidate in (key, str(key).strip().lower()):
        if candidate in table:
            return table[candidate]
    raise KeyError(f"unknown material {key!r}; known materials: {', '.join(known_keys(table))}")


def register_material(material, replace=False):
    """Add a user material to :data:`LIBRARY`.

    Parameters
    ----------
    material : Material
        The material to add (its ``sources`` should name the user's file).
    replace : bool, optional
        Allow replacing an existing key (e.g. ``"fiberglass_user"`` once a
        user file supplies its ratings).  Default False.

    Returns
    -------
    Material
        The registered material.

    Raises
    ------
    TypeError
        If ``material`` is not a :class:`Material`.
    ValueError
        If the key is taken and ``replace`` is False.
    """
    if not isinstance(material, Material):
        raise TypeError(f"register_material expects a Material; got {type(material).__name__}")
    if material.key in LIBRARY and not replace:
        raise ValueError(
            f"material key {material.key!r} is already in the library; choose another key "
            f"or pass replace=True"
        )
    LIBRARY[material.key] = material
    return material
