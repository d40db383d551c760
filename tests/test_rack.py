"""Rack measurements: a tally's od_max, od_min and measured_wall readings
give each joint its own ellipticity, minimum wall and ratings, with flags."""

import pytest
from numpy.testing import assert_allclose

from _units import inch, lbf, psi
from rigplan.engine.rating import RatingCode, rate_joints
from rigplan.errors import InputError
from rigplan.files.formats.planfile import apply_tally, parse_plan
from rigplan.files.formats.tally import parse_tally, tally_text

PLAN = """
units = "us"
[hole]
fluid_density = "9.0 ppg"
[[section]]
kind = "blank"
material = "a53b"
od = "16 in"
wall = "0.375 in"
joint_length = "20 ft"
count = 3
weld_efficiency = 1.0
"""

TALLY = """label,measured_length [ft],measured_wall [in],od_max [in],od_min [in]
J1,20.1,0.352; 0.349;0.355,16.10;16.08,15.94; 15.90
J2,20.0,0.320,16.25,15.80
J3,19.9,,,
"""


def _rated(tally=TALLY):
    plan = parse_plan(PLAN).plan
    joints = apply_tally(list(plan.joints), parse_tally(tally, "rack.csv"), "rack.csv")
    return joints, rate_joints(joints)


def test_several_readings_per_cell_take_the_governing_one():
    # Interface of the tally: the largest od_max, the smallest od_min and the
    # smallest measured_wall reading count.
    rows = parse_tally(TALLY, "rack.csv")
    assert_allclose([rows[0].measured_wall, rows[0].od_max, rows[0].od_min],
                    [0.349 * inch, 16.10 * inch, 15.90 * inch], rtol=1e-12)
    assert rows[2].od_max is None and rows[2].measured_wall is None
    again = parse_tally(tally_text(rows, "us"), "again.csv")
    assert_allclose([again[1].od_max, again[1].od_min], [16.25 * inch, 15.80 * inch], rtol=1e-12)


def test_rack_ratings_by_hand():
    # Joint J1, 16 in x 0.375 in ASTM A53 B (35,000 psi, E 30e6 psi, nu 0.3),
    # rack readings: Dmax 16.10 in, Dmin 15.90 in, thinnest wall 0.349 in.
    # Ellipticity (Timoshenko and Gere, Theory of Elastic Stability, 1961, ch. 7:
    # w0/R = (Dmax - Dmin)/(Dmax + Dmin)) = 0.20 / 32.00 = 0.00625.
    # Timoshenko first yield of the oval ring, same source, r = D/t - 1 = 44.845:
    #   p_cr = 2E/(1 - nu^2)/r^3 = 731.07 psi;  p_y = 2 Y / r = 1,560.92 psi;
    #   p^2 - [p_y + (1 + 3 e r) p_cr] p + p_y p_cr = 0
    #   -> b = 2,906.71, c = 1,141,146 -> p = (b - sqrt(b^2 - 4c)) / 2 = 467.9 psi.
    # Barlow on the measured wall: 2 x 35,000 x 0.349 / 16 = 1,526.9 psi.
    # Body yield (API TR 5C3 form) on the measured wall:
    #   35,000 x pi x 0.349 x 15.651 = 600,600 lbf.
    _, arrays = _rated()
    assert_allclose(arrays.collapse_rating[0] / psi, 467.9, atol=0.05)
    assert_allclose(arrays.burst_rating[0] / psi, 1526.9, atol=0.05)
    assert_allclose(arrays.body_rating[0] / lbf, 600600, atol=1)
    assert arrays.collapse_basis[0] == arrays.burst_basis[0] == arrays.tension_basis[0] \
        == "measured wall"
    # J3 has no readings: the minimum wall and the plan's 1 % ellipticity
    assert arrays.collapse_basis[2] == "minimum wall"


