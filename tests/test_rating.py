"""Joint rating (rigplan.engine.rating.rate_joints)."""

import dataclasses
import math

import numpy as np
import pytest
from numpy.testing import assert_allclose

from _units import ft, inch, ksi, lb_per_ft, lbf, psi
from rigplan.engine.collapse import api_5c3, timoshenko
from rigplan.errors import InputError
from rigplan.engine.materials import LIBRARY, get_material
from rigplan.engine.rating import joint_weight, rate_joints, rating_wall
from rigplan.engine.stringmodel import G, JointArrays, JointSpec


def joint(label="J1", kind="blank", material="a53b", od=16.0, wall=0.375, length=40.0,
          **kw):
    """A joint given in inches and feet, converted to SI."""
    return JointSpec(label, kind, material, od=od * inch, wall=wall * inch,
                     length=length * ft, **kw)


# --- steel casing, Timoshenko -----------------------------------------------------


def test_timoshenko_with_measured_wall():
    # common practice, no source: 16 in x 0.375 in, 35,000 psi, E 30e6 psi,
    # nu 0.3, 1 % ellipticity -> about 470 psi; a measured wall is used as is.
    arrays = rate_joints([joint(measured_wall=0.375 * inch, ellipticity=0.01)])
    assert isinstance(arrays, JointArrays)
    assert_allclose(arrays.collapse_rating[0] / psi, 470.0, atol=1.0)
    assert arrays.collapse_method == ("timoshenko",)


def test_timoshenko_default_ellipticity_is_one_percent():
    # common practice, no source: 1 % ellipticity assumed when none is given
    # (16 in x 0.375 in A53 B -> about 470 psi).
    arrays = rate_joints([joint(measured_wall=0.375 * inch)])
    assert_allclose(arrays.collapse_rating[0] / psi, 470.0, atol=1.0)


def test_ellipticity_from_measured_diameters():
    # common practice, no source: about 189 psi at 5 % ellipticity; dmax/dmin
    # of 16.8 / 15.2 in give e = 1.6 / 32 = 0.05 and win over the entered value.
    arrays = rate_joints([joint(measured_wall=0.375 * inch, ellipticity=0.01,
                                dmax=16.8 * inch, dmin=15.2 * inch)])
    assert_allclose(arrays.collapse_rating[0] / psi, 189.0, atol=1.0)


def test_minimum_wall_is_used_without_measurement():
    # ASTM A53/A53M: the wall may be 12.5 % under the specified wall, and the
    # Timoshenko formula has no tolerance built in, so non-API steel is rated on
    # the minimum wall (0.328125 in for 0.375 in).
    spec = joint()
    wall, how = rating_wall(spec, get_material("a53b"))
    assert_allclose(wall / inch, 0.328125, rtol=1e-12)
    assert how == "minimum wall"
    arrays = rate_joints([spec])
    assert arrays.collapse_basis == arrays.burst_basis == arrays.tension_basis == ("minimum wall",)
    assert_allclose(arrays.collapse_rating[0],
                    timoshenko(16 * inch, wall, 35 * ksi, 0.01, 30e6 * psi, 0.3), rtol=1e-12)
    assert arrays.collapse_rating[0] < 470.0 * psi


def test_weight_from_a53_formula_on_specified_wall():
    # ASTM A53/A53M plain-end weight: 10.69 (D - t) t lb/ft on the specified
    # wall, even when a thinner wall was measured; measured length wins.
    arrays = rate_joints([joint(measured_wall=0.33 * inch, measured_length=41.5 * ft)])
    expected = 10.69 * (16 - 0.375) * 0.375 * lb_per_ft * G * 41.5 * ft
    assert_allclose(arrays.weight[0], expected, rtol=2e-4)
    assert_allclose(arrays.length[0], 41.5 * ft, rtol=1e-12)
    _, how = joint_weight(joint(), get_material("a53b"))
    assert how == "plain-end formula"


def test_entered_weights_win():
    # string mechanics (ADE 1986), weight: a tally value wins over the formula.
    shoe = joint(kind="float_shoe", length=2.0, weight=900.0)
    centralizer = joint(kind="centralizer", length=1.0, weight=150.0)
    per_length = joint(weight_per_length=1000.0, measured_length=41.0 * ft)
    arrays = rate_joints([shoe, centralizer, per_length])
    assert_allclose(arrays.weight, [900.0, 150.0, 1000.0 * 41.0 * ft], rtol=1e-12)


