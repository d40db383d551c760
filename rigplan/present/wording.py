"""The one presentation layer: words and display units for the engine's results.

Everything the CLI text, the JSON, the printed report and the terminal app
show is worded here: quantities are formatted by their kind in the user's
unit system (:func:`fmt`), fractions as percentages (:func:`percent`), every
finding code is worded by :func:`finding_text`, and the crew instructions,
governing-limit and hoisting-path lines are written once.

Unit systems: ``"us"`` (US field) or ``"si"``; ``"us+si"`` / ``"si+us"``
show the first system with the second beside it in parentheses (only when
the user asks for both).  Numbers carry thousands separators; text meant to
be read back by the unit parser (a prompt's starting value) comes from
:func:`plain` instead.

Every number is read from :class:`rigplan.engine.planner.LandingPlan` (or the
run log); nothing is computed beyond picking the entry for a running step.
"""

from __future__ import annotations

import math
import re

from rigplan.engine.findings import Finding, Kind, Limit, LimitName, Verdict
from rigplan.engine.floatplan import FloatCode
from rigplan.engine.grouting import GroutCode
from rigplan.engine.planner import PlanCode
from rigplan.engine.staging import StagingCode
from rigplan.engine.stringmodel import Closure
from rigplan.files import units as U
from rigplan.files.job import JobCode

#: The caution every output carries.
CAUTION = (
    "Planning aid only: verify every figure against the rig maker's load chart "
    "and the pipe and screen makers' ratings; local well codes and licensed "
    "practice govern."
)

#: Verdict -> CSS class of the verdict banner.
VERDICT_CLASS = {
    Verdict.LANDS_OPEN: "good",
    Verdict.LANDS_FLOATED: "good",
    Verdict.LANDS_STAGED: "fair",
    Verdict.CANNOT_CONFIRM: "fair",
    Verdict.CANNOT_LAND: "bad",
}

OTHER_SYSTEM = {"us": "si", "si": "us"}

#: Finding quantity kinds -> the unit kinds of :mod:`rigplan.files.units`.
_UNIT_KIND = {
    Kind.LENGTH: "length", Kind.DEPTH: "length", Kind.DIAMETER: "diameter",
    Kind.FORCE: "force", Kind.PRESSURE: "pressure", Kind.STRESS: "stress",
    Kind.DENSITY: "density", Kind.VOLUME: "volume", Kind.MASS_PER_LENGTH: "mass_per_length",
}


# ---------------------------------------------------------------------------
# numbers

def systems(system: str) -> tuple:
    """The unit systems to show: ``("us",)``, ``("si",)``, ``("us", "si")``..."""
    parts = tuple(system.split("+"))
    for s in parts:
        if s not in OTHER_SYSTEM:
            raise ValueError(f"unknown unit system {system!r}; known: us, si, us+si, si+us")
    return parts


def primary(system: str) -> str:
    """The first (or only) unit system of ``system``."""
    return systems(system)[0]


def _unit_kind(kind) -> str:
    return _UNIT_KIND.get(kind, str(kind))


def _grouped(text: str) -> str:
    """Thousands separators in the first number of ``text``."""
    return re.sub(r"^(-?)(\d{4,})", lambda m: m.group(1) + f"{int(m.group(2)):,}", text, count=1)


def _one(value: float, kind: str, system: str, digits) -> str:
    if kind == "force" and system == "si" and digits == 0 and abs(value) < 100e3:
        digits = 1          # small loads in kN would round to nothing
    return _grouped(U.format(value, kind, system, digits))


def fmt(value, kind, system: str, digits: int | None = None, missing: str = "n/a") -> str:
    """A value in display units of ``kind`` (a :class:`Kind` or a unit kind
    name), ``missing`` when it is None or nan (not known, unrated)."""
    if kind in (Kind.RATIO,):
        return percent(value, missing)
    if kind in (Kind.COUNT,):
        return missing if value is None or value != value else f"{int(value):,}"
    if value is None or (isinstance(value, float) and math.isnan(value)):
        return missing
    value = float(value)
    if math.isnan(value):
        return missing
    k = _unit_kind(kind)
    first, *rest = systems(system)
    text = _one(value, k, first, digits)
    for other in rest:
        text += f" ({_one(value, k, other, None)})"
    return text


def plain(value, kind, system: str, digits: int | None = None) -> str:
    """A value in the first system with no separators, as the parser reads it back."""
    if value is None:
        return ""
    return U.format(float(value), _unit_kind(kind), primary(system), digits)


def number(value, kind, system: str, digits: int | None = None) -> str:
    """The display number without its unit (for table cells under a titled unit)."""
    if value is None or (isinstance(value, float) and math.isnan(value)):
        return "n/a"
    return _grouped(U.format(float(value), _unit_kind(kind), primary(system), digits)
                    .removesuffix(" " + unit(kind, system)))


def unit(kind, system: str) -> str:
    """The unit label of ``kind`` in the first system (``ft``, ``kN``)."""
    return U.unit_label(_unit_kind(kind), primary(system))


