"""The liner tables of a string plan, and caliper logs in LAS 2.0.

A liner job's plan carries, beside the usual tables::

    [existing_casing]          # the old casing the liner goes into
    od = "10-3/4 in"
    wall = "0.250 in"
    material = "a53b"
    top = "0 ft"
    bottom = "400 ft"
    ellipticity = 0.01         # optional: assumed where no log is given
    caliper_log = "old.las"    # optional: the log, relative to the plan file

    [liner_fit]                # optional
    clearance = "0.5 in"       # least diametral clearance the liner needs
    coupling_od = "7.39 in"    # liner couplings (if threaded and coupled)
    centralizer_od = "9.5 in"  # rigid centralizers ...
    centralizer_every = 3      # ... on every third joint from the bottom

The caliper log is an LAS 2.0 file (the open well-log format of the Canadian
Well Logging Society), read with ``lasio``: a depth index in feet or metres
and either two caliper curves across the pipe (X and Y) or the radii of a
multi-arm tool (curves ``R01`` ... ``Rnn``, an even number).  Diameters
may be in inches, millimetres or centimetres, read from each curve's unit.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from rigplan.errors import InputError
from rigplan.files import units

#: Default least diametral clearance between the liner's largest OD and the
#: old casing's smallest inside diameter: half an inch (common practice, no
#: source; local codes and the liner maker may ask for more).
DEFAULT_CLEARANCE = 0.5 * 0.0254

EXISTING_KEYS = ("od", "wall", "material", "top", "bottom", "ellipticity",
                 "outside_density", "outside_level", "caliper_log")
FIT_KEYS = ("clearance", "coupling_od", "centralizer_od", "centralizer_every")

#: Mnemonics taken as the X and Y calipers when no curve is named.
X_NAMES = ("CALX", "XCAL", "C1", "CAL1", "CALI_X", "CX")
Y_NAMES = ("CALY", "YCAL", "C2", "CAL2", "CALI_Y", "CY")
_ARM = re.compile(r"^R(\d+)$", re.IGNORECASE)

_LAS_LENGTH_UNITS = {"F": "ft", "FT": "ft", "FEET": "ft", "FOOT": "ft", "M": "m", "METER": "m",
                     "METERS": "m", "METRE": "m", "METRES": "m",
                     "IN": "in", "INCH": "in", "INCHES": "in", "MM": "mm", "CM": "cm"}


@dataclass(frozen=True)
class ExistingCasingSpec:
    """The old casing and the liner's fit requirements, SI.

    od, wall [m]; material : library key; top, bottom [m];
    ellipticity : assumed where no log reads [-]; outside_density [kg/m3]
    and outside_level [m] of the water outside the old casing (nan: the
    hole fluid and its level); clearance [m]; coupling_od, centralizer_od
    [m] (nan: none); centralizer_every : joints between centralizers (0: none)
    """

    od: float
    wall: float
    material: str
    top: float
    bottom: float
    ellipticity: float = 0.01
    outside_density: float = math.nan
    outside_level: float = math.nan
    clearance: float = DEFAULT_CLEARANCE
    coupling_od: float = math.nan
    centralizer_od: float = math.nan
    centralizer_every: int = 0
    caliper_log: Path | None = None


def read_existing_casing(plan_path) -> ExistingCasingSpec | None:
    """The ``[existing_casing]`` and ``[liner_fit]`` tables of a plan (None: not a liner job)."""
    from rigplan.files.formats import Table, file_system, read_toml
    from rigplan.engine.materials import LIBRARY

    source = str(plan_path)
    data = read_toml(plan_path)
    if "existing_casing" not in data:
        return None
    system = file_system(data, source)
    t = Table(data["existing_casing"], source, "existing_casing", system, EXISTING_KEYS)
    od = t.quantity("od", "diameter", required=True, positive=True)
    wall = t.quantity("wall", "diameter", required=True, positive=True)
    if wall >= od / 2:
        raise InputError(t.where("wall"), f"expected a wall less than half the od, got {t.raw('wall')!r}")
    material = t.text("material", required=True).strip().lower()
    if material not in LIBRARY:
        raise InputError(t.where("material"), f"unknown material {material!r}; known: "
                                              + ", ".join(sorted(LIBRARY)))
    top = t.quantity("top", "length", default=0.0, nonnegative=True)
    bottom = t.quantity("bottom", "length", required=True, positive=True)
    if bottom <= top:
        raise InputError(t.where("bottom"), f"expected the bottom deeper than the top "
                                            f"({t.raw('top', '0')!r}), got {t.raw('bottom')!r}")
    e = t.number("ellipticity", default=0.01, what="an ellipticity 0 to 0.2")
    if not 0.0 <= e <= 0.2:
        raise InputError(t.where("ellipticity"), f"expected an ellipticity from 0 to 0.2 "
                                                 f"((Dmax - Dmin)/(Dmax + Dmin)), got {e:g}")
    rho = t.quantity("outside_density", "density", default=math.nan, positive=True)
    if math.isfinite(rho) and not 800.0 <= rho <= 2600.0:
        raise InputError(t.where("outside_density"), "expected a fluid density from 800 to "
                                                     "2600 kg/m3 (6.7 to 21.7 ppg)")
    level = t.quantity("outside_level", "length", default=math.nan, nonnegative=True)
    log_name = t.text("caliper_log", default=None)
    log_path = None
    if log_name is not None:
        if not log_name.strip():
            raise InputError(t.where("caliper_log"), "expected the path of an LAS file, got an "
                                                     "empty text")
        log_path = Path(plan_path).parent / log_name
    fit = {}
    if "liner_fit" in data:
        f = Table(data["liner_fit"], source, "liner_fit", system, FIT_KEYS)
        fit["clearance"] = f.quantity("clearance", "diameter", default=DEFAULT_CLEARANCE,
                                      nonnegative=True)
        fit["coupling_od"] = f.quantity("coupling_od", "diameter", default=math.nan, positive=True)
        fit["centralizer_od"] = f.quantity("centralizer_od", "diameter", default=math.nan,
                                           positive=True)
        fit["centralizer_every"] = f.integer("centralizer_every", default=0, minimum=0)
        if fit["centralizer_every"] and not math.isfinite(fit["centralizer_od"]):
            raise InputError(f.where("centralizer_every"), "give centralizer_od as well "
                                                           "(e.g. centralizer_od = \"9.5 in\")")
    return ExistingCasingSpec(od=od, wall=wall, material=material, top=top, bottom=bottom,
                              ellipticity=e, outside_density=rho, outside_level=level,
                              caliper_log=log_path, **fit)


@dataclass(frozen=True)
class CaliperLog:
    """A caliper log, SI: depths [m] and inside diameters across the pipe [m].

    depth : shape (m,), increasing; diameters : shape (m, k), k >= 2;
    curves : the curve mnemonics used; tool : "x-y" or "multi-arm (n arms)"
    """

    depth: np.ndarray
    diameters: np.ndarray
    curves: tuple
    tool: str
    source: str


def _si_factor(unit: str, kind: str, where: str) -> float:
    u = (unit or "").strip()
    text = _LAS_LENGTH_UNITS.get(u.upper(), u)
    if not text:
        raise InputError(where, f"the curve has no unit: expected {units.describe(kind)} "
                                "(ft or m for depth; in, mm or cm for diameters)")
    return units.parse(f"1 {text}", kind, None, where)


def read_caliper_las(path, x_curve: str | None = None, y_curve: str | None = None) -> CaliperLog:
    """Read a caliper log from an LAS 2.0 file (see the module notes)."""
    p = Path(path)
    where = str(p)
    try:
        raw = p.read_bytes()
    except OSError as exc:
        raise InputError(where, f"cannot read the caliper log ({exc.strerror or exc}): "
                                "expected an LAS 2.0 file") from None
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError:
        text = raw.decode("latin-1")
    import lasio   # a few hundred ms: only when a log is read

    try:
        las = lasio.read(text, ignore_header_errors=False)
    except Exception as exc:   # lasio raises many kinds; all mean "not a readable LAS"
        first = str(exc).strip().splitlines()[0][:160] if str(exc).strip() else type(exc).__name__
        raise InputError(where, f"not a readable LAS 2.0 file ({first})") from None
    curves = {c.mnemonic.upper(): c for c in las.curves}
    if not las.curves or las.index is None or len(las.index) == 0:
        raise InputError(where, "the log has no data: expected a ~A section with a depth column")
    index_curve = las.curves[0]
    z = np.asarray(las.index, dtype=float) * _si_factor(index_curve.unit, "length",
                                                         f"{where}: curve {index_curve.mnemonic}")

    def curve(name):
        c = curves.get(name.upper())
        if c is None:
            raise InputError(f"{where}: curve {name}", "not in the log; curves: "
                                                       + ", ".join(curves))
        return np.asarray(c.data, dtype=float) * _si_factor(c.unit, "diameter",
                                                            f"{where}: curve {c.mnemonic}")

    if x_curve or y_curve:
        if not (x_curve and y_curve):
            raise InputError(where, "name both caliper curves (--x and --y), or neither")
        names = (x_curve.upper(), y_curve.upper())
        d = np.column_stack([curve(n) for n in names])
        tool = "x-y"
    else:
        arms = sorted((int(m.group(1)), k) for k in curves if (m := _ARM.match(k)))
        xs = [k for k in X_NAMES if k in curves]
        ys = [k for k in Y_NAMES if k in curves]
        if xs and ys:
            names = (xs[0], ys[0])
            d = np.column_stack([curve(n) for n in names])
            tool = "x-y"
        elif len(arms) >= 4:
            if len(arms) % 2:
                raise InputError(f"{where}: curve {arms[-1][1]}", f"{len(arms)} arm curves: a "
                                 "multi-arm caliper needs an even number (opposite pairs)")
            names = tuple(k for _, k in arms)
            from rigplan.engine.liner import diameters_from_arms
            d = diameters_from_arms(np.column_stack([curve(n) for n in names]))
            tool = f"multi-arm ({len(arms)} arms)"
        else:
            raise InputError(where, "no caliper curves found: expected X and Y calipers "
                                    f"({'/'.join(X_NAMES[:2])} and {'/'.join(Y_NAMES[:2])}), "
                                    "multi-arm radii R01..Rnn, or name them with --x and --y")
    keep = np.isfinite(z) & (np.sum(np.isfinite(d), axis=1) >= 2)
    z, d = z[keep], d[keep]
    if z.size < 2:
        raise InputError(where, "fewer than two depths with caliper readings")
    order = np.argsort(z, kind="stable")
    z, d = z[order], d[order]
    if np.any(np.diff(z) <= 0):
        i = int(np.flatnonzero(np.diff(z) <= 0)[0])
        raise InputError(f"{where}: depth {units.format(z[i + 1], 'length', 'us', 2)}",
                         "depth listed twice: expected one reading per depth")
    bad = np.isfinite(d) & ~((d > 0.02) & (d < 2.0))
    if np.any(bad):
        i = int(np.flatnonzero(np.any(bad, axis=1))[0])
        raise InputError(f"{where}: depth {units.format(z[i], 'length', 'us', 2)}",
                         "caliper diameter outside 0.02 to 2 m (0.8 to 79 in): check the "
                         "curve's unit")
    return CaliperLog(depth=z, diameters=d, curves=names, tool=tool, source=where)
