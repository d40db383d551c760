"""Performance figures for rigplan.

Usage::

    python benchmarks/run.py [--json] [--repeat N] [--no-tui] [--quick]

Every timed figure is the median of repeated runs in this process after one
untimed run (``--repeat``, default 5; 3 at 100,000 joints), reported with
the fastest and slowest run beside it; ``tui_record_p95_ms`` is the 95th
percentile over 50 recorded joints.  ``--quick`` leaves out the 100,000-joint
plans (and so the growth exponents).  The JSON is one object; its keys:

``plan_ms_{1000,10000,100000}_{uniform,tapered,topups}``
    :func:`rigplan.engine.planner.plan_landing` on a string of that many
    joints of one family (:func:`family_case`):

    * ``uniform``: one size and wall throughout; it lands open-ended.
    * ``tapered``: the size or wall changes every 10 joints (three sections
      in turn); it lands open-ended.
    * ``topups``: a float collar on joint 1 and a hoisting limit under the
      open-ended load, so the planner floats it; the fill window lets the
      crew carry the fill five joints at a time, so the chosen schedule tops
      up every 5 joints, all the way down.

    Each family is built so that every size takes the same path through the
    planner (same verdict, same options tried), and the figures of one
    family can be compared: the pipe is thermoplastic casing whose density
    equals the hole fluid's (it hangs neutral, so no length overloads it),
    with steel joints at the bottom for weight.  A 100,000-joint string is
    600 km or more of pipe: a timing device, not a well.
``growth_{uniform,tapered,topups}``
    ``log(t_100000 / t_1000) / log(100)`` for one family, ``t`` the mean CPU
    time of the plan (the machine is shared: another session's load can
    inflate the wall time of one size and not another); 1 is linear in
    joints, 2 quadratic.  ``details`` also give it on the wall-time medians
    and on the fastest runs.
``ratio_vs_reference_1000``, ``ratio_vs_tight_loop_1000``
    The running loads of a 1,000-joint string (screens, a reducer, a float
    collar, topped up every 5 joints: :func:`synthetic_case`) by the
    per-joint, per-step reference (``benchmarks/reference.py``) and by a
    tight pure-Python loop, over :func:`rigplan.engine.axial.running_loads`
    on the same case in the same run.  ``agreement`` holds each baseline's
    worst difference from the engine over its tolerance (<= 1 passes).
``previous_engine_ms_10000_tapered``
    The previous vectorized engine (interfaces x steps, kept in
    ``benchmarks/reference.py``) on the running loads of the 10,000-joint
    tapered string with a top-up every 5 joints, against
    ``engine_ms_10000_tapered`` (the engine on the same).
``risk_s_100k``
    :func:`rigplan.engine.risk.exceedance` with 100,000 samples on a
    200-joint tapered string with screens and a float collar.
``check_json_s_10000``, ``check_text_s_10000``
    A whole ``rigplan check`` process (``--format json``; text with the
    long tables summarized) on a 10,000-joint plan file whose section
    changes every 10 joints, from process start to exit.
``tui_start_s``
    Cold start of the terminal app to its first frame (fresh process).
``tui_record_p95_ms``
    Pilot: a 550-joint plan with 500 joints already in its run log; the
    record key ``r`` then Enter, 50 times; from the Enter that commits the
    joint to the first screen update that shows it.
``spread``, ``targets``, ``details``, ``messages``, ``machine``
    Fastest and slowest run per figure; each target with ``met``; what each
    plan did; why a figure is missing; where it was measured.

Every string here is invented for timing.  The exit code is 1 when a
baseline disagrees with the engine.
"""

from __future__ import annotations

import argparse
import json
import math
import os
import platform
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

_HERE = Path(__file__).resolve().parent
for _p in (str(_HERE.parent), str(_HERE)):
    if _p not in sys.path:
        sys.path.insert(0, _p)

import numpy as np  # noqa: E402

from benchmarks import reference  # noqa: E402
from rigplan.engine.stringmodel import G, Closure, Hole, JointArrays  # noqa: E402

FAMILIES = ("uniform", "tapered", "topups")
SIZES = (1000, 10000, 100000)

#: Targets: figure -> (comparison, value).
TARGETS = {
    **{f"plan_ms_1000_{f}": ("<=", 20.0) for f in FAMILIES},
    **{f"plan_ms_10000_{f}": ("<=", 200.0) for f in FAMILIES},
    **{f"growth_{f}": ("<=", 1.15) for f in FAMILIES},
    "risk_s_100k": ("<=", 2.0),
    "check_json_s_10000": ("<=", 1.0),
    "tui_start_s": ("<=", 1.0),
    "tui_record_p95_ms": ("<=", 50.0),
}

_INCH = 0.0254               # [m]
_FT = 0.3048                 # [m]
_LBF = 4.4482216152605       # [N]
_PSI = 6894.757293168361     # [Pa]


