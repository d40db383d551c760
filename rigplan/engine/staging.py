"""Setting a string in two stages on the rig's landing string.

Engine module: numpy arrays of SI floats; no units, no I/O, no sentences.

Stage 1 is the lower ``p`` joints.  They are run into the hole from the
floor as usual, then lowered on the landing string (drill pipe or rods),
one landing-string joint at a time, until the shoe is at its final depth,
and released: stage 1 then stands on bottom on its own.  Stage 2, the
remaining joints, is run from the floor and set on or into the top of
stage 1 (with the set-down weight, when one is planned).

Three hoisting load cases and one tension check, each with its load and
capacity (:class:`StageCheck`):

* stage 1 at the floor: the casing of stage 1 alone, hung from the floor;
* lowering: stage 1 on the landing string, the largest load while it is
  lowered (at release when the hole is full of fluid);
* the landing string's own tension rating (design factor on its top
  tension);
* stage 2 at the floor.

Loads are given twice and named for what they are: the *string load* is
the true force at the top of what hangs below the elevator (the dead load
of the hoisting gear left out); the *hook load* adds the dead load.  Both
stages are run open-ended: a stage that would itself need floating is
reported as not landing.

Sources: pressure-area method and buoyancy of an open pipe, Bourgoyne et
al., *Applied Drilling Engineering* (SPE Textbook Series vol. 2, 1986),
ch. 7; effective tension and the neutral point, Lubinski (1951).  The load
at the hook with stage 1 on the landing string is the sum of two
pressure-area free bodies: cut at the crossover at depth ``L``, the faces
there carry ``P(L) (A_s,stage - A_s,landing)``, so

    F_hook = [w L - P(L) A_s,landing] + T_eff,stage(L)

with ``T_eff,stage(L)`` the effective tension at the stage's top: the
landing string's open-pipe load (:func:`landing_string_load`) plus the
stage's buoyed weight.
"""

from __future__ import annotations

import enum
from dataclasses import dataclass, field

import numpy as np

from rigplan.engine.axial import (StepProfile, neutral_point_depth, running_loads, step_profile,
                                  string_geometry, string_load_by_step)
from rigplan.engine.findings import Finding, LimitName, Severity
from rigplan.engine.stringmodel import G, Closure, Hole, JointArrays

#: Default landing-string joint length [m]: 30 ft, range 2 drill pipe
#: (API Spec 5DP, 27-30 ft, from memory).
DEFAULT_JOINT_LENGTH = 9.144


class StagingCode(enum.StrEnum):
    """Why a staged setting fails (``StagedPlan.reason.code``)."""

    SINGLE_JOINT = "staging.single_joint"             # one joint cannot be staged
    NO_TENSILE_RATING = "staging.no_tensile_rating"   # the landing string is unrated
    OVER_LIMIT = "staging.over_limit"                 # context ``limit``: the limit over at the best split


#: The staged checks, by their names in :class:`~rigplan.engine.findings.LimitName`:
#: stage 1 run from the floor, stage 1 lowered on the landing string, the
#: landing string's own tension, stage 2 run from the floor.
STAGE_LIMITS = (LimitName.STAGE1_HOISTING, LimitName.LOWERING_HOISTING,
                LimitName.LANDING_STRING, LimitName.STAGE2_HOISTING)


class StagePhase(enum.StrEnum):
    """What the rig is doing at a row of the staged step table."""

    STAGE1 = "stage 1"          # a stage-1 joint at the floor
    LOWERING = "lowering"       # stage 1 on the landing string (last row: release)
    STAGE2 = "stage 2"          # a stage-2 joint at the floor


@dataclass(frozen=True)
class StageCheck:
    """One staged limit at its worst row, SI.

    name : one of :data:`STAGE_LIMITS`
    row : 0-based row of :class:`StagedSteps` where it is worst
    load : hook load [N] for the hoisting cases (dead load included); the
        design factor times the landing string's top tension [N] for its
        tension check
    capacity : hook limit [N] (string limit plus dead load); the landing
        string's tensile rating [N]
    margin : (capacity - load) / capacity [-]
    """

    name: LimitName
    row: int
    load: float
    capacity: float
    margin: float
    kind: str = "force"


