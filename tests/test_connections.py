"""Connection tension capacity (rigplan.engine.connections)."""

import numpy as np
import pytest
from numpy.testing import assert_allclose

from _units import inch, lbf, psi
from rigplan.engine.connections import (
    ENTERED_RATING_KINDS,
    UW12_BUTT_WELD_EFFICIENCY,
    butt_weld_capacity,
    connection_capacity,
)
from rigplan.engine.stringmodel import CONNECTION_KINDS
from rigplan.engine.tubulars import body_yield

# API casing tables: 7 in 23 lb/ft J-55 body yield 366,000 lbf (from memory,
# recomputed with API TR 5C3 on the specified wall).
BODY_7IN_J55 = body_yield(7 * inch, 0.317 * inch, 55000 * psi)


def test_body_reference_value():
    # API casing tables (from memory, recomputed): 366,000 lbf.
    assert_allclose(BODY_7IN_J55 / lbf, 366000, atol=500)


@pytest.mark.parametrize("inspection, efficiency", [
    # ASME BPVC Section VIII Div. 1, Table UW-12, double-welded butt joint:
    # full, spot and no radiography (reference points only).
    ("full_radiography", 1.0),
    ("spot_radiography", 0.85),
    ("no_radiography", 0.70),
])
def test_uw12_reference_efficiencies(inspection, efficiency):
    assert UW12_BUTT_WELD_EFFICIENCY[inspection] == efficiency
    assert_allclose(butt_weld_capacity(BODY_7IN_J55, efficiency) / lbf, efficiency * 366000,
                    atol=500)


def test_butt_weld_needs_an_efficiency():
    # string mechanics (ADE 1986), tension capacity: butt weld = efficiency x body
    # yield; no efficiency -> unrated, never assumed.
    assert np.isnan(connection_capacity("butt_weld", BODY_7IN_J55))
    assert_allclose(connection_capacity("butt_weld", BODY_7IN_J55, weld_efficiency=0.85),
                    0.85 * BODY_7IN_J55, rtol=1e-12)


@pytest.mark.parametrize("kind", ENTERED_RATING_KINDS)
def test_entered_kinds_are_unrated_without_a_rating(kind):
    # string mechanics (ADE 1986): threaded and coupled, spline-lock and flush
    # joints take the rated value entered; an unrated connection stays unrated.
    assert np.isnan(connection_capacity(kind, BODY_7IN_J55))
    assert np.isnan(connection_capacity(kind, BODY_7IN_J55, weld_efficiency=1.0))
    assert connection_capacity(kind, BODY_7IN_J55, entered_rating=250000 * lbf) == 250000 * lbf


def test_integral_and_none():
    # stringmodel.CONNECTION_KINDS: "integral" is the same piece (body);
    # "none" is nothing above (infinite capacity, the body governs).
    assert connection_capacity("integral", BODY_7IN_J55) == BODY_7IN_J55
    assert connection_capacity("none", BODY_7IN_J55) == np.inf
    assert connection_capacity("none", BODY_7IN_J55, entered_rating=1.0) == np.inf


def test_entered_rating_wins_for_a_weld():
    # rigplan rule: an entered rating (e.g. from a weld qualification) wins.
    assert connection_capacity("butt_weld", BODY_7IN_J55, 0.85, 100000.0) == 100000.0


def test_arrays():
    body = np.array([1e6, 2e6, np.nan])
    assert_allclose(connection_capacity("butt_weld", body, 0.7), [0.7e6, 1.4e6, np.nan],
                    rtol=1e-12)
    assert connection_capacity("spline", body).shape == (3,)
    assert np.all(np.isnan(connection_capacity("spline", body)))


def test_every_model_kind_is_handled():
    for kind in CONNECTION_KINDS:
        connection_capacity(kind, 1e6, 0.85, None)


def test_bad_input_is_refused():
    with pytest.raises(ValueError, match="unknown connection kind 'bayonet'"):
        connection_capacity("bayonet", 1e6)
    with pytest.raises(ValueError, match="efficiency"):
        connection_capacity("butt_weld", 1e6, weld_efficiency=1.2)
    with pytest.raises(ValueError, match="efficiency"):
        butt_weld_capacity(1e6, 0.0)
    with pytest.raises(ValueError, match="body_yield"):
        butt_weld_capacity(-1e6, 0.85)
    with pytest.raises(ValueError, match="rating"):
        connection_capacity("threaded_coupled", 1e6, entered_rating=-5.0)
