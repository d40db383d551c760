"""A job: a string plan, a rig profile and the site tally, ready to plan.

Formats-layer glue shared by the command line and the terminal app: reads
the files, applies the run log (measured lengths and rejected joints) to the
plan, rates the joints and calls the planner.  No textual, no rich.
"""

from __future__ import annotations

import dataclasses
import enum
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from rigplan.errors import InputError
from rigplan.engine.findings import Finding, Kind, Severity, Verdict
from rigplan.engine.stringmodel import JointSpec, StringPlan

#: Where the bundled demo lives: the repository's ``rigs/`` and ``strings/``
#: (an editable install from the checkout), else those of the current folder.
_PACKAGE = Path(__file__).resolve().parent
_REPO = _PACKAGE.parent.parent


def demo_dir(kind: str) -> Path:
    """Folder of the bundled demo ``rigs`` or ``strings``."""
    for base in (_REPO / kind, Path.cwd() / kind):
        if base.is_dir() and any(base.glob("*.toml")):
            return base
    raise InputError(kind, f"the bundled demo {kind} folder is missing")


#: The demo job opened by ``rigplan`` with no arguments.
DEMO_PLAN = "cv7-16in-floated.toml"
DEMO_RIG = "mw80.toml"

#: Every bundled demo job: (string plan, the rig it is meant for, the verdict
#: the README promises for it).  ``rigplan demo`` exits 1 when a verdict
#: differs; the README's table of demo jobs is checked against this one.
DEMO_JOBS = (
    ("cv3-8in-a53b.toml", "th30.toml", Verdict.LANDS_OPEN),
    ("cv7-16in-floated.toml", "mw80.toml", Verdict.LANDS_FLOATED),
    # the staged split holds on every hoisting check, but released, stage 1
    # stands on bottom and its own weight buckles its screens
    ("cv9-14in-staged.toml", "mw80.toml", Verdict.LANDS_STAGED),
    ("cv12-pvc-floated.toml", "th30.toml", Verdict.LANDS_FLOATED),
    ("cv5-18in-thinwall.toml", "th30.toml", Verdict.CANNOT_LAND),
    ("cv2-liner.toml", "th30.toml", Verdict.LANDS_OPEN),
)


def demo_jobs() -> list[tuple[Path, Path]]:
    """(plan, rig) paths of every bundled demo job that is present."""
    strings, rigs = demo_dir("strings"), demo_dir("rigs")
    return [(strings / p, rigs / r) for p, r, _ in DEMO_JOBS
            if (strings / p).exists() and (rigs / r).exists()]


def demo_paths() -> tuple[Path, Path]:
    """(plan, rig) of the bundled demo job."""
    strings, rigs = demo_dir("strings"), demo_dir("rigs")
    plan = strings / DEMO_PLAN
    rig = rigs / DEMO_RIG
    if not plan.exists():
        plan = sorted(strings.glob("*.toml"))[0]
    if not rig.exists():
        rig = sorted(rigs.glob("*.toml"))[0]
    return plan, rig


def path_exists(path, what: str = "file") -> bool:
    """Whether ``path`` exists; a name the system refuses (too long, a NUL
    inside) is an InputError naming it, never a traceback."""
    try:
        return Path(path).exists()
    except ValueError:
        raise InputError(str(path), f"not a usable {what} name (it holds a NUL character)") from None
    except OSError as exc:
        raise InputError(str(path), f"not a usable {what} name ({exc.strerror or exc})") from None


def resolve_rig(name_or_path: str, plan_path: Path | None = None) -> Path:
    """A rig argument: a path, or the name of a bundled profile."""
    p = Path(name_or_path)
    if not str(name_or_path).strip():
        raise InputError("rig", "expected a rig profile: a path to a rigs/*.toml file or the "
                                "name of a bundled rig (th30, mw80), got an empty text")
    if path_exists(p, "rig profile"):
        return p
    for base in ([plan_path.parent.parent / "rigs"] if plan_path else []) + [demo_dir("rigs")]:
        for cand in (base / name_or_path, base / f"{name_or_path}.toml"):
            try:
                if cand.exists():
                    return cand
            except (OSError, ValueError):
                continue
    raise InputError(str(name_or_path), "no such rig profile file (expected a path to a "
                                        "rigs/*.toml file or the name of a bundled rig)")


