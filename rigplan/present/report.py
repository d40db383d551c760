"""Plan results as JSON (SI base units) and as text tables (rich).

Front-end layer: turns a :class:`rigplan.engine.planner.LandingPlan` into the
``rigplan check`` outputs and the printed job plan.  No physics here: every
number comes from the planner.
"""

from __future__ import annotations

import math

import numpy as np

from rigplan.engine.findings import Kind, Verdict
from rigplan.engine.grouting import GroutCode
from rigplan.engine.planner import PlanCode
from rigplan.present import wording as W
from rigplan.present.wording import CAUTION, closure_name, percent

JSON_UNITS = "SI base units: m, N, Pa, kg/m3, m3; margins and utilizations are fractions"


def _f(x):
    """JSON-safe float: nan/inf -> None."""
    if x is None:
        return None
    x = float(x)
    return x if math.isfinite(x) else None


def _col(values) -> list:
    """A numpy column as a JSON-ready list: floats, None where not finite."""
    a = np.asarray(values, dtype=float)
    out = a.tolist()
    bad = ~np.isfinite(a)
    if bad.any():
        for i in np.flatnonzero(bad).tolist():
            out[i] = None
    return out


def _records(**columns) -> list:
    """One dict per row from equal-length columns (lists or numpy arrays)."""
    keys = list(columns)
    return [dict(zip(keys, row)) for row in zip(*columns.values())]


def _texts_and_codes(findings, unrated=()):
    lines = W.finding_lines(findings, "si", unrated)
    return [t for _, t in lines], [c for c, _ in lines]