def to_display(value_si, kind, system: str):
    """SI values (a float or an array) in the display unit of ``kind`` (for charts)."""
    return U.to_display(value_si, _unit_kind(kind), primary(system))


def percent(fraction, missing: str = "n/a") -> str:
    """A fraction as a percentage, ``12.3 %`` (``missing`` for nan or None)."""
    if fraction is None or not math.isfinite(float(fraction)):
        return missing
    return f"{float(fraction) * 100:,.1f} %"


def ratio(value) -> str:
    """A utilization as a plain number, ``unrated`` for nan."""
    v = float(value)
    if math.isnan(v):
        return "unrated"
    return f"{v:.2f}"


# ---------------------------------------------------------------------------
# names

def closure_name(closure, labels=None) -> str:
    """``open shoe``, ``float shoe`` or ``float collar at the top of J5`` (a
    :class:`Closure` or its valve joint).  The one name of each piece of
    float equipment on every screen and in every report: the collar by the
    label of the joint it sits on top of (``labels``: running-order labels;
    without them, ``joint N`` in running order)."""
    m = closure.valve_joint if isinstance(closure, Closure) else closure
    if m is None:
        return "open shoe"
    if m == 0:
        return "float shoe"
    return f"float collar at the top of {_joint(m, _label_at(labels, m))}"


def _label_at(labels, step):
    if labels is not None and 1 <= step <= len(labels):
        return str(labels[step - 1])
    return None


def joint_name(lp, step: int) -> str:
    """A joint by its label (``J23``) for a 1-based running step: the same
    name on every screen, whatever was set aside before it."""
    return _joint(step, _label_at(lp.joints.label, step))


def _joint(j, label) -> str:
    """A joint's one name: its label, ``joint N`` (running order) without one."""
    return str(label) if label else f"joint {j}"


def limit_place(limit: Limit) -> str:
    """Where a limit is reached, in words."""
    if limit.name == LimitName.HOLE_DEPTH:
        return "the shoe when landed"
    if limit.name == LimitName.STAGE1_HOISTING:
        return f"stage 1 (joints 1-{limit.joint}) at the floor"
    if limit.name in (LimitName.LOWERING_HOISTING, LimitName.LANDING_STRING):
        return f"stage 1 (joints 1-{limit.joint}) on the landing string"
    if limit.name == LimitName.STAGE2_HOISTING:
        return f"stage 2 (from joint {limit.joint + 1}) at the floor"
    if limit.step is not None:
        if limit.first_step is not None and limit.first_step != limit.step:
            first = limit.first_label or f"step {limit.first_step}"
            return (f"step {limit.step} ({limit.label} at the floor; over its limit from "
                    f"{first}, step {limit.first_step})")
        return f"step {limit.step} ({limit.label} at the floor)"
    if limit.joint is not None:
        return _joint(limit.joint, limit.label)
    return "the string"


def _over_place(f: Finding) -> str:
    """Where a limit is exceeded: from the first step over it (worst at ...)."""
    first = f.get("first_step")
    if first is None or f.step is None or first == f.step:
        return f"at {_finding_place(f)}"
    first_label = f.get("first_label") or f"step {first}"
    worst = f.label or f"step {f.step}"
    return (f"from {first_label} at the floor (step {first}; worst at {worst}, "
            f"step {f.step})")


def _finding_place(f: Finding) -> str:
    if f.step is not None:
        return f"step {f.step} ({f.label} at the floor)" if f.label else f"step {f.step}"
    if f.joint is not None:
        return _joint(f.joint, f.label)
    return "the string"


# ---------------------------------------------------------------------------
# findings

_CLOSING = {
    "": "{low} even with the pipe full",
    LimitName.HOISTING: "{low} vs hoisting capacity",
    LimitName.VALVE_BALANCE: "{low} vs valve balance (heavier fill drains out through the "
                             "check valve)",
}
_TOO_LIGHT = {
    "": "the string is too light (floats) even with the pipe full",
    LimitName.VALVE_BALANCE: "the string is too light (floats) even with the fill at its "
                             "balance level",
}


def closing_words(empty_limit: str, full_limit: str | None) -> str:
    """Why a fill window is empty: the two limits that meet."""
    if full_limit is None:
        return empty_limit
    if empty_limit == LimitName.RUNNING_WEIGHT and full_limit in _TOO_LIGHT:
        return _TOO_LIGHT[full_limit]
    return _CLOSING.get(full_limit, "{low} vs {high}").format(low=empty_limit, high=full_limit)


_UNRATED_PART = {"tension": "tension at the top of joint", "collapse": "collapse of joint",
                 "burst": "burst of joint",
                 "buckling": "buckling below the neutral point (modulus, hole diameter or "
                             "yield not given) of joint"}


def _valve(f: Finding) -> str:
    """The float equipment of a finding, by the collar joint's label when known."""
    m = f.get("valve_joint")
    label = f.get("valve_label")
    return closure_name(m, None if not label else [""] * (m - 1) + [label])