class JobCode(enum.StrEnum):
    """Warnings about a job's files (``Job.warnings``)."""

    #: a file reader's one-line warning, context ``message``
    FILE_WARNING = "job.file_warning"
    #: a measured length far from the planned one (a typing slip?): label;
    #: quantities ``measured`` and ``planned``; context ``source``
    MEASURED_FAR_FROM_PLAN = "job.measured_far_from_plan"
    #: the string as measured is longer than the hole: quantities
    #: ``string_length`` and ``hole_depth``; context ``source``
    LONGER_THAN_HOLE = "job.longer_than_hole"
    #: the string as measured is as long as the hole (within the tolerance
    #: ``tolerance``): the shoe lands on bottom; same quantities
    AT_HOLE_BOTTOM = "job.at_hole_bottom"
    #: a screen interval lands farther from its planned depth than the plan's
    #: tolerance (measured lengths, joints set aside): context ``labels``
    #: (its joints), ``source``; quantities ``shift`` (+ deeper, nan: every
    #: joint of it set aside) and ``tolerance``
    SCREEN_OFF_PLAN = "job.screen_off_plan"


@dataclass
class Job:
    """The files of one job and what was read from them (``warnings``: findings)."""

    plan_path: Path | None
    rig_path: Path | None
    plan: StringPlan
    rig: object
    warnings: tuple[Finding, ...] = ()
    path_name: str | None = None
    tally_path: Path | None = None
    units: str = "si"          # the plan file's unit system for bare numbers


def file_warning(message: str) -> Finding:
    """A file reader's warning line as a finding."""
    return Finding(JobCode.FILE_WARNING, Severity.WARNING, context={"message": message})


def load_job(plan_path, rig_path, path_name: str | None = None,
             materials_path=None) -> Job:
    """Read a plan and a rig profile (and an optional user materials file)."""
    from rigplan.files.formats.planfile import read_plan
    from rigplan.files.formats.rigfile import read_rig
    if materials_path is not None:
        from rigplan.files.formats.materialfile import read_materials
        read_materials(materials_path)
    plan_path = Path(plan_path)
    if not path_exists(plan_path, "string plan file"):
        raise InputError(str(plan_path), "no such string plan file (expected a strings/*.toml file)")
    rig_path = resolve_rig(str(rig_path), plan_path)
    read = read_plan(plan_path)
    rig = read_rig(rig_path)
    if path_name is not None and path_name not in [p.name for p in rig.paths]:
        raise InputError(f"{rig_path}: --path",
                         f"no hoisting path named {path_name!r}; the rig has: "
                         + ", ".join(p.name for p in rig.paths))
    return Job(plan_path=plan_path, rig_path=rig_path, plan=read.plan, rig=rig,
               warnings=tuple(file_warning(w) for w in read.warnings), path_name=path_name,
               tally_path=read.tally_path, units=read.units)


def collar_label(plan: StringPlan) -> str | None:
    """Label of the joint carrying the float collar (None: no collar)."""
    m = plan.closure.valve_joint
    if not m:
        return None
    running = plan.running_joints()
    return running[m - 1].label if m <= len(running) else None


def _keep_collar(before: StringPlan, after: StringPlan, collar, source: str = "") -> StringPlan:
    """``after`` with the float collar on the same joint (by label) as in
    ``before``; refused when that joint has been set aside (``source``: the
    tally or run log that set it aside, named in the message)."""
    if collar is None:
        return after
    labels = [j.label for j in after.running_joints()]
    if collar not in labels:
        where = f"{source}: joint {collar}" if source else f"joint {collar}"
        raise InputError(where, "the float collar joint is set aside here: move the collar in "
                                f"the plan {before.source or before.name!r} first")
    return dataclasses.replace(after, closure=dataclasses.replace(
        before.closure, valve_joint=labels.index(collar) + 1))


