"""String plan files (``strings/*.toml``) <-> :class:`rigplan.engine.stringmodel.StringPlan`.

Schema (version 1).  Bare numbers are read in the file's ``units`` system
(default ``"si"``: m, mm, kg/m3, kPa, MPa, kN, kg/m; ``"us"``: ft, in, ppg,
psi, psi, lbf, lb/ft); a quantity with its unit in a string (``"20 ft"``,
``"9-5/8 in"``, ``"1.10 SG"``) is read as written.  Kinds: length (L),
diameter (D: od, wall, bore), density (rho), pressure (P), force (F), linear
weight (w)::

    version = 1                  # optional
    units = "us"                 # unit system of bare numbers
    name = "..."                 # default: the file name
    well = "..."
    site = "..."
    notes = "..."
    tally = "x.tally.csv"        # optional tally CSV, path relative to this file

    [hole]                       # required
    fluid_density = "9.2 ppg"    # rho, required, > 0
    fluid_level = "0 ft"         # L, depth to the annulus fluid top, default 0
    depth = "1150 ft"            # L, drilled depth, optional
    diameter = "22 in"           # D, bit diameter, optional
    temperature = "55 F"         # job temperature of the casing in the hole
                                 # ("55 F", "13 C"; a bare number in the file's
                                 # units: F for "us", C for "si"), default 73 F
                                 # (23 C), -10 to 100 C; derates PVC ratings

    [[section]]                  # the string in sections, listed in running
    kind = "blank"               # order: the first goes in the hole first
    material = "a53b"            # library key, required
    od = "16 in"                 # D, required
    wall = "0.375 in"            # D, specified wall, required, < od/2
    joint_length = "20 ft"       # L, required, > 0
    count = 12                   # joints, required, >= 1
    connection = "butt_weld"     # butt_weld | threaded_coupled | spline | flush | integral | none
    weld_efficiency = 0.85       # (0, 1]
    connection_rating = "..."    # F or "unrated"
    tensile_rating = "..."       # F or "unrated" (screens)
    collapse_rating = "..."      # P or "unrated" (screens)
    burst_rating = "..."         # P or "unrated"
    joint_weight = "..."         # F, own air weight of one joint
    weight_per_length = "..."    # w, own air weight per length
    ellipticity = 0.01           # [-], 0 <= e < 1
    measured_wall = "..."        # D, measured minimum wall
    bore = "..."                 # D, pressure bore if not od - 2 wall
    dmax = "..."                 # D, measured largest OD  } both or neither,
    dmin = "..."                 # D, measured smallest OD } dmin <= dmax

    [[joint]]                    # or joint by joint (not both): the same keys
    label = "J1"                 # as a section without joint_length/count,
    length = "20 ft"             # plus label (default J<n>), length (L,
    measured_length = "..."      # required), measured_length (L) and
    rejected = false             # rejected (true/false), note (free text)

    [float_equipment]            # optional; none when absent
    type = "float_collar"        # none | float_shoe | float_collar
    collar_joint = 2             # float_collar only: position 1..n or a label
    valve_rating = "..."         # P, differential the valve holds, optional
                                 # joints of kind float_shoe / float_collar must
                                 # agree with this table: one float shoe (the
                                 # bottom joint, type float_shoe), one float
                                 # collar (on collar_joint); else refused

    [running]                    # optional
    fill_density = "8.34 ppg"    # rho, fluid added inside, default 998.2 kg/m3
    fill_alternatives = ["9 ppg"]  # rho list, other fill fluids to compare
    min_running_weight = "..."   # F, default 0
    set_down_weight = "..."      # F, default 0
    collar_candidates = [1, 2, 3]  # float collar positions to compare
    stage1_release = "on_bottom"  # staged setting: release stage 1 once on
                                 # bottom, or "after_grout": hold it on the
                                 # landing string until its shoe grout has set
                                 # (needs a [grout] table)
    screen_depth_tolerance = "2 ft"  # L, how far a screen interval may land
                                 # from its planned depth before a warning,
                                 # 0 to 30 m (100 ft), default 2 ft

    [design_factors]             # optional, plain numbers, 1 to 10
    tension = 1.6                # defaults from rigplan.engine.stringmodel.DesignFactors
    collapse = 1.125
    burst = 1.1

    [grout]                      # optional
    density = "14.8 ppg"         # rho, required
    height = "200 ft"            # L, column above the shoe, required
    inside_density = "8.34 ppg"  # rho, default 998.2 kg/m3
    inside_level = "0 ft"        # L, depth to the inside fluid top, default 0
    temperature_rise = "30 F"    # rise of the casing temperature while the grout
                                 # sets (heat of hydration), a difference ("30 F",
                                 # "17 C", "17 K"), default 0, 0 to 60 K; the
                                 # grouting check derates PVC at job + rise

Joints are labelled J1..Jn in running order (J1 is the bottom joint, first in
the hole).  A tally's measured lengths, rejections, measured walls and rack ODs are
applied by label.  Warnings (not errors) are returned with the plan: grout
lighter than the hole fluid, a string longer than the hole, an OD larger than
the hole, float-equipment joints without a ``[float_equipment]`` table.

Every number is checked against its range in :mod:`rigplan.files.ranges`
(joints per string at most :data:`rigplan.files.ranges.MAX_JOINTS`, design
factors 1 to 10, fluid densities 600 to 3000 kg/m3, ...); a value outside is
refused with one line naming the key, the range in SI and US units, and the
value given.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass, fields
from pathlib import Path

from rigplan.errors import InputError
from rigplan.files import ranges
from rigplan.files.formats import (SCHEMA_VERSION, Table, _short, check_version, dump_toml,
                                   file_system, parse_toml_text, quantity_text, read_toml)
from rigplan.engine.stringmodel import (STAGE1_RELEASES, CONNECTION_KINDS, JOINT_KINDS, Closure,
                                        DesignFactors, GroutSpec,
                                 Hole, JointSpec, Settings, StringPlan)

TOP_KEYS = ("version", "units", "name", "well", "site", "notes", "tally", "hole", "section",
            "joint", "float_equipment", "running", "design_factors", "grout",
            "existing_casing", "liner_fit", "report")
HOLE_KEYS = ("fluid_density", "fluid_level", "depth", "diameter", "temperature")
COMMON_JOINT_KEYS = ("kind", "material", "od", "wall", "connection", "weld_efficiency",
                     "connection_rating", "tensile_rating", "collapse_rating", "burst_rating",
                     "joint_weight", "weight_per_length", "ellipticity", "measured_wall", "bore",
                     "dmax", "dmin")
SECTION_KEYS = COMMON_JOINT_KEYS + ("joint_length", "count")
JOINT_KEYS = ("label",) + COMMON_JOINT_KEYS + ("length", "measured_length", "rejected", "note")
FLOAT_KEYS = ("type", "collar_joint", "valve_rating")
FLOAT_TYPES = ("none", "float_shoe", "float_collar")
RUNNING_KEYS = ("fill_density", "fill_alternatives", "min_running_weight", "set_down_weight",
                "screen_depth_tolerance", "stage1_release",
                "collar_candidates")
DESIGN_KEYS = ("tension", "collapse", "burst")
GROUT_KEYS = ("density", "height", "inside_density", "inside_level", "temperature_rise")
#: The printed job packet's facts: text, kept as written (a TOML date is read as YYYY-MM-DD).
REPORT_KEYS = ("revision", "date", "prepared_by", "reviewed_by")

# file key -> (JointSpec field, quantity kind, may be "unrated") for the
# optional quantities; their ranges are in _OPTIONAL_LIMITS
_OPTIONAL_QUANTITIES = (
    ("connection_rating", "connection_rating", "force", True),
    ("tensile_rating", "tensile_rating", "force", True),
    ("collapse_rating", "collapse_rating", "pressure", True),
    ("burst_rating", "burst_rating", "pressure", True),
    ("joint_weight", "weight", "force", False),
    ("weight_per_length", "weight_per_length", "linear_weight", False),
    ("measured_wall", "measured_wall", "diameter", False),
    ("bore", "bore", "diameter", False),
    ("dmax", "dmax", "diameter", False),
    ("dmin", "dmin", "diameter", False),
)
_OPTIONAL_LIMITS = {
    "connection_rating": "force_rating", "tensile_rating": "force_rating",
    "collapse_rating": "pressure_rating", "burst_rating": "pressure_rating",
    "joint_weight": "force_rating", "weight_per_length": "weight_per_length",
    "measured_wall": "wall", "bore": "diameter", "dmax": "diameter", "dmin": "diameter",
}

#: Screen depth tolerances accepted [m]: 0 to 30 m (about 100 ft, five
#: joints); more is no longer a check on where a screen lands.
SCREEN_TOLERANCE_RANGE = (ranges.RANGES["screen_depth_tolerance"].lo,
                          ranges.RANGES["screen_depth_tolerance"].hi)

#: Densities accepted for a drilling fluid, fill fluid or grout [kg/m^3]
#: (about 5 to 25 ppg): a value outside is almost surely a unit slip.
FLUID_DENSITY_RANGE = (ranges.RANGES["fluid_density"].lo, ranges.RANGES["fluid_density"].hi)

#: Most other fill fluids and float collar positions compared in one plan
#: (each pair is a full float plan; the bundled jobs use 2 and 3).
MAX_FILL_ALTERNATIVES = 8
MAX_COLLAR_CANDIDATES = 24

#: How far a tally's rack OD reading may lie from the joint's od [-]: further
#: is a unit slip, not an oval joint.
RACK_OD_SPREAD = 0.25

#: Job temperatures a plan may state [C], and grout temperature rises [K].
JOB_TEMPERATURE_RANGE = (ranges.RANGES["job_temperature"].lo, ranges.RANGES["job_temperature"].hi)
TEMPERATURE_RISE_RANGE = (ranges.RANGES["temperature_rise"].lo,
                          ranges.RANGES["temperature_rise"].hi)

_TEMPERATURE = re.compile(r"^\s*(?P<value>[-+]?(?:\d+\.?\d*|\.\d+))\s*"
                          r"(?P<unit>(?:°|deg\s*)?[CFK]|deg[CF])?\s*$", re.IGNORECASE)

#: Least design factor accepted, in files and in the app's prompts [-]: a
#: factor below 1 would let a load pass above the maker's rating.
DESIGN_FACTOR_MIN = ranges.RANGES["design_factor"].lo


def design_factor_expected(got) -> str:
    """The one message for a design factor out of range (rigplan.files.ranges)."""
    return f"expected {ranges.RANGES['design_factor'].expected()}, got {_short(got)}"

_DEFAULT_SETTINGS = Settings()
_DEFAULT_DESIGN = DesignFactors()


@dataclass(frozen=True)
class PlanRead:
    """What :func:`read_plan` returns.

    plan : the :class:`StringPlan` (SI units)
    warnings : one-line messages about doubtful but accepted input
    tally_path : the tally CSV applied, or None
    units : the file's unit system of bare numbers ("si" or "us")
    """

    plan: StringPlan
    warnings: tuple = ()
    tally_path: Path | None = None
    units: str = "si"


def read_plan(path) -> PlanRead:
    """Read a string plan file (and the tally it names) into a :class:`PlanRead`."""
    data = read_toml(path)
    p = Path(path)
    return plan_from_data(data, str(path), base_dir=p.parent, default_name=p.stem)


def parse_plan(text: str, source: str = "<plan>", base_dir=".") -> PlanRead:
    """Plan from TOML text; a tally path is taken relative to ``base_dir``."""
    return plan_from_data(parse_toml_text(text, source), source, base_dir=Path(base_dir),
                          default_name=Path(source).stem)


# ---------------------------------------------------------------------------
# temperatures (offset scales: read here, not as a multiplicative unit)


def _temperature(t: Table, key: str, default: float, difference: bool) -> float:
    """A temperature [C], or with ``difference`` a temperature difference [K].

    ``"55 F"``, ``"13 C"``, ``"13 degC"``; a difference may also be in ``K``.
    A bare number takes the file's unit system (F for "us", C for "si").
    """
    if key not in t:
        return default
    raw = t.raw(key)
    lo, hi = TEMPERATURE_RISE_RANGE if difference else JOB_TEMPERATURE_RANGE
    what = (f"a temperature rise between {lo:g} and {hi:g} K ({lo * 1.8:g} to {hi * 1.8:g} F), "
            "e.g. \"30 F\" or \"17 C\"" if difference else
            f"a temperature between {lo:g} and {hi:g} C ({lo * 1.8 + 32:g} to {hi * 1.8 + 32:g} F), "
            "e.g. \"55 F\" or \"13 C\"")
    if isinstance(raw, bool) or not isinstance(raw, (int, float, str)):
        raise InputError(t.where(key), f"expected {what}, got {raw!r}")
    m = _TEMPERATURE.match(str(raw))
    if not m:
        raise InputError(t.where(key), f"expected {what}, got {raw!r}")
    if not m.group("unit"):
        what += " (a bare number is in " + ("F" if t.system == "us" else "C") + " in this file)"
    value = float(m.group("value"))
    unit = (m.group("unit") or ("F" if t.system == "us" else "C"))[-1].upper()
    if unit == "K" and not difference:
        value -= 273.15
    elif unit == "F":
        value = value / 1.8 if difference else (value - 32.0) / 1.8
    if not (math.isfinite(value) and lo <= value <= hi):
        raise InputError(t.where(key), f"expected {what}, got {raw!r}")
    return value


# ---------------------------------------------------------------------------
# joints


def _fluid_density(t: Table, key: str, default=None, required: bool = False, index=None, value=None):
    """A fluid or grout density [kg/m^3], checked for plausibility."""
    if value is None and key not in t:
        return t.quantity(key, "density", default=default, required=required,
                          limits="fluid_density")
    rho = t.quantity(key, "density", positive=True, index=index, value=value)
    if not ranges.RANGES["fluid_density"].contains(rho):
        where = t.where(key) if index is None else f"{t.where(key)}[{index}]"
        shown = t.raw(key) if value is None else value
        raise InputError(where, f"{_short(shown)} is {rho:.4g} kg/m3: expected "
                                f"{ranges.RANGES['fluid_density'].expected(t.system)}; check the "
                                "unit (bare numbers are in the file's units)")
    return rho


def _report_table(t) -> tuple:
    """``(key, text)`` pairs of the ``[report]`` table, in REPORT_KEYS order."""
    if t is None:
        return ()
    import datetime
    out = []
    for key in REPORT_KEYS:
        if key in t.data and isinstance(t.data[key], (datetime.date, datetime.datetime)):
            out.append((key, t.data[key].isoformat()))
        elif key in t.data:
            out.append((key, t.text(key)))
    return tuple(out)


def _material_key(t: Table, key: str = "material") -> str:
    from rigplan.engine import materials

    name = t.text(key, required=True)
    try:
        return materials.get_material(name).key
    except KeyError:
        raise InputError(t.where(key), f"unknown material {name!r}; known: "
                                       f"{', '.join(materials.known_keys())} "
                                       "(add others with a materials file)") from None


#: Smallest od of a casing or screen taken as plausible [m] (1 in): a 3/4 in
#: pipe is 1.05 in OD (common practice, no source); a smaller od beside a wall
#: of half of it or more is taken as the od's unit slip (10.75 for 10.75 in).
SMALLEST_OD = 0.0254


def _shown(value: float, kind: str, system: str) -> str:
    """An SI value for a message, in the file's units, 4 significant digits."""
    from rigplan.files import units
    return (f"{units.to_display(value, kind, system):.4g} "
            f"{units.unit_label(kind, system)}")


