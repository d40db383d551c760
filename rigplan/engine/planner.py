"""The landing plan: picks the way to land a string and checks every limit.

Engine orchestration only: it calls the topic modules (``axial``,
``floatplan``, ``staging``, ``grouting``, ``hoisting``) and collects their
results in :class:`LandingPlan`; it adds no physics of its own, and no
words: what it has to say is a :class:`~rigplan.engine.findings.Finding`
with a :class:`PlanCode` (``rigplan.present`` words it).

Order of trial (first that keeps every limit wins), one named step each in
:func:`plan_landing`:

0. the float equipment the plan names (:func:`try_planned_float`);
1. open-ended, the hole fluid inside (:func:`try_open`);
2. floated: float shoe and float collars at the positions in the settings,
   each with every fill fluid offered, ranked by fewest top-ups then the
   largest least margin (:func:`try_other_floats`);
3. two stages on the rig's landing string (:func:`try_stages`);
4. otherwise: cannot land, with the reasons.

Then :func:`check_hole_depth`, :func:`check_set_down` and
:func:`check_unrated` may overrule the verdict (a string longer than the
hole cannot land; a set-down weight that buckles a screen or overstresses a
joint below the neutral point is over a limit; a loaded unrated part means
landing cannot be confirmed).
"""

from __future__ import annotations

import dataclasses
import enum
from dataclasses import dataclass

import numpy as np

from rigplan.engine.buckling import BucklingCheck, check_buckling
from rigplan.engine.axial import (RunningLoads, StepProfile, neutral_point_depth, running_loads,
                                  step_profile)
from rigplan.engine.findings import Finding, Kind, Limit, LimitName, Severity, Verdict
from rigplan.engine.floatplan import (EmptyRun, FillRecord, FillSchedule, FillWindow, empty_run,
                                      fill_schedule, fill_window, record_heights, switch_point)
from rigplan.engine.grouting import GroutPlan
from rigplan.engine.hoisting import HoistPath, PathCapacity, Rig, path_capacity
from rigplan.engine.staging import StagedPlan, plan_two_stages, staged_plan_at
from rigplan.engine.stringmodel import Closure, GroutSpec, Hole, JointArrays, Settings
from rigplan.engine.rating import PERFORATED_KINDS

# Verdicts by their old names (``Verdict`` members compare equal to the text).
LANDS_OPEN = Verdict.LANDS_OPEN
LANDS_FLOATED = Verdict.LANDS_FLOATED
LANDS_STAGED = Verdict.LANDS_STAGED
CANNOT_LAND = Verdict.CANNOT_LAND
CANNOT_CONFIRM = Verdict.CANNOT_CONFIRM


class PlanCode(enum.StrEnum):
    """What the planner has to say (codes of its findings)."""

    #: a limit over: context ``limit``; joint/step/label (the worst place);
    #: context ``first_step``/``first_label``: the first running step over
    #: it (None: not a per-step limit); quantities ``load``, ``capacity``
    #: (SI of the limit's kind) and ``margin``
    OVER_LIMIT = "plan.over_limit"
    #: the open-ended run fails; cause: its OVER_LIMIT
    OPEN_FAILS = "plan.open_fails"
    #: a float option fails: context ``valve_joint`` (0: float shoe) and
    #: ``planned``; quantity ``fill_density``; cause: why
    OPTION_FAILS = "plan.option_fails"
    #: a screen above the check valve lets hole fluid in: joint/label
    SCREEN_ABOVE_VALVE = "plan.screen_above_valve"
    #: the float equipment is in the hole: no other position or stage tried
    FIXED_CLOSURE = "plan.fixed_closure"
    #: the planned float equipment fails but the string lands open-ended
    RUN_WITHOUT_VALVE = "plan.run_without_valve"
    #: no staged setting: the rig profile has no landing string
    NO_LANDING_STRING = "plan.no_landing_string"
    #: the staged setting fails; cause: the staging finding
    STAGED_FAILS = "plan.staged_fails"
    #: the string is longer than the hole by more than ``HOLE_DEPTH_TOLERANCE``:
    #: quantities ``string_length``, ``hole_depth``, ``tolerance``
    LONGER_THAN_HOLE = "plan.longer_than_hole"
    #: lands on the rated parts but loaded parts are unrated (see ``unrated``);
    #: context ``count``
    UNRATED_LOADED = "plan.unrated_loaded"
    #: a loaded joint is unrated: joint/label, context ``part`` (tension,
    #: collapse or burst)
    UNRATED_PART = "plan.unrated_part"
    #: a hoisting component is unrated: context ``component`` and ``path``
    UNRATED_COMPONENT = "plan.unrated_component"
    #: left empty the pipe collapses by this joint; quantity ``longest_empty``
    #: (nan: no bound) -- these float notes carry context ``valve_joint`` and
    #: quantity ``fill_density``
    EMPTY_COLLAPSES = "plan.empty_collapses"
    #: left empty the string floats (negative hook load) from this joint
    EMPTY_FLOATS = "plan.empty_floats"
    #: left empty the string load falls below the minimum running weight
    EMPTY_TOO_LIGHT = "plan.empty_too_light"
    #: every joint must be filled to the top: floating gains nothing
    FILL_ALL_THE_WAY = "plan.fill_all_the_way"
    #: the set-down weight buckles a screen or overstresses a joint below the
    #: neutral point: quantities ``set_down`` and ``max_set_down`` (the most
    #: that keeps both limits; nan: not known)
    SET_DOWN_TOO_HEAVY = "plan.set_down_too_heavy"
    #: released, stage 1 stands on bottom and its own weight (with stage 2's
    #: set-down) buckles a screen or overstresses a joint of it: joint = the
    #: top joint of stage 1; quantity ``load`` (the compression at the
    #: joint that fails) -- no set-down weight relieves it
    STAGE1_BUCKLES_ON_BOTTOM = "plan.stage1_buckles_on_bottom"
    #: crew action: the chosen plan runs open-ended (open, or every stage of a
    #: staged setting) but the plan names float equipment -- leave the check
    #: valve out (or fit its auto-fill insert) so the pipe fills from the hole.
    #: Context ``valve_joint`` (the [float_equipment] valve: 0 float shoe, m a
    #: collar on the top of joint m, None: none), ``valve_label``, ``staged``
    #: (bool) and ``float_joints`` (labels of float_shoe/float_collar joints)
    LEAVE_VALVE_OUT = "plan.leave_valve_out"


