"""Text the screens show, built from the engine's landing plan (no Textual).

Every number here is read from :class:`rigplan.engine.planner.LandingPlan` (or the
run log) and converted for display with :mod:`rigplan.files.units`; nothing is
computed beyond picking the entry for the current running step.
"""

from __future__ import annotations

import math

from rigplan.files import units as U
from rigplan.engine.planner import (CANNOT_CONFIRM, CANNOT_LAND, LANDS_FLOATED, LANDS_OPEN,
                             LANDS_STAGED, closure_name)

#: Verdict -> CSS class of the verdict banner.
VERDICT_CLASS = {
    LANDS_OPEN: "good",
    LANDS_FLOATED: "good",
    LANDS_STAGED: "fair",
    CANNOT_CONFIRM: "fair",
    CANNOT_LAND: "bad",
}

OTHER_SYSTEM = {"us": "si", "si": "us"}


def fmt(value, kind: str, system: str, digits: int | None = None) -> str:
    """A value in display units, ``n/a`` when missing."""
    if value is None:
        return "n/a"
    return U.format(float(value), kind, system, digits)


def number(value, kind: str, system: str, digits: int | None = None) -> str:
    """The display number without its unit (for table cells)."""
    text = fmt(value, kind, system, digits)
    label = U.unit_label(kind, system)
    if label and text.endswith(" " + label):
        return text[: -len(label) - 1]
    return text


def both(value, kind: str, system: str, digits: int | None = None) -> str:
    """``150 L (40 gal)``: the value in the chosen units, then the other system."""
    return f"{fmt(value, kind, system, digits)} ({fmt(value, kind, OTHER_SYSTEM[system])})"


def percent(fraction) -> str:
    if fraction is None or not math.isfinite(float(fraction)):
        return "n/a"
    return f"{float(fraction) * 100:.1f} %"


def ratio(value) -> str:
    """A utilization as a plain number, ``unrated`` for nan."""
    v = float(value)
    if math.isnan(v):
        return "unrated"
    return f"{v:.2f}"


def joint_name(lp, step: int) -> str:
    """``joint 23 (J23)`` for a 1-based running step."""
    labels = lp.joints.label
    if 1 <= step <= len(labels):
        return f"joint {step} ({labels[step - 1]})"
    return f"joint {step}"


def verdict_text(lp) -> str:
    return lp.verdict.upper()


def governing_text(lp, system: str) -> str:
    g = lp.governing
    if g is None:
        return "Governing limit: none found"
    if g.capacity == 0 and g.load == 0:
        return f"Governing limit: {g.name} at {g.where}, margin {percent(g.margin)}"
    kind = getattr(g, "kind", "force")
    return (f"Governing limit: {g.name} at {g.where}: load {fmt(g.load, kind, system)} "
            f"against {fmt(g.capacity, kind, system)}, margin {percent(g.margin)}")


def path_text(lp, system: str) -> str:
    p = lp.path
    return (f"Hoisting path: {p.path}, governed by {p.governing or 'nothing rated'}; "
            f"allows a string load of {fmt(p.string_limit, 'force', system)} "
            f"(hook load {fmt(p.hook_limit, 'force', system)} with "
            f"{fmt(lp.dead_load, 'force', system)} of gear on the hook)")


def switch_text(lp) -> str:
    k = lp.switch_joint
    if k == 0:
        return "Switch joint: none (run open-ended, the string load stays inside the path's limit)"
    return (f"Switch joint: {joint_name(lp, k)}: open-ended, the string load passes the "
            f"path's limit there, so floating must have begun by then")


def float_text(lp, system: str) -> str:
    bf = lp.best_float
    if bf is None:
        if lp.float_options:
            return ("Float equipment: no float position and fill fluid tried lands the string "
                    "(see the reasons below)")
        if lp.chosen.closure.is_open:
            return "Float equipment: none needed (open shoe)"
        return f"Float equipment: {closure_name(lp.chosen.closure)}, no fill plan that lands"
    chosen = fmt(bf.fill_density, 'density', system)
    extra = ""
    if abs(bf.fill_density - lp.settings.fill_density) > 1e-9:
        extra = (f" (the best of the fill fluids offered; the job's own fill fluid, "
                 f"{fmt(lp.settings.fill_density, 'density', system)}, gives a poorer plan)")
    return f"Float equipment: {closure_name(bf.closure)}; fill with {chosen}{extra}"


def fill_plan_text(lp, system: str) -> str:
    """The whole fill schedule in one line."""
    bf = lp.best_float
    if bf is None:
        return ""
    s = bf.schedule
    n = lp.joints.n
    parts = []
    if s.fill_to_top_through >= n:
        parts.append("keep every joint filled to the top")
    elif s.fill_to_top_through > 0:
        parts.append(f"fill each joint to the top through {joint_name(lp, s.fill_to_top_through)}, "
                     "then stop filling")
    else:
        parts.append("run empty (no filling to the top)")
    for t in s.top_ups:
        parts.append(f"add {both(t.volume, 'volume', system)} with {joint_name(lp, t.joint)} "
                     f"at the floor")
    return "Fill plan: " + "; ".join(parts)