def _joint_fields(t: Table) -> dict:
    """The keys a section and a joint share, checked, as JointSpec fields."""
    out = {
        "kind": t.choice("kind", JOINT_KINDS, default="blank"),
        "material": _material_key(t),
        "connection": t.choice("connection", CONNECTION_KINDS, default="butt_weld"),
    }
    od = t.quantity("od", "diameter", required=True, positive=True, limits="diameter")
    wall = t.quantity("wall", "diameter", required=True, positive=True, limits="wall")
    if wall >= od / 2.0:
        od_text, wall_text = _shown(od, "diameter", t.system), _shown(wall, "diameter", t.system)
        if od < SMALLEST_OD:
            raise InputError(t.where("od"), f"od {od_text} is implausibly small (not twice the "
                                            f"wall {wall_text}): expected an od between "
                                            f"{_shown(SMALLEST_OD, 'diameter', t.system)} and "
                                            f"{_shown(ranges.RANGES['diameter'].hi, 'diameter', t.system)}"
                                            " (a bare number is in the file's units)")
        raise InputError(t.where("wall"), f"wall {wall_text} is not less than half the od "
                                          f"{od_text}: expected a wall thickness less than "
                                          f"{_shown(od / 2.0, 'diameter', t.system)}")
    out["od"], out["wall"] = od, wall
    for key, attr, kind, may_be_unrated in _OPTIONAL_QUANTITIES:
        value = t.quantity(key, kind, default=None, allow_unrated=may_be_unrated, positive=True)
        if value is not None and not math.isnan(value):
            ranges.check(_OPTIONAL_LIMITS[key], value, t.where(key), t.raw(key), t.system)
        if value is not None and math.isnan(value):
            value = None          # "unrated" is what an absent rating means
        out[attr] = value
    if out["measured_wall"] is not None and out["measured_wall"] >= od / 2.0:
        raise InputError(t.where("measured_wall"), f"measured wall {t.raw('measured_wall')!r} is not "
                                                   f"less than half the od {t.raw('od')!r}")
    if out["bore"] is not None and out["bore"] >= od:
        raise InputError(t.where("bore"), f"bore {t.raw('bore')!r} is not smaller than the od "
                                          f"{t.raw('od')!r}")
    if (out["dmax"] is None) != (out["dmin"] is None):
        given = "dmax" if out["dmax"] is not None else "dmin"
        other = "dmin" if given == "dmax" else "dmax"
        raise InputError(t.where(other), f"required with {given}: a diameter (e.g. 16.05 in or 407.7 mm)")
    if out["dmax"] is not None and out["dmin"] > out["dmax"]:
        raise InputError(t.where("dmin"), f"dmin {t.raw('dmin')!r} is larger than dmax {t.raw('dmax')!r}")
    out["weld_efficiency"] = t.number("weld_efficiency", default=None, limits="weld_efficiency")
    out["ellipticity"] = t.number("ellipticity", default=None, limits="ellipticity")
    return out


