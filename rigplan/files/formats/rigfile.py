"""Rig profile files (``rigs/*.toml``) -> :class:`rigplan.engine.hoisting.Rig`.

Schema (version 1; bare numbers in the file's ``units`` system, default
``"si"``; a rating may be the text ``"unrated"``, and a rating left out is
unrated too -- never assumed; every number is checked against its range in
:mod:`rigplan.files.ranges`, forces up to about 5,100 tonne-force)::

    version = 1                 # optional
    units = "us"                # "si" (default) or "us": unit of bare numbers
    name = "..."                # required
    notes = "..."

    [[path]]                    # one per way of holding the string, >= 1
    name = "main line"          # required, unique
    lines = 4                   # lines strung, default 1 (1 to 24)
    sheave_factor = 1.04        # default 1.04 (roller bearings; 1 to 1.25)
    winch_line_pull = "9000 lbf"        # force, at the drum layer in use
    rope_breaking_force = "39000 lbf"   # force, minimum breaking force
    rope_design_factor = 3.0            # default 3 (1 to 10)
    mast_rating = "60000 lbf"           # force, static hook load for these lines
    top_head_pullup = "30000 lbf"       # force
    dead_load = "1800 lbf"              # force, required (0 when none)
    overpull_reserve = "5000 lbf"       # force, default 0
    dynamic_factor = 1.1                # default 1.0 (1 to 3)
    notes = "..."

    [[path.tool]]               # handling tools on this path
    name = "..."                # required
    kind = "elevator"           # elevator | clamp | spider | lifting_sub | other
    rating = "30 tf"            # force or "unrated"

    [landing_string]            # optional: pipe for staged setting
    name = "..."                # required
    weight_per_length = "13.3 lb/ft"    # linear weight (air), required
    tensile_rating = "250000 lbf"       # force or "unrated"
    density = "7850 kg/m3"              # default 7850 kg/m3 (steel)
    od = "3-1/2 in"                     # diameter, optional
    bore = "2.764 in"                   # diameter, optional
"""

from __future__ import annotations

import math
from pathlib import Path

from rigplan.errors import InputError
from rigplan.files import ranges
from rigplan.files.formats import Table, check_version, file_system, read_toml, parse_toml_text

TOP_KEYS = ("version", "units", "name", "notes", "path", "landing_string")
PATH_KEYS = ("name", "lines", "sheave_factor", "winch_line_pull", "rope_breaking_force",
             "rope_design_factor", "mast_rating", "top_head_pullup", "dead_load",
             "overpull_reserve", "dynamic_factor", "notes", "tool")
TOOL_KEYS = ("name", "kind", "rating")
LANDING_KEYS = ("name", "weight_per_length", "tensile_rating", "density", "od", "bore")

#: Steel density used for a landing string when none is given [kg/m^3]
#: (carbon steel, 0.2836 lb/in^3 as in the ASTM A53 / API 5L plain-end weight
#: formula).
DEFAULT_LANDING_STRING_DENSITY = 7850.0


def read_rig(path) -> "object":
    """Read a rig profile file and return a :class:`rigplan.engine.hoisting.Rig`."""
    data = read_toml(path)
    return rig_from_data(data, str(path))


def parse_rig(text: str, source: str = "<rig>"):
    """Rig from TOML text (``source`` names it in messages)."""
    return rig_from_data(parse_toml_text(text, source), source)


def _rewhere(exc: InputError, where: str) -> InputError:
    """An engine-side InputError re-issued with the file's name in front."""
    return InputError(where, str(exc))


#: Most hoisting paths in one rig profile, and tools on one path.
MAX_PATHS = 32
MAX_TOOLS = 32


def _rating(t: Table, key: str) -> float:
    """A force rating [N], nan when left out or "unrated"; range checked."""
    value = t.quantity(key, "force", default=math.nan, allow_unrated=True, positive=True)
    if not math.isnan(value):
        ranges.check("force_rating", value, t.where(key), t.raw(key), t.system)
    return value


