"""Units at the edge: reading the user's quantities and showing results.

The engine works in SI base units (m, kg, s, N, Pa).  This module is the one
place where text such as ``"9-5/8 in"``, ``"20' 6\\""`` or ``"9.2 ppg"``
becomes an SI float, and where SI floats become field (``"us"``) or metric
(``"si"``) display values.

Reading (:func:`parse`) uses pint, built once and lazily with its cache, with
the trade's units defined on top of pint's own:

* ``ppg`` = pound per US gallon; ``gal`` is the US liquid gallon;
* ``bbl`` is the petroleum barrel of 42 US gallons (pint's own ``bbl`` is the
  31.5-gallon barrel: the text ``bbl`` is rewritten before pint sees it);
* ``SG`` (relative density) = 999.972 kg/m^3, the density of pure water at
  its maximum density (about 4 degC), so 1.20 SG = 1199.97 kg/m^3;
* ``tf`` / ``tonne_force`` / ``tonne-force`` = 1000 kg x standard gravity;
  ``tonne`` (a mass) weighs the same; ``US ton`` / ``short ton`` = 2000 lb
  (its weight, 2000 lbf); a bare ``t``, ``ton`` or ``tons`` is refused as
  ambiguous (the tonne and the short ton differ by 10 %);
* feet and inches take inches below 12 (``20 ft 13 in`` is refused as a slip);
* ``lbf``, ``psi``, ``ksi``, ``kip``, ``kN``, ``daN``, ``ft``, ``in`` are
  pint's.

Notations pint reads wrongly are handled here first: pipe fractions
(``9-5/8 in``, ``13 3/8 in``, ``5/8 in``), feet and inches (``20 ft 6 in``,
``20' 6"``, ``20'6"``, ``6"``, ``20'``), and commas, which are always refused
(``1,5`` is never read as 15, ``1,200`` never as 1.2 or 1200).  A bare number
takes the field's default unit.  A mass where a force is expected (``20 tonne``,
``40000 lb``) and a mass per length where a weight per length is expected
(``36 lb/ft``) are taken as their weight under standard gravity, as the trade
writes them.

Display (:func:`to_display`, :func:`format`, :func:`unit_label`) uses plain
float factors with the exact definitions of NIST SP 811 (2008), Appendix B,
so the user interface needs no pint for each cell.  Units shown:

======================  ==========  ==========
kind                    ``us``      ``si``
======================  ==========  ==========
length                  ft          m
diameter                in          mm
density                 ppg         kg/m3
pressure                psi         kPa
stress                  psi         MPa
force                   lbf         kN
linear_weight           lb/ft       kg/m
mass_per_length         lb/ft       kg/m
volume                  gal (US)    L
dimensionless           (none)      (none)
======================  ==========  ==========

Pressures in SI are shown in kPa (water-well hydrostatic pressures, valve and
thermoplastic collapse ratings are tens to thousands of kPa); material
strengths in MPa.  A weight per length in SI is shown as kg/m (the mass that
weighs that much under standard gravity), as pipe tables print it.

Importing this module does not import pint.
"""

from __future__ import annotations

import builtins
import math
import re
from functools import lru_cache

from rigplan.errors import InputError

#: Standard gravity [m/s^2] (CGPM 1901; NIST SP 811 B.8, exact).
STANDARD_GRAVITY = 9.80665

#: Reference density for ``SG`` (relative density) [kg/m^3]: pure water at
#: its maximum density, about 4 degC (the basis of the 1901 litre).
SG_REFERENCE_DENSITY = 999.972

# Exact factors to SI, NIST SP 811 (2008) Appendix B.8 (definitions):
FOOT = 0.3048                        # ft -> m (exact)
INCH = 0.0254                        # in -> m (exact)
POUND = 0.45359237                   # lb (avoirdupois) -> kg (exact)
POUND_FORCE = POUND * STANDARD_GRAVITY   # lbf -> N (4.4482216152605, exact)
PSI = POUND_FORCE / INCH ** 2        # lbf/in^2 -> Pa (6894.757...)
US_GALLON = 231 * INCH ** 3          # US liquid gallon -> m^3 (3.785411784e-3, exact)
BARREL = 42 * US_GALLON              # petroleum barrel -> m^3 (0.158987294928)
PPG = POUND / US_GALLON              # lb/gal -> kg/m^3 (119.826427...)
LB_PER_FT = POUND / FOOT             # lb/ft -> kg/m (1.488164...)
LBF_PER_FT = POUND_FORCE / FOOT      # lbf/ft -> N/m (14.5939...)