#: Limit margins below this count as over the limit [-].  A fill schedule
#: is built to its window's edge and then checked by the full pressure-area
#: run; the two sum the same forces in different orders, and in a deep
#: string those sums are differences of pressure terms a thousand times the
#: hook load, so they agree only to about 1e-12 of it (1e-9 of a 60 kN load
#: is 60 micronewtons).
MARGIN_TOLERANCE = 1e-9

#: A string this much longer than the hole still counts as reaching
#: bottom, not longer [m]: half a centimetre, below the 0.01 ft / 1 cm a tape
#: or tally is read to, so a sum of joint lengths that meets the depth to
#: rounding is not "longer than the hole" (common practice, no source).
HOLE_DEPTH_TOLERANCE = 0.005


@dataclass(frozen=True)
class RunCheck:
    """A run (open, or floated with a schedule) checked against every limit.

    Arrays are per joint (index j-1 = joint j) unless named per step.
    tension_utilization : DF_t x largest true tension at each joint's top /
        the smaller of its connection and body rating (nan: unrated)
    collapse_utilization, burst_utilization : DF x load / rating per joint
    capacity_margin : per step, (limit - string load) / limit
    limits : the :class:`Limit` checked (the least margin of each kind)
    unrated : loaded but unrated parts (findings ``PlanCode.UNRATED_PART``)
    """

    closure: Closure
    loads: RunningLoads
    capacity_margin: np.ndarray
    tension_utilization: np.ndarray
    collapse_utilization: np.ndarray
    burst_utilization: np.ndarray
    limits: tuple[Limit, ...]
    unrated: tuple[Finding, ...]
    ok: bool
    collapse_rating: np.ndarray | None = None   # ratings used, axial load included [Pa]


@dataclass(frozen=True)
class FloatOption:
    """One float position and fill fluid tried (``reason``: why it does not land)."""

    closure: Closure
    fill_density: float
    window: FillWindow | None      # None when the position cannot float at all
    schedule: FillSchedule | None
    check: RunCheck | None
    lands: bool
    reason: Finding | None = None
    empty: EmptyRun | None = None


@dataclass(frozen=True)
class LandingPlan:
    """Everything the front ends show, SI units.

    verdict : :class:`Verdict`
    governing : the limit with the least margin in the chosen plan
    path : the hoisting path's capacity (string_limit compares with the
        string load; hook_limit with the hook load, dead load included)
    open_check : the open-ended run
    chosen : the run that lands (open or floated), or the best tried
    float_options : every float position and fill fluid tried
    best_float : the chosen float option (or None)
    stages : the staged plan (or None)
    switch_joint : first joint at which the open-ended string load would
        exceed the limit (0: never): where floating must begin
    neutral_point : depth of the neutral point when landed with the
        set-down weight [m] (nan: all in tension)
    grouting : the grout check and lifts (None: no grout planned)
    buckling : buckling below the neutral point with the set-down weight
        (None: nothing set down)
    landed : the landed string with the set-down weight (true force and
        effective tension at every joint face)
    unrated : loaded parts with no rating (findings)
    reasons : why the verdict is what it is (findings, most important first)
    notes : what the crew should know about the float plan (findings)
    """

    verdict: Verdict
    governing: Limit | None
    path: PathCapacity
    dead_load: float
    joints: JointArrays
    hole: Hole
    settings: Settings
    open_check: RunCheck
    chosen: RunCheck
    float_options: tuple[FloatOption, ...]
    best_float: FloatOption | None
    stages: StagedPlan | None
    switch_joint: int
    neutral_point: float
    landed: StepProfile
    grouting: GroutPlan | None = None
    unrated: tuple[Finding, ...] = ()
    buckling: BucklingCheck | None = None
    #: the run shown is the staged setting (its steps: ``stages.steps``)
    staged: bool = False
    reasons: tuple[Finding, ...] = ()
    notes: tuple[Finding, ...] = ()

    @property
    def lands(self) -> bool:
        return self.verdict.lands

    @property
    def hook_load(self) -> np.ndarray:
        """Hook load per step [N]: string load plus the dead load."""
        return self.chosen.loads.string_load + self.dead_load


def _ratio(load, capacity):
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.where(np.isfinite(capacity), load / capacity, np.nan)


def collapse_rating_under_tension(joints: JointArrays, loads: RunningLoads, hole: Hole,
                                  closure: Closure, fill_density: float) -> np.ndarray:
    """Collapse ratings of API-grade joints reduced for the axial tension
    they carry when their collapse load peaks [Pa] (other joints unchanged):
    :func:`rigplan.engine.collapse.api_5c3_under_axial_stress` with the true force
    at that step over the rating wall's steel area."""
    from rigplan.engine.axial import true_force_at
    from rigplan.engine.collapse import api_5c3_under_axial_stress
    from rigplan.engine.tubulars import steel_area
    rating = np.asarray(joints.collapse_rating, dtype=float).copy()
    if joints.yield_strength is None or joints.rating_wall is None or not joints.collapse_method:
        return rating
    use = np.array([m == "api_5c3" for m in joints.collapse_method]) & (loads.collapse_max > 0)
    use &= np.isfinite(joints.yield_strength) & np.isfinite(joints.rating_wall)
    if not np.any(use):
        return rating
    j = np.flatnonzero(use)
    force = true_force_at(joints, hole, closure, fill_density,
                          None if closure.is_open else loads.fill_level,
                          j, loads.collapse_step[j] - 1)
    od, t = joints.od[j], joints.rating_wall[j]
    reduced = api_5c3_under_axial_stress(od, t, joints.yield_strength[j],
                                         force / steel_area(od, t))
    rating[j] = np.minimum(rating[j], reduced)
    return rating


