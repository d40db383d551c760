"""A liner job: the plan, its old casing, the caliper log, and the liner's running plan."""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from rigplan.errors import InputError


@dataclass(frozen=True)
class LinerJob:
    """What ``rigplan liner`` shows: the checks against the old casing and the running plan.

    spec : the plan's ``[existing_casing]``/``[liner_fit]``; log : the caliper
    log; casing : the old casing as rated (engine ``OldCasing``);
    assessment : engine ``LinerAssessment``; landing : the liner's
    ``LandingPlan``; basis : the wall basis of the old casing's ratings
    """

    spec: object
    log: object
    casing: object
    assessment: object
    landing: object
    basis: str


def old_casing_from_spec(spec):
    """The engine's ``OldCasing`` from the plan's table: ratings on the minimum wall.

    Old casing that is not gauged is rated on the minimum wall its standard
    allows (specified wall less the material's under-tolerance, 12.5 % for
    ASTM A53), as for any non-API steel; corrosion since it was set can make
    the real wall thinner still (a caution the output repeats).  An API-grade
    old casing is rated the same way: the API TR 5C3 formulas describe new
    pipe within its roundness tolerance and take no ellipticity, while the
    log measures how oval the old casing has become, which Timoshenko's
    formula takes in; the minimum wall stands in for the unknown corrosion.
    """
    from rigplan.engine.liner import OldCasing
    from rigplan.engine.materials import LIBRARY
    m = LIBRARY[spec.material]
    under = m.wall_under_tolerance if math.isfinite(m.wall_under_tolerance) else 0.0
    return OldCasing(od=spec.od, wall=spec.wall, rating_wall=spec.wall * (1.0 - under),
                     yield_strength=m.yield_strength, youngs_modulus=m.youngs_modulus,
                     poisson=m.poisson, top=spec.top, bottom=spec.bottom,
                     ellipticity=spec.ellipticity), f"minimum wall ({100 * (1 - under):.1f} % of specified)"


def liner_job(plan_path, plan, landing, caliper_path=None, x_curve=None,
              y_curve=None) -> LinerJob:
    """Check a liner against the old casing logged in ``caliper_path``.

    ``plan``/``landing`` come from the usual loading and planning of the
    plan file at ``plan_path`` (the liner is the string; the old casing is
    the hole).  Without ``caliper_path``, the plan's
    ``existing_casing.caliper_log``.
    """
    from rigplan.engine.liner import assess_liner, liner_ods, shape_from_diameters
    from rigplan.files.formats.linerfile import read_caliper_las, read_existing_casing
    spec = read_existing_casing(plan_path)
    if spec is None:
        raise InputError(f"{plan_path}: existing_casing",
                         "required for a liner job: an [existing_casing] table with od, wall, "
                         "material, top and bottom")
    caliper_path = caliper_path or spec.caliper_log
    if caliper_path is None:
        raise InputError(f"{plan_path}: existing_casing.caliper_log",
                         "no caliper log: give --caliper LOG.las or caliper_log in the plan")
    log = read_caliper_las(caliper_path, x_curve, y_curve)
    casing, basis = old_casing_from_spec(spec)
    shape = shape_from_diameters(log.depth, log.diameters)
    joints = plan.running_joints()
    length = np.array([j.run_length for j in joints])
    bottom = np.cumsum(length[::-1])[::-1]           # joint 1 deepest
    ods = liner_ods([j.kind for j in joints], [j.od for j in joints],
                    [j.connection for j in joints], spec.coupling_od, spec.centralizer_od,
                    spec.centralizer_every)
    hole = plan.hole
    grout = plan.grout
    out_rho = spec.outside_density if math.isfinite(spec.outside_density) else hole.fluid_density
    out_level = spec.outside_level if math.isfinite(spec.outside_level) else hole.fluid_level
    g_rho, g_top = math.nan, math.nan
    if grout is not None:
        g_rho, g_top = grout.density, max(0.0, float(bottom[0]) - grout.height)
    try:
        assessment = assess_liner(shape, casing, bottom, ods, spec.clearance,
                                  plan.settings.design.collapse, out_rho, out_level,
                                  hole.fluid_density, hole.fluid_level, g_rho, g_top)
    except ValueError as err:
        raise InputError(f"{log.source}", f"{err} ({_depths(spec)})") from None
    return LinerJob(spec=spec, log=log, casing=casing, assessment=assessment, landing=landing,
                    basis=basis)


def _depths(spec) -> str:
    from rigplan.files import units
    return (f"old casing from {units.format(spec.top, 'length', 'us', 1)} to "
            f"{units.format(spec.bottom, 'length', 'us', 1)}")


def running_order_for(plan, rig, path_name=None):
    """The best running order of a plan's (tallied) running joints.

    ``rigplan.engine.placement.best_running_order`` with the job's hole,
    rig, path, settings, float equipment and grout bound in.
    """
    from rigplan.engine.placement import best_running_order
    from rigplan.engine.planner import plan_landing
    from rigplan.engine.rating import rate_joints

    def plan_for(order):
        return plan_landing(rate_joints(order), plan.hole, rig, plan.settings,
                            closure=plan.closure, path=path_name, grout=plan.grout)

    try:
        return best_running_order(list(plan.running_joints()), plan_for, plan.closure)
    except InputError:
        raise
    except ValueError as err:
        raise InputError(plan.source or plan.name, str(err)) from None


def placed_tally_rows(plan, result):
    """Tally rows of every joint of ``plan`` in the proposed order, with run_order.

    Set-aside joints keep their places; running joints follow
    ``result.perm``.
    """
    import dataclasses
    from rigplan.files.formats.tally import tally_from_plan
    running = [i for i, j in enumerate(plan.joints) if not j.rejected]
    joints = list(plan.joints)
    for pos, src in enumerate(result.perm):
        joints[running[pos]] = plan.joints[running[src]]
    rows = tally_from_plan(dataclasses.replace(plan, joints=tuple(joints)))
    return [dataclasses.replace(r, run_order=i) for i, r in enumerate(rows, start=1)]


def free_path(path):
    """``path`` if no file is there, else the first free ``stem-2.suffix``, ``-3`` ..."""
    from pathlib import Path
    p = Path(path)
    if not p.exists():
        return p
    name, suffix = p.name.split(".", 1) if "." in p.name else (p.name, "")
    k = 2
    while True:
        cand = p.with_name(f"{name}-{k}" + (f".{suffix}" if suffix else ""))
        if not cand.exists():
            return cand
        k += 1