KINDS = (
    "length",
    "diameter",
    "density",
    "pressure",
    "stress",
    "force",
    "linear_weight",
    "mass_per_length",
    "volume",
    "dimensionless",
)

SYSTEMS = ("us", "si")

#: Longest quantity text read [characters]: "20 ft 6-1/2 in" needs 14.
MAX_TEXT = 200

# kind -> (what it is called, example for messages)
_DESCRIPTION = {
    "length": ("a length", "1200 ft or 365 m"),
    "diameter": ("a diameter or wall thickness", "9-5/8 in or 244.5 mm"),
    "density": ("a density", "9.2 ppg, 1100 kg/m3 or 1.10 SG"),
    "pressure": ("a pressure", "150 psi or 1000 kPa"),
    "stress": ("a stress or strength", "35000 psi or 240 MPa"),
    "force": ("a force", "40000 lbf, 180 kN or 18 tf"),
    "linear_weight": ("a weight per length", "36 lb/ft or 53.6 kg/m"),
    "mass_per_length": ("a mass per length", "36 lb/ft or 53.6 kg/m"),
    "volume": ("a volume", "10 bbl, 420 gal or 1600 L"),
    "dimensionless": ("a plain number", "0.85 or 85 %"),
}

# Dimensionality keys as pint names them.
_L, _M, _T = "[length]", "[mass]", "[time]"
_DIMS = {
    "length": {_L: 1},
    "diameter": {_L: 1},
    "density": {_M: 1, _L: -3},
    "pressure": {_M: 1, _L: -1, _T: -2},
    "stress": {_M: 1, _L: -1, _T: -2},
    "force": {_M: 1, _L: 1, _T: -2},
    "linear_weight": {_M: 1, _T: -2},
    "mass_per_length": {_M: 1, _L: -1},
    "volume": {_L: 3},
    "dimensionless": {},
}
# Accepted alternative dimension and the factor that brings it to the kind's
# SI unit (a mass read as its standard weight, and back).
_ALTERNATIVE = {
    "force": ({_M: 1}, STANDARD_GRAVITY),
    "linear_weight": ({_M: 1, _L: -1}, STANDARD_GRAVITY),
    "mass_per_length": ({_M: 1, _T: -2}, 1.0 / STANDARD_GRAVITY),
}

# Display units: kind -> system -> (label, SI value of one display unit,
# default decimals).
_DISPLAY = {
    "length": {"us": ("ft", FOOT, 2), "si": ("m", 1.0, 2)},
    "diameter": {"us": ("in", INCH, 3), "si": ("mm", 1e-3, 1)},
    "density": {"us": ("ppg", PPG, 2), "si": ("kg/m3", 1.0, 0)},
    "pressure": {"us": ("psi", PSI, 0), "si": ("kPa", 1e3, 0)},
    "stress": {"us": ("psi", PSI, 0), "si": ("MPa", 1e6, 1)},
    "force": {"us": ("lbf", POUND_FORCE, 0), "si": ("kN", 1e3, 2)},
    "linear_weight": {"us": ("lb/ft", LBF_PER_FT, 2),
                      "si": ("kg/m", STANDARD_GRAVITY, 2)},
    "mass_per_length": {"us": ("lb/ft", LB_PER_FT, 2), "si": ("kg/m", 1.0, 2)},
    "volume": {"us": ("gal", US_GALLON, 1), "si": ("L", 1e-3, 0)},
    "dimensionless": {"us": ("", 1.0, 3), "si": ("", 1.0, 3)},
}

# ---------------------------------------------------------------------------
# the pint registry (built on first use)

_REGISTRY = None


def registry():
    """The project's pint registry, built once on first use (with its cache)."""
    global _REGISTRY
    if _REGISTRY is None:
        import pint

        ureg = pint.UnitRegistry(cache_folder=":auto:")
        ureg.define("ppg = pound / gallon")
        ureg.define(f"SG = {SG_REFERENCE_DENSITY!r} kilogram / meter ** 3 = sg")
        ureg.define("@alias force_metric_ton = tonne_force")
        _REGISTRY = ureg
    return _REGISTRY