def _leave_valve_out(f: Finding) -> str:
    """Crew action: the plan runs open-ended though float equipment is named."""
    m = f.get("valve_joint")
    named = []
    if m is not None:
        named.append(f"the {_valve(f)}")
    joints = [x for x in (f.get("float_joints") or ()) if x != f.get("valve_label")]
    if joints:
        named.append(("float equipment joint " if len(joints) == 1 else
                      "float equipment joints ") + ", ".join(joints))
    how = "in stages" if f.get("staged") else "open-ended"
    stage = (" Both stages run open-ended: stage 1 fills from the hole as it is lowered on "
             "the landing string." if f.get("staged") else "")
    return (f"RUN WITHOUT THE CHECK VALVE: this plan runs {how}, but the plan names "
            f"{' and '.join(named)}. Leave the valve out (or fit the auto-fill / orifice "
            "insert so the pipe fills from the hole through the shoe) and check that the "
            "pipe fills at every joint; with the valve in, the pipe runs empty and the "
            f"loads, collapse checks and weights in this plan do not apply.{stage}")


def grout_lift_text(g) -> str:
    """The grouting verdict in words: one lift, not confirmable (unrated
    joints), or the lifts."""
    if g.full_column_ok and g.unrated:
        return (f"cannot confirm: {', '.join(g.unrated)} "
                f"{'has' if len(g.unrated) == 1 else 'have'} no collapse rating (unrated); "
                "the rated joints take the planned column in one lift")
    if g.full_column_ok:
        return "the planned column can be placed in one lift"
    return ""


def _float_name(f: Finding, system: str) -> str:
    return (f"{_valve(f)} with fill "
            f"{fmt(f.value('fill_density'), Kind.DENSITY, system)}")


def _q(f: Finding, name: str, system: str, digits=None) -> str:
    q = f.quantities[name]
    return fmt(q.value, q.kind, system, digits)


