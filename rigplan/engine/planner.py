"""The landing plan: picks the way to land a string and checks every limit.

Engine orchestration only: it calls the topic modules (``axial``,
``floatplan``, ``staging``, ``grouting``, ``hoisting``) and collects their
results in :class:`LandingPlan`; it adds no physics of its own.

Order of trial (first that keeps every limit wins):

1. open-ended, the hole fluid inside;
2. floated: float shoe and float collars at the positions in the settings,
   each with every fill fluid offered, ranked by fewest top-ups then the
   largest least margin;
3. two stages on the rig's landing string;
4. otherwise: cannot land, with the reasons.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass, field

import numpy as np

from rigplan import CAUTION
from rigplan.engine.axial import RunningLoads, neutral_point_depth, running_loads, step_profile
from rigplan.engine.floatplan import (EmptyRun, FillSchedule, FillWindow, empty_run, fill_schedule,
                               fill_window, switch_point)
from rigplan.engine.hoisting import PathCapacity, Rig, path_capacity
from rigplan.engine.staging import StagedPlan, StageFailure, StagePhase, plan_two_stages
from rigplan.engine.stringmodel import Closure, GroutSpec, Hole, JointArrays, Settings

LANDS_OPEN = "lands open"
LANDS_FLOATED = "lands with float plan"
LANDS_STAGED = "lands in stages"
CANNOT_LAND = "cannot land"
CANNOT_CONFIRM = "cannot confirm"


@dataclass(frozen=True)
class Limit:
    """One checked limit: what, where, load against capacity, margin.

    margin = (capacity - load) / capacity [-], utilization = load / capacity
    (design factors already applied to the load).
    """

    name: str
    where: str
    load: float
    capacity: float
    margin: float
    kind: str = "force"      # quantity kind of load and capacity: "force" or "pressure"


@dataclass(frozen=True)
class RunCheck:
    """A run (open, or floated with a schedule) checked against every limit.

    Arrays are per joint (index j-1 = joint j) unless named per step.
    tension_utilization : DF_t x largest true tension at each joint's top /
        the smaller of its connection and body rating (nan: unrated)
    collapse_utilization, burst_utilization : DF x load / rating per joint
    capacity_margin : per step, (limit - string load) / limit
    """

    closure: Closure
    loads: RunningLoads
    capacity_margin: np.ndarray
    tension_utilization: np.ndarray
    collapse_utilization: np.ndarray
    burst_utilization: np.ndarray
    limits: tuple
    unrated: tuple
    ok: bool
    collapse_rating: np.ndarray | None = None   # ratings used, axial load included [Pa]


@dataclass(frozen=True)
class FloatOption:
    """One float position and fill fluid tried."""

    closure: Closure
    fill_density: float
    window: FillWindow | None      # None when the position cannot float at all
    schedule: FillSchedule | None
    check: RunCheck | None
    lands: bool
    reason: str = ""
    empty: EmptyRun | None = None


@dataclass(frozen=True)
class LandingPlan:
    """Everything the front ends show, SI units.

    verdict : one of ``lands open``, ``lands with float plan``,
        ``lands in stages``, ``cannot land``, ``cannot confirm``
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
    landed : StepProfile of the landed string with the set-down weight
        (true force and effective tension at every joint face)
    cautions : the planning cautions
    """

    verdict: str
    governing: Limit | None
    path: PathCapacity
    dead_load: float
    joints: JointArrays
    hole: Hole
    settings: Settings
    open_check: RunCheck
    chosen: RunCheck
    float_options: tuple
    best_float: FloatOption | None
    stages: StagedPlan | None
    switch_joint: int
    neutral_point: float
    grouting: object = None
    landed: object = None
    unrated: tuple = ()
    reasons: tuple = ()
    notes: tuple = ()
    cautions: tuple = field(default_factory=lambda: (CAUTION,))

    @property
    def lands(self) -> bool:
        return self.verdict in (LANDS_OPEN, LANDS_FLOATED, LANDS_STAGED)

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
    limits.append(Limit("hoisting capacity", f"step {k + 1} ({label[k]} at the floor)",
                        float(loads.string_load[k] + dead_load), string_limit + dead_load,
                        float(cap_margin[k])))
    for name, util, load, cap in (
            ("connection tension", t_util, t_load, tension_cap),
            ("collapse", c_util, d.collapse * loads.collapse_max, c_rating),
            ("burst", b_util, d.burst * loads.burst_max, joints.burst_rating)):
        if np.any(np.isfinite(util)):
            j = int(np.nanargmax(util))
            limits.append(Limit(name, f"joint {j + 1} ({label[j]})", float(load[j]),
                                float(cap[j]), float(1.0 - util[j]),
                                "force" if name == "connection tension" else "pressure"))
    # Loaded but unrated parts, joint by joint in running order (tension,
    # collapse, burst for each joint): row-major order of the flags.
    flags = np.stack((np.isnan(tension_cap) & (loads.envelope_max > 0),
                      np.isnan(joints.collapse_rating) & (loads.collapse_max > 0),
                      np.isnan(joints.burst_rating) & (loads.burst_max > 0)), axis=1)
    what = ("tension at the top of joint", "collapse of joint", "burst of joint")
    unrated = [f"{what[w]} {j + 1} ({label[j]})"
               for j, w in zip(*(idx.tolist() for idx in np.nonzero(flags)))]
    ok = all(lim.margin >= -1e-12 for lim in limits)
    return RunCheck(closure=closure, loads=loads, capacity_margin=cap_margin,
                    tension_utilization=t_util, collapse_utilization=c_util,
                    burst_utilization=b_util, limits=tuple(limits),
                    unrated=tuple(unrated), ok=ok, collapse_rating=c_rating)


def _governing(check: RunCheck) -> Limit:
    return min(check.limits, key=lambda lim: lim.margin)


#: Joint kinds open to the hole through their wall: a check valve below one
#: cannot keep the bore above it empty.
OPEN_WALL_KINDS = ("screen",)


def top_open_wall_joint(joints: JointArrays) -> int:
    """1-based number of the highest screen joint (0: none)."""
    # searched from the top by the tuple's own (C) search, not joint by joint
    kinds = tuple(joints.kind)[::-1]
    top = 0
    for kind in OPEN_WALL_KINDS:
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
              string_limit: float, settings: Settings, dead_load: float = 0.0) -> FloatOption:
    """Fill window, schedule and full check for one valve position and fluid.

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
            f"joint {top_screen} ({joints.label[top_screen - 1]}) is a screen above the check "
            f"valve: hole fluid enters through it, so the pipe cannot be floated; put the float "
            f"collar on joint {top_screen} or higher")
    for _ in range(5):
        window = fill_window(joints, hole, closure, fill_density, limit,
                             settings.min_running_weight, d.collapse)
        schedule = fill_schedule(joints, hole, closure, fill_density, limit,
                                 settings.min_running_weight, d.collapse, window=window)
        empty = empty_run(joints, hole, closure, fill_density, settings.min_running_weight,
                          d.collapse, window=window)
        if not schedule.feasible:
            return FloatOption(closure, fill_density, window, schedule, None, False,
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
                if lim.name == "connection tension" and lim.margin < -1e-12]
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
        weight = Limit("running weight", f"step {k + 1} ({joints.label[k]} at the floor)",
                       float(loads.string_load[k]), float(settings.min_running_weight),
                       float(wm[k]))
        check = dataclasses.replace(check, limits=check.limits + (weight,),
                                    ok=check.ok and weight.margin >= -1e-12)
    return FloatOption(closure, fill_density, window, schedule, check, check.ok,
                       "" if check.ok else
                       f"{_governing(check).name} over its limit at {_governing(check).where}",
                       empty)


