"""Two-stage setting (rigplan.engine.staging)."""

import numpy as np
from numpy.testing import assert_allclose

from rigplan.engine.axial import running_loads
from rigplan.engine.staging import StagingCode, landing_string_load, plan_two_stages
from rigplan.engine.stringmodel import G, Closure, Hole, JointArrays

from _units import inch as INCH  # NIST SP 811
STEEL = 7850.0


def uniform(n, od=14 * INCH, wall=0.375 * INCH, length=6.0):
    d = od - 2 * wall
    w = STEEL * G * np.pi / 4 * (od ** 2 - d ** 2) * length
    f = lambda v: np.full(n, float(v))
    return JointArrays(label=tuple(f"J{i + 1}" for i in range(n)), kind=("blank",) * n,
                       length=f(length), od=f(od), bore=f(d), weight=f(w),
                       collapse_rating=f(np.nan), burst_rating=f(np.nan),
                       body_rating=f(np.nan), connection_rating=f(np.nan))


def test_landing_string_buoyed_weight():
    # Identity (ADE ch. 7, buoyancy of an open pipe): fully submerged, the
    # load is w L (1 - rho_f / rho_s); above the fluid level it is w L.
    hole = Hole(1100.0)
    assert_allclose(landing_string_load(300.0, 210.0, STEEL, hole),
                    210.0 * 300.0 * (1 - 1100.0 / STEEL), rtol=1e-12)
    dry = Hole(1100.0, fluid_level=500.0)
    assert_allclose(landing_string_load(300.0, 210.0, STEEL, dry), 210.0 * 300.0, rtol=1e-12)


def test_best_split_matches_brute_force_and_closed_form():
    # Derived for a uniform open string (BF = 1 - rho/rho_s, buoyed weight
    # per joint b, landing string buoyed per metre q, total length Z):
    #   stage 1 peak(p) = b p + q (Z - 6 p)   (lowered to depth)
    #   stage 2 peak(p) = b (N - p)
    # The least margin max_p min(...) is found by brute force over every p.
    n = 160
    j = uniform(n)
    hole = Hole(1150.0)
    wpl = 220.0
    limit = 0.6 * running_loads(j, hole, Closure()).string_load[-1]
    plan = plan_two_stages(j, hole, limit, wpl, 2e6, STEEL, 1.0)
    b = j.weight[0] * (1 - 1150.0 / STEEL)
    q = wpl * (1 - 1150.0 / STEEL)
    z = 6.0 * n
    p = np.arange(1, n)
    s1 = np.maximum(b * p, b * p + q * (z - 6.0 * p))
    s2 = b * (n - p)
    m = np.minimum((limit - s1) / limit, (limit - s2) / limit)
    best = int(p[np.argmax(m)])
    assert plan.feasible
    assert_allclose(plan.least_margin, m.max(), rtol=1e-9)
    assert abs(plan.split - best) <= 1
    assert_allclose(plan.stage2_peak, b * (n - plan.split), rtol=1e-9)


def test_unrated_landing_string_is_refused():
    # Rule of the project: an unrated part is never assumed.
    plan = plan_two_stages(uniform(20), Hole(1100.0), 1e6, 200.0, float("nan"))
    assert not plan.feasible and plan.reason.code == StagingCode.NO_TENSILE_RATING


def test_split_search_with_a_weak_landing_string_matches_brute_force():
    # Derived as above, with the landing string's own tensile margin
    # (rating / DF - load) / (rating / DF) also in the minimum: the stage-1
    # margin is then not monotone in the split, and the search must still
    # find the brute-force optimum.
    n = 120
    j = uniform(n)
    hole = Hole(1150.0)
    wpl, rating, df = 300.0, 500e3, 1.6
    limit = 0.7 * running_loads(j, hole, Closure()).string_load[-1]
    plan = plan_two_stages(j, hole, limit, wpl, rating, STEEL, df)
    b = j.weight[0] * (1 - 1150.0 / STEEL)
    q = wpl * (1 - 1150.0 / STEEL)
    p = np.arange(1, n)
    lowered = b * p + q * (6.0 * n - 6.0 * p)
    s1 = np.maximum(b * p, lowered)
    allow = rating / df
    m = np.minimum.reduce([(limit - s1) / limit, (allow - lowered) / allow,
                           (limit - b * (n - p)) / limit])
    assert_allclose(plan.least_margin, m.max(), rtol=1e-9)
