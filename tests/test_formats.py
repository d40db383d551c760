"""Tests for the file formats: rig profiles, string plans, tallies and user
material files; the bundled demo data.

Expected SI values are built from the exact unit definitions of NIST SP 811
(2008) Appendix B.8 (inch 0.0254 m, foot 0.3048 m, pound 0.45359237 kg,
standard gravity 9.80665 m/s^2, US gallon 231 in^3).  Every bad input must
give one line naming the file, the key (or row) and what was expected.
"""

from __future__ import annotations

import math
import re
import textwrap
import tomllib
from dataclasses import fields
from pathlib import Path

import pytest
from numpy.testing import assert_allclose

from rigplan.files import formats
from rigplan.errors import InputError
from rigplan.files.formats import (dump_toml, parse_plan, read_materials, read_plan, read_rig,
                             read_tally, write_plan, write_tally)
from rigplan.files.formats.rigfile import parse_rig
from rigplan.files.formats.tally import TallyRow, parse_tally, tally_from_plan
from rigplan.engine.stringmodel import StringPlan

ROOT = Path(__file__).resolve().parents[1]
RIGS = sorted((ROOT / "rigs").glob("*.toml"))
PLANS = sorted((ROOT / "strings").glob("*.toml"))

# NIST SP 811 (2008) B.8, exact
from _units import ft as FOOT, g_n as G_N, inch as INCH, lb as POUND, lbf as LBF  # noqa: F401
from _units import ppg as PPG, psi as PSI  # NIST SP 811


# ---------------------------------------------------------------------------
# helpers


def _close(a, b, rtol=1e-11):
    """Deep comparison of plan objects with a float tolerance (nan == nan)."""
    if isinstance(a, float) or isinstance(b, float):
        if a is None or b is None:
            return a is b
        if math.isnan(a) or math.isnan(b):
            return math.isnan(a) and math.isnan(b)
        return math.isclose(a, b, rel_tol=rtol, abs_tol=1e-12)
    if isinstance(a, tuple) and isinstance(b, tuple):
        return len(a) == len(b) and all(_close(x, y, rtol) for x, y in zip(a, b))
    if hasattr(a, "__dataclass_fields__"):
        if type(a) is not type(b):
            return False
        return all(_close(getattr(a, f.name), getattr(b, f.name), rtol)
                   for f in fields(a) if f.name != "source")
    return a == b


MINIMAL = """
units = "us"
name = "t"
[hole]
fluid_density = "9.0 ppg"
depth = "500 ft"
[[section]]
kind = "blank"
material = "a53b"
od = "8-5/8 in"
wall = "0.250 in"
joint_length = "20 ft"
count = 10
"""


def error_of(text: str, source: str = "strings/x.toml", base_dir=".") -> str:
    with pytest.raises(InputError) as err:
        parse_plan(text, source, base_dir)
    msg = str(err.value)
    assert "\n" not in msg, msg
    return msg


# ---------------------------------------------------------------------------
# string plans: reading


def test_minimal_plan_values():
    r = parse_plan(MINIMAL, "strings/t.toml")
    p = r.plan
    assert isinstance(p, StringPlan) and r.units == "us" and r.warnings == ()
    assert len(p.joints) == 10
    assert [j.label for j in p.joints] == [f"J{i}" for i in range(1, 11)]
    j = p.joints[0]
    assert_allclose([j.od, j.wall, j.length], [8.625 * INCH, 0.25 * INCH, 20 * FOOT], rtol=1e-14)
    assert_allclose(p.hole.fluid_density, 9.0 * PPG, rtol=1e-14)
    assert_allclose(p.hole.depth, 500 * FOOT, rtol=1e-14)
    assert math.isnan(p.hole.diameter) and p.hole.fluid_level == 0.0
    assert p.closure.is_open
    assert p.settings.float_collar_positions == (1, 2, 3)


def test_bare_numbers_follow_the_file_units():
    us = parse_plan(MINIMAL.replace('"8-5/8 in"', "8.625").replace('"20 ft"', "20"),
                    "t.toml").plan
    assert_allclose(us.joints[0].od, 8.625 * INCH, rtol=1e-14)
    assert_allclose(us.joints[0].length, 20 * FOOT, rtol=1e-14)
    si = parse_plan(MINIMAL.replace('units = "us"', 'units = "si"')
                    .replace('"8-5/8 in"', "219.075").replace('"20 ft"', "6.1"), "t.toml").plan
    assert_allclose(si.joints[0].od, 0.219075, rtol=1e-14)      # mm
    assert_allclose(si.joints[0].length, 6.1, rtol=1e-14)       # m