def check_run(joints: JointArrays, loads: RunningLoads, closure: Closure,
              string_limit: float, settings: Settings, hole: Hole | None = None,
              fill_density: float = 0.0, dead_load: float = 0.0) -> RunCheck:
    """Check one run against hoisting, tension, collapse and burst limits.

    With ``hole`` given, API-grade collapse ratings are reduced for the
    axial tension at the step of the largest collapse load
    (:func:`collapse_rating_under_tension`).
    """
    d = settings.design
    # margin on the hook: (hook limit - hook load) / hook limit, dead load in both
    cap_margin = (string_limit - loads.string_load) / (string_limit + dead_load)
    tension_cap = np.fmin(joints.connection_rating, joints.body_rating)
    # Where either rating is missing the joint is unrated, never the other.
    tension_cap = np.where(np.isnan(joints.connection_rating) | np.isnan(joints.body_rating),
                           np.nan, tension_cap)
    t_load = d.tension * np.maximum(loads.envelope_max, 0.0)
    t_util = _ratio(t_load, tension_cap)
    c_rating = (joints.collapse_rating if hole is None else
                collapse_rating_under_tension(joints, loads, hole, closure, fill_density))
    c_util = _ratio(d.collapse * np.maximum(loads.collapse_max, 0.0), c_rating)
    b_util = _ratio(d.burst * np.maximum(loads.burst_max, 0.0), joints.burst_rating)
    label = joints.label
    limits = []
    k = int(np.argmin(cap_margin))
    over = np.flatnonzero(cap_margin < -MARGIN_TOLERANCE)
    first = int(over[0]) if len(over) else None
    limits.append(Limit(LimitName.HOISTING, float(loads.string_load[k] + dead_load),
                        string_limit + dead_load, float(cap_margin[k]), Kind.FORCE,
                        step=k + 1, label=label[k],
                        first_step=None if first is None else first + 1,
                        first_label=None if first is None else label[first]))
    for name, util, load, cap, kind in (
            (LimitName.CONNECTION_TENSION, t_util, t_load, tension_cap, Kind.FORCE),
            (LimitName.COLLAPSE, c_util, d.collapse * loads.collapse_max, c_rating, Kind.PRESSURE),
            (LimitName.BURST, b_util, d.burst * loads.burst_max, joints.burst_rating,
             Kind.PRESSURE)):
        if np.any(np.isfinite(util)):
            j = int(np.nanargmax(util))
            limits.append(Limit(name, float(load[j]), float(cap[j]), float(1.0 - util[j]), kind,
                                joint=j + 1, label=label[j]))
    # Loaded but unrated parts, joint by joint in running order (tension,
    # collapse, burst for each joint): row-major order of the flags.
    flags = np.stack((np.isnan(tension_cap) & (loads.envelope_max > 0),
                      np.isnan(joints.collapse_rating) & (loads.collapse_max > 0),
                      np.isnan(joints.burst_rating) & (loads.burst_max > 0)), axis=1)
    part = ("tension", "collapse", "burst")
    unrated = [Finding(PlanCode.UNRATED_PART, Severity.WARNING, joint=j + 1, label=label[j],
                       context={"part": part[w]})
               for j, w in zip(*(idx.tolist() for idx in np.nonzero(flags)))]
    ok = all(lim.margin >= -MARGIN_TOLERANCE for lim in limits)
    return RunCheck(closure=closure, loads=loads, capacity_margin=cap_margin,
                    tension_utilization=t_util, collapse_utilization=c_util,
                    burst_utilization=b_util, limits=tuple(limits),
                    unrated=tuple(unrated), ok=ok, collapse_rating=c_rating)


def _governing(check: RunCheck) -> Limit:
    return min(check.limits, key=lambda lim: lim.margin)


def top_open_wall_joint(joints: JointArrays) -> int:
    """1-based number of the highest screen joint (0: none)."""
    # searched from the top by the tuple's own (C) search, not joint by joint
    kinds = tuple(joints.kind)[::-1]
    top = 0
    # a check valve below a joint open to the hole through its wall cannot
    # keep the bore above it empty
    for kind in PERFORATED_KINDS:
        if kind in kinds:
            top = max(top, len(kinds) - kinds.index(kind))
    return top


def _float_closures(n: int, planned: Closure, settings: Settings, top_screen: int = 0):
    seen = []
    cands = [planned] if not planned.is_open else []
    if top_screen:
        # a float collar on the top screen joint keeps the screens in the shoe track
        cands.append(Closure(top_screen, planned.valve_rating))
    cands.append(Closure(0, planned.valve_rating))
    cands += [Closure(m, planned.valve_rating) for m in settings.float_collar_positions]
    # positions below the top screen cannot float (the planned one is still
    # reported, with the reason)
    cands = [c for c in cands if c is planned or (c.valve_joint or 0) >= top_screen]
    for c in cands:
        if c.valve_joint is not None and 0 <= c.valve_joint < n and \
                c.valve_joint not in [s.valve_joint for s in seen]:
            seen.append(c)
    return seen