_WORDS = {
    PlanCode.OVER_LIMIT: lambda f, s: f"{f.get('limit')} over its limit {_over_place(f)}",
    PlanCode.OPEN_FAILS: lambda f, s: f"open-ended: {finding_text(f.cause, s)}",
    PlanCode.OPTION_FAILS: lambda f, s: (
        f"{'planned ' if f.get('planned') else ''}{closure_name(f.get('valve_joint'))} "
        f"(fill {_q(f, 'fill_density', s)}): {finding_text(f.cause, s)}"),
    PlanCode.SCREEN_ABOVE_VALVE: lambda f, s: (
        f"{_joint(f.joint, f.label)} is a screen above the check valve: hole fluid enters "
        f"through it, so the pipe cannot be floated; put the float collar on joint {f.joint} "
        f"or higher"),
    PlanCode.FIXED_CLOSURE: lambda f, s: (
        "the float equipment is already in the hole: no other position or stage is tried"),
    PlanCode.RUN_WITHOUT_VALVE: lambda f, s: (
        "the planned float equipment does not keep every limit, but the string lands "
        "open-ended: run it without the check valve"),
    PlanCode.LEAVE_VALVE_OUT: lambda f, s: _leave_valve_out(f),
    PlanCode.NO_LANDING_STRING: lambda f, s: "staged setting: the rig profile has no landing string",
    PlanCode.STAGED_FAILS: lambda f, s: f"staged setting: {finding_text(f.cause, s)}",
    PlanCode.LONGER_THAN_HOLE: lambda f, s: (
        f"the string ({_q(f, 'string_length', s)}) is longer than the hole "
        f"({_q(f, 'hole_depth', s)}) by more than {_q(f, 'tolerance', s, 3)}: it cannot be "
        "landed; check the tally and the plan"),
    PlanCode.UNRATED_LOADED: lambda f, s: (
        f"lands on the rated parts, but {f.get('count')} loaded "
        f"{'part is' if f.get('count') == 1 else 'parts are'} unrated"),
    PlanCode.UNRATED_PART: lambda f, s: (
        f"{_UNRATED_PART[f.get('part')]} {f.joint}" + (f" ({f.label})" if f.label else "")),
    PlanCode.UNRATED_COMPONENT: lambda f, s: f"{f.get('component')} on hoisting path {f.get('path')!r}",
    PlanCode.EMPTY_COLLAPSES: lambda f, s: (
        f"{_float_name(f, s)}: left empty the pipe would collapse by {_joint(f.joint, f.label)}"
        + (f"; never leave more than {_q(f, 'longest_empty', s, 1)} empty above the valve"
           if f.quantities['longest_empty'].known else "")),
    PlanCode.EMPTY_FLOATS: lambda f, s: (
        f"{_float_name(f, s)}: left empty the string floats (negative hook load) from "
        f"{_joint(f.joint, f.label)}: fill it or it will not go down"),
    PlanCode.EMPTY_TOO_LIGHT: lambda f, s: (
        f"{_float_name(f, s)}: left empty the string load falls below the minimum running "
        f"weight from {_joint(f.joint, f.label)}"),
    PlanCode.SET_DOWN_TOO_HEAVY: lambda f, s: (
        f"the set-down weight {_q(f, 'set_down', s)} buckles a screen or overstresses a joint "
        "below the neutral point: "
        + (f"set down at most {_q(f, 'max_set_down', s)}"
           if f.quantities['max_set_down'].known else "set down less")),
    PlanCode.STAGE1_BUCKLES_ON_BOTTOM: lambda f, s: (
        f"staged setting: released, stage 1 (joints 1-{f.joint}) stands on bottom with "
        f"{_q(f, 'load', s)} on its lowest joints, which buckles a screen or "
        "overstresses a joint; no set-down weight relieves it"),
    PlanCode.FILL_ALL_THE_WAY: lambda f, s: (
        f"{_float_name(f, s)}: fill every joint to the top all the way down; floating gains "
        "nothing here"),
    FloatCode.CARRIED_FILL_OVER: lambda f, s: f"the carried fill is over the {f.get('limit') or 'window'}",
    FloatCode.EMPTY_STRING_OVER: lambda f, s: (
        f"even empty (no fill at all) the string is over the {f.get('limit') or 'window'} "
        f"from step {f.step}" + (f" ({f.label} at the floor)" if f.label else "")
        + f", {_q(f, 'empty_load', s)} of string: too heavy for this hoisting path "
        "whatever the fill"),
    FloatCode.WINDOW_CLOSED: lambda f, s: (
        f"no fill level works at joint {f.step}: "
        f"{closing_words(f.get('empty_limit'), f.get('full_limit'))}"),
    StagingCode.SINGLE_JOINT: lambda f, s: "a single joint cannot be staged",
    StagingCode.NO_TENSILE_RATING: lambda f, s: "the landing string has no tensile rating",
    StagingCode.OVER_LIMIT: lambda f, s: f"{f.get('limit')} over its limit at the best split",
    GroutCode.LIGHTER_THAN_HOLE_FLUID: lambda f, s: (
        f"grout ({_q(f, 'grout_density', s)}) is lighter than the hole fluid it displaces "
        f"({_q(f, 'hole_fluid_density', s)}): it will not displace it from the annulus"),
    GroutCode.DESIGN_FACTOR_BELOW_1: lambda f, s: (
        f"collapse design factor {f.value('design_factor'):g} is below 1: the check allows "
        "loads above the rating"),
    GroutCode.UNRATED_JOINTS: lambda f, s: (
        f"no collapse rating for {f.get('labels')}: not checked while grouting (unrated)"),
    GroutCode.TOO_MANY_LIFTS: lambda f, s: (
        f"more than {f.get('lifts')} lifts would be needed to reach {_q(f, 'height', s)} "
        "above the shoe"),
    GroutCode.OVERLOADED_BEFORE_GROUT: lambda f, s: (
        f"{f.label} is already loaded beyond its collapse rating / DF by the hole fluid "
        f"against the inside fluid (utilization {f.value('utilization'):.3g}) before grout "
        f"is placed {_q(f, 'base', s)} above the shoe"),
    GroutCode.NO_LIFT_POSSIBLE: lambda f, s: (
        f"no grout can be placed on the lift starting {_q(f, 'base', s)} above the shoe: "
        f"{f.label} reaches its collapse rating / DF at once"),
    GroutCode.OVER_SCREENS: lambda f, s: (
        f"the planned grout column (top at {_q(f, 'grout_top', s, 1)}) reaches the screens "
        f"{f.get('labels')} ({_q(f, 'screen_top', s, 1)} to {_q(f, 'screen_bottom', s, 1)}): "
        "grout around a screen seals the intake; keep the grout top above the screens and "
        "their filter pack, or check the grout height and the screen depths"),
    GroutCode.NOT_FEASIBLE: lambda f, s: f"grouting plan not feasible: {finding_text(f.cause, s)}",
    JobCode.FILE_WARNING: lambda f, s: f.get("message"),
    JobCode.MEASURED_FAR_FROM_PLAN: lambda f, s: (
        f"{f.get('source')}: {f.label}: measured {_q(f, 'measured', s)} against "
        f"{_q(f, 'planned', s)} planned: check the tally"),
    JobCode.SCREEN_OFF_PLAN: lambda f, s: (
        f"{f.get('source')}: screen "
        f"{f.get('labels') if isinstance(f.get('labels'), str) else _span(f.get('labels'))} "
        + (f"lands {_signed(f.value('shift'), s)} from its planned depth, more than the "
           f"{_q(f, 'tolerance', s)} the plan allows"
           if f.value('shift') == f.value('shift') else "is set aside entirely")
        + ": check the tally and the screen placement before going on"),
    JobCode.LONGER_THAN_HOLE: lambda f, s: (
        f"{f.get('source')}: the string as measured ({_q(f, 'string_length', s)}) is longer "
        f"than the hole ({_q(f, 'hole_depth', s)}) by more than {_q(f, 'tolerance', s, 3)}"),
    JobCode.AT_HOLE_BOTTOM: lambda f, s: (
        f"{f.get('source')}: the string as measured ({_q(f, 'string_length', s)}) is as long "
        f"as the hole ({_q(f, 'hole_depth', s)}, within {_q(f, 'tolerance', s, 3)}): the shoe "
        "lands on bottom with no room below it for fill or cuttings; check the tally and "
        "the hole depth"),
}