def test_rack_flags():
    # J2: wall 0.320 in under the ASTM A53 minimum 0.328 in (12.5 % under
    # 0.375 in, from memory), ellipticity 0.45/32.05 = 1.40 % above the 1 %
    # assumed (common practice, no source); J1 is within both.
    # Timoshenko (as above) at t = 0.320 in, e = 0.01404: r = 49.0,
    # p_cr = 560.43 psi, p_y = 1,428.57 psi -> 279.3 psi.
    _, arrays = _rated()
    codes = {(f.label, f.code) for f in arrays.findings}
    assert codes == {("J2", RatingCode.WALL_UNDER_MINIMUM),
                     ("J2", RatingCode.ELLIPTICITY_ABOVE_ASSUMED)}
    ell = next(f for f in arrays.findings if f.code == RatingCode.ELLIPTICITY_ABOVE_ASSUMED)
    assert_allclose(ell.value("ellipticity"), 0.45 / 32.05, rtol=1e-12)
    assert ell.value("assumed_ellipticity") == 0.01
    assert_allclose(arrays.collapse_rating[1] / psi, 279.3, atol=0.05)


def test_rack_flags_survive_the_grouped_rating():
    # Identity of the implementation: rating each distinct joint once gives the
    # same findings, joint by joint, as rating every joint on its own.
    from rigplan.engine.rating import rate_each_joint
    joints, _ = _rated()
    many = [j for j in joints for _ in range(6)]
    many = [type(j)(**{**j.__dict__, "label": f"{j.label}.{i}"}) for i, j in enumerate(many)]
    a, b = rate_joints(many), rate_each_joint(many)
    assert [(f.joint, f.label, f.code) for f in a.findings] == \
        [(f.joint, f.label, f.code) for f in b.findings]
    assert a.collapse_basis == b.collapse_basis


@pytest.mark.parametrize("row, where, expected", [
    ("J1,20.1,0.35,16.1,", "rack.csv: row 2, od_min", "both od_max and od_min"),
    ("J1,20.1,0.35,15.9,16.1", "rack.csv: row 2, od_min", "larger than"),
    ("J1,20.1,0.35;;0.36,16.1,15.9", "rack.csv: row 2, measured_wall", "separated by ';'"),
    ("J1,20.1,0.35,16.1,-15.9", "rack.csv: row 2, od_min", None),
])
def test_bad_rack_readings_name_the_row_and_column(row, where, expected):
    header = "label,measured_length [ft],measured_wall [in],od_max [in],od_min [in]\n"
    with pytest.raises(InputError) as info:
        parse_tally(header + row + "\n", "rack.csv")
    assert info.value.where == where
    if expected:
        assert expected in info.value.message
    assert "\n" not in str(info.value)


def test_rack_od_in_the_wrong_unit_is_refused():
    # 16.1 read as mm in a column headed [mm] is a unit slip, not an oval joint.
    tally = "label,od_max [mm],od_min [mm]\nJ1,16.1,15.9\n"
    plan = parse_plan(PLAN).plan
    with pytest.raises(InputError) as info:
        apply_tally(list(plan.joints), parse_tally(tally, "rack.csv"), "rack.csv")
    assert info.value.where == "rack.csv: row 2, od_max"
    assert "within 25 %" in info.value.message


def test_rating_basis_and_flags_reach_the_json(tmp_path, capsys):
    # Interface: joints[].rating_basis and joints[].rating_flags in
    # `rigplan check --format json` (README, JSON output).
    import json

    from rigplan.cli import main
    plan = tmp_path / "rack.toml"
    plan.write_text(PLAN)
    tally = tmp_path / "rack.csv"
    tally.write_text(TALLY)
    main(["check", str(plan), "--rig", "th30", "--tally", str(tally), "--format", "json"])
    joints = json.loads(capsys.readouterr().out)["joints"]
    assert joints[1]["rating_basis"] == {"collapse": "measured wall", "burst": "measured wall",
                                         "tension": "measured wall"}
    assert joints[1]["rating_flags"] == ["wall_under_minimum", "ellipticity_above_assumed"]
    assert joints[2]["rating_basis"]["collapse"] == "minimum wall"
    assert joints[0]["rating_flags"] == []