def try_float(joints: JointArrays, hole: Hole, closure: Closure, fill_density: float,
              string_limit: float, settings: Settings, dead_load: float = 0.0,
              record: FillRecord | None = None) -> FloatOption:
    """Fill window, schedule and full check for one valve position and fluid.

    ``record``: the fill already in the pipe for the steps run (a fact of
    the run); the schedule keeps it and plans the later steps with
    ``fill_density`` (:func:`rigplan.engine.floatplan.record_heights`).

    The schedule keeps the hook side in its window by construction; the
    full pressure-area run then checks every connection and joint.  A
    connection over its limit lowers the allowed fill at the step where it
    peaks and the schedule is derived again (at most five passes).
    """
    d = settings.design
    limit = string_limit
    top_screen = top_open_wall_joint(joints)
    m = closure.valve_joint or 0
    if top_screen > m:
        return FloatOption(
            closure, fill_density, None, None, None, False,
            Finding(PlanCode.SCREEN_ABOVE_VALVE, Severity.REASON, joint=top_screen,
                    label=joints.label[top_screen - 1]))
    # With a recorded fill of another fluid, the pipe holds two layers.  They
    # are modelled as one column of the heavier fluid of the same weight
    # (record_heights): exact for the hook load and the pressure at the
    # valve, and lower inside pressure above it than the two layers (the
    # collapse load is overstated, never understated); it always fits in
    # the pipe.  Volumes added are then stated in the fluid added.
    shown = fill_density
    if record is not None and record.steps and record.density > fill_density:
        fill_density = record.density
    for _ in range(5):
        window = fill_window(joints, hole, closure, fill_density, limit,
                             settings.min_running_weight, d.collapse)
        schedule = fill_schedule(joints, hole, closure, fill_density, limit,
                                 settings.min_running_weight, d.collapse, window=window,
                                 fixed_heights=None if record is None or not record.steps else
                                 record_heights(joints, closure, record, fill_density),
                                 dead_load=dead_load)
        if shown != fill_density and schedule.top_ups:
            schedule = dataclasses.replace(schedule, top_ups=tuple(
                dataclasses.replace(t, volume=t.volume * fill_density / shown)
                for t in schedule.top_ups))
        empty = empty_run(joints, hole, closure, fill_density, settings.min_running_weight,
                          d.collapse, window=window)
        if not schedule.feasible:
            return FloatOption(closure, shown, window, schedule, None, False,
                               schedule.failure, empty)
        loads = running_loads(joints, hole, closure, fill_density,
                              np.nan_to_num(schedule.fill_level, nan=0.0))
        check = check_run(joints, loads, closure, string_limit, settings, hole, fill_density,
                          dead_load)
        # A connection over its limit: the fill above the valve loads every
        # connection above it by at most the fluid's weight, so lowering the
        # hoisting side of the window by the excess and planning again keeps
        # that connection within its rating (or shows the window closes).
        over = [lim for lim in check.limits
                if lim.name == LimitName.CONNECTION_TENSION and lim.margin < -MARGIN_TOLERANCE]
        if not over:
            break
        excess = over[0].load * (1.0 - 1.0 / (1.0 - over[0].margin)) / d.tension
        new_limit = min(limit, float(np.max(schedule.string_load))) - max(excess, 1.0)
        if not new_limit > 0:
            break
        limit = new_limit
    wm = np.asarray(schedule.weight_margin, dtype=float)
    if settings.min_running_weight > 0 and np.any(np.isfinite(wm)):
        # the string must still go down wherever the pipe is not kept full
        k = int(np.argmin(np.where(np.isfinite(wm), wm, np.inf)))
        weight = Limit(LimitName.RUNNING_WEIGHT, float(loads.string_load[k]),
                       float(settings.min_running_weight), float(wm[k]), Kind.FORCE,
                       step=k + 1, label=joints.label[k])
        check = dataclasses.replace(check, limits=check.limits + (weight,),
                                    ok=check.ok and weight.margin >= -MARGIN_TOLERANCE)
    return FloatOption(closure, shown, window, schedule, check, check.ok,
                       None if check.ok else over_limit(_governing(check)), empty)


def over_limit(limit: Limit) -> Finding:
    """The finding that ``limit`` is exceeded (``PlanCode.OVER_LIMIT``)."""
    return Finding(PlanCode.OVER_LIMIT, Severity.REASON, joint=limit.joint, step=limit.step,
                   label=limit.label,
                   quantities={"load": (limit.load, limit.kind),
                               "capacity": (limit.capacity, limit.kind),
                               "margin": (limit.margin, Kind.RATIO)},
                   context={"limit": str(limit.name), "first_step": limit.first_step,
                            "first_label": limit.first_label})


def float_notes(opt: FloatOption, n: int, labels=None) -> list[Finding]:
    """What the crew should know about running a closed string: left empty
    it collapses or floats; or floating gains nothing.  ``labels`` (running
    order) name the joints and the collar's joint by label."""
    e = opt.empty
    if e is None:
        return []

    def label(k):
        return str(labels[k - 1]) if labels is not None and k and 1 <= k <= len(labels) else None

    m = opt.closure.valve_joint
    about = {"context": {"valve_joint": m, "valve_label": label(m)},
             "quantities": {"fill_density": (opt.fill_density, Kind.DENSITY)}}
    notes = []
    if e.collapse_step:
        longest = e.longest_empty if np.isfinite(e.longest_empty) else float("nan")
        notes.append(Finding(PlanCode.EMPTY_COLLAPSES, Severity.WARNING, joint=e.collapse_step,
                             label=label(e.collapse_step), context=about["context"],
                             quantities={**about["quantities"],
                                         "longest_empty": (longest, Kind.LENGTH)}))
    if e.negative_step:
        notes.append(Finding(PlanCode.EMPTY_FLOATS, Severity.WARNING, joint=e.negative_step,
                             label=label(e.negative_step), **about))
    elif e.float_step:
        notes.append(Finding(PlanCode.EMPTY_TOO_LIGHT, Severity.WARNING, joint=e.float_step,
                             label=label(e.float_step), **about))
    if opt.schedule.feasible and opt.schedule.fill_to_top_through >= n:
        notes.append(Finding(PlanCode.FILL_ALL_THE_WAY, Severity.INFO, **about))
    return notes