def test_sections_expand_bottom_first():
    text = MINIMAL + textwrap.dedent("""
    [[section]]
    kind = "screen"
    material = "ss304"
    od = "8-5/8 in"
    wall = "0.188 in"
    joint_length = "10 ft"
    count = 2
    collapse_rating = "150 psi"
    tensile_rating = "unrated"
    connection = "threaded_coupled"
    connection_rating = "60000 lbf"
    weight_per_length = "18 lb/ft"
    """)
    p = parse_plan(text, "t.toml").plan
    assert [j.kind for j in p.joints] == ["blank"] * 10 + ["screen"] * 2
    s = p.joints[11]
    assert s.label == "J12"
    assert_allclose(s.collapse_rating, 150 * PSI, rtol=1e-14)
    assert s.tensile_rating is None                   # "unrated" = not entered
    assert_allclose(s.connection_rating, 60000 * LBF, rtol=1e-14)
    assert_allclose(s.weight_per_length, 18 * POUND * G_N / FOOT, rtol=1e-14)


def test_joint_by_joint_and_float_collar_by_label():
    text = textwrap.dedent("""
    name = "jbj"
    [hole]
    fluid_density = "1150 kg/m3"
    [[joint]]
    label = "S1"
    kind = "shoe"
    material = "a53b"
    od = "406.4 mm"
    wall = "9.53 mm"
    length = "6 m"
    [[joint]]
    label = "S2"
    material = "a53b"
    od = "406.4 mm"
    wall = "9.53 mm"
    length = "6 m"
    measured_length = "6.02 m"
    rejected = true
    [[joint]]
    label = "S3"
    material = "a53b"
    od = "406.4 mm"
    wall = "9.53 mm"
    length = "6 m"
    [float_equipment]
    type = "float_collar"
    collar_joint = "S3"
    valve_rating = "10 MPa"
    """)
    p = parse_plan(text, "t.toml").plan
    assert [j.label for j in p.joints] == ["S1", "S2", "S3"]
    assert p.joints[1].rejected and p.joints[1].measured_length == 6.02
    # S2 is rejected: S3 is the second joint that runs
    assert p.closure.valve_joint == 2
    assert_allclose(p.closure.valve_rating, 10e6, rtol=1e-14)


def test_float_shoe_and_settings():
    p = parse_plan(MINIMAL + textwrap.dedent("""
    [float_equipment]
    type = "float_shoe"
    [running]
    fill_density = "8.34 ppg"
    fill_alternatives = ["9.0 ppg", "1.2 SG"]
    min_running_weight = "1000 lbf"
    set_down_weight = "2 tf"
    collar_candidates = [2, 4]
    [design_factors]
    tension = 1.8
    collapse = "112.5 %"
    [grout]
    density = "15.6 ppg"
    height = "60 ft"
    """), "t.toml").plan
    assert p.closure.valve_joint == 0 and math.isnan(p.closure.valve_rating)
    s = p.settings
    assert_allclose(s.fill_density, 8.34 * PPG, rtol=1e-14)
    assert_allclose(s.fill_density_alternatives, [9.0 * PPG, 1.2 * 999.972], rtol=1e-14)
    assert_allclose(s.min_running_weight, 1000 * LBF, rtol=1e-14)
    assert_allclose(s.set_down_weight, 2000 * G_N, rtol=1e-14)
    assert s.float_collar_positions == (2, 4)
    assert_allclose([s.design.tension, s.design.collapse, s.design.burst], [1.8, 1.125, 1.1],
                    rtol=1e-14)
    assert_allclose(p.grout.height, 60 * FOOT, rtol=1e-14)
    assert_allclose(p.grout.inside_density, 998.2, rtol=1e-14)


def test_default_collar_candidates_fit_a_short_string():
    p = parse_plan(MINIMAL.replace("count = 10", "count = 2"), "t.toml").plan
    assert p.settings.float_collar_positions == (1, 2)


# ---------------------------------------------------------------------------
# warnings (accepted input)


def test_grout_lighter_than_hole_fluid_is_a_warning():
    r = parse_plan(MINIMAL + '[grout]\ndensity = "8.6 ppg"\nheight = "50 ft"\n', "strings/g.toml")
    assert r.plan.grout is not None
    assert len(r.warnings) == 1
    assert r.warnings[0].startswith("strings/g.toml: grout.density: grout is lighter")