def float_notes(opt: FloatOption, n: int) -> list:
    """Plain warnings about running a closed string (empty collapse, floating)."""
    notes = []
    e = opt.empty
    name = f"{_closure_name(opt.closure)} with fill {_density_words(opt.fill_density)}"
    if e is None:
        return notes
    if e.collapse_step:
        notes.append(f"{name}: left empty the pipe would collapse by joint {e.collapse_step}"
                     + (f"; never leave more than {e.longest_empty:.1f} m "
                        f"({e.longest_empty / 0.3048:.0f} ft) empty above the valve"
                        if np.isfinite(e.longest_empty) else ""))
    if e.negative_step:
        notes.append(f"{name}: left empty the string floats (negative hook load) from joint "
                     f"{e.negative_step}: fill it or it will not go down")
    elif e.float_step:
        notes.append(f"{name}: left empty the string load falls below the minimum running "
                     f"weight from joint {e.float_step}")
    if opt.schedule.feasible and opt.schedule.fill_to_top_through >= n:
        notes.append(f"{name}: fill every joint to the top all the way down; floating gains "
                     "nothing here")
    return notes


def _option_key(opt: FloatOption):
    if not opt.lands or opt.schedule is None:
        return (0, 0, -np.inf)
    return (1, -len(opt.schedule.top_ups), round(min(opt.schedule.least_margin,
                                                     _governing(opt.check).margin), 4))