def _option_key(opt: FloatOption):
    if not opt.lands or opt.schedule is None:
        return (0, 0, -np.inf)
    return (1, -len(opt.schedule.top_ups), round(min(opt.schedule.least_margin,
                                                     _governing(opt.check).margin), 4))


@dataclass(frozen=True)
class PlanInputs:
    """What every step of :func:`plan_landing` reads (nothing changes it)."""

    joints: JointArrays
    hole: Hole
    rig: Rig
    settings: Settings
    closure: Closure
    fixed_closure: bool
    capacity: PathCapacity
    dead_load: float
    open_loads: RunningLoads
    fill_record: FillRecord | None = None     # the fill already in the pipe (as run)
    fill_fluids: tuple | None = None          # the fill fluids to offer (None: the settings')
    staged_split: int | None = None           # a staged run with this split (as run)

    @property
    def limit(self) -> float:
        """Allowed string load on the hoisting path [N]."""
        return self.capacity.string_limit

    @property
    def fluids(self) -> tuple:
        """The fill fluid densities offered, the job's own first [kg/m^3]."""
        if self.fill_fluids is not None:
            return tuple(self.fill_fluids)
        s = self.settings
        return (s.fill_density,) + tuple(s.fill_density_alternatives)


@dataclass(frozen=True)
class Trial:
    """Where the trial stands after each step of :func:`plan_landing`.

    verdict : None until a step decides it
    chosen : the run shown (the one that lands, or the best tried)
    options, best : float options tried and the chosen one
    reasons : findings gathered so far (each step returns a new Trial)
    """

    chosen: RunCheck
    verdict: Verdict | None = None
    options: tuple = ()
    best: FloatOption | None = None
    stages: StagedPlan | None = None
    reasons: tuple = ()
    governing: Limit | None = None
    staged: bool = False            # the chosen run is the staged setting

    def add(self, *findings: Finding, **changes) -> Trial:
        return dataclasses.replace(self, reasons=self.reasons + findings, **changes)


def choose_path(rig: Rig, path: str | None) -> tuple[PathCapacity, HoistPath]:
    """The named hoisting path, or the one with the largest string limit."""
    caps = [path_capacity(p) for p in rig.paths]
    if not caps:
        raise ValueError(f"rig {rig.name!r} has no hoisting path")
    if path is None:
        finite = [c for c in caps if np.isfinite(c.string_limit)]
        cap = max(finite, key=lambda c: c.string_limit) if finite else caps[0]
    else:
        named = [c for c in caps if c.path == path]
        if not named:
            raise ValueError(f"rig {rig.name!r} has no path {path!r}; "
                             f"paths: {', '.join(c.path for c in caps)}")
        cap = named[0]
    if not np.isfinite(cap.string_limit) or cap.string_limit <= 0:
        raise ValueError(f"hoisting path {cap.path!r} has no rated capacity left for the "
                         "string (check its ratings, dead load and overpull reserve)")
    hoist = next(p for p in rig.paths if p.name == cap.path)
    return cap, hoist


def option_failures(options, planned: bool = False) -> tuple[Finding, ...]:
    """One ``OPTION_FAILS`` finding per float option that does not land."""
    return tuple(Finding(PlanCode.OPTION_FAILS, Severity.REASON,
                         context={"valve_joint": o.closure.valve_joint, "planned": planned},
                         quantities={"fill_density": (o.fill_density, Kind.DENSITY)},
                         cause=o.reason)
                 for o in options if not o.lands)


def best_tried(options) -> RunCheck | None:
    """The checked run with the largest least margin among the options."""
    tried = [o for o in options if o.check is not None]
    return max(tried, key=lambda o: _governing(o.check).margin).check if tried else None


def land_floated(trial: Trial, options) -> Trial | None:
    """The trial with the best landing option of ``options`` chosen (None: none lands)."""
    landing = [o for o in options if o.lands]
    if not landing:
        return None
    best = max(landing, key=_option_key)
    return dataclasses.replace(trial, best=best, chosen=best.check, verdict=LANDS_FLOATED)


def check_open(inp: PlanInputs) -> Trial:
    """The open-ended run checked; its failure is the first reason."""
    check = check_run(inp.joints, inp.open_loads, Closure(), inp.limit, inp.settings, inp.hole,
                      dead_load=inp.dead_load)
    trial = Trial(chosen=check)
    if not check.ok:
        trial = trial.add(Finding(PlanCode.OPEN_FAILS, Severity.REASON,
                                  cause=over_limit(_governing(check))))
    return trial


def try_planned_float(inp: PlanInputs, trial: Trial) -> Trial:
    """The float equipment the plan names, with every fill fluid: the loads
    shown must be those of the run the crew will make."""
    if inp.closure.is_open:
        return trial
    planned = tuple(try_float(inp.joints, inp.hole, inp.closure, rho, inp.limit, inp.settings,
                              inp.dead_load, inp.fill_record) for rho in inp.fluids)
    trial = dataclasses.replace(trial, options=trial.options + planned)
    failures = option_failures(planned, planned=True)
    landed = land_floated(trial, planned)
    if landed is not None:
        return landed.add(*failures)
    trial = trial.add(*failures)
    if inp.fixed_closure:
        return trial.add(Finding(PlanCode.FIXED_CLOSURE, Severity.REASON),
                         chosen=best_tried(planned) or trial.chosen, verdict=CANNOT_LAND)
    return trial


def try_open(inp: PlanInputs, trial: Trial, open_check: RunCheck) -> Trial:
    """Open-ended, when nothing has landed yet and the open run keeps every limit."""
    if trial.verdict is not None or not open_check.ok:
        return trial
    trial = dataclasses.replace(trial, verdict=LANDS_OPEN)
    if not inp.closure.is_open:
        trial = trial.add(Finding(PlanCode.RUN_WITHOUT_VALVE, Severity.ACTION))
    return trial


