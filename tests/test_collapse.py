"""Collapse ratings (rigplan.engine.collapse)."""

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from numpy.testing import assert_allclose

from _units import ft, inch, ksi, psi
from rigplan.engine import collapse as cl

E_STEEL = 30e6 * psi

# --- Timoshenko -------------------------------------------------------------------

# common practice, no source: 16 in OD x 0.375 in wall, Sy 35,000 psi,
# E = 30e6 psi, nu = 0.3 -- Timoshenko collapse 911 psi at 0 % ellipticity,
# about 470 psi at 1 %, about 189 psi at 5 %.
TIMOSHENKO_16IN = [
    (0.00, 911.0),
    (0.01, 470.0),
    (0.05, 189.0),
]


@pytest.mark.parametrize("ellipticity, expected_psi", TIMOSHENKO_16IN)
def test_timoshenko_16in_water_well_casing(ellipticity, expected_psi):
    p = cl.timoshenko(16 * inch, 0.375 * inch, 35 * ksi, ellipticity, E_STEEL, 0.3)
    assert_allclose(p / psi, expected_psi, atol=1.0)


def test_timoshenko_16in_30ksi_yield():
    # common practice, no source: same pipe with 30,000 psi yield, 1 % ellipticity:
    # about 429 psi.
    p = cl.timoshenko(16 * inch, 0.375 * inch, 30 * ksi, 0.01, E_STEEL, 0.3)
    assert_allclose(p / psi, 429.0, atol=1.0)


def test_timoshenko_vectorized():
    # Same common-practice values as above, in one array call.
    e = np.array([c[0] for c in TIMOSHENKO_16IN])
    p = cl.timoshenko(16 * inch, 0.375 * inch, 35 * ksi, e, E_STEEL, 0.3)
    assert p.shape == (3,)
    assert_allclose(p / psi, [c[1] for c in TIMOSHENKO_16IN], atol=1.0)


def test_timoshenko_default_modulus_is_30e6_psi():
    # common practice, no source: steel E = 30e6 psi, nu = 0.3 (the defaults).
    assert_allclose(cl.timoshenko(16 * inch, 0.375 * inch, 35 * ksi, 0.01) / psi, 470.0,
                    atol=1.0)


def test_elastic_ring_collapse_16in():
    # common practice, no source: 911 psi elastic collapse of 16 in x 0.375 in.
    assert_allclose(cl.elastic_ring_collapse(16 * inch, 0.375 * inch, E_STEEL, 0.3) / psi,
                    911.0, atol=1.0)


def test_ellipticity_from_diameters_definition():
    # Timoshenko and Gere (1961) ch. 7: e = (Dmax - Dmin) / (Dmax + Dmin).
    assert_allclose(cl.ellipticity_from_diameters(1.01, 0.99), 0.01, rtol=1e-12)
    assert_allclose(cl.ellipticity_from_diameters(np.array([0.5, 0.42]), 0.4),
                    [1 / 9, 1 / 41], rtol=1e-12)


# --- API TR 5C3 --------------------------------------------------------------------

# API casing tables (API 5C2 / API 5CT), collapse by API TR 5C3 on the specified
# wall; figures from memory, recomputed (API 5C2/5CT tables, recomputed by API TR 5C3); tables round to
# 10 psi and the tabulated constants move a rating by one step, so +-10 psi.
API_COLLAPSE = [
    # OD in, wall in, yield psi, regime, collapse psi
    (7.0, 0.317, 55000, "plastic", 3270),     # 7 in 23 lb/ft J-55
    (7.0, 0.540, 80000, "yield", 11390),      # 7 in 38 lb/ft N-80
    (9.625, 0.395, 80000, "transition", 3090),  # 9-5/8 in 40 lb/ft N-80
    (9.625, 0.472, 110000, "plastic", 5300),  # 9-5/8 in 47 lb/ft P-110
    (13.375, 0.380, 55000, "transition", 1130),  # 13-3/8 in 54.5 lb/ft J-55
    (16.0, 0.375, 40000, "elastic", 630),     # 16 in 65 lb/ft H-40
]


@pytest.mark.parametrize("od, wall, y, regime, expected", API_COLLAPSE)
def test_api_5c3_casing_tables(od, wall, y, regime, expected):
    p = cl.api_5c3(od * inch, wall * inch, y * psi)
    assert_allclose(p / psi, expected, atol=10.0)
    assert cl.api_5c3_regime(od * inch, wall * inch, y * psi) == regime


def test_api_5c3_vectorized():
    # Same API casing table as above, one array call.
    od, wall, y, regimes, expected = zip(*API_COLLAPSE)
    od, wall, y = (np.array(v, dtype=float) for v in (od, wall, y))
    p = cl.api_5c3(od * inch, wall * inch, y * psi)
    assert_allclose(p / psi, expected, atol=10.0)
    assert list(cl.api_5c3_regime(od * inch, wall * inch, y * psi)) == list(regimes)