#: Every finding code worded here (a test checks none is missing).
WORDED_CODES = frozenset(_WORDS)


def finding_text(f: Finding | None, system: str) -> str:
    """One finding in words, its quantities in ``system``."""
    if f is None:
        return ""
    return _WORDS[f.code](f, system)


def finding_lines(findings, system: str, unrated=()) -> list[tuple[str, str]]:
    """``(code, text)`` per line for a list of findings.

    Float options failing for the same reason at the same position are one
    line listing their fill fluids; the unrated-parts reason lists the first
    of ``unrated``.
    """
    lines: dict = {}
    for f in findings:
        if f.code == PlanCode.OPTION_FAILS:
            key = (f.code, f.get("planned"), f.get("valve_joint"), finding_text(f.cause, system))
            if key in lines:
                lines[key][2].append(_q(f, "fill_density", system))
                continue
            lines[key] = [f.code, None, [_q(f, "fill_density", system)], f]
            continue
        text = finding_text(f, system)
        if f.code == PlanCode.UNRATED_LOADED and unrated:
            text = ("lands on the rated parts, but some loaded parts are unrated: "
                    + "; ".join(finding_text(u, system) for u in unrated[:5])
                    + (" ..." if len(unrated) > 5 else ""))
        lines.setdefault((f.code, text), [f.code, text, None, f])
    out = []
    for code, text, fluids, f in lines.values():
        if text is None:
            text = (f"{'planned ' if f.get('planned') else ''}"
                    f"{closure_name(f.get('valve_joint'))} (fill {', '.join(fluids)}): "
                    f"{finding_text(f.cause, system)}")
        out.append((str(code), text))
    return out


def finding_code(f) -> str | None:
    return None if f is None else str(f.code)


# ---------------------------------------------------------------------------
# the plan in lines

def verdict_text(lp) -> str:
    return str(lp.verdict).upper()


def governing_text(lp, system: str) -> str:
    """The governing limit, its load against its capacity and its margin."""
    g = lp.governing
    if g is None:
        return "Governing limit: none found"
    head = f"Governing limit: {g.name} at {limit_place(g)}"
    if not (math.isfinite(g.load) and math.isfinite(g.capacity)):
        return f"{head}, margin {percent(g.margin)}"
    return (f"{head}: load {fmt(g.load, g.kind, system)} against "
            f"{fmt(g.capacity, g.kind, system)}, margin {percent(g.margin)}")


def path_text(lp, system: str) -> str:
    """The hoisting path in use, what governs it and what it allows."""
    p = lp.path
    case = f" ({p.governing_case})" if p.governing_case is not None else ""
    from rigplan.engine.hoisting import ChainFigure as F
    return (f"Hoisting path: {p.path}, governed by {p.governing or 'nothing rated'}{case}: "
            f"{F.STRING_LIMIT} {fmt(p.string_limit, Kind.FORCE, system)} + {F.DEAD_LOAD} "
            f"{fmt(lp.dead_load, Kind.FORCE, system)} = {F.HOOK_LIMIT} "
            f"{fmt(p.hook_limit, Kind.FORCE, system)}")


#: Buckling modes of :mod:`rigplan.engine.buckling`, in words.
BUCKLING_MODES = ("straight", "sinusoidal", "helical")


def set_down_text(lp, system: str) -> str:
    """The landed string below the neutral point with the set-down weight:
    the length in compression, where it buckles, the worst combined stress
    and the most that may be set down ("" when nothing is set down)."""
    b = lp.buckling
    if b is None:
        return ""
    words = [f"Set down {fmt(lp.settings.set_down_weight, Kind.FORCE, system)}: "
             f"{fmt(b.compressed_length, Kind.LENGTH, system, 1)} in effective compression "
             f"above the shoe"]
    if not b.buckles:
        words.append("it stays straight (below the critical buckling load)")
    else:
        words.append(f"it buckles over the lowest {fmt(b.sinusoidal_length, Kind.LENGTH, system, 1)}"
                     + (f", helically over {fmt(b.helical_length, Kind.LENGTH, system, 1)}"
                        if b.helical_length > 0 else ""))
    util = b.stress_utilization
    if any(u == u for u in util):
        import numpy as np
        j = int(np.nanargmax(util))
        words.append(f"worst combined stress at {_joint(j + 1, lp.joints.label[j])}: axial "
                     f"{fmt(b.axial_stress[j], Kind.STRESS, system)} + bending "
                     f"{fmt(b.bending_stress[j], Kind.STRESS, system)}, utilization "
                     f"{percent(util[j])} (design factor {b.design_factor:g})")
    if b.max_set_down == b.max_set_down:
        words.append(f"at most {fmt(b.max_set_down, Kind.FORCE, system)} keeps the screens "
                     "straight and the stress within its limit")
    return "; ".join(words)


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
        return (f"Float equipment: {closure_name(lp.chosen.closure, lp.joints.label)}, "
                "no fill plan that lands")
    chosen = fmt(bf.fill_density, Kind.DENSITY, system)
    extra = ""
    if abs(bf.fill_density - lp.settings.fill_density) > 1e-9:
        extra = (f" (the best of the fill fluids offered; the job's own fill fluid, "
                 f"{fmt(lp.settings.fill_density, Kind.DENSITY, system)}, gives a poorer plan)")
    return f"Float equipment: {closure_name(bf.closure, lp.joints.label)}; fill with {chosen}{extra}"