# Rewrites of the unit text before pint reads it (trade spellings).
_UNIT_REWRITES = (
    (re.compile(r"^\s*\"\s*$"), "inch"),
    (re.compile(r"^\s*'\s*$"), "foot"),
    (re.compile(r"\bbbls?\b"), "oil_barrel"),
    (re.compile(r"\b(?:US|U\.S\.|us)\s*(?:gal|gals|gallons?)\b"), "gallon"),
    (re.compile(r"\busgal\b"), "gallon"),
    (re.compile(r"\bgals\b"), "gallon"),
    (re.compile(r"\btonnes?[-_ ]force\b"), "tonne_force"),
    (re.compile(r"(?i)(?:\bU\.S\.|\bUS|\bshort)[-_ ]?tons?\b"), "short_ton"),
    (re.compile(r"\bpcf\b"), "(lb/ft**3)"),
    (re.compile(r"\bkg/l\b"), "kg/L"),
    (re.compile(r"\u00b3"), "**3"),
    (re.compile(r"\u00b2"), "**2"),
    # m3, ft3, in2 ... -> m**3, ft**3, in**2 (pint reads m3 as a name)
    (re.compile(r"(?<=[A-Za-z])([23])\b"), r"**\1"),
)


_RE_LOOSE_NUMBER = re.compile(r"\b\d+(?:\.\d*)?\b")


def _normalize_unit_text(text: str) -> str:
    out = text.strip()
    for pattern, repl in _UNIT_REWRITES:
        out = pattern.sub(repl, out)
    return out


@lru_cache(maxsize=512)
def _unit_to_si(unit_text: str):
    """(factor to SI base units, dimensionality dict) of a unit text.

    Raises KeyError with a reason when pint does not know the unit.
    """
    ureg = registry()
    text = _normalize_unit_text(unit_text)
    # a stray number in the unit ("ft 6") would be multiplied in by pint
    for m in _RE_LOOSE_NUMBER.finditer(text):
        if not text[:m.start()].endswith(("**", "^")):
            raise KeyError(f"number inside the unit {unit_text!r}")
    try:
        units = ureg.parse_units(text)
        base = ureg.Quantity(1.0, units).to_base_units()
    except Exception as exc:  # any failure to read the unit: unknown unit
        raise KeyError(str(exc)) from None
    if not isinstance(base.magnitude, (int, float)) or not math.isfinite(base.magnitude):
        raise KeyError(f"not a plain unit: {unit_text!r}")
    dims = {k: v for k, v in dict(base.dimensionality).items() if v}
    return float(base.magnitude), dims


# ---------------------------------------------------------------------------
# reading

_NUM = r"[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?"
_UNSIGNED = r"(?:\d+(?:\.\d*)?|\.\d+)"
# an inch amount: 6, 6.5, 6-1/2, 6 1/2, 1/2
_INCH_AMOUNT = r"(?:\d+(?:-|\s+)\d+/\d+|\d+/\d+|" + _UNSIGNED + r")"
_FT_MARK = r"(?:ft|feet|foot|')"
_IN_MARK = r"(?:in|inch|inches|\")"

_RE_FEET_INCHES = re.compile(
    r"^(?P<ft>" + _UNSIGNED + r")\s*" + _FT_MARK + r"\s*(?P<inch>" + _INCH_AMOUNT
    + r")\s*" + _IN_MARK + r"$")
_RE_FEET_INCHES_UNMARKED = re.compile(
    r"^(?P<ft>" + _UNSIGNED + r")\s*" + _FT_MARK + r"\s*(?P<inch>" + _INCH_AMOUNT + r")$")
_RE_FEET_MARK = re.compile(r"^(?P<ft>" + _NUM + r")\s*'$")
_RE_MIXED = re.compile(r"^(?P<whole>\d+)(?:-|\s+)(?P<num>\d+)/(?P<den>\d+)(?P<unit>(?:\s*\D.*)?)$")
_RE_FRACTION = re.compile(r"^(?P<num>\d+)/(?P<den>\d+)(?P<unit>(?:\s*\D.*)?)$")
_RE_PLAIN = re.compile(r"^(?P<num>" + _NUM + r")(?P<unit>.*)$")
_RE_SPACED_DIGITS = re.compile(r"^[+-]?\d+\s+\d")
_RE_THOUSANDS = re.compile(r"^[+-]?\d{1,3}(?:,\d{3})+(?:\.\d*)?(?=\D|$)")
_RE_DECIMAL_COMMA = re.compile(r"^[+-]?\d*,\d+")