def apply_tally_file(plan: StringPlan, path) -> StringPlan:
    """The plan with a tally CSV's measured lengths, walls and rejections."""
    from rigplan.files.formats.planfile import apply_tally
    from rigplan.files.formats.tally import read_tally
    rows = read_tally(path)
    joints = apply_tally(list(plan.joints), rows, str(path))
    if not any(not j.rejected for j in joints):
        raise InputError(str(path), "every joint of the plan is set aside (status rejected) in "
                                    "this tally: nothing to run")
    return _keep_collar(plan, dataclasses.replace(plan, joints=tuple(joints)),
                        collar_label(plan), str(path))


def read_run_state(plan_path):
    """The run log beside a plan (None when the job has not been run), read
    without writing: a log in a read-only folder is read as it is, and a
    damaged one raises RunLogDamaged naming it (it is never changed)."""
    from rigplan.files.runlog import RunLog, log_path_for
    log = log_path_for(plan_path)
    if not Path(log).exists():
        return None
    with RunLog(log, snapshot=True) as rl:
        return rl.state()


def apply_run_state(plan: StringPlan, state, source: str = "") -> StringPlan:
    """The plan as run so far: measured lengths and rejections from a run log.

    ``state`` is a :class:`rigplan.files.runlog.RunState` (or None).  Joints run
    keep their plan order; a measured length replaces the planned one; a
    rejected joint is marked rejected and left out of the loads.
    """
    if state is None:
        return plan
    collar = collar_label(plan)
    measured = {label: length for label, length in state.run}
    rejected = dict(state.rejected)
    joints = []
    for j in plan.joints:
        changes = {}
        if j.label in measured and measured[j.label] is not None:
            changes["measured_length"] = float(measured[j.label])
        if j.label in rejected:
            changes["rejected"] = True
        joints.append(_changed(j, **changes) if changes else j)
    return _keep_collar(plan, dataclasses.replace(plan, joints=tuple(joints)), collar, source)


_CHANGED: dict = {}


def _changed(spec: JointSpec, measured_length=None, rejected=None) -> JointSpec:
    """``spec`` with a run-log length or rejection, remembered so that
    re-planning after each tally entry does not rebuild every joint."""
    key = (spec, measured_length, rejected)
    out = _CHANGED.get(key)
    if out is None:
        kw = {}
        if measured_length is not None:
            kw["measured_length"] = measured_length
        if rejected is not None:
            kw["rejected"] = rejected
        out = dataclasses.replace(spec, **kw)
        if len(_CHANGED) > 50000:
            _CHANGED.clear()
        _CHANGED[key] = out
    return out


#: Measured lengths outside this share of the planned length are flagged.
LENGTH_WARNING = (0.75, 1.25)


def tally_row_sources(path) -> dict:
    """``{label: "tally.csv: row N"}`` for the joints a tally CSV gives a
    measured length: where a length warning points the reader."""
    from rigplan.files.formats.tally import read_tally
    return {r.label: f"{path}: row {r.row}" for r in read_tally(path)
            if r.measured_length is not None}


def length_warnings(plan: StringPlan, sources: dict | None = None) -> list[Finding]:
    """Warnings on measured lengths far from the planned ones (a typing slip
    such as 2006 for 20.06) and on a string longer than the hole.
    ``sources``: where each joint's measured length was read (label -> file
    and row, :func:`tally_row_sources`); the plan file otherwise."""
    out = []
    src = plan.source or plan.name
    sources = sources or {}
    for j in plan.running_joints():
        if j.measured_length is not None and not (
                LENGTH_WARNING[0] * j.length <= j.measured_length <= LENGTH_WARNING[1] * j.length):
            out.append(Finding(JobCode.MEASURED_FAR_FROM_PLAN, Severity.WARNING, label=j.label,
                               quantities={"measured": (j.measured_length, Kind.LENGTH),
                                           "planned": (j.length, Kind.LENGTH)},
                               context={"source": sources.get(j.label, src)}))
    total = sum(j.run_length for j in plan.running_joints())
    depth = plan.hole.depth
    from rigplan.engine.planner import HOLE_DEPTH_TOLERANCE as tol
    lengths = {"string_length": (total, Kind.LENGTH), "hole_depth": (depth, Kind.DEPTH),
               "tolerance": (tol, Kind.LENGTH)}
    if depth == depth and total > depth + tol:
        out.append(Finding(JobCode.LONGER_THAN_HOLE, Severity.WARNING, quantities=lengths,
                           context={"source": src}))
    elif depth == depth and total >= depth - tol:
        out.append(Finding(JobCode.AT_HOLE_BOTTOM, Severity.WARNING, quantities=lengths,
                           context={"source": src}))
    return out


