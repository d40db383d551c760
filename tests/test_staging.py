"""Two-stage setting (rigplan.engine.staging)."""

import numpy as np
import pytest
from numpy.testing import assert_allclose

from rigplan.engine.axial import running_loads
from rigplan.engine.findings import LimitName
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
    assert_allclose(plan.stage2_peak_string_load, b * (n - plan.split), rtol=1e-9)


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


# ---------------------------------------------------------------------------
# The staged step table, hook and string loads, the lowering, the landed state

from rigplan.engine.staging import StagePhase, lowering_positions, staged_plan_at  # noqa: E402


def test_lowering_on_the_landing_string_is_in_the_step_table():
    # Buoyancy of open pipe in one fluid (Bourgoyne et al., Applied Drilling
    # Engineering, 1986, ch. 7): a joint weighs b = W (1 - rho/rho_s), the
    # landing string q = w (1 - rho/rho_s) per metre.  Stage 1 (p joints)
    # on a landing string of length L: string load b p + q L; the hook load
    # adds the dead load D.  Stage 2 from the floor: b (k - p).  Margins on
    # the hook: (limit + D - hook load) / (limit + D).
    n, length = 160, 6.0
    j = uniform(n, length=length)
    rho = 1150.0
    hole = Hole(rho)
    wpl, dead, jl = 220.0, 15e3, 9.144
    limit = 0.6 * running_loads(j, hole, Closure()).string_load[-1]
    plan = plan_two_stages(j, hole, limit, wpl, 2e6, STEEL, 1.0, dead_load=dead,
                           joint_length=jl)
    p = plan.split
    b = j.weight[0] * (1 - rho / STEEL)
    q = wpl * (1 - rho / STEEL)
    release = length * (n - p)
    st = plan.steps
    phase = np.array([str(x) for x in st.phase])
    low = phase == StagePhase.LOWERING
    # one row per landing-string joint, the last at the release depth
    assert low.sum() == int(np.ceil(release / jl))
    assert_allclose(st.landing_string_length[low][-1], release, rtol=1e-12)
    assert_allclose(np.diff(st.landing_string_length[low])[:-1], jl, rtol=1e-9)
    assert_allclose(st.string_load[low], b * p + q * st.landing_string_length[low], rtol=1e-9)
    assert_allclose(st.bottom_depth[low], length * p + st.landing_string_length[low], rtol=1e-12)
    assert st.release_row == int(np.flatnonzero(low)[-1])
    # stage 1 and stage 2 from the floor
    s1, s2 = phase == StagePhase.STAGE1, phase == StagePhase.STAGE2
    assert_allclose(st.string_load[s1], b * np.arange(1, p + 1), rtol=1e-9)
    assert_allclose(st.string_load[s2], b * np.arange(1, n - p + 1), rtol=1e-9)
    assert_allclose(st.shoe_depth[s2], length * n, rtol=1e-12)      # the shoe stays landed
    # hook load = string load + dead load, row by row and in the summary
    assert_allclose(st.hook_load, st.string_load + dead, rtol=1e-12)
    assert_allclose(plan.stage1_peak_string_load, b * p, rtol=1e-9)
    assert_allclose(plan.release_string_load, b * p + q * release, rtol=1e-9)
    assert_allclose(plan.release_hook_load, b * p + q * release + dead, rtol=1e-9)
    assert_allclose(plan.stage2_peak_hook_load, b * (n - p) + dead, rtol=1e-9)
    assert_allclose(st.margin, (limit + dead - st.hook_load) / (limit + dead), rtol=1e-9)
    # every check carries its real load and capacity
    by_name = {c.name: c for c in plan.checks}
    assert_allclose(by_name[LimitName.LOWERING_HOISTING].load, plan.release_hook_load,
                    rtol=1e-12)
    assert_allclose(by_name[LimitName.LOWERING_HOISTING].capacity, limit + dead, rtol=1e-12)
    assert_allclose(by_name[LimitName.LANDING_STRING].load, b * p + q * release,
                    rtol=1e-9)
    assert by_name[LimitName.LANDING_STRING].capacity == 2e6
    gov = plan.governing_check
    assert gov.name == plan.governing and gov.load > 0 and gov.capacity > 0
    assert_allclose(gov.margin, (gov.capacity - gov.load) / gov.capacity, rtol=1e-9)


