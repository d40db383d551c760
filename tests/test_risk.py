"""Probability of exceeding each limit (rigplan.engine.risk).

Each sample of the Monte Carlo is checked against the deterministic engine
run on that sample's inputs, and a uniform string with normal wall scatter
against the closed-form probability."""

import dataclasses
import math
import sys
from pathlib import Path

import numpy as np
import pytest
from numpy.testing import assert_allclose

from rigplan.engine.axial import running_loads
from rigplan.engine.collapse import timoshenko
from rigplan.engine.findings import LimitName
from rigplan.engine.hoisting import HoistPath, Rig, path_capacity
from rigplan.engine.materials import get_material
from rigplan.engine.planner import check_run, plan_landing
from rigplan.engine.rating import rate_joints
from rigplan.engine.risk import Scatter, draw, draw_fluids, evaluate, exceedance, risk_model, sample_inputs
from rigplan.engine.stringmodel import G, Closure, DesignFactors, Hole, JointSpec, Settings

INCH, FT, LBF, PSI = 0.0254, 0.3048, 4.4482216152605, 6894.757293168361   # NIST SP 811


def rig_with_limit(string_limit):
    """One hoisting path whose mast governs at the given string limit [N]."""
    def path(mast):
        return HoistPath("main line", lines=4, winch_line_pull=10 * mast,
                         rope_breaking_force=30 * mast, mast_rating=mast,
                         dead_load=2000 * LBF, overpull_reserve=5000 * LBF, dynamic_factor=1.1)
    a, b = (path_capacity(path(m)).string_limit for m in (1e5, 2e5))
    return Rig("test rig", (path(1e5 + (string_limit - a) * 1e5 / (b - a)),))


def tapered_specs(n=40, seed=3):
    """A small tapered casing-and-screen string: sump, 4 screens (entered
    ratings), A53 B, N-80 and 16 in A53 B, butt welds; invented figures for
    the engine comparison only (not check values)."""
    rng = np.random.default_rng(seed)
    kinds = ([("sump", "a53b", 12.75, 0.375)] + [("screen", "ss316l", 12.75, 0.375)] * 4
             + [("blank", "a53b", 12.75, 0.375)] * 14 + [("blank", "n80", 12.75, 0.5)] * 11
             + [("blank", "a53b", 16.0, 0.375)] * (n - 30))
    specs = []
    for i, (kind, material, od, wall) in enumerate(kinds):
        extra = {}
        if kind == "screen":
            extra = dict(weight_per_length=38 * LBF / FT, tensile_rating=150000 * LBF,
                         collapse_rating=300 * PSI)
        top = i == n - 1
        specs.append(JointSpec(
            f"J{i + 1}", kind, material, od=od * INCH, wall=wall * INCH, length=20 * FT,
            measured_length=float(rng.uniform(19.2, 20.6)) * FT,
            connection="none" if top else "butt_weld",
            weld_efficiency=None if top else (1.0 if material == "n80" else 0.85), **extra))
    return specs


@pytest.fixture(scope="module")
def floated_plan():
    specs = tapered_specs()
    joints = rate_joints(specs)
    hole = Hole(fluid_density=1150.0)
    peak = float(np.max(running_loads(joints, hole, Closure()).string_load))
    settings = Settings(fill_density=998.2, min_running_weight=2000 * LBF,
                        float_collar_positions=())
    plan = plan_landing(joints, hole, rig_with_limit(peak - 8e3), settings, Closure(5))
    assert plan.best_float is not None and plan.chosen.closure.valve_joint == 5
    return plan, specs


def pvc_demo_plan():
    """The bundled PVC demo job (thermoplastic ratings, float shoe)."""
    from rigplan.files.job import demo_dir, load_job, plan_job
    job = load_job(demo_dir("strings") / "cv12-pvc-floated.toml", "th30")
    return plan_job(job.plan, job.rig), job.plan.running_joints()


@pytest.mark.parametrize("wall, case", [("uniform", "steel"), ("normal", "steel"),
                                        ("normal", "pvc")])
def test_each_sample_equals_the_engine_on_its_inputs(floated_plan, wall, case):
    # Identity of the method: a sample is a deterministic run with the
    # sample's walls (as measured), weights, densities and weld efficiencies;
    # its largest load over capacity per limit is what rigplan.engine.axial and
    # rigplan.engine.planner.check_run (design factors 1) give on those inputs.
    plan, specs = floated_plan if case == "steel" else pvc_demo_plan()
    scatter = Scatter(wall=wall, hole_density_sd=0.03, fill_density_sd=0.03)
    rng = np.random.default_rng(11)
    fluids = draw_fluids(scatter, plan.hole.fluid_density, plan.best_float.fill_density, rng, 40)
    span = ((fluids[0].min(), fluids[0].max()), (fluids[1].min(), fluids[1].max()))
    model = risk_model(plan, specs, scatter, density_range=span)
    d = draw(model, rng, 40, fluids)
    got = evaluate(model, d)
    closure = plan.chosen.closure
    level = plan.chosen.loads.fill_level
    for i in range(40):
        joints, hole, fill, hook_limit = sample_inputs(model, d, i)
        loads = running_loads(joints, hole, closure, fill, level)
        check = check_run(joints, loads, closure, hook_limit - plan.dead_load,
                          dataclasses.replace(plan.settings, design=DesignFactors(1.0, 1.0, 1.0)),
                          hole, fill, plan.dead_load)
        hook = (loads.string_load + plan.dead_load) / hook_limit
        assert_allclose(got[LimitName.HOISTING][0][i], np.max(hook), rtol=1e-12)
        for name, util in ((LimitName.CONNECTION_TENSION, check.tension_utilization),
                           (LimitName.COLLAPSE, check.collapse_utilization),
                           (LimitName.BURST, check.burst_utilization)):
            want = float(np.nanmax(np.where(np.isfinite(util), util, 0.0)))
            assert_allclose(got[name][0][i], max(want, 0.0), rtol=1e-12, atol=1e-15,
                            err_msg=f"{name}, sample {i}")