def try_other_floats(inp: PlanInputs, trial: Trial) -> Trial:
    """A float shoe and the float collar positions of the settings."""
    if trial.verdict is not None:
        return trial
    others = [c for c in _float_closures(inp.joints.n, Closure(), inp.settings,
                                         top_open_wall_joint(inp.joints))
              if c.valve_joint != inp.closure.valve_joint]
    tried = tuple(try_float(inp.joints, inp.hole, c, rho, inp.limit, inp.settings, inp.dead_load)
                  for c in others for rho in inp.fluids)
    trial = dataclasses.replace(trial, options=trial.options + tried)
    landed = land_floated(trial, tried)
    if landed is not None:
        return landed
    return trial.add(*option_failures(tried),
                     chosen=best_tried(trial.options) or trial.chosen)


def try_stages(inp: PlanInputs, trial: Trial) -> Trial:
    """Two stages on the rig's landing string, when nothing else lands."""
    if trial.verdict is not None:
        return trial
    ls = inp.rig.landing_string
    if ls is None:
        return trial.add(Finding(PlanCode.NO_LANDING_STRING, Severity.REASON))
    held = inp.settings.stage1_release == "after_grout"
    if inp.staged_split is not None and 1 <= inp.staged_split < inp.joints.n:
        # as run: the split is the one the crew has been running to
        stages = staged_plan_at(inp.joints, inp.hole, inp.staged_split, inp.limit,
                                ls.weight_per_length, ls.tensile_rating, ls.density,
                                inp.settings.design.tension, dead_load=inp.dead_load,
                                joint_length=ls.joint_length,
                                set_down_weight=inp.settings.set_down_weight,
                                held_until_grout=held)
    else:
        stages = plan_two_stages(inp.joints, inp.hole, inp.limit, ls.weight_per_length,
                                 ls.tensile_rating, ls.density, inp.settings.design.tension,
                                 inp.open_loads, dead_load=inp.dead_load,
                                 joint_length=ls.joint_length,
                                 set_down_weight=inp.settings.set_down_weight,
                                 held_until_grout=held)
    if not stages.feasible:
        return trial.add(Finding(PlanCode.STAGED_FAILS, Severity.REASON, cause=stages.reason),
                         stages=stages)
    chosen = check_run(inp.joints, _staged_loads(inp.open_loads, stages), Closure(), inp.limit,
                       inp.settings, dead_load=inp.dead_load)
    # hoisting is checked by the stages, step by step (the lowering on the
    # landing string included); the joints' own limits by the staged run
    own = [lim for lim in chosen.limits if lim.name != LimitName.HOISTING]
    over = [lim for lim in own if lim.margin < -MARGIN_TOLERANCE]
    if over:
        return trial.add(Finding(PlanCode.STAGED_FAILS, Severity.REASON,
                                 cause=over_limit(over[0])), stages=stages)
    c = stages.governing_check
    staged = Limit(c.name, c.load, c.capacity, c.margin, c.kind, joint=stages.split)
    governing = min([staged] + own, key=lambda lim: lim.margin)
    return dataclasses.replace(trial, verdict=LANDS_STAGED, chosen=chosen, stages=stages,
                               governing=governing, staged=True)


def cannot_land(trial: Trial) -> Trial:
    """Nothing landed: the verdict is ``cannot land``."""
    return trial if trial.verdict is not None else dataclasses.replace(trial, verdict=CANNOT_LAND)


def check_hole_depth(inp: PlanInputs, trial: Trial) -> Trial:
    """A string longer than the hole cannot land, whatever else holds."""
    total = float(np.sum(inp.joints.length))
    depth = inp.hole.depth
    if not (np.isfinite(depth) and total > depth + HOLE_DEPTH_TOLERANCE):
        return trial
    reason = Finding(PlanCode.LONGER_THAN_HOLE, Severity.REASON,
                     quantities={"string_length": (total, Kind.LENGTH),
                                 "hole_depth": (float(depth), Kind.DEPTH),
                                 "tolerance": (HOLE_DEPTH_TOLERANCE, Kind.LENGTH)})
    limit = Limit(LimitName.HOLE_DEPTH, total, float(depth), float((depth - total) / depth),
                  Kind.LENGTH)
    return dataclasses.replace(trial, reasons=(reason,) + trial.reasons, verdict=CANNOT_LAND,
                               governing=limit)


def unrated_parts(inp: PlanInputs, trial: Trial) -> tuple[Finding, ...]:
    """Unrated components on the hoisting path, then unrated loaded joints."""
    cap = inp.capacity
    return tuple(Finding(PlanCode.UNRATED_COMPONENT, Severity.WARNING,
                         context={"component": part, "path": cap.path})
                 for part in cap.unrated_on_path) + tuple(trial.chosen.unrated)


def check_unrated(trial: Trial, unrated: tuple) -> Trial:
    """A plan that lands with loaded unrated parts cannot be confirmed."""
    if not (trial.verdict.lands and unrated):
        return trial
    return trial.add(Finding(PlanCode.UNRATED_LOADED, Severity.REASON,
                             context={"count": len(unrated)}), verdict=CANNOT_CONFIRM)


def crew_notes(joints: JointArrays, trial: Trial) -> tuple[Finding, ...]:
    """Float notes of the chosen option (or of the first tried that has them)."""
    shown = ([trial.best] if trial.best is not None
             else [o for o in trial.options if o.empty is not None][:1])
    notes = []
    for o in shown:
        notes += [f for f in float_notes(o, joints.n, joints.label) if f not in notes]
    return tuple(notes)