def test_other_warnings():
    r = parse_plan(MINIMAL.replace('depth = "500 ft"', 'depth = "15 ft"\ndiameter = "8 in"')
                   .replace('kind = "blank"', 'kind = "float_shoe"')
                   .replace("count = 10", "count = 1"), "t.toml")
    text = " | ".join(r.warnings)
    assert "longer than the hole" in text
    assert "not less than the hole diameter" in text
    assert "no [float_equipment]" in text


def test_design_factor_below_one_is_refused():
    # A design factor below 1 lets a check pass loads above the rating
    # (rigplan.files.ranges: design_factor, 1 to 10; common practice, no source).
    with pytest.raises(InputError) as err:
        parse_plan(MINIMAL + "[design_factors]\ntension = 0.9\n", "t.toml")
    assert str(err.value) == ("t.toml: design_factors.tension: expected a design factor "
                              "between 1 and 10 [-], got 0.9")


# ---------------------------------------------------------------------------
# bad input: every case one line naming file, key and what was expected


BAD_PLANS = [
    # (description, text, file: key, fragment of what was expected)
    ("wall over half the od", MINIMAL.replace('wall = "0.250 in"', 'wall = "5 in"'),
     "strings/x.toml: section[1].wall", "less than half the od"),
    ("wall equal to half the od", MINIMAL.replace('wall = "0.250 in"', 'wall = "4-5/16 in"'),
     "strings/x.toml: section[1].wall", "expected a wall thickness less than 4.312 in"),
    ("negative length", MINIMAL.replace('"20 ft"', '"-20 ft"'),
     "strings/x.toml: section[1].joint_length", "a length (e.g. 1200 ft or 365 m) greater than zero"),
    ("zero length", MINIMAL.replace('"20 ft"', "0"),
     "strings/x.toml: section[1].joint_length", "greater than zero"),
    ("zero density", MINIMAL.replace('"9.0 ppg"', '"0 ppg"'),
     "strings/x.toml: hole.fluid_density", "a density"),
    ("negative density", MINIMAL.replace('"9.0 ppg"', '"-9 ppg"'),
     "strings/x.toml: hole.fluid_density", "greater than zero"),
    ("implausible density (unit slip)", MINIMAL.replace('"9.0 ppg"', "1100"),
     "strings/x.toml: hole.fluid_density", "(600 to 3,000 kg/m3)"),
    ("ellipticity 1", MINIMAL + "ellipticity = 1.0\n",
     "strings/x.toml: section[1].ellipticity", "in [0, 1) [-]"),
    ("ellipticity negative", MINIMAL + "ellipticity = -0.01\n",
     "strings/x.toml: section[1].ellipticity", "in [0, 1) [-]"),
    ("unknown material", MINIMAL.replace('"a53b"', '"a53c"'),
     "strings/x.toml: section[1].material", "known: a53b"),
    ("unknown unit", MINIMAL.replace('"20 ft"', '"20 fathomz"'),
     "strings/x.toml: section[1].joint_length", "unknown unit 'fathomz'"),
    ("wrong dimension", MINIMAL.replace('"20 ft"', '"9.2 ppg"'),
     "strings/x.toml: section[1].joint_length", "expected a length (e.g. 1200 ft or 365 m), got 9.2 ppg"),
    ("decimal comma", MINIMAL.replace('"20 ft"', '"20,5 ft"'),
     "strings/x.toml: section[1].joint_length", "write '20.5 ft'"),
    ("thousands separator", MINIMAL.replace('"500 ft"', '"1,200 ft"'),
     "strings/x.toml: hole.depth", "write '1200 ft'"),
    ("unknown kind", MINIMAL.replace('"blank"', '"blnk"'),
     "strings/x.toml: section[1].kind", "expected one of blank, screen"),
    ("unknown connection", MINIMAL + 'connection = "welded"\n',
     "strings/x.toml: section[1].connection", "expected one of butt_weld"),
    ("unknown key", MINIMAL + 'wal = "0.3 in"\n',
     "strings/x.toml: section[1].wal", "unknown key (did you mean 'wall'?)"),
    ("missing od", MINIMAL.replace('od = "8-5/8 in"\n', ""),
     "strings/x.toml: section[1].od", "required: a diameter"),
    ("count not whole", MINIMAL.replace("count = 10", "count = 2.5"),
     "strings/x.toml: section[1].count", "a whole number of joints"),
    ("count zero", MINIMAL.replace("count = 10", "count = 0"),
     "strings/x.toml: section[1].count", ">= 1"),
    ("no hole", MINIMAL.replace("[hole]", "[hol]"),
     "strings/x.toml: hol", "unknown key"),
    ("float collar below the shoe", MINIMAL + '[float_equipment]\ntype = "float_collar"\ncollar_joint = 0\n',
     "strings/x.toml: float_equipment.collar_joint", "float collar placed below the shoe or above the top"),
    ("float collar above the top", MINIMAL + '[float_equipment]\ntype = "float_collar"\ncollar_joint = 11\n',
     "strings/x.toml: float_equipment.collar_joint", "expected a joint 1..10"),
    ("float collar unknown label", MINIMAL + '[float_equipment]\ntype = "float_collar"\ncollar_joint = "J99"\n',
     "strings/x.toml: float_equipment.collar_joint", "float collar placed below the shoe or above the top"),
    ("float collar missing joint", MINIMAL + '[float_equipment]\ntype = "float_collar"\n',
     "strings/x.toml: float_equipment.collar_joint", "required"),
    ("unknown float type", MINIMAL + '[float_equipment]\ntype = "float_sub"\n',
     "strings/x.toml: float_equipment.type", "none, float_shoe, float_collar"),
    ("collar candidate out of range", MINIMAL + "[running]\ncollar_candidates = [1, 12]\n",
     "strings/x.toml: running.collar_candidates[2]", "float collar placed below the shoe"),
    ("grout inside level below the shoe",
     MINIMAL + '[grout]\ndensity = "15 ppg"\nheight = "50 ft"\ninside_level = "250 ft"\n',
     "strings/x.toml: grout.inside_level", "fill level outside the pipe"),
    ("grout taller than the string", MINIMAL + '[grout]\ndensity = "15 ppg"\nheight = "300 ft"\n',
     "strings/x.toml: grout.height", "taller than the string"),
    ("grout density missing", MINIMAL + '[grout]\nheight = "30 ft"\n',
     "strings/x.toml: grout.density", "required: a density"),
    ("fluid level below the hole", MINIMAL.replace('depth = "500 ft"', 'depth = "500 ft"\nfluid_level = "600 ft"'),
     "strings/x.toml: hole.fluid_level", "below the bottom of the hole"),
    ("weld efficiency over 1", MINIMAL + "weld_efficiency = 1.2\n",
     "strings/x.toml: section[1].weld_efficiency", "(0, 1]"),
    ("both sections and joints", MINIMAL + '[[joint]]\nmaterial = "a53b"\n',
     "strings/x.toml: joint", "not both"),
    ("no string", MINIMAL.split("[[section]]")[0],
     "strings/x.toml: section", "required: the string"),
    ("bore not below od", MINIMAL + 'bore = "9 in"\n',
     "strings/x.toml: section[1].bore", "not smaller than the od"),
    ("dmax without dmin", MINIMAL + 'dmax = "8.7 in"\n',
     "strings/x.toml: section[1].dmin", "required with dmax"),
    ("text where a number goes", MINIMAL.replace("count = 10", 'count = "ten"'),
     "strings/x.toml: section[1].count", "a whole number"),
    ("units system", 'units = "metric"\n' + MINIMAL.replace('units = "us"\n', ""),
     "strings/x.toml: units", "\"si\" or \"us\""),
    ("version", "version = 7\n" + MINIMAL,
     "strings/x.toml: version", "version 1"),
    ("toml syntax", MINIMAL + "od = = 3\n",
     "strings/x.toml", "not valid TOML"),
]