def plan_dict(landing, plan=None, warnings=(), rig_name: str = "") -> dict:
    """One JSON object for a plan, all values SI (see README, JSON keys).

    Every list of findings (``reasons``, ``notes``, ``warnings``,
    ``unrated``) has its codes beside it (``reason_codes``...), one per line.
    """
    j = landing.joints
    chk = landing.chosen
    loads = chk.loads
    n = j.n
    hook_limit = landing.path.hook_limit
    hook = landing.hook_load
    fill_level = loads.fill_level if not chk.closure.is_open else np.full(n, np.nan)
    number = list(range(1, n + 1))
    steps = _records(
        joint=number, label=j.label, shoe_depth=_col(loads.shoe_depth), hook_load=_col(hook),
        string_load=_col(loads.string_load), hook_limit=[_f(hook_limit)] * n,
        margin=_col(chk.capacity_margin), fill_level=_col(fill_level))
    shoe = loads.shoe_depth[-1]
    top_depth = shoe - np.cumsum(j.length)
    landed = landing.landed
    reasons, reason_codes = _texts_and_codes(landing.reasons, landing.unrated)
    notes, note_codes = _texts_and_codes(landing.notes)
    warns, warning_codes = _texts_and_codes(warnings)
    unrated, unrated_codes = _texts_and_codes(landing.unrated)
    tcap = np.where(np.isnan(j.connection_rating) | np.isnan(j.body_rating), np.nan,
                    np.fmin(j.connection_rating, j.body_rating))
    flags = {}
    for f in j.findings:
        flags.setdefault(f.joint, []).append(str(f.code))
    connections = _records(
        joint=number, label=j.label, depth=_col(top_depth),
        max_true_tension=_col(loads.envelope_max),
        step=np.asarray(loads.envelope_step, dtype=int).tolist(),
        min_true_force=_col(loads.envelope_min), capacity=_col(tcap),
        connection_rating=_col(j.connection_rating), body_rating=_col(j.body_rating),
        utilization=_col(chk.tension_utilization),
        landed_true_force=_col(landed.true_force_top),
        landed_effective_tension=_col(landed.effective_top))
    joints = _records(
        joint=number, label=j.label, kind=j.kind, length=_col(j.length), od=_col(j.od),
        bore=_col(j.bore), weight=_col(j.weight), collapse_rating=_col(j.collapse_rating),
        collapse_rating_under_load=_col(j.collapse_rating if chk.collapse_rating is None
                                        else chk.collapse_rating),
        collapse_method=list(j.collapse_method) if j.collapse_method else [""] * n,
        max_collapse_load=_col(loads.collapse_max),
        collapse_utilization=_col(chk.collapse_utilization),
        burst_rating=_col(j.burst_rating), max_burst_load=_col(loads.burst_max),
        burst_utilization=_col(chk.burst_utilization),
        rating_basis=[_rating_basis(j, i) for i in range(n)],
        rating_flags=[flags.get(i + 1, []) for i in range(n)])
    gov = landing.governing
    out = {
        "verdict": str(landing.verdict),
        "lands": landing.lands,
        "governing": None if gov is None else {
            "name": str(gov.name), "where": W.limit_place(gov), "load": _f(gov.load),
            "capacity": _f(gov.capacity), "margin": _f(gov.margin),
            "kind": str(gov.kind), "joint": gov.joint, "step": gov.step,
            "first_step_over": gov.first_step},
        "units": JSON_UNITS,
        "plan": None if plan is None else {
            "name": plan.name, "well": plan.well, "site": plan.site,
            "hole_fluid_density": _f(plan.hole.fluid_density),
            "hole_fluid_level": _f(plan.hole.fluid_level), "hole_depth": _f(plan.hole.depth)},
        "rig": {"name": rig_name, **chain_dict(landing.path)},
        "closure": closure_name(chk.closure, landing.joints.label),
        "switch_joint": landing.switch_joint,
        "next_action": W.next_action(landing, "si"),
        "steps": steps,
        "connections": connections,
        "joints": joints,
        "neutral_point": _f(landing.neutral_point),
        "buckling": buckling_dict(landing),
        "fill_window": None, "fill_schedule": None, "float_options": [],
        "stages": None, "grouting": None,
        "unrated": unrated, "unrated_codes": unrated_codes,
        "reasons": reasons, "reason_codes": reason_codes,
        "notes": notes, "note_codes": note_codes,
        "warnings": warns, "warning_codes": warning_codes,
        "cautions": list(W.cautions(landing)),
    }
    opt = landing.best_float
    if opt is not None:
        w = opt.window
        carried = np.concatenate(([0.0], opt.schedule.fill_volume[:-1]))
        add_lo = np.maximum(w.min_volume - carried, 0.0)
        add_hi = w.max_volume - carried
        out["fill_window"] = _records(
            volume_to_add_min=_col(add_lo), volume_to_add_max=_col(add_hi),
            joint=np.asarray(w.joint, dtype=int).tolist(),
            min_fill_level=_col(w.min_fill_level), max_fill_level=_col(w.max_fill_level),
            min_volume=_col(w.min_volume), max_volume=_col(w.max_volume),
            closing_limit=[str(x) for x in w.closing_limit],
            empty_limit=[str(x) for x in w.empty_limit],
            full_limit=[str(x) for x in w.full_limit],
            feasible=np.asarray(w.feasible, dtype=bool).tolist())
        s = opt.schedule
        out["fill_schedule"] = {
            "closure": closure_name(opt.closure, landing.joints.label), "valve_joint": opt.closure.valve_joint,
            "fill_density": _f(opt.fill_density),
            "fill_to_top_through": s.fill_to_top_through,
            "top_ups": [{"joint": t.joint, "before_joint": t.before_joint or None,
                         "volume": _f(t.volume),
                         "level_after": _f(t.level_after)} for t in s.top_ups],
            "lowered_below_window": list(s.lowered_below_window),
            "least_margin": _f(s.least_margin), "least_margin_step": s.least_margin_step,
            "final_fill_volume": _f(s.added_volume),
            "steps": _records(joint=number, fill_level=_col(s.fill_level),
                              fill_volume=_col(s.fill_volume),
                              hook_load=_col(s.string_load + landing.dead_load),
                              capacity_margin=_col(s.capacity_margin),
                              collapse_utilization=_col(s.collapse_utilization)),
        }
    for o in landing.float_options:
        out["float_options"].append({
            "closure": closure_name(o.closure, landing.joints.label), "valve_joint": o.closure.valve_joint,
            "fill_density": _f(o.fill_density), "lands": o.lands,
            "top_ups": len(o.schedule.top_ups) if o.schedule else None,
            "fill_to_top_through": o.schedule.fill_to_top_through if o.schedule else None,
            "least_margin": _f(o.schedule.least_margin)
            if o.schedule and o.schedule.feasible else None,
            "reason": W.finding_text(o.reason, "si"), "reason_code": W.finding_code(o.reason)})
    st = landing.stages
    if st is not None:
        out["stages"] = stages_dict(st)
        if _staged(landing):
            out["steps"] = staged_steps_dict(landing)
    g = landing.grouting
    if g is not None:
        out["grouting"] = grouting_dict(g)
    return out