@dataclass(frozen=True)
class StagedSteps:
    """Every running step of a two-stage setting in the order the crew runs
    them (stage 1 from the floor, lowering on the landing string ending at
    the release, stage 2 from the floor), SI.

    phase : :class:`StagePhase` per row
    joint : the casing joint at the floor (1-based, running order); for a
        lowering row the top joint of stage 1
    landing_string_length : landing string made up below the floor [m]
        (0 outside the lowering)
    bottom_depth : depth of the lowest pipe hanging from the hook [m]
        (stage 1's shoe, then stage 2's lowest joint)
    shoe_depth : depth of the casing shoe (stage 1's) [m]; it stays at its
        landed depth through stage 2
    string_load : true force at the top of what hangs from the elevator [N]
        (landing string included while lowering; dead load not included)
    hook_load : string load plus the dead load of the hoisting gear [N]
    margin : (hook limit - hook load) / hook limit [-]
    """

    phase: tuple
    joint: np.ndarray
    landing_string_length: np.ndarray
    bottom_depth: np.ndarray
    shoe_depth: np.ndarray
    string_load: np.ndarray
    hook_load: np.ndarray
    margin: np.ndarray

    @property
    def n(self) -> int:
        return len(self.joint)

    @property
    def release_row(self) -> int:
        """0-based row of the release (the last lowering row; -1: none)."""
        rows = [i for i, p in enumerate(self.phase) if p == StagePhase.LOWERING]
        return rows[-1] if rows else -1


def landing_string_load(length, weight_per_length: float, density: float, hole: Hole):
    """Buoyed load of an open-ended landing string hanging to a depth [N].

    ``F = w L - rho_o g max(0, L - h_o) A_s`` with ``A_s = w / (rho_s g)``,
    ``w`` the air weight per length [N/m], ``L`` its length [m],
    ``rho_s`` its steel density [kg/m^3].  Open-ended, one fluid inside and
    out (the pressure-area sum at its bottom end).  Sources: Bourgoyne et al.,
    *Applied Drilling Engineering* (1986), ch. 7 (buoyancy of an open pipe).

    >>> round(float(landing_string_load(100.0, 200.0, 7850.0, Hole(1000.0))), 3)
    17452.229
    """
    length = np.asarray(length, dtype=float)
    steel_area = weight_per_length / (density * G)
    return (weight_per_length * length
            - hole.fluid_density * G * np.maximum(0.0, length - hole.fluid_level) * steel_area)


def stage_top_tension(stage: JointArrays, hole: Hole, top_depth) -> np.ndarray:
    """Effective tension at the top of an open-ended stage hanging with its
    top at each depth ``top_depth`` [m], in [N].

    ``T_eff = F_true + P_o A_o - P_i A_i`` at the stage's top (Lubinski
    1951), with the stage's true force by the pressure-area method
    (:func:`rigplan.engine.axial.step_profile`), the stage hung from the
    floor in a hole whose fluid level is moved up by ``top_depth``.  Open,
    one fluid: once the whole stage is below the fluid level this is its
    buoyed weight (Archimedes) and no longer changes with depth, so it is
    worked out once for all such depths.
    """
    top = np.atleast_1d(np.asarray(top_depth, dtype=float))
    out = np.empty(len(top))
    cache = {}
    p = stage.n
    for i, depth in enumerate(top):
        # below the fluid level the whole stage is submerged: one value
        key = float(depth) if depth < hole.fluid_level else float(hole.fluid_level)
        if key not in cache:
            shifted = Hole(hole.fluid_density, hole.fluid_level - key, hole.depth, hole.diameter)
            cache[key] = float(step_profile(stage, shifted, Closure(), p).effective_top[-1])
        out[i] = cache[key]
    return out


def lowering_positions(release_depth: float, joint_length: float) -> np.ndarray:
    """Depths of stage 1's top after each landing-string joint is run [m]:
    one joint length apart, the last exactly at the release depth."""
    count = max(1, int(np.ceil(release_depth / joint_length - 1e-9)))
    pos = joint_length * np.arange(1, count + 1, dtype=float)
    pos[-1] = release_depth
    return pos