def test_bore_uses_specified_wall_unless_entered():
    arrays = rate_joints([joint(), joint(bore=15.0 * inch)])
    assert_allclose(arrays.bore, [15.25 * inch, 15.0 * inch], rtol=1e-12)
    assert_allclose(arrays.od, [16 * inch, 16 * inch], rtol=1e-12)


def test_non_api_steel_burst_and_body_on_minimum_wall():
    # Barlow 2 Y t / D and body yield Y pi t (D - t) with t the minimum wall
    # 0.875 x 0.375 in (ASTM A53/A53M tolerance; formulas: API TR 5C3 body
    # yield, Barlow), 16 in A53 B at 35 ksi, worked by hand:
    # burst 2 x 35,000 x 0.328125 / 16 = 1,435.5 psi;
    # body 35,000 x pi x 0.328125 x (16 - 0.328125) = 565,429 lbf.
    arrays = rate_joints([joint()])
    assert_allclose(arrays.burst_rating[0] / psi, 1435.5, atol=0.1)
    assert_allclose(arrays.body_rating[0] / lbf, 565429, atol=2)


# API casing tables (API 5C2 / API 5CT performance tables, computed by API TR
# 5C3; from memory, recomputed with the formulas): grade, OD [in], wall [in],
# regime, collapse [psi], internal yield [psi], pipe-body yield [lbf].  One row
# per collapse regime at least, six sizes.
API_TABLE_ROWS = [
    ("n80", 7.0, 0.540, "yield", 11390, 10800, 877000),          # 7 in 38 lb/ft N-80
    ("n80", 5.5, 0.304, "plastic", 6280, 7740, 397000),          # 5-1/2 in 17 lb/ft N-80
    ("j55", 7.0, 0.317, "plastic", 3270, 4360, 366000),          # 7 in 23 lb/ft J-55
    ("k55", 9.625, 0.352, "transition", 2020, 3520, 564000),     # 9-5/8 in 36 lb/ft K-55
    ("j55", 10.75, 0.350, "transition", 1580, 3130, 629000),     # 10-3/4 in 40.5 lb/ft J-55
    ("h40", 16.0, 0.375, "elastic", 630, 1640, 736000),          # 16 in 65 lb/ft H-40
    ("k55", 20.0, 0.438, "elastic", 520, 2110, 1480000),         # 20 in 94 lb/ft K-55
]


def test_api_grades_rated_on_the_specified_wall_match_the_tables():
    # API TR 5C3: collapse (four regimes) and body yield on the specified wall,
    # internal yield 0.875 x 2 Y t / D; within 10 psi and 1,000 lbf of the tables.
    from rigplan.engine.collapse import api_5c3_regime
    specs = [joint(f"C{i}", material=m, od=od, wall=t)
             for i, (m, od, t, *_rest) in enumerate(API_TABLE_ROWS)]
    arrays = rate_joints(specs)
    assert_allclose(arrays.collapse_rating / psi, [r[4] for r in API_TABLE_ROWS], atol=10.0)
    assert_allclose(arrays.burst_rating / psi, [r[5] for r in API_TABLE_ROWS], atol=10.0)
    assert_allclose(arrays.body_rating / lbf, [r[6] for r in API_TABLE_ROWS], atol=1000.0)
    regimes = [api_5c3_regime(od * inch, t * inch, get_material(m).yield_strength)
               for m, od, t, *_rest in API_TABLE_ROWS]
    assert regimes == [r[3] for r in API_TABLE_ROWS]
    assert set(arrays.collapse_basis) == set(arrays.burst_basis) == {"specified wall"}
    assert set(arrays.tension_basis) == {"specified wall"}
    assert not arrays.findings


def test_api_measured_wall_within_tolerance_keeps_the_table_rating():
    # API TR 5C3: the constants already give minimum values over the 12.5 %
    # tolerance; a measured wall inside it (0.33 in of 0.352 in, minimum 0.308 in)
    # leaves 9-5/8 in 36 lb/ft K-55 at 2,020 psi (API tables, from memory).
    arrays = rate_joints([joint(material="k55", od=9.625, wall=0.352, measured_wall=0.33 * inch)])
    assert_allclose(arrays.collapse_rating[0] / psi, 2020, atol=10)
    assert arrays.collapse_basis == ("specified wall",)
    assert not arrays.findings


