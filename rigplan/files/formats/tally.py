"""Tally sheets (CSV): the measured length and state of each joint on site.

Format (UTF-8, comma separated, one header line; lines starting with ``#``
are comments; row numbers in messages are line numbers in the file)::

    # tally for well ..., measured with a steel tape
    label,measured_length [ft],kind,status,note,measured_wall [in]
    J1,20.10,float_shoe,run,shoe welded on in the yard,
    J2,20 ft 1-1/2 in,blank,run,,
    J3,,blank,rejected,dented at the pin end,

Columns (any order; only ``label`` is required, the others may be left out):

* ``label``: joint label as in the plan (``J1`` is the bottom joint);
* ``measured_length [unit]``: a length; the unit in brackets is the unit of
  bare numbers, a value may carry its own (``20 ft 1-1/2 in``); empty = not
  measured (the planned length stands);
* ``kind``: one of :data:`rigplan.engine.stringmodel.JOINT_KINDS`, or empty;
* ``status``: ``run`` (default), ``rejected`` (set aside, not run) or
  ``not run`` (not in the hole yet);
* ``note``: free text;
* ``measured_wall [unit]``: measured minimum wall (a diameter kind), or empty;
* ``od_max [unit]``, ``od_min [unit]``: the largest and smallest outside
  diameter read on the joint (rack measurements, both or neither), giving
  the joint's own ellipticity ``(od_max - od_min) / (od_max + od_min)``.

A cell of ``measured_wall``, ``od_max`` or ``od_min`` may hold several
readings separated by ``;`` (several stations along the joint,
``0.365; 0.371; 0.359``): the smallest counts for ``measured_wall`` and
``od_min``, the largest for ``od_max``.
* ``seq``, ``planned_length [unit]``, ``length_source`` (``measured`` or
  ``planned``) and ``time``: written by the app's tally export for the
  record; read and checked, but the plan takes its planned lengths from the
  plan file, not from here.  A row whose ``length_source`` is ``planned``
  has no measured length.

Without a unit in the header every value of that column must carry its own
unit.  A measured length is a joint length (0.1 to 30 m) and a wall 0.1 to
150 mm (:mod:`rigplan.files.ranges`); a row whose whole-number length is
followed by a column of digits only (``20,04``) is refused as a decimal
comma.  Numbers never use a decimal comma or a thousands separator (the field
separator is a comma).
"""

from __future__ import annotations

import csv
import io
import re
from dataclasses import dataclass, field
from pathlib import Path

from rigplan.files import ranges, units
from rigplan.errors import InputError
from rigplan.engine.stringmodel import JOINT_KINDS

COLUMNS = ("label", "measured_length", "kind", "status", "note", "measured_wall", "run_order",
           "seq", "planned_length", "length_source", "time", "od_max", "od_min")
STATUSES = ("run", "rejected", "not run")
LENGTH_SOURCES = ("measured", "planned")
#: Largest running position a tally may give (the most joints in one string).
MAX_RUN_ORDER = ranges.MAX_JOINTS
_QUANTITY_COLUMNS = {"measured_length": "length", "measured_wall": "diameter",
                     "planned_length": "length", "od_max": "diameter", "od_min": "diameter"}
#: Columns whose cell may hold several readings, and which one counts.
_READINGS = {"measured_wall": min, "od_max": max, "od_min": min}
#: Range (rigplan.files.ranges) of each quantity column.
_LIMITS = {"measured_length": "joint_length", "measured_wall": "wall",
           "planned_length": "joint_length", "od_max": "diameter", "od_min": "diameter"}
_HEADER_CELL = re.compile(r"^\s*(?P<name>[A-Za-z_]+)\s*(?:\[(?P<unit>[^\]]*)\])?\s*$")


@dataclass(frozen=True)
class TallyRow:
    """One tally line, SI units.

    label : joint label
    measured_length : measured length [m] (None = not measured)
    kind : joint kind or None (not stated)
    status : "run", "rejected" or "not run"
    note : free text
    measured_wall : measured minimum wall [m] (None = not measured)
    od_max, od_min : largest and smallest outside diameter read [m] (None =
        not measured)
    run_order : running position, 1 = first in the hole (None = as planned);
        given for every joint or for none, it re-orders interchangeable joints
    row : line number in the file it came from (0 when made in code)
    planned_length : planned length [m] written for the record (None)
    length_source : "measured", "planned" or None (not stated)
    seq : running order written by the export (None)
    time : when it was entered (text, as written)
    """

    label: str
    measured_length: float | None = None
    kind: str | None = None
    status: str = "run"
    note: str = ""
    measured_wall: float | None = None
    run_order: int | None = None
    row: int = field(default=0, compare=False)
    planned_length: float | None = None
    length_source: str | None = None
    seq: int | None = None
    time: str = ""
    od_max: float | None = None
    od_min: float | None = None


