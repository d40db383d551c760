"""Generated bad and odd inputs for every edge of rigplan, and their judge.

Used by ``tests/test_fuzz_*.py`` (CI, counts fixed) and by
``benchmarks/fuzz_report.py`` (the figures in the README's Reliability
section).  Inputs are mutations of the bundled files (``rigs/``,
``strings/``) and values drawn from pools of trouble: huge integers, values
that overflow once converted, non-finite numbers, decimal commas, unit
slips, deep nesting, very long fields and names, empty and binary files.

Every call is judged the same way (:class:`Stats`):

* **refused**: :class:`rigplan.errors.InputError` whose text is one line
  and starts with the file (or, for an app prompt, the field) it concerns;
  a refusal that names nothing is counted in ``unnamed``;
* **accepted**: the result is checked by an oracle (every number finite and
  inside its range of :mod:`rigplan.files.ranges`); a result that fails it
  is a **silent accept**;
* any other exception is a **traceback**; a Python warning (numpy's
  ``RuntimeWarning: overflow``) is counted in ``warned``.

Mutations are drawn from ``random.Random(seed)``: a failure report gives
the seed and the input, so it can be replayed.
"""

from __future__ import annotations

import contextlib
import io
import math
import os
import random
import re
import shutil
import sqlite3
import tempfile
import traceback
import warnings
from dataclasses import dataclass, field
from pathlib import Path

from rigplan.errors import InputError, one_line
from rigplan.files import ranges

ROOT = Path(__file__).resolve().parents[1]
RIGS = sorted((ROOT / "rigs").glob("*.toml"))
PLANS = sorted((ROOT / "strings").glob("*.toml"))
TALLIES = sorted((ROOT / "strings").glob("*.csv"))

NAN_INF = re.compile(r"(?<![\w.])-?(nan|inf|infinity)(?![\w])", re.IGNORECASE)


# ---------------------------------------------------------------------------
# the judge


@dataclass
class Stats:
    """Counts for one parser; examples of each failure (at most 5 kept)."""

    name: str
    tried: int = 0
    accepted: int = 0
    refused: int = 0
    tracebacks: int = 0
    silent: int = 0
    unnamed: int = 0
    warned: int = 0
    slow: int = 0
    examples: list = field(default_factory=list)

    def note(self, what: str, description: str, detail: str) -> None:
        if len(self.examples) < 5:
            self.examples.append(f"{what}: {description[:300]!r}\n{detail[-1500:]}")

    def merge(self, other: "Stats") -> "Stats":
        for f in ("tried", "accepted", "refused", "tracebacks", "silent", "unnamed", "warned",
                  "slow"):
            setattr(self, f, getattr(self, f) + getattr(other, f))
        self.examples += other.examples[:max(0, 5 - len(self.examples))]
        return self

    @property
    def failures(self) -> int:
        return self.tracebacks + self.silent + self.unnamed + self.warned + self.slow

    def summary(self) -> str:
        return (f"{self.name}: {self.tried} tried, {self.accepted} accepted, {self.refused} "
                f"refused, {self.tracebacks} tracebacks, {self.silent} silent accepts, "
                f"{self.unnamed} refusals naming nothing, {self.warned} with warnings, "
                f"{self.slow} over the time limit")

    def report(self) -> str:
        return self.summary() + "".join("\n--- " + e for e in self.examples)


def attempt(stats: Stats, description: str, fn, names=(), oracle=None, limit_s: float = 10.0):
    """Call ``fn()`` and judge it (see the module docstring).

    ``names``: prefixes one of which a refusal must start with (the file or
    field concerned).  ``oracle(result)`` returns a list of problems with an
    accepted result.  Returns the result, or None when refused or failed.
    """
    import time
    stats.tried += 1
    t0 = time.perf_counter()
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        try:
            result = fn()
        except InputError as exc:
            stats.refused += 1
            text = str(exc)
            if "\n" in text or not text.strip() or (
                    names and not any(text.startswith(one_line(str(n))) for n in names)):
                stats.unnamed += 1
                stats.note("refusal naming nothing", description, text)
            result = None
        except (KeyboardInterrupt, SystemExit):
            raise
        except BaseException:
            stats.tracebacks += 1
            stats.note("traceback", description, traceback.format_exc())
            result = None
        else:
            stats.accepted += 1
            problems = oracle(result) if oracle is not None else []
            if problems:
                stats.silent += 1
                stats.note("silent accept", description, "; ".join(problems))
    real = [w for w in caught if not issubclass(w.category, (DeprecationWarning,
                                                              PendingDeprecationWarning))]
    if real:
        stats.warned += 1
        stats.note("warning", description, "; ".join(f"{w.category.__name__}: {w.message}"
                                                     for w in real))
    if time.perf_counter() - t0 > limit_s:
        stats.slow += 1
        stats.note("slow", description, f"{time.perf_counter() - t0:.1f} s")
    return result


# ---------------------------------------------------------------------------
# value pools

DEEP = "[" * 3000 + "]" * 3000
DEEP_TABLE = "{a = " * 1200 + "1" + "}" * 1200
LONG = "x" * 200_000

#: TOML values that have caused trouble, or could.
TOML_VALUES = [
    "0", "-1", "1", "2", "3", "1.0", "0.5", "-0.0", "1e308", "-1e308", "1e-308", "5e-324",
    "1" + "0" * 400, "-" + "9" * 30, "100000", "1000000000000000000", "20000", "20001",
    "nan", "inf", "-inf", "+inf", "1e100", "1.7976931348623157e308",
    '"1e308 psi"', '"1e308 ft"', '"1e400 ft"', '"-1e308 lbf"', '"1e300 ksi"', '"nan"', '"inf psi"',
    '"NaN ppg"', '"Infinity ft"', '""', '" "', '"unrated"', '"unknown"', '"Unrated"',
    "[]", "{}", "[1, 2]", '["a"]', "[[]]", DEEP, DEEP_TABLE, '"' + LONG + '"', "true", "false",
    '"1,5"', '"1,200 ft"', '"20,5 ft"', '"9-5/8 in"', '"13 3/8 in"', '"0/0 in"', '"5/0 in"',
    '"20\' 6\\""', '"20 ft 6"', '"20 ft 6 in"', '"9.2 kg/m3"', '"9.2 ppg"', '"1.1 SG"',
    '"1000 lbf"', '"1 tf"', '"-5 ft"', '"1e-300 m"', '"10 %"', '"110 %"', '"-10 %"',
    '"m**999"', '"1 ft**10**10"', '"1 ft ft ft"', '"1 psi/m"', '"12 in"', '"1.0 gal"',
    '"20 furlong"', '"1 lightyear"', '"1 kg"', '"1 s"', '"2 ft/s"', '"J1"', '"J9999"',
    '"\\u0000"', '"\\u001b[31m"', '"ft\\nft"', "1979-05-27", "07:32:00", "0x10", "0o7", "0b1",
    '"\u00bd in"', '"9\u215d in"', '"20\u2032 6\u2033"', '"\u0661\u0662 ft"', '"１２ ft"',
    '"12 \u00b5m"', '"1e5 psi"', '"1e6 N"', '"1e9 lbf"', '"0.0001 ft"', '"1 mm"',
    '"600 ft"', '"50000 ft"', '"0 ft"', '"0 psi"', '"0 lbf"', '"150 tf"',
]

