"""Performance figures for rigplan.

Usage::

    python benchmarks/run.py [--json] [--repeat N]

Times the plain-Python running-load reference (``benchmarks/reference.py``)
and the vectorized engine (``rigplan.axial.running_loads``) on synthetic
strings, checks that they agree, and prints the project's figures.  A figure
that cannot be measured yet is reported as ``None`` (``null`` in JSON); the
hooks at the end of the "figures" section are where the planner, sweep and
TUI measurements go.

Every string here is invented for timing: the section sizes are common casing
and screen diameters, the weights come from the plain-end formula, the tally
lengths are random.
"""

from __future__ import annotations

import argparse
import json
import math
import statistics
import sys
import time
from pathlib import Path

_HERE = Path(__file__).resolve().parent
for _p in (str(_HERE.parent), str(_HERE)):
    if _p not in sys.path:
        sys.path.insert(0, _p)

import numpy as np  # noqa: E402

import reference  # noqa: E402  (benchmarks/reference.py)
from rigplan.stringmodel import G, Closure, Hole, JointArrays  # noqa: E402

#: Carbon steel density for the synthetic plain-end weights [kg/m^3].
STEEL_DENSITY = 7850.0


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
    """``rigplan.axial.running_loads`` or ``None`` with a message when the
    engine is not there yet (imported lazily)."""
    try:
        from rigplan import axial
    except ImportError as err:
        return None, f"rigplan.axial not importable ({err})"
    fn = getattr(axial, "running_loads", None)
    if fn is None:
        return None, "rigplan.axial has no running_loads yet"
    return fn, ""


def reference_ms(n, repeat=5, seed=0):
    """Median time [ms] of the plain-Python reference on ``n`` joints."""
    case = synthetic_case(n, seed)
    return 1e3 * median_seconds(lambda: reference.reference_running_loads(*case),
                                repeat=repeat, warmup=0)


def engine_ms(n, repeat=5, seed=0):
    """Median time [ms] of ``rigplan.axial.running_loads`` on ``n`` joints,
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


# Hooks for the figures of the whole planner and the TUI.  Each returns the
# measured figure or None while there is nothing to measure; fill them in when
# the planner's entry point and the TUI exist.

def plan_ms(n, repeat=5):
    """Median time [ms] of a full plan of an ``n``-joint synthetic string.
    Hook: not measured until the planner's entry point is settled."""
    return None


def sweep_s_100k():
    """Time [s] of a sweep of 100,000 planner evaluations.  Hook: not measured
    until the planner's sweep exists."""
    return None


def tui_start_s():
    """Cold start of the TUI to its first frame [s].  Hook: not measured until
    the TUI exists."""
    return None


def tui_record_p95_ms():
    """95th percentile [ms] of recording one tally entry in the TUI.  Hook:
    not measured until the TUI's tally screen exists."""
    return None


def collect(repeat=5):
    """All figures as a dict (``None`` where not measurable yet)."""
    ref_ms, eng_ms, ratio = loop_ratio(1000, repeat=repeat)
    return {
        "plan_ms_100": plan_ms(100, repeat),
        "plan_ms_1000": plan_ms(1000, repeat),
        "plan_ms_10000": plan_ms(10000, repeat),
        "loop_ratio_1000": ratio,
        "sweep_s_100k": sweep_s_100k(),
        "tui_start_s": tui_start_s(),
        "tui_record_p95_ms": tui_record_p95_ms(),
        "reference_ms_1000": ref_ms,
        "engine_ms_1000": eng_ms,
        "engine_agreement": compare_with_engine(),
    }


def _fmt(value):
    if value is None:
        return "not measured yet"
    if isinstance(value, float):
        return f"{value:,.4g}"
    return str(value)


def main(argv=None):
    parser = argparse.ArgumentParser(description="rigplan performance figures")
    parser.add_argument("--json", action="store_true", help="print the figures as JSON")
    parser.add_argument("--repeat", type=int, default=5,
                        help="timed runs per figure; the median is reported (default 5)")
    args = parser.parse_args(argv)
    figures = collect(repeat=args.repeat)
    if args.json:
        print(json.dumps(figures, indent=2))
        return 0
    agreement = figures.pop("engine_agreement")
    width = max(len(k) for k in figures)
    for key, value in figures.items():
        print(f"{key:<{width}}  {_fmt(value)}")
    print(f"{'engine vs reference':<{width}}  "
          f"{'pass' if agreement['ok'] else 'FAIL' if agreement['ok'] is False else 'skipped'}"
          f" ({agreement['message']})")
    for name in _COMPARED + ("envelope_step",):
        if name in agreement:
            print(f"  {name:<{width - 2}}  worst / tolerance = {_fmt(agreement[name])}")
    return 0 if agreement["ok"] is not False else 1


if __name__ == "__main__":
    sys.exit(main())
