"""User material files (TOML): extra pipe and screen materials.

Schema (version 1; bare numbers in the file's ``units`` system, default
``"si"``: kg/m3 and MPa; ``"us"``: ppg and psi -- so write the unit)::

    version = 1
    units = "si"

    [[material]]
    key = "ss316l_wire"              # required, lower case, not already known
    name = "..."                     # required
    family = "stainless"             # steel | stainless | hsla | api | pvc | fiberglass
    density = "8000 kg/m3"           # density or "unknown"
    yield_strength = "170 MPa"       # stress or "unknown"
    youngs_modulus = "193000 MPa"    # stress or "unknown"
    poisson = 0.29                   # [-] or "unknown"
    wall_under_tolerance = "12.5 %"  # [-], 0 <= u < 1, required
    collapse_method = "timoshenko"   # timoshenko | api_5c3 | thermoplastic | entered
    design_stress = "13.8 MPa"       # thermoplastics: hydrostatic design stress for the
                                     # pressure rating 2 S / (SDR - 1); optional, absent =
                                     # unknown (pressure rating unrated)
    temperature_derating = "pvc"     # derating table for pressure and collapse ratings
                                     # above 73 F: "pvc" or absent (none)
    source = "maker's data sheet ..."   # where the values come from (required
                                        # unless every value has its own below)
    replace = false                  # true: replace a material with this key

    [material.sources]               # optional: a source per value
    yield_strength = "..."

``"unknown"`` stores nan: a rating that needs the value is then unrated.
Every number is checked against its range in :mod:`rigplan.files.ranges`
(density 500 to 25,000 kg/m3, yield strength 1 MPa to 5 GPa, Young's modulus
0.1 to 1000 GPa, Poisson ratio 0 to 0.5, under-tolerance 0 to 1).
"""

from __future__ import annotations

import math

from rigplan.errors import InputError
from rigplan.files.formats import Table, check_version, file_system, parse_toml_text, read_toml

TOP_KEYS = ("version", "units", "material")
MATERIAL_KEYS = ("key", "name", "family", "density", "yield_strength", "youngs_modulus",
                 "poisson", "wall_under_tolerance", "collapse_method", "source", "sources",
                 "replace", "design_stress", "temperature_derating")
_SOURCE_FIELDS = ("density", "yield_strength", "youngs_modulus", "poisson",
                  "wall_under_tolerance", "collapse_method", "design_stress")
UNKNOWN = "unknown"


_LIMITS = {"density": "material_density", "yield_strength": "yield_strength",
           "design_stress": "yield_strength",
           "youngs_modulus": "youngs_modulus", "poisson": "poisson"}


def _maybe_unknown(t: Table, key: str, kind: str):
    value = t.raw(key)
    if value is None:
        raise t.missing(key, f"a value or \"unknown\" ({'plain number' if kind == 'dimensionless' else kind})")
    if isinstance(value, str) and value.strip().lower() == UNKNOWN:
        return math.nan
    if kind == "dimensionless":
        return t.number(key, limits=_LIMITS[key])
    return t.quantity(key, kind, positive=True, limits=_LIMITS[key])


def materials_from_data(data: dict, source: str) -> list:
    """Materials defined in a parsed file (not registered)."""
    from rigplan.engine.materials import COLLAPSE_METHODS, FAMILIES, TEMPERATURE_DERATING, Material

    if not data:
        raise InputError(source, "the file is empty: expected [[material]] tables (key, name, "
                                 "family, density, yield_strength, ...)")
    check_version(data, source)
    system = file_system(data, source)
    top = Table(data, source, "", system, TOP_KEYS)
    out = []
    keys = {}
    tables = top.tables("material", MATERIAL_KEYS, required=True)
    if not tables:
        raise InputError(top.where("material"), "expected at least one [[material]] table, got none")
    for t in tables:
        key = t.text("key", required=True).strip().lower()
        if not key:
            raise InputError(t.where("key"), "expected a material key, got an empty text")
        if len(key) > 40 or not key.isprintable():
            raise InputError(t.where("key"), f"expected a short material key (at most 40 printable "
                                             f"characters, e.g. \"ss316l_wire\"), got {len(key)} characters")
        if key in keys:
            raise InputError(t.where("key"), f"key {key!r} already defined in {keys[key]}")
        keys[key] = t.path
        name = t.text("name", required=True)
        family = t.choice("family", FAMILIES, required=True)
        method = t.choice("collapse_method", COLLAPSE_METHODS, required=True)
        values = {
            "density": _maybe_unknown(t, "density", "density"),
            "yield_strength": _maybe_unknown(t, "yield_strength", "stress"),
            "youngs_modulus": _maybe_unknown(t, "youngs_modulus", "stress"),
            "poisson": _maybe_unknown(t, "poisson", "dimensionless"),
        }
        if "design_stress" in t:
            values["design_stress"] = _maybe_unknown(t, "design_stress", "stress")
        values["temperature_derating"] = t.choice("temperature_derating",
                                                  tuple(TEMPERATURE_DERATING), default="")
        if "wall_under_tolerance" not in t:
            raise t.missing("wall_under_tolerance", "the fraction the wall may be under the "
                                                    "specified wall (e.g. \"12.5 %\" or 0.125; 0 if none)")
        u = t.number("wall_under_tolerance", limits="wall_under_tolerance")
        general = t.text("source", default="").strip()
        st = t.table("sources", _SOURCE_FIELDS)
        sources = {}
        for f in _SOURCE_FIELDS:
            if f == "design_stress" and "design_stress" not in t:
                continue
            own = st.text(f, default="").strip() if st is not None else ""
            text = own or general
            if not text:
                raise InputError(t.where("source"), f"required: where the values come from "
                                                    f"(no source for {f})")
            sources[f] = f"{text} (user file {source})"
        try:
            m = Material(key=key, name=name, family=family, collapse_method=method,
                         wall_under_tolerance=u, sources=sources, **values)
        except ValueError as exc:
            raise InputError(f"{source}: {t.path}", str(exc)) from None
        out.append((m, t.boolean("replace"), t.where("key")))
    return out


def parse_materials(text: str, source: str = "<materials>") -> list:
    """Materials (not registered) from TOML text."""
    return [m for m, _, _ in materials_from_data(parse_toml_text(text, source), source)]


def register_materials(data: dict, source: str) -> list:
    """Check every material of a parsed file, then register them all."""
    from rigplan.engine import materials

    entries = materials_from_data(data, source)
    for m, replace, where in entries:
        if m.key in materials.LIBRARY and not replace:
            raise InputError(where, f"material {m.key!r} is already known; choose another key "
                                    "or add replace = true")
    for m, replace, _ in entries:
        materials.register_material(m, replace=replace)
        _FILE_OF[m.key] = source
    return [m for m, _, _ in entries]


#: material key -> the user file it was registered from
_FILE_OF: dict = {}


def material_file(key: str) -> str | None:
    """The materials file a registered material came from (None: built in)."""
    return _FILE_OF.get(key)


def read_materials(path) -> list:
    """Read a user material file and register its materials; returns them."""
    return register_materials(read_toml(path), str(path))