@dataclass(frozen=True)
class StagedPlan:
    """Two-stage setting, SI units.

    split : joints 1..split form stage 1 (0 when none was found)
    release_depth : depth of stage 1's top when released [m]
    shoe_depth : landed depth of the shoe [m]
    dead_load : dead load of the hoisting gear [N] (hook load - string load)
    stage1_peak_string_load / stage1_peak_hook_load : largest load while
        running stage 1 from the floor, casing only [N]
    release_string_load / release_hook_load : load with stage 1 on the
        landing string at release [N]
    lowering_peak_string_load / lowering_peak_hook_load : largest load
        while lowering stage 1 on the landing string [N] (the release load
        when the hole is full of fluid)
    landing_string_tension : largest tension at the top of the landing
        string [N] (its string load while lowering)
    stage2_peak_string_load / stage2_peak_hook_load : largest load while
        running stage 2 from the floor [N]
    checks : every :class:`StageCheck`
    least_margin : smallest margin over the checks [-]
    governing : the :class:`~rigplan.engine.findings.LimitName` with that margin
    feasible : every check within its limit
    reason : why no staged setting lands (a :class:`StagingCode` finding;
        None when feasible)
    steps : :class:`StagedSteps`, every step in running order
    stage1_loads, stage2_loads : the runs of each stage from the floor
        (``RunningLoads``)
    stage1_landed : stage 1 standing on bottom after release (depths from
        the floor; the set-down weight of stage 2 on its top)
    stage2_landed : stage 2 landed on stage 1 with the set-down weight
    stage1_neutral_point, stage2_neutral_point : depth where each stage's
        effective tension passes through zero when landed [m] (nan: in
        tension throughout); stage 1 stands on bottom, so its neutral point
        is its top
    """

    split: int
    release_depth: float
    shoe_depth: float = float("nan")
    dead_load: float = 0.0
    stage1_peak_string_load: float = float("nan")
    release_string_load: float = float("nan")
    lowering_peak_string_load: float = float("nan")
    landing_string_tension: float = float("nan")
    stage2_peak_string_load: float = float("nan")
    checks: tuple = ()
    least_margin: float = -np.inf
    governing: LimitName | None = None
    feasible: bool = False
    reason: Finding | None = None
    steps: StagedSteps | None = field(default=None, repr=False)
    stage1_loads: object = field(default=None, repr=False)
    stage2_loads: object = field(default=None, repr=False)
    stage1_landed: StepProfile | None = field(default=None, repr=False)
    stage2_landed: StepProfile | None = field(default=None, repr=False)
    stage1_neutral_point: float = float("nan")
    stage2_neutral_point: float = float("nan")

    @property
    def stage1_peak_hook_load(self) -> float:
        return self.stage1_peak_string_load + self.dead_load

    @property
    def release_hook_load(self) -> float:
        return self.release_string_load + self.dead_load

    @property
    def lowering_peak_hook_load(self) -> float:
        return self.lowering_peak_string_load + self.dead_load

    @property
    def stage2_peak_hook_load(self) -> float:
        return self.stage2_peak_string_load + self.dead_load

    @property
    def governing_check(self) -> StageCheck | None:
        """The check with the least margin (None when none was made)."""
        return min(self.checks, key=lambda c: c.margin) if self.checks else None

    @property
    def landed(self) -> StepProfile | None:
        """Both stages as they stand when landed, joint 1 first (index j-1
        is joint j): stage 1 on bottom, stage 2 on top of it."""
        a, b = self.stage1_landed, self.stage2_landed
        if a is None or b is None:
            return None
        cat = lambda name: np.concatenate((getattr(a, name), getattr(b, name)))
        return StepProfile(step=len(a.top_depth) + len(b.top_depth),
                           top_depth=cat("top_depth"), bottom_depth=cat("bottom_depth"),
                           true_force_top=cat("true_force_top"),
                           true_force_bottom=cat("true_force_bottom"),
                           effective_top=cat("effective_top"),
                           effective_bottom=cat("effective_bottom"))


def _hook_margin(string_load, string_limit, dead_load):
    """(hook limit - hook load) / hook limit with the dead load in both [-]."""
    return (string_limit - np.asarray(string_load, dtype=float)) / (string_limit + dead_load)