def test_api_measured_wall_under_the_minimum_rates_that_joint():
    # API TR 5C3 convention kept for a thin joint: rated as pipe whose specified
    # wall is t_meas / 0.875, so collapse is the 5C3 formula there, internal
    # yield 0.875 x 2 Y (t_meas / 0.875) / D = 2 Y t_meas / D (Barlow on the
    # measured wall), body yield on the measured wall; worked by hand for
    # 9-5/8 in K-55 measured 0.280 in (minimum 0.308 in):
    # burst 2 x 55,000 x 0.280 / 9.625 = 3,200.0 psi;
    # body 55,000 x pi x 0.280 x 9.345 = 452,116 lbf.
    from rigplan.engine.rating import RatingCode
    arrays = rate_joints([joint("T9", material="k55", od=9.625, wall=0.352,
                                measured_wall=0.280 * inch)])
    assert_allclose(arrays.collapse_rating[0],
                    api_5c3(9.625 * inch, 0.320 * inch, 55 * ksi), rtol=1e-12)
    assert_allclose(arrays.burst_rating[0] / psi, 3200.0, atol=0.1)
    assert_allclose(arrays.body_rating[0] / lbf, 452116, atol=2)
    assert arrays.collapse_basis == arrays.burst_basis == arrays.tension_basis == ("measured wall",)
    (finding,) = arrays.findings
    assert finding.code == RatingCode.WALL_UNDER_MINIMUM and finding.label == "T9"
    assert_allclose(finding.value("minimum_wall") / inch, 0.308, rtol=1e-12)


# --- thermoplastic ------------------------------------------------------------------


def test_pvc_by_sdr():
    # Code of Maryland Regulations 26.04.04.17 Table 1: SDR 21 PVC 12454 casing
    # limited to 265 ft, read as collapse over about 0.433 psi/ft (our reading;
    # see test_collapse); F480 states minimum walls, so no under-tolerance
    # (from memory).
    od = 6.625
    arrays = rate_joints([joint(material="pvc", od=od, wall=od / 21, connection="spline")])
    assert_allclose(arrays.collapse_rating[0], 265 * 0.433 * psi, rtol=0.025)
    assert arrays.collapse_method == ("thermoplastic",)
    assert math.isnan(arrays.connection_rating[0])  # spline without a rating: unrated
    rated = rate_joints([joint(material="pvc", od=od, wall=od / 21, connection="spline",
                               connection_rating=20000.0)])
    assert rated.connection_rating[0] == 20000.0


@pytest.mark.parametrize("ratio, pressure_class_psi", [(17.0, 250.0), (21.0, 200.0), (26.0, 160.0)])
def test_pvc_pressure_rating_is_the_d2241_pressure_class(ratio, pressure_class_psi):
    # ASTM D2241 pressure classes of PVC 1120 SDR-PR pipe at 73.4 F, from the
    # ISO equation 2 S / (SDR - 1) with S = 2,000 psi: SDR 17 -> 250 psi,
    # SDR 21 -> 200 psi, SDR 26 -> 160 psi.
    od = 8.625
    arrays = rate_joints([joint(material="pvc", od=od, wall=od / ratio, connection="spline")])
    assert_allclose(arrays.burst_rating[0] / psi, pressure_class_psi, rtol=1e-12)
    assert arrays.burst_basis == ("minimum wall",)


def test_pvc_ratings_derated_for_temperature():
    # PVC temperature derating table (Uni-Bell Handbook of PVC Pipe, from
    # memory): 0.62 at 100 F.  SDR 21 at 100 F: 200 x 0.62 = 124 psi pressure
    # rating; the F480 collapse 2 E / (1 - nu^2) / (SDR - 1)^3 = 116.9 psi at
    # 73 F (E 400,000 psi, nu 0.38) times 0.62 = 72.5 psi.
    od = 8.625
    spec = joint(material="pvc", od=od, wall=od / 21, connection="spline")
    cold = rate_joints([spec])
    hot = rate_joints([spec], temperature=(100 - 32) / 1.8)
    assert_allclose(hot.burst_rating[0] / psi, 124.0, rtol=1e-9)
    assert_allclose(cold.collapse_rating[0] / psi, 116.88, atol=0.01)
    assert_allclose(hot.collapse_rating[0] / psi, 116.88 * 0.62, atol=0.01)
    assert_allclose(hot.body_rating[0], cold.body_rating[0], rtol=1e-15)   # tension not derated
    assert hot.derating == ("pvc",) and hot.rating_temperature == pytest.approx(37.78, abs=0.01)
    # steel is not derated
    steel = rate_joints([joint()], temperature=(100 - 32) / 1.8)
    assert_allclose(steel.collapse_rating, rate_joints([joint()]).collapse_rating, rtol=1e-15)