def fill_instruction(lp, step: int, system: str) -> str:
    """What the crew does with the next joint (step + 1 in the running order)."""
    n = lp.joints.n
    if step >= n:
        return f"All {n} joints are in the hole: land the string"
    s = step + 1
    here = joint_name(lp, s)
    if lp.verdict == CANNOT_LAND:
        why = lp.reasons[0] if lp.reasons else "see the reasons on the Overview"
        return f"Do not run: the string cannot land with this rig ({why})"
    if lp.verdict == LANDS_STAGED and lp.stages is not None:
        st = lp.stages
        if s <= st.split:
            return (f"Stage 1: run {here}; after {joint_name(lp, st.split)} make up the landing "
                    f"string and set stage 1 at {fmt(st.release_depth, 'length', system)}")
        return f"Stage 2: run {here}"
    bf = lp.best_float
    if bf is None:
        if lp.chosen.closure.is_open:
            return f"Run {here}: open shoe, it fills from the hole; no filling"
        return f"Run {here}: no fill schedule for {closure_name(lp.chosen.closure)}"
    m = bf.closure.valve_joint or 0
    if s <= m:
        return f"Run {here}: below the {closure_name(bf.closure)}, it fills from the hole"
    sch = bf.schedule
    t_top = sch.fill_to_top_through
    if s <= t_top:
        if t_top >= n:
            return f"Fill {here} to the top (keep every joint full)"
        return (f"Fill {here} to the top; fill each joint to the top through "
                f"{joint_name(lp, t_top)}, then stop")
    ups = [t for t in sch.top_ups if t.joint >= s]
    if ups:
        u = ups[0]
        if u.joint == s:
            return (f"Fill {both(u.volume, 'volume', system)} with {here} at the floor "
                    f"(fill level then {fmt(u.level_after, 'length', system)} below the floor)")
        return (f"Run {here} without filling; next: fill {both(u.volume, 'volume', system)} "
                f"with {joint_name(lp, u.joint)} at the floor")
    return f"Run {here} without filling: no more fill to landing"


def cautions_text(lp) -> str:
    from rigplan import CAUTION
    items = tuple(lp.cautions) if lp is not None else (CAUTION,)
    return "  ".join(items)


# ---------------------------------------------------------------------------
# tables

#: Tally grid columns: (key, title, quantity kind or None, editable).
TALLY_COLUMNS = (
    ("seq", "#", None, False),
    ("label", "Joint", None, True),
    ("status", "Status", None, False),
    ("kind", "Kind", None, True),
    ("measured_length", "Tally", "length", True),
    ("length", "Plan", "length", True),
    ("top_depth", "Top at", "length", False),
    ("max_tension", "Max tension", "force", False),
    ("tension_util", "Tens. util", None, False),
    ("collapse_util", "Coll. util", None, False),
    ("od", "OD", "diameter", True),
    ("wall", "Wall", "diameter", True),
    ("material", "Material", None, True),
    ("connection", "Connection", None, True),
)


def column_title(title: str, kind, system: str) -> str:
    if kind is None:
        return title
    return f"{title} [{U.unit_label(kind, system)}]"


def joint_status(session, spec, reason: bool = False) -> str:
    if session.in_hole(spec.label):
        return "in hole"
    if session.set_aside(spec.label):
        return "set aside" + (": " + session.state.rejected[spec.label] if reason else "")
    if spec.rejected:
        return "rejected (plan)"
    nxt = session.next_joint()
    if nxt is not None and nxt.label == spec.label:
        return "NEXT"
    return "to run"


def tally_cells(session) -> list:
    """One ``(label, [cell text...])`` per joint of the plan, in plan order."""
    lp = session.landing
    idx = session.engine_index()
    sys_ = session.units
    rows = []
    if lp is not None:
        tops = lp.landed.top_depth      # landed depth of each joint's top (engine)
    for i, spec in enumerate(session.plan.joints, start=1):
        k = idx.get(spec.label)
        if lp is not None and k is not None:
            top = number(tops[k], "length", sys_)
            tension = number(lp.chosen.loads.envelope_max[k], "force", sys_)
            t_util = ratio(lp.chosen.tension_utilization[k])
            c_util = ratio(lp.chosen.collapse_utilization[k])
        else:
            top = tension = t_util = c_util = ""
        cells = {
            "seq": str(i),
            "label": spec.label,
            "kind": spec.kind,
            "material": spec.material,
            "od": number(spec.od, "diameter", sys_),
            "wall": number(spec.wall, "diameter", sys_),
            "length": number(spec.length, "length", sys_),
            "measured_length": "" if spec.measured_length is None
            else number(spec.measured_length, "length", sys_),
            "connection": spec.connection,
            "top_depth": top,
            "max_tension": tension,
            "tension_util": t_util,
            "collapse_util": c_util,
            "status": joint_status(session, spec),
        }
        rows.append((spec.label, [cells[c[0]] for c in TALLY_COLUMNS]))
    return rows