def _short(value) -> str:
    text = repr(value)
    return text if len(text) <= 60 else text[:57] + "..."


def _system_of(unit) -> str | None:
    """The unit system a header unit belongs to, for messages (None: SI first)."""
    if unit is None:
        return None
    return "us" if unit.strip().lower() in ("ft", "feet", "foot", "in", "inch", "'", '"') else "si"


def _header(cells, source: str, line: int):
    columns = []
    unit_of = {}
    for cell in cells:
        m = _HEADER_CELL.match(cell)
        name = m.group("name").lower() if m else cell.strip()
        if not m or name not in COLUMNS:
            raise InputError(f"{source}: row {line}", f"unknown column {_short(cell.strip())}; known "
                                                      f"columns: {', '.join(COLUMNS)} (a unit may "
                                                      "follow in brackets: measured_length [ft])")
        if name in columns:
            raise InputError(f"{source}: row {line}", f"column {name!r} appears twice")
        unit = (m.group("unit") or "").strip() or None
        if unit is not None:
            if name not in _QUANTITY_COLUMNS:
                raise InputError(f"{source}: row {line}", f"column {name!r} takes no unit")
            kind = _QUANTITY_COLUMNS[name]
            try:  # check the unit now: one message, not one per row
                units.parse(f"1 {unit}", kind, None, f"{source}: row {line}, {name}")
            except InputError as exc:
                raise InputError(exc.where, f"header unit [{unit}]: {exc.message}") from None
            unit_of[name] = unit
        columns.append(name)
    if "label" not in columns:
        raise InputError(f"{source}: row {line}", "the header needs a 'label' column "
                                                  f"(columns: {', '.join(COLUMNS)})")
    return columns, unit_of


#: Longest joint label [characters].
MAX_LABEL = 64

_WHOLE = re.compile(r"^\d+$")
_FRACTION_DIGITS = re.compile(r"^\d{1,4}$")


def _rows(reader, source: str):
    """The csv reader's rows; a csv error (a field over the size limit, a
    NUL byte, an open quote) becomes an InputError naming the row."""
    while True:
        try:
            cells = next(reader)
        except StopIteration:
            return
        except csv.Error as exc:
            raise InputError(f"{source}: row {reader.line_num}",
                             f"not a readable CSV row ({exc}); expected the columns "
                             f"{', '.join(COLUMNS)}, comma separated") from None
        yield cells


def _decimal_comma(cells, columns, line: int, source: str) -> None:
    """Refuse a row whose quantity reads like a decimal comma split in two
    (``20,04`` taken as 20 and a next column of ``04``)."""
    for i, name in enumerate(columns[:-1]):
        if name in _QUANTITY_COLUMNS and _WHOLE.match(cells[i].strip()) \
                and _FRACTION_DIGITS.match(cells[i + 1].strip()):
            a, b = cells[i].strip(), cells[i + 1].strip()
            raise InputError(f"{source}: row {line}, {name}",
                             f"{a!r} followed by {b!r} in the {columns[i + 1]} column looks like a "
                             f"decimal comma ({a},{b}): write {a}.{b} (a point for decimals), or "
                             f"quote a {columns[i + 1]} that is only digits")


