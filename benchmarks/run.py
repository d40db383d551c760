"""Performance figures for rigplan.

Usage::

    python benchmarks/run.py [--json] [--repeat N] [--no-tui]

Every figure is the median of repeated runs on this machine (``--repeat``,
default 5), except ``tui_record_p95_ms``, the 95th percentile over 50
recorded joints.  JSON keys (one per figure; ``null`` when a figure cannot
be measured, with the reason under ``messages``):

``plan_ms_100``, ``plan_ms_1000``, ``plan_ms_10000``
    :func:`rigplan.engine.planner.plan_landing` on a rated synthetic string of that
    many joints that must be floated: the open-ended run is over the
    hoisting limit, no float equipment is planned, so the planner tries
    float collars on the top screen joint and the three joints above it,
    each with three fill fluids (12 options: fill window, fill schedule,
    empty-run check and, for the feasible ones, the full pressure-area run
    and its check).
``plan_staged_ms_1000``
    A 1,000-joint plan whose limit floating cannot meet: every float option
    fails and the staged search runs.
``loop_ratio_1000``
    Plain-Python per-joint, per-step reference (``benchmarks/reference.py``)
    over ``rigplan.engine.axial.running_loads`` on the same 1,000-joint case, timed
    in the same run; ``engine_agreement`` checks both give the same numbers
    within 1e-9 relative.
``sweep_s_100k``
    :func:`rigplan.engine.sweep.sweep_landing`, 100,000 scenarios on a 200-joint
    string.
``tui_start_s``
    Cold start of the terminal app to its first frame: a fresh
    ``python -c`` that imports ``rigplan.tui.app``, builds the app on the
    demo job and runs it headless; timed from a timestamp taken just before
    the process is started to the first screen update.
``tui_record_p95_ms``
    Pilot: a 550-joint plan with 500 joints already in its run log; the
    record key ``r`` then Enter, 50 times; time from the Enter that commits
    the joint to the first screen update that shows it.

Every string here is invented for timing: the section sizes are common
casing and screen diameters, the materials are the library's (weights and
ratings from ``rigplan.engine.rating.rate_joints``), the tally lengths are random.
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

#: Carbon steel density for the synthetic plain-end weights [kg/m^3].
STEEL_DENSITY = 7850.0

#: Targets of the performance issue: figure -> (comparison, value).
TARGETS = {
    "plan_ms_1000": ("<=", 20.0),
    "plan_ms_10000": ("<=", 1000.0),
    "loop_ratio_1000": (">=", 30.0),
    "sweep_s_100k": ("<=", 2.0),
    "tui_start_s": ("<=", 1.0),
    "tui_record_p95_ms": ("<=", 50.0),
}


# ---------------------------------------------------------------------------
# Timing harness
# ---------------------------------------------------------------------------

def median_seconds(fn, repeat=5, warmup=1):
    """Median wall time [s] of ``repeat`` calls of ``fn()`` after ``warmup``
    untimed calls, with :func:`time.perf_counter`."""
    for _ in range(warmup):
        fn()
    times = []
    for _ in range(max(1, repeat)):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


# ---------------------------------------------------------------------------
# Synthetic strings
# ---------------------------------------------------------------------------

# (kind, od [m], bore [m], air weight per length [N/m] or None for plain-end
# steel, tally length range [m]).  Sizes: 8-5/8 in and 12-3/4 in casing,
# wire-wrapped screens on 8-5/8 in base pipe; the screen weight per length is
# an invented round figure.
_BOTTOM_BLANK = ("blank", 0.2191, 0.2027, None, (5.80, 6.25))
_SCREEN = ("screen", 0.2191, 0.2027, 330.0, (2.90, 6.10))
_REDUCER = ("reducer", 0.3239, 0.2027, 1400.0, (0.55, 0.75))
_TOP_BLANK = ("blank", 0.3239, 0.3049, None, (5.80, 6.25))


def synthetic_string(n, seed=0):
    """A casing-and-screen string of ``n`` joints, bottom first: a sump of
    blank pipe, alternating screen and blank sections, blank pipe up to a
    reducer, then larger pump-chamber casing to the floor.  Lengths [m] are
    drawn per joint (tally variation); blank weights [N] from the plain-end
    formula ``rho_s g pi/4 (D^2 - d^2) L`` with a few per cent for couplings."""
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
    # screens in sections of 4 to 12 joints with a blank joint between them
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
        burst_rating=nan.copy(), body_rating=nan.copy(),
        connection_rating=nan.copy(),
    )


def synthetic_case(n, seed=0):
    """``(joints, hole, closure, fill_density, fill_level)`` for timing: the
    synthetic string in 1,100 kg/m^3 mud full to the floor, a float collar at
    the top of joint 2, topped up with water to the floor every 5 joints
    until 60 % of the string is in, then not filled again.  Between top-ups
    the inside surface goes down with the pipe (depth = length run since the
    last top-up), never below the collar."""
    joints = synthetic_string(n, seed)
    valve = 2 if n >= 3 else 0
    run = np.concatenate(([0.0], np.cumsum(joints.length)))   # run[k] = Z_k
    fill = np.empty(n)
    last_topup = 0
    for k in range(1, n + 1):
        if k <= max(1.0, 0.6 * n) and (k - 1) % 5 == 0:
            last_topup = k
        valve_depth = run[k] - run[valve]
        fill[k - 1] = min(run[k] - run[last_topup], max(0.0, valve_depth))
    hole = Hole(fluid_density=1100.0, fluid_level=0.0)
    return joints, hole, Closure(valve_joint=valve), 998.2, fill


# ---------------------------------------------------------------------------
# Reference and engine
# ---------------------------------------------------------------------------

def _engine_running_loads():
    """``rigplan.engine.axial.running_loads`` or ``None`` with a message when the
    engine is not there yet (imported lazily)."""
    try:
        from rigplan.engine import axial
    except ImportError as err:
        return None, f"rigplan.engine.axial not importable ({err})"
    fn = getattr(axial, "running_loads", None)
    if fn is None:
        return None, "rigplan.engine.axial has no running_loads yet"
    return fn, ""


def reference_ms(n, repeat=5, seed=0):
    """Median time [ms] of the plain-Python reference on ``n`` joints."""
    case = synthetic_case(n, seed)
    return 1e3 * median_seconds(lambda: reference.reference_running_loads(*case),
                                repeat=repeat, warmup=0)


def engine_ms(n, repeat=5, seed=0):
    """Median time [ms] of ``rigplan.engine.axial.running_loads`` on ``n`` joints,
    or ``None`` when the engine is missing."""
    fn, _ = _engine_running_loads()
    if fn is None:
        return None
    case = synthetic_case(n, seed)
    return 1e3 * median_seconds(lambda: fn(*case), repeat=repeat, warmup=1)


_COMPARED = ("shoe_depth", "string_load", "envelope_max", "envelope_min",
             "collapse_max")


def compare_with_engine(n=200, seed=0, rtol=1e-9):
    """Compare the engine with the reference on the synthetic case.

    Returns a dict: ``ok`` (bool or None when skipped), ``message``, and per
    field the largest ``|engine - reference| / (rtol |reference| + atol)``
    (<= 1 passes).  atol is ``rtol`` times the largest force [N] (pressure
    [Pa] for ``collapse_max``, depth [m] for ``shoe_depth``): forces that are
    small differences of large pressure-area terms carry round-off of that
    order whatever the summation order, so they cannot be held to a relative
    tolerance alone.  ``envelope_step`` passes when the reference force at the
    engine's step equals the envelope maximum within the same tolerance.
    """
    fn, why = _engine_running_loads()
    if fn is None:
        return {"ok": None, "message": f"skipped: {why}"}
    case = synthetic_case(n, seed)
    expected = reference.reference_running_loads(*case)
    forces = reference.reference_true_force(*case)
    got = fn(*case)
    f_scale = max(abs(f) for row in forces for f in row)
    scales = {"shoe_depth": max(abs(z) for z in expected["shoe_depth"]),
              "collapse_max": max(1.0, max(abs(p) for p in expected["collapse_max"]))}
    report = {"ok": True, "message": f"{n} joints, rtol {rtol:g}"}
    for name in _COMPARED:
        want = np.asarray(expected[name], dtype=float)
        have = np.asarray(getattr(got, name), dtype=float)
        if have.shape != want.shape:
            report[name] = None
            report["ok"] = False
            report["message"] += f"; {name} has shape {have.shape}, expected {want.shape}"
            continue
        atol = rtol * scales.get(name, f_scale)
        worst = float(np.max(np.abs(have - want) / (rtol * np.abs(want) + atol)))
        report[name] = worst
        if not worst <= 1.0:
            report["ok"] = False
    steps = np.asarray(got.envelope_step)
    worst = 0.0
    for j in range(n):
        k = int(steps[j])
        if not j + 1 <= k <= n:
            worst = math.inf
            break
        want = expected["envelope_max"][j]
        worst = max(worst, abs(forces[k - 1][j] - want)
                    / (rtol * abs(want) + rtol * f_scale))
    report["envelope_step"] = worst
    if not worst <= 1.0:
        report["ok"] = False
    return report


# ---------------------------------------------------------------------------
# Figures
# ---------------------------------------------------------------------------

def loop_ratio(n=1000, repeat=5):
    """``(reference_ms, engine_ms, ratio)`` at ``n`` joints; the ratio
    reference / engine is ``None`` while the engine is missing."""
    ref_ms = reference_ms(n, repeat=repeat)
    eng_ms = engine_ms(n, repeat=max(repeat, 20))
    ratio = None if eng_ms is None or eng_ms <= 0.0 else ref_ms / eng_ms
    return ref_ms, eng_ms, ratio


# ---------------------------------------------------------------------------
# The planner on rated strings
# ---------------------------------------------------------------------------

_INCH = 0.0254               # [m]
_FT = 0.3048                 # [m]
_LBF = 4.4482216152605       # [N]
_PSI = 6894.757293168361     # [Pa]


def planner_specs(n, seed=0):
    """``n`` JointSpecs of a tapered 12-3/4 in casing-and-screen string,
    bottom first: a sump joint, up to 40 joints of stainless wire-wrap
    screen in runs of 4 to 8 with a blank joint between runs, then blank
    casing whose grade and wall rise towards the top (A53 B and HSLA 50 at
    0.375 in, API N-80 and P-110 at 0.500 in), field butt welds.  Tally
    lengths 19.2 to 20.6 ft.  The screen's weight and ratings stand for a
    maker's data sheet (invented round figures)."""
    from rigplan.engine.stringmodel import JointSpec
    rng = np.random.default_rng(seed)
    kinds = [("sump", "a53b", 0.375)]
    screens = max(4, min(n // 10, 40))
    placed = 0
    while placed < screens:
        run = int(rng.integers(4, 9))
        kinds += [("screen", "ss316l", 0.375)] * run + [("blank", "a53b", 0.375)]
        placed += run
    rest = n - len(kinds)
    for material, wall, share in (("a53b", 0.375, 0.15), ("hsla", 0.375, 0.12),
                                  ("n80", 0.5, 0.40), ("p110", 0.5, 0.33)):
        kinds += [("blank", material, wall)] * int(round(share * rest))
    kinds = kinds[:n] + [("blank", "p110", 0.5)] * max(0, n - len(kinds))
    specs = []
    for i, (kind, material, wall) in enumerate(kinds):
        extra = {}
        if kind == "screen":
            extra = dict(weight_per_length=38 * _LBF / _FT, tensile_rating=150000 * _LBF,
                         collapse_rating=300 * _PSI)
        top = i == n - 1
        specs.append(JointSpec(
            f"J{i + 1}", kind, material, od=12.75 * _INCH, wall=wall * _INCH,
            length=20 * _FT, measured_length=float(rng.uniform(19.2, 20.6)) * _FT,
            connection="none" if top else "butt_weld",
            weld_efficiency=None if top else (1.0 if material in ("n80", "p110") else 0.85),
            **extra))
    return specs


def planner_case(n, staged=False, seed=0):
    """``(joints, hole, rig, settings, closure)`` for :func:`plan_landing`.

    1,150 kg/m^3 mud full to the floor.  One hoisting path whose mast
    rating leaves a string limit 60 kN under the open-ended peak load, so
    the string must be floated (with the float collar above the screens a
    mud-filled float saves about 260 kN: the blank A53 B above them allows
    about 320 m of empty pipe); ``staged=True`` sets it at 92 % of the peak
    instead, which no float plan reaches.  A 5 in drill-pipe landing string
    (22 lb/ft adjusted, 712,000 lbf).  Fill with the mud, fresh water or a
    1,078 kg/m^3 mix; 5,000 lbf least running weight, 10,000 lbf set down.
    No float equipment planned (open shoe); float collar candidates on the
    top screen joint and the three joints above it (a check valve below a
    screen cannot float the pipe).
    """
    from rigplan.engine.axial import running_loads
    from rigplan.engine.hoisting import HoistPath, LandingString, Rig
    from rigplan.engine.rating import rate_joints
    from rigplan.engine.stringmodel import Settings
    joints = rate_joints(planner_specs(n, seed))
    hole = Hole(fluid_density=1150.0, fluid_level=0.0)
    peak = float(np.max(running_loads(joints, hole, Closure()).string_load))
    limit = 0.92 * peak if staged else peak - 60e3
    dead, reserve, dynamic = 3500 * _LBF, 8000 * _LBF, 1.1
    path = HoistPath("main line", lines=8, mast_rating=(limit + reserve + dead) * dynamic,
                     dead_load=dead, overpull_reserve=reserve, dynamic_factor=dynamic)
    rig = Rig("timing rig", (path,),
              LandingString("5 in drill pipe", 22.0 * _LBF / _FT, 712000 * _LBF))
    top_screen = max(i + 1 for i, kind in enumerate(joints.kind) if kind == "screen")
    settings = Settings(fill_density=1150.0, fill_density_alternatives=(998.2, 1078.0),
                        min_running_weight=5000 * _LBF, set_down_weight=10000 * _LBF,
                        float_collar_positions=tuple(top_screen + i for i in range(4)))
    return joints, hole, rig, settings, Closure()


def plan_figure(n, repeat=5, staged=False):
    """``(median ms, what the plan did)`` for :func:`planner_case`."""
    from rigplan.engine.planner import plan_landing
    case = planner_case(n, staged=staged)
    plan = plan_landing(*case)
    ms = 1e3 * median_seconds(lambda: plan_landing(*case), repeat=repeat, warmup=1)
    detail = {"joints": n, "verdict": plan.verdict, "float_options": len(plan.float_options),
              "floats_landing": sum(o.lands for o in plan.float_options),
              "staged_search": plan.stages is not None}
    return ms, detail


# ---------------------------------------------------------------------------
# Sweep
# ---------------------------------------------------------------------------

def sweep_figure(scenarios=100_000, joints=200, repeat=5, seed=0):
    """``(median s, summary)`` of :func:`rigplan.engine.sweep.sweep_landing`: a
    16 in x 0.375 in A53 B string of ``joints`` tally joints, scenarios
    drawn uniformly over the wall tolerance (0.875 to 1 of the specified
    wall), hole fluid 998 to 1,400 kg/m^3 and ellipticity 0 to 3 %, water
    fill, collapse design factor 1.125, 850 kN string limit."""
    from rigplan.engine.materials import get_material
    from rigplan.engine.sweep import UniformString, sweep_landing
    rng = np.random.default_rng(seed)
    m = get_material("a53b")
    string = UniformString(16 * _INCH, 0.375 * _INCH, rng.uniform(5.8, 6.25, joints),
                           m.yield_strength, m.youngs_modulus, m.poisson, m.density,
                           m.wall_under_tolerance)
    f = rng.uniform(1.0 - m.wall_under_tolerance, 1.0, scenarios)
    rho = rng.uniform(998.2, 1400.0, scenarios)
    e = rng.uniform(0.0, 0.03, scenarios)

    def run():
        return sweep_landing(string, f, rho, e, string_limit=0.85e6, fill_density=998.2,
                             collapse_factor=1.125)

    out = run()
    seconds = median_seconds(run, repeat=repeat, warmup=1)
    summary = {"scenarios": scenarios, "joints": joints,
               "passing": int(np.sum(out.passes)),
               "collapse_full_of_water": int(np.sum(out.collapses_full))}
    return seconds, summary


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


def tui_start_figure(repeat=5):
    """``(median s, None)`` cold start to the first frame, or ``(None, why)``."""
    why = _tui_missing()
    if why:
        return None, why
    times = []
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
    """Where the figures were measured."""
    cpu = ""
    try:
        for line in Path("/proc/cpuinfo").read_text().splitlines():
            if line.startswith("model name"):
                cpu = line.split(":", 1)[1].strip()
                break
    except OSError:
        pass
    return {"nproc": os.cpu_count(), "cpu": cpu or platform.processor(),
            "python": platform.python_version(), "numpy": np.__version__,
            "platform": platform.platform()}


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


def collect(repeat=5, tui=True):
    """All figures as a dict (``None`` where not measurable, with the reason
    in ``messages``)."""
    messages = {}
    details = {}
    figures = {}
    for n in (100, 1000, 10000):
        figures[f"plan_ms_{n}"], details[f"plan_{n}"] = plan_figure(n, repeat)
    figures["plan_staged_ms_1000"], details["plan_staged_1000"] = plan_figure(
        1000, repeat, staged=True)
    ref_ms, eng_ms, ratio = loop_ratio(1000, repeat=repeat)
    figures["loop_ratio_1000"] = ratio
    if ratio is None:
        messages["loop_ratio_1000"] = "rigplan.engine.axial.running_loads is missing"
    figures["sweep_s_100k"], details["sweep_100k"] = sweep_figure(repeat=repeat)
    if tui:
        figures["tui_start_s"], why = tui_start_figure(repeat)
        if why:
            messages["tui_start_s"] = why
        figures["tui_record_p95_ms"], info = tui_record_in_fresh_process()
        if figures["tui_record_p95_ms"] is None:
            messages["tui_record_p95_ms"] = info
        else:
            details["tui_record"] = info
    else:
        figures["tui_start_s"] = figures["tui_record_p95_ms"] = None
        messages["tui_start_s"] = messages["tui_record_p95_ms"] = "skipped (--no-tui)"
    t1, t10 = figures["plan_ms_1000"], figures["plan_ms_10000"]
    out = dict(figures)
    out.update({
        "reference_ms_1000": ref_ms,
        "engine_ms_1000": eng_ms,
        "plan_growth_exponent": math.log10(t10 / t1) if t1 and t10 else None,
        "engine_agreement": compare_with_engine(n=1000),
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


_REPORTED = ("plan_ms_100", "plan_ms_1000", "plan_ms_10000", "plan_staged_ms_1000",
             "loop_ratio_1000", "reference_ms_1000", "engine_ms_1000",
             "plan_growth_exponent", "sweep_s_100k", "tui_start_s", "tui_record_p95_ms")


def main(argv=None):
    parser = argparse.ArgumentParser(description="rigplan performance figures")
    parser.add_argument("--json", action="store_true", help="print the figures as JSON")
    parser.add_argument("--repeat", type=int, default=5,
                        help="timed runs per figure; the median is reported (default 5)")
    parser.add_argument("--no-tui", action="store_true",
                        help="skip the two terminal-app figures")
    args = parser.parse_args(argv)
    figures = collect(repeat=args.repeat, tui=not args.no_tui)
    agreement = figures["engine_agreement"]
    if args.json:
        print(json.dumps(figures, indent=2))
        return 0 if agreement["ok"] is not False else 1
    width = max(len(k) for k in _REPORTED)
    m = figures["machine"]
    print(f"machine: {m['nproc']} cpu ({m['cpu']}), Python {m['python']}, numpy {m['numpy']}")
    for key in _REPORTED:
        value = figures[key]
        target = figures["targets"].get(key)
        mark = ""
        if target is not None:
            met = target["met"]
            mark = f"  target {target['target']}: " + (
                "met" if met else "MISSED" if met is False else "not measured")
        why = figures["messages"].get(key)
        print(f"{key:<{width}}  {_fmt(value)}{mark}" + (f"  ({why})" if why else ""))
    for key, detail in figures["details"].items():
        print(f"  {key}: " + ", ".join(f"{k} {_fmt(v)}" for k, v in detail.items()))
    print(f"{'engine vs reference':<{width}}  "
          f"{'pass' if agreement['ok'] else 'FAIL' if agreement['ok'] is False else 'skipped'}"
          f" ({agreement['message']})")
    for name in _COMPARED + ("envelope_step",):
        if name in agreement:
            print(f"  {name:<{width - 2}}  worst / tolerance = {_fmt(agreement[name])}")
    return 0 if agreement["ok"] is not False else 1


if __name__ == "__main__":
    sys.exit(main())