#: Multipliers applied to a number already in a file (a unit or typing slip).
SCALES = [0.0, -1.0, 1e-9, 1e-3, 0.01, 0.1, 10.0, 100.0, 1000.0, 1e6, 1e12, 1e300]

PLAN_KEYS = ("version", "units", "name", "tally", "fluid_density", "fluid_level", "depth",
             "diameter", "kind", "material", "od", "wall", "joint_length", "count", "connection",
             "weld_efficiency", "connection_rating", "tensile_rating", "collapse_rating",
             "burst_rating", "joint_weight", "weight_per_length", "ellipticity", "measured_wall",
             "bore", "dmax", "dmin", "label", "length", "measured_length", "rejected", "note",
             "type", "collar_joint", "valve_rating", "fill_density", "fill_alternatives",
             "min_running_weight", "set_down_weight", "collar_candidates", "tension",
             "collapse", "burst", "density", "height", "inside_density", "inside_level",
             "section", "joint", "hole", "path", "lines", "sheave_factor", "winch_line_pull",
             "rope_breaking_force", "rope_design_factor", "mast_rating", "top_head_pullup",
             "dead_load", "overpull_reserve", "dynamic_factor", "tool", "rating",
             "landing_string", "bogus_key")

TABLE_HEADERS = ("[hole]", "[[section]]", "[[joint]]", "[float_equipment]", "[running]",
                 "[design_factors]", "[grout]", "[[path]]", "[[path.tool]]",
                 "[landing_string]", "[[material]]", "[material.sources]", "[nonsense]")

_NUMBER = re.compile(r"(?<![\w.])-?\d+(?:\.\d+)?(?:[eE][-+]?\d+)?")
_ASSIGN = re.compile(r"^(\s*[\w\"'.-]+\s*=\s*)(.*)$")


def _scaled(value_text: str, rng: random.Random) -> str:
    m = _NUMBER.search(value_text)
    if not m:
        return rng.choice(TOML_VALUES)
    try:
        v = float(m.group()) * rng.choice(SCALES)
    except OverflowError:
        v = 1e308
    return value_text[:m.start()] + repr(v) + value_text[m.end():]


def mutate_toml(text: str, rng: random.Random, rounds: int | None = None) -> str:
    """One to three mutations of a TOML file's text."""
    lines = text.splitlines()
    for _ in range(rounds or rng.choice((1, 1, 1, 2, 3))):
        if not lines:
            lines = [""]
        op = rng.random()
        assigns = [i for i, ln in enumerate(lines) if _ASSIGN.match(ln) and not ln.lstrip().startswith("#")]
        if op < 0.40 and assigns:                       # a value from the pool
            i = rng.choice(assigns)
            m = _ASSIGN.match(lines[i])
            lines[i] = m.group(1) + rng.choice(TOML_VALUES)
        elif op < 0.60 and assigns:                     # a number scaled
            i = rng.choice(assigns)
            m = _ASSIGN.match(lines[i])
            value = m.group(2).split("#")[0]
            lines[i] = m.group(1) + _scaled(value, rng)
        elif op < 0.68:                                 # a key added
            i = rng.randrange(len(lines) + 1)
            lines.insert(i, f"{rng.choice(PLAN_KEYS)} = {rng.choice(TOML_VALUES)}")
        elif op < 0.74 and lines:                       # a line removed
            del lines[rng.randrange(len(lines))]
        elif op < 0.78 and lines:                       # a line repeated
            i = rng.randrange(len(lines))
            lines.insert(i, lines[i])
        elif op < 0.82:                                 # a table header added
            lines.insert(rng.randrange(len(lines) + 1), rng.choice(TABLE_HEADERS))
        elif op < 0.85:                                 # an array of tables emptied
            lines.insert(rng.randrange(len(lines) + 1),
                         rng.choice(("section = []", "path = []", "joint = []",
                                     "material = []", "tool = []", "section = [{}]")))
        elif op < 0.88:                                 # units flipped
            lines = [re.sub(r'^units = "(us|si)"',
                            lambda m: 'units = "si"' if m.group(1) == "us" else 'units = "us"', ln)
                     for ln in lines]
        elif op < 0.92:                                 # truncated
            joined = "\n".join(lines)
            lines = joined[:rng.randrange(len(joined) + 1)].splitlines()
        elif op < 0.96 and lines:                       # characters inserted
            i = rng.randrange(len(lines))
            ln = lines[i]
            j = rng.randrange(len(ln) + 1)
            lines[i] = ln[:j] + rng.choice(("\x00", "\ufeff", "\u202e", ",", '"', "'", "[", "=",
                                             "\\", "\t", "\r", "\x1b", "\ud7ff", "#", "0")) + ln[j:]
        elif lines:                                     # two lines swapped
            i, j = rng.randrange(len(lines)), rng.randrange(len(lines))
            lines[i], lines[j] = lines[j], lines[i]
    return "\n".join(lines) + "\n"


CSV_CELLS = ["", " ", "20", "20.04", "20,04", "0", "-2", "0.0001", "1e308", "1" + "0" * 400,
             "nan", "inf", "20 ft 6 in", "20' 6\"", "6.25 m", "2006", "20 furlong", "9.2 ppg",
             "J1", "J2", "J999", "run", "rejected", "REJECTED", "blank", "screen", "pup",
             "x" * 300, LONG, "\x00", "\"", "\"quoted, comma\"", "1,5", "0.3 in", "5 in",
             "0.25", "1/0", "9-5/8 in", "\u00bd", "#", "\r", "\ufeff", "J1\nJ2"]