def parse_tally(text: str, source: str = "<tally>") -> list:
    """Rows of a tally CSV text (see the module docstring)."""
    reader = csv.reader(io.StringIO(text, newline=""))
    columns = None
    unit_of = {}
    rows = []
    seen = {}
    line = 0
    for cells in _rows(reader, source):
        line = reader.line_num
        if not cells or all(not c.strip() for c in cells):
            continue
        if cells[0].lstrip().startswith("#"):
            continue
        if columns is None:
            columns, unit_of = _header(cells, source, line)
            continue
        if len(cells) != len(columns):
            hint = " (a decimal comma? write 20.5, not 20,5)" if len(cells) > len(columns) else ""
            raise InputError(f"{source}: row {line}", f"{len(cells)} fields, the header has "
                                                      f"{len(columns)}{hint}")
        _decimal_comma(cells, columns, line, source)
        values = dict(zip(columns, (c.strip() for c in cells)))
        where = f"{source}: row {line}"
        label = values["label"]
        if not label:
            raise InputError(f"{where}, label", "expected a joint label (e.g. J12), got an empty cell")
        if len(label) > MAX_LABEL or not label.isprintable():
            raise InputError(f"{where}, label", f"expected a joint label of at most {MAX_LABEL} "
                                                f"printable characters (e.g. J12), got {len(label)} "
                                                "characters")
        if len(rows) >= ranges.MAX_JOINTS:
            raise InputError(where, f"more than {ranges.MAX_JOINTS:,} joint rows: expected at most "
                                    f"{ranges.MAX_JOINTS:,} joints in one string")
        if label in seen:
            raise InputError(f"{where}, label", f"joint {label!r} already listed in row {seen[label]}")
        seen[label] = line
        q = {}
        for name, kind in _QUANTITY_COLUMNS.items():
            text_value = values.get(name, "")
            if not text_value:
                q[name] = None
                continue
            readings = text_value.split(";") if name in _READINGS else [text_value]
            got = []
            for reading in readings:
                if not reading.strip():
                    raise InputError(f"{where}, {name}", f"expected readings separated by ';' "
                                                         f"(e.g. 0.365; 0.371), got {_short(text_value)}")
                v = units.parse(reading.strip(), kind, unit_of.get(name), f"{where}, {name}")
                got.append(ranges.check(_LIMITS[name], v, f"{where}, {name}", reading.strip(),
                                        _system_of(unit_of.get(name))))
            q[name] = _READINGS[name](got) if name in _READINGS else got[0]
        if (q["od_max"] is None) != (q["od_min"] is None):
            missing = "od_min" if q["od_min"] is None else "od_max"
            raise InputError(f"{where}, {missing}", "give both od_max and od_min (the largest and "
                                                    "smallest outside diameter read), or neither")
        if q["od_max"] is not None and q["od_min"] > q["od_max"]:
            raise InputError(f"{where}, od_min", "the smallest outside diameter read is larger than "
                                                 "the largest: check the two columns")
        kind = values.get("kind", "") or None
        if kind is not None and kind not in JOINT_KINDS:
            raise InputError(f"{where}, kind", f"unknown kind {_short(kind)}; expected one of "
                                               f"{', '.join(JOINT_KINDS)} or empty")
        status = " ".join((values.get("status", "") or "run").lower().split())
        if status not in STATUSES:
            raise InputError(f"{where}, status", f"expected run or rejected (or not run), got "
                                                 f"{_short(values['status'])}")
        order_text = values.get("run_order", "")
        run_order = None
        if order_text:
            if not (order_text.isascii() and order_text.isdigit()) or not 1 <= int(order_text) <= MAX_RUN_ORDER:
                raise InputError(f"{where}, run_order", f"expected a whole number 1..{MAX_RUN_ORDER} "
                                                        f"(1 = first in the hole), got {_short(order_text)}")
            run_order = int(order_text)
        basis = (values.get("length_source", "") or "").lower() or None
        if basis is not None and basis not in LENGTH_SOURCES:
            raise InputError(f"{where}, length_source", f"expected measured, planned or empty, "
                                                        f"got {_short(values['length_source'])}")
        if basis == "planned" and q["measured_length"] is not None:
            raise InputError(f"{where}, measured_length", "the row says the planned length was "
                                                          "accepted (length_source planned): "
                                                          "leave measured_length empty")
        if basis == "measured" and q["measured_length"] is None:
            raise InputError(f"{where}, measured_length", "expected the measured length "
                                                          "(length_source measured)")
        if status != "run" and basis is not None:
            raise InputError(f"{where}, length_source", f"a joint {status} has no length "
                                                        "source: leave it empty")
        seq_text = values.get("seq", "")
        seq = None
        if seq_text:
            if not (seq_text.isascii() and seq_text.isdigit()) or int(seq_text) < 1:
                raise InputError(f"{where}, seq", f"expected the running order as a whole "
                                                  f"number >= 1 or empty, got {_short(seq_text)}")
            seq = int(seq_text)
        rows.append(TallyRow(label=label, measured_length=q["measured_length"], kind=kind,
                             status=status, note=values.get("note", ""),
                             measured_wall=q["measured_wall"], run_order=run_order, row=line,
                             planned_length=q["planned_length"], length_source=basis,
                             seq=seq, time=values.get("time", ""),
                             od_max=q["od_max"], od_min=q["od_min"]))
    if columns is None:
        raise InputError(source, "empty tally: expected a header line "
                                 f"({', '.join(COLUMNS)}) and one row per joint")
    return rows


