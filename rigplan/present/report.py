"""Plan results as JSON (SI base units) and as text tables (rich).

Front-end layer: turns a :class:`rigplan.engine.planner.LandingPlan` into the
``rigplan check`` outputs and the printed job plan.  No physics here: every
number comes from the planner.
"""

from __future__ import annotations

import math

import numpy as np

from rigplan.engine.findings import Kind, Verdict
from rigplan.present import wording as W
from rigplan.present.wording import CAUTION, closure_name, percent

JSON_UNITS = "SI base units: m, N, Pa, kg/m3, m3; margins and utilizations are fractions"


def _f(x):
    """JSON-safe float: nan/inf -> None."""
    if x is None:
        return None
    x = float(x)
    return x if math.isfinite(x) else None


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
    steps = [{
        "joint": k + 1, "label": j.label[k], "shoe_depth": _f(loads.shoe_depth[k]),
        "hook_load": _f(hook[k]), "string_load": _f(loads.string_load[k]),
        "hook_limit": _f(hook_limit), "margin": _f(chk.capacity_margin[k]),
        "fill_level": _f(fill_level[k]),
    } for k in range(n)]
    shoe = loads.shoe_depth[-1]
    top_depth = shoe - np.cumsum(j.length)
    landed = landing.landed
    reasons, reason_codes = _texts_and_codes(landing.reasons, landing.unrated)
    notes, note_codes = _texts_and_codes(landing.notes)
    warns, warning_codes = _texts_and_codes(warnings)
    unrated, unrated_codes = _texts_and_codes(landing.unrated)
    tcap = np.where(np.isnan(j.connection_rating) | np.isnan(j.body_rating), np.nan,
                    np.fmin(j.connection_rating, j.body_rating))
    connections = [{
        "joint": i + 1, "label": j.label[i], "depth": _f(top_depth[i]),
        "max_true_tension": _f(loads.envelope_max[i]), "step": int(loads.envelope_step[i]),
        "min_true_force": _f(loads.envelope_min[i]),
        "capacity": _f(tcap[i]), "connection_rating": _f(j.connection_rating[i]),
        "body_rating": _f(j.body_rating[i]),
        "utilization": _f(chk.tension_utilization[i]),
        "landed_true_force": _f(landed.true_force_top[i]),
        "landed_effective_tension": _f(landed.effective_top[i]),
    } for i in range(n)]
    joints = [{
        "joint": i + 1, "label": j.label[i], "kind": j.kind[i],
        "length": _f(j.length[i]), "od": _f(j.od[i]), "bore": _f(j.bore[i]),
        "weight": _f(j.weight[i]),
        "collapse_rating": _f(j.collapse_rating[i]),
        "collapse_rating_under_load": _f(chk.collapse_rating[i])
        if chk.collapse_rating is not None else _f(j.collapse_rating[i]),
        "collapse_method": j.collapse_method[i] if j.collapse_method else "",
        "max_collapse_load": _f(loads.collapse_max[i]),
        "collapse_utilization": _f(chk.collapse_utilization[i]),
        "burst_rating": _f(j.burst_rating[i]), "max_burst_load": _f(loads.burst_max[i]),
        "burst_utilization": _f(chk.burst_utilization[i]),
    } for i in range(n)]
    gov = landing.governing
    out = {
        "verdict": str(landing.verdict),
        "lands": landing.lands,
        "governing": None if gov is None else {
            "name": str(gov.name), "where": W.limit_place(gov), "load": _f(gov.load),
            "capacity": _f(gov.capacity), "margin": _f(gov.margin),
            "kind": str(gov.kind), "joint": gov.joint, "step": gov.step},
        "units": JSON_UNITS,
        "plan": None if plan is None else {
            "name": plan.name, "well": plan.well, "site": plan.site,
            "hole_fluid_density": _f(plan.hole.fluid_density),
            "hole_fluid_level": _f(plan.hole.fluid_level), "hole_depth": _f(plan.hole.depth)},
        "rig": {"name": rig_name, **chain_dict(landing.path)},
        "closure": closure_name(chk.closure),
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
        out["fill_window"] = [{
            "volume_to_add_min": _f(add_lo[k]), "volume_to_add_max": _f(add_hi[k]),
            "joint": int(w.joint[k]), "min_fill_level": _f(w.min_fill_level[k]),
            "max_fill_level": _f(w.max_fill_level[k]), "min_volume": _f(w.min_volume[k]),
            "max_volume": _f(w.max_volume[k]), "closing_limit": str(w.closing_limit[k]),
            "empty_limit": str(w.empty_limit[k]), "full_limit": str(w.full_limit[k]),
            "feasible": bool(w.feasible[k])} for k in range(n)]
        s = opt.schedule
        out["fill_schedule"] = {
            "closure": closure_name(opt.closure), "valve_joint": opt.closure.valve_joint,
            "fill_density": _f(opt.fill_density),
            "fill_to_top_through": s.fill_to_top_through,
            "top_ups": [{"joint": t.joint, "before_joint": t.before_joint or None,
                         "volume": _f(t.volume),
                         "level_after": _f(t.level_after)} for t in s.top_ups],
            "lowered_below_window": list(s.lowered_below_window),
            "least_margin": _f(s.least_margin), "least_margin_step": s.least_margin_step,
            "final_fill_volume": _f(s.added_volume),
            "steps": [{"joint": k + 1, "fill_level": _f(s.fill_level[k]),
                       "fill_volume": _f(s.fill_volume[k]),
                       "hook_load": _f(s.string_load[k] + landing.dead_load),
                       "capacity_margin": _f(s.capacity_margin[k]),
                       "collapse_utilization": _f(s.collapse_utilization[k])}
                      for k in range(n)],
        }
    for o in landing.float_options:
        out["float_options"].append({
            "closure": closure_name(o.closure), "valve_joint": o.closure.valve_joint,
            "fill_density": _f(o.fill_density), "lands": o.lands,
            "top_ups": len(o.schedule.top_ups) if o.schedule else None,
            "fill_to_top_through": o.schedule.fill_to_top_through if o.schedule else None,
            "least_margin": _f(o.schedule.least_margin)
            if o.schedule and o.schedule.feasible else None,
            "reason": W.finding_text(o.reason, "si"), "reason_code": W.finding_code(o.reason)})
    st = landing.stages
    if st is not None:
        out["stages"] = {
            "split": st.split, "release_depth": _f(st.release_depth),
            "stage1_peak_string_load": _f(st.stage1_peak),
            "landing_string_peak": _f(st.landing_string_peak),
            "stage2_peak_string_load": _f(st.stage2_peak),
            "least_margin": _f(st.least_margin), "governing": str(st.governing),
            "feasible": st.feasible, "reason": W.finding_text(st.reason, "si"),
            "reason_code": W.finding_code(st.reason)}
    g = landing.grouting
    if g is not None:
        out["grouting"] = grouting_dict(g)
    return out


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

def _pct(x) -> str:
    return percent(x, "unrated")


def _q(value, kind, system, digits=None):
    return W.fmt(value, kind, system, digits, missing="unrated")


def text_renderables(landing, plan=None, system: str = "us", warnings=(), rig_name="",
                     all_steps: bool = True):
    """A list of rich renderables for ``rigplan check`` and the printed plan."""
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
        head.append(f"\nOpen-ended the string load passes the limit at joint "
                    f"{landing.switch_joint}: floating must begin before it")
    if np.isfinite(landing.neutral_point):
        head.append(f"\nNeutral point when landed with the set-down weight: "
                    f"{_q(landing.neutral_point, 'length', system, 1)}")
    if landing.buckling is not None:
        head.append("\n" + W.set_down_text(landing, system))
    out.append(Panel(head, title="rigplan", expand=False))

    out.append(chain_table(cap, system))
    for _, r in W.finding_lines(landing.reasons, system, landing.unrated):
        out.append(Text(f"  - {r}"))
    for _, r in W.finding_lines(landing.notes, system):
        out.append(Text(f"  note: {r}", "cyan"))
    for _, w in W.finding_lines(warnings, system):
        out.append(Text(f"  warning: {w}", "yellow"))

    opt = landing.best_float
    if opt is not None and landing.verdict in (Verdict.LANDS_FLOATED, Verdict.LANDS_OPEN,
                                               Verdict.CANNOT_CONFIRM):
        s = opt.schedule
        t = Table(title=f"Fill plan: {closure_name(opt.closure)}, fill fluid "
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
                ft.add_row(closure_name(o.closure), _q(o.fill_density, "density", system, 2),
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
        t.add_column("value", justify="right")
        t.add_row("stage 1", f"joints 1-{st.split}")
        t.add_row("release depth (top of stage 1)", _q(st.release_depth, "length", system, 1))
        t.add_row("stage 1 peak string load", _q(st.stage1_peak, "force", system, 0))
        t.add_row("landing string peak tension", _q(st.landing_string_peak, "force", system, 0))
        t.add_row("stage 2 peak string load", _q(st.stage2_peak, "force", system, 0))
        t.add_row("least margin", f"{_pct(st.least_margin)} ({st.governing})")
        if st.reason is not None:
            t.add_row("why not", W.finding_text(st.reason, system))
        out.append(t)

    st_t = Table(title=f"Running steps ({closure_name(chk.closure)})")
    for c in ("joint", "shoe depth", "fill level", "hook load", "hook limit", "margin"):
        st_t.add_column(c, justify="right")
    actions = W.step_actions(landing, system)
    st_t.add_column("crew action")
    hook = landing.hook_load
    rows = range(n) if all_steps or n <= 40 else list(range(10)) + list(range(n - 10, n))
    for k in rows:
        fl = "-" if chk.closure.is_open or not np.isfinite(loads.fill_level[k]) else \
            _q(loads.fill_level[k], "length", system, 1)
        m = chk.capacity_margin[k]
        st_t.add_row(f"{k + 1} {j.label[k]}", _q(loads.shoe_depth[k], "length", system, 1), fl,
                     _q(hook[k], "force", system, 0), _q(cap.hook_limit, "force", system, 0),
                     Text(_pct(m), "red" if m < 0 else ""), actions[k])
    out.append(st_t)

    tu = chk.tension_utilization
    if np.any(np.isfinite(tu)):
        i = int(np.nanargmax(tu))
        out.append(Text(f"Least tension margin: top of joint {i + 1} ({j.label[i]}), "
                        f"{_q(loads.envelope_max[i], 'force', system, 0)} at step "
                        f"{loads.envelope_step[i]}, utilization {_pct(tu[i])} "
                        f"(design factor {landing.settings.design.tension})"))
    jt = Table(title="Per joint: tension, collapse and burst utilization (design factors applied)",
               caption="Ratings are on the minimum wall (the specified wall less the standard's "
                       "under-tolerance) unless a measured wall is given, so API-grade figures "
                       "sit below the API tables, which use the specified wall.")
    for c in ("joint", "kind", "max tension", "tension", "collapse load", "collapse rating",
              "collapse", "burst"):
        jt.add_column(c, justify="right")
    for i in range(n):
        jt.add_row(f"{i + 1} {j.label[i]}", j.kind[i],
                   _q(loads.envelope_max[i], "force", system, 0), _pct(tu[i]),
                   _q(loads.collapse_max[i], "pressure", system, 0),
                   _q(j.collapse_rating[i], "pressure", system, 0),
                   _pct(chk.collapse_utilization[i]) if loads.collapse_max[i] > 0 or
                   np.isfinite(chk.collapse_utilization[i]) else "unrated",
                   _pct(chk.burst_utilization[i]))
    out.append(jt)
    g = landing.grouting
    if g is not None:
        text = Text("Grouting: ")
        if g.full_column_ok:
            text.append("the planned column can be placed in one lift")
        else:
            text.append(f"place in {len(g.lifts)} lifts: " + ", ".join(
                f"{_q(a, 'length', system, 1)} to {_q(b, 'length', system, 1)} above the shoe"
                for a, b in g.lifts))
            if g.reason is not None:
                text.append(f" ({W.finding_text(g.reason, system)})")
        out.append(text)
    if landing.unrated:
        out.append(Text("Unrated (enter the maker's rating): " + W.unrated_text(landing, system, 12),
                        "yellow"))
    out.append(Text(f"CAUTION: {CAUTION}", "bold yellow"))
    return out