def test_lowering_through_a_low_fluid_level():
    # Archimedes for open pipe with fluid inside and out to the same level
    # h_o (Bourgoyne et al. 1986, ch. 7): a pipe weighs its air weight less
    # rho g A_s times its length below h_o.  Stage 1 (top at L, bottom at
    # L + Z_1) on a landing string of length L:
    #   F = W_1 - rho g A_s max(0, L + Z_1 - max(L, h_o))
    #       + w L - rho g (w / (rho_s g)) max(0, L - h_o)
    n, length, p = 60, 6.0, 20
    j = uniform(n, length=length)
    rho, h_o = 1150.0, 200.0
    hole = Hole(rho, fluid_level=h_o)
    wpl, jl = 220.0, 9.144
    plan = staged_plan_at(j, hole, p, 5e6, wpl, 2e6, STEEL, 1.0, joint_length=jl)
    a_s = np.pi / 4 * (j.od[0] ** 2 - j.bore[0] ** 2)
    z1 = length * p
    pos = lowering_positions(length * (n - p), jl)
    sub = np.maximum(0.0, pos + z1 - np.maximum(pos, h_o))
    expected = (j.weight[0] * p - rho * G * a_s * sub
                + wpl * pos - rho * G * (wpl / (STEEL * G)) * np.maximum(0.0, pos - h_o))
    low = np.array([str(x) == StagePhase.LOWERING for x in plan.steps.phase])
    assert_allclose(plan.steps.string_load[low], expected, rtol=1e-9)
    assert_allclose(plan.lowering_peak_string_load, expected.max(), rtol=1e-9)


def test_landed_state_of_each_stage():
    # Effective tension (Lubinski 1951; Bourgoyne et al. 1986, ch. 7):
    # its gradient along an open pipe in one fluid is the buoyed weight per
    # metre, b/L_j.  Released, stage 1 stands on bottom: its top is free, so
    # T_eff = -S there (S: stage 2's set-down weight on it) and -(b p + S)
    # at the shoe; the true force at its top is T_eff - P(top) A_s.  Stage 2
    # hangs from the floor and sets S down: T_eff = -S at its bottom, and
    # its neutral point is S / (b/L_j) above it.
    n, length, p = 80, 6.0, 30
    j = uniform(n, length=length)
    rho = 1150.0
    hole = Hole(rho)
    set_down = 20e3
    plan = staged_plan_at(j, hole, p, 5e6, 220.0, 2e6, STEEL, 1.0, set_down_weight=set_down)
    b = j.weight[0] * (1 - rho / STEEL)
    release = length * (n - p)
    a_s = np.pi / 4 * (j.od[0] ** 2 - j.bore[0] ** 2)
    one = plan.stage1_landed
    assert_allclose(one.top_depth[-1], release, rtol=1e-12)
    assert_allclose(one.bottom_depth[0], length * n, rtol=1e-12)
    assert_allclose(one.effective_top[-1], -set_down, rtol=1e-9)
    assert_allclose(one.effective_bottom[0], -(b * p + set_down), rtol=1e-9)
    assert_allclose(one.true_force_top[-1], -set_down - rho * G * release * a_s, rtol=1e-9)
    assert_allclose(plan.stage1_neutral_point, release, rtol=1e-12)
    two = plan.stage2_landed
    assert_allclose(two.effective_bottom[0], -set_down, rtol=1e-9)
    assert_allclose(plan.stage2_neutral_point, release - set_down / (b / length), rtol=1e-9)
    both = plan.landed
    assert len(both.top_depth) == n
    assert_allclose(both.top_depth[p], release - length, rtol=1e-12)


def test_planner_reports_the_staged_limit_with_its_load_and_capacity():
    # The planner's governing limit for a staged plan is the stage check with
    # the least margin, with its real load and capacity (load = hook load at
    # the worst row, capacity = hook limit); the JSON step table carries the
    # lowering rows.  Identities of the method; no outside value.
    from rigplan.engine.hoisting import HoistPath, LandingString, Rig
    from rigplan.engine.planner import LANDS_STAGED, plan_landing
    from rigplan.engine.stringmodel import Settings
    from rigplan.present.report import plan_dict
    n = 120
    base = uniform(n)
    j = JointArrays(**{**base.__dict__, "body_rating": np.full(n, 5e6),
                       "connection_rating": np.full(n, 5e6), "burst_rating": np.full(n, 5e7),
                       "collapse_rating": np.full(n, 0.5e6),      # floating cannot work
                       "modulus": np.full(n, 200e9), "yield_strength": np.full(n, 241e6)})
    hole = Hole(1150.0, diameter=20 * INCH)
    full = running_loads(j, hole, Closure()).string_load[-1]
    dead = 12e3
    rig = Rig("test rig", (HoistPath("main", mast_rating=0.6 * full + dead, dead_load=dead),),
              landing_string=LandingString("drill pipe", 220.0, 2e6))
    lp = plan_landing(j, hole, rig, Settings(float_collar_positions=()), Closure())
    assert lp.verdict == LANDS_STAGED
    gov, c = lp.governing, lp.stages.governing_check
    assert gov.name == c.name and gov.load == c.load and gov.capacity == c.capacity
    assert gov.load > 0 and gov.capacity > 0
    doc = plan_dict(lp)
    rows = doc["steps"]
    assert len(rows) == lp.stages.steps.n > n
    release = [r for r in rows if r["phase"] == "lowering"][-1]
    assert_allclose(release["hook_load"], lp.stages.release_hook_load, rtol=1e-12)
    assert_allclose(release["hook_load"] - release["string_load"], dead, rtol=1e-9)
    assert doc["stages"]["release_hook_load"] == release["hook_load"]