_VULGAR_FRACTIONS = {"\u00bd": "1/2", "\u00bc": "1/4", "\u00be": "3/4", "\u215b": "1/8",
                     "\u215c": "3/8", "\u215d": "5/8", "\u215e": "7/8"}
_MARKS = {"\u2032": "'", "\u2019": "'", "\u2018": "'", "\u2033": '"', "\u201c": '"',
          "\u201d": '"', "\u00a0": " "}


def _normalize_marks(text: str) -> str:
    """Typographic feet/inch marks and vulgar fractions (9\u215d) to plain text."""
    if text.isascii():
        return text
    for mark, plain in _MARKS.items():
        text = text.replace(mark, plain)
    for frac, plain in _VULGAR_FRACTIONS.items():
        text = re.sub(r"(?<=\d)\s*" + frac, "-" + plain, text)
        text = text.replace(frac, plain)
    return text


def describe(kind: str) -> str:
    """What a quantity of ``kind`` is, with an example: ``"a length (e.g. 1200 ft or 365 m)"``."""
    _check_kind(kind)
    what, example = _DESCRIPTION[kind]
    return f"{what} (e.g. {example})"


_describe = describe


def _fraction(num: str, den: str) -> float:
    d = int(den)
    if d == 0:
        raise ZeroDivisionError
    return int(num) / d


def _inch_amount(text: str) -> float:
    text = text.strip()
    m = re.match(r"^(\d+)(?:-|\s+)(\d+)/(\d+)$", text)
    if m:
        return int(m.group(1)) + _fraction(m.group(2), m.group(3))
    m = re.match(r"^(\d+)/(\d+)$", text)
    if m:
        return _fraction(m.group(1), m.group(2))
    return float(text)


def _split_number_unit(text: str):
    """(magnitude, unit text or '') of a trade notation, or None."""
    m = _RE_FEET_INCHES.match(text)
    if m:
        feet = float(m.group("ft"))
        inches = _inch_amount(m.group("inch"))
        return feet * 12.0 + inches, "inch"
    m = _RE_FEET_MARK.match(text)
    if m:
        return float(m.group("ft")), "foot"
    m = _RE_MIXED.match(text)
    if m:
        value = int(m.group("whole")) + _fraction(m.group("num"), m.group("den"))
        return value, m.group("unit").strip()
    m = _RE_FRACTION.match(text)
    if m:
        return _fraction(m.group("num"), m.group("den")), m.group("unit").strip()
    m = _RE_PLAIN.match(text)
    if m:
        return float(m.group("num")), m.group("unit").strip()
    return None


def _check_kind(kind: str) -> None:
    if kind not in _DIMS:
        raise ValueError(f"unknown quantity kind {kind!r}; known: {', '.join(KINDS)}")


def _shorten(text: str, limit: int = 60) -> str:
    """``text`` cut to ``limit`` characters for a one-line message."""
    text = str(text)
    return text if len(text) <= limit else text[:limit - 3] + "..."


def _convert(value: float, unit_text: str, kind: str, where: str, shown: str) -> float:
    """value [unit_text] -> SI float for kind, checking the dimension and
    that the result is a finite number (``1e308 psi`` overflows to inf)."""
    result = _convert_unchecked(value, unit_text, kind, where, _shorten(shown))
    if not math.isfinite(result):
        raise InputError(where, f"expected {_describe(kind)}, got {_shorten(shown)!r}, "
                                "which is too large to use")
    return result


#: A bare "t", "ton" or "tons": the tonne (1,000 kg) to some, the US short
#: ton (2,000 lb) to others, 10 % apart; refused so that neither is guessed.
_RE_AMBIGUOUS_TON = re.compile(r"(?<![\w.])(?:t|tons?)(?![\w.])")

AMBIGUOUS_TON = ("write 'tonne' (or 'tf': metric, 1,000 kgf) or 'US ton' / 'short ton' "
                 "(2,000 lbf)")