# ---------------------------------------------------------------------------
# Timing harness
# ---------------------------------------------------------------------------

def timed(fn, repeat=5, warmup=1):
    """``(median, fastest, slowest)`` wall time [s] of ``repeat`` calls of
    ``fn()`` after ``warmup`` untimed calls (:func:`time.perf_counter`)."""
    for _ in range(warmup):
        fn()
    times = []
    for _ in range(max(1, repeat)):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return statistics.median(times), min(times), max(times)


# ---------------------------------------------------------------------------
# The three families of strings, planned in full
# ---------------------------------------------------------------------------

def _pvc(label, od_in, sdr, rng, top=False, length_ft=20.0):
    """A thermoplastic casing joint (library "pvc"), spline-coupled with an
    entered 30,000 lbf connection rating (an invented round figure)."""
    from rigplan.engine.stringmodel import JointSpec
    return JointSpec(label, "blank", "pvc", od=od_in * _INCH, wall=od_in / sdr * _INCH,
                     length=length_ft * _FT,
                     measured_length=float(rng.uniform(length_ft - 0.5, length_ft + 0.5)) * _FT,
                     connection="none" if top else "spline",
                     connection_rating=None if top else 30000 * _LBF)


def _rig(string_limit):
    """One hoisting path (4 lines) whose mast governs with the given string
    limit [N] after 2,000 lbf dead load, 5,000 lbf reserve and a 1.1
    dynamic factor."""
    from rigplan.engine.hoisting import HoistPath, Rig, path_capacity
    dead, reserve, dynamic = 2000 * _LBF, 5000 * _LBF, 1.1

    def path(mast):
        return HoistPath("main line", lines=4, winch_line_pull=10 * mast,
                         rope_breaking_force=30 * mast, mast_rating=mast, dead_load=dead,
                         overpull_reserve=reserve, dynamic_factor=dynamic)

    # the string limit is linear in the mast rating while the mast governs
    a, b = (path_capacity(path(m)).string_limit for m in (1e5, 2e5))
    return Rig("timing rig", (path(1e5 + (string_limit - a) * 1e5 / (b - a)),))


