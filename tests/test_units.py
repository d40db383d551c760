"""Tests for rigplan.files.units: reading the trade's notations, refusals, SI
conversion factors and display.

Conversion factors are checked against NIST Special Publication 811 (2008
edition), *Guide for the Use of the International System of Units*, Appendix
B.8 (factors for units listed alphabetically).  Exact definitions are checked
to full double precision; factors NIST prints to seven digits are checked to
their printed precision (rtol 5e-7).
"""

from __future__ import annotations

import math
import subprocess
import sys

import numpy as np
import pytest
from numpy.testing import assert_allclose

from rigplan.files import units
from rigplan.errors import InputError

# NIST SP 811 (2008) Appendix B.8, exact definitions.
from _units import ft as FOOT, g_n as G_N, gal as US_GALLON, inch as INCH  # noqa: E402
from _units import lb as POUND, lbf as POUND_FORCE  # noqa: E402
KGF = 9.80665             # kilogram-force -> N, exact

EXACT = 1e-15
PRINTED = 5e-7            # NIST prints these factors to seven digits


# ---------------------------------------------------------------------------
# the trade's notations

# (text, kind, default unit, expected SI value). Expected values are built from
# the exact NIST SP 811 B.8 definitions of the inch, foot, pound and gallon;
# the notations themselves (pipe fractions, feet-and-inches marks) are common
# practice, no source.
NOTATIONS = [
    ("9-5/8 in", "diameter", None, 9.625 * INCH),
    ("13 3/8 in", "diameter", None, 13.375 * INCH),
    ("5/8 in", "diameter", None, 0.625 * INCH),
    ("9-5/8\"", "diameter", None, 9.625 * INCH),
    ("10-3/4", "diameter", "in", 10.75 * INCH),
    ("20 ft 6 in", "length", None, 20 * FOOT + 6 * INCH),
    ("20' 6\"", "length", None, 20 * FOOT + 6 * INCH),
    ("20'6\"", "length", None, 20 * FOOT + 6 * INCH),
    ("20 ft 6-1/2 in", "length", None, 20 * FOOT + 6.5 * INCH),
    ("6\"", "length", None, 6 * INCH),
    ("20'", "length", None, 20 * FOOT),
    ("1200 ft", "length", None, 1200 * FOOT),
    ("1200ft", "length", None, 1200 * FOOT),
    ("365 m", "length", None, 365.0),
    ("244.5 mm", "diameter", None, 0.2445),
    ("40.5", "length", "ft", 40.5 * FOOT),
    (40.5, "length", "ft", 40.5 * FOOT),
    (40, "length", "m", 40.0),
    ("1.2e3 ft", "length", None, 1200 * FOOT),
    ("9.2 ppg", "density", None, 9.2 * POUND / US_GALLON),
    ("9.2 lb/gal", "density", None, 9.2 * POUND / US_GALLON),
    ("1100 kg/m3", "density", None, 1100.0),
    ("1100 kg/m^3", "density", None, 1100.0),
    # SG: the project's stated reference density, 999.972 kg/m^3 (rigplan.files.units)
    ("1.10 SG", "density", None, 1.10 * 999.972),
    ("150 psi", "pressure", None, 150 * POUND_FORCE / INCH ** 2),
    ("1000 kPa", "pressure", None, 1.0e6),
    ("35 ksi", "stress", None, 35e3 * POUND_FORCE / INCH ** 2),
    ("240 MPa", "stress", None, 240e6),
    ("40000 lbf", "force", None, 40000 * POUND_FORCE),
    ("180 kN", "force", None, 180e3),
    ("18 daN", "force", None, 180.0),
    ("18 tf", "force", None, 18000 * KGF),
    ("18 tonne-force", "force", None, 18000 * KGF),
    ("40 kip", "force", None, 40000 * POUND_FORCE),
    # a mass for a force: its weight under standard gravity (common practice, no source)
    ("20 tonne", "force", None, 20000 * G_N),
    # NIST SP 811 (2008) B.8: ton, metric = 1000 kg (exact); ton, short = 2000 lb
    # (exact, 907.1847 kg); ton-force (2000 lbf) = 8.896443 kN
    ("20 tonnes", "force", None, 20000 * G_N),
    ("20 US ton", "force", None, 20 * 2000 * POUND_FORCE),
    ("20 short ton", "force", None, 20 * 2000 * POUND_FORCE),
    ("20 short tons", "force", None, 20 * 2000 * POUND_FORCE),
    ("20 U.S. tons", "force", None, 20 * 2000 * POUND_FORCE),
    ("40000 lb", "force", None, 40000 * POUND_FORCE),
    # lb/ft is a mass per length: times g for a weight per length
    ("36 lb/ft", "linear_weight", None, 36 * POUND * G_N / FOOT),
    ("36 lbf/ft", "linear_weight", None, 36 * POUND_FORCE / FOOT),
    ("53.6 kg/m", "linear_weight", None, 53.6 * G_N),
    ("36 lb/ft", "mass_per_length", None, 36 * POUND / FOOT),
    ("36", "linear_weight", "lb/ft", 36 * POUND * G_N / FOOT),
    ("10 gal", "volume", None, 10 * US_GALLON),
    ("10 US gal", "volume", None, 10 * US_GALLON),
    # the petroleum barrel: 42 US gallons (NIST SP 811 B.8, barrel [for petroleum])
    ("10 bbl", "volume", None, 420 * US_GALLON),
    ("1600 L", "volume", None, 1.6),
    ("3 ft3", "volume", None, 3 * FOOT ** 3),
    ("0.85", "dimensionless", None, 0.85),
    ("85 %", "dimensionless", None, 0.85),
    (0.85, "dimensionless", None, 0.85),
    ("-0.5 m", "length", None, -0.5),
    # typographic marks and vulgar fractions as word processors write them
    ("9\u215d in", "diameter", None, 9.625 * INCH),
    ("\u215d in", "diameter", None, 0.625 * INCH),
    ("20\u2032 6\u2033", "length", None, 20 * FOOT + 6 * INCH),
    ("20\u2019 6\u00bd\u201d", "length", None, 20 * FOOT + 6.5 * INCH),
]


