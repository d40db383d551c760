"""Tube geometry and plain-end weight (rigplan.engine.tubulars)."""

import numpy as np
import pytest
from numpy.testing import assert_allclose

from _units import inch, lb_per_ft, lb_per_in3, lbf, mm, psi
from rigplan.engine import tubulars as tb


def density_from_k(k):
    """Density [kg/m^3] behind w [lb/ft] = k (D - t) t [in]: k = 12 pi rho [lb/in^3]."""
    return k / (12.0 * np.pi) * lb_per_in3


# --- weight --------------------------------------------------------------------


def test_linear_mass_16in_375_wall_k_10_68():
    # common practice, no source: 16 in x 0.375 in steel pipe weighs 62.58 lb/ft
    # with w = 10.68 (D - t) t.
    mass = tb.linear_mass(16 * inch, 0.375 * inch, density_from_k(10.68))
    assert_allclose(mass / lb_per_ft, 62.58, atol=0.005)


# ASME B36.10M standard-weight pipe table, plain-end weights on the 10.68
# basis, lb/ft (from memory; each recomputes with 10.68 (D - t) t).
B36_10_STANDARD_WEIGHT = [
    # OD in, wall in, lb/ft
    (4.500, 0.237, 10.79),
    (8.625, 0.322, 28.55),
    (10.750, 0.365, 40.48),
    (12.750, 0.375, 49.56),
    (16.000, 0.375, 62.58),
]


@pytest.mark.parametrize("od, wall, weight", B36_10_STANDARD_WEIGHT)
def test_linear_mass_b36_10_table(od, wall, weight):
    mass = tb.linear_mass(od * inch, wall * inch, density_from_k(10.68))
    assert_allclose(mass / lb_per_ft, weight, atol=0.006)  # table rounds to 0.01 lb/ft


def test_linear_mass_stainless_k_10_93():
    # common practice, no source: austenitic stainless weighs about 10.93 (D - t) t
    # lb/ft (about 0.290 lb/in^3).
    od, wall = 16 * inch, 0.375 * inch
    mass = tb.linear_mass(od, wall, 0.290 * lb_per_in3)
    assert_allclose(mass / lb_per_ft, 10.93 * (16 - 0.375) * 0.375, rtol=5e-4)


def test_linear_mass_equals_a53_si_formula_at_7850():
    # ASTM A53/A53M and API 5L plain-end weight: 0.0246615 (D - t) t kg/m with mm,
    # which is rho pi (D - t) t for rho = 7850 kg/m^3.
    od = np.array([60.3, 168.3, 273.1, 406.4]) * mm
    wall = np.array([3.91, 7.11, 9.27, 9.53]) * mm
    assert_allclose(tb.linear_mass(od, wall, 7850.0), tb.plain_end_mass_a53(od, wall), rtol=1e-6)
    assert_allclose(tb.plain_end_mass_a53(od, wall),
                    0.0246615 * (od / mm - wall / mm) * (wall / mm), rtol=1e-12)


def test_a53_us_weight_6in_sch40():
    # ASTM A53/A53M dimensions-and-weights table, 6 in Sch 40 (6.625 x 0.280 in):
    # 18.99 lb/ft and 168.3 x 7.11 mm: 28.26 kg/m (from memory).
    assert_allclose(tb.plain_end_weight_a53_us(6.625, 0.280), 18.99, atol=0.005)
    assert_allclose(tb.plain_end_mass_a53(168.3 * mm, 7.11 * mm), 28.26, atol=0.005)


def test_a53_us_and_si_forms_agree():
    # ASTM A53/A53M: the US (10.69) and SI (0.0246615) forms describe the same steel.
    us = tb.plain_end_weight_a53_us(16.0, 0.375) * lb_per_ft
    si = tb.plain_end_mass_a53(16 * inch, 0.375 * inch)
    assert_allclose(us, si, rtol=2e-4)


# --- wall, areas, body yield ------------------------------------------------------


