"""Readers and writers for rigplan's own files.

* rig profiles (``rigs/*.toml``)            -> :func:`read_rig`
* string plans (``strings/*.toml``)         -> :func:`read_plan`, :func:`write_plan`
* tallies (``*.csv``)                       -> :func:`read_tally`, :func:`write_tally`
* user material files (``*.toml``)          -> :func:`read_materials`

Values with units are strings (``"1200 ft"``, ``"9-5/8 in"``, ``"9.2 ppg"``)
read by :func:`rigplan.files.units.parse`; a bare number is read in the file's
default unit system, chosen with the top-level key ``units = "si"`` (the
default: m, mm, kg/m3, kPa, MPa, kN, kg/m, L) or ``units = "us"`` (ft, in,
ppg, psi, psi, lbf, lb/ft, gal).  Every bad value raises
:class:`rigplan.errors.InputError` naming the file and the key path
(``strings/a.toml: section[2].wall: ...``); list indices count from 1.

This module also holds the small helpers the readers share: a checked view
of a TOML table (:class:`Table`) and a TOML writer (:func:`dump_toml`;
``tomllib`` reads only).
"""

from __future__ import annotations

import difflib
import math
import tomllib
from pathlib import Path

from rigplan.files import ranges, units
from rigplan.errors import InputError

__all__ = [
    "read_rig", "read_plan", "write_plan", "PlanRead",
    "read_tally", "write_tally", "TallyRow",
    "read_materials", "register_materials",
    "Table", "read_toml", "dump_toml",
]

#: Schema version written to and accepted from every file.
SCHEMA_VERSION = 1

#: Text accepted for a rating that is known not to exist.
UNRATED = "unrated"


def __getattr__(name):  # lazy: the readers import this module's helpers
    if name in ("read_plan", "write_plan", "PlanRead", "parse_plan"):
        from rigplan.files.formats import planfile
        return getattr(planfile, name)
    if name in ("read_rig", "parse_rig"):
        from rigplan.files.formats import rigfile
        return getattr(rigfile, name)
    if name in ("read_tally", "write_tally", "TallyRow", "tally_from_plan", "tally_text"):
        from rigplan.files.formats import tally
        return getattr(tally, name)
    if name in ("read_materials", "register_materials", "parse_materials"):
        from rigplan.files.formats import materialfile
        return getattr(materialfile, name)
    raise AttributeError(f"module 'rigplan.files.formats' has no attribute {name!r}")


# ---------------------------------------------------------------------------
# reading


#: Largest input file read [bytes].  The biggest plan of 20,000 joints
#: written joint by joint is about 6 MB; a larger file is not one of ours.
MAX_FILE_BYTES = 32 * 1024 * 1024


def read_input_bytes(path, what: str = "file") -> bytes:
    """The bytes of an input file, or InputError naming it (not found, a
    folder, a device or pipe, too large, unreadable, a name too long)."""
    p = Path(path)
    where = str(path)
    try:
        st = p.stat()
    except FileNotFoundError:
        raise InputError(where, f"{what} not found") from None
    except OSError as exc:
        raise InputError(where, f"cannot read the {what} ({exc.strerror or exc})") from None
    except ValueError:      # an embedded NUL in the name
        raise InputError(where, f"cannot read the {what}: the name holds a NUL character") from None
    import stat as _stat
    if _stat.S_ISDIR(st.st_mode):
        raise InputError(where, f"expected a {what}, found a folder")
    if not _stat.S_ISREG(st.st_mode):
        raise InputError(where, f"expected a {what}, found a device or pipe")
    if st.st_size > MAX_FILE_BYTES:
        raise InputError(where, f"the {what} is {st.st_size:,} bytes, more than the "
                                f"{MAX_FILE_BYTES:,} this rigplan reads: not a {what} of ours")
    try:
        return p.read_bytes()
    except OSError as exc:
        raise InputError(where, f"cannot read the {what} ({exc.strerror or exc})") from None