def _joints_from_sections(sections) -> list:
    joints = []
    for t in sections:
        common = _joint_fields(t)
        length = t.quantity("joint_length", "length", required=True, positive=True,
                            limits="joint_length")
        count = t.integer("count", required=True, minimum=1, what="a whole number of joints",
                          limits="joint_count")
        if len(joints) + count > ranges.MAX_JOINTS:
            raise InputError(t.where("count"), f"{len(joints) + count:,} joints in the string: "
                                               f"expected at most {ranges.MAX_JOINTS:,} joints "
                                               "in one string")
        base = len(joints)
        joints.extend(JointSpec(label=f"J{base + k + 1}", length=length, **common)
                      for k in range(count))
    return joints


def _joints_one_by_one(tables) -> list:
    joints = []
    seen = {}
    if len(tables) > ranges.MAX_JOINTS:
        t = tables[ranges.MAX_JOINTS]
        raise InputError(f"{t.source}: {t.path}", f"{len(tables):,} [[joint]] tables: expected at "
                                                  f"most {ranges.MAX_JOINTS:,} joints in one string")
    for i, t in enumerate(tables, start=1):
        common = _joint_fields(t)
        label = t.text("label", default=f"J{i}").strip()
        if not label:
            raise InputError(t.where("label"), "expected a joint label, got an empty text")
        if label in seen:
            raise InputError(t.where("label"), f"label {label!r} already used by {seen[label]}")
        seen[label] = t.path
        joints.append(JointSpec(
            label=label,
            length=t.quantity("length", "length", required=True, positive=True,
                              limits="joint_length"),
            measured_length=t.quantity("measured_length", "length", default=None, positive=True,
                                       limits="joint_length"),
            rejected=t.boolean("rejected"),
            note=t.text("note", default=""),
            **common,
        ))
    return joints