def _staged(landing) -> bool:
    """The chosen plan is the staged one (its step table has the lowering)."""
    return bool(getattr(landing, "staged", False)) and landing.stages.steps is not None


def stages_dict(st) -> dict:
    """The staged setting, SI: each figure as a string load (dead load left
    out) and as a hook load (dead load included)."""
    return {
        "split": st.split, "release_depth": _f(st.release_depth),
        "shoe_depth": _f(st.shoe_depth), "dead_load": _f(st.dead_load),
        "stage1_at_floor_peak_string_load": _f(st.stage1_peak_string_load),
        "stage1_at_floor_peak_hook_load": _f(st.stage1_peak_hook_load),
        "release_string_load": _f(st.release_string_load),
        "release_hook_load": _f(st.release_hook_load),
        "lowering_peak_string_load": _f(st.lowering_peak_string_load),
        "lowering_peak_hook_load": _f(st.lowering_peak_hook_load),
        "landing_string_top_tension": _f(st.landing_string_tension),
        "stage2_peak_string_load": _f(st.stage2_peak_string_load),
        "stage2_peak_hook_load": _f(st.stage2_peak_hook_load),
        "checks": [{"name": str(c.name), "row": c.row, "load": _f(c.load),
                    "capacity": _f(c.capacity), "margin": _f(c.margin), "kind": c.kind}
                   for c in st.checks],
        "least_margin": _f(st.least_margin),
        "governing": None if st.governing is None else str(st.governing),
        "feasible": st.feasible, "reason": W.finding_text(st.reason, "si"),
        "reason_code": W.finding_code(st.reason),
        "stage1_neutral_point": _f(st.stage1_neutral_point),
        "stage2_neutral_point": _f(st.stage2_neutral_point),
    }


def staged_steps_dict(landing) -> list:
    """Per-step rows of a staged plan in running order, the lowering on the
    landing string included (``phase``: stage 1, lowering, stage 2)."""
    st = landing.stages.steps
    label = landing.joints.label
    hook_limit = landing.path.hook_limit
    return [{
        "joint": int(st.joint[r]), "label": label[int(st.joint[r]) - 1],
        "phase": str(st.phase[r]),
        "landing_string_length": _f(st.landing_string_length[r]),
        "bottom_depth": _f(st.bottom_depth[r]), "shoe_depth": _f(st.shoe_depth[r]),
        "hook_load": _f(st.hook_load[r]), "string_load": _f(st.string_load[r]),
        "hook_limit": _f(hook_limit), "margin": _f(st.margin[r]), "fill_level": None,
    } for r in range(st.n)]


def buckling_dict(landing) -> dict | None:
    """JSON view of the buckling check below the neutral point (None when
    nothing is set down); per joint only those in effective compression."""
    b = landing.buckling
    if b is None:
        return None
    j = landing.joints
    rows = [{"joint": i + 1, "label": j.label[i], "mode": W.BUCKLING_MODES[int(b.mode[i])],
             "compression": _f(b.compression[i]), "sinusoidal_load": _f(b.sinusoidal_load[i]),
             "helical_load": _f(b.helical_load[i]), "clearance": _f(b.clearance[i]),
             "axial_stress": _f(b.axial_stress[i]), "bending_stress": _f(b.bending_stress[i]),
             "stress_utilization": _f(b.stress_utilization[i])}
            for i in range(len(b.compression)) if b.compression[i] > 0]
    return {"set_down": _f(landing.settings.set_down_weight),
            "compressed_length": _f(b.compressed_length),
            "sinusoidal_length": _f(b.sinusoidal_length),
            "helical_length": _f(b.helical_length), "max_set_down": _f(b.max_set_down),
            "design_factor": _f(b.design_factor), "joints": rows}