def test_pvc_above_the_derating_table_is_unrated():
    # The derating table stops at 140 F, the highest recommended service
    # temperature of PVC (Uni-Bell Handbook of PVC Pipe, from memory): above it
    # the pressure and collapse ratings are unrated (never assumed) and a
    # finding says why.
    from rigplan.engine.rating import RatingCode
    od = 8.625
    arrays = rate_joints([joint("P1", material="pvc", od=od, wall=od / 21, connection="spline",
                                collapse_rating=150 * psi)], temperature=65.0)
    assert math.isnan(arrays.collapse_rating[0]) and math.isnan(arrays.burst_rating[0])
    assert arrays.collapse_basis == arrays.burst_basis == ("unrated",)
    assert [f.code for f in arrays.findings] == [RatingCode.ABOVE_DERATING_TABLE]


# --- screens, entered and unrated ratings --------------------------------------------


def test_screen_without_entries_is_unrated():
    # string mechanics (ADE 1986): screens, perforated and slotted pipe take the
    # maker's rating; never blank-pipe strength.
    arrays = rate_joints([joint(kind="screen", weld_efficiency=1.0)])
    assert math.isnan(arrays.collapse_rating[0])
    assert math.isnan(arrays.burst_rating[0])
    assert math.isnan(arrays.body_rating[0])
    assert math.isnan(arrays.connection_rating[0])
    assert arrays.collapse_method == ("unrated",)
    assert arrays.weight[0] > 0


def test_screen_with_entries():
    arrays = rate_joints([joint(kind="screen", collapse_rating=150 * psi, burst_rating=300 * psi,
                                tensile_rating=40000 * lbf, weld_efficiency=0.7)])
    assert arrays.collapse_rating[0] == 150 * psi
    assert arrays.burst_rating[0] == 300 * psi
    assert arrays.body_rating[0] == 40000 * lbf
    assert_allclose(arrays.connection_rating[0], 0.7 * 40000 * lbf, rtol=1e-12)
    assert arrays.collapse_method == ("entered",)


def test_entered_ratings_win_on_blank_pipe():
    arrays = rate_joints([joint(collapse_rating=300 * psi, burst_rating=900 * psi,
                                tensile_rating=1e6)])
    assert arrays.collapse_rating[0] == 300 * psi
    assert arrays.burst_rating[0] == 900 * psi
    assert arrays.body_rating[0] == 1e6
    assert arrays.collapse_method == ("entered",)


def test_connections_per_joint():
    # stringmodel.CONNECTION_KINDS and string mechanics (ADE 1986): weld
    # efficiency x body yield on the minimum wall; no efficiency -> unrated;
    # integral -> body; none -> inf.
    specs = [joint("J1", connection="butt_weld", weld_efficiency=0.85),
             joint("J2", connection="butt_weld"),
             joint("J3", kind="shoe", connection="integral"),
             joint("J4", connection="none"),
             joint("J5", connection="threaded_coupled")]
    arrays = rate_joints(specs)
    body = arrays.body_rating
    assert_allclose(arrays.connection_rating[0], 0.85 * body[0], rtol=1e-12)
    assert math.isnan(arrays.connection_rating[1])
    assert arrays.connection_rating[2] == body[2]
    assert arrays.connection_rating[3] == np.inf
    assert math.isnan(arrays.connection_rating[4])


def test_fiberglass_user_needs_entries():
    # rigplan rule: unknown ratings are unrated, never assumed.
    with pytest.raises(InputError, match=r"joint F1\.weight"):
        rate_joints([joint("F1", material="fiberglass_user")])
    arrays = rate_joints([joint("F1", material="fiberglass_user", weight=500.0,
                                connection="flush", connection_rating=1e5)])
    assert math.isnan(arrays.collapse_rating[0])
    assert math.isnan(arrays.burst_rating[0])
    assert math.isnan(arrays.body_rating[0])
    assert arrays.connection_rating[0] == 1e5
    assert arrays.collapse_method == ("unrated",)


