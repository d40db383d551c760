"""The sane range of every number a user enters, stated once.

The file readers (plan, rig, materials, tally, run log) and the app's
prompts check each value they read against the :class:`Range` named here,
so a number accepted by one edge is accepted by every other, and a refusal
says the same thing wherever it happens: what was expected, with its unit
in SI and in US field units, and the value given.

A range is not a design limit.  It is wide enough for every water well and
every rig this planner is meant for, and narrow enough to catch a unit slip
(``9.2`` kg/m3 for 9.2 ppg), a typing slip (``2006`` ft for 20.06 ft) and a
value that would turn into an overflow, a NaN or an endless loop in the
engine.  Each range says why it is where it is.

Values are SI (the unit of the quantity ``kind`` in :mod:`rigplan.files.units`:
m, kg/m3, Pa, N, N/m; ``count`` and ``dimensionless`` are plain numbers;
``temperature`` is in C and ``temperature_difference`` in K).

>>> RANGES["sheave_factor"].contains(1.04), RANGES["sheave_factor"].contains(1e100)
(True, False)
>>> RANGES["weld_efficiency"].interval_text()
'in (0, 1] [-]'
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from rigplan.engine.hoisting import LINES_RANGE as _LINES, SHEAVE_FACTOR_RANGE as _SHEAVE
from rigplan.errors import InputError
from rigplan.files import units

__all__ = ["Range", "RANGES", "MAX_JOINTS", "check", "get"]

#: Most joints in one string [-].  The engine is built for long strings
#: (10,000 joints plan in under 0.1 s, see benchmarks/run.py); 20,000 joints
#: of 6 m make 120 km, far past any well, so a larger count is a slip.
MAX_JOINTS = 20_000


@dataclass(frozen=True)
class Range:
    """An allowed interval for one kind of input.

    name : key in :data:`RANGES`
    what : what the value is, for messages ("a sheave factor")
    kind : quantity kind of :mod:`rigplan.files.units`, or ``"count"``
    lo, hi : the bounds [SI unit of ``kind``]
    lo_inclusive, hi_inclusive : whether a bound itself is allowed
    why : the reason for the bounds (shown in the schema, not in messages)
    """

    name: str
    what: str
    kind: str
    lo: float
    hi: float
    lo_inclusive: bool = True
    hi_inclusive: bool = True
    why: str = ""

    def contains(self, value) -> bool:
        """True when ``value`` [SI] is a finite number inside the range."""
        try:
            v = float(value)
        except (TypeError, ValueError, OverflowError):
            return False
        if not math.isfinite(v):
            return False
        above = v >= self.lo if self.lo_inclusive else v > self.lo
        below = v <= self.hi if self.hi_inclusive else v < self.hi
        return above and below

    def _bounds(self, system: str | None):
        if self.kind == "count":
            return f"{int(self.lo):,}", f"{int(self.hi):,}", ""
        if self.kind in ("temperature", "temperature_difference"):
            if system == "us":      # F = C x 1.8 + 32; a difference x 1.8 (NIST SP 811 B.8)
                off = 32.0 if self.kind == "temperature" else 0.0
                return _number(self.lo * 1.8 + off), _number(self.hi * 1.8 + off), "F"
            return _number(self.lo), _number(self.hi), "C" if self.kind == "temperature" else "K"
        if self.kind == "dimensionless":
            return f"{self.lo:g}", f"{self.hi:g}", "[-]"
        system = system or "si"
        lo = units.to_display(self.lo, self.kind, system)
        hi = units.to_display(self.hi, self.kind, system)
        return _number(lo), _number(hi), units.unit_label(self.kind, system)

    def interval_text(self, system: str | None = None) -> str:
        """The range in words or interval notation, in one unit system.

        >>> RANGES["fluid_density"].interval_text("si")
        'between 600 and 3,000 kg/m3'
        """
        lo, hi, label = self._bounds(system)
        tail = f" {label}" if label else ""
        if self.lo_inclusive and self.hi_inclusive:
            return f"between {lo} and {hi}{tail}"
        left = "[" if self.lo_inclusive else "("
        right = "]" if self.hi_inclusive else ")"
        return f"in {left}{lo}, {hi}{right}{tail}"

    def expected(self, system: str | None = None) -> str:
        """``"a fluid density between 600 and 3000 kg/m3 (5.007 and 25.04 ppg)"``.

        ``system`` puts that system first; both are given for quantities.
        """
        if self.kind in ("count", "dimensionless"):
            return f"{self.what} {self.interval_text()}"
        first = system if system in units.SYSTEMS else "si"
        other = "us" if first == "si" else "si"
        lo, hi, label = self._bounds(other)
        return f"{self.what} {self.interval_text(first)} ({lo} to {hi} {label})"

    def check(self, value, where: str, shown=None, system: str | None = None) -> float:
        """``value`` [SI] as a float, or InputError naming ``where`` and the range.

        ``shown`` is what the user wrote (default: the value itself).
        """
        if self.contains(value):
            return float(value)
        got = value if shown is None else shown
        if isinstance(got, str):
            got_text = repr(got) if len(got) <= 60 else repr(got[:57] + "...")
        elif isinstance(got, int) and not isinstance(got, bool) and abs(got) > 10 ** 15:
            got_text = f"a {len(str(abs(got)))}-digit number"
        else:
            got_text = repr(got)
            if (system in units.SYSTEMS and self.kind not in ("count", "dimensionless")
                    and isinstance(got, (int, float)) and not isinstance(got, bool)):
                # a bare number in a file: read in the file's units, so say which
                got_text += f" {units.unit_label(self.kind, system)} (a bare number is in the file's units)"
        raise InputError(where, f"expected {self.expected(system)}, got {got_text}")


def _number(value: float) -> str:
    """A bound for a message: 4 significant digits, thousands separated.

    >>> _number(11240447.0), _number(0.328084), _number(3000.0)
    ('11,240,000', '0.3281', '3,000')
    """
    if value == 0:
        return "0"
    digits = 3 - math.floor(math.log10(abs(value)))
    rounded = round(value, digits)
    if abs(rounded) >= 1000:
        return f"{rounded:,.0f}"
    return f"{rounded:.{max(digits, 0)}f}".rstrip("0").rstrip(".")


def _ranges(*items: Range) -> dict:
    return {r.name: r for r in items}


#: Every range, by name.  Sources of the "why" figures are given inline.
RANGES = _ranges(
    # -- lengths [m] -------------------------------------------------------
    Range("depth", "a depth or height", "length", 0.0, 15_000.0,
          why="deeper than any borehole drilled (Kola SG-3 reached 12,262 m; from memory); "
              "water wells are a few hundred to a few thousand metres"),
    Range("joint_length", "a joint length", "length", 0.1, 30.0,
          why="a pup joint or shoe is rarely under 0.3 m and casing range 3 is 12-14 m "
              "(API 5CT length ranges, from memory); outside is a slip of the tape or a unit"),
    Range("screen_depth_tolerance", "a screen depth tolerance", "length", 0.0, 30.0,
          why="how far a screen interval may land from its planned depth before a warning; "
              "more than five joints (about 100 ft) is no longer a check"),
    # -- diameters and walls [m] ----------------------------------------------
    Range("diameter", "a diameter", "diameter", 0.005, 3.0,
          why="from small tubing to the largest bored shafts; a 60 in casing is 1.52 m"),
    Range("wall", "a wall thickness", "diameter", 0.0001, 0.15,
          why="thin screen wire-wraps to the heaviest conductor pipe (about 2 in)"),
    # -- densities [kg/m^3] ----------------------------------------------------
    Range("fluid_density", "a fluid density", "density", 600.0, 3000.0,
          why="about 5 to 25 ppg: lighter than any drilling fluid, foam aside, to heavier "
              "than any grout or weighted mud; outside is almost surely a unit slip"),
    Range("material_density", "a material density", "density", 500.0, 25_000.0,
          why="from plastics (PVC about 1,400 kg/m3) to the densest metals (about 22,600 kg/m3)"),
    # -- pressures and stresses [Pa] ------------------------------------------
    Range("pressure_rating", "a pressure rating", "pressure", 0.0, 1e9,
          lo_inclusive=False,
          why="above zero and below 145,000 psi, far above any pipe's burst or collapse rating"),
    Range("yield_strength", "a yield strength", "stress", 1e6, 5e9,
          why="from soft plastics (a few MPa) to the strongest steels (about 2 GPa)"),
    Range("youngs_modulus", "a Young's modulus", "stress", 1e8, 1e12,
          why="from polyethylene (about 0.8 GPa) to tungsten carbide (about 600 GPa)"),
    # -- forces [N] and weights per length [N/m] ------------------------------
    Range("force", "a force", "force", 0.0, 5e7,
          why="about 5,100 tonne-force (11 million lbf), above any rig or pipe rating; "
              "beyond it the numbers are a slip and overflow the engine's sums"),
    Range("force_rating", "a rating", "force", 0.0, 5e7, lo_inclusive=False,
          why="a rating is above zero (write \"unrated\" when there is none) and below "
              "about 5,100 tonne-force (11 million lbf)"),
    Range("weight_per_length", "a weight per length", "linear_weight", 0.0, 1e5,
          lo_inclusive=False,
          why="above zero and below about 6,850 lb/ft, far heavier than any casing"),
    # -- temperatures [C] and temperature differences [K] ----------------------
    Range("job_temperature", "a job temperature", "temperature", -10.0, 100.0,
          why="groundwater and drilling fluid from near freezing to a hot geothermal well; "
              "the thermoplastic derating tables stop well inside this"),
    Range("temperature_rise", "a temperature rise", "temperature_difference", 0.0, 60.0,
          why="the heat of hydration of a grout column warms the casing by some tens of "
              "kelvin at most"),
    # -- plain numbers [-] --------------------------------------------------------
    Range("lines", "a whole number of lines strung", "count", _LINES[0], _LINES[1],
          why="the block formula's range in rigplan.engine.hoisting: drilling blocks reeve "
              "up to 14 or 16 lines; beyond 24 is a typing error and K^n overflows"),
    Range("sheave_factor", "a sheave factor", "dimensionless", _SHEAVE[0], _SHEAVE[1],
          why="1.04 for roller bearings, about 1.09 for plain bearings (API RP 9B, from "
              "memory); rigplan.engine.hoisting takes more than 1.2 as a typing error"),
    Range("rope_design_factor", "a rope design factor", "dimensionless", 1.0, 20.0,
          why="below 1 the line would work above its breaking force; over 20 is a typing "
              "error (codes ask 2 to 5)"),
    Range("dynamic_factor", "a dynamic factor", "dimensionless", 1.0, 3.0,
          why="1.0 (static) to about 2 for shock loads; above 3 is a slip"),
    Range("design_factor", "a design factor", "dimensionless", 1.0, 10.0,
          why="below 1 a check would allow loads above the rating; 1.0-1.8 is usual "
              "(tension 1.6-1.8, collapse 1.0-1.125, burst 1.0-1.25)"),
    Range("weld_efficiency", "a weld efficiency", "dimensionless", 0.0, 1.0,
          lo_inclusive=False,
          why="a joint efficiency is a share of the body strength (ASME VIII UW-12)"),
    Range("ellipticity", "an ellipticity (Dmax-Dmin)/(Dmax+Dmin)", "dimensionless", 0.0, 1.0,
          hi_inclusive=False,
          why="zero for a round pipe; one would be a flat strip"),
    Range("poisson", "a Poisson ratio", "dimensionless", 0.0, 0.5, hi_inclusive=False,
          why="0.5 is an incompressible solid; steel 0.3, PVC about 0.38"),
    Range("wall_under_tolerance", "a wall under-tolerance", "dimensionless", 0.0, 1.0,
          hi_inclusive=False,
          why="the share the wall may be under the specified wall (12.5 % for API pipe)"),
    Range("joint_count", "a whole number of joints", "count", 1, MAX_JOINTS,
          why=f"the engine plans strings of up to {MAX_JOINTS:,} joints; more is a slip"),
    Range("band_fraction", "a weight band (share of the planned hook load)", "dimensionless",
          0.0, 1.0, lo_inclusive=False, hi_inclusive=False,
          why="a band of 100 % or more would accept any reading"),
)


def get(name: str) -> Range:
    """The range called ``name`` (KeyError naming the known ones)."""
    try:
        return RANGES[name]
    except KeyError:
        raise KeyError(f"no range {name!r}; known: {', '.join(RANGES)}") from None


def check(name: str, value, where: str, shown=None, system: str | None = None) -> float:
    """Check ``value`` [SI] against range ``name``; InputError naming ``where``."""
    return get(name).check(value, where, shown, system)


def schema_table() -> str:
    """The ranges as a plain-text table (for the README and ``--help`` texts)."""
    rows = []
    for r in RANGES.values():
        rows.append(f"{r.name:22s} {r.interval_text('si'):38s} {r.why}")
    return "\n".join(rows)