def family_case(family, n, seed=0):
    """``(joints, hole, rig, settings, closure)`` for :func:`plan_landing`.

    The hole holds 1,400 kg/m^3 mud, the density of the library's PVC
    (a neutral string: open-ended it weighs nothing in the mud, whatever its
    length).  ``uniform``: 12-3/4 in SDR 21, 20 ft joints, lands open-ended.
    ``tapered``: 12-3/4 in SDR 21, 12-3/4 in SDR 17 and 10-3/4 in SDR 21 in
    turn, 10 joints each; lands open-ended.  ``topups``: 12 joints of
    12-3/4 in x 0.500 in A53 B at the bottom (butt welds, 85 %), a float
    collar on joint 1, then 12-3/4 in SDR 21 in 30 ft joints; mud as the
    fill.  Collapse (design factor 1.125) allows an empty column of about
    170 ft above the fill; the string limit asks for one at most 165 ft
    (5.5 joints) shorter, so the chosen schedule carries the fill down five
    joints and tops up again, all the way down.
    """
    from rigplan.engine.axial import running_loads
    from rigplan.engine.materials import get_material
    from rigplan.engine.rating import rate_joints
    from rigplan.engine.stringmodel import JointSpec, Settings
    rng = np.random.default_rng(seed)
    mud = get_material("pvc").density
    hole = Hole(fluid_density=mud)
    if family in ("uniform", "tapered"):
        sizes = [(12.75, 21)] if family == "uniform" else [(12.75, 21), (12.75, 17), (10.75, 21)]
        specs = [_pvc(f"J{i + 1}", *sizes[(i // 10) % len(sizes)], rng, i == n - 1)
                 for i in range(n)]
        settings = Settings(fill_density=mud, float_collar_positions=())
        return rate_joints(specs), hole, _rig(20000 * _LBF), settings, Closure()
    if family != "topups":
        raise ValueError(f"no family {family!r}")
    steel = 12
    specs = [JointSpec(f"J{i + 1}", "blank", "a53b", od=12.75 * _INCH, wall=0.5 * _INCH,
                       length=20 * _FT, measured_length=float(rng.uniform(19.5, 20.5)) * _FT,
                       weld_efficiency=0.85) for i in range(steel)]
    specs += [_pvc(f"J{i + 1}", 12.75, 21, rng, i == n - 1, length_ft=30.0)
              for i in range(steel, n)]
    joints = rate_joints(specs)
    settings = Settings(fill_density=mud, float_collar_positions=())
    full = float(running_loads(joints, hole, Closure()).string_load[-1])
    bore_area = math.pi / 4 * joints.bore[-1] ** 2
    # empty column the collapse of the PVC allows, and one 5.5 joints shorter
    longest = joints.collapse_rating[-1] / settings.design.collapse / (mud * G)
    shortest = longest - 5.5 * 30 * _FT
    limit = full - mud * G * bore_area * shortest
    return joints, hole, _rig(limit), settings, Closure(1)


def plan_figure(family, n, repeat=5):
    """``((median, fastest, slowest) [ms], what the plan did)``.  Each timed
    plan gets its own copy of the joints, as a new process or a re-plan in
    the app does (no cached geometry from the call before)."""
    import dataclasses
    from rigplan.engine.planner import plan_landing
    joints, *rest = family_case(family, n)
    plan = plan_landing(joints, *rest)

    def cold():
        return plan_landing(dataclasses.replace(joints), *rest)

    cpu0 = time.process_time()
    times = timed(cold, repeat=repeat, warmup=0)
    cpu = (time.process_time() - cpu0) / max(1, repeat)
    opt = plan.best_float
    detail = {"joints": n, "verdict": str(plan.verdict),
              "float_options": len(plan.float_options),
              "top_ups": len(opt.schedule.top_ups) if opt is not None else 0,
              "staged_search": plan.stages is not None, "cpu_ms_mean": 1e3 * cpu}
    return tuple(1e3 * t for t in times), detail


def growth(t_small, t_large, ratio=100.0):
    """Growth exponent ``log(t_large / t_small) / log(ratio)``."""
    if not t_small or not t_large:
        return None
    return math.log(t_large / t_small) / math.log(ratio)


# ---------------------------------------------------------------------------
# Baselines: the running loads by the reference, a tight loop, the engine
# ---------------------------------------------------------------------------

# (kind, od [m], bore [m], air weight per length [N/m] or None for plain-end
# steel, tally length range [m]).  Sizes: 8-5/8 in and 12-3/4 in casing,
# wire-wrapped screens on 8-5/8 in base pipe; the screen weight per length is
# an invented round figure.
_BOTTOM_BLANK = ("blank", 0.2191, 0.2027, None, (5.80, 6.25))
_SCREEN = ("screen", 0.2191, 0.2027, 330.0, (2.90, 6.10))
_REDUCER = ("reducer", 0.3239, 0.2027, 1400.0, (0.55, 0.75))
_TOP_BLANK = ("blank", 0.3239, 0.3049, None, (5.80, 6.25))
STEEL_DENSITY = 7850.0


def synthetic_string(n, seed=0):
    """A casing-and-screen string of ``n`` joints, bottom first: a sump of
    blank pipe, screen sections of 4 to 12 joints with a blank joint
    between, blank pipe up to a reducer, then larger casing to the floor.
    Lengths [m] drawn per joint; blank weights [N] from the plain-end
    formula ``rho_s g pi/4 (D^2 - d^2) L`` plus 2 to 5 % for couplings."""
    if n < 1:
        raise ValueError("a string needs at least one joint")
    rng = np.random.default_rng(seed)
    layout = []
    sump = max(1, n // 50)
    screened = max(0, (3 * n) // 10)
    top = max(0, n // 4)
    reducer = 1 if n >= 4 else 0
    lower = n - sump - screened - top - reducer
    layout += [_BOTTOM_BLANK] * sump
    placed = 0
    while placed < screened:
        run = min(int(rng.integers(4, 13)), screened - placed)
        layout += [_SCREEN] * run
        placed += run
        if placed < screened and lower > 0:
            layout.append(_BOTTOM_BLANK)
            lower -= 1
    layout += [_BOTTOM_BLANK] * lower
    layout += [_REDUCER] * reducer
    layout += [_TOP_BLANK] * top
    layout = layout[:n]
    while len(layout) < n:
        layout.append(_TOP_BLANK)
    kinds, od, bore, weight, length = [], [], [], [], []
    for kind, d_o, d_i, w_per_m, (lo, hi) in layout:
        ln = float(rng.uniform(lo, hi))
        if w_per_m is None:
            w_per_m = (STEEL_DENSITY * G * math.pi / 4 * (d_o ** 2 - d_i ** 2)
                       * float(rng.uniform(1.02, 1.05)))
        kinds.append(kind)
        od.append(d_o)
        bore.append(d_i)
        length.append(ln)
        weight.append(w_per_m * ln)
    nan = np.full(n, np.nan)
    return JointArrays(
        label=tuple(f"J{i + 1}" for i in range(n)), kind=tuple(kinds),
        length=np.array(length), od=np.array(od), bore=np.array(bore),
        weight=np.array(weight), collapse_rating=nan.copy(),
        burst_rating=nan.copy(), body_rating=nan.copy(), connection_rating=nan.copy())


def topped_up(joints, valve=2, every=5, share=0.6):
    """``(joints, hole, closure, fill_density, fill_level)``: 1,100 kg/m^3
    mud full to the floor, a float collar on joint ``valve``, water topped
    up to the floor every ``every`` joints until ``share`` of the string is
    in, then carried down (fill depth = length run since the last top-up)."""
    n = joints.n
    valve = valve if n > valve else 0
    run = np.concatenate(([0.0], np.cumsum(joints.length)))
    fill = np.empty(n)
    last_topup = 0
    for k in range(1, n + 1):
        if k <= max(1.0, share * n) and (k - 1) % every == 0:
            last_topup = k
        fill[k - 1] = min(run[k] - run[last_topup], max(0.0, run[k] - run[valve]))
    return joints, Hole(fluid_density=1100.0), Closure(valve_joint=valve), 998.2, fill


def synthetic_case(n, seed=0):
    """The baseline case: :func:`synthetic_string` :func:`topped_up`."""
    return topped_up(synthetic_string(n, seed))


def tapered_running_case(n, seed=0):
    """A steel string whose section changes every 10 joints (8-5/8 in at two
    walls and 12-3/4 in in turn), :func:`topped_up` every 5 joints."""
    rng = np.random.default_rng(seed)
    sizes = [(0.2191, 0.2027), (0.2191, 0.1985), (0.3239, 0.3049)]
    section = (np.arange(n) // 10) % 3
    od = np.array([sizes[s][0] for s in section])
    bore = np.array([sizes[s][1] for s in section])
    length = rng.uniform(5.8, 6.25, n)
    weight = STEEL_DENSITY * G * math.pi / 4 * (od ** 2 - bore ** 2) * length
    nan = np.full(n, np.nan)
    joints = JointArrays(label=tuple(f"J{i + 1}" for i in range(n)), kind=("blank",) * n,
                         length=length, od=od, bore=bore, weight=weight, collapse_rating=nan,
                         burst_rating=nan.copy(), body_rating=nan.copy(),
                         connection_rating=nan.copy())
    return topped_up(joints)


_COMPARED = ("shoe_depth", "string_load", "envelope_max", "envelope_min", "collapse_max",
             "effective_top")


def agreement(expected, got, rtol=1e-12):
    """Worst ``|engine - baseline| / (rtol |baseline| + rtol scale)`` per
    field (<= 1 passes); ``scale`` is the largest force (pressure for
    ``collapse_max``, depth for ``shoe_depth``) of the run: forces that are
    small differences of large pressure-area terms carry round-off of that
    order whatever the summation order."""
    force = max(float(np.max(np.abs(expected["envelope_max"]))),
                float(np.max(np.abs(expected["envelope_min"]))), 1.0)
    scales = {"shoe_depth": float(np.max(np.abs(expected["shoe_depth"]))),
              "collapse_max": max(1.0, float(np.max(np.abs(expected["collapse_max"]))))}
    out = {}
    for name in _COMPARED:
        want = np.asarray(expected[name], dtype=float)
        have = np.asarray(getattr(got, name), dtype=float)
        scale = scales.get(name, force)
        out[name] = float(np.max(np.abs(have - want) / (rtol * np.abs(want) + rtol * scale)))
    out["ok"] = all(v <= 1.0 for v in out.values())
    return out


def baselines(n=1000, repeat=5):
    """Times [ms] of the reference, the tight loop and the engine on
    :func:`synthetic_case` and each baseline's agreement with the engine."""
    from rigplan.engine.axial import running_loads
    case = synthetic_case(n)
    engine = running_loads(*case)
    ref = reference.reference_running_loads(*case)
    tight = reference.tight_running_loads(*case)
    t_ref = timed(lambda: reference.reference_running_loads(*case), repeat=max(1, repeat // 2),
                  warmup=0)
    t_tight = timed(lambda: reference.tight_running_loads(*case), repeat=max(1, repeat // 2),
                    warmup=0)
    t_eng = timed(lambda: running_loads(*case), repeat=max(repeat, 20))
    return ({"reference": t_ref, "tight_loop": t_tight, "engine": t_eng},
            {"reference": agreement(ref, engine), "tight_loop": agreement(tight, engine)})


def previous_engine(n=10000, repeat=3):
    """``(previous engine times, engine times)`` [s] and their agreement on
    :func:`tapered_running_case` of ``n`` joints."""
    from rigplan.engine.axial import running_loads
    case = tapered_running_case(n)
    old = reference.interface_running_loads(*case)
    new = running_loads(*case)
    t_old = timed(lambda: reference.interface_running_loads(*case), repeat=repeat, warmup=0)
    t_new = timed(lambda: running_loads(*case), repeat=max(repeat, 5))
    expected = {name: getattr(old, name) for name in _COMPARED}
    return t_old, t_new, agreement(expected, new)


# ---------------------------------------------------------------------------
# Probability of exceeding each limit
# ---------------------------------------------------------------------------

def risk_specs(n=200, seed=0):
    """A tapered 200-joint casing-and-screen string, bottom first: a sump
    joint and 24 joints of 12-3/4 in stainless wire-wrap screen (weight and
    ratings as from a maker's sheet: invented round figures), then 12-3/4 in
    blank casing (A53 B at 0.375 in, then API N-80 at 0.500 in), then 16 in
    x 0.375 in A53 B to the floor; field butt welds (85 % on A53 B, 100 % on
    N-80); tally lengths 19.2 to 20.6 ft."""
    from rigplan.engine.stringmodel import JointSpec
    rng = np.random.default_rng(seed)
    kinds = [("sump", "a53b", 12.75, 0.375)] + [("screen", "ss316l", 12.75, 0.375)] * 24
    rest = n - len(kinds)
    kinds += [("blank", "a53b", 12.75, 0.375)] * (rest * 4 // 10)
    kinds += [("blank", "n80", 12.75, 0.5)] * (rest * 3 // 10)
    kinds += [("blank", "a53b", 16.0, 0.375)] * (n - len(kinds))
    specs = []
    for i, (kind, material, od, wall) in enumerate(kinds[:n]):
        extra = {}
        if kind == "screen":
            extra = dict(weight_per_length=38 * _LBF / _FT, tensile_rating=150000 * _LBF,
                         collapse_rating=300 * _PSI)
        top = i == n - 1
        specs.append(JointSpec(
            f"J{i + 1}", kind, material, od=od * _INCH, wall=wall * _INCH, length=20 * _FT,
            measured_length=float(rng.uniform(19.2, 20.6)) * _FT,
            connection="none" if top else "butt_weld",
            weld_efficiency=None if top else (1.0 if material == "n80" else 0.85), **extra))
    return specs


def risk_case(n=200, seed=0):
    """``(plan, specs)``: :func:`risk_specs` in 1,150 kg/m^3 mud, a float
    collar on the top screen joint, mud or water as fill, and a rig whose
    string limit is 60 kN under the open-ended peak: it lands floated."""
    from rigplan.engine.axial import running_loads
    from rigplan.engine.planner import plan_landing
    from rigplan.engine.rating import rate_joints
    from rigplan.engine.stringmodel import Settings
    specs = risk_specs(n, seed)
    joints = rate_joints(specs)
    hole = Hole(fluid_density=1150.0)
    peak = float(np.max(running_loads(joints, hole, Closure()).string_load))
    settings = Settings(fill_density=1150.0, fill_density_alternatives=(998.2,),
                        min_running_weight=5000 * _LBF, float_collar_positions=())
    plan = plan_landing(joints, hole, _rig(peak - 60e3), settings, Closure(25))
    return plan, specs


def risk_figure(samples=100_000, repeat=3):
    """``((median, fastest, slowest) [s], summary)`` of
    :func:`rigplan.engine.risk.exceedance` on :func:`risk_case` (the
    preparation, once per plan, included)."""
    try:
        from rigplan.engine.risk import exceedance
    except ImportError as err:
        return None, f"rigplan.engine.risk does not import ({err})"
    plan, specs = risk_case()
    result = exceedance(plan, specs, samples=samples, seed=1)
    cpu0 = time.process_time()
    times = timed(lambda: exceedance(plan, specs, samples=samples, seed=1), repeat=repeat,
                  warmup=0)
    cpu = (time.process_time() - cpu0) / max(1, repeat)
    summary = {"samples": samples, "joints": plan.joints.n, "verdict": str(plan.verdict),
               "cpu_s_mean": cpu,
               **{f"p_{lim.name.replace(' ', '_')}": lim.probability for lim in result.limits}}
    return times, summary


# ---------------------------------------------------------------------------
# Whole `rigplan check` processes
# ---------------------------------------------------------------------------

def _long_plan(tmp: Path, joints=10000):
    """A plan file of ``joints`` joints, the section changing every 10
    joints (12-3/4 in casing at 0.375 in and 0.500 in wall in turn), in
    1,100 kg/m^3 mud, written from the bundled demo rig's point of view."""
    sections = []
    for i in range(joints // 10):
        wall = "0.375 in" if i % 2 == 0 else "0.500 in"
        sections.append(
            f'[[section]]\nkind = "blank"\nmaterial = "a53b"\nod = "12.75 in"\n'
            f'wall = "{wall}"\njoint_length = "20 ft"\ncount = 10\nconnection = "butt_weld"\n'
            'weld_efficiency = 0.85\n')
    text = ('version = 1\nunits = "us"\nname = "timing string"\nwell = "T-1"\n\n[hole]\n'
            'fluid_density = "1100 kg/m3"\nfluid_level = "0 ft"\n\n' + "\n".join(sections))
    path = tmp / f"long-{joints}.toml"
    path.write_text(text)
    return path


def check_process_figure(fmt="json", joints=10000, repeat=3):
    """``((median, fastest, slowest) [s], detail)`` of a whole ``rigplan
    check`` process, or ``(None, why)``."""
    with tempfile.TemporaryDirectory() as tmp:
        try:
            plan = _long_plan(Path(tmp), joints)
        except Exception as err:  # noqa: BLE001 - report, do not crash the benchmark
            return None, f"cannot write the plan ({err})"
        cmd = [sys.executable, "-m", "rigplan", "check", str(plan), "--rig", "mw80",
               "--format", fmt]
        env = dict(os.environ, PYTHONPATH=str(_HERE.parent))
        import resource
        times = []
        size = 0
        cpu0 = resource.getrusage(resource.RUSAGE_CHILDREN)
        for _ in range(max(1, repeat)):
            t0 = time.perf_counter()
            out = subprocess.run(cmd, capture_output=True, env=env, timeout=600,
                                 cwd=str(_HERE.parent))
            times.append(time.perf_counter() - t0)
            if out.returncode not in (0, 1):
                last = (out.stderr.decode(errors="replace").strip().splitlines()
                        or ["no output"])[-1]
                return None, f"rigplan check failed: {last}"
            size = len(out.stdout)
        cpu1 = resource.getrusage(resource.RUSAGE_CHILDREN)
    cpu = (cpu1.ru_utime + cpu1.ru_stime - cpu0.ru_utime - cpu0.ru_stime) / max(1, repeat)
    return ((statistics.median(times), min(times), max(times)),
            {"joints": joints, "bytes": size, "exit_code": out.returncode, "cpu_s_mean": cpu})


# ---------------------------------------------------------------------------
# Terminal app
# ---------------------------------------------------------------------------

def _tui_missing():
    """Why the TUI figures cannot be measured, or "" when they can."""
    try:
        from rigplan.tui import app as tui_app
    except Exception as err:  # noqa: BLE001 - any import failure means "not there"
        return f"rigplan.tui.app does not import ({type(err).__name__}: {err})"
    if not hasattr(tui_app, "build_app"):
        return "rigplan.tui.app has no build_app yet"
    return ""


def _demo_copy(tmp: Path):
    """The demo job copied into ``tmp`` (opening it writes a run log beside
    the plan; the repository's copy stays untouched)."""
    from rigplan.files.job import demo_paths
    plan, rig = demo_paths()
    shutil.copy(plan, tmp / plan.name)
    shutil.copy(rig, tmp / rig.name)
    return tmp / plan.name, tmp / rig.name


_START_CHILD = r"""
import sys, time
t0 = float(sys.argv[1])
import asyncio
from rigplan.tui.app import build_app
app = build_app(sys.argv[2], sys.argv[3])
first = []
show = app._display
def display(screen, renderable):
    show(screen, renderable)
    if renderable is not None and not first:
        first.append(time.time())
app._display = display
async def main():
    async with app.run_test(size=(120, 40)) as pilot:
        ready = time.time()
    return ready
ready = asyncio.run(main())
print((first[0] if first else ready) - t0)
"""


#: CPU time of the app's start-up processes (whole process, to its exit) [s].
TUI_CPU: dict = {}


def tui_start_figure(repeat=5):
    """``(median s, None)`` cold start to the first frame, or ``(None, why)``."""
    why = _tui_missing()
    if why:
        return None, why
    import resource
    times = []
    cpu0 = resource.getrusage(resource.RUSAGE_CHILDREN)
    with tempfile.TemporaryDirectory() as tmp:
        plan, rig = _demo_copy(Path(tmp))
        env = dict(os.environ, PYTHONPATH=str(_HERE.parent))
        for _ in range(max(1, repeat)):
            t0 = time.time()
            out = subprocess.run([sys.executable, "-c", _START_CHILD, repr(t0), str(plan),
                                  str(rig)], capture_output=True, text=True, env=env,
                                 timeout=120)
            if out.returncode != 0:
                last = (out.stderr.strip().splitlines() or ["no output"])[-1]
                return None, f"the app did not start: {last}"
            times.append(float(out.stdout.strip().splitlines()[-1]))
    cpu1 = resource.getrusage(resource.RUSAGE_CHILDREN)
    TUI_CPU["start_s"] = (cpu1.ru_utime + cpu1.ru_stime - cpu0.ru_utime - cpu0.ru_stime) \
        / max(1, repeat)
    return statistics.median(times), None


def _record_plan(tmp: Path, joints=550, recorded=500):
    """A ``joints``-joint copy of the demo plan in ``tmp`` with the first
    ``recorded`` joints already in its run log."""
    from rigplan.files.formats.planfile import read_plan
    from rigplan.files.job import demo_dir
    from rigplan.files.runlog import RunLog, log_path_for
    src = (demo_dir("strings") / "cv7-16in-floated.toml").read_text()
    blank = joints - 5          # the demo: 1 sump, 4 screens, 75 blanks
    if "count = 75" not in src:
        raise RuntimeError("the demo plan cv7-16in-floated.toml changed: no 'count = 75'")
    src = src.replace("count = 75", f"count = {blank}")
    src = src.replace('depth = "1620 ft"', f'depth = "{20 * joints + 100} ft"')
    plan = tmp / f"timing-{joints}.toml"
    plan.write_text(src)
    rig = tmp / "mw80.toml"
    shutil.copy(demo_dir("rigs") / "mw80.toml", rig)
    specs = read_plan(plan).plan.joints
    log = RunLog(log_path_for(plan))
    try:
        for j in specs[:recorded]:
            log.record_run(j.label, j.length, "")
    finally:
        log.close()
    return plan, rig


def tui_record_figure(presses=50):
    """``(p95 ms, detail)`` of recording a joint in the app, or ``(None, why)``.

    The key ``r`` opens the record prompt; Enter accepts the planned length
    and commits the joint.  Timed from just before Enter is sent to the
    first screen update (compositor frame) made after the session holds the
    new joint; Pilot's own idle waits after it are not counted.
    """
    why = _tui_missing()
    if why:
        return None, why
    import asyncio

    from rigplan.tui.app import build_app
    with tempfile.TemporaryDirectory() as tmp:
        plan, rig = _record_plan(Path(tmp))
        app = build_app(plan, rig)
        frames = []
        show = app._display

        def display(screen, renderable):
            show(screen, renderable)
            if renderable is not None:
                frames.append((time.perf_counter(), app.session.step))

        app._display = display

        async def drive():
            times = []
            async with app.run_test(size=(120, 40)) as pilot:
                await pilot.pause()
                start = app.session.step
                for _ in range(presses):
                    await pilot.press("r")
                    await pilot.pause()
                    want = app.session.step + 1
                    frames.clear()
                    t0 = time.perf_counter()
                    await pilot.press("enter")
                    await pilot.pause()
                    shown = [t for t, step in frames if step == want]
                    if not shown:
                        raise RuntimeError(f"no frame showed joint {want} after Enter")
                    times.append(shown[0] - t0)
                done = app.session.step - start
            return times, start, done

        try:
            times, start, done = asyncio.run(drive())
        except Exception as err:  # noqa: BLE001 - report, do not crash the benchmark
            return None, f"recording in the app failed ({type(err).__name__}: {err})"
    times.sort()
    p95 = times[max(0, math.ceil(0.95 * len(times)) - 1)]
    return 1e3 * p95, {"presses": presses, "joints_before": start, "recorded": done,
                       "median_ms": 1e3 * statistics.median(times),
                       "max_ms": 1e3 * times[-1]}


# ---------------------------------------------------------------------------
# All figures
# ---------------------------------------------------------------------------

def machine():
    """Where the figures were measured, with the load while they were."""
    cpu = ""
    try:
        for line in Path("/proc/cpuinfo").read_text().splitlines():
            if line.startswith("model name"):
                cpu = line.split(":", 1)[1].strip()
                break
    except OSError:
        pass
    try:
        load = os.getloadavg()[0]
    except OSError:
        load = None
    import textual
    return {"nproc": os.cpu_count(), "cpu": cpu or platform.processor(),
            "python": platform.python_version(), "numpy": np.__version__,
            "textual": getattr(textual, "__version__", ""),
            "platform": platform.platform(), "load_average_1min": load}


def _meets(key, value):
    if value is None or key not in TARGETS:
        return None
    op, target = TARGETS[key]
    return value <= target if op == "<=" else value >= target


def tui_record_in_fresh_process(presses=50):
    """:func:`tui_record_figure` in a new Python process, as the app runs on
    site (the benchmarks before it leave this process's heap and garbage
    collector in a state no real session has)."""
    code = ("import json, sys; sys.path.insert(0, %r); import run; "
            "p, d = run.tui_record_figure(%d); print(json.dumps([p, d]))"
            % (str(Path(__file__).resolve().parent), presses))
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         timeout=600)
    if out.returncode != 0:
        return None, f"the timing process failed: {out.stderr.strip().splitlines()[-1:]}"
    p95, detail = json.loads(out.stdout.strip().splitlines()[-1])
    return p95, detail


def collect(repeat=5, tui=True, quick=False):
    """All figures as one dict (``None`` where not measurable, with the
    reason in ``messages``)."""
    figures, spread, details, messages = {}, {}, {}, {}

    def put(key, times, scale=1.0):
        figures[key] = times[0] * scale
        spread[key] = [times[1] * scale, times[2] * scale]

    sizes = SIZES[:2] if quick else SIZES
    for family in FAMILIES:
        for n in sizes:
            times, details[f"plan_{n}_{family}"] = plan_figure(
                family, n, repeat=repeat if n < 50000 else max(1, min(repeat, 3)))
            put(f"plan_ms_{n}_{family}", times)
        # growth on the process's CPU time: on a shared machine the wall
        # time of one size can be inflated by others' load and not another's
        cpu = {n: details[f"plan_{n}_{family}"]["cpu_ms_mean"] for n in sizes}
        figures[f"growth_{family}"] = None if quick else growth(cpu[1000], cpu[100000])
        details[f"growth_{family}"] = {
            "wall_median": None if quick else growth(figures[f"plan_ms_1000_{family}"],
                                                     figures[f"plan_ms_100000_{family}"]),
            "wall_fastest": None if quick else growth(spread[f"plan_ms_1000_{family}"][0],
                                                      spread[f"plan_ms_100000_{family}"][0])}
        if quick:
            messages[f"growth_{family}"] = "skipped (--quick: no 100,000-joint plans)"
    times, agree = baselines(1000, repeat=repeat)
    eng = times["engine"][0]
    figures["ratio_vs_reference_1000"] = times["reference"][0] / eng
    figures["ratio_vs_tight_loop_1000"] = times["tight_loop"][0] / eng
    for name, t in times.items():
        put(f"{name}_ms_1000", t, 1e3)
    t_old, t_new, agree_old = previous_engine(10000, repeat=max(1, min(repeat, 3)))
    put("previous_engine_ms_10000_tapered", t_old, 1e3)
    put("engine_ms_10000_tapered", t_new, 1e3)
    agree["previous_engine"] = agree_old
    risk, info = risk_figure(repeat=max(1, min(repeat, 3)))
    if risk is None:
        figures["risk_s_100k"] = None
        messages["risk_s_100k"] = info
    else:
        put("risk_s_100k", risk)
        details["risk_100k"] = info
    for fmt in ("json", "text"):
        times_or_none, info = check_process_figure(fmt, repeat=max(1, min(repeat, 3)))
        key = f"check_{fmt}_s_10000"
        if times_or_none is None:
            figures[key] = None
            messages[key] = info
        else:
            put(key, times_or_none)
            details[key] = info
    if tui:
        start, why = tui_start_figure(repeat)
        figures["tui_start_s"] = start
        if why:
            messages["tui_start_s"] = why
        else:
            details["tui_start"] = {"cpu_s_mean_whole_process": TUI_CPU.get("start_s")}
        figures["tui_record_p95_ms"], info = tui_record_in_fresh_process()
        if figures["tui_record_p95_ms"] is None:
            messages["tui_record_p95_ms"] = info
        else:
            details["tui_record"] = info
    else:
        figures["tui_start_s"] = figures["tui_record_p95_ms"] = None
        messages["tui_start_s"] = messages["tui_record_p95_ms"] = "skipped (--no-tui)"
    out = dict(figures)
    out.update({
        "agreement": agree,
        "spread": spread,
        "targets": {k: {"target": f"{op} {v:g}", "met": _meets(k, figures.get(k))}
                    for k, (op, v) in TARGETS.items()},
        "details": details,
        "messages": messages,
        "machine": machine(),
        "repeat": repeat,
    })
    return out


def _fmt(value):
    if value is None:
        return "not measured"
    if isinstance(value, float):
        return f"{value:,.4g}"
    return str(value)


def main(argv=None):
    parser = argparse.ArgumentParser(description="rigplan performance figures")
    parser.add_argument("--json", action="store_true", help="print the figures as JSON")
    parser.add_argument("--repeat", type=int, default=5,
                        help="timed runs per figure; the median is reported (default 5)")
    parser.add_argument("--no-tui", action="store_true",
                        help="skip the two terminal-app figures")
    parser.add_argument("--quick", action="store_true",
                        help="skip the 100,000-joint plans (and the growth exponents)")
    args = parser.parse_args(argv)
    figures = collect(repeat=args.repeat, tui=not args.no_tui, quick=args.quick)
    ok = all(a.get("ok", True) for a in figures["agreement"].values())
    if args.json:
        print(json.dumps(figures, indent=1))
        return 0 if ok else 1
    m = figures["machine"]
    print(f"machine: {m['nproc']} cpu ({m['cpu']}), Python {m['python']}, numpy {m['numpy']}, "
          f"load average {m['load_average_1min']}")
    keys = [k for k in figures if k not in ("agreement", "spread", "targets", "details",
                                           "messages", "machine", "repeat")]
    width = max(len(k) for k in keys)
    for key in keys:
        value = figures[key]
        lo_hi = figures["spread"].get(key)
        spread = f" ({_fmt(lo_hi[0])} to {_fmt(lo_hi[1])})" if lo_hi else ""
        target = figures["targets"].get(key)
        mark = ""
        if target is not None:
            met = target["met"]
            mark = f"  target {target['target']}: " + (
                "met" if met else "MISSED" if met is False else "not measured")
        why = figures["messages"].get(key)
        print(f"{key:<{width}}  {_fmt(value)}{spread}{mark}" + (f"  ({why})" if why else ""))
    for key, detail in figures["details"].items():
        print(f"  {key}: " + ", ".join(f"{k} {_fmt(v)}" for k, v in detail.items()))
    for name, agree in figures["agreement"].items():
        worst = max(v for k, v in agree.items() if k != "ok")
        print(f"engine vs {name}: {'agree' if agree['ok'] else 'DISAGREE'} "
              f"(worst difference / tolerance {worst:.3g}, tolerance 1e-12 of the run's scale)")
    return 0 if ok else 1


if __name__ == "__main__":
    sys.exit(main())