def mutate_csv(text: str, rng: random.Random) -> str:
    """One to three mutations of a tally CSV's text."""
    lines = text.splitlines()
    for _ in range(rng.choice((1, 1, 2, 3))):
        if not lines:
            lines = [""]
        op = rng.random()
        i = rng.randrange(len(lines))
        cells = lines[i].split(",")
        if op < 0.40:                                   # a cell replaced
            cells[rng.randrange(len(cells))] = rng.choice(CSV_CELLS)
            lines[i] = ",".join(cells)
        elif op < 0.55:                                 # a decimal point made a comma
            lines[i] = lines[i].replace(".", ",", 1)
        elif op < 0.62:                                 # a cell dropped or added
            if rng.random() < 0.5 and len(cells) > 1:
                del cells[rng.randrange(len(cells))]
            else:
                cells.insert(rng.randrange(len(cells) + 1), rng.choice(CSV_CELLS))
            lines[i] = ",".join(cells)
        elif op < 0.70:                                 # the header changed
            head = lines[0].split(",")
            head[rng.randrange(len(head))] = rng.choice((
                "label", "measured_length [m]", "measured_length [furlong]", "measured_length",
                "measured_wall [in]", "measured_wall [ppg]", "status [ft]", "bogus", "",
                "measured_length [m**999]", "measured_length [" + "x" * 300 + "]", "label"))
            lines[0] = ",".join(head)
        elif op < 0.76:                                 # a row repeated
            lines.insert(i, lines[i])
        elif op < 0.82:                                 # truncated
            joined = "\n".join(lines)
            lines = joined[:rng.randrange(len(joined) + 1)].splitlines()
        elif op < 0.88:                                 # a quote opened
            lines[i] = lines[i] + ',"unclosed'
        elif op < 0.94:                                 # many rows
            lines += [f"J{k},20,blank,run," for k in range(rng.choice((50, 500, 21000)))]
        else:                                           # a row removed
            del lines[i]
    return "\n".join(lines) + "\n"


# ---------------------------------------------------------------------------
# oracles: what an accepted result must satisfy


def _in(name: str, value, what: str, out: list) -> None:
    if value is None:
        return
    if not ranges.RANGES[name].contains(value):
        out.append(f"{what} = {value!r} outside range {name}")


def _finite_or_nan(value, what: str, out: list) -> None:
    if value is None:
        return
    v = float(value)
    if math.isinf(v) or (not math.isnan(v) and v <= 0):
        out.append(f"{what} = {value!r} not a positive finite rating")


def plan_problems(read) -> list:
    """Problems of an accepted plan (a PlanRead): numbers outside ranges."""
    plan = read.plan if hasattr(read, "plan") else read
    out = []
    h = plan.hole
    _in("fluid_density", h.fluid_density, "hole.fluid_density", out)
    _in("depth", h.fluid_level, "hole.fluid_level", out)
    if not math.isnan(h.depth):
        _in("depth", h.depth, "hole.depth", out)
    if not math.isnan(h.diameter):
        _in("diameter", h.diameter, "hole.diameter", out)
    if not 1 <= len(plan.joints) <= ranges.MAX_JOINTS:
        out.append(f"{len(plan.joints)} joints")
    seen = set()
    for j in plan.joints:
        key = (j.length, j.measured_length, j.od, j.wall, j.bore, j.measured_wall, j.weight,
               j.weight_per_length, j.connection_rating, j.tensile_rating, j.collapse_rating,
               j.burst_rating, j.weld_efficiency, j.ellipticity, j.dmax, j.dmin)
        if key in seen:
            continue
        seen.add(key)
        _in("joint_length", j.length, f"{j.label}.length", out)
        _in("joint_length", j.measured_length, f"{j.label}.measured_length", out)
        _in("diameter", j.od, f"{j.label}.od", out)
        _in("wall", j.wall, f"{j.label}.wall", out)
        if not j.wall < j.od / 2:
            out.append(f"{j.label}: wall not under od/2")
        _in("wall", j.measured_wall, f"{j.label}.measured_wall", out)
        _in("diameter", j.bore, f"{j.label}.bore", out)
        for f in ("connection_rating", "tensile_rating", "weight"):
            v = getattr(j, f)
            if v is not None and not math.isnan(v):
                _in("force_rating", v, f"{j.label}.{f}", out)
        for f in ("collapse_rating", "burst_rating"):
            v = getattr(j, f)
            if v is not None and not math.isnan(v):
                _in("pressure_rating", v, f"{j.label}.{f}", out)
        _in("weight_per_length", j.weight_per_length, f"{j.label}.weight_per_length", out)
        _in("weld_efficiency", j.weld_efficiency, f"{j.label}.weld_efficiency", out)
        _in("ellipticity", j.ellipticity, f"{j.label}.ellipticity", out)
    s = plan.settings
    _in("fluid_density", s.fill_density, "fill_density", out)
    for v in s.fill_density_alternatives:
        _in("fluid_density", v, "fill_alternatives", out)
    _in("force", s.min_running_weight, "min_running_weight", out)
    _in("force", s.set_down_weight, "set_down_weight", out)
    for f in ("tension", "collapse", "burst"):
        _in("design_factor", getattr(s.design, f), f"design_factors.{f}", out)
    if not math.isnan(plan.closure.valve_rating):
        _in("pressure_rating", plan.closure.valve_rating, "valve_rating", out)
    if plan.grout is not None:
        _in("fluid_density", plan.grout.density, "grout.density", out)
        _in("depth", plan.grout.height, "grout.height", out)
    return out


def rig_problems(rig) -> list:
    """Problems of an accepted rig: numbers outside ranges, non-finite capacity."""
    from rigplan.engine.hoisting import path_capacity
    out = []
    if not rig.paths:
        out.append("no paths")
    for p in rig.paths:
        _in("lines", p.lines, f"{p.name}.lines", out)
        _in("sheave_factor", p.sheave_factor, f"{p.name}.sheave_factor", out)
        _in("rope_design_factor", p.rope_design_factor, f"{p.name}.rope_design_factor", out)
        _in("dynamic_factor", p.dynamic_factor, f"{p.name}.dynamic_factor", out)
        _in("force", p.dead_load, f"{p.name}.dead_load", out)
        _in("force", p.overpull_reserve, f"{p.name}.overpull_reserve", out)
        for f in ("winch_line_pull", "rope_breaking_force", "mast_rating", "top_head_pullup"):
            v = getattr(p, f)
            if not math.isnan(v):
                _in("force_rating", v, f"{p.name}.{f}", out)
        c = path_capacity(p)
        if math.isinf(c.string_limit) or math.isinf(c.hook_limit):
            out.append(f"{p.name}: capacity {c.string_limit!r}")
    return out