def read_tally(path) -> list:
    """Rows of a tally CSV file as :class:`TallyRow` (SI units)."""
    from rigplan.files.formats import decode_text, read_input_bytes
    raw = read_input_bytes(path, "tally CSV")
    return parse_tally(decode_text(raw, str(path), "tally CSV"), str(path))


def _number(value: float, kind: str, system: str) -> str:
    return f"{units.to_display(value, kind, system):.12g}"


def tally_text(rows, system: str = "us", comment: str = "") -> str:
    """CSV text of tally rows, lengths in ``system``'s display unit.

    Rack readings are written as the one that counts (the smallest wall, the
    largest and smallest OD), not every reading of the original sheet.
    """
    if system not in units.SYSTEMS:
        raise ValueError(f"unknown unit system {system!r}; known: si, us")
    buf = io.StringIO(newline="")
    for line in comment.splitlines():
        buf.write(f"# {line}".rstrip() + "\n")
    w = csv.writer(buf, lineterminator="\n")
    ordered = any(r.run_order is not None for r in rows)
    gauged = any(r.od_max is not None for r in rows)
    d_unit = units.unit_label('diameter', system)
    w.writerow(["label", f"measured_length [{units.unit_label('length', system)}]", "kind",
                "status", "note", f"measured_wall [{d_unit}]"]
               + (["run_order"] if ordered else [])
               + ([f"od_max [{d_unit}]", f"od_min [{d_unit}]"] if gauged else []))
    for r in rows:
        w.writerow([
            r.label,
            "" if r.measured_length is None else _number(r.measured_length, "length", system),
            r.kind or "",
            r.status,
            r.note,
            "" if r.measured_wall is None else _number(r.measured_wall, "diameter", system),
        ] + (["" if r.run_order is None else str(r.run_order)] if ordered else [])
          + ([("" if v is None else _number(v, "diameter", system)) for v in (r.od_max, r.od_min)]
             if gauged else []))
    return buf.getvalue()


def write_tally(rows, path, system: str = "us", comment: str = "") -> None:
    """Write tally rows to a CSV file atomically (12 significant digits)."""
    from rigplan.files.atomicio import atomic_write_text

    atomic_write_text(path, tally_text(rows, system, comment))


#: Columns of the app's tally export (:func:`run_tally_text`).
EXPORT_COLUMNS = ("seq", "label", "status", "measured_length", "planned_length",
                  "length_source", "note", "time")


def run_tally_text(entries, system: str = "us", comment: str = "") -> str:
    """CSV text of the site tally from the run log, in ``system``'s units.

    ``entries`` are :meth:`rigplan.files.runlog.RunLog.tally_entries` rows.
    A joint run on its planned length (nothing measured) has an empty
    ``measured_length`` and ``length_source`` ``planned``.  Lengths are
    written to 12 significant digits, so the sheet reads back (with
    :func:`parse_tally`, the app's ``t`` or ``rigplan check --tally``) to the
    same plan within 5e-13 relative.  Comment lines start with ``#``.
    """
    if system not in units.SYSTEMS:
        raise ValueError(f"unknown unit system {system!r}; known: si, us")
    unit = units.unit_label("length", system)
    buf = io.StringIO(newline="")
    for line in comment.splitlines():
        buf.write(f"# {line}".rstrip() + "\n")
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(["seq", "label", "status", f"measured_length [{unit}]",
                f"planned_length [{unit}]", "length_source", "note", "time"])
    for e in entries:
        measured = e["length"] if e["basis"] == "measured" else None
        w.writerow([
            "" if e["seq"] is None else e["seq"], e["label"], e["status"],
            "" if measured is None else _number(measured, "length", system),
            "" if e["planned"] is None else _number(e["planned"], "length", system),
            e["basis"] or "", e["note"], e["time"],
        ])
    return buf.getvalue()


def tally_from_plan(plan) -> list:
    """A tally sheet for a plan: one row per joint with what the plan knows."""
    return [TallyRow(label=j.label, measured_length=j.measured_length, kind=j.kind,
                     status="rejected" if j.rejected else "run", measured_wall=j.measured_wall,
                     od_max=j.dmax, od_min=j.dmin)
            for j in plan.joints]