def test_stage1_on_bottom_is_checked_for_buckling():
    # Released, stage 1 stands on bottom: below its top it is in effective
    # compression up to its whole buoyed weight (Lubinski 1951), with no
    # set-down weight at all.  A screen there above its sinusoidal buckling
    # load (Lubinski 1950, vertical hole) makes the staged plan fail, and
    # the reason names stage 1 on bottom, not the set-down weight.
    from rigplan.engine.hoisting import HoistPath, LandingString, Rig
    from rigplan.engine.planner import CANNOT_LAND, PlanCode, plan_landing
    from rigplan.engine.stringmodel import Settings
    n = 120
    base = uniform(n)
    kind = ("screen",) * 3 + ("blank",) * (n - 3)
    j = JointArrays(**{**base.__dict__, "kind": kind, "body_rating": np.full(n, 5e6),
                       "connection_rating": np.full(n, 5e6), "burst_rating": np.full(n, 5e7),
                       "collapse_rating": np.full(n, 0.5e6),
                       "modulus": np.full(n, 200e9), "yield_strength": np.full(n, 241e6)})
    hole = Hole(1150.0, diameter=20 * INCH)
    full = running_loads(j, hole, Closure()).string_load[-1]
    rig = Rig("test rig", (HoistPath("main", mast_rating=0.6 * full),),
              landing_string=LandingString("drill pipe", 220.0, 2e6))
    lp = plan_landing(j, hole, rig, Settings(float_collar_positions=()), Closure(0))
    assert lp.verdict == CANNOT_LAND and lp.staged
    assert lp.stages.feasible                       # every hoisting check holds
    assert lp.governing.name == "screen buckling" and lp.governing.joint <= 3
    codes = [f.code for f in lp.reasons]
    assert PlanCode.STAGE1_BUCKLES_ON_BOTTOM in codes
    # stage 1's compression at the bottom of joint 3 is the buoyed weight of
    # joints 3..split (effective tension gradient = buoyed weight per metre)
    b = j.weight[0] * (1 - 1150.0 / STEEL)
    assert_allclose(lp.buckling.compression[2], b * (lp.stages.split - 2), rtol=1e-6)


# ---------------------------------------------------------------------------
# As run: a staged job stays staged once joints are in the hole

def _staged_job(tmp_path):
    """A string that lands only in stages on the bundled MW-80 rig: the
    CV-9 layout without its screens (so stage 1 can stand on bottom)."""
    from pathlib import Path
    root = Path(__file__).resolve().parents[1]
    text = (root / "strings" / "cv9-14in-staged.toml").read_text()
    a = text.index('[[section]]\nkind = "screen"')
    b = text.index("[[section]]", a + 5)
    text = (text[:a] + text[b:]).replace("collar_joint = 4", "collar_joint = 3")
    plan = tmp_path / "staged.toml"
    plan.write_text(text)
    return plan, root / "rigs" / "mw80.toml"


def _check_as_run(capsys, plan, rig):
    import json
    from rigplan.cli import main
    code = main(["check", str(plan), "--rig", str(rig), "--as-run", "--format", "json"])
    return code, json.loads(capsys.readouterr().out)