def rig_from_data(data: dict, source: str):
    from rigplan.engine.hoisting import HoistPath, LandingString, Rig, TOOL_KINDS

    if not data:
        raise InputError(source, "the file is empty: expected a rig profile (a name and at "
                                 "least one [[path]] table)")
    check_version(data, source)
    system = file_system(data, source)
    top = Table(data, source, "", system, TOP_KEYS)
    name = top.text("name", required=True).strip()
    if not name:
        raise InputError(top.where("name"), "expected a rig name, got an empty text")

    paths = []
    seen = {}
    path_tables = top.tables("path", PATH_KEYS, required=True)
    if not path_tables:
        raise InputError(top.where("path"), "expected at least one [[path]] table (a way of "
                                            "holding the string: name, lines, ratings, dead_load), "
                                            "got none")
    if len(path_tables) > MAX_PATHS:
        raise InputError(top.where("path"), f"{len(path_tables)} [[path]] tables: expected at "
                                            f"most {MAX_PATHS}")
    for t in path_tables:
        pname = t.text("name", required=True).strip()
        if not pname:
            raise InputError(t.where("name"), "expected a path name, got an empty text")
        if pname in seen:
            raise InputError(t.where("name"), f"path name {pname!r} already used by {seen[pname]}")
        seen[pname] = t.path
        lines = t.integer("lines", default=1, minimum=1, what="a whole number of lines strung",
                          limits="lines")
        k = t.number("sheave_factor", default=1.04, limits="sheave_factor")
        ratings = {}
        for key in ("winch_line_pull", "rope_breaking_force", "mast_rating", "top_head_pullup"):
            ratings[key] = _rating(t, key)
        df = t.number("rope_design_factor", default=3.0, limits="rope_design_factor")
        if "dead_load" not in t:
            raise InputError(t.where("dead_load"),
                             "required: a force (e.g. 1800 lbf or 8 kN): block, hook, elevator or "
                             "clamp, and the top head where it rides on the line; write 0 if none")
        dead = t.quantity("dead_load", "force", nonnegative=True, limits="force")
        reserve = t.quantity("overpull_reserve", "force", default=0.0, nonnegative=True,
                             limits="force")
        dyn = t.number("dynamic_factor", default=1.0, limits="dynamic_factor")
        tools = []
        tool_names = {}
        tool_tables = t.tables("tool", TOOL_KEYS)
        if len(tool_tables) > MAX_TOOLS:
            raise InputError(t.where("tool"), f"{len(tool_tables)} [[path.tool]] tables: expected "
                                              f"at most {MAX_TOOLS} on one path")
        for tt in tool_tables:
            tname = tt.text("name", required=True).strip()
            if not tname:
                raise InputError(tt.where("name"), "expected a tool name, got an empty text")
            if tname in tool_names:
                raise InputError(tt.where("name"), f"tool name {tname!r} already used by {tool_names[tname]}")
            tool_names[tname] = tt.path
            kind = tt.choice("kind", TOOL_KINDS, required=True)
            rating = _rating(tt, "rating")
            tools.append((tname, kind, rating))
        try:
            paths.append(HoistPath(
                name=pname, lines=lines, sheave_factor=k,
                winch_line_pull=ratings["winch_line_pull"],
                rope_breaking_force=ratings["rope_breaking_force"],
                rope_design_factor=df, mast_rating=ratings["mast_rating"],
                top_head_pullup=ratings["top_head_pullup"], tools=tuple(tools),
                dead_load=dead, overpull_reserve=reserve, dynamic_factor=dyn,
                notes=t.text("notes"),
            ))
        except InputError as exc:
            raise _rewhere(exc, f"{source}: {t.path}") from None

    landing = None
    lt = top.table("landing_string", LANDING_KEYS)
    if lt is not None:
        lname = lt.text("name", required=True).strip()
        if not lname:
            raise InputError(lt.where("name"), "expected a name, got an empty text")
        od = lt.quantity("od", "diameter", default=math.nan, positive=True, limits="diameter")
        bore = lt.quantity("bore", "diameter", default=math.nan, positive=True, limits="diameter")
        if not math.isnan(od) and not math.isnan(bore) and bore >= od:
            raise InputError(lt.where("bore"), f"expected a bore smaller than the od, got "
                                               f"{lt.raw('bore')!r} with od {lt.raw('od')!r}")
        weight = lt.quantity("weight_per_length", "linear_weight", required=True, positive=True,
                             limits="weight_per_length")
        tensile = _rating(lt, "tensile_rating")
        density = lt.quantity("density", "density", default=DEFAULT_LANDING_STRING_DENSITY,
                              positive=True, limits="material_density")
        try:
            landing = LandingString(name=lname, weight_per_length=weight, tensile_rating=tensile,
                                    density=density, od=od, bore=bore)
        except InputError as exc:
            raise _rewhere(exc, f"{source}: landing_string") from None

    try:
        return Rig(name=name, paths=tuple(paths), landing_string=landing,
                   notes=top.text("notes"), source=source)
    except InputError as exc:
        raise _rewhere(exc, source) from None


def rig_files(directory) -> list:
    """The ``*.toml`` rig profiles in a folder, sorted by name."""
    return sorted(Path(directory).glob("*.toml"))