def edit_text(session, label: str, field: str) -> str:
    """Current value of an editable field as the prompt's starting text."""
    spec = next(j for j in session.base_plan.joints if j.label == label)
    value = getattr(spec, field)
    kind = {"od": "diameter", "wall": "diameter", "length": "length",
            "measured_length": "length"}.get(field)
    if kind is None:
        return "" if value is None else str(value)
    if value is None:
        return ""
    return fmt(value, kind, session.units, 4)


#: Running table columns: (key, title, kind or None).
RUN_COLUMNS = (
    ("step", "Step", None),
    ("label", "Joint", None),
    ("status", "Status", None),
    ("length", "Length", "length"),
    ("shoe", "Shoe at", "length"),
    ("hook", "Hook load", "force"),
    ("fill", "Fill", None),
)


def run_cells(session) -> list:
    """Rows of the running table: every joint in plan order."""
    lp = session.landing
    loads = session.step_hook_loads()
    idx = session.engine_index()
    sys_ = session.units
    rows = []
    for spec in session.plan.joints:
        k = idx.get(spec.label)
        step = "" if k is None else str(k + 1)
        if lp is not None and k is not None:
            shoe = number(lp.chosen.loads.shoe_depth[k], "length", sys_)
            hook = number(loads[k], "force", sys_) if loads is not None else "staged"
            fill = fill_marker(lp, k + 1)
        else:
            shoe = hook = fill = ""
        length = spec.run_length
        rows.append((spec.label, {
            "step": step, "label": spec.label, "status": joint_status(session, spec, reason=True),
            "length": number(length, "length", sys_) + ("" if spec.measured_length is not None
                                                          else " (plan)"),
            "shoe": shoe, "hook": hook, "fill": fill,
        }))
    return rows


def fill_marker(lp, step: int) -> str:
    """Short fill note for a step of the running table."""
    bf = lp.best_float
    if bf is None:
        return ""
    m = bf.closure.valve_joint or 0
    if step <= m:
        return "shoe track"
    s = bf.schedule
    if step <= s.fill_to_top_through:
        return "fill to top"
    for t in s.top_ups:
        if t.joint == step:
            return "top-up"
    return "empty"


def running_summary(session) -> list:
    """Lines of the running panel: step, shoe, hook load now, capacity, fill."""
    lp = session.landing
    sys_ = session.units
    k = session.step
    nxt = session.next_joint()
    lines = []
    if lp is None:
        return [f"No plan: {session.error}"]
    n = lp.joints.n
    lines.append(f"Joints in the hole: {k} of {n}" +
                 (f"   next: {nxt.label}" if nxt is not None else "   all in"))
    shoe = float(lp.chosen.loads.shoe_depth[k - 1]) if k >= 1 else 0.0
    lines.append(f"Shoe depth: {fmt(shoe, 'length', sys_)}")
    loads = session.step_hook_loads()
    if loads is None and lp.stages is not None:
        st = lp.stages
        lines.append("Hook load per joint: not given by the planner for a staged setting")
        lines.append(f"Peak hook load: stage 1 at the floor "
                     f"{fmt(st.stage1_peak_hook_load, 'force', sys_)}, at release "
                     f"{fmt(st.release_hook_load, 'force', sys_)}, stage 2 "
                     f"{fmt(st.stage2_peak_hook_load, 'force', sys_)} (gear on the hook "
                     f"{fmt(lp.dead_load, 'force', sys_)} included)")
    else:
        now = session.predicted_hook_load()
        lines.append(f"Hook load now (planned): {fmt(now, 'force', sys_)}")
        if k < n:
            lines.append(f"After the next joint: {fmt(loads[k], 'force', sys_)}")
    lines.append(f"Hook limit ({lp.path.path}): {fmt(lp.path.hook_limit, 'force', sys_)}")
    if k >= 1:
        lines.append(f"Capacity margin now: {percent(lp.chosen.capacity_margin[k - 1])}")
    lines.append(f"Next: {fill_instruction(lp, k, sys_)}")
    lines.append(f"Weight band: {session.band_text()}")
    return lines


def weight_text(check, system: str) -> tuple:
    """(headline, cause lines) for a weight reading against the plan."""
    if check is None:
        return "", ()
    head = (f"Reading {fmt(check.observed, 'force', system)} at step {check.step}; planned "
            f"{fmt(check.predicted, 'force', system)}; difference "
            f"{fmt(check.difference, 'force', system)} (band +/- {fmt(check.tolerance, 'force', system)})")
    if not check.outside:
        return "Weight agrees with the plan. " + head, ()
    side = "LIGHTER" if check.difference < 0 else "HEAVIER"
    return (f"WARNING: string {side} than planned. " + head,
            tuple("likely: " + c for c in check.causes))


def rig_chains(session) -> list:
    """Per hoisting path: ``(chain, in use)``, the chain from
    :func:`rigplan.engine.hoisting.rig_capacity` (shown with
    :func:`rigplan.present.report.chain_table`)."""
    from rigplan.engine.hoisting import rig_capacity
    lp = session.landing
    in_use = lp.path.path if lp is not None else session.path_name
    return [(cap, cap.path == in_use) for cap in rig_capacity(session.rig)]