def fill_parts(lp, system: str) -> list[str]:
    """The fill schedule of the chosen float option, one part per instruction."""
    bf = lp.best_float
    if bf is None:
        return []
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
        parts.append(f"add {fmt(t.volume, Kind.VOLUME, system)} with {joint_name(lp, t.joint)} "
                     f"at the floor")
    return parts


def fill_plan_text(lp, system: str) -> str:
    """The whole fill schedule in one line."""
    parts = fill_parts(lp, system)
    return "Fill plan: " + "; ".join(parts) if parts else ""


def unrated_text(lp, system: str, first: int = 3) -> str:
    """The first unrated parts, ``...`` when there are more."""
    words = [finding_text(u, system) for u in lp.unrated[:first]]
    return "; ".join(words) + (" ..." if len(lp.unrated) > first else "")


def next_action(lp, system: str = "si") -> str:
    """The crew's next instruction in words (from the chosen plan)."""
    if lp.verdict == Verdict.LANDS_OPEN:
        return "run open-ended: the hole fluid fills the pipe through the shoe"
    if lp.verdict == Verdict.LANDS_STAGED and lp.stages is not None:
        s = lp.stages
        hold = (", hold it there until its grout has set" if
                lp.settings.stage1_release == "after_grout" else "")
        return (f"run joints 1-{s.split} on the landing string to its top at "
                f"{fmt(s.release_depth, Kind.DEPTH, system, 1)}{hold}, release it, then run "
                "the rest")
    if lp.verdict == Verdict.CANNOT_CONFIRM:
        return f"enter the maker's ratings ({unrated_text(lp, system)}), then check again"
    opt = lp.best_float
    if opt is None:
        return "no plan lands this string: see the reasons"
    return f"{closure_name(opt.closure, lp.joints.label)}: " + "; ".join(fill_parts(lp, system))


def step_actions(lp, system: str = "si") -> list:
    """What the crew does at each running step, in words (from the plan)."""
    n = lp.joints.n
    acts = [""] * n
    if lp.verdict == Verdict.LANDS_STAGED and lp.stages is not None:
        p = lp.stages.split
        acts[p - 1] = "make up the landing string, lower and release stage 1"
        if p < n:
            acts[p] = "stage 2: first joint"
        return acts
    opt = lp.best_float
    if opt is None or lp.chosen.closure.is_open:
        return acts
    m = opt.closure.valve_joint or 0
    sch = opt.schedule
    for k in range(n):
        if k < m:
            acts[k] = "shoe track: fills from the hole"
        elif k < sch.fill_to_top_through:
            acts[k] = "fill to the top"
        elif k == sch.fill_to_top_through:
            acts[k] = "stop filling"
    if m == 0 or m < n:
        acts[m] = (f"first above the {closure_name(m, lp.joints.label)}; " if m else "") + acts[m]
    for t in sch.top_ups:
        acts[t.joint - 1] = f"top up {fmt(t.volume, Kind.VOLUME, system, 0)}"
    return acts


def fill_instruction(lp, step: int, system: str) -> str:
    """What the crew does with the next joint (step + 1 in the running order)."""
    n = lp.joints.n
    if step >= n:
        return f"All {n} joints are in the hole: land the string"
    s = step + 1
    here = joint_name(lp, s)
    if lp.verdict == Verdict.CANNOT_LAND:
        lines = finding_lines(lp.reasons, system, lp.unrated)
        why = lines[0][1] if lines else "see the reasons on the Overview"
        return f"Do not run: the string cannot land with this rig ({why})"
    if lp.verdict == Verdict.LANDS_STAGED and lp.stages is not None:
        st = lp.stages
        if s <= st.split:
            return (f"Stage 1: run {here}; after {joint_name(lp, st.split)} make up the landing "
                    f"string and set stage 1 at {fmt(st.release_depth, Kind.DEPTH, system)}")
        return f"Stage 2: run {here}"
    bf = lp.best_float
    if bf is None:
        if lp.chosen.closure.is_open:
            return f"Run {here}: open shoe, it fills from the hole; no filling"
        return f"Run {here}: no fill schedule for {closure_name(lp.chosen.closure, lp.joints.label)}"
    m = bf.closure.valve_joint or 0
    if s <= m:
        return (f"Run {here}: below the {closure_name(bf.closure, lp.joints.label)}, it fills "
                "from the hole")
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
            return (f"Fill {fmt(u.volume, Kind.VOLUME, system)} with {here} at the floor "
                    f"(fill level then {fmt(u.level_after, Kind.DEPTH, system)} below the floor)")
        return (f"Run {here} without filling; next: fill {fmt(u.volume, Kind.VOLUME, system)} "
                f"with {joint_name(lp, u.joint)} at the floor")
    return f"Run {here} without filling: no more fill to landing"