def decode_text(raw: bytes, source: str, what: str = "file") -> str:
    """UTF-8 text (a byte-order mark dropped), or InputError naming the file."""
    if b"\x00" in raw:
        raise InputError(source, f"binary data (NUL bytes): expected a {what} saved as UTF-8 text")
    try:
        return raw.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        raise InputError(source, f"not UTF-8 text (byte {exc.start + 1}): expected a {what} "
                                 "saved as UTF-8 text") from None


def read_toml(path) -> dict:
    """Read a TOML file; a syntax error becomes an InputError naming the file."""
    raw = read_input_bytes(path, "TOML file")
    return parse_toml_text(decode_text(raw, str(path), "TOML file"), str(path))


#: Deepest nesting of arrays and tables read (rigplan's files use 3).
MAX_NESTING = 20


def parse_toml_text(text: str, source: str) -> dict:
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise InputError(source, f"not valid TOML: {exc}") from None
    except RecursionError:
        raise InputError(source, "not valid TOML for rigplan: arrays or tables nested too deeply "
                                 f"(rigplan files nest at most {MAX_NESTING} levels)") from None
    except (ValueError, OverflowError, MemoryError) as exc:
        raise InputError(source, f"not valid TOML: {exc}") from None
    depth = _depth(data)
    if depth > MAX_NESTING:
        raise InputError(source, f"arrays or tables nested {depth} levels deep: rigplan files "
                                 f"nest at most {MAX_NESTING} levels")
    return data


def _depth(value, level: int = 0) -> int:
    """Nesting depth of parsed TOML, without recursion past MAX_NESTING + 1."""
    if level > MAX_NESTING:
        return level
    if isinstance(value, dict):
        return max((_depth(v, level + 1) for v in value.values()), default=level + 1)
    if isinstance(value, list):
        return max((_depth(v, level + 1) for v in value), default=level + 1)
    return level


def _short(value) -> str:
    """A value for a one-line message: long texts and huge numbers cut short."""
    if isinstance(value, int) and not isinstance(value, bool) and abs(value) > 10 ** 15:
        return f"a {len(str(abs(value)))}-digit number"
    text = repr(value)
    return text if len(text) <= 60 else text[:57] + "..."


def _type_name(value) -> str:
    if isinstance(value, bool):
        return "true/false"
    if isinstance(value, (int, float)):
        return "a number"
    if isinstance(value, str):
        return "text"
    if isinstance(value, list):
        return "a list"
    if isinstance(value, dict):
        return "a table"
    return type(value).__name__