def material_problems(mats) -> list:
    out = []
    for m in mats:
        for f, name in (("density", "material_density"), ("yield_strength", "yield_strength"),
                        ("youngs_modulus", "youngs_modulus"), ("poisson", "poisson")):
            v = getattr(m, f)
            if not math.isnan(v):
                _in(name, v, f"{m.key}.{f}", out)
        _in("wall_under_tolerance", m.wall_under_tolerance, f"{m.key}.wall_under_tolerance", out)
    return out


def tally_problems(rows) -> list:
    out = []
    if len(rows) > ranges.MAX_JOINTS:
        out.append(f"{len(rows)} rows")
    for r in rows:
        _in("joint_length", r.measured_length, f"row {r.row} measured_length", out)
        _in("wall", r.measured_wall, f"row {r.row} measured_wall", out)
        if not r.label or "\n" in r.label:
            out.append(f"row {r.row}: label {r.label!r}")
    return out


def state_problems(state) -> list:
    """Problems of a run state replayed from an accepted run log."""
    out = []
    for label, length in state.run:
        if not isinstance(label, str) or (length is not None and not (
                isinstance(length, float) and math.isfinite(length) and length > 0)):
            out.append(f"run {label!r} {length!r}")
    for o in state.observations:
        if not (isinstance(o.step, int) and o.step >= 0 and math.isfinite(o.hook_load_n)):
            out.append(f"observation {o!r}")
    return out


# ---------------------------------------------------------------------------
# run logs


def good_log(path: Path, entries: int = 12) -> None:
    """A sound run log with runs, a rejection, an undo and readings."""
    from rigplan.files.runlog import RunLog
    with RunLog(path) as rl:
        for k in range(1, entries + 1):
            rl.record_run(f"J{k}", 6.0 + 0.01 * k, "" if k % 3 else "taped twice")
            if k % 4 == 0:
                rl.observe(k, 10000.0 * k, 9900.0 * k)
        rl.reject(f"J{entries + 1}", "dented at the pin")
        rl.undo()
        rl.reject(f"J{entries + 2}", "bent")


SQL_DAMAGE = [
    "DROP TRIGGER events_no_update; UPDATE events SET label = CAST(X'FFFE41' AS TEXT) WHERE id = 1",
    "DROP TRIGGER events_no_update; UPDATE events SET value = 'twenty' WHERE kind = 'run'",
    "DROP TRIGGER events_no_update; UPDATE events SET value = -5 WHERE kind = 'run'",
    "DROP TRIGGER events_no_update; UPDATE events SET value = 1e308 * 10 WHERE kind = 'observe'",
    "DROP TRIGGER events_no_update; UPDATE events SET step = -3 WHERE kind = 'observe'",
    "DROP TRIGGER events_no_update; UPDATE events SET step = 'x' WHERE kind = 'observe'",
    "DROP TRIGGER events_no_update; UPDATE events SET kind = 'bogus' WHERE id = 2",
    "DROP TRIGGER events_no_update; UPDATE events SET note = X'00FF' WHERE id = 3",
    "DROP TRIGGER events_no_update; UPDATE events SET ts = 12 WHERE id = 4",
    "DROP TRIGGER events_no_update; UPDATE events SET label = NULL WHERE kind = 'run'",
    "DROP TRIGGER events_no_update; UPDATE events SET value = 9223372036854775807 WHERE kind = 'run'",
    "ALTER TABLE events RENAME COLUMN predicted TO guessed",
    "ALTER TABLE events RENAME TO events_old",
    "DROP TABLE meta",
    "PRAGMA user_version = 99",
    "PRAGMA user_version = 0",
    "PRAGMA application_id = 1",
    "CREATE TABLE extra (x); INSERT INTO extra VALUES (1)",
    "DROP TRIGGER events_no_delete; DELETE FROM events",
    "DROP TRIGGER events_undo_target; INSERT INTO events (ts, kind, label, ref) VALUES ('t', 'undo', 'J1', 9999)",
]


def _apply_sql(path: Path, script: str) -> None:
    conn = sqlite3.connect(path, isolation_level=None)
    try:
        conn.execute("PRAGMA ignore_check_constraints = ON")
        for statement in script.split(";"):
            if statement.strip():
                conn.execute(statement)
    finally:
        conn.close()