def apply_tally(joints: list, rows, tally_source: str) -> list:
    """Joints with the tally's measured lengths, walls, rack ODs and rejections (by label)."""
    index = {j.label: i for i, j in enumerate(joints)}
    out = list(joints)
    for row in rows:
        where = f"{tally_source}: row {row.row}"
        if row.label not in index:
            raise InputError(f"{where}, label", f"joint {row.label!r} is not in the plan "
                                                f"({joints[0].label}..{joints[-1].label})")
        i = index[row.label]
        j = out[i]
        if row.kind is not None and row.kind != j.kind:
            raise InputError(f"{where}, kind", f"the tally says {row.kind!r} but the plan has "
                                               f"{j.kind!r} for {j.label}: correct one of them")
        changes = {"rejected": row.status == "rejected"}
        if getattr(row, "note", ""):
            changes["note"] = row.note
        if row.measured_length is not None:
            changes["measured_length"] = row.measured_length
        if row.measured_wall is not None:
            if row.measured_wall >= j.od / 2.0:
                raise InputError(f"{where}, measured_wall",
                                 f"measured wall is not less than half the od of {j.label}")
            changes["measured_wall"] = row.measured_wall
        if getattr(row, "od_max", None) is not None:
            for name, value in (("od_max", row.od_max), ("od_min", row.od_min)):
                if not (1 - RACK_OD_SPREAD) * j.od <= value <= (1 + RACK_OD_SPREAD) * j.od:
                    raise InputError(f"{where}, {name}",
                                     f"expected an outside diameter within "
                                     f"{100 * RACK_OD_SPREAD:g} % of the od of {j.label} "
                                     f"({j.od * 1000:.1f} mm, {j.od / 0.0254:.3f} in): check "
                                     "the unit in the column header")
            changes["dmax"], changes["dmin"] = row.od_max, row.od_min
        out[i] = _replace(j, **changes)
    return _reorder(out, rows, tally_source)