@pytest.mark.parametrize("desc, text, where, fragment", BAD_PLANS, ids=[c[0] for c in BAD_PLANS])
def test_bad_plan_input(desc, text, where, fragment):
    msg = error_of(text)
    assert msg.startswith(where + ":") or msg.startswith(where + " "), msg
    assert fragment in msg, msg


def test_unknown_material_lists_known_keys():
    msg = error_of(MINIMAL.replace('"a53b"', '"unobtainium"'))
    for key in ("a53b", "ss304", "j55", "pvc"):
        assert key in msg


# ---------------------------------------------------------------------------
# tally


TALLY = """\
# tally of a test string
label,measured_length [ft],kind,status,note,measured_wall [in]
J1,20.10,blank,run,first,
J2,20 ft 1-1/2 in,,run,"with, a comma",0.245
J3,,blank,rejected,dented,
"""


def test_tally_parse():
    rows = parse_tally(TALLY, "t.csv")
    assert [r.label for r in rows] == ["J1", "J2", "J3"]
    assert [r.row for r in rows] == [3, 4, 5]        # line numbers in the file
    assert_allclose(rows[0].measured_length, 20.10 * FOOT, rtol=1e-14)
    assert_allclose(rows[1].measured_length, 20 * FOOT + 1.5 * INCH, rtol=1e-14)
    assert rows[1].kind is None and rows[1].note == "with, a comma"
    assert_allclose(rows[1].measured_wall, 0.245 * INCH, rtol=1e-14)
    assert rows[2].measured_length is None and rows[2].status == "rejected"


