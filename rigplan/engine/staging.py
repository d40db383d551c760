"""Setting a string in two stages on the rig's landing string.

Engine module: numpy arrays of SI floats; no units, no I/O.

Stage 1 is the lower ``p`` joints.  They are run into the hole as usual,
then lowered on the landing string (drill pipe or rods) until the shoe is at
its final depth, and released.  Stage 2, the remaining joints, is then run
from the floor and set on or into the top of stage 1.  Each stage is checked
against the same hoisting limit, and stage 1 also against the landing
string's own tensile rating.

Both stages are run open-ended here: a stage that would itself need floating
is reported as not landing.

Source: string mechanics (ADE 1986) (staged setting); the landing-string load is
the same pressure-area sum as the casing (``rigplan.engine.axial``) for an open
pipe, ``W_air - P_o(bottom) A_steel``.
"""

from __future__ import annotations

import enum
from dataclasses import dataclass, field

import numpy as np

from rigplan.engine.axial import running_loads, step_profile, string_geometry, string_load_by_step
from rigplan.engine.findings import Finding, LimitName, Severity
from rigplan.engine.stringmodel import G, Closure, Hole, JointArrays


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



class StagingCode(enum.StrEnum):
    """Why a staged setting fails (``StagedPlan.reason.code``)."""

    SINGLE_JOINT = "staging.single_joint"             # one joint cannot be staged
    NO_TENSILE_RATING = "staging.no_tensile_rating"   # the landing string is unrated
    OVER_LIMIT = "staging.over_limit"                 # context ``limit``: the limit over at the best split


@dataclass(frozen=True)
class StagedPlan:
    """Two-stage setting, SI units.

    split : joints 1..split form stage 1 (0 when none was found)
    release_depth : depth of stage 1's top when released [m]
    stage1_peak : largest string load while running stage 1, landing string
        included [N]
    landing_string_peak : tension at the top of the landing string [N]
    stage2_peak : largest string load while running stage 2 [N]
    least_margin : smallest margin over both stages [-]
    governing : which limit sets that margin
    feasible : both stages within every limit
    stage2_loads : the stage-2 run (RunningLoads) for its tables
    """

    split: int
    release_depth: float
    stage1_peak: float
    landing_string_peak: float
    stage2_peak: float
    least_margin: float
    governing: LimitName | str
    feasible: bool
    stage2_loads: object = field(default=None, repr=False)
    reason: Finding | None = None


def _stage1_curve(joints: JointArrays, hole: Hole, open_loads, weight_per_length,
                  density):
    """Stage-1 peak string load and landing-string load for every split."""
    n = joints.n
    final = step_profile(joints, hole, Closure(), n).true_force_top   # F(p, N)
    at_entry = open_loads.string_load                                  # F(p, p)
    shoe_final = float(np.sum(joints.length))
    release = shoe_final - np.cumsum(joints.length)                    # top depth of stage 1
    ls = landing_string_load(release, weight_per_length, density, hole)
    lowered = np.maximum(final, at_entry) + ls
    running = np.maximum.accumulate(open_loads.string_load)
    return np.maximum(running, lowered), lowered, release


def plan_two_stages(joints: JointArrays, hole: Hole, string_limit: float,
                    weight_per_length: float, tensile_rating: float,
                    density: float = 7850.0, tension_factor: float = 1.0,
                    open_loads=None) -> StagedPlan:
    """Search the split that maximizes the least margin of a two-stage set.

    Margins: ``(limit - peak) / limit`` for the hoisting limit on each
    stage, and ``(rating / DF - load) / (rating / DF)`` for the landing
    string.  Stage 2's margin rises as the split moves up; stage 1's need
    not fall monotonically, so the search bisects on its suffix maximum
    (``O(N I log N)``; exact while each joint adds weight to stage 2).
    """
    n = joints.n
    if n < 2:
        return StagedPlan(0, 0.0, 0.0, 0.0, 0.0, -np.inf, "", False,
                          reason=Finding(StagingCode.SINGLE_JOINT, Severity.REASON))
    if not np.isfinite(tensile_rating) or tensile_rating <= 0:
        return StagedPlan(0, 0.0, 0.0, 0.0, 0.0, -np.inf, LimitName.LANDING_STRING, False,
                          reason=Finding(StagingCode.NO_TENSILE_RATING, Severity.REASON))
    if open_loads is None:
        open_loads = running_loads(joints, hole, Closure())
    stage1, lowered, release = _stage1_curve(joints, hole, open_loads,
                                             weight_per_length, density)
    ls_allow = tensile_rating / tension_factor
    m1 = np.minimum((string_limit - stage1) / string_limit, (ls_allow - lowered) / ls_allow)

    cache = {}

    def stage2(p):
        # the search needs only the peak string load of stage 2 (the same
        # numbers as running_loads gives); the full run is made for the best
        if p not in cache:
            upper = joints.subset(p, n)
            geo = string_geometry(upper, Closure())
            peak = float(np.max(string_load_by_step(geo, hole, 0.0, np.zeros(n - p))))
            cache[p] = (peak, upper)
        return cache[p]

    def margin(p):
        peak2, _ = stage2(p)
        return min(float(m1[p - 1]), (string_limit - peak2) / string_limit)

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

    def m2(q):
        peak2, _ = stage2(q)
        return (string_limit - peak2) / string_limit

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
    peak2, upper = stage2(best)
    loads2 = running_loads(upper, hole, Closure())
    m_s1 = (string_limit - stage1[best - 1]) / string_limit
    m_ls = (ls_allow - lowered[best - 1]) / ls_allow
    m_s2 = (string_limit - peak2) / string_limit
    parts = {LimitName.STAGE1_HOISTING: m_s1, LimitName.LANDING_STRING: m_ls,
             LimitName.STAGE2_HOISTING: m_s2}
    gov = min(parts, key=parts.get)
    least = parts[gov]
    return StagedPlan(
        split=best, release_depth=float(release[best - 1]),
        stage1_peak=float(stage1[best - 1]), landing_string_peak=float(lowered[best - 1]),
        stage2_peak=peak2, least_margin=float(least), governing=gov,
        feasible=bool(least >= 0), stage2_loads=loads2,
        reason=None if least >= 0 else Finding(StagingCode.OVER_LIMIT, Severity.REASON,
                                               joint=best, context={"limit": str(gov)}),
    )