def _reorder(joints: list, rows, tally_source: str) -> list:
    """Joints in the tally's ``run_order`` (when the tally gives one).

    The order must name every joint of the plan once, and may only swap
    joints of the same nominal description (the shoe, float equipment and
    screens stay where the plan puts them): anything else is refused with
    the row that breaks it.
    """
    from rigplan.engine.placement import nominal_key

    ordered = [r for r in rows if r.run_order is not None]
    if not ordered:
        return joints
    if len(ordered) != len(rows) or len(rows) != len(joints):
        missing = len(joints) - len(ordered)
        raise InputError(f"{tally_source}, run_order",
                         f"give run_order for every joint of the plan or for none "
                         f"({len(ordered)} of {len(joints)} given"
                         + (f", {missing} missing)" if missing > 0 else ")"))
    seen = {}
    for r in ordered:
        if r.run_order > len(joints):
            raise InputError(f"{tally_source}: row {r.row}, run_order",
                             f"expected 1..{len(joints)} (the joints in the plan), got {r.run_order}")
        if r.run_order in seen:
            raise InputError(f"{tally_source}: row {r.row}, run_order",
                             f"position {r.run_order} is already given in row {seen[r.run_order]}")
        seen[r.run_order] = r.row
    by_label = {j.label: j for j in joints}
    new = [None] * len(joints)
    for r in ordered:
        new[r.run_order - 1] = by_label[r.label]
    for pos, (planned, placed) in enumerate(zip(joints, new), start=1):
        if nominal_key(planned) != nominal_key(placed):
            row = next(r.row for r in ordered if r.label == placed.label)
            raise InputError(f"{tally_source}: row {row}, run_order",
                             f"{placed.label} ({placed.kind}) cannot run at position {pos}: the "
                             f"plan has {planned.label} ({planned.kind}) there, and only joints "
                             "of the same kind, material, size and connection may swap")
    return new


def _kind_places(top) -> dict:
    """Where each joint's kind is given: label -> "file: section[i].kind"."""
    places = {}
    if "section" in top:
        n = 0
        for t in top.tables("section", SECTION_KEYS):
            count = int(t.raw("count"))
            for k in range(count):
                places[f"J{n + k + 1}"] = t.where("kind")
            n += count
    elif "joint" in top:
        for i, t in enumerate(top.tables("joint", JOINT_KEYS), start=1):
            places[t.text("label", default=f"J{i}").strip()] = t.where("kind")
    return places


def _check_float_kinds(top, ft, running, closure, warnings, source) -> None:
    """The float_shoe / float_collar joint kinds must agree with [float_equipment].

    The planner models one check valve: the one the [float_equipment] table
    places.  A joint kind naming another valve would put a valve in the hole
    the plan does not know about (a float shoe under a planned collar keeps
    the shoe track empty; a staged or open-ended plan would run closed), so
    a disagreement is refused (common practice, no source: one valve, one
    place, named once).
    """
    shoes = [i for i, j in enumerate(running, start=1) if j.kind == "float_shoe"]
    collars = [i for i, j in enumerate(running, start=1) if j.kind == "float_collar"]
    if not shoes and not collars:
        return
    places = _kind_places(top)

    def where(i):
        return places.get(running[i - 1].label, f"{source}: {running[i - 1].label}")

    def name(i):
        return running[i - 1].label

    if len(shoes) > 1:
        raise InputError(where(shoes[1]), f"{len(shoes)} joints are of kind \"float_shoe\" "
                                          f"({name(shoes[0])}, {name(shoes[1])}"
                                          f"{', ...' if len(shoes) > 2 else ''}): expected one float "
                                          "shoe, on the bottom joint; make the others \"blank\"")
    if shoes and shoes[0] != 1:
        raise InputError(where(shoes[0]), f"{name(shoes[0])} is of kind \"float_shoe\" but is joint "
                                          f"{shoes[0]} from the bottom: expected the float shoe on the "
                                          f"bottom joint ({name(1)})")
    if len(collars) > 1:
        raise InputError(where(collars[1]), f"{len(collars)} joints are of kind \"float_collar\" "
                                            f"({name(collars[0])}, {name(collars[1])}"
                                            f"{', ...' if len(collars) > 2 else ''}): rigplan plans one "
                                            "check valve; make the others \"blank\"")
    if ft is None:
        warnings.append(f"{source}: the string has float_shoe or float_collar joints but no "
                        "[float_equipment] table: it is planned open-ended")
        return
    m = closure.valve_joint
    table = ("no float equipment" if m is None else "a float shoe" if m == 0
             else f"a float collar on {name(m)}")
    ask = "which valve is in the string? rigplan plans the one [float_equipment] names"
    if shoes and m != 0:
        raise InputError(where(shoes[0]), f"{name(1)} is a float_shoe joint but [float_equipment] "
                                          f"places {table}: {ask}; make {name(1)} kind \"shoe\" "
                                          "or set type = \"float_shoe\"")
    if collars and m != collars[0]:
        raise InputError(where(collars[0]), f"{name(collars[0])} is a float_collar joint but "
                                            f"[float_equipment] places {table}: {ask}; make "
                                            f"{name(collars[0])} kind \"blank\" or set type = "
                                            f"\"float_collar\" and collar_joint = {collars[0]}")


def _has_derated_material(joints) -> bool:
    from rigplan.engine import materials

    return any(materials.get_material(j.material).temperature_derating for j in joints)


def _temperature_text(value: float, system: str, difference: bool) -> str:
    if system == "us":
        return f"{value * 1.8 if difference else value * 1.8 + 32.0:.12g} F"
    return f"{value:.12g} C"


def _replace(spec, **changes):
    values = {f.name: getattr(spec, f.name) for f in fields(spec)}
    values.update(changes)
    return type(spec)(**values)


# ---------------------------------------------------------------------------
# the whole plan