def test_tally_round_trip(tmp_path):
    rows = parse_tally(TALLY, "t.csv")
    for system in ("us", "si"):
        path = tmp_path / f"t-{system}.csv"
        write_tally(rows, path, system, comment="round trip")
        back = read_tally(path)
        assert _close(tuple(back), tuple(rows))


@pytest.mark.parametrize("line, where, fragment", [
    ("J9,20 ppg,blank,run,", "t.csv: row 3, measured_length", "expected a length (e.g. 1200 ft or 365 m), got 20 ppg"),
    ("J9,-2,blank,run,", "t.csv: row 3, measured_length", "between 0.3281 and 98.43 ft"),
    ('J9,"20,5",blank,run,', "t.csv: row 3, measured_length", "write '20.5'"),
    ("J9,20,5,blank,run,", "t.csv: row 3", "a decimal comma? write 20.5"),
    ("J9,20,blnk,run,", "t.csv: row 3, kind", "expected one of blank"),
    ("J9,20,blank,lost,", "t.csv: row 3, status", "expected run or rejected"),
    (",20,blank,run,", "t.csv: row 3, label", "expected a joint label"),
    ("J1,20,blank,run,", "t.csv: row 3, label", "already listed in row 2"),
])
def test_tally_bad_rows(line, where, fragment):
    text = "label,measured_length [ft],kind,status,note\nJ1,20,blank,run,\n" + line + "\n"
    with pytest.raises(InputError) as err:
        parse_tally(text, "t.csv")
    msg = str(err.value)
    assert msg.startswith(where + ":"), msg
    assert fragment in msg and "\n" not in msg


def test_tally_row_7_message():
    """A bad value in row 7: 'file.csv: row 7, measured_length: expected a length ...'."""
    lines = ["label,measured_length [ft],kind,status,note"] + [f"J{i},20,blank,run," for i in range(1, 6)]
    lines.append("J6,9.2 ppg,blank,run,")
    with pytest.raises(InputError) as err:
        parse_tally("\n".join(lines) + "\n", "file.csv")
    assert str(err.value).startswith("file.csv: row 7, measured_length: expected a length")


@pytest.mark.parametrize("header, fragment", [
    ("label,length,kind", "unknown column 'length'"),
    ("label,measured_length [ppg]", "header unit [ppg]"),
    ("label,note [ft]", "takes no unit"),
    ("measured_length [ft],kind", "needs a 'label' column"),
    ("label,kind,kind", "appears twice"),
])
def test_tally_bad_header(header, fragment):
    with pytest.raises(InputError) as err:
        parse_tally(header + "\nJ1,blank\n", "t.csv")
    assert str(err.value).startswith("t.csv: row 1") and fragment in str(err.value)


def test_tally_without_header_unit_needs_units_in_values():
    rows = parse_tally("label,measured_length\nJ1,6.1 m\n", "t.csv")
    assert_allclose(rows[0].measured_length, 6.1, rtol=1e-14)
    with pytest.raises(InputError, match="t.csv: row 2, measured_length: give a unit"):
        parse_tally("label,measured_length\nJ1,6.1\n", "t.csv")


def test_tally_applied_to_plan(tmp_path):
    (tmp_path / "t.csv").write_text("label,measured_length [m],status\nJ1,6.11,run\nJ3,,rejected\n")
    (tmp_path / "p.toml").write_text('tally = "t.csv"\n' + MINIMAL)
    r = read_plan(tmp_path / "p.toml")
    j = r.plan.joints
    assert r.tally_path == tmp_path / "t.csv"
    assert j[0].measured_length == 6.11 and j[1].measured_length is None
    assert j[2].rejected and len(r.plan.running_joints()) == 9