class Table:
    """A TOML table read with checks; every message names file and key path.

    ``path`` is the key path of the table inside the file (``""`` for the
    top level, ``"section[2]"``, ``"path[1].tool[3]"``).  ``system`` is the
    unit system of bare numbers.  Unknown keys are refused with the list of
    known ones (and a close match when there is one).
    """

    def __init__(self, data, source: str, path: str, system: str, known):
        self.source = source
        self.path = path
        self.system = system
        if not isinstance(data, dict):
            raise InputError(self._where_table(),
                             f"expected a table, got {_type_name(data)}")
        self.data = data
        self.known = tuple(known)
        for key in data:
            if key not in self.known:
                close = difflib.get_close_matches(key[:100], self.known, n=1)
                hint = f" (did you mean {close[0]!r}?)" if close else ""
                raise InputError(self.where(key), f"unknown key{hint}; known keys here: "
                                                  f"{', '.join(self.known)}")

    def _where_table(self) -> str:
        return f"{self.source}: {self.path}" if self.path else self.source

    def where(self, key: str) -> str:
        key = key if len(key) <= 60 else key[:57] + "..."
        return f"{self.source}: {self.path}.{key}" if self.path else f"{self.source}: {key}"

    def __contains__(self, key) -> bool:
        return key in self.data

    def raw(self, key, default=None):
        return self.data.get(key, default)

    def missing(self, key: str, what: str):
        return InputError(self.where(key), f"required: {what}")

    # -- typed getters ----------------------------------------------------

    def text(self, key: str, default: str | None = "", required: bool = False) -> str | None:
        if key not in self.data:
            if required:
                raise self.missing(key, "text")
            return default
        value = self.data[key]
        if not isinstance(value, str):
            raise InputError(self.where(key), f"expected text in quotes, got {_type_name(value)} {_short(value)}")
        return value

    def choice(self, key: str, choices, default: str | None = None, required: bool = False):
        if key not in self.data:
            if required:
                raise self.missing(key, f"one of {', '.join(choices)}")
            return default
        value = self.data[key]
        if not isinstance(value, str) or value not in choices:
            close = difflib.get_close_matches(str(value)[:100], choices, n=1)
            hint = f" (did you mean {close[0]!r}?)" if close else ""
            raise InputError(self.where(key), f"unknown {key} {_short(value)}{hint}; expected one of "
                                              f"{', '.join(choices)}")
        return value

    def integer(self, key: str, default=None, required: bool = False, minimum=None,
                what: str = "a whole number", limits: str | None = None):
        if key not in self.data:
            if required:
                raise self.missing(key, what)
            return default
        value = self.data[key]
        if isinstance(value, float) and value.is_integer():
            value = int(value)
        if isinstance(value, bool) or not isinstance(value, int):
            raise InputError(self.where(key), f"expected {what}, got {_short(value)}")
        if minimum is not None and value < minimum:
            raise InputError(self.where(key), f"expected {what} >= {minimum}, got {_short(value)}")
        if limits is not None:
            ranges.check(limits, value, self.where(key), self.data[key])
        return value

    def boolean(self, key: str, default: bool = False) -> bool:
        if key not in self.data:
            return default
        value = self.data[key]
        if not isinstance(value, bool):
            raise InputError(self.where(key), f"expected true or false, got {_short(value)}")
        return value

    def quantity(self, key: str, kind: str, default=None, required: bool = False,
                 allow_unrated: bool = False, positive: bool = False,
                 nonnegative: bool = False, index: int | None = None, value=None,
                 limits: str | None = None):
        """A quantity in SI [unit of ``kind``], ``default`` when absent.

        ``allow_unrated``: the text ``"unrated"`` gives nan.  ``positive`` /
        ``nonnegative`` check the sign.  ``index``/``value`` read one item of
        a list held under ``key``.
        """
        where = self.where(key) if index is None else f"{self.where(key)}[{index}]"
        if value is None:
            if key not in self.data:
                if required:
                    raise InputError(where, f"required: {units.describe(kind)}")
                return default
            value = self.data[key]
        if allow_unrated and isinstance(value, str) and value.strip().lower() == UNRATED:
            return math.nan
        unit = units.default_units(self.system)[kind] or None
        result = units.parse(value, kind, unit, where)
        if positive and not result > 0.0:
            raise InputError(where, f"expected {units.describe(kind)} greater than zero, got {_short(value)}")
        if nonnegative and result < 0.0:
            raise InputError(where, f"expected {units.describe(kind)} not below zero, got {_short(value)}")
        if limits is not None:
            ranges.check(limits, result, where, value, self.system)
        return result

    def number(self, key: str, default=None, required: bool = False, what: str = "a number",
               limits: str | None = None):
        """A plain number [-] (percent text such as ``"85 %"`` allowed),
        checked against range ``limits`` of :mod:`rigplan.files.ranges`."""
        if key not in self.data:
            if required:
                raise self.missing(key, what if limits is None else ranges.get(limits).expected())
            return default
        value = units.parse(self.data[key], "dimensionless", None, self.where(key))
        if limits is not None:
            ranges.check(limits, value, self.where(key), self.data[key])
        return value

    def tables(self, key: str, known, required: bool = False) -> list:
        """An array of tables ``[[key]]`` as a list of :class:`Table` (1-based paths)."""
        if key not in self.data:
            if required:
                raise self.missing(key, f"at least one [[{key}]] table")
            return []
        value = self.data[key]
        if isinstance(value, dict):
            value = [value]
        if not isinstance(value, list):
            raise InputError(self.where(key), f"expected [[{key}]] tables, got {_type_name(value)}")
        prefix = f"{self.path}." if self.path else ""
        return [Table(item, self.source, f"{prefix}{key}[{i}]", self.system, known)
                for i, item in enumerate(value, start=1)]

    def table(self, key: str, known) -> "Table | None":
        if key not in self.data:
            return None
        prefix = f"{self.path}." if self.path else ""
        return Table(self.data[key], self.source, f"{prefix}{key}", self.system, known)

    def list_of(self, key: str):
        if key not in self.data:
            return None
        value = self.data[key]
        if not isinstance(value, list):
            raise InputError(self.where(key), f"expected a list in [ ], got {_type_name(value)}")
        return value