def test_short_ton_and_tonne_force_against_nist_printed_factors():
    """NIST SP 811 (2008) B.8: ton-force (2000 lbf) -> 8.896443 kN;
    kilogram-force -> 9.80665 N, so the tonne-force is 9.80665 kN."""
    assert_allclose(units.parse("1 short ton", "force"), 8.896443e3, rtol=PRINTED)
    assert_allclose(units.parse("1 tf", "force"), 9.80665e3, rtol=EXACT)
    assert_allclose(units.parse("1 tonne", "force"), 9.80665e3, rtol=EXACT)


@pytest.mark.parametrize("text", ["150 t", "150 ton", "150 tons", "150t", "1 t/m"])
def test_bare_ton_is_refused_as_ambiguous(text):
    """A bare t/ton is the tonne to some and the 2000 lb short ton to others
    (10 % apart, NIST SP 811 B.8): refused in one line asking which."""
    with pytest.raises(InputError) as err:
        units.parse(text, "force", None, "rig.toml: path[1].tool[1].rating")
    msg = str(err.value)
    assert "\n" not in msg and "rig.toml: path[1].tool[1].rating" in msg
    assert "ambiguous" in msg and "tonne" in msg and "short ton" in msg


@pytest.mark.parametrize("text", ["20 ft 13 in", "20' 12\"", "20 ft 12-1/2 in"])
def test_feet_and_inches_refuse_twelve_inches_or_more(text):
    """Feet-and-inches: the inches are below 12 (12 in = 1 ft, NIST SP 811
    B.8); 13 in is a slip, refused in one line naming the field."""
    with pytest.raises(InputError) as err:
        units.parse(text, "length", "ft", "job.tally.csv: row 3, length")
    assert "job.tally.csv: row 3, length" in str(err.value) and "under 12" in str(err.value)
    assert_allclose(units.parse("20 ft 11-7/8 in", "length"), 20 * FOOT + 11.875 * INCH,
                    rtol=EXACT)


@pytest.mark.parametrize("text, kind, default, expected", NOTATIONS)
def test_parse_notations(text, kind, default, expected):
    assert_allclose(units.parse(text, kind, default, "f.toml: k"), expected, rtol=1e-14, atol=0)


def test_pint_alone_misreads_the_notations_we_handle():
    """The notations above are ones pint reads wrongly on its own (the
    reason they are parsed first): a decimal comma is dropped, a pipe
    fraction is subtracted, feet-and-inches multiply."""
    ureg = units.registry()
    assert ureg.Quantity("1,5 ft").magnitude == 15
    q = ureg.Quantity("5 ft 6 in")
    assert "foot" in str(q.units) and "inch" in str(q.units)