def plan_landing(joints: JointArrays, hole: Hole, rig: Rig, settings: Settings,
                 closure: Closure = Closure(), path: str | None = None,
                 grout: GroutSpec | None = None, fixed_closure: bool = False) -> LandingPlan:
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
    """
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
    hoist = [p for p in rig.paths if p.name == cap.path][0]
    limit = cap.string_limit
    if not np.isfinite(limit) or limit <= 0:
        raise ValueError(f"hoisting path {cap.path!r} has no rated capacity left for the "
                         "string (check its ratings, dead load and overpull reserve)")

    open_loads = running_loads(joints, hole, Closure())
    dead = hoist.dead_load
    open_check = check_run(joints, open_loads, Closure(), limit, settings, hole, dead_load=dead)
    switch = switch_point(open_loads.string_load, limit)
    reasons = []
    options = []
    best = None
    stages = None
    chosen = open_check
    verdict = None
    fluids = (settings.fill_density,) + tuple(settings.fill_density_alternatives)

    def explain(opts, prefix=""):
        why = {}
        for o in opts:
            why.setdefault((_closure_name(o.closure), o.reason), []).append(
                _density_words(o.fill_density))
        for (name, reason), rhos in why.items():
            reasons.append(f"{prefix}{name} (fill {', '.join(rhos)}): {reason}")

    def best_tried(opts):
        tried = [o for o in opts if o.check is not None]
        return max(tried, key=lambda o: _governing(o.check).margin).check if tried else None

    if not open_check.ok:
        g = _governing(open_check)
        reasons.append(f"open-ended: {g.name} over its limit at {g.where}")
    if not closure.is_open:
        # The float equipment planned (or already in the hole) comes first:
        # the loads shown must be those of the run the crew will make.
        planned = [try_float(joints, hole, closure, rho, limit, settings, dead) for rho in fluids]
        options += planned
        landing = [o for o in planned if o.lands]
        if landing:
            best = max(landing, key=_option_key)
            chosen = best.check
            verdict = LANDS_FLOATED
            explain([o for o in planned if not o.lands], "planned ")
        else:
            explain(planned, "planned ")
            if fixed_closure:
                chosen = best_tried(planned) or chosen
                verdict = CANNOT_LAND
                reasons.append("the float equipment is already in the hole: no other "
                               "position or stage is tried")
    if verdict is None and open_check.ok:
        verdict = LANDS_OPEN
        if not closure.is_open:
            reasons.append("the planned float equipment does not keep every limit, but the "
                           "string lands open-ended: run it without the check valve")
    if verdict is None:
        others = [c for c in _float_closures(joints.n, Closure(), settings,
                                             top_open_wall_joint(joints))
                  if c.valve_joint != closure.valve_joint]
        tried = [try_float(joints, hole, c, rho, limit, settings, dead) for c in others
                 for rho in fluids]
        options += tried
        landing = [o for o in tried if o.lands]
        if landing:
            best = max(landing, key=_option_key)
            chosen = best.check
            verdict = LANDS_FLOATED
        else:
            explain(tried)
            chosen = best_tried(options) or chosen
            ls = rig.landing_string
            if ls is None:
                reasons.append("staged setting: the rig profile has no landing string")
            else:
                stages = plan_two_stages(joints, hole, limit, ls.weight_per_length,
                                         ls.tensile_rating, ls.density,
                                         settings.design.tension, open_loads, dead_load=dead,
                                         joint_length=ls.joint_length,
                                         set_down_weight=settings.set_down_weight)
                if stages.feasible:
                    staged = check_run(joints, _staged_loads(open_loads, stages), Closure(),
                                       limit, settings, dead_load=dead)
                    # hoisting is checked by the stages, step by step; the
                    # joints' own limits by the staged run
                    over = [lim for lim in staged.limits
                            if lim.name != "hoisting capacity" and lim.margin < -1e-12]
                    if over:
                        reasons.append(f"staged setting: {over[0].name} over its limit at "
                                       f"{over[0].where}")
                    else:
                        verdict = LANDS_STAGED
                        chosen = staged
                else:
                    reasons.append(f"staged setting: {_stage_failure_words(stages, joints)}")
            if verdict is None:
                verdict = CANNOT_LAND

    total = float(np.sum(joints.length))
    hole_limit = None
    if np.isfinite(hole.depth) and total > hole.depth * (1 + 1e-9):
        reasons.insert(0, f"the string ({total:.2f} m, {total / 0.3048:.1f} ft) is longer than "
                          f"the hole ({hole.depth:.2f} m, {hole.depth / 0.3048:.1f} ft): it "
                          "cannot be landed; check the tally and the plan")
        verdict = CANNOT_LAND
        hole_limit = Limit("hole depth", "the shoe when landed", total, float(hole.depth),
                           float((hole.depth - total) / hole.depth), "length")
    notes = []
    shown = [best] if best is not None else [o for o in options if o.empty is not None][:1]
    for o in shown:
        notes += float_notes(o, joints.n)
    unrated = tuple(f"{part} on hoisting path {cap.path!r}" for part in cap.unrated_on_path) \
        + tuple(chosen.unrated)
    if verdict in (LANDS_OPEN, LANDS_FLOATED, LANDS_STAGED) and unrated:
        reasons.append("lands on the rated parts, but some loaded parts are unrated: "
                       + "; ".join(unrated[:5]) + (" ..." if len(unrated) > 5 else ""))
        verdict = CANNOT_CONFIRM
    governing = _governing(chosen) if hole_limit is None else hole_limit
    staged_here = verdict in (LANDS_STAGED, CANNOT_CONFIRM) and stages is not None \
        and stages.feasible and chosen.closure.is_open and best is None
    if staged_here:
        # the stage check with the least margin, beside the joints' own limits
        own = [lim for lim in chosen.limits if lim.name != "hoisting capacity"]
        governing = min([_stage_limit(stages, joints)] + own, key=lambda lim: lim.margin)
        prof = stages.landed
        neutral = (stages.stage2_neutral_point if np.isfinite(stages.stage2_neutral_point)
                   else stages.stage1_neutral_point)
    else:
        fill_final = 0.0
        if chosen.closure.valve_joint is not None and best is not None:
            fill_final = float(np.nan_to_num(best.schedule.fill_level[-1], nan=0.0))
        prof = step_profile(joints, hole, chosen.closure, joints.n,
                            best.fill_density if best else 0.0, fill_final,
                            slack_off=settings.set_down_weight)
        neutral = neutral_point_depth(prof) if settings.set_down_weight > 0 else float("nan")
    grouting = None
    if grout is not None:
        from rigplan.engine.grouting import plan_grout_lifts
        grouting = plan_grout_lifts(joints, hole, grout, settings.design.collapse)
    return LandingPlan(
        verdict=verdict, governing=governing, path=cap, dead_load=hoist.dead_load,
        joints=joints, hole=hole, settings=settings, open_check=open_check,
        chosen=chosen, float_options=tuple(options), best_float=best, stages=stages,
        switch_joint=switch, neutral_point=neutral, grouting=grouting, landed=prof,
        unrated=unrated, reasons=tuple(reasons), notes=tuple(dict.fromkeys(notes)),
    )


def _stage_where(stages: StagedPlan, row: int, joints: JointArrays) -> str:
    """Where a staged check is worst, in the step table's terms."""
    st = stages.steps
    k = int(st.joint[row])
    if st.phase[row] == StagePhase.LOWERING:
        if row == st.release_row:
            return f"release (stage 1, joints 1-{stages.split}, on the landing string)"
        return (f"lowering stage 1 on the landing string, joint "
                f"{row - stages.split + 1} of the landing string")
    return f"{st.phase[row]}, step {k} ({joints.label[k - 1]} at the floor)"