def plan_two_stages(joints: JointArrays, hole: Hole, string_limit: float,
                    weight_per_length: float, tensile_rating: float,
                    density: float = 7850.0, tension_factor: float = 1.0,
                    open_loads=None, dead_load: float = 0.0,
                    joint_length: float = DEFAULT_JOINT_LENGTH,
                    set_down_weight: float = 0.0, held_until_grout: bool = False) -> StagedPlan:
    """Search the split that maximizes the least margin of a two-stage set.

    Parameters
    ----------
    joints : the whole string, joint 1 first
    hole : the hole fluid and its level
    string_limit : largest string load of the hoisting path [N]
    weight_per_length : landing string air weight per length [N/m]
    tensile_rating : landing string tension rating [N] (nan: unrated)
    density : landing string steel density [kg/m^3]
    tension_factor : design factor on the landing string's tension [-]
    open_loads : the open-ended run of the whole string (computed if None)
    dead_load : dead load of the hoisting gear [N]
    joint_length : landing-string joint length, the lowering step [m]
    set_down_weight : weight stage 2 sets down on stage 1 when landed [N]
    held_until_grout : stage 1 is held on the landing string until the grout
        placed at its shoe has set, then released: it never stands on bottom
        on its own weight (the grout carries it), so it lands hanging as it
        was at release and stage 2's set-down is carried at its top

    Margins: ``(hook limit - hook load) / hook limit`` for each hoisting
    case, ``(rating - DF T) / rating`` for the landing string.  Stage 2's
    margin rises as the split moves up; stage 1's need not fall
    monotonically, so the search bisects on its suffix maximum
    (``O(N I log N)``; exact while each joint adds weight to stage 2).  The
    search takes the lowering load at its ends (the floor and the release);
    the chosen split is then lowered joint by joint, and its checks use
    every row.
    """
    n = joints.n
    if n < 2:
        return StagedPlan(0, 0.0, dead_load=dead_load,
                          reason=Finding(StagingCode.SINGLE_JOINT, Severity.REASON))
    if not np.isfinite(tensile_rating) or tensile_rating <= 0:
        return StagedPlan(0, 0.0, dead_load=dead_load,
                          governing=LimitName.LANDING_STRING,
                          reason=Finding(StagingCode.NO_TENSILE_RATING, Severity.REASON))
    if open_loads is None:
        open_loads = running_loads(joints, hole, Closure())
    shoe_final = float(np.sum(joints.length))
    release = shoe_final - np.cumsum(joints.length)                    # top of stage 1
    # stage 1's effective tension at its top when released: the landed open
    # string's effective tension at the top of joint p (the part below a cut
    # is the same free body whether or not joints hang above it)
    t_release = step_profile(joints, hole, Closure(), n).effective_top
    at_floor = np.maximum.accumulate(open_loads.string_load)           # casing only
    ls_release = landing_string_load(release, weight_per_length, density, hole)
    lowered = np.maximum(open_loads.string_load, t_release + ls_release)
    ls_allow = tensile_rating / tension_factor
    m1 = np.minimum(_hook_margin(np.maximum(at_floor, lowered), string_limit, dead_load),
                    (ls_allow - (t_release + ls_release)) / ls_allow)

    cache = {}

    def stage2_peak(p):
        # the search needs only the peak string load of stage 2 (the same
        # numbers as running_loads gives); the full run is made for the best
        if p not in cache:
            upper = joints.subset(p, n)
            geo = string_geometry(upper, Closure())
            cache[p] = float(np.max(string_load_by_step(geo, hole, 0.0, np.zeros(n - p))))
        return cache[p]

    def m2(q):
        return float(_hook_margin(stage2_peak(q), string_limit, dead_load))

    def margin(p):
        return min(float(m1[p - 1]), m2(p))

    # The stage-2 margin m2(p) rises with p (a shorter upper stage is
    # lighter); the stage-1 margin m1(p) need not be monotone (the landing
    # string gets shorter as the stage gets heavier).  With S1(q) the best
    # m1 over splits p >= q, max_p min(m1, m2) = max_q min(S1(q), m2(q)),
    # and S1 falls while m2 rises: bisection on q finds the crossing, and the
    # split is the p >= q where m1 is largest.
    s1 = np.maximum.accumulate(m1[::-1])[::-1]           # S1 at q = index + 1
    idx = np.arange(len(m1))
    # first p >= q where m1 equals its suffix maximum (a suffix argmax)
    first_best = np.minimum.accumulate(np.where(m1 >= s1, idx, len(m1))[::-1])[::-1]
    lo, hi = 1, n - 1
    while hi - lo > 1:
        mid = (lo + hi) // 2
        if m2(mid) < s1[mid - 1]:
            lo = mid
        else:
            hi = mid
    qs = sorted({max(1, min(n - 1, q)) for q in (lo - 1, lo, hi, hi + 1)})
    q_best = max(qs, key=lambda q: min(float(s1[q - 1]), m2(q)))
    cands = sorted({int(first_best[q_best - 1]) + 1, q_best})
    best = max(cands, key=margin)
    return staged_plan_at(joints, hole, best, string_limit, weight_per_length, tensile_rating,
                          density, tension_factor, dead_load, joint_length, set_down_weight,
                          held_until_grout)


