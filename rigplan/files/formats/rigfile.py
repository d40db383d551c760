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
    lines = 4                   # lines strung, whole number 1 to 24, default 1
    sheave_factor = 1.04        # 1 to 1.2, default 1.04 (roller bearings)
    winch_line_pull = "9000 lbf"        # force, at the drum layer in use
    rope_breaking_force = "39000 lbf"   # force, minimum breaking force
    rope_design_factor = 3.0            # 1 to 20, default 3
    mast_rating = "60000 lbf"           # force, static hook load for these lines
    mast_rating_basis = "gross"         # "gross" (default) or "net" (see below)
    mast_rating_net_of = "1500 lbf"     # force, only with "net" (default: all gear)
    top_head_pullup = "30000 lbf"       # force
    top_head_pullup_basis = "net"       # "gross" (default) or "net"
    top_head_pullup_net_of = "1800 lbf" # force, e.g. the head's own weight
    dead_load = "1800 lbf"              # force, required (0 when none)
    overpull_reserve = "5000 lbf"       # force, default 0 (overpull load case)
    dynamic_factor = 1.1                # 1 to 3, default 1.0 (shock load case)
    notes = "..."

    [[path.tool]]               # handling tools on this path
    name = "..."                # required
    kind = "elevator"           # elevator | clamp | spider | lifting_sub | other
    rating = "30 tf"            # force or "unrated"
    basis = "net"               # default "net" for handling tools (they hold
                                # the string only), "gross" for "other"
    net_of = "500 lbf"          # force, only with "net" (default: all gear)

A rating's basis says how it counts the gear riding on the line (the dead
load): "gross" is the load at the hook, gear included, so the dead load is
taken off it; "net" is what is left for the string, so the gear it is net of
(all of the dead load, or the weight written as ``..._net_of``) is not taken
off again.  The winch line pull and the wire rope are always gross: the
line carries the block.

    [landing_string]            # optional: pipe for staged setting
    name = "..."                # required
    weight_per_length = "13.3 lb/ft"    # linear weight (air), required
    tensile_rating = "250000 lbf"       # force or "unrated"
    density = "7850 kg/m3"              # default 7850 kg/m3 (steel)
    od = "3-1/2 in"                     # diameter, optional
    bore = "2.764 in"                   # diameter, optional
    joint_length = "30 ft"              # one joint or stand, the lowering step;
                                        # 0.5 to 60 m, default 30 ft
"""

from __future__ import annotations

import math
from pathlib import Path

from rigplan.errors import InputError
from rigplan.files import ranges
from rigplan.files.formats import Table, check_version, file_system, read_toml, parse_toml_text

TOP_KEYS = ("version", "units", "name", "notes", "path", "landing_string")
PATH_KEYS = ("name", "lines", "sheave_factor", "winch_line_pull", "rope_breaking_force",
             "rope_design_factor", "mast_rating", "mast_rating_basis", "mast_rating_net_of",
             "top_head_pullup", "top_head_pullup_basis", "top_head_pullup_net_of", "dead_load",
             "overpull_reserve", "dynamic_factor", "notes", "tool")
TOOL_KEYS = ("name", "kind", "rating", "basis", "net_of")

#: Accepted ranges of the plain numbers of a path [-] (lines and sheave
#: factor from the engine's hoisting formulas).  A rope design factor under
#: 1 would let the line work above its breaking force, and over 20 is taken
#: as a typing error; a dynamic factor over 3 likewise.
ROPE_DESIGN_FACTOR_RANGE = (ranges.RANGES["rope_design_factor"].lo,
                            ranges.RANGES["rope_design_factor"].hi)
DYNAMIC_FACTOR_RANGE = (ranges.RANGES["dynamic_factor"].lo, ranges.RANGES["dynamic_factor"].hi)
LANDING_KEYS = ("name", "weight_per_length", "tensile_rating", "density", "od", "bore",
                "joint_length")

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


def _number_in(t: Table, key: str, default: float, bounds: tuple, what: str) -> float:
    """A plain number [-] within ``bounds`` (inclusive), else one line naming the key."""
    lo, hi = bounds
    value = t.number(key, default=default)
    if not (math.isfinite(value) and lo <= value <= hi):
        raise InputError(t.where(key), f"expected {what} from {lo:g} to {hi:g}, got "
                                       f"{t.raw(key)!r}")
    return value


def _basis(t: Table, key: str, net_key: str, default: str, dead_load: float) -> tuple:
    """``(basis, net_of [N])`` of a rating: "gross" or "net", and the gear
    weight a net rating already excludes (nan: all of the dead load)."""
    from rigplan.engine.hoisting import RATING_BASES
    basis = t.choice(key, RATING_BASES, default=default)
    if net_key not in t:
        return basis, math.nan
    if basis != "net":
        raise InputError(t.where(net_key), f"given with a gross rating: write {key} = \"net\" "
                                           "when the rating is already net of this weight")
    net_of = t.quantity(net_key, "force", nonnegative=True)
    if net_of > dead_load * (1 + 1e-12):
        raise InputError(t.where(net_key), f"expected a weight not above the path's dead_load "
                                           f"({t.raw('dead_load')!r}), got {t.raw(net_key)!r}")
    return basis, min(net_of, dead_load)


def rig_from_data(data: dict, source: str):
    from rigplan.engine.hoisting import (HANDLING_TOOL_KINDS, LINES_RANGE, SHEAVE_FACTOR_RANGE,
                                         TOOL_KINDS, HoistPath, LandingString, Rig)

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
        bases = {}
        for key in ("mast_rating", "top_head_pullup"):
            bases[key] = _basis(t, f"{key}_basis", f"{key}_net_of", "gross", dead)
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
            basis, net_of = _basis(tt, "basis", "net_of",
                                   "net" if kind in HANDLING_TOOL_KINDS else "gross", dead)
            tools.append((tname, kind, rating, basis, net_of))
        try:
            paths.append(HoistPath(
                name=pname, lines=lines, sheave_factor=k,
                winch_line_pull=ratings["winch_line_pull"],
                rope_breaking_force=ratings["rope_breaking_force"],
                rope_design_factor=df, mast_rating=ratings["mast_rating"],
                top_head_pullup=ratings["top_head_pullup"], tools=tuple(tools),
                dead_load=dead, overpull_reserve=reserve, dynamic_factor=dyn,
                notes=t.text("notes"),
                mast_basis=bases["mast_rating"][0], mast_net_of=bases["mast_rating"][1],
                top_head_basis=bases["top_head_pullup"][0],
                top_head_net_of=bases["top_head_pullup"][1],
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
        joint_length = lt.quantity("joint_length", "length", default=9.144, positive=True,
                                   limits="joint_length")
        try:
            landing = LandingString(name=lname, weight_per_length=weight, tensile_rating=tensile,
                                    density=density, od=od, bore=bore, joint_length=joint_length)
        except InputError as exc:
            raise _rewhere(exc, f"{source}: landing_string") from None

    try:
        return Rig(name=name, paths=tuple(paths), landing_string=landing,
                   notes=top.text("notes"), source=source)
    except InputError as exc:
        raise _rewhere(exc, source) from None