def test_tally_errors_in_plan(tmp_path):
    (tmp_path / "t.csv").write_text("label,measured_length [m],kind\nJ1,6.11,blank\nJ2,6.1,screen\n")
    (tmp_path / "p.toml").write_text('tally = "t.csv"\n' + MINIMAL)
    with pytest.raises(InputError) as err:
        read_plan(tmp_path / "p.toml")
    assert str(err.value).startswith(f"{tmp_path / 't.csv'}: row 3, kind: the tally says 'screen'")
    (tmp_path / "t.csv").write_text("label,measured_length [m]\nJ11,6.11\n")
    with pytest.raises(InputError, match=r"row 2, label: joint 'J11' is not in the plan \(J1..J10\)"):
        read_plan(tmp_path / "p.toml")
    (tmp_path / "p.toml").write_text('tally = "missing.csv"\n' + MINIMAL)
    with pytest.raises(InputError, match=r"p.toml: tally: tally file .* not found"):
        read_plan(tmp_path / "p.toml")


def test_tally_rows_made_in_code(tmp_path):
    rows = [TallyRow("J1", measured_length=6.1, kind="blank", note="n"),
            TallyRow("J2", status="rejected")]
    write_tally(rows, tmp_path / "t.csv", "si")
    assert read_tally(tmp_path / "t.csv") == rows          # row numbers are not compared
    assert (tmp_path / "t.csv").read_text().splitlines()[0] == (
        "label,measured_length [m],kind,status,note,measured_wall [mm]")


def test_formats_package_exports():
    assert formats.read_plan is read_plan and formats.TallyRow is TallyRow
    with pytest.raises(AttributeError):
        formats.read_everything


def test_tally_from_plan():
    p = parse_plan(MINIMAL, "t.toml").plan
    rows = tally_from_plan(p)
    assert [r.label for r in rows] == [j.label for j in p.joints]
    assert all(r.measured_length is None and r.status == "run" for r in rows)


# ---------------------------------------------------------------------------
# writing plans


@pytest.mark.parametrize("plan_file", PLANS, ids=[p.name for p in PLANS])
@pytest.mark.parametrize("system", ["si", "us"])
def test_plan_round_trip(plan_file, system, tmp_path):
    """read -> write -> read gives the same plan (to 12 significant digits)."""
    first = read_plan(plan_file).plan
    out = tmp_path / "out.toml"
    write_plan(first, out, system)
    second = read_plan(out).plan
    assert _close(first, second), plan_file
    # and once more: the written file is stable
    write_plan(second, tmp_path / "again.toml", system)
    assert (tmp_path / "again.toml").read_text() == out.read_text()


def test_written_plan_groups_sections_and_keeps_tally_data(tmp_path):
    p = parse_plan(MINIMAL, "t.toml").plan
    write_plan(p, tmp_path / "a.toml", "us")
    doc = tomllib.loads((tmp_path / "a.toml").read_text())
    assert len(doc["section"]) == 1 and doc["section"][0]["count"] == 10
    assert doc["section"][0]["od"] == "8.625 in"
    tallied = read_plan(ROOT / "strings" / "cv3-8in-a53b.toml").plan
    write_plan(tallied, tmp_path / "b.toml", "us")
    doc = tomllib.loads((tmp_path / "b.toml").read_text())
    assert "tally" not in doc and len(doc["joint"]) == len(tallied.joints)
    assert any(j.get("rejected") for j in doc["joint"])


def test_write_plan_replaces_existing_file(tmp_path):
    path = tmp_path / "p.toml"
    path.write_text("old content")
    write_plan(parse_plan(MINIMAL, "t.toml").plan, path)
    assert path.read_text().startswith("# rigplan string plan")
    assert [f.name for f in tmp_path.iterdir()] == ["p.toml"]     # no temporary left


def test_dump_toml_reads_back():
    doc = {"name": 'a "quoted"\\ name\nsecond line\ttab \u00e9 \x01',
           "n": 3, "x": 0.1, "flag": True, "list": ["1 ft", "2 ft"], "nums": [1, 2],
           "t": {"k": "v", "sub": {"deep": 1}},
           "arr": [{"a": 1, "tool": [{"b": 2}, {"b": 3}]}, {"a": 4}],
           "odd key": 1}
    assert tomllib.loads(dump_toml(doc, header="h1\nh2")) == doc