def chain_dict(chain) -> dict:
    """JSON view of a hoisting chain (:class:`rigplan.engine.hoisting.HoistChain`):
    every figure under the key of its :class:`~rigplan.engine.hoisting.ChainFigure`."""
    from rigplan.engine.hoisting import ChainFigure as F
    return {
        "path": chain.path, F.STRING_LIMIT.key: _f(chain.string_limit),
        F.HOOK_LIMIT.key: _f(chain.hook_limit), F.DEAD_LOAD.key: _f(chain.dead_load),
        "governing_component": chain.governing,
        "governing_case": None if chain.governing_case is None else str(chain.governing_case),
        "lines": chain.lines, "sheave_factor": _f(chain.sheave_factor),
        "block_efficiency": _f(chain.block_efficiency),
        "cases": [{"case": str(c.code), "factor": _f(c.factor), "allowance": _f(c.allowance),
                   "source": c.source} for c in chain.cases],
        "components": [{"name": p.name, "kind": p.kind, "basis": p.basis,
                        **{f.key: _f(getattr(p, f.key)) for f in F
                           if f not in (F.HOOK_LIMIT, F.DEAD_LOAD)},
                        "governing_case": str(p.governing_case)} for p in chain.parts],
        "unrated_components": list(chain.unrated_on_path),
        "parts_not_on_path": [c for c in chain.unrated if c not in chain.unrated_on_path],
    }


def chain_table(chain, system: str, title: str = ""):
    """The hoisting chain as a rich table: each part's rating, at the hook,
    the gear counted, both load cases and the string limit, with the cases'
    sources and the hook limit in the caption."""
    from rich.table import Table
    from rich.text import Text
    from rigplan.engine.hoisting import ChainFigure as F, LoadCaseCode
    unit = W.unit("force", system)
    t = Table(title=Text(title or f"Hoisting chain: {chain.path}", style="bold"),
              title_justify="left", expand=False)
    t.add_column(Text(f"[{unit}]"), no_wrap=True)

    def n(v):
        return _q(v, "force", system, 0).removesuffix(" " + unit)

    for p in chain.parts:
        t.add_column(p.name + (f"\ngoverns ({p.governing_case})" if p.name == chain.governing
                               else ""), justify="right",
                     style="bold" if p.name == chain.governing else None)
    for u in chain.unrated:
        t.add_column(f"{u}\nunrated, not counted", justify="right")
    blank = [""] * len(chain.unrated)
    t.add_row("basis", *(p.basis for p in chain.parts), *blank)
    for fig in (F.RATING, F.TO_HOOK, F.RATED_AT_HOOK, F.GEAR_COUNTED, F.SHOCK_LIMIT,
                F.OVERPULL_LIMIT, F.STRING_LIMIT):
        cells = [f"{getattr(p, fig.key):.3f}" if fig == F.TO_HOOK else n(getattr(p, fig.key))
                 for p in chain.parts]
        t.add_row(str(fig), *cells, *blank)
    cases = {c.code: c for c in chain.cases}
    words = []
    if LoadCaseCode.SHOCK in cases:
        c = cases[LoadCaseCode.SHOCK]
        words.append(f"shock: {c.factor:g} x (string + gear counted) <= rated at hook "
                     f"({c.source})")
    if LoadCaseCode.OVERPULL in cases:
        c = cases[LoadCaseCode.OVERPULL]
        words.append(f"overpull: string + gear counted + {_q(c.allowance, 'force', system, 0)} "
                     f"<= rated at hook ({c.source})")
    words.append(f"{chain.lines} line(s), block efficiency {chain.block_efficiency:.3f} "
                 f"(sheave factor {chain.sheave_factor:g}, API RP 9B)")
    words.append(f"{F.STRING_LIMIT} {_q(chain.string_limit, 'force', system, 0)} + "
                 f"{F.DEAD_LOAD} {_q(chain.dead_load, 'force', system, 0)} = "
                 f"{F.HOOK_LIMIT} {_q(chain.hook_limit, 'force', system, 0)}")
    t.caption = Text("; ".join(words))
    t.caption_justify = "left"
    return t