def test_minimum_wall_12_5_percent():
    # common practice, no source (ASTM A53/A53M, A312, API 5CT tolerance): the
    # minimum wall is 12.5 % under the specified wall: 0.375 in -> 0.328 in.
    assert_allclose(tb.minimum_wall(0.375 * inch, 0.125) / inch, 0.328125, rtol=1e-12)
    assert_allclose(tb.minimum_wall(np.array([0.25, 0.5]) * inch, 0.125) / inch,
                    [0.21875, 0.4375], rtol=1e-12)


# API casing tables (API 5C2 / API 5CT), pipe-body yield on the specified wall,
# 0.7854 (D^2 - d^2) Y, rounded to 1,000 lbf (from memory, recomputed).
API_BODY_YIELD = [
    # OD in, wall in, yield psi, body yield lbf
    (7.0, 0.317, 55000, 366000),
    (7.0, 0.540, 80000, 877000),
    (9.625, 0.395, 80000, 916000),
    (9.625, 0.472, 110000, 1493000),
    (13.375, 0.380, 55000, 853000),
    (16.0, 0.375, 40000, 736000),
]


@pytest.mark.parametrize("od, wall, y, expected", API_BODY_YIELD)
def test_body_yield_api_tables(od, wall, y, expected):
    value = tb.body_yield(od * inch, wall * inch, y * psi)
    assert_allclose(value / lbf, expected, atol=500)  # tables round to 1,000 lbf


def test_body_yield_vectorized_matches_table():
    # Same API table as above, as one array call.
    od, wall, y, expected = (np.array(c, dtype=float) for c in zip(*API_BODY_YIELD))
    value = tb.body_yield(od * inch, wall * inch, y * psi)
    assert value.shape == (6,)
    assert_allclose(value / lbf, expected, atol=500)


def test_areas_partition_the_outside_area():
    # Geometry of an annulus: outside area = steel area + bore area.
    od = np.array([0.1, 0.2, 0.4064])
    wall = np.array([0.005, 0.09, 0.009525])
    assert_allclose(tb.outside_area(od), tb.steel_area(od, wall) + tb.bore_area(od, wall),
                    rtol=1e-12)
    assert_allclose(tb.bore_area(0.2, 0.05), np.pi / 4 * 0.1**2, rtol=1e-12)


def test_sdr_f480_naming():
    # ASTM F480: SDR is outside diameter over wall; 6.625 in at 0.315 in wall is
    # SDR 21 (6.625 / 21 = 0.3155 in).
    assert_allclose(tb.sdr(6.625 * inch, 6.625 / 21 * inch), 21.0, rtol=1e-12)


# --- input checks ----------------------------------------------------------------


def test_wall_not_less_than_half_od_is_refused():
    with pytest.raises(ValueError, match="less than half the outside diameter"):
        tb.steel_area(0.2, 0.1)
    with pytest.raises(ValueError, match=r"element 1"):
        tb.steel_area(np.array([0.2, 0.2]), np.array([0.01, 0.15]))


@pytest.mark.parametrize("od, wall", [(-0.2, 0.01), (0.2, -0.01), (0.0, 0.01), (0.2, 0.0)])
def test_non_positive_dimensions_are_refused(od, wall):
    with pytest.raises(ValueError, match="must be greater than 0"):
        tb.linear_mass(od, wall, 7850.0)


def test_bad_tolerance_and_density_are_refused():
    with pytest.raises(ValueError, match="under_tolerance"):
        tb.minimum_wall(0.01, 1.0)
    with pytest.raises(ValueError, match="under_tolerance"):
        tb.minimum_wall(0.01, -0.1)
    with pytest.raises(ValueError, match="density"):
        tb.linear_mass(0.2, 0.01, -1.0)


def test_nan_means_unrated_and_propagates():
    # rigplan rule: an unknown value is unrated (nan), never replaced by a guess.
    assert np.isnan(tb.body_yield(0.2, 0.01, float("nan")))
    assert np.isnan(tb.linear_mass(0.2, float("nan"), 7850.0))


def test_scalar_in_float_out():
    assert type(tb.steel_area(0.2, 0.01)) is float
    assert isinstance(tb.steel_area(np.array([0.2]), 0.01), np.ndarray)