def mutate_log_bytes(data: bytes, rng: random.Random) -> bytes:
    """A damaged copy of a run log's bytes."""
    b = bytearray(data)
    op = rng.random()
    if op < 0.35:                                       # random bytes flipped
        for _ in range(rng.choice((1, 2, 8, 64))):
            i = rng.randrange(len(b))
            b[i] = rng.randrange(256)
    elif op < 0.50:                                     # truncated
        b = b[:rng.randrange(len(b))]
    elif op < 0.65:                                     # a page zeroed or scrambled
        page = 4096
        start = rng.randrange(max(1, len(b) // page)) * page
        fill = bytes(page) if rng.random() < 0.5 else rng.randbytes(page)
        b[start:start + page] = fill[:len(b[start:start + page])]
    elif op < 0.75:                                     # the header hit
        for _ in range(rng.choice((1, 4))):
            b[rng.randrange(min(100, len(b)))] = rng.randrange(256)
    elif op < 0.85:                                     # not a database at all
        b = bytearray(rng.choice((b"", b"\x00" * 4096, b"SQLite format 3\x00" + bytes(84),
                                  "label,measured_length\nJ1,20\n".encode(),
                                  rng.randbytes(2048))))
    else:                                               # a cell area scrambled
        i = rng.randrange(max(1, len(b) - 64))
        k = min(len(b), i + rng.choice((4, 16, 64)))
        b[i:k] = rng.randbytes(k - i)
    return bytes(b)


# ---------------------------------------------------------------------------
# quantity text

NUMBERS = ["0", "1", "-1", "20", "20.5", ".5", "5.", "1e3", "1E-3", "1e308", "1e309", "-1e400",
           "9-5/8", "13 3/8", "5/8", "0/0", "1/0", "1" + "0" * 400, "1" * 25 + "/" + "1" * 25,
           "nan", "inf", "1,5", "1,200", "1 200", "1_000", "0x1A", "١٢", "１２", "\u00bd",
           "9\u215d", "+3", "--3", "3-", "20'", "20' 6", "20' 6\"", "20 ft 6", "20ft6in", "6\"",
           "", " ", "e5", "1e", "1.2.3", "１", "²"]
UNITS = ["", " ft", " m", " in", " mm", " ppg", " kg/m3", " kg/m³", " SG", " psi", " ksi",
         " kPa", " MPa", " lbf", " kN", " tf", " lb/ft", " kg/m", " gal", " L", " bbl", " %",
         " furlong", " m**999", " ft ft", " ft 6", " 1/ft", " kg", " lb", " s", " m/s", " psi/ft",
         " degC", " K", " rad", " dimensionless", " ppm", " ft**10**10", " m^3", " (ft)",
         " ft)", " (", " " + "m" * 250, " \x00", " \n ft", " µm", " tonne-force", " usgal",
         " pcf", " kg/l", " '", ' "', " feet", " inch", " in.", " °"]


def quantity_text(rng: random.Random) -> str:
    return rng.choice(NUMBERS) + rng.choice(UNITS)


# ---------------------------------------------------------------------------
# the CLI in process


def run_cli(argv, stdin_text: str = "") -> tuple:
    """(exit code, stdout, stderr) of ``rigplan.cli.main(argv)`` in process."""
    from rigplan import cli
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        code = cli.main(list(argv))
    return code, out.getvalue(), err.getvalue()


def scratch_dir(prefix: str) -> Path:
    """A temporary folder, in memory where the machine has one (fast sqlite)."""
    import atexit
    import shutil
    base = "/dev/shm" if os.path.isdir("/dev/shm") and os.access("/dev/shm", os.W_OK) else None
    path = Path(tempfile.mkdtemp(prefix=prefix, dir=base))
    atexit.register(shutil.rmtree, path, True)      # removed when the test run ends
    return path


CALIPERS = sorted((ROOT / "strings").glob("*.las"))


def copy_demo(dest: Path) -> None:
    """The bundled rigs and strings (plans, tallies, caliper logs) copied into ``dest``."""
    for p in RIGS + PLANS + TALLIES + CALIPERS:
        shutil.copy(p, dest / p.name)


# ---------------------------------------------------------------------------
# drivers: one per edge; each returns its Stats

#: A user materials file to mutate (an invented material; values of the
#: order of a carbon steel, not a check value).
MATERIALS_TEXT = '''version = 1
units = "si"

[[material]]
key = "yard_steel"
name = "yard steel, invented for tests"
family = "steel"
density = "7870 kg/m3"
yield_strength = "290 MPa"
youngs_modulus = "200000 MPa"
poisson = 0.3
wall_under_tolerance = "10 %"
collapse_method = "timoshenko"
source = "invented for tests"

[material.sources]
density = "invented for tests"
'''


def fuzz_plans(n: int, seed: int, workdir: Path | None = None) -> Stats:
    """Mutated bundled plans through :func:`parse_plan` (tally read from disk)."""
    from rigplan.files.formats.planfile import parse_plan
    rng = random.Random(seed)
    work = workdir or scratch_dir("fuzz-plan-")
    copy_demo(work)
    texts = [(p.name, p.read_text()) for p in PLANS]
    stats = Stats("plan")
    for _ in range(n):
        name, text = rng.choice(texts)
        bad = mutate_toml(text, rng)
        source = str(work / name)
        attempt(stats, bad, lambda: parse_plan(bad, source, work), names=(str(work),),
                oracle=plan_problems)
    return stats


def fuzz_rigs(n: int, seed: int) -> Stats:
    from rigplan.files.formats.rigfile import parse_rig
    rng = random.Random(seed)
    texts = [(p.name, p.read_text()) for p in RIGS]
    stats = Stats("rig")
    for _ in range(n):
        name, text = rng.choice(texts)
        bad = mutate_toml(text, rng)
        source = f"rigs/{name}"
        attempt(stats, bad, lambda: parse_rig(bad, source), names=(source,), oracle=rig_problems)
    return stats


def fuzz_materials(n: int, seed: int) -> Stats:
    from rigplan.files.formats.materialfile import parse_materials
    rng = random.Random(seed)
    stats = Stats("materials")
    for _ in range(n):
        bad = mutate_toml(MATERIALS_TEXT, rng)
        attempt(stats, bad, lambda: parse_materials(bad, "m.toml"), names=("m.toml",),
                oracle=material_problems)
    return stats


def fuzz_tallies(n: int, seed: int) -> Stats:
    """Mutated bundled tallies, parsed and applied to their plan."""
    from rigplan.files.formats.planfile import apply_tally, parse_plan
    from rigplan.files.formats.tally import parse_tally
    rng = random.Random(seed)
    text = TALLIES[0].read_text()
    plan_text = (ROOT / "strings" / "cv3-8in-a53b.toml").read_text()
    joints = list(parse_plan(plan_text.replace("tally = ", "# tally = "), "p.toml").plan.joints)
    stats = Stats("tally")
    source = "strings/t.tally.csv"

    def run(bad):
        rows = parse_tally(bad, source)
        apply_tally(joints, rows, source)
        return rows

    for _ in range(n):
        bad = mutate_csv(text, rng)
        attempt(stats, bad, lambda: run(bad), names=(source,), oracle=tally_problems)
    return stats


def fuzz_runlogs(n: int, seed: int) -> Stats:
    """Damaged copies of a sound run log opened read-only (check --as-run) and
    for writing (the app); a file opened only to read is never changed."""
    import hashlib
    from rigplan.files.runlog import RunLog, RunLogWriteError
    rng = random.Random(seed)
    work = scratch_dir("fuzz-log-")
    base = work / "base.rigrun.sqlite"
    good_log(base)
    data = base.read_bytes()
    sql_variants = []
    for k, script in enumerate(SQL_DAMAGE):
        p = work / f"sql{k}.rigrun.sqlite"
        shutil.copy(base, p)
        _apply_sql(p, script)
        sql_variants.append(p.read_bytes())
    stats = Stats("run log")
    target = work / "t.rigrun.sqlite"
    for i in range(n):
        for sfx in ("-wal", "-shm"):
            Path(str(target) + sfx).unlink(missing_ok=True)
        r = rng.random()
        if r < 0.25:
            bad = rng.choice(sql_variants)
            if rng.random() < 0.3:
                bad = mutate_log_bytes(bad, rng)
        elif r < 0.30:
            bad = data
        else:
            bad = mutate_log_bytes(data, rng)
        target.write_bytes(bad)
        digest = hashlib.sha256(bad).digest()
        readonly = rng.random() < 0.6

        def run():
            with RunLog(target, snapshot=readonly) as rl:
                state = rl.state()
                if not readonly:
                    try:
                        rl.record_run(f"X{i}", 6.0)
                    except RunLogWriteError as exc:
                        raise InputError(str(target), str(exc)) from None
                return state

        def oracle(state, readonly=readonly, digest=digest):
            out = state_problems(state)
            if readonly and hashlib.sha256(target.read_bytes()).digest() != digest:
                out.append("a run log opened read-only was changed")
            return out

        res = attempt(stats, f"{'ro' if readonly else 'rw'} {len(bad)} bytes sha {digest.hex()[:12]}",
                      run, names=(str(target),), oracle=oracle)
        if res is None and target.exists() and hashlib.sha256(target.read_bytes()).digest() != digest:
            stats.silent += 1
            stats.note("damaged log changed", f"{len(bad)} bytes", "a refused run log was changed")
    shutil.rmtree(work, ignore_errors=True)
    return stats


KINDS = ("length", "diameter", "density", "pressure", "stress", "force", "linear_weight",
         "mass_per_length", "volume", "dimensionless")


def fuzz_quantities(n: int, seed: int) -> Stats:
    from rigplan.files import units
    rng = random.Random(seed)
    stats = Stats("quantity text")

    def oracle(v):
        return [] if isinstance(v, float) and math.isfinite(v) else [f"result {v!r}"]

    for _ in range(n):
        text = quantity_text(rng) if rng.random() < 0.85 else rng.choice(
            (rng.randrange(-10 ** 6, 10 ** 6), 10 ** rng.randrange(300, 500), rng.random() * 1e308,
             float("nan"), True, None, [1], "x" * rng.randrange(150, 300)))
        kind = rng.choice(KINDS)
        system = rng.choice(units.SYSTEMS)
        if rng.random() < 0.3:          # a well-formed number in the kind's own unit
            text = f"{rng.choice(NUMBERS[:12])} {units.default_units(system)[kind]}".strip()
        default = rng.choice((None, units.default_units(system)[kind] or None, "ft", "furlong"))
        attempt(stats, f"{text!r} {kind} {default}",
                lambda: units.parse(text, kind, default, "q"), names=("q",), oracle=oracle)
    return stats


LABELS = ["J1", "J5", "J22", "J23", "J999", "", " ", "x" * 300, "J\n2", "\x1b[2J"]
SETTING_TEXTS = ["none", "float shoe", "collar 3", "collar J4", "collar 0", "collar 99",
                 "collar " + "9" * 40, "collar J", "unrated", "open", "shoe", "1.2", "0.5",
                 "1e308", "11", "10", "-1", "nan", "inf"]


def fuzz_prompts(n: int, seed: int) -> Stats:
    """The app's prompt validators (rigplan.tui.session) on a copy of a
    bundled job: joint edits, job settings, the weight band, change rig and
    import tally, with texts of trouble and names of files good and bad."""
    from rigplan.tui.session import EDITABLE_FIELDS, JOB_SETTINGS, JobSession
    from rigplan.engine import materials
    rng = random.Random(seed)
    work = scratch_dir("fuzz-prompt-")
    copy_demo(work)
    plan = work / "cv3-8in-a53b.toml"
    session = JobSession(plan, work / "th30.toml")
    rig_files = []
    for k in range(12):
        p = work / f"rig{k}.toml"
        p.write_text(mutate_toml(rng.choice(RIGS).read_text(), rng))
        rig_files.append(str(p))
    tally_text = TALLIES[0].read_text()
    long_name = str(work / ("r" * 300 + ".toml"))
    stats = Stats("app prompts")
    fields = list(EDITABLE_FIELDS)
    settings = list(JOB_SETTINGS)
    try:
        for i in range(n):
            r = rng.random()
            if r < 0.45:
                joint = rng.choice(session.base_plan.joints).label if rng.random() < 0.9 \
                    else rng.choice(LABELS)
                fld = rng.choice(fields)
                how, what = EDITABLE_FIELDS[fld]
                if how == "choice":
                    text = rng.choice(list(what) + ["", "bogus", "x" * 300])
                elif how == "material":
                    text = rng.choice(list(materials.known_keys()) + ["", "bogus", "x" * 300])
                elif how == "label":
                    text = rng.choice(LABELS + [f"K{i}"])
                else:
                    text = quantity_text(rng)
                attempt(stats, f"edit {joint}.{fld} = {text!r}",
                        lambda: session.edited_plan(joint, fld, text),
                        names=("joint", str(plan)), oracle=plan_problems)
            elif r < 0.75:
                key = rng.choice([k for k in settings if k != "rig"])   # rig: below
                text = quantity_text(rng) if rng.random() < 0.7 else rng.choice(SETTING_TEXTS)
                attempt(stats, f"setting {key} = {text!r}",
                        lambda: session.edited_setting(key, text),
                        names=("job setting", key, str(plan)), oracle=plan_problems)
            elif r < 0.80:
                text = quantity_text(rng) if rng.random() < 0.8 else rng.choice(
                    ("", "1e300 lbf", "-5", "nan", "50000", "5e7 N", "1e7"))

                def reading_oracle(v):
                    return [] if ranges.RANGES["force"].contains(v) else [f"reading {v!r}"]
                attempt(stats, f"reading {text!r}", lambda: session.reading_value(text),
                        names=("weight reading",), oracle=reading_oracle)
            elif r < 0.85:
                text = rng.choice((quantity_text(rng), f"{rng.uniform(-5, 120):.3g} %",
                                   f"{rng.uniform(-1, 2):.3g}", "nan %", "inf", "1e400 %"))

                def band_oracle(_):
                    ok = (0 < session.band_fraction < 1 and session.band_force == 0) or (
                        session.band_fraction == 0 and ranges.RANGES["force_rating"].contains(
                            session.band_force))
                    return [] if ok else [f"band {session.band_fraction} {session.band_force}"]
                attempt(stats, f"band {text!r}", lambda: session.set_band(text),
                        names=("band",), oracle=band_oracle)
            elif r < 0.93:
                text = rng.choice(rig_files + [long_name, "", "  ", "/", "/dev/null", str(work),
                                               "th30", "mw80", "nosuchrig", "x\x00y",
                                               "a" * 5000])
                attempt(stats, f"change rig {text[:80]!r}", lambda: session.change_rig(text),
                        names=(text.strip(), "rig"), oracle=lambda _: rig_problems(session.rig))
            else:
                name = f"t{i % 7}.csv"
                choice = rng.random()
                if choice < 0.75:
                    (work / name).write_text(mutate_csv(tally_text, rng))
                elif choice < 0.85:
                    (work / name).write_bytes(rng.randbytes(300))
                elif choice < 0.9:
                    (work / name).write_bytes(b"")
                else:
                    name = rng.choice(("missing.csv", "t" * 300 + ".csv", "", ".", "/dev/null"))
                target = work / name

                def imported():
                    session.import_tally(name)
                    return session.base_plan
                attempt(stats, f"import tally {name[:80]!r}", imported,
                        names=(str(target), name, str(work)), oracle=plan_problems)
            if i % 500 == 499:      # start again from the plan file now and then
                session.close()
                session = JobSession(plan, work / "th30.toml")
    finally:
        session.close()
        shutil.rmtree(work, ignore_errors=True)
    return stats


# ---------------------------------------------------------------------------
# the command line


def _digest_folder(folder: Path) -> dict:
    """name -> (inode, size, mtime) of each file: any write or replacement
    of a file changes it."""
    out = {}
    with os.scandir(folder) as it:
        for entry in it:
            if entry.is_file():
                st = entry.stat()
                out[entry.name] = (st.st_ino, st.st_size, st.st_mtime_ns)
    return out


@contextlib.contextmanager
def app_stubbed(demo_folder: Path | None = None):
    """``open`` and the bare command build the app (files read, run log
    opened) but do not run it: no terminal is taken over in a test.  The
    bare command's demo job is the copy in ``demo_folder`` (no run log is
    started beside the bundled files)."""
    import rigplan.files.job as job_module
    import rigplan.tui.app as app_module
    real = app_module.run_app
    real_demo = job_module.demo_paths
    if demo_folder is not None:
        job_module.demo_paths = lambda: (demo_folder / job_module.DEMO_PLAN,
                                         demo_folder / job_module.DEMO_RIG)

    def stub(plan_path, rig_path, path_name=None, units="us", tally=None):
        app = app_module.build_app(plan_path, rig_path, path_name=path_name, units=units,
                                   tally=tally)
        app.session.close()

    app_module.run_app = stub
    try:
        yield
    finally:
        app_module.run_app = real
        job_module.demo_paths = real_demo


def _cli_oracle(code, out, err, argv) -> list:
    problems = []
    if code not in (0, 1, 2):
        problems.append(f"exit code {code!r}: {err.strip()[:300]}")
        return problems
    if code == 2:
        lines = err.strip().splitlines()
        if len(lines) != 1 or not lines[0].startswith("rigplan"):
            problems.append(f"exit 2 with {len(lines)} lines on stderr: {err[:300]!r}")
        elif ": " not in lines[0][len("rigplan"):]:
            problems.append(f"exit 2 naming nothing: {lines[0][:300]!r}")
        return problems
    if err.strip():
        problems.append(f"exit {code} with stderr {err[:300]!r}")
    if "-h" in argv or "--help" in argv:
        return problems
    json_out = "--format" in argv and argv.index("--format") + 1 < len(argv) \
        and argv[argv.index("--format") + 1] == "json" and argv[0] == "check"
    if json_out:
        import json

        def no_constant(name):
            raise ValueError(f"{name} in the JSON")
        try:
            doc = json.loads(out, parse_constant=no_constant)
        except ValueError as exc:
            problems.append(f"not JSON ({exc}): {out[:200]!r}")
        else:
            if doc.get("exit_code") != code:
                problems.append(f"JSON exit_code {doc.get('exit_code')} but exit {code}")
        return problems
    text = out
    for name in _quoted_texts(argv):     # names the user typed may say "nan"
        text = text.replace(name, "")
    m = NAN_INF.search(text)
    if m:
        problems.append(f"{m.group()!r} in the output: ...{text[max(0, m.start() - 80):m.end() + 20]!r}")
    return problems


def _quoted_texts(argv) -> list:
    """Quoted texts of the TOML files named in ``argv`` that read as nan/inf."""
    out = []
    for a in argv:
        if a.endswith(".toml"):
            with contextlib.suppress(OSError, ValueError):
                text = Path(a).read_text(errors="replace")
                out += [q for q in re.findall(r'"([^"\n]*)"', text) if NAN_INF.search(q)]
    return sorted(set(out), key=len, reverse=True)


class CliPool:
    """Files for the command-line fuzz: the demo, mutated copies, run logs."""

    def __init__(self, rng: random.Random, work: Path):
        self.work = work
        copy_demo(work)
        self.good_plans = [str(work / p.name) for p in PLANS]
        self.plans = []
        for k in range(30):
            src = rng.choice(PLANS)
            p = work / f"m{k}-{src.name}"
            p.write_text(mutate_toml(src.read_text(), rng))
            self.plans.append(str(p))
        self.rigs = []
        for k in range(15):
            src = rng.choice(RIGS)
            p = work / f"m{k}-{src.name}"
            p.write_text(mutate_toml(src.read_text(), rng))
            self.rigs.append(str(p))
        self.tallies = []
        for k in range(15):
            p = work / f"m{k}.tally.csv"
            p.write_text(mutate_csv(TALLIES[0].read_text(), rng))
            self.tallies.append(str(p))
        (work / "empty.csv").write_bytes(b"")
        (work / "binary.csv").write_bytes(bytes(range(256)) * 4)
        self.tallies += [str(work / "empty.csv"), str(work / "binary.csv"), str(TALLIES[0])]
        self.materials = []
        for k in range(8):
            p = work / f"mat{k}.toml"
            p.write_text(mutate_toml(MATERIALS_TEXT, rng) if k else MATERIALS_TEXT)
            self.materials.append(str(p))
        # run logs beside some plans: sound, or damaged
        from rigplan.files.runlog import log_path_for
        base = work / "base.rigrun.sqlite"
        good_log(base, entries=4)
        data = base.read_bytes()
        base.unlink()
        for k, plan in enumerate(self.good_plans[:3] + self.plans[:6]):
            log = log_path_for(plan)
            log.write_bytes(data if k % 3 == 0 else mutate_log_bytes(data, rng))
        self.bad_names = ["missing.toml", "", " ", str(work), "/dev/null", "x" * 300 + ".toml",
                          str(work / ("y" * 300)), "-", "--", "strings/../../../etc/passwd"]
        self.outputs = [str(work / "out.html"), str(work / "out.md"), str(work / "out.json"),
                        str(work / "out.csv"), str(work / "out.txt"), str(work / "no" / "dir.md"),
                        str(work), str(work / ("z" * 300 + ".html")), "",
                        str(work / "placed.csv")]

    def argv(self, rng: random.Random) -> list:
        r = rng.random()
        cmd = ("check" if r < 0.74 else "report" if r < 0.84 else "open" if r < 0.90 else
               rng.choice(("place", "liner")) if r < 0.94 else
               rng.choice(("rigs", "demo" if rng.random() < 0.2 else "rigs", "bogus", None)))
        if cmd is None:
            return []
        if cmd in ("place", "liner"):
            plan = rng.choice(self.good_plans + self.plans[:5] + self.bad_names[:3])
            argv = [cmd, plan, "--rig", rng.choice(("th30", "mw80", rng.choice(self.rigs)))]
            if cmd == "place":
                argv += ["--tally", rng.choice(self.tallies + [str(self.work / "missing.csv")])]
                if rng.random() < 0.5:
                    argv += ["-o", rng.choice([str(self.work / "placed.csv"), plan,
                                               argv[-1], str(self.work / ("p" * 300))])]
            else:
                cals = [str(self.work / p.name) for p in CALIPERS]
                argv += ["--caliper", rng.choice(cals + self.tallies[:2] + self.bad_names[:3])]
            return argv + (["--format", "json"] if rng.random() < 0.8 else [])
        if cmd in ("rigs", "demo", "bogus"):
            return [cmd] + ([rng.choice(("--units", "si", "--bogus", "us"))] if rng.random() < 0.3
                            else [])
        p = rng.random()
        plan = (rng.choice(self.good_plans) if p < 0.4 else rng.choice(self.plans) if p < 0.85
                else rng.choice(self.bad_names))
        q = rng.random()
        rig = (rng.choice(("th30", "mw80", str(self.work / "th30.toml"),
                           str(self.work / "mw80.toml"))) if q < 0.6
               else rng.choice(self.rigs) if q < 0.9 else rng.choice(self.bad_names))
        argv = [cmd, plan, "--rig", rig]
        if rng.random() < 0.15:
            argv += ["--path", rng.choice(("main line", "top head", "winch", "", "x" * 300))]
        if rng.random() < 0.3:
            argv += ["--units", rng.choice(("us", "si", "si", "metric"))]
        if cmd == "check":
            f = rng.random()
            if f < 0.88:
                argv += ["--format", "json"]
            elif f < 0.97:
                argv += ["--brief"]
            elif f < 0.98:
                pass                                    # full text: the slowest
            else:
                argv += ["--format", "yaml"]
        if rng.random() < 0.3:
            argv += ["--tally", rng.choice(self.tallies + self.bad_names[:4])]
        if rng.random() < 0.1:
            argv += ["--materials", rng.choice(self.materials + self.bad_names[:3])]
        if rng.random() < 0.2:
            argv += ["--as-run"]
        if cmd == "report":
            o = rng.random()
            if o < 0.4:
                out = rng.choice(self.outputs)
            else:                                       # onto a file it reads
                out = rng.choice([plan, plan[:-5] + ".rigrun.sqlite" if plan.endswith(".toml") else plan]
                                 + ([argv[argv.index("--tally") + 1]] if "--tally" in argv else [])
                                 + ([rig] if rig.endswith(".toml") else []))
            argv += ["-o", out]
        if rng.random() < 0.04:                         # odd tokens
            i = rng.randrange(len(argv) + 1)
            argv.insert(i, rng.choice(("--bogus", "-o", "--rig", "--format", "extra", "--as-run",
                                       "-h" if rng.random() < 0.05 else "--brief")))
        return argv


def fuzz_cli(n: int, seed: int) -> Stats:
    """Argument sets through ``rigplan.cli.main`` in process; no input file is
    ever written over (every file of the job folder is hashed before and
    after each run, the report it writes aside)."""
    rng = random.Random(seed)
    work = scratch_dir("fuzz-cli-")
    pool = CliPool(rng, work)
    stats = Stats("command line")
    exits = {}
    try:
        with app_stubbed(work):
            for _ in range(n):
                argv = pool.argv(rng)
                outputs = {Path(a).absolute() for a in pool.outputs if a}
                before = _digest_folder(work)

                def run():
                    code, out, err = run_cli(argv)
                    exits[code] = exits.get(code, 0) + 1
                    return code, out, err

                def oracle(res):
                    code, out, err = res
                    problems = _cli_oracle(code, out, err, argv)
                    after = _digest_folder(work)
                    for name, digest in before.items():
                        if (work / name).absolute() in outputs:
                            continue
                        if name.endswith((".sqlite", "-wal", "-shm", ".lock")) and argv[:1] in (["open"], []):
                            continue        # the app's own log, opened to record
                        if name.endswith(("-wal", "-shm")):
                            continue        # SQLite's index beside a log read as it is
                        if after.get(name) != digest:
                            problems.append(f"input {name} changed or removed (exit {code})")
                    return problems
                attempt(stats, " ".join(argv)[:400], run, oracle=oracle)
                for o in outputs:
                    with contextlib.suppress(OSError):
                        o.unlink()
    finally:
        shutil.rmtree(work, ignore_errors=True)
    # exit 2 is a refusal (its one line is judged by the oracle)
    stats.refused += exits.get(2, 0)
    stats.accepted -= exits.get(2, 0)
    return stats


# ---------------------------------------------------------------------------
# running on both cores


def _call(fn, n, seed):
    return fn(n, seed)


def run_parallel(fn, n: int, seed: int, workers: int | None = None) -> Stats:
    """``fn(n, seed)`` split over ``workers`` forked processes (default: the
    machine's cores, at most 2), the counts added up."""
    workers = workers or max(1, min(2, os.cpu_count() or 1))
    if workers == 1 or n < 200:
        return fn(n, seed)
    import multiprocessing as mp
    sizes = [n // workers + (1 if i < n % workers else 0) for i in range(workers)]
    ctx = mp.get_context("fork")
    with ctx.Pool(workers) as pool:
        parts = pool.starmap(_call, [(fn, k, seed * 7919 + i) for i, k in enumerate(sizes)])
    total = parts[0]
    for p in parts[1:]:
        total.merge(p)
    return total


#: The generated inputs per edge in CI, and the seed (fixed: a failure
#: replays).  benchmarks/fuzz_report.py runs the same with other seeds.
CI_COUNTS = {
    "plan": (fuzz_plans, 10_000),
    "rig": (fuzz_rigs, 10_000),
    "materials": (fuzz_materials, 10_000),
    "tally": (fuzz_tallies, 10_000),
    "run log": (fuzz_runlogs, 10_000),
    "quantity text": (fuzz_quantities, 10_000),
    "app prompts": (fuzz_prompts, 10_000),
    "command line": (fuzz_cli, 2_000),
}