def valve_left_out(joints: JointArrays, planned: Closure, trial: Trial) -> tuple[Finding, ...]:
    """The crew action when the plan shown runs open-ended although the plan
    names float equipment (the planned closure or float_shoe/float_collar
    joints): the loads shown are those of an open pipe, so the valve must be
    left out or held open, or every figure is wrong (a closed, empty stage
    sees the full hole-fluid head outside; common practice, no source)."""
    kinds = tuple(str(joints.label[j]) for j, k in enumerate(joints.kind)
                  if k in ("float_shoe", "float_collar"))
    if planned.is_open and not kinds:
        return ()
    if trial.verdict not in (LANDS_OPEN, LANDS_STAGED, CANNOT_CONFIRM):
        return ()
    if not trial.chosen.closure.is_open:
        return ()
    m = planned.valve_joint
    label = str(joints.label[m - 1]) if m and 1 <= m <= joints.n else None
    return (Finding(PlanCode.LEAVE_VALVE_OUT, Severity.ACTION, joint=m or None, label=label,
                    context={"valve_joint": m, "valve_label": label,
                             "staged": _staged_chosen(trial), "float_joints": kinds}),)


def _staged_chosen(trial: Trial) -> bool:
    """The run shown is the staged setting."""
    return trial.staged and trial.stages is not None


def landed_profile(inp: PlanInputs, trial: Trial) -> StepProfile:
    """Forces along the landed string with the set-down weight on bottom
    (staged: stage 1 standing on bottom, stage 2 set down on it)."""
    if _staged_chosen(trial):
        return trial.stages.landed
    best = trial.best
    fill_final = 0.0
    if trial.chosen.closure.valve_joint is not None and best is not None:
        fill_final = float(np.nan_to_num(best.schedule.fill_level[-1], nan=0.0))
    return step_profile(inp.joints, inp.hole, trial.chosen.closure, inp.joints.n,
                        best.fill_density if best else 0.0, fill_final,
                        slack_off=inp.settings.set_down_weight)


def check_set_down(inp: PlanInputs, trial: Trial,
                   landed: StepProfile) -> tuple[Trial, BucklingCheck | None]:
    """Buckling below the neutral point with the set-down weight
    (:func:`rigplan.engine.buckling.check_buckling`, vertical hole, the
    tension design factor on the combined stress).  Two limits join the
    chosen run's: a screen in effective compression above its critical
    buckling load (``screen buckling``), and the axial plus helical bending
    stress of a joint against its yield (``buckling stress``); either over
    its limit means the string cannot be landed with that set-down weight.
    Joints in compression whose buckling cannot be worked out (modulus,
    hole diameter or yield unknown) are unrated parts."""
    staged = _staged_chosen(trial)     # stage 1 stands on bottom: compressed anyway
    if not (inp.settings.set_down_weight > 0 or staged):
        return trial, None
    joints = inp.joints
    modulus = joints.modulus if joints.modulus is not None else np.full(joints.n, np.nan)
    screens = np.array([k in PERFORATED_KINDS for k in joints.kind], dtype=bool)
    set_down = float(inp.settings.set_down_weight)
    chk = check_buckling(joints, landed, inp.hole.diameter, modulus,
                         inp.settings.design.tension, set_down=set_down, screens=screens)
    label = joints.label
    limits = []
    screen = (screens[:len(chk.compression)] & (chk.compression > 0)
              & np.isfinite(chk.sinusoidal_load))
    if np.any(screen):
        with np.errstate(divide="ignore", invalid="ignore"):
            ratio = np.where(chk.sinusoidal_load > 0, chk.compression / chk.sinusoidal_load, np.inf)
        j = int(np.argmax(np.where(screen, ratio, -np.inf)))
        margin = 1.0 - ratio[j] if np.isfinite(ratio[j]) else -1.0
        limits.append(Limit(LimitName.SCREEN_BUCKLING, float(chk.compression[j]),
                            float(chk.sinusoidal_load[j]), float(margin), Kind.FORCE,
                            joint=j + 1, label=label[j]))
    util = chk.stress_utilization
    if np.any(np.isfinite(util)):
        j = int(np.nanargmax(util))
        stress = chk.design_factor * (chk.axial_stress[j] + chk.bending_stress[j])
        limits.append(Limit(LimitName.BUCKLING_STRESS, float(stress),
                            float(joints.yield_strength[j]), float(1.0 - util[j]), Kind.STRESS,
                            joint=j + 1, label=label[j]))
    unknown = tuple(Finding(PlanCode.UNRATED_PART, Severity.WARNING, joint=j + 1,
                            label=label[j], context={"part": "buckling"})
                    for j in np.flatnonzero(chk.unknown).tolist())
    ok = all(lim.margin >= -MARGIN_TOLERANCE for lim in limits)
    chosen = dataclasses.replace(trial.chosen, limits=trial.chosen.limits + tuple(limits),
                                 unrated=trial.chosen.unrated + unknown,
                                 ok=trial.chosen.ok and ok)
    trial = dataclasses.replace(trial, chosen=chosen)
    over = [lim for lim in limits if lim.margin < -MARGIN_TOLERANCE]
    if over and trial.verdict is not None and trial.verdict.lands:
        in_stage1 = [lim for lim in over if staged and lim.joint <= trial.stages.split]
        if in_stage1:
            j = in_stage1[0].joint
            action = Finding(PlanCode.STAGE1_BUCKLES_ON_BOTTOM, Severity.REASON,
                             joint=trial.stages.split, label=label[trial.stages.split - 1],
                             quantities={"load": (float(chk.compression[j - 1]),
                                                         Kind.FORCE)})
        else:
            action = Finding(PlanCode.SET_DOWN_TOO_HEAVY, Severity.ACTION,
                             quantities={"set_down": (set_down, Kind.FORCE),
                                         "max_set_down": (chk.max_set_down, Kind.FORCE)})
        trial = trial.add(*(over_limit(lim) for lim in over), action, verdict=CANNOT_LAND)
    return trial, chk


