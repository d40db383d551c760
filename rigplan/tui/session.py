"""One open job in the terminal app: files, run log, edits and the plan.

No Textual here: the screens call these methods and show what they return,
and the tests (and the kill test's driver) use the same code.  Every figure
comes from the engine (:func:`rigplan.files.job.plan_job`); this module only keeps
the job's state, records events in the run log as they happen, applies plan
edits and compares a weight reading with the planned hook load.

State kept:

* ``base_plan``: the plan as read and edited here (saved with
  :meth:`JobSession.save_plan`);
* ``state``: the run replayed from the log (:class:`rigplan.files.runlog.RunState`);
* ``plan``: ``base_plan`` with the run state applied (measured lengths,
  rejections) -- what the engine plans;
* ``landing``: the engine's :class:`rigplan.engine.planner.LandingPlan` for
  ``plan`` (None with ``error`` set when the engine refused the input).
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass
from pathlib import Path

from rigplan.errors import InputError
from rigplan.files import ranges
from rigplan.files.job import apply_run_state, plan_as_run, collar_label, length_warnings, load_job, plan_job, rated_joints
from rigplan.files.runlog import RunLog, RunLogLocked, log_path_for
from rigplan.engine.stringmodel import CONNECTION_KINDS, JOINT_KINDS, StringPlan
from rigplan.files import units as U
from rigplan.present import wording as P

#: Default half-width of the band around the planned hook load inside which a
#: weight-indicator reading counts as agreeing: 10 % of the planned hook load
#: (common practice, no source; weight indicators on small rigs are often no
#: better than a few per cent of full scale).
DEFAULT_BAND_FRACTION = 0.10

#: Suffix of the exported tally beside the plan.
EXPORT_SUFFIX = ".tally-export.csv"

#: Editable joint fields: field -> (how it is read, quantity kind or choices).
EDITABLE_FIELDS = {
    "label": ("label", None),
    "kind": ("choice", JOINT_KINDS),
    "material": ("material", None),
    "od": ("quantity", "diameter"),
    "wall": ("quantity", "diameter"),
    "length": ("quantity", "length"),
    "measured_length": ("optional_quantity", "length"),
    "connection": ("choice", CONNECTION_KINDS),
}

# Likely causes of a reading off the plan, by direction.  Trade knowledge
# (common practice, no source).
CAUSES_LIGHTER = (
    "fill not as planned: less fluid inside the string than the schedule says",
    "drag or hole friction while lowering (wall contact, a ledge, centralizers hanging up)",
    "hole fluid heavier than entered (more buoyancy)",
    "wrong joint weight or tally: the plan carries more pipe weight than is in the hole",
    "string resting on a bridge or on bottom",
)
CAUSES_HEAVIER = (
    "fill not as planned: more fluid inside than scheduled, or the float valve "
    "leaking so the string fills from below",
    "drag while picking up (overpull), or the reading taken while the string moved up",
    "hole fluid lighter than entered, or the annulus level has dropped (less buoyancy)",
    "wrong joint weight or tally: heavier or longer joints in the hole than planned",
    "weight indicator not zeroed with the hoisting gear, or set for another line count",
)


@dataclass(frozen=True)
class WeightCheck:
    """A weight-indicator reading against the planned hook load, SI units.

    observed, predicted : hook load read and planned [N]
    difference : observed - predicted [N]
    tolerance : half-width of the agreement band [N]
    outside : the reading lies outside the band
    causes : likely causes to look at when outside (empty inside)
    step : joints in the hole when read
    """

    observed: float
    predicted: float
    difference: float
    tolerance: float
    outside: bool
    causes: tuple
    step: int


def compare_reading(observed: float, predicted: float, band_fraction: float,
                    band_force: float, step: int) -> WeightCheck:
    """Compare a reading [N] with the planned hook load [N].

    The band is ``max(band_fraction x |predicted|, band_force)`` either side
    of the prediction.

    >>> c = compare_reading(110.0, 100.0, 0.10, 0.0, 3)
    >>> c.outside, c.tolerance
    (False, 10.0)
    >>> compare_reading(89.0, 100.0, 0.10, 0.0, 3).outside
    True
    """
    tol = max(band_fraction * abs(predicted), band_force)
    diff = observed - predicted
    outside = abs(diff) > tol * (1 + 1e-12)
    causes = () if not outside else (CAUSES_LIGHTER if diff < 0 else CAUSES_HEAVIER)
    return WeightCheck(observed=float(observed), predicted=float(predicted),
                       difference=float(diff), tolerance=float(tol), outside=outside,
                       causes=causes, step=int(step))


class JobSession:
    """A job open in the app: plan and rig files, the run log, the plan.

    Parameters
    ----------
    plan_path, rig_path : the string plan and rig profile files
    path_name : hoisting path to plan with (None: the strongest)
    units : display system, ``"us"`` or ``"si"``
    band_fraction : agreement band for weight readings, fraction of the
        planned hook load [-]
    band_force : least half-width of that band [N]

    Raises
    ------
    InputError
        The files cannot be read (one line naming file and key).
    """

    def __init__(self, plan_path, rig_path, path_name: str | None = None, units: str = "us",
                 band_fraction: float = DEFAULT_BAND_FRACTION, band_force: float = 0.0):
        if units not in U.SYSTEMS:
            raise InputError("--units", f"expected one of {', '.join(U.SYSTEMS)}, got {units!r}")
        self.job = load_job(plan_path, rig_path, path_name)
        self.plan_path = Path(self.job.plan_path)
        self.rig_path = Path(self.job.rig_path)
        self.rig = self.job.rig
        self.warnings = tuple(self.job.warnings)
        self.base_plan: StringPlan = self.job.plan
        self.file_units = self.job.units
        self.units = units
        self.path_name = path_name
        self.band_fraction = float(band_fraction)
        self.band_force = float(band_force)
        self.dirty = False
        self.last_backup: Path | None = None
        self.last_event_id: int | None = None
        self.last_check: WeightCheck | None = None
        self.lock_holder: dict = {}
        log_path = log_path_for(self.plan_path)
        try:
            self.log = RunLog.open_writer(log_path)
        except RunLogLocked as exc:
            # Another app records this job: follow it, read-only.
            self.lock_holder = exc.holder
            self.log = RunLog(log_path, read_only=True)
        self.log.changed()
        self.state = self.log.state()
        self.plan: StringPlan = self.base_plan
        self.landing = None
        self.error = ""
        # the fill already in the pipe, kept when a setting changes mid-run
        self.fill_record = None
        self.length_warnings = []
        self.recompute()

    # -- one writer per job ----------------------------------------------------

    @property
    def read_only(self) -> bool:
        """Another program records this job: this one only follows."""
        return self.log.read_only

    def read_only_text(self) -> str:
        """The banner of a read-only session ('' when this one records)."""
        if not self.read_only:
            return ""
        h = self.lock_holder
        who = (f" (program {h.get('pid', '?')} on {h.get('host', '?')}, since "
               f"{h.get('since', '?')})") if h else ""
        return (f"READ-ONLY: another rigplan records this job{who}. This copy follows its "
                "entries; nothing can be recorded here until that one is closed.")

    def follow(self) -> bool:
        """Read the writer's new entries (read-only session), or take over
        when the writer has gone.  True when something changed."""
        took_over = False
        if self.read_only:
            took_over = self.log.try_lock()
            if took_over:
                self.lock_holder = {}
        if not self.log.changed() and not took_over:
            return False
        state = self.log.state()
        if not took_over and state.last_id == self.state.last_id and state.run == self.state.run:
            return False
        self.state = state
        self.recompute()
        return True

    # -- the plan ------------------------------------------------------------

    def recompute(self) -> None:
        """Apply the run state to the plan and ask the engine for the landing plan."""
        try:
            self.plan = apply_run_state(self.base_plan, self.state)
            self.length_warnings = length_warnings(self.plan)
            # Once a joint is in the hole the planned float equipment is
            # installed and a staged job stays staged (rigplan.files.job.plan_as_run).
            self.landing = plan_as_run(self.base_plan, self.rig, self.state, self.path_name,
                                       fill_record=self.fill_record)
            self.error = ""
        except InputError as exc:
            self.landing = None
            self.error = str(exc)
        self._judge_last_reading()

    def _judge_last_reading(self) -> None:
        obs = self.state.observations
        self.last_check = self.judge(obs[-1]) if obs else None

    def judge(self, observation) -> WeightCheck | None:
        """A reading against the plan AS IT STANDS NOW (not the prediction
        kept from when it was entered); None without a prediction."""
        predicted = self.predicted_hook_load(observation.step)
        if predicted is None:
            return None
        return compare_reading(observation.hook_load_n, predicted, self.band_fraction,
                               self.band_force, observation.step)

    def readings(self) -> list:
        """Every reading (not undone) with its check against the current
        plan: ``[(Observation, WeightCheck or None)]``, oldest first."""
        return [(o, self.judge(o)) for o in self.state.observations]

    def close(self) -> None:
        self.log.close()

    @property
    def path_names(self) -> tuple:
        return tuple(p.name for p in self.rig.paths)

    def cycle_path(self) -> str:
        """Plan with the next hoisting path of the rig; return its name."""
        names = self.path_names
        current = self.path_name if self.path_name is not None else (
            self.landing.path.path if self.landing is not None else names[0])
        i = names.index(current) if current in names else -1
        self.path_name = names[(i + 1) % len(names)]
        self.keep_fill_run()
        self.recompute()
        return self.path_name

    def keep_fill_run(self) -> None:
        """Before a setting changes mid-run: the fill already in the pipe is
        a fact; keep it so the change applies to the joints not yet run."""
        k = len(self.state.run)
        if k and self.landing is not None:
            from rigplan.files.job import fill_record_of
            self.fill_record = fill_record_of(self.landing, k) or self.fill_record

    def toggle_units(self) -> str:
        self.units = "si" if self.units == "us" else "us"
        return self.units

    # -- the run -------------------------------------------------------------

    @property
    def step(self) -> int:
        """Joints in the hole."""
        return len(self.state.run)

    def in_hole(self, label: str) -> bool:
        return any(lab == label for lab, _ in self.state.run)

    def set_aside(self, label: str) -> bool:
        return label in self.state.rejected

    def next_joint(self):
        """The next joint to run (JointSpec in plan order), or None when all are in."""
        done = {lab for lab, _ in self.state.run}
        for j in self.plan.joints:
            if not j.rejected and j.label not in done:
                return j
        return None

    def joint(self, label: str):
        for j in self.plan.joints:
            if j.label == label:
                return j
        raise KeyError(label)

    def _after_event(self, event_id) -> None:
        self.last_event_id = event_id
        self.state = self.log.state()
        self.recompute()

    def record_run(self, measured_length_m: float | None, note: str = "",
                   basis: str | None = None) -> int:
        """Record the next joint as run (committed at once); return the event id.

        ``basis``: ``"measured"`` (typed from the tape) or ``"planned"`` (the
        planned length accepted, nothing measured); by default measured when
        a length is given.
        """
        j = self.next_joint()
        if j is None:
            raise InputError("run", "every joint of the plan is in the hole already")
        if basis == "planned" and measured_length_m is None:
            measured_length_m = j.length
        event_id = self.log.record_run(j.label, measured_length_m, note, basis=basis)
        self._after_event(event_id)
        return event_id

    def length_basis(self, label: str) -> str | None:
        """How the length of a joint in the hole was obtained: 'measured' or
        'planned' (None when it is not in the hole)."""
        return self.state.basis.get(label)

    def reject(self, label: str, reason: str) -> int:
        """Set joint ``label`` aside with a reason (committed at once)."""
        if not reason.strip():
            raise InputError("reason", "expected a reason for setting the joint aside")
        if label not in {j.label for j in self.base_plan.joints}:
            raise InputError("reject", f"no joint {label!r} in the plan")
        event_id = self.log.reject(label, reason.strip())
        self._after_event(event_id)
        return event_id

    def last_undoable(self):
        """The latest run, reject or reading entry not yet undone (Event) or None."""
        events = self.log.events()
        undone = {e.ref for e in events if e.kind == "undo"}
        for e in reversed(events):
            if e.kind in ("run", "reject", "observe") and e.id not in undone:
                return e
        return None

    def undo(self) -> int | None:
        event_id = self.log.undo()
        if event_id is not None:
            self._after_event(event_id)
        return event_id

    def step_hook_loads(self):
        """The engine's planned hook load per running step [N], or None
        without a plan.  For a staged setting steps 1..split are stage 1 at
        the floor (lowering it on the landing string then peaks at the
        stage's own figure) and the rest are stage 2 run from the floor."""
        lp = self.landing
        if lp is None:
            return None
        return lp.hook_load

    def predicted_hook_load(self, step: int | None = None) -> float | None:
        """Planned hook load [N] with ``step`` joints in the hole (default: now)."""
        loads = self.step_hook_loads()
        if loads is None:
            return None
        k = self.step if step is None else step
        if k == 0:
            return float(self.landing.dead_load)
        if k > len(loads):
            return None
        return float(loads[k - 1])

    def hook_rating(self) -> float:
        """The most any hoisting path of the rig is rated to carry at the
        hook [N]: the weakest rated component of each path, the strongest
        path (nan when nothing is rated).  A reading above it is a slip."""
        from rigplan.engine.hoisting import rig_capacity
        best = math.nan
        for cap in rig_capacity(self.rig):
            ratings = [rating for _name, _kind, rating, _allowed in cap.components
                       if math.isfinite(rating)]
            if ratings and not (min(ratings) <= best):
                best = min(ratings)
        return best

    def reading_value(self, text: str) -> float:
        """A weight-indicator reading typed by the crew, in N.

        A bare number is in the display unit of force; refused below zero
        and above the rig's hook rating (:meth:`hook_rating`), with one line
        saying why.
        """
        where = "weight reading"
        unit = P.unit("force", self.units)
        t = text.strip()
        if not t:
            raise InputError(where, f"expected the hook load read off the weight indicator "
                                    f"(a bare number is in {unit})")
        value = U.parse(t, "force", unit, where)
        if value < 0:
            raise InputError(where, f"a hook load cannot be below zero, got {t!r}")
        top = self.hook_rating()
        if math.isfinite(top) and value > top:
            raise InputError(where, f"{P.fmt(value, 'force', self.units)} is above the rig's "
                                    f"hook rating ({P.fmt(top, 'force', self.units)}): "
                                    "check the indicator and the units")
        ranges.check("force", value, where, t, self.units)    # a rig rated nowhere
        return value

    def observe(self, hook_load_n: float, note: str = "") -> tuple:
        """Record a weight reading now; return (event id, WeightCheck or None).

        The prediction at entry is kept in the log beside the reading; the
        check returned (and every later one) is against the current plan.
        """
        predicted = self.predicted_hook_load()
        event_id = self.log.observe(self.step, hook_load_n, predicted, note)
        self.last_event_id = event_id
        self.state = self.log.state()
        self._judge_last_reading()
        return event_id, self.last_check

    def set_band(self, text: str) -> str:
        """Set the agreement band from ``"10 %"``, ``"0.1"`` or a force (``"2000 lbf"``)."""
        t = text.strip()
        if t.endswith("%"):
            try:
                v = float(t[:-1])
            except ValueError:
                raise InputError("band", f"expected a percentage such as 10 %, got {text!r}") from None
            if not ranges.RANGES["band_fraction"].contains(v / 100.0):
                raise InputError("band", f"expected a percentage between 0 and 100, got {text!r}")
            self.band_fraction, self.band_force = v / 100.0, 0.0
        else:
            try:
                v = float(t)
            except ValueError:
                v = None
            if v is not None:
                if not ranges.RANGES["band_fraction"].contains(v):
                    raise InputError("band", f"a bare number is a fraction between 0 and 1, "
                                             f"got {text!r} (or write 10 % or 2000 lbf)")
                self.band_fraction, self.band_force = v, 0.0
            else:
                force = U.parse(t, "force", None, "band")
                ranges.check("force_rating", force, "band", t, self.units)
                self.band_fraction, self.band_force = 0.0, force
        self._judge_last_reading()
        return self.band_text()

    def band_text(self) -> str:
        if self.band_force > 0:
            return f"+/- {P.fmt(self.band_force, 'force', self.units)}"
        return f"+/- {self.band_fraction * 100:g} %"

    # -- plan edits ----------------------------------------------------------

    def _index(self, label: str) -> int:
        for i, j in enumerate(self.base_plan.joints):
            if j.label == label:
                return i
        raise InputError("joint", f"no joint {label!r} in the plan")

    def _with_joints(self, joints: list, collar_label) -> StringPlan:
        plan = dataclasses.replace(self.base_plan, joints=tuple(joints))
        if collar_label is not None:
            running = [j.label for j in plan.running_joints()]
            closure = dataclasses.replace(plan.closure, valve_joint=running.index(collar_label) + 1)
            plan = dataclasses.replace(plan, closure=closure)
        return plan

    def _check_plan(self, plan: StringPlan) -> StringPlan:
        """Refuse a plan the engine cannot rate (message names the joint)."""
        rated_joints(apply_run_state(plan, self.state))
        return plan

    def _not_in_log(self, label: str, what: str) -> None:
        if self.in_hole(label):
            raise InputError(f"joint {label}", f"{label} is in the hole: {what} (undo its run first)")
        if self.set_aside(label):
            raise InputError(f"joint {label}", f"{label} is set aside in the run log: {what} "
                                               "(undo the rejection first)")

    def edited_plan(self, label: str, field: str, text: str) -> StringPlan:
        """The base plan with one field of joint ``label`` set from ``text``.

        Quantities without a unit are read in the display units.  Raises
        InputError (naming joint and field, with the expected units) and
        changes nothing when the text cannot be used.
        """
        if field not in EDITABLE_FIELDS:
            raise InputError(f"joint {label}", f"{field} is computed, not entered")
        how, what = EDITABLE_FIELDS[field]
        i = self._index(label)
        spec = self.base_plan.joints[i]
        where = f"joint {label}.{field}"
        t = text.strip()
        if field in ("label", "measured_length"):
            self._not_in_log(label, f"its {field.replace('_', ' ')} is fixed by the run log")
        if how == "label":
            if not t:
                raise InputError(where, "expected a joint label, got an empty text")
            if t != spec.label and t in {j.label for j in self.base_plan.joints}:
                raise InputError(where, f"label {t!r} is already used by another joint")
            value = t
        elif how == "choice":
            if t not in what:
                raise InputError(where, f"expected one of {', '.join(what)}, got {t!r}")
            value = t
        elif how == "material":
            from rigplan.engine import materials
            try:
                value = materials.get_material(t).key
            except KeyError:
                raise InputError(where, f"unknown material {t!r}; known: "
                                        f"{', '.join(materials.known_keys())}") from None
        else:
            if how == "optional_quantity" and t == "":
                value = None
            else:
                value = U.parse(t, what, U.unit_label(what, self.units), where)
                ranges.check(FIELD_RANGES[field], value, where, t, self.units)
        changed = dataclasses.replace(spec, **{field: value})
        if changed.wall >= changed.od / 2.0:
            raise InputError(where, f"the wall must be less than half the od "
                                    f"({P.fmt(changed.od / 2, 'diameter', self.units)})")
        joints = list(self.base_plan.joints)
        joints[i] = changed
        collar = collar_label(self.base_plan)
        if collar == spec.label:
            collar = changed.label
        return self._check_plan(self._with_joints(joints, collar))

    # -- job settings ---------------------------------------------------------

    def setting_text(self, key: str) -> str:
        """The current value of a job setting as editable text."""
        p = self.base_plan
        sys_ = self.units
        d = p.settings.design
        values = {
            "hole_fluid_density": ("density", p.hole.fluid_density),
            "hole_fluid_level": ("length", p.hole.fluid_level),
            "fill_density": ("density", p.settings.fill_density),
            "valve_rating": ("pressure", p.closure.valve_rating),
            "min_running_weight": ("force", p.settings.min_running_weight),
            "set_down_weight": ("force", p.settings.set_down_weight),
        }
        if key in values:
            kind, v = values[key]
            return "unrated" if v != v else P.fmt(v, kind, sys_)
        if key.endswith("_factor"):
            return f"{getattr(d, key[:-len('_factor')]):g}"
        if key == "float_equipment":
            m = p.closure.valve_joint
            if m is None:
                return "none"
            if m == 0:
                return "float shoe"
            return f"collar {p.running_joints()[m - 1].label}"
        if key == "rig":
            return str(self.rig_path)
        raise InputError(key, "no such job setting")


    def edited_setting(self, key: str, text: str) -> StringPlan:
        """The base plan with one job setting changed (raises InputError)."""
        if key not in JOB_SETTINGS:
            raise InputError(key, "no such job setting")
        title, kind, _ = JOB_SETTINGS[key]
        where = f"job setting {title.lower()}"
        p = self.base_plan
        t = text.strip()
        if key == "float_equipment":
            if self.state.run:
                raise InputError(where, "joints are in the hole: the float equipment installed "
                                        "cannot change (undo the runs first)")
            low = t.lower()
            running = p.running_joints()
            if low in ("none", "open", "open shoe"):
                closure = dataclasses.replace(p.closure, valve_joint=None)
            elif low in ("shoe", "float shoe", "float_shoe"):
                closure = dataclasses.replace(p.closure, valve_joint=0)
            else:
                ref = low.removeprefix("float collar").removeprefix("collar").strip()
                labels = [j.label for j in running]
                if ref.isascii() and ref.isdigit():
                    m = int(ref)
                elif ref.upper() in [x.upper() for x in labels]:
                    m = [x.upper() for x in labels].index(ref.upper()) + 1
                else:
                    raise InputError(where, f"expected none, float shoe or collar N, got {text!r}")
                if not 1 <= m < len(running):
                    raise InputError(where, "float collar placed below the shoe or above the top: "
                                            f"expected a joint 1..{len(running) - 1}, got {m}")
                closure = dataclasses.replace(p.closure, valve_joint=m)
            return self._check_plan(dataclasses.replace(p, closure=closure))
        if key == "valve_rating":
            if t.lower() == "unrated":
                value = float("nan")
            else:
                value = U.parse(t, "pressure", U.unit_label("pressure", self.units), where)
                ranges.check("pressure_rating", value, where, t, self.units)
            return dataclasses.replace(p, closure=dataclasses.replace(p.closure, valve_rating=value))
        if key.endswith("_factor"):
            value = U.parse(t, "dimensionless", "", where)
            ranges.check("design_factor", value, where, t)
            design = dataclasses.replace(p.settings.design, **{key[:-len("_factor")]: value})
            return dataclasses.replace(p, settings=dataclasses.replace(p.settings, design=design))
        value = U.parse(t, kind, U.unit_label(kind, self.units), where)
        ranges.check(SETTING_RANGES[key], value, where, t, self.units)
        if key == "hole_fluid_density":
            return dataclasses.replace(p, hole=dataclasses.replace(p.hole, fluid_density=value))
        if key == "hole_fluid_level":
            return dataclasses.replace(p, hole=dataclasses.replace(p.hole, fluid_level=value))
        return dataclasses.replace(p, settings=dataclasses.replace(p.settings, **{key: value}))


    def change_rig(self, text: str) -> str:
        """Plan with another rig profile (read first: a bad file changes nothing)."""
        from rigplan.files.formats.rigfile import read_rig
        from rigplan.files.job import resolve_rig
        path = resolve_rig(text.strip(), self.plan_path)
        rig = read_rig(path)
        self.keep_fill_run()
        self.rig, self.rig_path, self.path_name = rig, Path(path), None
        self.recompute()
        return rig.name

    def preview(self, plan: StringPlan):
        """The landing plan a changed base plan would give now, with the run
        so far kept as it is (the fill already in the pipe stays); nothing
        is changed here.  Raises InputError when the planner refuses it."""
        from rigplan.files.job import fill_record_of, plan_as_run
        record = self.fill_record
        k = self.step
        if k and self.landing is not None:
            record = fill_record_of(self.landing, k) or record
        return plan_as_run(plan, self.rig, self.state, self.path_name, fill_record=record)

    def apply_plan(self, plan: StringPlan) -> None:
        """Use an edited base plan (from :meth:`edited_plan` or the joint edits)."""
        self.keep_fill_run()
        self.base_plan = plan
        self.dirty = True
        self.recompute()

    def _new_label(self) -> str:
        used = {j.label for j in self.base_plan.joints}
        n = len(used) + 1
        while f"J{n}" in used:
            n += 1
        return f"J{n}"

    def insert_after(self, label: str) -> str:
        """Insert a copy of joint ``label`` (planned data only) right above it."""
        i = self._index(label)
        spec = self.base_plan.joints[i]
        new = dataclasses.replace(spec, label=self._new_label(), measured_length=None,
                                  measured_wall=None, rejected=False)
        joints = list(self.base_plan.joints)
        joints.insert(i + 1, new)
        plan = self._check_plan(self._with_joints(joints, collar_label(self.base_plan)))
        self.apply_plan(plan)
        return new.label

    def delete(self, label: str) -> None:
        i = self._index(label)
        self._not_in_log(label, "it cannot be taken out of the plan")
        if label == collar_label(self.base_plan):
            raise InputError(f"joint {label}", "the float collar sits on this joint: move the "
                                               "collar in the plan file first")
        joints = list(self.base_plan.joints)
        del joints[i]
        if not [j for j in joints if not j.rejected]:
            raise InputError(f"joint {label}", "the plan must keep at least one joint to run")
        self.apply_plan(self._check_plan(self._with_joints(joints, collar_label(self.base_plan))))

    def move(self, label: str, delta: int) -> int:
        """Move joint ``label`` ``delta`` places in the running order; return its new index."""
        i = self._index(label)
        k = i + delta
        joints = list(self.base_plan.joints)
        if not 0 <= k < len(joints):
            raise InputError(f"joint {label}", "already at the end of the string")
        self._not_in_log(label, "its place in the running order is fixed")
        self._not_in_log(joints[k].label, f"{label} cannot swap with it")
        joints[i], joints[k] = joints[k], joints[i]
        self.apply_plan(self._check_plan(self._with_joints(joints, collar_label(self.base_plan))))
        return k

    def import_tally(self, path) -> int:
        """Apply a tally CSV's measured lengths, walls and set-asides by label.

        A row about a joint the run log already holds must agree with the
        log (the app's own export does): it is then left to the log.  A row
        that contradicts the log is refused and nothing is applied.
        Returns the number of rows applied to the plan.
        """
        from rigplan.files.formats.planfile import apply_tally
        from rigplan.files.formats.tally import read_tally
        p = Path(path)
        if not p.is_absolute():
            p = self.plan_path.parent / p
        rows = read_tally(p)
        logged = dict(self.state.run)
        fresh = []
        for row in rows:
            where = f"{p}: row {row.row}"
            if self.in_hole(row.label):
                if row.status != "run":
                    raise InputError(where, f"{row.label} is in the hole by the run log, the "
                                            f"tally says {row.status}; undo its run first or "
                                            "correct the tally")
                have = logged.get(row.label)
                same = (row.measured_length is None and have is None) or (
                    row.measured_length is not None and have is not None
                    and abs(row.measured_length - have) <= 1e-9 * max(have, 1.0))
                if not same:
                    raise InputError(where, f"{row.label} is in the hole by the run log, which "
                                            "holds its length; undo its run first or correct "
                                            "the tally")
                continue
            if self.set_aside(row.label):
                if row.status != "rejected":
                    raise InputError(where, f"{row.label} is set aside in the run log; undo the "
                                            "rejection first or mark it rejected in the tally")
                continue
            fresh.append(row)
        joints = apply_tally(list(self.base_plan.joints), fresh, str(p))
        plan = self._check_plan(self._with_joints(joints, collar_label(self.base_plan)))
        if plan != self.base_plan:
            self.apply_plan(plan)
        return len(fresh)

    def save_plan(self) -> Path:
        """Write the edited plan over its file: atomically, keeping the file's
        comments, layout and notations where the values did not change, and
        the previous version beside it (``<plan>.~N~``)."""
        from rigplan.files.formats.plansave import save_plan
        self.last_backup = save_plan(self.base_plan, self.plan_path)
        self.dirty = False
        return self.plan_path

    def export_path(self) -> Path:
        return self.plan_path.with_name(self.plan_path.stem + EXPORT_SUFFIX)

    def export_tally(self) -> Path:
        """Write the run log's tally as CSV beside the plan, in the job's
        units (the plan file's ``units``); return the path.  The sheet reads
        back with ``t`` and ``rigplan check --tally``."""
        from rigplan import CAUTION
        from rigplan.files.atomicio import atomic_write_text
        from rigplan.files.formats.tally import run_tally_text
        planned = {j.label: j.length for j in self.base_plan.joints if not j.rejected}
        entries = self.log.tally_entries(planned)
        comment = (f"rigplan site tally: {self.base_plan.name}"
                   + (f", well {self.base_plan.well}" if self.base_plan.well else "")
                   + f"\nfrom the run log {self.log.path.name}; length_source planned = "
                   "the planned length was accepted, nothing was measured\n" + CAUTION)
        path = self.export_path()
        text = run_tally_text(entries, self.file_units, comment)
        try:
            same = path.read_text(encoding="utf-8") == text
        except (OSError, UnicodeDecodeError):
            same = False
        if not same:
            # an earlier export (perhaps annotated by hand) is kept beside it
            atomic_write_text(path, text, backup=True)
        return path

    # -- lookups for the screens -----------------------------------------------

    def landing_picture(self):
        """Where the shoe, the float collar and each screen interval land as
        run (measured lengths, joints set aside) against the plan as written
        and TD (:func:`rigplan.engine.landing.landing_picture`)."""
        from rigplan.engine.landing import landing_picture
        key = (id(self.base_plan), id(self.plan))
        cached = getattr(self, "_picture", None)
        if cached is not None and cached[0] == key:
            return cached[1]
        planned = self.base_plan.running_joints()
        run = self.plan.running_joints()
        picture = landing_picture(
            [j.label for j in planned], [j.length for j in planned],
            [j.kind == "screen" for j in planned], self.base_plan.closure.valve_joint,
            [j.label for j in run], [j.run_length for j in run], self.plan.closure.valve_joint,
            self.base_plan.hole.depth, self.base_plan.settings.screen_depth_tolerance)
        self._picture = (key, picture, self.base_plan, self.plan)   # plans kept: ids stay theirs
        return picture

    def engine_index(self) -> dict:
        """label -> index into the landing plan's per-joint arrays (running joints)."""
        if self.landing is None:
            return {}
        return {lab: i for i, lab in enumerate(self.landing.joints.label)}

    def measured_in_log(self, label: str):
        for lab, length in self.state.run:
            if lab == label:
                return length
        return None



# -- job settings ------------------------------------------------------------------

#: Settings of the job the app lets the user change, in order:
#: key -> (title, quantity kind for the prompt or None, hint)
JOB_SETTINGS = {
    "hole_fluid_density": ("Hole fluid density", "density", ""),
    "hole_fluid_level": ("Hole fluid level (depth to its top)", "length", ""),
    "fill_density": ("Fill fluid density", "density", ""),
    "float_equipment": ("Float equipment", None,
                        "none, float shoe, or collar N (N = joint number or label)"),
    "valve_rating": ("Check valve rating", "pressure", "a pressure, or unrated"),
    "min_running_weight": ("Minimum running weight", "force", ""),
    "set_down_weight": ("Set-down weight when landed", "force", ""),
    "tension_factor": ("Design factor, tension", "dimensionless", "a number >= 1"),
    "collapse_factor": ("Design factor, collapse", "dimensionless", "a number >= 1"),
    "burst_factor": ("Design factor, burst", "dimensionless", "a number >= 1"),
    "rig": ("Rig profile", None, "a rigs/*.toml path or a bundled rig's name"),
}

#: Range (rigplan.files.ranges) of each quantity the prompts take.
FIELD_RANGES = {"od": "diameter", "wall": "wall", "length": "joint_length",
                "measured_length": "joint_length"}
SETTING_RANGES = {"hole_fluid_density": "fluid_density", "hole_fluid_level": "depth",
                  "fill_density": "fluid_density", "min_running_weight": "force",
                  "set_down_weight": "force"}


def write_packet(session, suffix: str = ".pdf"):
    """Write the job packet beside the plan (``<plan>.packet.pdf``, never over a file).

    The plan as planned, on the session's rig and path, and, once joints
    are in the hole, the record of the run: the same packet as
    ``rigplan report PLAN --rig RIG [--as-run] -o FILE``.
    """
    import dataclasses
    from rigplan.files.atomicio import atomic_write_bytes
    from rigplan.files.job import plan_job
    from rigplan.files.linerjob import free_path
    from rigplan.present.packet import render
    from rigplan.present.packet.content import AsRun, ReportInfo
    planned = plan_job(session.base_plan, session.rig, session.path_name)
    job = dataclasses.replace(session.job, plan=session.base_plan, rig=session.rig,
                              path_name=session.path_name)
    as_run = None
    if session.state.run and session.landing is not None:
        as_run = AsRun(session.base_plan, planned, session.state, session.plan, session.landing)
    meta = dict(getattr(session.base_plan, "report", {}) or {})
    info = ReportInfo(revision=meta.get("revision", ""), date=meta.get("date", ""),
                      prepared_by=meta.get("prepared_by", ""),
                      reviewed_by=meta.get("reviewed_by", ""))
    data = render(suffix.lstrip("."), job, planned, session.units, info, (), as_run,
                  session.rig.name)
    out = free_path(session.plan_path.with_name(session.plan_path.stem + ".packet" + suffix))
    atomic_write_bytes(out, data)
    return out