def _convert_unchecked(value: float, unit_text: str, kind: str, where: str, shown: str) -> float:
    if unit_text == "" and kind == "dimensionless":
        return value
    found = _RE_AMBIGUOUS_TON.search(_normalize_unit_text(unit_text))
    if found:
        raise InputError(where, f"{found.group(0)!r} in {_shorten(shown)!r} is ambiguous: "
                                + AMBIGUOUS_TON)
    try:
        factor, dims = _unit_to_si(unit_text)
    except KeyError:
        raise InputError(where, f"unknown unit {_shorten(unit_text.strip())!r} in {_shorten(shown)!r}; "
                                f"expected {_describe(kind)}") from None
    if dims == _DIMS[kind]:
        return value * factor
    alt = _ALTERNATIVE.get(kind)
    if alt is not None and dims == alt[0]:
        return value * factor * alt[1]
    raise InputError(where, f"expected {_describe(kind)}, got {_shorten(shown)}")


def parse(value, kind: str, default_unit: str | None = None, where: str = "") -> float:
    """Read a quantity the user wrote and return it in SI base units.

    Parameters
    ----------
    value : str, int or float
        Text such as ``"1200 ft"``, ``"9-5/8 in"``, ``"20' 6\\""``,
        ``"9.2 ppg"``, ``"85 %"``, or a bare number (or bare-number text),
        which is read in ``default_unit``.
    kind : str
        One of :data:`KINDS`; fixes the dimension expected and the SI unit
        returned: length and diameter [m], density [kg/m^3], pressure and
        stress [Pa], force [N], linear_weight [N/m], mass_per_length [kg/m],
        volume [m^3], dimensionless [-].
    default_unit : str or None
        Unit of a bare number (``"ft"``, ``"in"``, ``"ppg"``...).  ``None``
        means a bare number is refused (except for ``dimensionless``).
    where : str
        File and key for error messages (``"strings/a.toml: section[2].wall"``).

    Returns
    -------
    float
        The value in the SI unit of ``kind``.

    Raises
    ------
    rigplan.errors.InputError
        A decimal comma or thousands separator, an unknown unit, a wrong
        dimension, a non-finite or unreadable number.

    Examples
    --------
    >>> round(parse("9-5/8 in", "diameter"), 10)
    0.244475
    >>> round(parse("20' 6\\"", "length"), 10)
    6.2484
    >>> round(parse(40, "length", "ft"), 10)
    12.192
    """
    _check_kind(kind)
    if isinstance(value, bool) or not isinstance(value, (int, float, str)):
        raise InputError(where, f"expected {_describe(kind)}, got {value!r}")
    if isinstance(value, (int, float)):
        try:
            number = float(value)
        except OverflowError:
            raise InputError(where, f"expected {_describe(kind)}, got a number with "
                                    f"{len(str(abs(value)))} digits (too large)") from None
        if not math.isfinite(number):
            raise InputError(where, f"expected {_describe(kind)}, got {value!r}")
        unit = default_unit if default_unit is not None else ""
        if unit == "" and kind != "dimensionless":
            raise InputError(where, f"a bare number needs a unit here: expected {_describe(kind)}, got {value!r}")
        return _convert(number, unit, kind, where, f"{value!r} {unit}".strip())

    if len(value) > MAX_TEXT:
        raise InputError(where, f"expected {_describe(kind)}, got a text of {len(value):,} "
                                f"characters (at most {MAX_TEXT})")
    text = _normalize_marks(value.strip())
    if not text:
        raise InputError(where, f"expected {_describe(kind)}, got an empty value")
    if "," in text:
        if _RE_THOUSANDS.match(text):
            fixed = text.replace(",", "")
            raise InputError(where, f"no commas in numbers: write {_shorten(fixed)!r} instead of {_shorten(text)!r} "
                                    "(a comma is never read, neither as a thousands "
                                    "separator nor as a decimal point)")
        if _RE_DECIMAL_COMMA.match(text):
            fixed = text.replace(",", ".", 1)
            raise InputError(where, f"decimal comma in {_shorten(text)!r}: write {_shorten(fixed)!r} "
                                    "(use a point for decimals)")
        raise InputError(where, f"unexpected comma in {_shorten(text)!r}: expected {_describe(kind)}")
    if _RE_SPACED_DIGITS.match(text) and not _RE_MIXED.match(text):
        fixed = re.sub(r"(?<=\d)\s+(?=\d)", "", text)
        raise InputError(where, f"space inside the number {_shorten(text)!r}: write {_shorten(fixed)!r} "
                                "(no thousands separators)")
    m = _RE_FEET_INCHES_UNMARKED.match(text) if kind in ("length", "diameter") else None
    if m:
        raise InputError(where, f"mark the inches in {_shorten(text)!r}: write "
                                f"'{m.group('ft')} ft {m.group('inch')} in'")
    m = _RE_FEET_INCHES.match(text)
    if m:
        try:
            inches = _inch_amount(m.group("inch"))
        except (ZeroDivisionError, ValueError):
            inches = 0.0
        if inches >= 12:
            raise InputError(where, f"{m.group('inch')} inches in {_shorten(text)!r}: expected "
                                    "a feet-and-inches length with inches from 0 to under 12 "
                                    "(e.g. '20 ft 1-3/8 in')")
    try:
        split = _split_number_unit(text)
    except ZeroDivisionError:
        raise InputError(where, f"zero denominator in {_shorten(text)!r}: expected {_describe(kind)}") from None
    except (OverflowError, ValueError):
        raise InputError(where, f"expected {_describe(kind)}, got {_shorten(text)!r} "
                                "(a number too large to use)") from None
    if split is None:
        raise InputError(where, f"expected {_describe(kind)}, got {_shorten(text)!r}")
    number, unit = split
    if not math.isfinite(number):
        raise InputError(where, f"expected {_describe(kind)}, got {_shorten(text)!r}")
    if unit == "":
        if default_unit is None and kind != "dimensionless":
            raise InputError(where, f"give a unit: expected {_describe(kind)}, got {_shorten(text)!r}")
        unit = default_unit or ""
    return _convert(number, unit, kind, where, text)