def staged_plan_at(joints: JointArrays, hole: Hole, split: int, string_limit: float,
                   weight_per_length: float, tensile_rating: float,
                   density: float = 7850.0, tension_factor: float = 1.0,
                   dead_load: float = 0.0, joint_length: float = DEFAULT_JOINT_LENGTH,
                   set_down_weight: float = 0.0,
                   held_until_grout: bool = False) -> StagedPlan:
    """The two-stage setting with stage 1 = joints 1..``split``: every step
    (stage 1 from the floor, each landing-string joint, stage 2 from the
    floor), the checks, and each stage's landed state.  Parameters as in
    :func:`plan_two_stages`."""
    n = joints.n
    p = int(split)
    if not 1 <= p < n:
        raise ValueError(f"the split must leave joints in both stages (1..{n - 1}), got {p}")
    lower, upper = joints.subset(0, p), joints.subset(p, n)
    shoe_final = float(np.sum(joints.length))
    z1 = float(np.sum(lower.length))
    release = shoe_final - z1
    loads1 = running_loads(lower, hole, Closure())
    loads2 = running_loads(upper, hole, Closure())
    pos = lowering_positions(release, joint_length)
    ls = landing_string_load(pos, weight_per_length, density, hole)
    lowering = ls + stage_top_tension(lower, hole, pos)
    nl = len(pos)
    phase = (StagePhase.STAGE1,) * p + (StagePhase.LOWERING,) * nl + (StagePhase.STAGE2,) * (n - p)
    string_load = np.concatenate((loads1.string_load, lowering, loads2.string_load))
    steps = StagedSteps(
        phase=phase,
        joint=np.concatenate((np.arange(1, p + 1), np.full(nl, p), np.arange(p + 1, n + 1))),
        landing_string_length=np.concatenate((np.zeros(p), pos, np.zeros(n - p))),
        bottom_depth=np.concatenate((loads1.shoe_depth, z1 + pos, loads2.shoe_depth)),
        shoe_depth=np.concatenate((loads1.shoe_depth, z1 + pos, np.full(n - p, shoe_final))),
        string_load=string_load, hook_load=string_load + dead_load,
        margin=_hook_margin(string_load, string_limit, dead_load),
    )
    hook_limit = string_limit + dead_load
    checks = []
    for name, rows in ((LimitName.STAGE1_HOISTING, np.arange(p)),
                       (LimitName.LOWERING_HOISTING, np.arange(p, p + nl)),
                       (LimitName.STAGE2_HOISTING, np.arange(p + nl, p + nl + n - p))):
        r = int(rows[np.argmax(string_load[rows])])
        checks.append(StageCheck(name, r, float(steps.hook_load[r]), hook_limit,
                                 float(steps.margin[r])))
    r = p + int(np.argmax(lowering))
    ls_load = tension_factor * float(lowering[r - p])
    checks.append(StageCheck(LimitName.LANDING_STRING, r, ls_load, float(tensile_rating),
                             float((tensile_rating - ls_load) / tensile_rating)
                             if np.isfinite(tensile_rating) and tensile_rating > 0 else -np.inf))
    gov = min(checks, key=lambda c: c.margin)
    # Landed: stage 1 released stands on bottom (its whole buoyed weight, and
    # stage 2's set-down on its top, carried at the shoe); stage 2 hangs
    # from the floor and sets its set-down weight onto stage 1.
    t_top = float(stage_top_tension(lower, hole, [release])[0])
    shifted = Hole(hole.fluid_density, hole.fluid_level - release, hole.depth, hole.diameter)
    # Held until the shoe grout sets: stage 1 stays as it hung at release
    # (the set grout takes its weight and stage 2's set-down from there on).
    slack1 = 0.0 if held_until_grout else t_top + set_down_weight
    prof1 = step_profile(lower, shifted, Closure(), p, slack_off=slack1)
    prof1 = StepProfile(step=p, top_depth=prof1.top_depth + release,
                        bottom_depth=prof1.bottom_depth + release,
                        true_force_top=prof1.true_force_top,
                        true_force_bottom=prof1.true_force_bottom,
                        effective_top=prof1.effective_top, effective_bottom=prof1.effective_bottom)
    prof2 = step_profile(upper, hole, Closure(), n - p, slack_off=set_down_weight)
    np2 = neutral_point_depth(prof2) if set_down_weight > 0 else float("nan")
    feasible = bool(gov.margin >= 0)
    return StagedPlan(
        split=p, release_depth=float(release), shoe_depth=shoe_final, dead_load=dead_load,
        stage1_peak_string_load=float(np.max(loads1.string_load)),
        release_string_load=float(lowering[-1]),
        lowering_peak_string_load=float(np.max(lowering)),
        landing_string_tension=float(np.max(lowering)),
        stage2_peak_string_load=float(np.max(loads2.string_load)),
        checks=tuple(checks), least_margin=float(gov.margin), governing=gov.name,
        feasible=feasible,
        reason=None if feasible else Finding(StagingCode.OVER_LIMIT, Severity.REASON, joint=p,
                                             context={"limit": str(gov.name)}),
        steps=steps, stage1_loads=loads1, stage2_loads=loads2,
        stage1_landed=prof1, stage2_landed=prof2,
        stage1_neutral_point=float("nan") if held_until_grout else float(release), stage2_neutral_point=float(np2),
    )