def screen_depth_warnings(planned: StringPlan, run: StringPlan, source: str = "") -> list:
    """Warnings for each screen interval of ``planned`` that lands, in
    ``run`` (measured lengths, joints set aside), farther from its planned
    depth than the plan's ``screen_depth_tolerance``
    (:func:`rigplan.engine.landing.landing_picture`, the app's landing pane)."""
    from rigplan.engine.landing import landing_picture
    p, r = planned.running_joints(), run.running_joints()
    picture = landing_picture(
        [j.label for j in p], [j.length for j in p], [j.kind == "screen" for j in p],
        planned.closure.valve_joint, [j.label for j in r], [j.run_length for j in r],
        run.closure.valve_joint, planned.hole.depth, planned.settings.screen_depth_tolerance)
    out = []
    for row in picture.moved:
        shift = row.shift
        if shift == shift and abs(shift) <= picture.tolerance:
            shift = row.top - row.planned_top         # the top moved
        out.append(Finding(JobCode.SCREEN_OFF_PLAN, Severity.WARNING,
                           quantities={"shift": (shift, Kind.LENGTH),
                                       "tolerance": (picture.tolerance, Kind.LENGTH)},
                           context={"labels": tuple(row.labels),
                                    "source": source or run.source or run.name}))
    return out


def rated_joints(plan: StringPlan):
    """The running joints of a plan, rated (``JointArrays``)."""
    from rigplan.engine.rating import rate_joints
    specs = plan.running_joints()
    if not specs:
        raise InputError(plan.source or plan.name, "the string has no joints to run")
    src = plan.source or plan.name
    try:
        return rate_joints(specs, temperature=plan.hole.temperature)
    except InputError as err:
        where = err.where if src and err.where.startswith(src) else f"{src}: {err.where}"
        raise InputError(where, err.message + _material_file_note(err.message)) from None
    except (ValueError, KeyError) as err:
        text = str(err).strip("'\"")
        raise InputError(src, text + _material_file_note(text)) from None


def _material_file_note(message: str) -> str:
    """`` (material 'x' is from the materials file F)`` when the message
    names a material read from a user's materials file."""
    import re
    from rigplan.files.formats.materialfile import material_file
    m = re.search(r"material '([^']+)'", message)
    source = material_file(m.group(1)) if m else None
    return f" (material {m.group(1)!r} comes from the materials file {source})" if source else ""


def plan_job(plan: StringPlan, rig, path_name: str | None = None,
             fixed_closure: bool = False, fill_record=None, fill_fluids=None,
             staged_split: int | None = None):
    """Rate the string and plan its landing (``rigplan.engine.planner.LandingPlan``).

    ``fixed_closure``: joints are in the hole, so the planned float
    equipment is installed and no other position is tried.  ``fill_record``,
    ``fill_fluids`` and ``staged_split``: the run so far (see
    :func:`plan_as_run`).
    """
    from rigplan.engine.planner import plan_landing
    joints = rated_joints(plan)
    closure = plan.closure
    if closure.valve_joint is not None and closure.valve_joint >= joints.n:
        raise InputError(plan.source or plan.name,
                         f"float_equipment.collar_joint: the float collar must sit on a joint "
                         f"below the top (1..{joints.n - 1}), got {closure.valve_joint}")
    try:
        return plan_landing(joints, plan.hole, rig, plan.settings, closure=closure,
                            path=path_name, grout=plan.grout, fixed_closure=fixed_closure,
                            fill_record=fill_record, fill_fluids=fill_fluids,
                            staged_split=staged_split)
    except InputError:
        raise
    except ValueError as err:
        raise InputError(plan.source or plan.name, str(err)) from None


# ---------------------------------------------------------------------------
# the plan as run