# API TR 5C3 per-grade table of collapse constants and regime breaks (API TR 5C3
# tables): A, B, C [psi], F, G, (D/t)yp, (D/t)pt, (D/t)te.  The exact formulas
# and the rounded table differ in the fourth digit.
API_CONSTANTS = [
    (40000, 2.950, 0.0465, 754, 2.063, 0.0325, 16.40, 27.01, 42.64),   # H-40
    (55000, 2.991, 0.0541, 1206, 1.989, 0.0360, 14.81, 25.01, 37.21),  # J-55, K-55
    (80000, 3.071, 0.0667, 1955, 1.998, 0.0434, 13.38, 22.47, 31.02),  # L-80, N-80
    (110000, 3.181, 0.0819, 2852, 2.066, 0.0532, 12.44, 20.41, 26.22),  # P-110
]


@pytest.mark.parametrize("y, a, b, c, f, g, yp, pt, te", API_CONSTANTS)
def test_api_5c3_constants_table(y, a, b, c, f, g, yp, pt, te):
    k = cl.api_5c3_constants(y * psi)
    got = [k.A, k.B, k.C / psi, k.F, k.G, k.dt_yp, k.dt_pt, k.dt_te]
    assert_allclose(got, [a, b, c, f, g, yp, pt, te], rtol=1e-3)


@pytest.mark.parametrize("y", [40000, 55000, 80000, 110000, 125000])
def test_api_5c3_regimes_meet_at_breaks(y):
    # API TR 5C3: each break is where neighbouring regime formulas give the same
    # pressure, so collapse is continuous in D/t.
    k = cl.api_5c3_constants(y * psi)
    for x in (k.dt_yp, k.dt_pt, k.dt_te):
        od = 10 * inch
        below = cl.api_5c3(od, od / (x * (1 - 1e-9)), y * psi)
        above = cl.api_5c3(od, od / (x * (1 + 1e-9)), y * psi)
        assert_allclose(below, above, rtol=1e-6)


def test_api_5c3_yield_range_is_enforced():
    # API TR 5C3 constants are fitted for API grades; below 20 ksi the breaks
    # fall out of order.
    with pytest.raises(ValueError, match="20 to 200 ksi"):
        cl.api_5c3(7 * inch, 0.317 * inch, 15 * ksi)


def test_axial_reduced_yield_limits():
    # API TR 5C3, Ypa = Y [sqrt(1 - 0.75 (Sa/Y)^2) - 0.5 Sa/Y]: Y without axial
    # stress, zero at Sa = Y, Y again at Sa = -Y.
    y = 80 * ksi
    assert_allclose(cl.axial_reduced_yield(y, 0.0), y, rtol=1e-12)
    assert_allclose(cl.axial_reduced_yield(y, y), 0.0, atol=1e-6)
    assert_allclose(cl.axial_reduced_yield(y, -y), y, rtol=1e-12)


@given(ratio=st.floats(-1.0, 1.0), y=st.floats(20e3, 150e3))
def test_axial_reduced_yield_on_von_mises_ellipse(ratio, y):
    # Hencky-von Mises criterion for axial stress Sa and hoop stress -Ypa (the
    # basis of the API TR 5C3 Ypa formula): Sa^2 + Sa Ypa + Ypa^2 = Y^2.
    sy = y * psi
    sa = ratio * sy
    ypa = cl.axial_reduced_yield(sy, sa)
    assert_allclose(sa**2 + sa * ypa + ypa**2, sy**2, rtol=1e-9)


def test_axial_reduced_yield_out_of_range():
    with pytest.raises(ValueError, match="axial_stress"):
        cl.axial_reduced_yield(55 * ksi, 60 * ksi)


# --- thermoplastic -----------------------------------------------------------------

# Code of Maryland Regulations 26.04.04.17, Table 1: depth limits [ft] for PVC
# 12454 (PVC 1120) water-well casing by SDR, the same for every diameter.  The
# regulation states limits only; read as collapse over a fresh-water gradient of
# about 0.433 psi/ft (our reading, not stated), the rule and the F480 elastic
# formula (E = 400,000 psi, nu = 0.38, from memory) agree within 2.5 %.
COMAR_PVC_DEPTH_FT = [(26, 136), (21, 265), (17, 517), (13.5, 1085)]


@pytest.mark.parametrize("ratio, depth_ft", COMAR_PVC_DEPTH_FT)
def test_thermoplastic_sdr_against_state_depth_limits(ratio, depth_ft):
    p = cl.thermoplastic_sdr(ratio, 400000 * psi, 0.38)
    assert_allclose(p, depth_ft * ft * 0.433 * psi / ft, rtol=0.025)


def test_thermoplastic_sdr_equals_ring_buckling():
    # Timoshenko and Gere (1961) ch. 7: the SDR form is the ring formula with
    # r = D/t - 1 = SDR - 1.
    od = 6.625 * inch
    ratio = np.array([13.5, 17.0, 21.0, 26.0])
    assert_allclose(cl.thermoplastic_sdr(ratio, 400000 * psi, 0.38),
                    cl.elastic_ring_collapse(od, od / ratio, 400000 * psi, 0.38), rtol=1e-12)