def governing_limit(trial: Trial) -> Limit:
    """The limit with the least margin of the chosen run; the hole depth for
    a string longer than the hole; the staged setting's least margin when it
    lands in stages."""
    g = trial.governing
    if g is not None and (g.name == LimitName.HOLE_DEPTH or (
            _staged_chosen(trial) and trial.verdict in (LANDS_STAGED, CANNOT_CONFIRM))):
        return g
    return _governing(trial.chosen)


def plan_grouting(inp: PlanInputs, grout: GroutSpec | None) -> GroutPlan | None:
    """The grout collapse check and lifts (None: no grout planned)."""
    if grout is None:
        return None
    from rigplan.engine.grouting import plan_grout_lifts
    return plan_grout_lifts(inp.joints, inp.hole, grout, inp.settings.design.collapse)


def plan_landing(joints: JointArrays, hole: Hole, rig: Rig, settings: Settings,
                 closure: Closure = Closure(), path: str | None = None,
                 grout: GroutSpec | None = None, fixed_closure: bool = False,
                 fill_record: FillRecord | None = None, fill_fluids: tuple | None = None,
                 staged_split: int | None = None) -> LandingPlan:
    """Plan how to land a string with a rig and check every limit.

    Parameters
    ----------
    joints : JointArrays  the rated string, joint 1 first
    hole : Hole           annulus fluid and level
    rig : Rig             hoisting paths and landing string
    settings : Settings   fill fluids, design factors, minimum running weight
    closure : Closure     the float equipment planned (tried first)
    path : str            hoisting path name (default: the strongest)
    grout : GroutSpec     annular grout to check after landing
    fixed_closure : bool  the planned float equipment is already in the hole
        (joints have been run): try no other position and no staging
    fill_record : FillRecord  the fill already in the pipe for the steps run
        (as run, floated): kept as it is; later steps are planned with the
        fill fluids offered
    fill_fluids : tuple   the fill fluid densities to offer [kg/m^3] (None:
        the settings' own and alternatives)
    staged_split : int    as run in stages: stage 1 is joints 1..split, no
        float equipment, nothing else tried
    """
    cap, hoist = choose_path(rig, path)
    inp = PlanInputs(joints, hole, rig, settings, closure, fixed_closure, cap, hoist.dead_load,
                     running_loads(joints, hole, Closure()), fill_record, fill_fluids,
                     staged_split)
    trial = check_open(inp)
    if staged_split is not None:
        # as run in stages: no float equipment was installed, nothing else is tried
        inp = dataclasses.replace(inp, closure=Closure())
        trial = dataclasses.replace(trial, verdict=None)
    open_check = trial.chosen
    if staged_split is None:
        trial = try_planned_float(inp, trial)
        trial = try_open(inp, trial, open_check)
        trial = try_other_floats(inp, trial)
    trial = try_stages(inp, trial)
    trial = cannot_land(trial)
    trial = check_hole_depth(inp, trial)
    landed = landed_profile(inp, trial)
    trial, buckling = check_set_down(inp, trial, landed)
    unrated = unrated_parts(inp, trial)
    trial = check_unrated(trial, unrated)
    return LandingPlan(
        verdict=trial.verdict, governing=governing_limit(trial),
        path=cap, dead_load=inp.dead_load, joints=joints, hole=hole, settings=settings,
        open_check=open_check, chosen=trial.chosen, float_options=trial.options,
        best_float=trial.best, stages=trial.stages,
        switch_joint=switch_point(inp.open_loads.string_load, inp.limit),
        neutral_point=_neutral_point(trial, landed, settings),
        grouting=plan_grouting(inp, grout), landed=landed,
        unrated=unrated, reasons=trial.reasons,
        notes=valve_left_out(joints, closure, trial) + crew_notes(joints, trial),
        buckling=buckling, staged=_staged_chosen(trial),
    )


def _neutral_point(trial: Trial, landed: StepProfile, settings: Settings) -> float:
    """Depth of the neutral point when landed [m] (nan: all in tension).  A
    staged setting: stage 2's with the set-down weight, else stage 1's top
    (released, stage 1 stands on bottom)."""
    if _staged_chosen(trial):
        st = trial.stages
        return (st.stage2_neutral_point if np.isfinite(st.stage2_neutral_point)
                else st.stage1_neutral_point)
    return neutral_point_depth(landed) if settings.set_down_weight > 0 else float("nan")


def _staged_loads(open_loads: RunningLoads, stages: StagedPlan) -> RunningLoads:
    """Per-step loads of a two-stage set: stage 1 as run open-ended (its
    joints see the same forces lowered on the landing string), then stage 2
    run from the floor.  Index k-1 is still joint k."""
    p = stages.split
    s2 = stages.stage2_loads
    cat = lambda a, b: np.concatenate((a[:p], b))
    return dataclasses.replace(
        open_loads,
        shoe_depth=cat(open_loads.shoe_depth, s2.shoe_depth),
        fill_level=cat(open_loads.fill_level, s2.fill_level),
        string_load=cat(open_loads.string_load, s2.string_load),
        effective_top=cat(open_loads.effective_top, s2.effective_top),
        envelope_max=cat(open_loads.envelope_max, s2.envelope_max),
        envelope_step=cat(open_loads.envelope_step, s2.envelope_step + p),
        envelope_min=cat(open_loads.envelope_min, s2.envelope_min),
        envelope_min_step=cat(open_loads.envelope_min_step, s2.envelope_min_step + p),
        collapse_max=cat(open_loads.collapse_max, s2.collapse_max),
        collapse_step=cat(open_loads.collapse_step, s2.collapse_step + p),
        burst_max=cat(open_loads.burst_max, s2.burst_max),
    )