def test_staged_job_stays_staged_as_run(tmp_path, capsys):
    # The run log is the site record (rigplan.files.runlog); once joints are
    # in the hole a staged job is still planned in stages with the split
    # planned before the first joint: stage 1 from the floor, lowered on the
    # landing string and released, then stage 2 from the floor with the
    # shoe kept at its landed depth.  Identities of the plan; no outside value.
    from rigplan.files.job import load_job, plan_job
    from rigplan.files.runlog import RunLog, log_path_for
    plan, rig = _staged_job(tmp_path)
    job = load_job(plan, rig)
    fresh = plan_job(job.plan, job.rig)
    assert fresh.verdict == "lands in stages" and fresh.staged
    p = fresh.stages.split
    labels = [j.label for j in job.plan.running_joints()]
    with RunLog(log_path_for(plan)) as log:
        log.record_run(labels[0], 6.2)                    # one joint, measured
    code, doc = _check_as_run(capsys, plan, rig)
    assert doc["verdict"] == "lands in stages" and code == 0
    assert doc["stages"]["split"] == p
    phases = [s["phase"] for s in doc["steps"]]
    assert phases.index("lowering") == p and phases[-1] == "stage 2"
    assert_allclose(doc["steps"][0]["shoe_depth"], 6.2, rtol=1e-12)   # the measured joint
    # well into stage 2: still staged, same split, the shoe stays landed
    with RunLog(log_path_for(plan)) as log:
        for label in labels[1:p + 3]:
            log.record_run(label, None)
    code, doc = _check_as_run(capsys, plan, rig)
    assert doc["verdict"] == "lands in stages" and doc["stages"]["split"] == p
    s2 = [s for s in doc["steps"] if s["phase"] == "stage 2"]
    total = doc["stages"]["shoe_depth"]
    assert all(abs(s["shoe_depth"] - total) < 1e-9 for s in s2)
    release = [s for s in doc["steps"] if s["phase"] == "lowering"][-1]
    assert_allclose(release["bottom_depth"], total, rtol=1e-12)


def test_staged_split_stays_at_its_joint_when_one_is_set_aside(tmp_path, capsys):
    # A joint set aside on site leaves the running order one shorter: the
    # top of stage 1 is still the same joint (by its label), as the crew was
    # told.  Rule of the project (one name per joint); no outside value.
    from rigplan.files.job import load_job, plan_job
    from rigplan.files.runlog import RunLog, log_path_for
    plan, rig = _staged_job(tmp_path)
    job = load_job(plan, rig)
    fresh = plan_job(job.plan, job.rig)
    p = fresh.stages.split
    labels = [j.label for j in job.plan.running_joints()]
    with RunLog(log_path_for(plan)) as log:
        log.record_run(labels[0], None)
        log.reject(labels[1], "dented")
    code, doc = _check_as_run(capsys, plan, rig)
    assert doc["verdict"] == "lands in stages"
    assert doc["stages"]["split"] == p - 1
    release = [s for s in doc["steps"] if s["phase"] == "lowering"][-1]
    assert release["label"] == labels[p - 1]


# ---------------------------------------------------------------------------
# Stage 1 released on bottom, or held until its grout has set

def test_stage1_held_until_grout_hangs_and_on_bottom_stands(tmp_path):
    # On bottom, stage 1 carries its whole buoyed weight (and stage 2's
    # set-down) at its shoe: effective tension there is minus that load
    # (Archimedes: buoyed weight = sum W_i (1 - rho_f / rho_i), open-ended).
    # Held on the landing string until its grout sets, it lands as it hung at
    # release: in tension, zero effective tension at the open shoe (common
    # practice, no source: the set grout carries it from then on).
    from rigplan.files.job import load_job, rated_joints
    from rigplan.engine.staging import staged_plan_at
    plan, rig = _staged_job(tmp_path)
    job = load_job(plan, rig)
    joints = rated_joints(job.plan)
    hole, ls = job.plan.hole, job.rig.landing_string
    split = 40
    args = (joints, hole, split, 1e7, ls.weight_per_length, ls.tensile_rating, ls.density)
    on_bottom = staged_plan_at(*args, set_down_weight=0.0)
    held = staged_plan_at(*args, set_down_weight=0.0, held_until_grout=True)
    rho = job.plan.hole.fluid_density
    from rigplan.engine.materials import LIBRARY
    steel = LIBRARY["a53b"].density
    buoyed = float(np.sum(joints.weight[:split])) * (1 - rho / steel)
    assert on_bottom.stage1_landed.effective_bottom[0] == pytest.approx(-buoyed, rel=1e-6)
    assert held.stage1_landed.effective_bottom[0] == pytest.approx(0.0, abs=1e-6 * buoyed)
    assert np.all(held.stage1_landed.effective_top >= -1e-6 * buoyed)
    assert np.isnan(held.stage1_neutral_point)


def test_after_grout_needs_a_grout_table(tmp_path):
    from rigplan.errors import InputError
    from rigplan.files.formats.planfile import read_plan
    plan, _ = _staged_job(tmp_path)
    text = plan.read_text()
    a = text.index("[grout]")
    b = text.index("[design_factors]")
    plan.write_text(text[:a] + text[b:])
    with pytest.raises(InputError, match="stage1_release"):
        read_plan(plan)