def file_system(data: dict, source: str) -> str:
    """The unit system of bare numbers (top-level ``units``), default ``"si"``."""
    value = data.get("units", "si")
    if value not in units.SYSTEMS:
        raise InputError(f"{source}: units", f"expected \"si\" or \"us\" (the units of bare numbers), "
                                             f"got {_short(value)}")
    return value


def check_version(data: dict, source: str) -> None:
    if "version" in data:
        v = data["version"]
        if isinstance(v, bool) or v != SCHEMA_VERSION:
            raise InputError(f"{source}: version",
                             f"this rigplan reads version {SCHEMA_VERSION} files, got {_short(v)}")


# ---------------------------------------------------------------------------
# writing


def quantity_text(value_si: float, kind: str, system: str) -> str:
    """A quantity as file text in ``system``'s display unit, 12 significant digits.

    Reads back with :func:`rigplan.files.units.parse` to within 5e-13 relative.
    """
    value = float(value_si)
    if math.isnan(value):
        return UNRATED
    label = units.unit_label(kind, system)
    number = f"{units.to_display(value, kind, system):.12g}"
    return f"{number} {label}" if label else number


def _toml_string(text: str) -> str:
    out = ['"']
    for ch in text:
        code = ord(ch)
        if ch == '"':
            out.append('\\"')
        elif ch == "\\":
            out.append("\\\\")
        elif ch == "\n":
            out.append("\\n")
        elif ch == "\t":
            out.append("\\t")
        elif ch == "\r":
            out.append("\\r")
        elif code < 0x20 or code == 0x7F:
            out.append(f"\\u{code:04X}")
        else:
            out.append(ch)
    out.append('"')
    return "".join(out)


def _toml_key(key: str) -> str:
    if key and all(c.isalnum() or c in "_-" for c in key) and key.isascii():
        return key
    return _toml_string(key)


def _toml_value(value) -> str:
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, int):
        return str(value)
    if isinstance(value, float):
        if math.isnan(value):
            return "nan"
        if math.isinf(value):
            return "inf" if value > 0 else "-inf"
        return repr(value)
    if isinstance(value, str):
        return _toml_string(value)
    if isinstance(value, (list, tuple)):
        return "[" + ", ".join(_toml_value(v) for v in value) + "]"
    raise TypeError(f"cannot write {type(value).__name__} to TOML")


def dump_toml(doc: dict, header: str = "") -> str:
    """TOML text of ``doc``: scalars and lists first, then tables, then arrays
    of tables (``list`` of ``dict``), nested to any depth.  ``header`` lines
    are written as ``#`` comments at the top."""
    lines = []
    for line in header.splitlines():
        lines.append(f"# {line}".rstrip())
    if lines:
        lines.append("")
    _dump_table(doc, "", lines)
    while lines and lines[-1] == "":
        lines.pop()
    return "\n".join(lines) + "\n"


def _is_table_array(value) -> bool:
    return isinstance(value, (list, tuple)) and len(value) > 0 and all(isinstance(v, dict) for v in value)


def _dump_table(doc: dict, prefix: str, lines: list) -> None:
    for key, value in doc.items():
        if value is None or isinstance(value, dict) or _is_table_array(value):
            continue
        lines.append(f"{_toml_key(key)} = {_toml_value(value)}")
    for key, value in doc.items():
        name = f"{prefix}{_toml_key(key)}"
        if isinstance(value, dict):
            if lines and lines[-1] != "":
                lines.append("")
            lines.append(f"[{name}]")
            _dump_table(value, f"{name}.", lines)
        elif _is_table_array(value):
            for item in value:
                if lines and lines[-1] != "":
                    lines.append("")
                lines.append(f"[[{name}]]")
                _dump_table(item, f"{name}.", lines)