def reason_lines(lp, system: str, unrated_shown: int = 8) -> list[str]:
    """The reasons, the crew notes and the first unrated parts, one per line."""
    lines = [t for _, t in finding_lines(lp.reasons, system, lp.unrated)]
    lines += [f"note: {t}" for _, t in finding_lines(lp.notes, system)]
    lines += [f"unrated: {finding_text(u, system)}" for u in lp.unrated[:unrated_shown]]
    if len(lp.unrated) > unrated_shown:
        lines.append(f"... and {len(lp.unrated) - unrated_shown} more unrated parts")
    return lines


def cautions(lp=None) -> tuple:
    """The cautions every output carries."""
    return (CAUTION,)


def cautions_text(lp=None) -> str:
    return "  ".join(cautions(lp))


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
    ("tension_util", "Tension", None, False),
    ("collapse_util", "Collapse", None, False),
    ("od", "OD", "diameter", True),
    ("wall", "Wall", "diameter", True),
    ("material", "Material", None, True),
    ("connection", "Connection", None, True),
)


def column_title(title: str, kind, system: str) -> str:
    if kind is None:
        return title
    return f"{title} [{unit(kind, system)}]"


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
            t_util = percent(lp.chosen.tension_utilization[k], missing="unrated")
            c_util = percent(lp.chosen.collapse_utilization[k], missing="unrated")
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
            "measured_length": ("planned" if session.length_basis(spec.label) == "planned"
                                else "" if spec.measured_length is None
                                else number(spec.measured_length, "length", sys_)),
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
    return plain(value, kind, session.units, 4)


#: Running table columns: (key, title, kind or None).
RUN_COLUMNS = (
    ("step", "Step", None),
    ("label", "Joint", None),
    ("status", "Status", None),
    ("length", "Length", "length"),
    ("shoe", "Shoe at", "length"),
    ("hook", "Hook", "force"),
    ("fill", "Fill", None),
)

#: The columns a narrow screen keeps first, most important first (the
#: others follow as the width allows).
RUN_PRIORITY = ("label", "status", "hook", "length", "fill", "shoe", "step")
TALLY_PRIORITY = ("label", "status", "measured_length", "length", "tension_util",
                  "collapse_util", "top_depth", "max_tension", "kind", "od", "wall",
                  "material", "connection", "seq")

#: Longest status text in a grid cell (a set-aside reason is cut with "...";
#: the whole reason is in the run log and the tally export).
STATUS_WIDTH = 24


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
            hook = number(loads[k], "force", sys_)
            fill = fill_marker(lp, k + 1)
        else:
            shoe = hook = fill = ""
        rows.append((spec.label, {
            "step": step, "label": spec.label,
            "status": _cut(joint_status(session, spec, reason=True), STATUS_WIDTH),
            "length": length_cell(session, spec),
            "shoe": shoe, "hook": hook, "fill": fill,
        }))
    return rows


def _cut(text: str, width: int) -> str:
    return text if len(text) <= width else text[: width - 3] + "..."


def length_basis(session, spec) -> str:
    """``measured`` (taped on site, by the run log or a tally), ``planned``
    (run on the planned length, nothing measured) or ``plan`` (not run yet,
    no tally length)."""
    basis = session.length_basis(spec.label)
    if basis is not None:
        return basis
    return "measured" if spec.measured_length is not None else "plan"


def length_cell(session, spec) -> str:
    """A joint's length with how it is known: ``20.08 measured``, ``20.00
    planned`` (in the hole, not measured) or ``20.00 plan`` (not run)."""
    return f"{number(spec.run_length, 'length', session.units)} {length_basis(session, spec)}"


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
    lines.append(f"Next: {fill_instruction(lp, k, sys_)}")
    lines.append(f"Joints in the hole: {k} of {n}" +
                 (f"   next: {nxt.label}" if nxt is not None else "   all in"))
    shoe = float(lp.chosen.loads.shoe_depth[k - 1]) if k >= 1 else 0.0
    lines.append(f"Shoe depth: {fmt(shoe, 'length', sys_)}")
    loads = session.step_hook_loads()
    lines.append(f"Hook load now (planned): {fmt(session.predicted_hook_load(), 'force', sys_)}")
    if k < n:
        lines.append(f"After the next joint: {fmt(loads[k], 'force', sys_)}")
    lines.append(f"Hook limit ({lp.path.path}): {fmt(lp.path.hook_limit, 'force', sys_)}")
    if k >= 1:
        lines.append(f"Capacity margin now: {percent(lp.chosen.capacity_margin[k - 1])}")
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