def test_materials_mapping_is_used():
    # A user mapping replaces the library; ASTM A312 TP304 30 ksi vs A53 B 35 ksi:
    # body yield scales with the yield strength (API TR 5C3 body-yield formula).
    custom = {"casing": dataclasses.replace(LIBRARY["ss304"], key="casing")}
    arrays = rate_joints([joint(material="casing")], materials=custom)
    steel = rate_joints([joint()])
    assert_allclose(arrays.body_rating[0] / steel.body_rating[0], 30 / 35, rtol=1e-12)


def test_mixed_string_vectorized_order():
    specs = [joint("S", kind="float_shoe", material="j55", od=7.0, wall=0.317,
                   connection="integral"),
             joint("P", material="pvc", od=6.625, wall=6.625 / 21, connection="spline"),
             joint("B", weld_efficiency=1.0),
             joint("W", kind="screen", collapse_rating=1e6)]
    arrays = rate_joints(specs)
    assert arrays.label == ("S", "P", "B", "W")
    assert arrays.collapse_method == ("api_5c3", "thermoplastic", "timoshenko", "entered")
    assert arrays.n == 4


def test_empty_string():
    arrays = rate_joints([])
    assert arrays.n == 0 and arrays.collapse_method == ()


# --- bad input -------------------------------------------------------------------------


@pytest.mark.parametrize("kw, where", [
    ({"material": "x42"}, "joint J7.material"),
    ({"wall": 9.0}, "joint J7.wall"),
    ({"kind": "packer"}, "joint J7.kind"),
    ({"connection": "glued"}, "joint J7.connection"),
    ({"dmax": 16.1 * inch}, "joint J7.dmin"),
    ({"ellipticity": 1.5}, "joint J7.ellipticity"),
    ({"weld_efficiency": 1.2}, "joint J7.weld_efficiency"),
    ({"measured_wall": -0.01}, "joint J7.measured_wall"),
    ({"length": 0.0}, "joint J7.length"),
])
def test_bad_input_names_the_joint(kw, where):
    with pytest.raises(InputError) as info:
        rate_joints([joint("J7", **kw)])
    assert info.value.where == where
    assert "\n" not in str(info.value)


def test_unknown_material_lists_known_keys():
    with pytest.raises(InputError, match="a53b"):
        rate_joints([joint(material="x42")])


def test_api_method_outside_yield_range_is_refused():
    weak = {"weak": dataclasses.replace(LIBRARY["j55"], key="weak", yield_strength=10 * ksi)}
    with pytest.raises(InputError, match="API TR 5C3"):
        rate_joints([joint(material="weak")], materials=weak)


def test_grouped_rating_equals_rating_each_joint():
    # Identity of the implementation: rating each distinct joint once and
    # scaling its weight by length gives the same arrays as rating every
    # joint on its own (common practice, no source: weight is linear in length).
    import dataclasses
    import numpy as np
    from rigplan.engine.rating import rate_each_joint, rate_joints
    from rigplan.engine.stringmodel import JointSpec
    rng = np.random.default_rng(3)
    base = [JointSpec("x", "blank", "a53b", od=0.4064, wall=0.009525, length=6.0,
                      weld_efficiency=0.85),
            JointSpec("x", "screen", "ss304", od=0.4064, wall=0.009525, length=6.0,
                      tensile_rating=4e5, collapse_rating=1.5e6, weight_per_length=560.0),
            JointSpec("x", "blank", "j55", od=0.3397, wall=0.00965, length=12.0,
                      connection="threaded_coupled", connection_rating=2e6, weight=6000.0)]
    specs = [dataclasses.replace(base[i % 3], label=f"J{i}",
                                 measured_length=float(rng.uniform(5.5, 12.5)))
             for i in range(60)]
    a, b = rate_joints(specs), rate_each_joint(specs)
    for name in ("length", "od", "bore", "weight", "collapse_rating", "burst_rating",
                 "body_rating", "connection_rating"):
        np.testing.assert_allclose(getattr(a, name), getattr(b, name), rtol=1e-14)
    assert a.collapse_method == b.collapse_method and a.label == b.label