def plan_from_data(data: dict, source: str, base_dir=Path("."), default_name: str = "") -> PlanRead:
    if not data:
        raise InputError(source, "the file is empty: expected a string plan (a [hole] table "
                                 "and [[section]] or [[joint]] tables)")
    check_version(data, source)
    system = file_system(data, source)
    top = Table(data, source, "", system, TOP_KEYS)
    warnings = []

    name = top.text("name", default=default_name) or default_name
    well = top.text("well")
    site = top.text("site")
    notes = top.text("notes")

    report = _report_table(top.table("report", REPORT_KEYS))

    # hole
    ht = top.table("hole", HOLE_KEYS)
    if ht is None:
        raise InputError(f"{source}: hole", "required: a [hole] table with at least fluid_density "
                                            "(e.g. fluid_density = \"9.2 ppg\")")
    hole = Hole(
        fluid_density=_fluid_density(ht, "fluid_density", required=True),
        fluid_level=ht.quantity("fluid_level", "length", default=0.0, nonnegative=True,
                                limits="depth"),
        depth=ht.quantity("depth", "length", default=math.nan, positive=True, limits="depth"),
        diameter=ht.quantity("diameter", "diameter", default=math.nan, positive=True,
                             limits="diameter"),
        temperature=_temperature(ht, "temperature", Hole.temperature, difference=False),
    )
    if not math.isnan(hole.depth) and hole.fluid_level > hole.depth:
        raise InputError(ht.where("fluid_level"),
                         f"fluid level {_shown(hole.fluid_level, 'length', ht.system)} is below "
                         f"the bottom of the hole ({_shown(hole.depth, 'length', ht.system)}): "
                         "expected a depth to the fluid from 0 to the hole depth")

    # string
    if "section" in top and "joint" in top:
        raise InputError(f"{source}: joint", "give the string either as [[section]] tables or as "
                                             "[[joint]] tables, not both")
    if "section" in top:
        joints = _joints_from_sections(top.tables("section", SECTION_KEYS))
    elif "joint" in top:
        joints = _joints_one_by_one(top.tables("joint", JOINT_KEYS))
    else:
        raise InputError(f"{source}: section", "required: the string, as [[section]] tables "
                                               "(kind, material, od, wall, joint_length, count) "
                                               "or [[joint]] tables")
    if not joints:
        key = "section" if "section" in top else "joint"
        raise InputError(top.where(key), f"expected at least one [[{key}]] table (kind, material, "
                                         "od, wall and length of the joints), got none")

    # tally
    tally_path = None
    tally_name = top.text("tally", default=None)
    if tally_name is not None:
        from rigplan.files.formats.tally import read_tally

        if not tally_name.strip():
            raise InputError(top.where("tally"), "expected the path of a tally CSV, got an empty text")
        tally_path = Path(base_dir) / tally_name
        try:
            found = tally_path.is_file()
        except (OSError, ValueError) as exc:
            raise InputError(top.where("tally"), f"not a usable tally file name "
                                                 f"({getattr(exc, 'strerror', None) or exc})") from None
        if not found:
            raise InputError(top.where("tally"), f"tally file {str(tally_path)!r} not found "
                                                 "(the path is relative to the plan file)")
        joints = apply_tally(joints, read_tally(tally_path), str(tally_path))

    running = [j for j in joints if not j.rejected]
    if not running:
        if tally_path is not None:
            raise InputError(str(tally_path), "every joint of the plan is set aside (status "
                                              "rejected) in this tally: nothing to run")
        raise InputError(top.where("joint"), "every joint is marked rejected: nothing to run")
    n_run = len(running)
    shoe_depth = sum(j.run_length for j in running)
    position_of_label = {j.label: i for i, j in enumerate(joints, start=1)}

    # float equipment
    closure = Closure()
    ft = top.table("float_equipment", FLOAT_KEYS)
    if ft is not None:
        kind = ft.choice("type", FLOAT_TYPES, required=True)
        rating = ft.quantity("valve_rating", "pressure", default=math.nan, allow_unrated=True,
                             positive=True)
        if not math.isnan(rating):
            ranges.check("pressure_rating", rating, ft.where("valve_rating"),
                         ft.raw("valve_rating"), ft.system)
        if kind != "float_collar" and "collar_joint" in ft:
            raise InputError(ft.where("collar_joint"), f"collar_joint is only for type = \"float_collar\" "
                                                       f"(type is {kind!r})")
        if kind == "none":
            if "valve_rating" in ft:
                raise InputError(ft.where("valve_rating"), "no float equipment (type = \"none\"): "
                                                           "a valve rating has no valve to go with")
            closure = Closure()
        elif kind == "float_shoe":
            closure = Closure(valve_joint=0, valve_rating=rating)
        else:
            if "collar_joint" not in ft:
                raise ft.missing("collar_joint", "the joint whose top carries the float collar "
                                                 "(position 1..n counted from the shoe, or a label)")
            raw = ft.raw("collar_joint")
            if isinstance(raw, str):
                if raw.strip() not in position_of_label:
                    raise InputError(ft.where("collar_joint"), f"no joint labelled {raw!r}: float collar "
                                                               "placed below the shoe or above the top")
                position = position_of_label[raw.strip()]
            else:
                position = ft.integer("collar_joint", what="a joint position (1 = bottom joint) or label")
                if not 1 <= position <= len(joints):
                    raise InputError(ft.where("collar_joint"),
                                     f"float collar placed below the shoe or above the top: expected "
                                     f"a joint 1..{len(joints)}, got {position}")
            collar = joints[position - 1]
            if collar.rejected:
                by = f"the tally {str(tally_path)!r}" if tally_path is not None else "the plan"
                raise InputError(ft.where("collar_joint"), f"the float collar joint {collar.label} is "
                                                           f"rejected in {by}: move the collar")
            valve_joint = sum(1 for j in joints[:position] if not j.rejected)
            closure = Closure(valve_joint=valve_joint, valve_rating=rating)
    _check_float_kinds(top, ft, running, closure, warnings, source)

    # running settings
    rt = top.table("running", RUNNING_KEYS)
    settings_kw = {}
    if rt is not None:
        settings_kw["fill_density"] = _fluid_density(rt, "fill_density",
                                                     default=_DEFAULT_SETTINGS.fill_density)
        alts = rt.list_of("fill_alternatives")
        if alts is not None and len(alts) > MAX_FILL_ALTERNATIVES:
            raise InputError(rt.where("fill_alternatives"),
                             f"{len(alts)} fill fluids: expected at most {MAX_FILL_ALTERNATIVES} "
                             "other fill fluids to compare")
        if alts is not None:
            settings_kw["fill_density_alternatives"] = tuple(
                _fluid_density(rt, "fill_alternatives", index=i, value=v)
                for i, v in enumerate(alts, start=1))
        settings_kw["min_running_weight"] = rt.quantity("min_running_weight", "force",
                                                        default=0.0, nonnegative=True,
                                                        limits="force")
        settings_kw["set_down_weight"] = rt.quantity("set_down_weight", "force", default=0.0,
                                                     nonnegative=True, limits="force")
        settings_kw["screen_depth_tolerance"] = rt.quantity(
            "screen_depth_tolerance", "length", default=_DEFAULT_SETTINGS.screen_depth_tolerance,
            nonnegative=True, limits="screen_depth_tolerance")
        if "stage1_release" in rt:
            settings_kw["stage1_release"] = rt.choice("stage1_release", STAGE1_RELEASES)
        cands = rt.list_of("collar_candidates")
        if cands is not None and len(cands) > MAX_COLLAR_CANDIDATES:
            raise InputError(rt.where("collar_candidates"),
                             f"{len(cands)} float collar positions: expected at most "
                             f"{MAX_COLLAR_CANDIDATES} positions to compare")
        if cands is not None:
            checked = []
            for i, c in enumerate(cands, start=1):
                if isinstance(c, bool) or not isinstance(c, int) or not 1 <= c <= n_run:
                    raise InputError(f"{rt.where('collar_candidates')}[{i}]",
                                     f"float collar placed below the shoe or above the top: expected "
                                     f"a joint 1..{n_run}, got {_short(c)}")
                checked.append(c)
            settings_kw["float_collar_positions"] = tuple(checked)
    if "float_collar_positions" not in settings_kw:
        settings_kw["float_collar_positions"] = tuple(
            c for c in _DEFAULT_SETTINGS.float_collar_positions if c <= n_run)

    dt = top.table("design_factors", DESIGN_KEYS)
    if dt is not None:
        df = {}
        for key in DESIGN_KEYS:
            df[key] = dt.number(key, default=getattr(_DEFAULT_DESIGN, key),
                                limits="design_factor")
        settings_kw["design"] = DesignFactors(**df)
    settings = Settings(**settings_kw)

    # grout
    grout = None
    gt = top.table("grout", GROUT_KEYS)
    if settings.stage1_release == "after_grout" and gt is None:
        raise InputError(f"{source}: running.stage1_release",
                         "\"after_grout\" holds stage 1 until the grout at its shoe has set: "
                         "add a [grout] table (density, height)")
    if gt is not None:
        grout = GroutSpec(
            density=_fluid_density(gt, "density", required=True),
            height=gt.quantity("height", "length", required=True, positive=True, limits="depth"),
            inside_density=_fluid_density(
                gt, "inside_density",
                default=GroutSpec.__dataclass_fields__["inside_density"].default),
            inside_level=gt.quantity("inside_level", "length", default=0.0, nonnegative=True,
                                     limits="depth"),
            temperature_rise=_temperature(gt, "temperature_rise", 0.0, difference=True),
        )
        if grout.height > shoe_depth * (1 + 1e-12):
            raise InputError(gt.where("height"), f"grout column {gt.raw('height')!r} is taller than the "
                                                 f"string ({shoe_depth:.2f} m to the shoe)")
        if grout.inside_level > shoe_depth * (1 + 1e-12):
            raise InputError(gt.where("inside_level"), f"fill level outside the pipe: "
                                                       f"{gt.raw('inside_level')!r} is below the shoe "
                                                       f"({shoe_depth:.2f} m)")
        if "temperature_rise" not in gt and _has_derated_material(running):
            warnings.append(f"{gt.where('temperature_rise')}: not given: the grouting check rates "
                            "the thermoplastic casing at the job temperature, without the heat "
                            "of hydration of the grout (enter the expected rise, e.g. \"30 F\")")
        if grout.density < hole.fluid_density:
            warnings.append(f"{gt.where('density')}: grout is lighter than the hole fluid: it will "
                            "not displace it from the annulus")

    # cross checks that only warn
    if not math.isnan(hole.depth) and shoe_depth > hole.depth * (1 + 1e-12):
        warnings.append(f"{ht.where('depth')}: the string ({shoe_depth:.2f} m) is longer than the "
                        f"hole ({hole.depth:.2f} m)")
    if not math.isnan(hole.diameter):
        widest = max(running, key=lambda j: j.od)
        if widest.od >= hole.diameter:
            warnings.append(f"{ht.where('diameter')}: {widest.label} has an od of "
                            f"{widest.od * 1000:.1f} mm, not less than the hole diameter "
                            f"({hole.diameter * 1000:.1f} mm)")

    plan = StringPlan(name=name, well=well, hole=hole, joints=tuple(joints), closure=closure,
                      settings=settings, grout=grout, site=site, notes=notes, source=source,
                      report=report)
    return PlanRead(plan=plan, warnings=tuple(warnings), tally_path=tally_path, units=system)