def grouting_dict(g) -> dict:
    """JSON view of a grouting plan (:class:`rigplan.engine.grouting.GroutPlan`)."""
    warns, codes = _texts_and_codes(g.warnings)
    return {
        "full_column_ok": g.full_column_ok, "max_single_lift": _f(g.max_single_lift),
        "feasible": g.feasible, "reason": W.finding_text(g.reason, "si"),
        "reason_code": W.finding_code(g.reason), "n_lifts": g.n_lifts,
        "lifts": [{"base_height": _f(a), "top_height": _f(b)} for a, b in g.lifts],
        "utilization": [_f(u) for u in np.asarray(g.utilization, dtype=float)],
        "warnings": warns, "warning_codes": codes, "unrated": list(g.unrated),
    }


# ---------------------------------------------------------------------------
# text

def _rating_basis(j, i) -> dict:
    """What joint ``i``'s collapse, burst and tension ratings rest on."""
    def pick(basis):
        return basis[i] if basis else None
    return {"collapse": pick(j.collapse_basis), "burst": pick(j.burst_basis),
            "tension": pick(j.tension_basis)}


#: Short labels of the rating bases for the per-joint table.
_BASIS_LABEL = {"specified wall": "specified", "minimum wall": "minimum", "measured wall": "measured",
                "maker's figure": "maker", "unrated": "-"}


def _rating_flag_lines(joints, system) -> list:
    """One line per rating finding (measured wall, ellipticity, temperature)."""
    out = []
    for f in joints.findings:
        q = f.quantities
        if "measured_wall" in q:
            what = (f"measured wall {_q(f.value('measured_wall'), 'diameter', system, 3)} is under "
                    f"the standard's minimum {_q(f.value('minimum_wall'), 'diameter', system, 3)}: "
                    "rated on the measured wall")
        elif "ellipticity" in q:
            what = (f"measured ellipticity {100 * f.value('ellipticity'):.2f} % is above the "
                    f"{100 * f.value('assumed_ellipticity'):.2f} % the plan assumed: rated at the "
                    "measured one")
        elif "temperature" in q:
            what = (f"{f.value('temperature'):.0f} C is above its temperature-derating table: "
                    "pressure and collapse unrated")
        else:
            what = str(f.code)
        out.append(f"joint {f.joint} ({f.label}): {what}")
    return out


def _pct(x) -> str:
    return percent(x, "unrated")


def _q(value, kind, system, digits=None):
    return W.fmt(value, kind, system, digits, missing="unrated")


#: Tables longer than this are summarized in text unless every row is asked for.
LONG_TABLE = 60


def _table_rows(n: int, all_steps, most_loaded) -> list:
    """Row indices of a per-step or per-joint table, ``None`` where rows are
    left out.  ``all_steps``: True every row; False the first and last 10
    and the most loaded; None every row up to :data:`LONG_TABLE`, else the
    first and last 20 and the 10 most loaded (``most_loaded``: indices, most
    loaded first)."""
    if all_steps or n <= (20 if all_steps is False else LONG_TABLE):
        return list(range(n))
    edge = 10 if all_steps is False else 20
    keep = set(range(edge)) | set(range(n - edge, n))
    keep |= {int(i) for i in most_loaded[:10 if all_steps is None else 1]}
    rows, last = [], -1
    for i in sorted(keep):
        if i > last + 1:
            rows.append(None)
        rows.append(i)
        last = i
    return rows


def _gap_row(table, all_steps, columns: int) -> tuple:
    """The row that stands for rows left out; says so under the table."""
    note = ("long table: the first and last 20 rows and the 10 most loaded shown; "
            "--full shows every row" if all_steps is None
            else "--brief: the first and last 10 rows and the most loaded shown")
    if note not in (table.caption or ""):
        table.caption = note if not table.caption else f"{table.caption}\n{note}"
    return ("...",) * columns