# ---------------------------------------------------------------------------
# refusals


@pytest.mark.parametrize("text, fix", [
    ("1,5", "'1.5'"),
    ("1,5 m", "'1.5 m'"),
    (",5 m", "'.5 m'"),
])
def test_decimal_comma_refused(text, fix):
    with pytest.raises(InputError) as err:
        units.parse(text, "length", "m", "strings/a.toml: section[2].joint_length")
    msg = str(err.value)
    assert msg.startswith("strings/a.toml: section[2].joint_length: ")
    assert "decimal comma" in msg and fix in msg


@pytest.mark.parametrize("text, fix", [("1,200 ft", "'1200 ft'"), ("1,500", "'1500'"),
                                       ("12,000,000 lbf", "'12000000 lbf'")])
def test_thousands_separator_refused(text, fix):
    with pytest.raises(InputError) as err:
        units.parse(text, "force" if "lbf" in text else "length", "ft", "w")
    assert fix in str(err.value) and "comma" in str(err.value)


def test_space_thousands_refused():
    with pytest.raises(InputError, match="'1000 ft'"):
        units.parse("1 000 ft", "length", "ft", "w")


def test_wrong_dimension_message():
    with pytest.raises(InputError) as err:
        units.parse("9.2 ppg", "length", "ft", "strings/x.toml: section[2].wall")
    assert str(err.value) == ("strings/x.toml: section[2].wall: expected a length "
                              "(e.g. 1200 ft or 365 m), got 9.2 ppg")


@pytest.mark.parametrize("value, kind, default, fragment", [
    ("12 furlongz", "length", "ft", "unknown unit 'furlongz'"),
    ("5 ft-lb", "force", "lbf", "unknown unit"),
    ("", "length", "ft", "empty"),
    ("   ", "length", "ft", "empty"),
    ("nan", "length", "ft", "expected a length"),
    (float("nan"), "length", "ft", "expected a length"),
    (float("inf"), "force", "lbf", "expected a force"),
    (True, "length", "ft", "expected a length"),
    ([1, 2], "length", "ft", "expected a length"),
    ("abc", "length", "ft", "expected a length"),
    ("5", "length", None, "give a unit"),
    (5, "length", None, "unit"),
    ("1/0 in", "diameter", None, "zero denominator"),
    ("20 ft 6", "length", "ft", "'20 ft 6 in'"),
    ("20' 6", "length", "ft", "'20 ft 6 in'"),
    ("5 degC", "length", "ft", "expected a length"),
    ("100 psi", "force", "lbf", "expected a force"),
    ("36 lb/ft", "density", "ppg", "expected a density"),
    ("3 m", "volume", "gal", "expected a volume"),
    ("3 m", "dimensionless", None, "expected a plain number"),
])
def test_refusals(value, kind, default, fragment):
    with pytest.raises(InputError) as err:
        units.parse(value, kind, default, "f.toml: key")
    msg = str(err.value)
    assert msg.startswith("f.toml: key: ")
    assert fragment in msg
    assert "\n" not in msg
    assert units.describe(kind).split(" (")[0] in msg or fragment in msg


def test_unknown_kind_is_a_programming_error():
    with pytest.raises(ValueError):
        units.parse("1 m", "lenght", None, "w")


# ---------------------------------------------------------------------------
# SI factors against NIST SP 811 (2008) Appendix B.8