# ---------------------------------------------------------------------------
# writing


def _default_labels(joints) -> bool:
    return all(j.label == f"J{i}" for i, j in enumerate(joints, start=1))


def _joint_doc(j: JointSpec, system: str, as_section: bool) -> dict:
    d = {}
    if not as_section:
        d["label"] = j.label
    d["kind"] = j.kind
    d["material"] = j.material
    d["od"] = quantity_text(j.od, "diameter", system)
    d["wall"] = quantity_text(j.wall, "diameter", system)
    if as_section:
        d["joint_length"] = quantity_text(j.length, "length", system)
    else:
        d["length"] = quantity_text(j.length, "length", system)
        if j.measured_length is not None:
            d["measured_length"] = quantity_text(j.measured_length, "length", system)
        if j.rejected:
            d["rejected"] = True
        if j.note:
            d["note"] = j.note
    d["connection"] = j.connection
    if j.weld_efficiency is not None:
        d["weld_efficiency"] = float(j.weld_efficiency)
    for key, attr, kind, _ in _OPTIONAL_QUANTITIES:
        v = getattr(j, attr)
        if v is not None:
            d[key] = quantity_text(v, kind, system)
    if j.ellipticity is not None:
        d["ellipticity"] = float(j.ellipticity)
    return d


def _same_but_label(a: JointSpec, b: JointSpec) -> bool:
    return _replace(a, label="") == _replace(b, label="")


