"""Burst (internal yield) ratings (rigplan.engine.burst)."""

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st
from numpy.testing import assert_allclose

from _units import inch, ksi, psi
from rigplan.engine.burst import barlow
from rigplan.engine.tubulars import minimum_wall

# API casing tables (API 5C2 / API 5CT), internal yield pressure by API TR 5C3,
# 0.875 * 2 Y t / D on the specified wall, rounded to 10 psi (from memory,
# recomputed; API TR 5C3 tables).
API_BURST = [
    # OD in, wall in, yield psi, burst psi
    (7.0, 0.317, 55000, 4360),     # 7 in 23 lb/ft J-55
    (7.0, 0.540, 80000, 10800),    # 7 in 38 lb/ft N-80
    (9.625, 0.395, 80000, 5750),   # 9-5/8 in 40 lb/ft N-80
    (9.625, 0.472, 110000, 9440),  # 9-5/8 in 47 lb/ft P-110
    (13.375, 0.380, 55000, 2730),  # 13-3/8 in 54.5 lb/ft J-55
    (16.0, 0.375, 40000, 1640),    # 16 in 65 lb/ft H-40
]


@pytest.mark.parametrize("od, wall, y, expected", API_BURST)
def test_barlow_api_tables(od, wall, y, expected):
    p = barlow(od * inch, wall * inch, y * psi)
    assert_allclose(p / psi, expected, atol=10.0)  # tables round to 10 psi


def test_barlow_vectorized():
    # Same API table, one array call.
    od, wall, y, expected = (np.array(c, dtype=float) for c in zip(*API_BURST))
    p = barlow(od * inch, wall * inch, y * psi)
    assert p.shape == (6,)
    assert_allclose(p / psi, expected, atol=10.0)


@given(st.floats(0.05, 1.0), st.floats(5.0, 100.0), st.floats(20e3, 120e3))
def test_minimum_wall_with_factor_one_equals_api_factor(od, dt, y):
    # API TR 5C3: the 0.875 factor is the 12.5 % wall tolerance, so Barlow on the
    # minimum wall with factor 1 is the API rating on the specified wall.
    wall = od / dt
    assert_allclose(barlow(od, minimum_wall(wall, 0.125), y * psi, wall_factor=1.0),
                    barlow(od, wall, y * psi), rtol=1e-12)


def test_barlow_refuses_bad_input():
    with pytest.raises(ValueError, match="wall_factor"):
        barlow(0.2, 0.01, 35 * ksi, wall_factor=0.0)
    with pytest.raises(ValueError, match="wall_factor"):
        barlow(0.2, 0.01, 35 * ksi, wall_factor=1.2)
    with pytest.raises(ValueError, match="less than half"):
        barlow(0.2, 0.11, 35 * ksi)
    with pytest.raises(ValueError, match="yield_strength"):
        barlow(0.2, 0.01, 0.0)


def test_barlow_unrated_yield_gives_nan():
    # rigplan rule: an unknown strength is unrated (nan).
    assert np.isnan(barlow(0.2, 0.01, float("nan")))