@pytest.mark.parametrize("text, kind, nist, rtol", [
    ("1 ft", "length", 3.048e-1, EXACT),                   # foot, exact
    ("1 in", "length", 2.54e-2, EXACT),                    # inch, exact
    ("1 lbf", "force", 4.448222e0, PRINTED),               # pound-force
    ("1 kip", "force", 4.448222e3, PRINTED),               # kip (1 kip = 1000 lbf)
    ("1 kgf", "force", 9.80665e0, EXACT),                  # kilogram-force, exact
    ("1 psi", "pressure", 6.894757e3, PRINTED),            # pound-force per square inch
    ("1 ksi", "stress", 6.894757e6, PRINTED),              # kip per square inch
    ("1 gal", "volume", 3.785412e-3, PRINTED),             # gallon (U.S.)
    ("1 bbl", "volume", 1.589873e-1, PRINTED),             # barrel [for petroleum, 42 gallons (U.S.)]
    ("1 ppg", "density", 1.198264e2, PRINTED),             # pound per gallon (U.S.)
    ("1 lb/ft", "mass_per_length", 1.488164e0, PRINTED),   # pound per foot
    ("1 lbf/ft", "linear_weight", 1.459390e1, PRINTED),    # pound-force per foot
    ("1 lb/ft^3", "density", 1.601846e1, PRINTED),         # pound per cubic foot
    ("1 L", "volume", 1.0e-3, EXACT),                      # liter, exact
    ("1 bar", "pressure", 1.0e5, EXACT),                   # bar, exact
])
def test_si_factors_nist_sp811(text, kind, nist, rtol):
    assert_allclose(units.parse(text, kind, None, "w"), nist, rtol=rtol)


def test_sg_reference_density():
    # Between 1901 and 1964 the litre was the volume of 1 kg of pure water at
    # its maximum density, about 1.000028 dm^3 (NIST SP 811 (2008) B.8 note on
    # the liter, from memory): 1 kg / 1.000028 dm^3 = 999.972 kg/m^3.
    assert_allclose(units.SG_REFERENCE_DENSITY, 1.0 / 1.000028e-3, rtol=1e-6)
    assert_allclose(units.parse("1 SG", "density", None, "w"), units.SG_REFERENCE_DENSITY,
                    rtol=EXACT)


@pytest.mark.parametrize("name, value, nist, rtol", [
    ("FOOT", units.FOOT, 3.048e-1, EXACT),
    ("INCH", units.INCH, 2.54e-2, EXACT),
    ("POUND", units.POUND, 4.5359237e-1, EXACT),
    ("POUND_FORCE", units.POUND_FORCE, 4.4482216152605, EXACT),
    ("PSI", units.PSI, 6.894757e3, PRINTED),
    ("US_GALLON", units.US_GALLON, 3.785411784e-3, EXACT),
    ("BARREL", units.BARREL, 1.589873e-1, PRINTED),
    ("PPG", units.PPG, 1.198264e2, PRINTED),
    ("LB_PER_FT", units.LB_PER_FT, 1.488164e0, PRINTED),
    ("LBF_PER_FT", units.LBF_PER_FT, 1.459390e1, PRINTED),
    ("STANDARD_GRAVITY", units.STANDARD_GRAVITY, 9.80665, EXACT),
])
def test_display_factors_nist_sp811(name, value, nist, rtol):
    assert_allclose(value, nist, rtol=rtol, err_msg=name)


@pytest.mark.parametrize("kind", units.KINDS)
@pytest.mark.parametrize("system", units.SYSTEMS)
def test_display_factor_agrees_with_pint(kind, system):
    """The float display factors and the pint registry give the same SI value."""
    label = units.unit_label(kind, system)
    if not label:
        return
    assert_allclose(units.parse(f"1 {label}", kind, None, "w"),
                    units.display_factor(kind, system), rtol=1e-14)


# ---------------------------------------------------------------------------
# display


def test_unit_labels():
    us = {k: units.unit_label(k, "us") for k in units.KINDS}
    si = {k: units.unit_label(k, "si") for k in units.KINDS}
    assert us == {"length": "ft", "diameter": "in", "density": "ppg", "pressure": "psi",
                  "stress": "psi", "force": "lbf", "linear_weight": "lb/ft",
                  "mass_per_length": "lb/ft", "volume": "gal", "dimensionless": ""}
    assert si == {"length": "m", "diameter": "mm", "density": "kg/m3", "pressure": "kPa",
                  "stress": "MPa", "force": "kN", "linear_weight": "kg/m",
                  "mass_per_length": "kg/m", "volume": "L", "dimensionless": ""}


def test_to_display_values():
    # NIST SP 811 B.8: 1 ft = 0.3048 m exactly, 1 lbf = 4.4482216152605 N exactly
    assert_allclose(units.to_display(365.76, "length", "us"), 1200.0, rtol=EXACT)
    assert_allclose(units.to_display(POUND_FORCE * 1000, "force", "us"), 1000.0, rtol=EXACT)
    assert_allclose(units.to_display(2.0e6, "pressure", "si"), 2000.0, rtol=EXACT)
    # 1 kg/m displayed from its weight per length under standard gravity
    assert_allclose(units.to_display(G_N * 53.6, "linear_weight", "si"), 53.6, rtol=EXACT)
    arr = units.to_display(np.array([0.3048, 0.6096]), "length", "us")
    assert_allclose(arr, [1.0, 2.0], rtol=EXACT)
    assert_allclose(units.from_display(1200.0, "length", "us"), 365.76, rtol=EXACT)