def plan_text(plan: StringPlan, system: str = "si", header: str = "") -> str:
    """TOML text of a plan in ``system`` units (see :func:`write_plan`)."""
    if system not in ("si", "us"):
        raise ValueError(f"unknown unit system {system!r}; known: si, us")
    doc = {"version": SCHEMA_VERSION, "units": system, "name": plan.name}
    for key in ("well", "site", "notes"):
        if getattr(plan, key):
            doc[key] = getattr(plan, key)

    h = plan.hole
    hole = {"fluid_density": quantity_text(h.fluid_density, "density", system),
            "fluid_level": quantity_text(h.fluid_level, "length", system)}
    if not math.isnan(h.depth):
        hole["depth"] = quantity_text(h.depth, "length", system)
    if not math.isnan(h.diameter):
        hole["diameter"] = quantity_text(h.diameter, "diameter", system)
    if h.temperature != Hole.temperature:
        hole["temperature"] = _temperature_text(h.temperature, system, difference=False)
    doc["hole"] = hole

    joints = list(plan.joints)
    if not joints:
        raise ValueError("a plan without joints cannot be written")
    sectioned = _default_labels(joints) and not any(
        j.measured_length is not None or j.rejected for j in joints)
    if sectioned:
        sections = []
        run_start = 0
        for i in range(1, len(joints) + 1):
            if i == len(joints) or not _same_but_label(joints[i], joints[run_start]):
                s = _joint_doc(joints[run_start], system, as_section=True)
                s["count"] = i - run_start
                sections.append(s)
                run_start = i
        doc["section"] = sections
    else:
        doc["joint"] = [_joint_doc(j, system, as_section=False) for j in joints]

    c = plan.closure
    if c.valve_joint is not None:
        fe = {}
        if c.valve_joint == 0:
            fe["type"] = "float_shoe"
        else:
            running = plan.running_joints()
            if not 1 <= c.valve_joint <= len(running):
                raise ValueError(f"float collar at running joint {c.valve_joint} outside 1..{len(running)}")
            fe["type"] = "float_collar"
            fe["collar_joint"] = running[c.valve_joint - 1].label
        if not math.isnan(c.valve_rating):
            fe["valve_rating"] = quantity_text(c.valve_rating, "pressure", system)
        doc["float_equipment"] = fe

    s = plan.settings
    run = {"fill_density": quantity_text(s.fill_density, "density", system)}
    if s.fill_density_alternatives:
        run["fill_alternatives"] = [quantity_text(v, "density", system)
                                    for v in s.fill_density_alternatives]
    run["min_running_weight"] = quantity_text(s.min_running_weight, "force", system)
    run["set_down_weight"] = quantity_text(s.set_down_weight, "force", system)
    run["collar_candidates"] = [int(v) for v in s.float_collar_positions]
    if s.screen_depth_tolerance != _DEFAULT_SETTINGS.screen_depth_tolerance:
        run["screen_depth_tolerance"] = quantity_text(s.screen_depth_tolerance, "length", system)
    if s.stage1_release != _DEFAULT_SETTINGS.stage1_release:
        run["stage1_release"] = s.stage1_release
    doc["running"] = run
    doc["design_factors"] = {"tension": float(s.design.tension),
                             "collapse": float(s.design.collapse),
                             "burst": float(s.design.burst)}

    if plan.grout is not None:
        g = plan.grout
        doc["grout"] = {"density": quantity_text(g.density, "density", system),
                        "height": quantity_text(g.height, "length", system),
                        "inside_density": quantity_text(g.inside_density, "density", system),
                        "inside_level": quantity_text(g.inside_level, "length", system)}
        if g.temperature_rise:
            doc["grout"]["temperature_rise"] = _temperature_text(g.temperature_rise, system,
                                                                 difference=True)
    if plan.report:
        doc["report"] = dict(plan.report)
    if not header:
        header = f"rigplan string plan: {plan.name}" + (f", well {plan.well}" if plan.well else "")
    return dump_toml(doc, header=header)


def write_plan(plan: StringPlan, path, system: str = "si", header: str = "") -> None:
    """Write ``plan`` to ``path`` as a version-1 plan file, atomically.

    Every quantity is written with its unit in ``system`` ("si" or "us") to
    12 significant digits, so reading the file back gives the same plan to
    within 5e-13 relative.  Joints with the default labels J1..Jn and no
    tally data are grouped into ``[[section]]`` tables of identical joints;
    otherwise every joint is written as a ``[[joint]]`` table with its
    measured length and rejection (the tally is then part of the file, and
    no ``tally`` key is written).  Comments of an earlier file are not kept.
    """
    from rigplan.files.atomicio import atomic_write_text

    atomic_write_text(path, plan_text(plan, system, header))