# ---------------------------------------------------------------------------
# rig profiles


RIG = """
units = "us"
name = "test rig"
[[path]]
name = "main"
lines = 4
winch_line_pull = "20000 lbf"
rope_breaking_force = "unrated"
mast_rating = "100 kip"
dead_load = "3000 lbf"
overpull_reserve = "5 tf"
dynamic_factor = 1.1
[[path.tool]]
name = "elevator"
kind = "elevator"
rating = "50 tf"
[[path.tool]]
name = "hook"
kind = "other"
[landing_string]
name = "dp"
weight_per_length = "14.7 lb/ft"
tensile_rating = "271000 lbf"
od = "3-1/2 in"
bore = "2.764 in"
"""


def test_rig_values():
    rig = parse_rig(RIG, "rigs/t.toml")
    assert rig.name == "test rig" and rig.source == "rigs/t.toml"
    (p,) = rig.paths
    assert p.lines == 4 and p.sheave_factor == 1.04 and p.rope_design_factor == 3.0
    assert_allclose(p.winch_line_pull, 20000 * LBF, rtol=1e-14)
    assert math.isnan(p.rope_breaking_force) and math.isnan(p.top_head_pullup)
    assert_allclose(p.mast_rating, 100000 * LBF, rtol=1e-14)
    assert_allclose(p.overpull_reserve, 5000 * G_N, rtol=1e-14)
    assert p.tools[0][:2] == ("elevator", "elevator")
    assert_allclose(p.tools[0][2], 50000 * G_N, rtol=1e-14)
    assert p.tools[1][0] == "hook" and math.isnan(p.tools[1][2])
    ls = rig.landing_string
    assert_allclose(ls.weight_per_length, 14.7 * POUND * G_N / FOOT, rtol=1e-14)
    assert_allclose([ls.od, ls.bore, ls.density], [3.5 * INCH, 2.764 * INCH, 7850.0], rtol=1e-14)


@pytest.mark.parametrize("change, where, fragment", [
    (('dead_load = "3000 lbf"\n', ""), "rigs/t.toml: path[1].dead_load", "required: a force"),
    (('lines = 4', "lines = 0"), "rigs/t.toml: path[1].lines", ">= 1"),
    (('lines = 4', "lines = 2.5"), "rigs/t.toml: path[1].lines", "whole number"),
    (('"20000 lbf"', '"20000 psi"'), "rigs/t.toml: path[1].winch_line_pull", "expected a force"),
    (('"20000 lbf"', '"-5 lbf"'), "rigs/t.toml: path[1].winch_line_pull", "greater than zero"),
    (('kind = "elevator"', 'kind = "slips"'), "rigs/t.toml: path[1].tool[1].kind", "elevator, clamp"),
    (('dynamic_factor = 1.1', "dynamic_factor = 0.9"), "rigs/t.toml: path[1].dynamic_factor", "between 1 and 3 [-]"),
    (('name = "hook"', 'name = "elevator"'), "rigs/t.toml: path[1].tool[2].name", "already used"),
    (('"14.7 lb/ft"', '"14.7 lb"'), "rigs/t.toml: landing_string.weight_per_length",
     "expected a weight per length"),
    (('bore = "2.764 in"', 'bore = "4 in"'), "rigs/t.toml: landing_string.bore", "smaller than the od"),
    (('name = "test rig"\n', ""), "rigs/t.toml: name", "required"),
    (('[[path]]', "[[paths]]"), "rigs/t.toml: paths", "unknown key (did you mean 'path'?)"),
    (('overpull_reserve', "overpul_reserve"), "rigs/t.toml: path[1].overpul_reserve", "did you mean"),
])
def test_bad_rig_input(change, where, fragment):
    with pytest.raises(InputError) as err:
        parse_rig(RIG.replace(*change, 1), "rigs/t.toml")
    msg = str(err.value)
    assert msg.startswith(where + ":"), msg
    assert fragment in msg and "\n" not in msg


# ---------------------------------------------------------------------------
# user materials


MATERIALS = """
units = "si"
[[material]]
key = "TESTSTEEL_X"
name = "Test steel X (maker's data)"
family = "steel"
density = "7870 kg/m3"
yield_strength = "290 MPa"
youngs_modulus = "200000 MPa"
poisson = 0.3
wall_under_tolerance = "10 %"
collapse_method = "timoshenko"
source = "maker's mill certificate"
[material.sources]
yield_strength = "mill certificate heat 1234"
"""


