"""Probability of exceeding each limit on a real string (Monte Carlo).

Engine module: numpy arrays of SI floats; no units, no I/O, no sentences.

The deterministic plan (:func:`rigplan.engine.planner.plan_landing`) rates
every joint on its minimum wall, takes the fluids at their stated density
and applies design factors.  Here the crew's plan is held fixed (the float
equipment and the fill level at every step) while the inputs scatter as
they do on a real job, sample by sample:

* each joint's wall: uniform between the standard's minimum wall and the
  specified wall, or normal with the tolerance band as +-2 standard
  deviations, or normal about a measured wall;
* each joint's ellipticity: uniform from round to twice its figure;
* each butt weld's efficiency, each joint's weight: normal about the figure
  (the weight of couplings, beads and coatings: the section that displaces
  fluid stays the joint's own);
* the hole fluid's and the fill fluid's density: normal about the figure;
* the weight indicator's error: normal, a fraction of the hook load.

The sample's ratings come from the same formulas as
:func:`rigplan.engine.rating.rate_joints` on the sampled wall (taken as
measured: ``rigplan`` rates a measured wall as it is), with no design factor,
so a limit is exceeded where a load passes the rating itself.  Per limit the
result gives the probability that it is exceeded anywhere in the run, the
step (or joint) where that is most likely, and the factor between capacity
and load that the deterministic plan really buys: with its own inputs, and
its median and 0.1 % quantile over the samples.

Method
------
The pipe's geometry (lengths, outside diameters, pressure bores) and the fill
levels do not scatter, so the pressure-area force (:mod:`rigplan.engine.axial`)
at the top of joint ``j`` at step ``k`` is, for every sample,
``F = W_j - rho_o P(j, k) + rho_f Q(j, k)`` with ``W_j`` the sample's
weight below the cut and ``P``, ``Q`` fixed.  The largest force a joint
sees over the steps, ``W_j + rho_o max_k (-P + r Q)`` with ``r = rho_f /
rho_o``, therefore depends on the sample only through ``r``: the steps
that can give it are the lines on the upper envelope of
``r -> -P(j, k) + r Q(j, k)`` over the range of ``r`` drawn, found once.
The collapse load ``P_o - P_in = rho_o (a - r b)`` at each joint's faces,
fill surface and annulus surface is handled the same way.  Per sample the
cost is then a few operations per joint: the samples and joints are whole
arrays, processed in chunks of bounded size.  Exact for the static model:
each sample equals the deterministic engine run on that sample's inputs
(tests/test_risk.py).

Sources: the pressure-area method and the ratings as in the modules named;
Monte Carlo estimation of a probability and its standard error
``sqrt(p (1 - p) / n)`` (any statistics text, e.g. Rubinstein and Kroese,
*Simulation and the Monte Carlo Method*, 3rd ed., 2017, ch. 4).  The
default scatters are common practice, no source: change them to the job's
own figures.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from rigplan.engine.axial import string_geometry
from rigplan.engine.burst import barlow, thermoplastic_pressure_rating
from rigplan.engine.collapse import api_5c3, api_5c3_under_axial_stress, thermoplastic_sdr, timoshenko
from rigplan.engine.findings import LimitName
from rigplan.engine.materials import LIBRARY, get_material, temperature_factor
from rigplan.engine.rating import PERFORATED_KINDS, joint_ellipticity
from rigplan.engine.stringmodel import G
from rigplan.engine.tubulars import body_yield, sdr, steel_area

__all__ = ["Scatter", "LimitRisk", "RiskResult", "RiskModel", "risk_model", "exceedance",
           "draw", "draw_fluids", "evaluate", "sample_inputs"]

#: Joint-samples per chunk: bounds the memory of one chunk (about 20 float
#: arrays of this size).
CHUNK_ELEMENTS = 1 << 17


@dataclass(frozen=True)
class Scatter:
    """How much each input scatters (fractions are of the stated figure).

    wall : ``"uniform"`` between the minimum wall (the specified wall less
        the standard's under-tolerance) and the specified wall, or
        ``"normal"`` with that band as +-2 standard deviations about its middle
    measured_wall_sd : standard deviation of a measured wall [-]
    ellipticity_spread : ellipticity uniform from ``e (1 - s)`` to
        ``e (1 + s)`` for the joint's figure ``e`` [-]
    weld_efficiency_sd : standard deviation of a butt weld's efficiency
        [-, absolute], kept within 0.05..1
    weight_sd : standard deviation of each joint's weight [-]
    hole_density_sd, fill_density_sd : of the two fluids' densities [-]
    indicator_sd : the weight indicator's error, standard deviation [-]

    Defaults are common practice, no source (wall tolerances are the
    material's own, from its standard).
    """

    wall: str = "uniform"
    measured_wall_sd: float = 0.02
    ellipticity_spread: float = 1.0
    weld_efficiency_sd: float = 0.05
    weight_sd: float = 0.02
    hole_density_sd: float = 0.02
    fill_density_sd: float = 0.01
    indicator_sd: float = 0.025

    def __post_init__(self):
        if self.wall not in ("uniform", "normal"):
            raise ValueError("wall scatter must be 'uniform' or 'normal'")
        for name in ("measured_wall_sd", "ellipticity_spread", "weld_efficiency_sd",
                     "weight_sd", "hole_density_sd", "fill_density_sd", "indicator_sd"):
            value = getattr(self, name)
            if not (math.isfinite(value) and value >= 0):
                raise ValueError(f"{name} must be a number >= 0, got {value!r}")
        if self.ellipticity_spread > 1:
            raise ValueError("ellipticity_spread must be 0..1 (ellipticity stays >= 0)")


@dataclass(frozen=True)
class LimitRisk:
    """One limit over the samples.

    probability : share of samples in which it is exceeded anywhere [-]
    standard_error : ``sqrt(p (1 - p) / n)`` [-]
    step : 1-based step where it is most often exceeded (for joint limits,
        the step of the largest load on that joint in the plan); 0 when
        never exceeded
    joint : 1-based joint where most often exceeded (0: a per-step limit or
        never exceeded)
    planned_factor : capacity over load with the plan's own inputs (minimum
        wall, stated densities), least over the run [-] (nan: unrated)
    factor_median, factor_p001 : the same factor per sample: its median and
        the value exceeded in 999 samples of 1,000 [-]
    """

    name: str
    probability: float
    standard_error: float
    step: int
    joint: int
    planned_factor: float
    factor_median: float
    factor_p001: float


@dataclass(frozen=True)
class RiskResult:
    """Per limit :class:`LimitRisk`, and how many samples were drawn."""

    limits: tuple
    samples: int
    seed: int
    scatter: Scatter = field(default_factory=Scatter)


@dataclass(frozen=True)
class RiskModel:
    """A plan prepared for sampling (arrays per joint, index j-1 = joint j)."""

    plan: object
    specs: tuple
    scatter: Scatter
    n: int
    closure: object
    level: np.ndarray
    dead_load: float
    hook_limit: float
    min_weight: float
    weight_steps: np.ndarray      # steps where the running weight is checked
    weight: np.ndarray            # nominal joint weights [N]
    p_step: np.ndarray            # P(k, k), Q(k, k) per step [m^3 g]
    q_step: np.ndarray
    tension_lines: tuple          # (intercept, slope, step) arrays, joints x lines
    collapse_lines: tuple         # (intercept, slope, step, P, Q), joints x lines
    burst_lines: tuple
    wall_low: np.ndarray          # wall band per joint [m] (low == high: fixed)
    wall_high: np.ndarray
    wall_normal: np.ndarray       # bool: normal scatter (mean, sd below)
    wall_mean: np.ndarray
    wall_sd: np.ndarray
    od: np.ndarray
    yield_strength: np.ndarray
    modulus: np.ndarray
    poisson: np.ndarray
    ellipticity: np.ndarray
    method: np.ndarray            # collapse: 0 fixed, 1 Timoshenko, 2 API 5C3, 3 SDR
    collapse_fixed: np.ndarray
    burst_formula: np.ndarray     # bool
    burst_fixed: np.ndarray
    body_formula: np.ndarray      # bool
    body_fixed: np.ndarray
    connection_kind: np.ndarray   # 0 fixed value, 1 butt weld, 2 = body (integral)
    connection_fixed: np.ndarray
    efficiency: np.ndarray
    density_range: tuple          # (hole, fill) densities and the r range drawn
    planned: dict
    api: np.ndarray = None        # bool: rated by the API convention (specified wall)
    plastic: np.ndarray = None    # bool: thermoplastic (pressure rating by design stress)
    wall_spec: np.ndarray = None  # specified wall [m]
    wall_min: np.ndarray = None   # the standard's minimum wall [m]
    design_stress: np.ndarray = None
    temperature_factor: np.ndarray = None


def _lines_envelope(intercept, slope, r_lo, r_hi):
    """Indices of the lines ``y = intercept + slope r`` that are largest for
    some ``r`` in ``[r_lo, r_hi]`` (the upper envelope there), left to right."""
    y = intercept + slope * r_lo
    best = np.flatnonzero(y == y.max())
    i = int(best[np.argmax(slope[best])])
    out = [i]
    r = r_lo
    for _ in range(len(slope)):
        steeper = np.flatnonzero(slope > slope[i])
        if len(steeper) == 0:
            break
        cross = (intercept[i] - intercept[steeper]) / (slope[steeper] - slope[i])
        cross = np.maximum(cross, r)
        first = cross.min()
        if first > r_hi:
            break
        tied = steeper[cross <= first]
        i = int(tied[np.argmax(slope[tied])])
        out.append(i)
        r = first
    return out


def _pad(rows, fill):
    width = max(len(r) for r in rows)
    out = np.full((len(rows), width), fill, dtype=float)
    for i, r in enumerate(rows):
        out[i, :len(r)] = r
    return out


def risk_model(plan, specs, scatter: Scatter = Scatter(), materials=None,
               density_range=None) -> RiskModel:
    """Prepare a plan for :func:`exceedance`.

    Parameters
    ----------
    plan : LandingPlan
        The deterministic plan; its chosen run (open or floated) is sampled.
        A staged setting is not (each stage would need its own run).
    specs : sequence of JointSpec
        The running joints, in the order of ``plan.joints``.
    scatter : Scatter
    materials : mapping of str to Material, optional
    density_range : ((hole low, high), (fill low, high)) [kg/m^3], optional
        The densities the samples span (the load envelope lines are found for
        this range); by default +-8 standard deviations.  Samples must stay
        inside it.
    """
    joints = plan.joints
    n = joints.n
    specs = tuple(specs)
    if len(specs) != n:
        raise ValueError(f"expected {n} joint specs (the plan's running joints), got {len(specs)}")
    if plan.stages is not None and str(plan.verdict) == "lands in stages":
        raise ValueError("a staged setting is not sampled: each stage is its own run")
    table = LIBRARY if materials is None else materials
    chk = plan.chosen
    closure = chk.closure
    hole = plan.hole
    rho_o = float(hole.fluid_density)
    opt = plan.best_float
    rho_f = float(opt.fill_density) if (opt is not None and not closure.is_open) else 0.0
    level = np.asarray(chk.loads.fill_level, dtype=float) if not closure.is_open else np.zeros(n)
    geo = string_geometry(joints, closure)

    # --- geometry per unit density: F = W - rho_o P + rho_f Q -------------------
    u = geo.top - hole.fluid_level
    h = geo.top - level
    s_u = np.interp(u, geo.knots, geo.pressure_volume)
    y_h = np.interp(h, geo.knots, geo.fill_volume)

    def p_q(j, k):
        top = geo.top[j]
        p = np.where(u[k] >= top, geo.pressure_volume[j + 1]
                     + geo.pressure_area[j] * (u[k] - top), s_u[k])
        q = np.where(h[k] >= top, geo.fill_volume[j + 1]
                     + geo.fill_area[j] * (h[k] - top), y_h[k])
        return G * p, G * q

    steps = np.arange(n)
    p_step, q_step = p_q(steps, steps)

    sc = scatter
    if density_range is None:
        density_range = ((rho_o * (1 - 8 * sc.hole_density_sd), rho_o * (1 + 8 * sc.hole_density_sd)),
                         (rho_f * (1 - 8 * sc.fill_density_sd), rho_f * (1 + 8 * sc.fill_density_sd)))
    (o_lo, o_hi), (f_lo, f_hi) = density_range
    o_lo = max(o_lo, 1e-9)
    r_lo, r_hi = max(f_lo, 0.0) / o_hi, max(f_hi, 0.0) / o_lo

    # --- envelope lines per joint -----------------------------------------------
    t_int, t_slope, t_step = [], [], []
    c_rows = [[] for _ in range(5)]
    b_rows = [[] for _ in range(3)]
    for j in range(n):
        if not geo.fill_side[j]:
            # below the valve the force falls with each step (axial module)
            p, q = p_q(np.array([j]), np.array([j]))
            t_int.append(-p)
            t_slope.append(q)
            t_step.append([j])
            for rows, values in ((c_rows, ([0.0], [0.0], [j], p, q)),
                                 (b_rows, ([0.0], [0.0], [j]))):
                for row, v in zip(rows, values):
                    row.append(np.asarray(v, dtype=float))
            continue
        k = np.arange(j, n)
        p, q = p_q(np.full(len(k), j), k)
        pick = _lines_envelope(-p, q, r_lo, r_hi)
        t_int.append(-p[pick])
        t_slope.append(q[pick])
        t_step.append(k[pick])
        x0, x1 = geo.bottom[j], geo.top[j]
        xs = [np.full(len(k), x0), np.full(len(k), x1), np.clip(h[k], x0, x1),
              np.clip(u[k], x0, x1)]
        kk = np.tile(k, 4)
        x = np.concatenate(xs)
        a = G * np.maximum(0.0, u[kk] - x)
        b = G * np.maximum(0.0, h[kk] - x)
        pick = _lines_envelope(a, -b, r_lo, r_hi)
        pj, qj = p_q(np.full(len(pick), j), kk[pick])
        for row, v in zip(c_rows, (a[pick], -b[pick], kk[pick], pj, qj)):
            row.append(v)
        pick = _lines_envelope(-a, b, r_lo, r_hi)
        for row, v in zip(b_rows, (-a[pick], b[pick], kk[pick])):
            row.append(v)
    tension_lines = (_pad(t_int, -np.inf), _pad(t_slope, 0.0), _pad(t_step, 0).astype(int))
    collapse_lines = (_pad(c_rows[0], -np.inf), _pad(c_rows[1], 0.0),
                      _pad(c_rows[2], 0).astype(int), _pad(c_rows[3], 0.0), _pad(c_rows[4], 0.0))
    burst_lines = (_pad(b_rows[0], -np.inf), _pad(b_rows[1], 0.0),
                   _pad(b_rows[2], 0).astype(int))

    # --- how each rating follows the wall ------------------------------------------
    mats = [get_material(s.material, table) for s in specs]
    t_nom = np.array([s.wall for s in specs], dtype=float)
    measured = np.array([s.measured_wall is not None for s in specs], dtype=bool)
    t_min = np.where(measured, [s.measured_wall or 0.0 for s in specs],
                     t_nom * (1 - np.array([m.wall_under_tolerance for m in mats])))
    normal = measured | (sc.wall == "normal")
    wall_mean = np.where(measured, t_min, 0.5 * (t_nom + t_min))
    wall_sd = np.where(measured, sc.measured_wall_sd * t_min, (t_nom - t_min) / 4.0)
    perforated = np.array([s.kind in PERFORATED_KINDS for s in specs], dtype=bool)
    cm = np.array(joints.collapse_method, dtype=object) if joints.collapse_method \
        else np.array(["entered"] * n, dtype=object)
    method = np.select([cm == "timoshenko", cm == "api_5c3", cm == "thermoplastic"], [1, 2, 3], 0)
    burst_formula = np.array([s.burst_rating is None for s in specs]) & ~perforated \
        & np.isfinite(joints.burst_rating)
    body_formula = np.array([s.tensile_rating is None for s in specs]) & ~perforated \
        & np.isfinite(joints.body_rating)
    kinds = [s.connection for s in specs]
    entered_conn = np.array([s.connection_rating is not None for s in specs], dtype=bool)
    conn_kind = np.where(entered_conn, 0, np.array(
        [1 if c == "butt_weld" and s.weld_efficiency is not None else 2 if c == "integral"
         else 0 for c, s in zip(kinds, specs)]))
    efficiency = np.array([s.weld_efficiency if s.weld_efficiency is not None else np.nan
                           for s in specs], dtype=float)

    # --- the plan's own factors (no design factor) ------------------------------------
    d = plan.settings.design
    hook = chk.loads.string_load + plan.dead_load
    planned = {
        LimitName.HOISTING: float(plan.path.hook_limit / np.max(hook)),
        LimitName.CONNECTION_TENSION: _least_factor(d.tension, chk.tension_utilization),
        LimitName.COLLAPSE: _least_factor(d.collapse, chk.collapse_utilization),
        LimitName.BURST: _least_factor(d.burst, chk.burst_utilization),
    }
    min_w = float(plan.settings.min_running_weight)
    weight_steps = np.zeros(0, dtype=int)
    if opt is not None and not closure.is_open and min_w > 0:
        wm = np.asarray(opt.schedule.weight_margin, dtype=float)
        weight_steps = np.flatnonzero(np.isfinite(wm))
        if len(weight_steps):
            planned[LimitName.RUNNING_WEIGHT] = float(
                np.min(chk.loads.string_load[weight_steps]) / min_w)
    return RiskModel(
        plan=plan, specs=specs, scatter=sc, n=n, closure=closure, level=level,
        dead_load=float(plan.dead_load), hook_limit=float(plan.path.hook_limit),
        min_weight=min_w, weight_steps=weight_steps,
        weight=np.asarray(joints.weight, dtype=float), p_step=p_step, q_step=q_step,
        tension_lines=tension_lines, collapse_lines=collapse_lines, burst_lines=burst_lines,
        wall_low=np.where(normal, t_min, t_min), wall_high=np.where(normal, t_min, t_nom),
        wall_normal=normal, wall_mean=wall_mean, wall_sd=wall_sd,
        od=np.asarray(joints.od, dtype=float),
        yield_strength=np.array([m.yield_strength for m in mats], dtype=float),
        modulus=np.array([m.youngs_modulus for m in mats], dtype=float),
        poisson=np.array([m.poisson for m in mats], dtype=float),
        ellipticity=np.array([joint_ellipticity(s) for s in specs], dtype=float),
        method=method, collapse_fixed=np.asarray(joints.collapse_rating, dtype=float),
        burst_formula=burst_formula, burst_fixed=np.asarray(joints.burst_rating, dtype=float),
        body_formula=body_formula, body_fixed=np.asarray(joints.body_rating, dtype=float),
        connection_kind=conn_kind,
        connection_fixed=np.asarray(joints.connection_rating, dtype=float),
        efficiency=efficiency,
        density_range=((rho_o, rho_f), (r_lo, r_hi), density_range),
        planned=planned,
        api=np.array([m.collapse_method == "api_5c3" for m in mats], dtype=bool),
        plastic=np.array([m.collapse_method == "thermoplastic" for m in mats], dtype=bool),
        wall_spec=t_nom, wall_min=t_nom * (1 - np.array([m.wall_under_tolerance for m in mats])),
        design_stress=np.array([m.design_stress for m in mats], dtype=float),
        temperature_factor=np.array([temperature_factor(m.temperature_derating,
                                                        plan.hole.temperature)
                                     if m.temperature_derating else 1.0 for m in mats]),
    )


def _least_factor(design_factor, utilization):
    u = np.asarray(utilization, dtype=float)
    if not np.any(np.isfinite(u) & (u > 0)):
        return float("nan")
    return float(design_factor / np.nanmax(u))


@dataclass(frozen=True)
class Draws:
    """Sampled inputs: per sample (S,) and per joint-sample (S, J)."""

    hole_density: np.ndarray
    fill_density: np.ndarray
    indicator: np.ndarray
    wall: np.ndarray
    ellipticity: np.ndarray
    efficiency: np.ndarray
    weight: np.ndarray


def draw_fluids(scatter: Scatter, rho_o: float, rho_f: float, rng: np.random.Generator,
                count: int):
    """Hole and fill densities [kg/m^3] and the indicator's error [-] of
    ``count`` samples (normal about the stated figures)."""
    hole = np.maximum(rho_o * (1 + scatter.hole_density_sd * rng.standard_normal(count)), 1e-9)
    fill = np.maximum(rho_f * (1 + scatter.fill_density_sd * rng.standard_normal(count)), 0.0)
    return hole, fill, scatter.indicator_sd * rng.standard_normal(count)


def draw(model: RiskModel, rng: np.random.Generator, count: int, fluids=None) -> Draws:
    """``count`` samples of the inputs (:class:`Scatter`); ``fluids`` are
    the samples' (hole density, fill density, indicator error) when already
    drawn (:func:`draw_fluids`)."""
    sc = model.scatter
    n = model.n
    if fluids is None:
        (rho_o, rho_f), _, _ = model.density_range
        fluids = draw_fluids(sc, rho_o, rho_f, rng, count)
    hole, fill, indicator = fluids
    f32 = np.float32
    # float32 draws: a sample is whatever number was drawn, and the formulas
    # work in float64 on it; half the memory traffic of float64
    low, band = model.wall_low.astype(f32), (model.wall_high - model.wall_low).astype(f32)
    wall = rng.random((count, n), dtype=f32)
    wall *= band
    wall += low
    if np.any(model.wall_normal):
        k = model.wall_normal
        wall[:, k] = np.maximum(model.wall_mean[k].astype(f32) + model.wall_sd[k].astype(f32)
                                * rng.standard_normal((count, int(k.sum())), dtype=f32), 1e-6)
    e = np.empty((count, n), dtype=f32)
    e[:] = model.ellipticity
    k = model.method == 1
    if np.any(k) and sc.ellipticity_spread > 0:
        e[:, k] *= 1 + sc.ellipticity_spread * (2 * rng.random((count, int(k.sum())), dtype=f32)
                                                - 1)
    eff = np.empty((count, n), dtype=f32)
    eff[:] = model.efficiency
    k = model.connection_kind == 1
    if np.any(k) and sc.weld_efficiency_sd > 0:
        eff[:, k] = np.clip(eff[:, k] + sc.weld_efficiency_sd
                            * rng.standard_normal((count, int(k.sum())), dtype=f32), 0.05, 1.0)
    weight = rng.standard_normal((count, n), dtype=f32)
    weight *= sc.weight_sd
    weight += 1
    weight *= model.weight.astype(f32)
    return Draws(hole, fill, indicator, wall, e, eff, weight)


def _best_line(lines, r):
    """Largest line value per (sample, joint) and the line's index: the
    lines of each joint are few (most joints have one)."""
    intercept, slope = lines[0], lines[1]
    count = np.isfinite(intercept).sum(axis=1)
    value = intercept[:, 0] + r[:, None] * slope[:, 0]
    index = np.zeros(value.shape, dtype=np.int8)
    for line in range(1, intercept.shape[1]):
        js = np.flatnonzero(count > line)
        v = intercept[js, line] + r[:, None] * slope[js, line]
        old = value[:, js]
        better = v > old
        value[:, js] = np.where(better, v, old)
        index[:, js] = np.where(better, line, index[:, js])
    return value, index


def _line_box(lines, d, columns=(0, 1)):
    """Per joint, bounds of ``max over lines (rho_o x + rho_f y)`` over the
    box of the chunk's densities (``x``, ``y`` the line arrays named by
    ``columns``): linear in the densities per line, so the corners bound it.
    Returns (upper bound, lower bound)."""
    x, y = lines[columns[0]], lines[columns[1]]
    real = np.isfinite(lines[0])
    o = (float(d.hole_density.min()), float(d.hole_density.max()))
    f = (float(d.fill_density.min()), float(d.fill_density.max()))
    corners = [np.where(real, oo * x + ff * y, -np.inf) for oo in o for ff in f]
    upper = np.max([c.max(axis=1) for c in corners], axis=0)
    lower = np.max(np.min(corners, axis=0), axis=1)
    return upper, lower


def _keep(u_hi, u_lo):
    """Joints that can exceed their capacity or be a sample's most loaded:
    upper bound at least the least of 1 and the best lower bound."""
    floor = min(1.0, float(np.max(u_lo, initial=0.0)))
    return np.flatnonzero(np.isfinite(u_hi) & (u_hi > 0) & (u_hi >= floor))


def _ratio(load, capacity):
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.where(np.isfinite(capacity) & (load > 0), load / capacity, 0.0)


def evaluate(model: RiskModel, d: Draws) -> dict:
    """Per limit: the largest load over capacity in each sample (S,), the
    step (0-based) or joint where it is, the step of that joint's load, and
    the number of samples exceeding it at each step or joint.

    Joints are first bounded over the chunk (each rating is monotone in the
    wall and the ellipticity, each load linear in the densities); only
    those that can exceed their capacity or carry a sample's largest
    load over capacity are evaluated in full, so the result is the same as
    evaluating every joint."""
    rows = np.arange(len(d.hole_density))
    rho_o, rho_f = d.hole_density[:, None], d.fill_density[:, None]
    r = d.fill_density / d.hole_density
    cum_w = np.cumsum(d.weight, axis=1, dtype=float)
    out = {}
    # hoisting: hook load (read with the indicator's error) over the hook limit
    load = cum_w - rho_o * model.p_step
    load += rho_f * model.q_step
    ratio = (load + model.dead_load) * ((1 + d.indicator[:, None]) / model.hook_limit)
    at = np.argmax(ratio, axis=1)
    out[LimitName.HOISTING] = (ratio[rows, at], at, at, (ratio > 1).sum(axis=0))
    if len(model.weight_steps) and model.min_weight > 0:
        on = load[:, model.weight_steps]
        w = np.where(on > 0, model.min_weight / np.where(on > 0, on, 1.0), np.inf)
        at = np.argmax(w, axis=1)
        steps = model.weight_steps[at]
        counts = np.zeros(model.n)
        counts[model.weight_steps] = (w > 1).sum(axis=0)
        out[LimitName.RUNNING_WEIGHT] = (w[rows, at], steps, steps, counts)
    t, od = d.wall, model.od
    sy = np.where(np.isfinite(model.yield_strength), model.yield_strength, 1.0)  # nan: unrated
    t_lo, t_hi = t.min(axis=0), t.max(axis=0)
    w_lo, w_hi = cum_w.min(axis=0), cum_w.max(axis=0)

    def rate_wall(wall, k):
        """The wall each rating formula takes for a sampled wall (as
        measured): API joints the specified wall, or the measured wall
        under the minimum scaled up by the tolerance; others the wall."""
        under = wall < model.wall_min[k]
        return np.where(model.api[k], np.where(under, wall * (model.wall_spec[k]
                                                               / model.wall_min[k]),
                                               model.wall_spec[k]), wall)

    def body_of(wall, k):
        t_body = np.where(model.api[k] & (wall >= model.wall_min[k]), model.wall_spec[k], wall)
        return np.where(model.body_formula[k], body_yield(od[k], t_body, sy[k]),
                        model.body_fixed[k])

    def capacity(body, eff, k):
        kind = model.connection_kind[k]
        conn = np.where(kind == 1, eff * body, np.where(kind == 2, body, model.connection_fixed[k]))
        return np.where(np.isnan(conn) | np.isnan(body), np.nan, np.fmin(conn, body))

    # connection tension against the lesser of body and connection
    allj = np.arange(model.n)
    e_lo, e_hi = d.efficiency.min(axis=0), d.efficiency.max(axis=0)
    hi, lo = _line_box(model.tension_lines, d)
    u_hi = _ratio(np.maximum(w_hi + hi, 0.0), capacity(body_of(t_lo, allj), e_lo, allj))
    u_lo = _ratio(np.maximum(w_lo + lo, 0.0), capacity(body_of(t_hi, allj), e_hi, allj))
    k = _keep(u_hi, u_lo)
    sub = tuple(x[k] for x in model.tension_lines)
    value, line = _best_line(sub, r)
    value *= rho_o
    value += cum_w[:, k]
    cap = capacity(body_of(t[:, k], k), d.efficiency[:, k], k)
    out[LimitName.CONNECTION_TENSION] = _per_joint(np.maximum(value, 0.0), cap, line, sub[2],
                                                   k, model.n)
    # collapse, API ratings reduced for the tension at the step of the
    # largest collapse load
    m = model.method
    ell_lo, ell_hi = d.ellipticity.min(axis=0), d.ellipticity.max(axis=0)

    def rating(wall, ell, k, stress=None):
        out_r = np.broadcast_to(model.collapse_fixed[k], np.shape(wall)).astype(float)
        wall = rate_wall(wall, k)
        for code in (1, 2, 3):
            c = m[k] == code
            if not np.any(c):
                continue
            wc = wall[..., c]
            if code == 1:
                v = timoshenko(od[k][c], wc, sy[k][c], ell[..., c], model.modulus[k][c],
                               model.poisson[k][c])
            elif code == 2:
                v = api_5c3(od[k][c], wc, sy[k][c])
                if stress is not None:
                    v = np.minimum(v, api_5c3_under_axial_stress(od[k][c], wc, sy[k][c],
                                                                 stress[..., c]))
            else:
                v = (thermoplastic_sdr(sdr(od[k][c], wc), model.modulus[k][c], model.poisson[k][c])
                     * model.temperature_factor[k][c])
            out_r[..., c] = v
        return out_r

    # bound each (sample, joint) by the joint's least and largest rating
    # over the chunk; rate exactly only the pairs that can matter
    hi, _ = _line_box(model.collapse_lines, d)
    k = np.flatnonzero(np.isfinite(hi) & (hi > 0))
    sub = tuple(x[k] for x in model.collapse_lines)
    value, line = _best_line(sub, r)
    dp = np.maximum(value * rho_o, 0.0)
    stress_hi = np.maximum(w_hi + _pq_box(model.collapse_lines, d), 0.0) / steel_area(od, t_lo)
    r_lo = rating(t_lo[k], ell_hi[k], k, stress_hi[k])
    r_hi = rating(t_hi[k], ell_lo[k], k)
    u = np.zeros(dp.shape)

    def exact(s_i, c_i):
        jj = k[c_i]
        stress = None
        if np.any(m[jj] == 2):
            li = line[s_i, c_i]
            force = (cum_w[s_i, jj] - d.hole_density[s_i] * sub[3][c_i, li]
                     + d.fill_density[s_i] * sub[4][c_i, li])
            stress = force / steel_area(od[jj], t[s_i, jj])
        u[s_i, c_i] = _ratio(dp[s_i, c_i], rating(t[s_i, jj], d.ellipticity[s_i, jj], jj,
                                                    stress))

    if len(k):
        # the likeliest worst joint of each sample, exactly: a floor for the rest
        guess = np.argmax(_ratio(dp, 0.5 * (r_lo + r_hi)), axis=1)
        exact(rows, guess)
        floor = np.minimum(1.0, u[rows, guess])
        s_i, c_i = np.nonzero((_ratio(dp, r_lo) >= floor[:, None]) & (dp > 0))
        left = c_i != guess[s_i]
        exact(s_i[left], c_i[left])
    out[LimitName.COLLAPSE] = _per_joint(u, None, line, sub[2], k, model.n)
    # burst
    hi, lo = _line_box(model.burst_lines, d)

    def burst_of(wall, k):
        t_r = rate_wall(wall, k)
        api, plastic = model.api[k], model.plastic[k]
        with np.errstate(invalid="ignore", divide="ignore"):
            v = np.where(api, barlow(od[k], t_r, sy[k], wall_factor=0.875),
                         np.where(plastic, thermoplastic_pressure_rating(
                             sdr(od[k], t_r), np.where(plastic & np.isfinite(model.design_stress[k]),
                                                       model.design_stress[k], 1.0)),
                             barlow(od[k], t_r, sy[k], wall_factor=1.0)))
        return np.where(model.burst_formula[k], v * model.temperature_factor[k],
                        model.burst_fixed[k])

    u_hi = _ratio(np.maximum(hi, 0.0), burst_of(t_lo, allj))
    u_lo = _ratio(np.maximum(lo, 0.0), burst_of(t_hi, allj))
    k = _keep(u_hi, u_lo)
    sub = tuple(x[k] for x in model.burst_lines)
    value, line = _best_line(sub, r)
    bp = np.maximum(value * rho_o, 0.0)
    out[LimitName.BURST] = _per_joint(bp, burst_of(t[:, k], k), line, sub[2], k, model.n)
    return out


def _pq_box(lines, d):
    """Per joint, an upper bound of ``-rho_o P + rho_f Q`` over the
    collapse lines (the force at a line's step less the weight below)."""
    real = np.isfinite(lines[0])
    o_lo = float(d.hole_density.min())
    f_hi = float(d.fill_density.max())
    return np.where(real, -o_lo * lines[3] + f_hi * lines[4], -np.inf).max(axis=1)


def _per_joint(load, capacity, line, line_steps, joints, n):
    """Largest load / capacity per sample over the given joints, the joint
    and the step of its load, and the samples exceeding each joint
    (``capacity`` None: ``load`` is already load over capacity)."""
    u = load if capacity is None else _ratio(load, capacity)
    counts = np.zeros(n)
    rows = np.arange(load.shape[0])
    if u.shape[1] == 0:
        zero = np.zeros(load.shape[0], dtype=int)
        return np.zeros(load.shape[0]), zero, zero, counts
    at = np.argmax(u, axis=1)
    counts[joints] = (u > 1).sum(axis=0)
    return u[rows, at], joints[at], line_steps[at, line[rows, at]], counts


def exceedance(plan, specs, scatter: Scatter = Scatter(), samples: int = 100_000,
               seed: int = 0, materials=None, progress=None) -> RiskResult:
    """Probability of exceeding each limit of a plan (module docstring).

    Parameters
    ----------
    plan : LandingPlan
    specs : the plan's running JointSpecs, in order
    scatter : Scatter
    samples : number of samples, >= 1
    seed : seed of the random generator (the same seed gives the same result)
    progress : callable ``(done, total)``, called after each chunk

    Returns
    -------
    RiskResult
    """
    if samples < 1:
        raise ValueError("samples must be at least 1")
    rng = np.random.default_rng(seed)
    model, fluids = _model_and_fluids(plan, specs, scatter, materials, rng, samples)
    n = model.n
    chunk = max(1, CHUNK_ELEMENTS // n)
    names = [LimitName.HOISTING, LimitName.CONNECTION_TENSION, LimitName.COLLAPSE,
             LimitName.BURST]
    if len(model.weight_steps) and model.min_weight > 0:
        names.insert(1, LimitName.RUNNING_WEIGHT)
    hits = {name: 0 for name in names}
    where = {name: np.zeros(n) for name in names}
    steps_of = {name: {} for name in names}
    worst = {name: [] for name in names}
    done = 0
    while done < samples:
        count = min(chunk, samples - done)
        part = tuple(f[done:done + count] for f in fluids)
        result = evaluate(model, draw(model, rng, count, part))
        for name in names:
            util, at, step, counts = result[name]
            hit = util > 1
            hits[name] += int(hit.sum())
            where[name] += counts
            for j, k in zip(at[hit].tolist(), step[hit].tolist()):
                steps_of[name].setdefault(j, k)
            worst[name].append(util)
        done += count
        if progress is not None:
            progress(done, samples)
    limits = []
    for name in names:
        p = hits[name] / samples
        u = np.concatenate(worst[name])
        most = int(np.argmax(where[name])) if hits[name] else -1
        if most < 0:
            step, joint = 0, 0
        elif name in (LimitName.HOISTING, LimitName.RUNNING_WEIGHT):
            step, joint = most + 1, 0
        else:
            joint = most + 1
            step = int(steps_of[name].get(most, most)) + 1
        limits.append(LimitRisk(
            name=str(name), probability=p, standard_error=math.sqrt(p * (1 - p) / samples),
            step=step, joint=joint, planned_factor=model.planned.get(name, float("nan")),
            factor_median=_factor(np.median(u)), factor_p001=_factor(np.quantile(u, 0.999))))
    return RiskResult(limits=tuple(limits), samples=samples, seed=seed, scatter=model.scatter)


def _factor(utilization) -> float:
    """Capacity over load from load over capacity (inf where nothing loads)."""
    u = float(utilization)
    return 1.0 / u if u > 0 else float("inf")


def _model_and_fluids(plan, specs, scatter, materials, rng, samples):
    """The samples' fluids first (their range fixes the load envelope lines),
    then the model for that range."""
    chk = plan.chosen
    opt = plan.best_float
    rho_o = float(plan.hole.fluid_density)
    rho_f = float(opt.fill_density) if (opt is not None and not chk.closure.is_open) else 0.0
    fluids = draw_fluids(scatter, rho_o, rho_f, rng, samples)
    hole, fill, _ = fluids
    span = ((float(hole.min()), float(hole.max())), (float(fill.min()), float(fill.max())))
    return risk_model(plan, specs, scatter, materials, density_range=span), fluids


def sample_inputs(model: RiskModel, d: Draws, i: int):
    """Sample ``i`` of ``d`` as inputs to the deterministic engine:
    ``(joints, hole, fill density, hook limit as the indicator shows it)``.

    The joints are rated by :func:`rigplan.engine.rating.rate_joints` with the
    sampled walls entered as measured and the sampled weights as entered
    weights; the section that displaces fluid stays the plan's (a joint's
    weight scatters with its couplings, beads and coatings, not its wall)."""
    import dataclasses
    from rigplan.engine.rating import rate_joints
    from rigplan.engine.stringmodel import Hole
    specs = []
    for j, s in enumerate(model.specs):
        changes = dict(measured_wall=float(d.wall[i, j]), weight=float(d.weight[i, j]),
                       weight_per_length=None, ellipticity=float(d.ellipticity[i, j]),
                       dmax=None, dmin=None)
        if model.connection_kind[j] == 1:
            changes["weld_efficiency"] = float(d.efficiency[i, j])
        specs.append(dataclasses.replace(s, **changes))
    nominal = model.plan.joints
    joints = dataclasses.replace(rate_joints(specs), displaced_area=nominal.displaced_area)
    hole = dataclasses.replace(model.plan.hole, fluid_density=float(d.hole_density[i]))
    return joints, hole, float(d.fill_density[i]), model.hook_limit / (1 + float(d.indicator[i]))