def test_thermoplastic_sdr_refuses_impossible_ratio():
    with pytest.raises(ValueError, match="greater than 2"):
        cl.thermoplastic_sdr(2.0, 400000 * psi, 0.38)


# --- input checks ------------------------------------------------------------------


def test_timoshenko_refuses_bad_input():
    with pytest.raises(ValueError, match="less than half the outside diameter"):
        cl.timoshenko(0.2, 0.1, 35 * ksi, 0.01)
    with pytest.raises(ValueError, match="ellipticity"):
        cl.timoshenko(0.4, 0.01, 35 * ksi, 1.0)
    with pytest.raises(ValueError, match="ellipticity"):
        cl.timoshenko(0.4, 0.01, 35 * ksi, -0.01)
    with pytest.raises(ValueError, match="yield_strength"):
        cl.timoshenko(0.4, 0.01, -35 * ksi, 0.01)
    with pytest.raises(ValueError, match="poisson"):
        cl.timoshenko(0.4, 0.01, 35 * ksi, 0.01, poisson=0.5)
    with pytest.raises(ValueError, match="od"):
        cl.api_5c3(-0.4, 0.01, 55 * ksi)


def test_ellipticity_refuses_swapped_diameters():
    with pytest.raises(ValueError, match="dmin must not exceed dmax"):
        cl.ellipticity_from_diameters(0.40, 0.41)


def test_nan_propagates_as_unrated():
    # rigplan rule: unknown input -> unrated (nan), never assumed.
    assert np.isnan(cl.timoshenko(0.4, 0.01, float("nan"), 0.01))
    assert np.isnan(cl.api_5c3(0.4, float("nan"), 55 * ksi))
    assert cl.api_5c3_regime(0.4, float("nan"), 55 * ksi) == "unrated"


# --- properties (hypothesis) ----------------------------------------------------------

dims = st.tuples(
    st.floats(0.05, 1.0),        # od [m]
    st.floats(3.0, 150.0),       # D/t
    st.floats(20e3, 120e3),      # yield [psi]
)


@settings(max_examples=200)
@given(dims, st.floats(0.0, 0.2), st.floats(0.0, 0.2))
def test_timoshenko_falls_with_ellipticity(d, e1, e2):
    # Timoshenko and Gere (1961) ch. 7: initial ovality only lowers the pressure
    # at first yield.
    od, dt, y = d
    lo, hi = sorted((e1, e2))
    p_lo = cl.timoshenko(od, od / dt, y * psi, lo)
    p_hi = cl.timoshenko(od, od / dt, y * psi, hi)
    assert p_hi <= p_lo * (1 + 1e-12)


@settings(max_examples=200)
@given(dims, st.floats(1.0, 1.5), st.floats(0.0, 0.1))
def test_collapse_rises_with_wall(d, factor, e):
    # Timoshenko and Gere (1961) ch. 7 and API TR 5C3: a thicker wall (lower D/t)
    # never lowers the collapse pressure.
    od, dt, y = d
    thin, thick = od / dt, min(od / dt * factor, 0.49 * od)
    assert (cl.timoshenko(od, thick, y * psi, e)
            >= cl.timoshenko(od, thin, y * psi, e) * (1 - 1e-12))
    assert cl.api_5c3(od, thick, y * psi) >= cl.api_5c3(od, thin, y * psi) * (1 - 1e-9)
    e_pvc = 400000 * psi
    assert (cl.thermoplastic_sdr(od / thick, e_pvc, 0.38)
            >= cl.thermoplastic_sdr(od / thin, e_pvc, 0.38) * (1 - 1e-12))


@settings(max_examples=200)
@given(dims, st.floats(1.5e11, 2.2e11), st.floats(0.25, 0.35))
def test_timoshenko_round_pipe_is_the_lesser_limit(d, e_mod, nu):
    # Timoshenko and Gere (1961) ch. 7: for e = 0 the quadratic factors into
    # (p - 2 Sy / r)(p - p_cr) = 0, so collapse is the lesser of hoop yield and
    # elastic buckling.
    od, dt, y = d
    r = dt - 1
    p_yield = 2 * y * psi / r
    p_cr = 2 * e_mod / (1 - nu**2) / r**3
    p = cl.timoshenko(od, od / dt, y * psi, 0.0, e_mod, nu)
    assert_allclose(p, min(p_yield, p_cr), rtol=1e-9)


def test_thermoplastic_sdr_follows_the_depth_limits_ratio():
    # Code of Maryland Regulations 26.04.04.17, Table 1 (above): the depth limit
    # falls by 1085 / 136 = 7.98 from SDR 13.5 to SDR 26.  The F480 form
    # 1 / (SDR - 1)^3 falls by (25 / 12.5)^3 = 8.00; the variant
    # 1 / [SDR (SDR - 1)^2] would fall by 7.70.
    ratio = cl.thermoplastic_sdr(13.5, 400000 * psi, 0.38) / cl.thermoplastic_sdr(26, 400000 * psi, 0.38)
    assert_allclose(ratio, 1085 / 136, rtol=0.005)