def test_materials_file_registers_and_is_usable(tmp_path):
    from rigplan.engine import materials

    path = tmp_path / "m.toml"
    path.write_text(MATERIALS)
    try:
        (m,) = read_materials(path)
        assert m.key == "teststeel_x"
        assert_allclose([m.density, m.yield_strength, m.youngs_modulus, m.poisson,
                         m.wall_under_tolerance], [7870.0, 290e6, 200e9, 0.3, 0.1], rtol=1e-14)
        assert "heat 1234" in m.sources["yield_strength"]
        assert "mill certificate" in m.sources["density"] and str(path) in m.sources["density"]
        assert materials.get_material("teststeel_x") is m
        p = parse_plan(MINIMAL.replace('"a53b"', '"teststeel_x"'), "t.toml").plan
        assert p.joints[0].material == "teststeel_x"
        with pytest.raises(InputError, match=r"m.toml: material\[1\].key: material 'teststeel_x' "
                                             r"is already known"):
            read_materials(path)
    finally:
        materials.LIBRARY.pop("teststeel_x", None)


@pytest.mark.parametrize("change, where, fragment", [
    (('source = "maker\'s mill certificate"\n', ""), "m.toml: material[1].source", "no source for density"),
    (('poisson = 0.3', "poisson = 0.6"), "m.toml: material[1].poisson", "in [0, 0.5) [-]"),
    (('"10 %"', '"110 %"'), "m.toml: material[1].wall_under_tolerance", "in [0, 1) [-]"),
    (('"290 MPa"', '"290 kg"'), "m.toml: material[1].yield_strength", "expected a stress"),
    (('"timoshenko"', '"guess"'), "m.toml: material[1].collapse_method", "timoshenko, api_5c3"),
    (('"steel"', '"wood"'), "m.toml: material[1].family", "steel, stainless"),
    (('density = "7870 kg/m3"\n', ""), "m.toml: material[1].density", "required"),
])
def test_bad_materials(change, where, fragment):
    from rigplan.files.formats.materialfile import parse_materials

    with pytest.raises(InputError) as err:
        parse_materials(MATERIALS.replace(*change, 1), "m.toml")
    msg = str(err.value)
    assert msg.startswith(where + ":"), msg
    assert fragment in msg


def test_unknown_material_value():
    from rigplan.files.formats.materialfile import parse_materials

    (m,) = parse_materials(MATERIALS.replace('"200000 MPa"', '"unknown"'), "m.toml")
    assert math.isnan(m.youngs_modulus)


# ---------------------------------------------------------------------------
# demo data


def test_demo_files_exist():
    assert len(RIGS) >= 2
    assert len(PLANS) >= 4
    assert list((ROOT / "strings").glob("*.csv"))


@pytest.mark.parametrize("rig_file", RIGS, ids=[p.name for p in RIGS])
def test_demo_rigs_load(rig_file):
    rig = read_rig(rig_file)
    names = {p.name for p in rig.paths}
    assert {"main line", "top head"} <= names
    for p in rig.paths:
        assert p.dead_load > 0 and p.overpull_reserve > 0
        assert any(kind in ("elevator", "clamp", "lifting_sub") for _, kind, _ in p.tools)


def test_one_demo_rig_has_a_landing_string():
    assert any(read_rig(f).landing_string is not None for f in RIGS)


@pytest.mark.parametrize("plan_file", PLANS, ids=[p.name for p in PLANS])
def test_demo_plans_load_and_name_their_rig(plan_file):
    r = read_plan(plan_file)
    assert r.warnings == ()
    assert len(r.plan.running_joints()) >= 10
    header = plan_file.read_text().split("\n\n")[0]
    m = re.search(r"--rig (rigs/\S+\.toml)", header)
    assert m, f"{plan_file.name}: header names no --rig"
    rig = read_rig(ROOT / m.group(1))
    assert plan_file.name in (ROOT / m.group(1)).read_text()      # the rig lists it back
    assert rig.paths


def test_demo_plans_cover_the_float_equipment():
    closures = {read_plan(f).plan.closure.valve_joint for f in PLANS}
    assert None in closures          # an open-ended string
    assert 0 in closures             # a float shoe
    assert any(c and c > 0 for c in closures)   # a float collar