def _staged_step_table(landing, system: str, all_steps: bool = True):
    """The running steps of a staged plan: stage 1 from the floor, the
    lowering on the landing string to the release, stage 2 from the floor."""
    from rich.table import Table
    from rich.text import Text
    st = landing.stages
    steps = st.steps
    label = landing.joints.label
    t = Table(title="Running steps (two stages on the landing string)")
    for c in ("step", "joint", "landing string", "bottom depth", "string load", "hook load",
              "hook limit", "margin"):
        t.add_column(c, justify="right")
    t.add_column("crew action")
    n = steps.n
    rel = steps.release_row
    keep = set(range(n)) if all_steps or n <= 40 else \
        set(range(8)) | set(range(st.split - 3, rel + 3)) | set(range(n - 5, n))
    for r in range(n):
        if r not in keep:
            continue
        k = int(steps.joint[r])
        phase = steps.phase[r]
        if phase == "lowering":
            act = ("release stage 1 (it stands on bottom)" if r == rel else
                   "lower one landing-string joint")
            joint = f"1-{st.split}"
        else:
            joint = f"{k} {label[k - 1]}"
            act = ("stage 2: first joint, set on stage 1 when landed" if k == st.split + 1
                   else "make up the landing string next" if k == st.split else "")
        m = steps.margin[r]
        t.add_row(f"{r + 1} {phase}", joint,
                  _q(steps.landing_string_length[r], "length", system, 1)
                  if phase == "lowering" else "-",
                  _q(steps.bottom_depth[r], "length", system, 1),
                  _q(steps.string_load[r], "force", system, 0),
                  _q(steps.hook_load[r], "force", system, 0),
                  _q(landing.path.hook_limit, "force", system, 0),
                  Text(_pct(m), "red" if m < 0 else ""), act)
    return t