def test_format():
    assert units.format(365.76, "length", "us", 1) == "1200.0 ft"
    assert units.format(365.76, "length", "si") == "365.76 m"
    assert units.format(9.625 * INCH, "diameter", "us") == "9.625 in"
    assert units.format(0.85, "dimensionless", "si", 2) == "0.85"
    assert units.format(float("nan"), "force", "us") == "n/a"
    assert units.format(float("inf"), "force", "us") == "inf lbf"
    assert units.format(-1e-9, "force", "si") == "0.00 kN"


@pytest.mark.parametrize("kind", units.KINDS)
@pytest.mark.parametrize("system", units.SYSTEMS)
@pytest.mark.parametrize("value", [0.0123, 1.0, 987.65, 123456.0])
def test_format_reads_back(kind, system, value):
    """What is displayed reads back with parse (no thousands separators)."""
    text = units.format(value, kind, system, digits=9)
    assert "," not in text
    # 9 decimals of the display unit: resolution 1e-9 display units
    resolution = 1e-9 * units.display_factor(kind, system)
    assert_allclose(units.parse(text, kind, None, "w"), value, rtol=1e-12, atol=resolution)


def test_default_units_are_the_display_units():
    for system in units.SYSTEMS:
        d = units.default_units(system)
        assert d == {k: units.unit_label(k, system) for k in units.KINDS}
    with pytest.raises(ValueError):
        units.default_units("imperial")
    with pytest.raises(ValueError):
        units.unit_label("length", "metric")


def test_import_is_cheap():
    """Importing rigplan.files.units does not import pint (the registry is built on use)."""
    code = "import sys, rigplan.files.units; print('pint' in sys.modules)"
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=True, cwd=str(__import__('pathlib').Path(__file__).parents[1]))
    assert out.stdout.strip() == "False"


def test_registry_built_once():
    assert units.registry() is units.registry()


def test_hydrostatic_gradient_from_parsed_units():
    """Fresh water 8.33 lb/gal gives about 0.433 psi/ft (oilfield rule
    0.052 psi/ft per lb/gal; string mechanics (ADE 1986), Hydrostatics)."""
    rho = units.parse("8.33 ppg", "density", None, "w")
    grad = rho * G_N * units.parse("1 ft", "length", None, "w") / units.parse("1 psi", "pressure", None, "w")
    assert_allclose(grad, 0.433, atol=5e-4)
    assert math.isclose(grad / 8.33, 0.051948, rel_tol=1e-4)


# -- values that overflow, are not finite, or are too long to be a quantity ----


@pytest.mark.parametrize("value, kind, unit", [
    ("1e308 psi", "pressure", None),          # finite text, infinite once in Pa
    ("1e400 ft", "length", None),
    ("-1e308 lbf", "force", None),
    (10 ** 400, "force", "lbf"),              # TOML integer too large for a float
    ("1" + "0" * 400 + " ft", "length", None),
    ("1" + "0" * 400 + "/3 in", "diameter", None),
    ("nan ppg", "density", None),
    (float("inf"), "length", "ft"),
])
def test_overflow_and_non_finite_are_one_line_input_errors(value, kind, unit):
    # Common practice, no source: a number that is not finite in SI is no quantity.
    with pytest.raises(InputError) as err:
        units.parse(value, kind, unit, "f.toml: key")
    text = str(err.value)
    assert text.startswith("f.toml: key: ") and "\n" not in text and len(text) < 400


def test_a_text_longer_than_any_quantity_is_refused_before_it_is_read():
    from rigplan.files.units import MAX_TEXT
    with pytest.raises(InputError) as err:
        units.parse("1" + " " * 300 + "ft", "length", None, "where")
    assert f"at most {MAX_TEXT}" in str(err.value)
    with pytest.raises(InputError) as err:
        units.parse("x" * 200_000, "length", "ft", "where")
    assert len(str(err.value)) < 300