def alarm_line(check, system: str) -> str:
    """One line for a reading outside its band (the app's alarm bar)."""
    side = "LIGHTER" if check.difference < 0 else "HEAVIER"
    return (f"ALARM {side}: read {fmt(check.observed, 'force', system)}, planned "
            f"{fmt(check.predicted, 'force', system)}, step {check.step} (a: acknowledge)")


def rig_chains(session) -> list:
    """Per hoisting path: ``(chain, in use)``, the chain from
    :func:`rigplan.engine.hoisting.rig_capacity` (shown with
    :func:`rigplan.present.report.chain_table`)."""
    from rigplan.engine.hoisting import rig_capacity
    lp = session.landing
    in_use = lp.path.path if lp is not None else session.path_name
    return [(cap, cap.path == in_use) for cap in rig_capacity(session.rig)]


# ---------------------------------------------------------------------------
# where it lands

_LANDING_ITEM = {"shoe": "Shoe", "float collar": "Float collar", "screen": "Screen"}


def _span(labels) -> str:
    return labels[0] if len(labels) == 1 else f"{labels[0]}-{labels[-1]}"


def _signed(value, system: str) -> str:
    if value != value:
        return "n/a"
    text = fmt(abs(value), Kind.DEPTH, system, 2)
    return ("+" if value > 0 else "-" if value < 0 else "") + text


def landing_lines(picture, system: str) -> list:
    """The landing picture in words, one line per item: as-run depth, the
    planned one and the shift; the shoe against TD; a WARNING line for each
    screen interval that moved more than the plan's tolerance."""
    td = picture.hole_depth
    lines = [f"Where it lands (as run; TD {fmt(td, Kind.DEPTH, system, 2)}):"]
    for r in picture.rows:
        if r.item == "screen":
            name = f"Screen {_span(r.labels)}"
            here = (f"{fmt(r.top, Kind.DEPTH, system, 2)} to {fmt(r.bottom, Kind.DEPTH, system, 2)}"
                    if r.bottom == r.bottom else "set aside")
            plan = (f"{fmt(r.planned_top, Kind.DEPTH, system, 2)} to "
                    f"{fmt(r.planned_bottom, Kind.DEPTH, system, 2)}")
        else:
            name = ("Shoe" if r.item == "shoe"
                    else f"Float collar (top of {r.labels[0]})")
            here = fmt(r.bottom, Kind.DEPTH, system, 2)
            plan = fmt(r.planned_bottom, Kind.DEPTH, system, 2)
        line = f"  {name}: {here}; planned {plan}; shift {_signed(r.shift, system)}"
        if r.item == "shoe" and picture.shoe_off_bottom == picture.shoe_off_bottom:
            off = picture.shoe_off_bottom
            line += (f"; {fmt(off, Kind.DEPTH, system, 2)} off bottom" if off >= 0 else
                     f"; {fmt(-off, Kind.DEPTH, system, 2)} LONGER THAN THE HOLE")
        lines.append(line)
    for r in picture.moved:
        lines.append(f"WARNING: screen {_span(r.labels)} lands "
                     f"{_signed(r.shift, system)} from its planned depth, more than the "
                     f"{fmt(picture.tolerance, Kind.DEPTH, system, 2)} the plan allows: "
                     "check the tally and the screen placement before going on")
    return lines


# ---------------------------------------------------------------------------
# a settings change mid-run


def change_lines(before, after, step: int, system: str) -> list:
    """What a settings change mid-run changes for the crew, before it takes
    effect: the verdict, the next instruction and the planned hook load now
    and after the next joint.  ``before`` / ``after``: landing plans (before
    may be None); ``step``: joints in the hole (they keep what they hold)."""
    lines = [f"{step} joints are in the hole: they keep the fluid they hold; the change "
             f"applies to the joints not yet run."]
    if after is None:
        return lines + ["No plan with this change."]
    old_v = before.verdict.value if before is not None else "no plan"
    new_v = after.verdict.value
    lines.append(f"Verdict: {old_v}" + (f" -> {new_v}" if new_v != old_v else " (unchanged)"))
    new_next = fill_instruction(after, step, system)
    old_next = fill_instruction(before, step, system) if before is not None else ""
    lines.append(f"Next: {new_next}" + ("" if new_next != old_next else " (unchanged)"))
    n = after.joints.n
    for label, k in (("Hook load now", step), ("after the next joint", step + 1)):
        if 1 <= k <= n:
            new = float(after.hook_load[k - 1])
            old = (float(before.hook_load[k - 1])
                   if before is not None and k <= before.joints.n else None)
            lines.append(f"{label}: {fmt(old, Kind.FORCE, system)} -> "
                         f"{fmt(new, Kind.FORCE, system)}")
    return lines