def fill_record_of(landing, steps: int):
    """The fill in the pipe after each of the first ``steps`` steps of a
    floated plan (``rigplan.engine.floatplan.FillRecord``), or None when the
    plan is not floated: what the crew put in while following it."""
    from rigplan.engine.floatplan import FillRecord
    opt = getattr(landing, "best_float", None)
    if opt is None or opt.schedule is None or steps <= 0 or landing.chosen.closure.is_open:
        return None
    # the schedule's own fluid: a column of the same weight (it differs from
    # the fluid shown when an earlier record held a heavier one)
    vol = np.asarray(opt.schedule.fill_volume, dtype=float)[:steps]
    return FillRecord(float(opt.schedule.fill_density), np.nan_to_num(vol, nan=0.0).copy(),
                      in_use=float(opt.fill_density))


#: The plan as planned, before the first joint, by plan and rig: it fixes the
#: kind of run (floated or staged) and what the steps already run received.
_AS_PLANNED: dict = {}


def _as_planned(base: StringPlan, rig, path_name):
    key = (id(base), id(rig), path_name)
    hit = _AS_PLANNED.get(key)
    if hit is None or hit[0] is not base or hit[1] is not rig:
        if len(_AS_PLANNED) > 16:
            _AS_PLANNED.clear()
        hit = (base, rig, plan_job(base, rig, path_name))
        _AS_PLANNED[key] = hit
    return hit[2]


def plan_as_run(base: StringPlan, rig, state, path_name: str | None = None,
                fill_record=None):
    """The landing plan as run so far: the plan with the run log applied.

    ``base`` is the plan as written (no run log); ``state`` the run log's
    :class:`rigplan.files.runlog.RunState` (None or empty: nothing run).
    Once joints are in the hole the kind of run is a fact:

    * planned in stages (before the first joint): it stays staged, with the
      split planned then; stage 1 runs from the floor, is lowered on the
      landing string and released, stage 2 runs from the floor and the shoe
      stays at its landed depth;
    * floated: the planned float equipment is installed, and the fill
      already in the pipe stays as it is.  ``fill_record`` is that fill
      (``rigplan.engine.floatplan.FillRecord``, e.g. kept from the plan
      before a settings change): the later steps are planned with the fluid
      in use while the settings still offer it, else with the fill fluid
      the settings name now.  Without it, the steps run received
      what the plan gives them, and the fluid the plan chose before the
      first joint is kept (no other fluid is offered mid-run).
    """
    plan = apply_run_state(base, state)
    k = len(state.run) if state is not None else 0
    if k == 0:
        return plan_job(plan, rig, path_name)
    planned = _as_planned(base, rig, path_name)
    if getattr(planned, "staged", False) and planned.stages is not None:
        # the split stays at the same joint (by label) when joints were set aside
        split = planned.stages.split
        top = base.running_joints()[split - 1].label
        labels = [j.label for j in plan.running_joints()]
        if top in labels:
            split = labels.index(top) + 1
        return plan_job(plan, rig, path_name, staged_split=split)
    fluids = None
    if fill_record is not None and fill_record.steps > k:
        # joints undone since the record was kept: only those still in the hole
        from rigplan.engine.floatplan import FillRecord
        fill_record = FillRecord(fill_record.density, np.asarray(fill_record.volume)[:k],
                                 fill_record.in_use)
    if fill_record is None:
        # the crew has been filling with the fluid the plan chose: keep it
        # (the pipe run so far holds it, full or as scheduled)
        opt = getattr(planned, "best_float", None)
        if opt is not None and not planned.chosen.closure.is_open:
            fluids = (float(opt.fill_density),)
    else:
        # fluids are compared only before the first joint: the fluid in use
        # stays while the settings still offer it, else the one they name
        s = plan.settings
        offered = (s.fill_density,) + tuple(s.fill_density_alternatives)
        in_use = fill_record.in_use if np.isfinite(fill_record.in_use) else fill_record.density
        fluids = ((in_use,) if any(abs(in_use - r) < 1e-6 for r in offered)
                  else (s.fill_density,))
    return plan_job(plan, rig, path_name, fixed_closure=True, fill_record=fill_record,
                    fill_fluids=fluids)