def test_uniform_string_normal_wall_converges_to_the_product_of_joint_probabilities():
    # Closed form (independence; monotone transformation of a normal): an
    # empty float-shoe string of one size hangs in one fluid, so joint j sees
    # a fixed largest collapse load L_j (P_o at its bottom when it is
    # deepest).  Its Timoshenko rating rises with the wall, so it fails when
    # its wall is below t_j with R(t_j) = L_j, with probability
    # Phi((t_j - mu) / sigma).  Walls are independent, so
    # P(any joint fails) = 1 - prod_j (1 - Phi((t_j - mu) / sigma)).
    n = 12
    specs = [JointSpec(f"J{i + 1}", "blank", "a53b", od=16 * INCH, wall=0.25 * INCH, length=6.0,
                       ellipticity=0.01, connection="none" if i == n - 1 else "butt_weld",
                       weld_efficiency=None if i == n - 1 else 0.85) for i in range(n)]
    joints = rate_joints(specs)
    rho = 1380.0
    hole = Hole(fluid_density=rho)
    empty = float(np.sum(joints.length)) + 100.0
    loads = running_loads(joints, hole, Closure(0), 998.2, empty)
    settings = Settings(fill_density=998.2, float_collar_positions=())
    plan = plan_landing(joints, hole, rig_with_limit(5e6), settings, Closure(0))
    # the plan's own fill schedule keeps the pipe within its window; here the
    # run is the empty one, so give the plan that run
    chosen = dataclasses.replace(plan.chosen, loads=loads)
    plan = dataclasses.replace(plan, chosen=chosen)
    scatter = Scatter(wall="normal", ellipticity_spread=0.0, weld_efficiency_sd=0.0,
                      weight_sd=0.0, hole_density_sd=0.0, fill_density_sd=0.0, indicator_sd=0.0)
    result = exceedance(plan, specs, scatter, samples=200_000, seed=5)
    got = {lim.name: lim for lim in result.limits}["collapse"]
    a53b = get_material("a53b")
    t_nom = 0.25 * INCH
    t_min = t_nom * (1 - a53b.wall_under_tolerance)
    mu, sigma = 0.5 * (t_nom + t_min), (t_nom - t_min) / 4
    walls = np.linspace(0.5 * t_min, t_nom * 1.2, 20001)
    ratings = timoshenko(16 * INCH, walls, a53b.yield_strength, 0.01, a53b.youngs_modulus,
                         a53b.poisson)
    hold = 1.0
    for load in loads.collapse_max:
        t_star = float(np.interp(load, ratings, walls))
        hold *= 1 - 0.5 * math.erfc(-(t_star - mu) / (sigma * math.sqrt(2)))
    expected = 1 - hold
    assert 0.02 < expected < 0.98            # the case is not trivial
    # within four standard errors of the Monte Carlo estimate
    assert abs(got.probability - expected) <= 4 * math.sqrt(expected * (1 - expected) / 200_000)


def test_same_seed_same_result_and_progress_reported(floated_plan):
    plan, specs = floated_plan
    seen = []
    a = exceedance(plan, specs, samples=3000, seed=7, progress=lambda d, t: seen.append((d, t)))
    b = exceedance(plan, specs, samples=3000, seed=7)
    assert repr(a) == repr(b)          # nan (unrated) compares unequal to itself
    assert seen[-1] == (3000, 3000) and all(d <= t for d, t in seen)
    names = [lim.name for lim in a.limits]
    assert names[0] == "hoisting capacity" and "collapse" in names
    for lim in a.limits:
        assert 0.0 <= lim.probability <= 1.0
    with pytest.raises(ValueError):
        exceedance(plan, specs, samples=0)


def test_cli_risk_json_and_bad_input(capsys):
    # common practice, no source: the JSON lists every limit with its
    # probability; a bad sample count is one line and exit status 2.
    from rigplan.cli import main
    from rigplan.files.job import demo_dir
    plan = str(demo_dir("strings") / "cv7-16in-floated.toml")
    assert main(["risk", plan, "--rig", "mw80", "--samples", "3000", "--seed", "2",
                 "--format", "json"]) == 0
    import json
    doc = json.loads(capsys.readouterr().out)
    names = [lim["name"] for lim in doc["limits"]]
    assert names[0] == "hoisting capacity" and "collapse" in names
    assert all(0.0 <= lim["probability"] <= 1.0 for lim in doc["limits"])
    assert doc["samples"] == 3000 and doc["cautions"]
    assert main(["risk", plan, "--rig", "mw80", "--samples", "0"]) == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and "--samples" in err[0]
    assert main(["risk", plan, "--rig", "mw80", "--samples", "500"]) == 0
    assert "Probability of exceeding each limit" in capsys.readouterr().out