def text_renderables(landing, plan=None, system: str = "us", warnings=(), rig_name="",
                     all_steps: bool | None = True):
    """A list of rich renderables for ``rigplan check`` and the printed plan.

    ``all_steps``: True shows every step and joint; False the first and last
    10; None every row of a short string and a summary of a long one
    (:func:`_table_rows`)."""
    from rich.table import Table
    from rich.text import Text
    from rich.panel import Panel

    out = []
    j = landing.joints
    chk = landing.chosen
    loads = chk.loads
    n = j.n
    colour = "green" if landing.lands else "red"
    head = Text()
    if plan is not None:
        where = ", ".join(x for x in (plan.well, plan.site) if x)
        head.append(f"{plan.name}" + (f"  ({where})" if where else "") + "\n", "bold")
    head.append("Verdict: ", "bold")
    head.append(W.verdict_text(landing), f"bold {colour}")
    if landing.governing is not None:
        head.append("\n" + W.governing_text(landing, system))
    cap = landing.path
    head.append(f"\nRig: {rig_name}. " + W.path_text(landing, system))
    head.append(f"\nNext action: {W.next_action(landing, system)}")
    if landing.switch_joint:
        head.append("\n" + W.switch_text(landing))
    if np.isfinite(landing.neutral_point):
        head.append(f"\nNeutral point when landed with the set-down weight: "
                    f"{_q(landing.neutral_point, 'length', system, 1)}")
    if landing.buckling is not None:
        head.append("\n" + W.set_down_text(landing, system))
    out.append(Panel(head, title="rigplan", expand=False))

    brief = all_steps is False
    if not brief:          # --brief: the panel's path line gives the limits
        out.append(chain_table(cap, system))
    for _, r in W.finding_lines(landing.reasons, system, landing.unrated):
        out.append(Text(f"  - {r}"))
    for code, r in W.finding_lines(landing.notes, system):
        if code == PlanCode.LEAVE_VALVE_OUT:
            out.append(Text(f"  crew action: {r}", "bold yellow"))
        else:
            out.append(Text(f"  note: {r}", "cyan"))
    for _, w in W.finding_lines(warnings, system):
        out.append(Text(f"  warning: {w}", "yellow"))

    opt = landing.best_float
    if opt is not None and landing.verdict in (Verdict.LANDS_FLOATED, Verdict.LANDS_OPEN,
                                               Verdict.CANNOT_CONFIRM):
        s = opt.schedule
        t = Table(title=f"Fill plan: {closure_name(opt.closure, landing.joints.label)}, fill fluid "
                        f"{_q(opt.fill_density, 'density', system, 2)}")
        t.add_column("action")
        t.add_column("joint", justify="right")
        t.add_column("volume", justify="right")
        t.add_column("level after", justify="right")
        t.add_row("fill each joint to the top", f"1-{s.fill_to_top_through}", "", "0")
        for tu in s.top_ups:
            t.add_row("top up", str(tu.joint), _q(tu.volume, "volume", system, 0),
                      _q(tu.level_after, "length", system, 1))
        if opt.check is not None:
            g = min(opt.check.limits, key=lambda lim: lim.margin)
            t.caption = f"least margin kept {_pct(g.margin)}: {g.name} at {W.limit_place(g)}"
        else:
            t.caption = f"least margin kept {_pct(s.least_margin)} at step {s.least_margin_step}"
        out.append(t)
        if len(landing.float_options) > 1:
            ft = Table(title="Float positions and fill fluids compared")
            for c in ("equipment", "fill", "lands", "top-ups", "least margin", "why not"):
                ft.add_column(c)
            for o in landing.float_options:
                ft.add_row(closure_name(o.closure, landing.joints.label), _q(o.fill_density, "density", system, 2),
                           "yes" if o.lands else "no",
                           str(len(o.schedule.top_ups)) if o.schedule else "-",
                           _pct(o.schedule.least_margin) if o.schedule and o.schedule.feasible
                           else "-",
                           W.finding_text(o.reason, system))
            out.append(ft)
    st = landing.stages
    if st is not None:
        t = Table(title="Staged setting (two stages on the landing string)")
        t.add_column("item")
        t.add_column("value, string load", justify="right")
        t.add_column("hook load", justify="right")
        t.add_row("stage 1", f"joints 1-{st.split}", "")
        t.add_row("release depth (top of stage 1)", _q(st.release_depth, "length", system, 1),
                  "")
        if st.steps is not None:
            rows = [("stage 1 at the floor, peak", st.stage1_peak_string_load,
                     st.stage1_peak_hook_load),
                    ("stage 1 on the landing string at release", st.release_string_load,
                     st.release_hook_load)]
            if st.lowering_peak_string_load > st.release_string_load * (1 + 1e-9):
                rows.append(("lowering on the landing string, peak",
                             st.lowering_peak_string_load, st.lowering_peak_hook_load))
            rows.append(("stage 2 at the floor, peak", st.stage2_peak_string_load,
                         st.stage2_peak_hook_load))
            for name, string, hook in rows:
                t.add_row(f"{name} (string load / hook load)",
                          _q(string, "force", system, 0), _q(hook, "force", system, 0))
            t.add_row("landing string top tension, peak",
                      _q(st.landing_string_tension, "force", system, 0), "")
            t.add_row("stage 1 landed: stands on bottom, neutral point at its top",
                      _q(st.stage1_neutral_point, "length", system, 1), "")
            if np.isfinite(st.stage2_neutral_point):
                t.add_row("stage 2 landed on stage 1: neutral point",
                          _q(st.stage2_neutral_point, "length", system, 1), "")
        if st.reason is not None:
            t.add_row("why not", W.finding_text(st.reason, system), "")
        t.caption = ("string load: what hangs below the elevator; hook load: the string load "
                     f"plus {_q(st.dead_load, 'force', system, 0)} of hoisting gear")
        out.append(t)
        if st.checks:
            ct = Table(title="Staged limits (design factor applied to the landing string)")
            for c in ("limit", "load", "capacity", "margin"):
                ct.add_column(c, justify="right" if c != "limit" else "left")
            for c in st.checks:
                ct.add_row(str(c.name), _q(c.load, "force", system, 0),
                           _q(c.capacity, "force", system, 0),
                           Text(_pct(c.margin), "red" if c.margin < 0 else ""))
            out.append(ct)

    st_t = Table(title=f"Running steps ({closure_name(chk.closure, landing.joints.label)})")
    for c in ("joint", "shoe depth", "fill level", "hook load", "hook limit", "margin"):
        st_t.add_column(c, justify="right")
    actions = W.step_actions(landing, system)
    st_t.add_column("crew action")
    hook = landing.hook_load
    if _staged(landing):
        out.append(_staged_step_table(landing, system, all_steps))
        rows = ()
    else:
        rows = _table_rows(n, all_steps, np.argsort(chk.capacity_margin, kind="stable"))
    for k in rows:
        if k is None:
            st_t.add_row(*_gap_row(st_t, all_steps, 7))
            continue
        fl = "-" if chk.closure.is_open or not np.isfinite(loads.fill_level[k]) else \
            _q(loads.fill_level[k], "length", system, 1)
        m = chk.capacity_margin[k]
        st_t.add_row(f"{k + 1} {j.label[k]}", _q(loads.shoe_depth[k], "length", system, 1), fl,
                     _q(hook[k], "force", system, 0), _q(cap.hook_limit, "force", system, 0),
                     Text(_pct(m), "red" if m < 0 else ""), actions[k])
    if rows:
        out.append(st_t)

    tu = chk.tension_utilization
    if np.any(np.isfinite(tu)):
        i = int(np.nanargmax(tu))
        out.append(Text(f"Least tension margin: top of joint {i + 1} ({j.label[i]}), "
                        f"{_q(loads.envelope_max[i], 'force', system, 0)} at step "
                        f"{loads.envelope_step[i]}, utilization {_pct(tu[i])} "
                        f"(design factor {landing.settings.design.tension})"))
    jt = Table(title="Per joint: tension, collapse and burst utilization (design factors applied)",
               caption="Rated on: API grades on the specified wall (API TR 5C3); other steel "
                       "and PVC on the minimum wall the standard allows; a measured wall or the "
                       "maker's figure where given. PVC derated for the job temperature.")
    for c in ("joint", "kind", "max tension", "tension", "collapse load", "collapse rating",
              "rated on", "collapse", "burst"):
        jt.add_column(c, justify="right")
    worst = np.fmax(np.fmax(tu, chk.collapse_utilization), chk.burst_utilization)
    by_load = np.argsort(-np.nan_to_num(worst, nan=-np.inf), kind="stable")
    if brief:
        # --brief: the governing joint only (the most utilized one)
        gov = landing.governing
        on_joint = gov is not None and gov.joint and 0 < gov.joint <= n
        joint_rows = [gov.joint - 1 if on_joint else int(by_load[0])]
        jt.title = (("Governing joint" if on_joint else "Most utilized joint")
                    + ": tension, collapse and burst utilization (design factors applied)")
        jt.caption = (jt.caption + "\n--brief: the governing joint only; leave out "
                      "--brief for every joint")
    else:
        joint_rows = _table_rows(n, all_steps, by_load)
    for i in joint_rows:
        if i is None:
            jt.add_row(*_gap_row(jt, all_steps, 8))
            continue
        jt.add_row(f"{i + 1} {j.label[i]}", j.kind[i],
                   _q(loads.envelope_max[i], "force", system, 0), _pct(tu[i]),
                   _q(loads.collapse_max[i], "pressure", system, 0),
                   _q(j.collapse_rating[i], "pressure", system, 0),
                   _BASIS_LABEL.get(j.collapse_basis[i], "") if j.collapse_basis else "",
                   _pct(chk.collapse_utilization[i]) if loads.collapse_max[i] > 0 or
                   np.isfinite(chk.collapse_utilization[i]) else "unrated",
                   _pct(chk.burst_utilization[i]))
    out.append(jt)
    for line in _rating_flag_lines(j, system):
        out.append(Text(f"Rack measurement: {line}", "yellow"))
    g = landing.grouting
    if g is not None:
        text = Text("Grouting: ")
        if g.full_column_ok:
            text.append(W.grout_lift_text(g))
        else:
            text.append(f"place in {len(g.lifts)} lifts: " + ", ".join(
                f"{_q(a, 'length', system, 1)} to {_q(b, 'length', system, 1)} above the shoe"
                for a, b in g.lifts))
            if g.reason is not None:
                text.append(f" ({W.finding_text(g.reason, system)})")
        out.append(text)
        for code, w in W.finding_lines(g.warnings, system):
            if code in (GroutCode.OVER_SCREENS, GroutCode.UNRATED_JOINTS):
                out.append(Text(f"  warning: grouting: {w}", "yellow"))
    if landing.unrated:
        out.append(Text("Unrated (enter the maker's rating): " + W.unrated_text(landing, system, 12),
                        "yellow"))
    out.append(Text(f"CAUTION: {CAUTION}", "bold yellow"))
    return out