# ---------------------------------------------------------------------------
# display

def _display(kind: str, system: str):
    _check_kind(kind)
    if system not in _DISPLAY[kind]:
        raise ValueError(f"unknown unit system {system!r}; known: {', '.join(SYSTEMS)}")
    return _DISPLAY[kind][system]


def unit_label(kind: str, system: str) -> str:
    """Unit shown for ``kind`` in ``system`` ("us" or "si"), e.g. ``"ft"``.

    >>> unit_label("density", "us"), unit_label("pressure", "si")
    ('ppg', 'kPa')
    """
    return _display(kind, system)[0]


def display_factor(kind: str, system: str) -> float:
    """SI value of one display unit of ``kind`` in ``system`` (e.g. 0.3048 for ft)."""
    return _display(kind, system)[1]


def to_display(value_si, kind: str, system: str):
    """SI value -> value in the display unit of ``system`` (float or array).

    >>> to_display(0.3048, "length", "us")
    1.0
    """
    return value_si / _display(kind, system)[1]


def from_display(value, kind: str, system: str):
    """Display-unit value -> SI value (inverse of :func:`to_display`)."""
    return value * _display(kind, system)[1]


def format(value_si: float, kind: str, system: str, digits: int | None = None) -> str:
    """Text for an SI value in the display unit, e.g. ``"1200.00 ft"``.

    ``digits`` is the number of decimals (a default per unit when ``None``).
    No thousands separators are written, so the text reads back with
    :func:`parse`.  ``nan`` (unrated, not given) shows as ``"n/a"``.

    >>> format(365.76, "length", "us", 1)
    '1200.0 ft'
    >>> format(float("nan"), "force", "si")
    'n/a'
    """
    label, factor, default_digits = _display(kind, system)
    value = float(value_si)
    if math.isnan(value):
        return "n/a"
    d = default_digits if digits is None else int(digits)
    if math.isinf(value):
        number = "inf" if value > 0 else "-inf"
    else:
        number = builtins.format(value / factor, f".{max(d, 0)}f")
        if number.startswith("-") and float(number) == 0.0:
            number = number[1:]
    return f"{number} {label}" if label else number


def default_units(system: str) -> dict:
    """Default unit for bare numbers in a file, per kind, for ``system``.

    These are the display units, so a bare number means the same as what the
    program shows in that system.
    """
    if system not in SYSTEMS:
        raise ValueError(f"unknown unit system {system!r}; known: {', '.join(SYSTEMS)}")
    return {kind: _DISPLAY[kind][system][0] for kind in KINDS}