def _stage_limit(stages: StagedPlan, joints: JointArrays) -> Limit:
    """The governing staged check as a :class:`Limit` (real load and capacity)."""
    c = stages.governing_check
    return Limit(str(c.name), _stage_where(stages, c.row, joints), c.load, c.capacity,
                 c.margin, c.kind)


def _stage_failure_words(stages: StagedPlan, joints: JointArrays) -> str:
    if stages.failure == StageFailure.SINGLE_JOINT:
        return "a single joint cannot be staged"
    if stages.failure == StageFailure.LANDING_STRING_UNRATED:
        return "the landing string has no tensile rating"
    c = stages.governing_check
    return (f"{c.name} over its limit at the best split (stage 1 = joints 1-{stages.split}), "
            f"at {_stage_where(stages, c.row, joints)}")


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


def _density_words(rho: float) -> str:
    """A fluid density in both unit systems, e.g. ``999 kg/m3 (8.33 ppg)``
    (1 lb/US gal = 119.826 kg/m^3, NIST SP 811)."""
    return f"{rho:.0f} kg/m3 ({rho * 0.003785411784 / 0.45359237:.2f} ppg)"


def _closure_name(c: Closure) -> str:
    if c.valve_joint is None:
        return "open shoe"
    if c.valve_joint == 0:
        return "float shoe"
    return f"float collar on joint {c.valve_joint}"


closure_name = _closure_name
