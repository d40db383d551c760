"""What the job packet says: every section, in words and display units.

Reads the landing plan (and, for the record of a run, the run log's state)
and fills a :class:`rigplan.present.packet.document.Packet`.  No physics: every
number is the planner's, converted with :mod:`rigplan.files.units` through
the wording helpers of :mod:`rigplan.present.wording`.  No clock: the date
and revision come from the plan file or the command line, so the same input
gives the same packet.
"""

from __future__ import annotations

import dataclasses

import math
from dataclasses import dataclass, field

import numpy as np

from rigplan.engine.findings import Kind, Verdict
from rigplan.engine.planner import PlanCode
from rigplan.present import wording as W
from rigplan.present.wording import CAUTION, closure_name, next_action, step_actions
from rigplan.present.packet.document import (CrewSheet, Facts, Figure, Packet, Paragraph,
                                             Section, Signoff, Table)
from rigplan.present.packet.schematic import governing_step, well_schematic

#: Default half-width of the weight band on the crew sheet, a fraction of the
#: predicted hook load (the app's default band; common practice, no source).
DEFAULT_BAND = 0.10

#: Paper by unit system when none is chosen.
PAPER_FOR_SYSTEM = {"us": "letter", "si": "a4"}


@dataclass(frozen=True)
class ReportInfo:
    """The packet's document facts, none of them from a clock.

    revision, date : as given in the plan file's ``[report]`` table or on
        the command line ("" when not given: the cover says so)
    prepared_by, reviewed_by : names for the sign-off block ("" leaves a line)
    paper : "letter" or "a4" ("" : by the unit system)
    band : half-width of the weight band, a fraction of the predicted hook load
    stamp : a time of writing to print in the page footer, only when asked
    """

    revision: str = ""
    date: str = ""
    prepared_by: str = ""
    reviewed_by: str = ""
    paper: str = ""
    band: float = DEFAULT_BAND
    stamp: str = ""


@dataclass(frozen=True)
class RigChoice:
    """One rig and hoisting path tried for the job (the ``check --rig A --rig B`` table)."""

    rig: str
    path: str
    verdict: str
    lands: bool
    governing: str
    margin: float
    string_limit: float
    hook_limit: float
    chosen: bool = False


@dataclass(frozen=True)
class AsRun:
    """The record of a run.

    planned_plan, planned : the plan before the run and its landing plan
    state : the run log's :class:`rigplan.files.runlog.RunState`
    state_plan, landing : the plan with the run applied and its landing plan
    """

    planned_plan: object
    planned: object
    state: object
    state_plan: object
    landing: object


@dataclass
class Context:
    """What every section reads."""

    job: object
    landing: object
    system: str
    info: ReportInfo
    choices: tuple = ()
    as_run: AsRun | None = None
    rig_name: str = ""
    _cache: dict = field(default_factory=dict)

    def u(self, kind: str) -> str:
        return W.unit(kind, self.system)

    def words(self, findings, unrated=()) -> list:
        """Findings in words, one line each."""
        return [t for _, t in W.finding_lines(findings, self.system, unrated)]

    def q(self, value, kind: str, digits: int | None = None) -> str:
        """Value with unit, ``n/a`` when not known."""
        if value is None or not math.isfinite(float(value)):
            return "n/a"
        return W.fmt(value, kind, self.system, digits)

    def n(self, value, kind: str, digits: int | None = None) -> str:
        """Value without its unit (table cells; the unit is in the column head)."""
        if value is None or not math.isfinite(float(value)):
            return "n/a"
        return W.number(value, kind, self.system, digits)

    def head(self, title: str, kind: str) -> str:
        return W.column_title(title, kind, self.system)


def _both(value, kind, system: str) -> str:
    """The value in the chosen units with the other system beside it."""
    first = W.primary(system)
    return W.fmt(value, kind, f"{first}+{W.OTHER_SYSTEM[first]}")


def _pct(x) -> str:
    return W.percent(x) if x is not None and math.isfinite(float(x)) else "unrated"


def force_digits(system: str) -> int:
    """Decimals for forces in tables: whole lbf, tenths of a kN."""
    return 0 if W.primary(system) == "us" else 1


# ---------------------------------------------------------------------------
# bits shared by several sections and the CSV

def band_limits(predicted: np.ndarray, band: float) -> tuple[np.ndarray, np.ndarray]:
    """Low and high ends of the weight band about each predicted hook load."""
    half = band * np.abs(predicted)
    return predicted - half, predicted + half


def crew_actions(landing, system: str) -> list:
    """Short crew action per joint for the floor, one line each."""
    n = landing.joints.n
    acts = ["run, no fill"] * n
    if landing.verdict == Verdict.LANDS_STAGED and landing.stages is not None:
        p = landing.stages.split
        acts = ["stage 1"] * p + ["stage 2"] * (n - p)
        acts[p - 1] = "stage 1: release"
        return acts
    opt = landing.best_float
    if landing.chosen.closure.is_open or opt is None or opt.schedule is None:
        return ["run"] * n
    m = opt.closure.valve_joint or 0
    sch = opt.schedule
    for k in range(n):
        if k < m:
            acts[k] = "shoe track"
        elif k < sch.fill_to_top_through:
            acts[k] = "fill to the top"
        elif k == sch.fill_to_top_through:
            acts[k] = "STOP filling"
    for t in sch.top_ups:
        acts[t.joint - 1] = f"top up {W.fmt(t.volume, 'volume', system, 0)}"
    return acts


def running_rows(ctx: Context) -> list:
    """Per step: joint, label, kind, length, shoe depth, fill level, hook
    load, hook limit, margin, action (display text)."""
    lp = ctx.landing
    j = lp.joints
    chk = lp.chosen
    loads = chk.loads
    hook = lp.hook_load
    acts = step_actions(lp, ctx.system)
    fd = force_digits(ctx.system)
    rows = []
    for k in range(j.n):
        fl = loads.fill_level[k]
        fill = "" if chk.closure.is_open or not math.isfinite(fl) else ctx.n(fl, "length", 1)
        rows.append((str(k + 1), j.label[k], j.kind[k].replace("_", " "),
                     ctx.n(j.length[k], "length", 2), ctx.n(loads.shoe_depth[k], "length", 1),
                     fill, ctx.n(hook[k], "force", fd), ctx.n(lp.path.hook_limit, "force", fd),
                     _pct(chk.capacity_margin[k]), acts[k]))
    return rows


# ---------------------------------------------------------------------------
# sections

def _cover(ctx: Context) -> Section:
    lp, job, info = ctx.landing, ctx.job, ctx.info
    plan = job.plan
    gov = lp.governing
    sec = Section("cover", f"Job plan: {plan.name}", new_page=False)
    items = [
        ("Job", plan.name), ("Well", plan.well or "not given"), ("Site", plan.site or "not given"),
        ("Rig", ctx.rig_name),
        ("Hoisting path", f"{lp.path.path} (governed by {lp.path.governing or 'nothing rated'})"),
        ("Verdict", W.verdict_text(lp)),
    ]
    if gov is not None:
        items.append(("Governing limit", f"{gov.name} at {W.limit_place(gov)}"))
        if math.isfinite(gov.load) and math.isfinite(gov.capacity):
            items.append(("Load against capacity",
                          f"{ctx.q(gov.load, gov.kind)} against {ctx.q(gov.capacity, gov.kind)}"))
        items.append(("Margin", W.percent(gov.margin)))
    items += [
        ("String limit", ctx.q(lp.path.string_limit, "force")),
        ("Hook limit", f"{ctx.q(lp.path.hook_limit, 'force')} "
                       f"(with {ctx.q(lp.dead_load, 'force')} of gear on the hook)"),
        ("How to land it", next_action(lp, ctx.system)),
        ("Revision", info.revision or "not given"),
        ("Date", info.date or "not given"),
        ("Units", "US field units" if W.primary(ctx.system) == "us" else "SI units"),
    ]
    if ctx.as_run is not None:
        st = ctx.as_run.state
        items.append(("Record of the run", f"included: {len(st.run)} of "
                                           f"{ctx.as_run.landing.joints.n} joints in the hole, "
                                           f"{len(st.rejected)} set aside"))
    sec.blocks.append(Facts("", tuple(items)))
    for code, text in W.finding_lines(lp.notes, ctx.system):
        if code == PlanCode.LEAVE_VALVE_OUT:
            sec.blocks.append(Paragraph(text, "caution"))
    if lp.reasons or lp.unrated:
        head = "Options set aside: " if lp.lands else "Why it cannot be confirmed: " \
            if lp.verdict == Verdict.CANNOT_CONFIRM else "Why it cannot land: "
        sec.blocks.append(Paragraph(head + "; ".join(ctx.words(lp.reasons, lp.unrated)), "small"))
    if len(ctx.choices) > 1:
        sec.blocks.append(rig_choice_table(ctx.choices, ctx.system,
                                           title="Rigs and hoisting paths considered"))
    sec.blocks.append(Signoff((("Prepared by", info.prepared_by, ""),
                               ("Reviewed by", info.reviewed_by, ""))))
    for c in W.cautions(lp):
        sec.blocks.append(Paragraph(f"Caution: {c}", "caution"))
    return sec


def rig_choice_table(choices, system: str, title: str = "Which rig can land the string",
                     mark: str = "* the rig this packet plans for") -> Table:
    """The rigs and paths tried, best first as given, with their margins."""
    rows = []
    emph = []
    for i, c in enumerate(choices):
        rows.append((("* " if c.chosen else "") + c.rig, c.path, str(c.verdict),
                     c.governing or "-",
                     W.percent(c.margin) if math.isfinite(c.margin) else "n/a",
                     W.number(c.string_limit, "force", system, force_digits(system))
                     if math.isfinite(c.string_limit) else "n/a"))
        if c.chosen:
            emph.append(i)
    return Table(title, ("rig", "path", "verdict", "governing limit", "margin",
                         W.column_title("string limit", "force", system)),
                 tuple(rows), "lllllr", (3, 2, 3, 4, 1.5, 2),
                 note=mark if emph else "", emphasis=tuple(emph),
                 key="rigs")


def _basis(lp, i: int, spec) -> str:
    """What joint ``i``'s ratings rest on, as the engine rated it (collapse
    method; the wall or figure of collapse, burst and tension)."""
    j = lp.joints
    method = j.collapse_method[i] if j.collapse_method else ""
    words = {"api_5c3": "API TR 5C3", "timoshenko": "Timoshenko (ellipticity)",
             "thermoplastic": "elastic by SDR", "entered": "maker's figure",
             "unrated": "unrated"}.get(method, method.replace("_", " "))

    def pick(basis):
        return str(basis[i]) if basis and i < len(basis) else "unrated"
    cb, bb, tb = pick(j.collapse_basis), pick(j.burst_basis), pick(j.tension_basis)
    if cb == bb == tb:
        return f"collapse: {words}; all three: {cb}"
    collapse = words if cb in ("maker's figure", "unrated") else f"{words}, {cb}"
    return f"collapse: {collapse}; burst: {bb}; tension: {tb}"


def _makeup_groups(specs):
    """Runs of consecutive running joints that share everything but label and length."""
    groups = []
    for i, s in enumerate(specs):
        key = (s.kind, s.material, s.od, s.wall, s.connection, s.weld_efficiency,
               s.connection_rating, s.tensile_rating, s.collapse_rating, s.measured_wall)
        if groups and groups[-1][0] == key:
            groups[-1][2] = i
        else:
            groups.append([key, i, i])
    return groups


def _inputs(ctx: Context) -> Section:
    lp, plan = ctx.landing, ctx.job.plan
    hole, st = plan.hole, plan.settings
    sec = Section("inputs", "Inputs")
    sec.blocks.append(Facts("Hole", (
        ("Total depth (TD)", ctx.q(hole.depth, "length", 1)),
        ("Bit / hole diameter", ctx.q(hole.diameter, "diameter")),
        ("Hole fluid density", _both(hole.fluid_density, "density", ctx.system)),
        ("Hole fluid level below the floor", ctx.q(hole.fluid_level, "length", 1)),
    )))
    specs = plan.running_joints()
    j = lp.joints
    rows = []
    for key, a, b in _makeup_groups(specs):
        s = specs[a]
        length = float(np.sum(j.length[a:b + 1]))
        tcap = np.fmin(j.connection_rating[a], j.body_rating[a])
        conn = s.connection.replace("_", " ")
        if s.weld_efficiency is not None and s.connection == "butt_weld":
            conn += f" (eff. {s.weld_efficiency:g})"
        rows.append((f"{a + 1}-{b + 1}" if b > a else str(a + 1), str(b - a + 1),
                     s.kind.replace("_", " "), s.material, ctx.n(s.od, "diameter"),
                     ctx.n(s.wall, "diameter"), ctx.n(length, "length", 1),
                     ctx.n(j.weight[a] / j.length[a] / 9.80665, "mass_per_length", 1), conn,
                     ctx.n(tcap, "force", force_digits(ctx.system)),
                     ctx.n(j.collapse_rating[a], "pressure"),
                     ctx.n(j.burst_rating[a], "pressure"), _basis(lp, a, s)))
    sec.blocks.append(Table(
        "String makeup (joint 1 goes in the hole first)",
        ("joints", "no.", "kind", "material", ctx.head("OD", "diameter"),
         ctx.head("wall", "diameter"), ctx.head("length", "length"),
         ctx.head("weight", "mass_per_length"), "top connection",
         ctx.head("tension rating", "force"), ctx.head("collapse rating", "pressure"),
         ctx.head("burst rating", "pressure"), "rating basis"),
        tuple(rows), "lrllrrrrlrrrl", (1.6, 1.0, 1.6, 1.9, 1.7, 1.6, 1.8, 1.8, 2.6, 2.2, 2.2, 2.0, 4.2),
        note="Tension rating: the smaller of the connection and the pipe body. Each rating "
             "follows its own standard's convention, and the last column gives its basis: "
             "API grades on the specified wall (the API TR 5C3 formulas carry the wall "
             "tolerance, so the figures match the API tables); other steel on the minimum "
             "wall (the specified wall less the standard's under-tolerance); a measured wall "
             "or a maker's figure where given. 'n/a' means unrated: no rating is ever assumed.",
        key="makeup"))
    c = plan.closure
    if c.is_open:
        fe = (("Float equipment", "none: open shoe"),)
    else:
        fe = (("Float equipment", closure_name(c)),
              ("Check-valve rating", ctx.q(c.valve_rating, "pressure")))
    opt = lp.best_float
    if opt is not None and (c.is_open or opt.closure != c):
        fe += (("Chosen by the planner", closure_name(opt.closure)),)
    fe += (("Collar positions tried", ", ".join(str(x) for x in st.float_collar_positions)
            or "none"),)
    sec.blocks.append(Facts("Float equipment", fe))
    alts = ", ".join(W.fmt(x, "density", ctx.system) for x in st.fill_density_alternatives)
    sec.blocks.append(Facts("Running and design factors", (
        ("Fill fluid", _both(st.fill_density, "density", ctx.system)
         + (f"; alternatives offered: {alts}" if alts else "")),
        ("Minimum running weight", ctx.q(st.min_running_weight, "force")),
        ("Set-down weight when landed", ctx.q(st.set_down_weight, "force")),
        ("Design factor, tension", f"{st.design.tension:g}"),
        ("Design factor, collapse", f"{st.design.collapse:g}"),
        ("Design factor, burst", f"{st.design.burst:g}"),
    ) + ((("Grout", f"{W.fmt(plan.grout.density, 'density', ctx.system)}, "
                    f"{ctx.q(plan.grout.height, 'length', 1)} above the shoe"),)
         if plan.grout is not None else ())))
    sec.blocks.append(_assumptions(ctx))
    return sec


def _assumptions(ctx: Context) -> Table:
    lp, plan = ctx.landing, ctx.job.plan
    src_plan = f"plan file {_name(ctx.job.plan_path)}"
    src_rig = f"rig profile {_name(ctx.job.rig_path)}"
    rows = [
        ("Axial force by the pressure-area method at every connection and running step; "
         "effective tension and the neutral point",
         "Lubinski (1951); Bourgoyne et al., Applied Drilling Engineering (1986)"),
        ("Statics only: no drag, surge, acceleration or hole friction", "model limit"),
        ("Buckling below the neutral point is checked with the set-down weight when "
         "landed: sinusoidal onset "
         "1.94 (E I w^2)^(1/3), helical onset 5.55 (E I w^2)^(1/3), helix bending stress "
         "added to the axial stress against yield; screens in compression against their "
         "critical load. Vertical hole of the bit diameter, no friction",
         "Lubinski (1950); Lubinski, Althouse and Logan (1962); Wu and Juvkam-Wold "
         "(1993, from memory)"),
        ("Screens and slotted pipe are open to the hole: a valve below them floats nothing",
         "model limit"),
        ("Burst: API grades by internal yield 0.875 x 2 Y t / D on the specified wall; "
         "other steel by Barlow 2 Y t / D on the minimum wall (or the measured wall)",
         "API TR 5C3; Barlow"),
        ("Block efficiency of the reeving", "API RP 9B form; ADE Table 1.2"),
        ("Hole fluid density and level, fill fluid, float equipment, design factors",
         src_plan),
    ]
    chain = lp.path
    rows.append((f"Gear on the hook (dead load) {ctx.q(chain.dead_load, Kind.FORCE)}; "
                 f"{chain.lines} line(s), sheave factor {chain.sheave_factor:g}, block "
                 f"efficiency {chain.block_efficiency:.3f}", src_rig))
    for c in chain.cases:
        what = (f"dynamic factor {c.factor:g}" if str(c.code) == "shock"
                else f"overpull reserve {ctx.q(c.allowance, Kind.FORCE)}")
        rows.append((f"Hoisting load case '{c.code}': {what}", f"{src_rig}; {c.source}"))
    from rigplan.engine import materials as M
    seen = []
    for s in plan.running_joints():
        if s.material not in seen:
            seen.append(s.material)
    for key in seen:
        m = M.LIBRARY.get(key) if hasattr(M, "LIBRARY") else None
        if m is None:
            continue
        for fld in ("yield_strength", "wall_under_tolerance", "collapse_method"):
            src = m.sources.get(fld, "")
            if src:
                rows.append((f"{m.name}: {fld.replace('_', ' ')}", src))
    for s in plan.running_joints():
        for fld, words in (("tensile_rating", "tensile"), ("collapse_rating", "collapse"),
                           ("connection_rating", "connection")):
            if getattr(s, fld) is not None:
                row = (f"{s.kind.replace('_', ' ')} {words} rating, entered", src_plan
                       + " (maker's data)")
                if row not in rows:
                    rows.append(row)
    return Table("Assumptions and their sources", ("assumption", "source"), tuple(rows), "ll",
                 (5, 5), key="assumptions")


def _name(path) -> str:
    return "" if path is None else str(getattr(path, "name", path))


def _schematic(ctx: Context) -> Section:
    lp = ctx.landing
    k = governing_step(lp)
    s = well_schematic(lp, k)
    sec = Section("schematic", "Well schematic")
    sec.blocks.append(Figure(
        "schematic", "",
        caption=f"Left: joint {k} at the floor, the running step that governs "
                f"(fluid levels inside and outside at that step). Right: the string landed"
                + (", with the grout column" if ctx.job.plan.grout is not None else "")
                + ". Depth to scale; widths stretched so the walls show."))
    marks = well_schematic(lp, None, ctx.job.plan.grout).marks
    rows = [(m.kind, ctx.n(m.depth, "length", 1)) for m in marks]
    rows += [(f"at step {k}: {m.kind}", ctx.n(m.depth, "length", 1)) for m in s.marks
             if m.kind in ("fill level inside", "shoe")]
    boxes = [b for b in well_schematic(lp, None, ctx.job.plan.grout).boxes
             if b.kind in ("screen", "sump", "casing")]
    rows += [(f"{b.label}: top to bottom", f"{ctx.n(b.top, 'length', 1)} - "
                                            f"{ctx.n(b.bottom, 'length', 1)}")
             for b in sorted(boxes, key=lambda b: b.top)]
    sec.blocks.append(Table("Depths shown (landed unless a step is named)",
                            ("item", ctx.head("depth below the floor", "length")),
                            tuple(rows), "lr", (5, 3), key="depths"))
    return sec


def _hoisting(ctx: Context) -> Section:
    """Each part's rating, referred to the hook, the gear it carries, both load
    cases and its string limit; the least is the path's string limit."""
    lp = ctx.landing
    chain = lp.path
    fd = force_digits(ctx.system)
    sec = Section("hoisting", "Hoisting chain", new_page=False)
    rows = []
    emph = []
    for i, p in enumerate(chain.parts):
        gov = p.name == chain.governing
        rows.append((p.name, p.basis, ctx.n(p.rating, Kind.FORCE, fd), f"{p.to_hook:.3f}",
                     ctx.n(p.rated_at_hook, Kind.FORCE, fd), ctx.n(p.gear_counted, Kind.FORCE, fd),
                     ctx.n(p.shock_limit, Kind.FORCE, fd), ctx.n(p.overpull_limit, Kind.FORCE, fd),
                     ctx.n(p.string_limit, Kind.FORCE, fd),
                     f"governs ({p.governing_case})" if gov else ""))
        if gov:
            emph.append(i)
    for name in chain.unrated_on_path:
        rows.append((name, "unrated: not counted", "n/a", "", "", "", "", "", "", ""))
    words = []
    for c in chain.cases:
        if str(c.code) == "shock":
            words.append(f"shock: {c.factor:g} x (string + gear counted) <= rated at hook "
                         f"({c.source})")
        else:
            words.append(f"overpull: string + gear counted + {ctx.q(c.allowance, Kind.FORCE)} "
                         f"<= rated at hook ({c.source})")
    words.append(f"{chain.lines} line(s), block efficiency {chain.block_efficiency:.3f} "
                 f"(sheave factor {chain.sheave_factor:g}, API RP 9B)")
    sec.blocks.append(Table(
        f"Path '{chain.path}' of {ctx.rig_name}",
        ("part", "basis", ctx.head("rating", Kind.FORCE), "to hook",
         ctx.head("rated at hook", Kind.FORCE), ctx.head("gear counted", Kind.FORCE),
         ctx.head("shock limit", Kind.FORCE), ctx.head("overpull limit", Kind.FORCE),
         ctx.head("string limit", Kind.FORCE), ""),
        tuple(rows), "llrrrrrrrl", (3, 3.6, 2, 1.3, 2, 1.8, 2, 2, 2, 2.4),
        note="; ".join(words) + ".", emphasis=tuple(emph), key="hoisting"))
    sec.blocks.append(Facts("From the parts to the string limit", (
        ("String limit (least over the parts)", ctx.q(chain.string_limit, Kind.FORCE)),
        ("Governed by", (chain.governing or "nothing rated")
         + (f" ({chain.governing_case})" if chain.governing_case is not None else "")),
        ("Dead load (gear on the hook)", ctx.q(chain.dead_load, Kind.FORCE)),
        ("Hook limit (string limit + dead load)", ctx.q(chain.hook_limit, Kind.FORCE)),
    )))
    others = [c for c in ctx.choices if not c.chosen]
    if others:
        sec.blocks.append(Paragraph("Other rigs and paths are compared on the cover.", "small"))
    return sec


def _charts(ctx: Context) -> Section:
    lp = ctx.landing
    sec = Section("charts", "Charts", new_page=False)
    sec.blocks.append(Figure("hook_load", "Hook load against shoe depth",
                             "Open-ended and planned runs against the hook limit of the "
                             "hoisting path (dead load included)."))
    sec.blocks.append(Figure("utilization", "Tension and collapse utilization along the string",
                             "Design factor x largest load over the run / rating, at each "
                             "joint's landed depth; 1.0 is the limit."))
    if lp.best_float is not None and lp.best_float.window is not None \
            and not lp.chosen.closure.is_open:
        sec.blocks.append(Figure("fill_window", "Fill window with the planned level",
                                 "The fill surface may stand anywhere in the shaded band; the "
                                 "line is the planned level."))
    else:
        sec.blocks.append(Paragraph("No fill window: the chosen run has no check valve.",
                                    "small"))
    return sec


def _schedule(ctx: Context) -> Section:
    lp = ctx.landing
    sec = Section("running", "Running schedule")
    rows = running_rows(ctx)
    k = governing_step(lp)
    sec.blocks.append(Table(
        f"Every running step ({closure_name(lp.chosen.closure)})",
        ("step", "joint", "kind", ctx.head("length", "length"), ctx.head("shoe depth", "length"),
         ctx.head("fill level", "length"), ctx.head("hook load", "force"),
         ctx.head("hook limit", "force"), "margin", "crew action"),
        tuple(rows), "rllrrrrrrl", (1, 1.4, 1.6, 1.6, 1.8, 1.6, 2, 2, 1.6, 6.5),
        note=f"Bold: step {k}, the least hoisting margin.", emphasis=(k - 1,), key="running"))
    return sec


def _fill(ctx: Context) -> Section | None:
    lp = ctx.landing
    opt = lp.best_float
    sec = Section("fill", "Fill schedule")
    if opt is None or opt.schedule is None or lp.chosen.closure.is_open:
        if lp.verdict == Verdict.LANDS_OPEN:
            sec.blocks.append(Paragraph("Open shoe: the hole fluid fills the pipe through the "
                                        "shoe; there is nothing to fill.", "body"))
        else:
            sec.blocks.append(Paragraph("No fill schedule lands this string.", "body"))
    else:
        s = opt.schedule
        m0 = opt.closure.valve_joint or 0
        lo, hi = joint_fill_volumes(lp.joints, m0, s.fill_to_top_through)
        each = ("" if not math.isfinite(lo) else
                f"{ctx.n(hi, 'volume', 0)} each" if ctx.n(lo, "volume", 0) == ctx.n(hi, "volume", 0)
                else f"{ctx.n(lo, 'volume', 0)}-{ctx.n(hi, 'volume', 0)} each")
        rows = [("fill each joint to the top", f"1-{s.fill_to_top_through}", each,
                 "0 (full)")]
        for t in s.top_ups:
            rows.append(("top up", str(t.joint), ctx.n(t.volume, "volume", 0),
                         ctx.n(t.level_after, "length", 1)))
        m = opt.closure.valve_joint or 0
        sec.blocks.append(Table(
            f"{closure_name(opt.closure)}, fill with {_both(opt.fill_density, 'density', ctx.system)}",
            ("action", "joints", ctx.head("volume", "volume"),
             ctx.head("fill level after", "length")),
            tuple(rows), "llrr", (5, 2, 2, 2.5),
            note=(f"Joints 1-{m} are below the float collar and fill from the hole. " if m else "")
            + _least_kept(opt)
            + f"fill above the valve at landing {ctx.q(float(s.fill_volume[-1]), 'volume', 0)}.",
            key="fill"))
    if lp.notes:
        sec.blocks.append(Paragraph("Notes: " + " ".join(
            x if x.endswith(".") else f"{x}." for x in ctx.words(lp.notes)), "small"))
    if len(lp.float_options) > 0:
        rows = []
        for o in lp.float_options:
            rows.append((closure_name(o.closure), W.fmt(o.fill_density, "density", ctx.system),
                         "yes" if o.lands else "no",
                         str(len(o.schedule.top_ups)) if o.schedule else "-",
                         _pct(o.schedule.least_margin) if o.schedule and o.schedule.feasible
                         else "-", W.finding_text(o.reason, ctx.system) if o.reason else ""))
        sec.blocks.append(Table("Float positions and fill fluids compared",
                                ("equipment", "fill", "lands", "top-ups", "least margin",
                                 "why not"), tuple(rows), "llllrl", (3, 2, 1.2, 1.3, 1.8, 8),
                                key="float_options"))
    return sec


def joint_fill_volumes(joints, valve_joint: int, through: int) -> tuple[float, float]:
    """Least and largest bore volume of one joint, ``pi/4 d^2 L`` [m^3], of
    the joints above the valve filled to the top (``valve_joint`` + 1 ..
    ``through``); nan when there are none."""
    lo_j, hi_j = int(valve_joint), int(through)
    if hi_j <= lo_j:
        return float("nan"), float("nan")
    bore = np.asarray(joints.bore[lo_j:hi_j], dtype=float)
    vol = np.pi / 4.0 * bore ** 2 * np.asarray(joints.length[lo_j:hi_j], dtype=float)
    return float(np.min(vol)), float(np.max(vol))


def _least_kept(opt) -> str:
    """The least margin the fill plan keeps, from its full check when there is one."""
    if opt.check is not None and opt.check.limits:
        g = min(opt.check.limits, key=lambda lim: lim.margin)
        return f"Least margin kept {_pct(g.margin)}: {g.name} at {W.limit_place(g)}; "
    s = opt.schedule
    return f"Least margin kept {_pct(s.least_margin)} at step {s.least_margin_step}; "


def _stages_grout(ctx: Context) -> Section | None:
    lp = ctx.landing
    st = lp.stages
    g = lp.grouting
    if st is None and g is None:
        return None
    sec = Section("stages", "Stages and grouting")
    fd = force_digits(ctx.system)
    if st is not None:
        items = [("Stage 1", f"joints 1-{st.split} on the landing string"),
                 ("Release depth (top of stage 1)", ctx.q(st.release_depth, "length", 1)),
                 ("Stage 1 at the floor, peak hook load (string load)",
                  f"{ctx.q(st.stage1_peak_hook_load, 'force', fd)} "
                  f"({ctx.q(st.stage1_peak_string_load, 'force', fd)})"),
                 ("Stage 1 on the landing string at release, hook load (string load)",
                  f"{ctx.q(st.release_hook_load, 'force', fd)} "
                  f"({ctx.q(st.release_string_load, 'force', fd)})"),
                 ("Landing string peak tension", ctx.q(st.landing_string_tension, "force", fd)),
                 ("Stage 2 at the floor, peak hook load (string load)",
                  f"{ctx.q(st.stage2_peak_hook_load, 'force', fd)} "
                  f"({ctx.q(st.stage2_peak_string_load, 'force', fd)})"),
                 ("Least margin", f"{_pct(st.least_margin)} ({st.governing})"),
                 ("Landed", "stage 1 stands on bottom (neutral point at its top, "
                            f"{ctx.q(st.stage1_neutral_point, 'length', 1)})")]
        if st.reason:
            items.append(("Why not", W.finding_text(st.reason, ctx.system)))
        sec.blocks.append(Facts("Staged setting" + ("" if lp.verdict == Verdict.LANDS_STAGED
                                                     else " (tried, not chosen)"), tuple(items)))
    if g is not None:
        lifts = getattr(g, "lifts", ())
        rows = [(str(i + 1), ctx.n(a, "length", 1), ctx.n(b, "length", 1))
                for i, (a, b) in enumerate(lifts)]
        note = (W.grout_lift_text(g)[:1].upper() + W.grout_lift_text(g)[1:] + "."
                if getattr(g, "full_column_ok", False)
                else f"Place the grout in {len(lifts)} lifts, each set before the next.")
        if getattr(g, "reason", ""):
            note += f" {W.finding_text(g.reason, ctx.system)}"
        sec.blocks.append(Table("Grouting lifts (heights above the shoe)",
                                ("lift", ctx.head("from", "length"), ctx.head("to", "length")),
                                tuple(rows), "lrr", (1, 2, 2), note=note, key="grout"))
        for w in ctx.words(getattr(g, "warnings", ())):
            sec.blocks.append(Paragraph(f"Grouting: {w}", "small"))
    return sec


def crew_rows(ctx: Context):
    """Crew sheet rows: step, joint, shoe depth, action, hook load, band low, band high."""
    lp = ctx.landing
    j = lp.joints
    hook = lp.hook_load
    lo, hi = band_limits(hook, ctx.info.band)
    acts = crew_actions(lp, ctx.system)
    fd = force_digits(ctx.system)
    return [(str(k + 1), j.label[k], ctx.n(lp.chosen.loads.shoe_depth[k], "length", 1), acts[k],
             ctx.n(hook[k], "force", fd), f"{ctx.n(lo[k], 'force', fd)}-{ctx.n(hi[k], 'force', fd)}")
            for k in range(j.n)]


def _crew(ctx: Context) -> Section:
    lp = ctx.landing
    sec = Section("crew", "Crew sheet")
    legend = [f"{ctx.job.plan.name} on {ctx.rig_name}, path '{lp.path.path}': "
              f"{W.verdict_text(lp)}.",
              f"Hook limit {ctx.q(lp.path.hook_limit, 'force')}; stop and call the engineer "
              f"if a reading leaves its band (+/- {100 * ctx.info.band:g} % of the predicted "
              f"hook load).",
              f"Plan: {next_action(lp, ctx.system)}."]
    for code, text in W.finding_lines(lp.notes, ctx.system):
        if code == PlanCode.LEAVE_VALVE_OUT:
            legend.insert(0, text)
    opt = lp.best_float
    if opt is not None and (opt.closure.valve_joint or 0) > 0 and not lp.chosen.closure.is_open:
        legend.append("Shoe track: the joints below the float collar; they fill from the hole.")
    if lp.chosen.closure.is_open:
        legend.append("Open shoe: each joint fills from the hole; there is nothing to fill.")
    if lp.verdict not in (Verdict.LANDS_OPEN, Verdict.LANDS_FLOATED, Verdict.LANDS_STAGED):
        legend.insert(0, "DO NOT RUN: the string cannot be landed as planned"
                         + (" (a loaded part is unrated)" if lp.verdict == Verdict.CANNOT_CONFIRM else "")
                         + ".")
    k = governing_step(lp)
    sec.blocks.append(CrewSheet(
        "Crew sheet", tuple(legend),
        ("#", "joint", ctx.head("shoe", "length"), "action", ctx.head("hook load", "force"),
         ctx.head("band", "force")),
        tuple(crew_rows(ctx)), "rlrlrr", emphasis=(k - 1,)))
    sec.blocks.append(Paragraph(f"Caution: {CAUTION}", "caution"))
    return sec


# ---------------------------------------------------------------------------
# the record of a run

def _as_run(ctx: Context) -> Section:
    ar = ctx.as_run
    sec = Section("as_run", "Record of the run")
    state = ar.state
    n_run = len(state.run)
    n_all = ar.landing.joints.n
    g = ar.landing.governing
    sec.blocks.append(Facts("", (
        ("Joints in the hole", f"{n_run} of {n_all}" + (" (landed)" if n_run >= n_all else "")),
        ("Set aside", str(len(state.rejected))),
        ("Weight readings", str(len(state.observations))),
        ("Verdict of the plan as run", W.verdict_text(ar.landing)),
        ("Governing limit as run", "none found" if g is None else
         f"{g.name} at {W.limit_place(g)}, margin {W.percent(g.margin)}"),
    )))
    order = {label: i + 1 for i, (label, _) in enumerate(state.run)}
    measured = dict(state.run)
    rows = []
    for spec in ar.planned_plan.joints:
        label = spec.label
        if label in state.rejected:
            status, why = "set aside", state.rejected[label]
        elif label in order:
            status, why = f"run #{order[label]}", ""
        elif spec.rejected:
            status, why = "set aside (plan)", spec.note
        else:
            status, why = "not run", ""
        m = measured.get(label)
        diff = "" if m is None else ctx.n(m - spec.length, "length", 2)
        if m is None and state.basis.get(label) == "planned":
            why = why or "run on the planned length, not measured"
        rows.append((label, spec.kind.replace("_", " "), ctx.n(spec.length, "length", 2),
                     "" if m is None else ctx.n(m, "length", 2), diff, status, why))
    sec.blocks.append(Table("Tally as run", ("joint", "kind", ctx.head("planned", "length"),
                                             ctx.head("measured", "length"),
                                             ctx.head("difference", "length"), "status", "reason"),
                            tuple(rows), "llrrrll", (1.5, 1.8, 2, 2, 2, 2, 5), key="tally"))
    # readings
    fd = force_digits(ctx.system)
    hook_asrun = ar.landing.hook_load
    rrows = []
    alarms = []
    for ob in state.observations:
        # judged against the plan as run now; the prediction made when the
        # reading was entered is kept in the note
        pred = (float(hook_asrun[ob.step - 1]) if 1 <= ob.step <= len(hook_asrun)
                else ob.predicted_n)
        if ob.predicted_n is not None and pred is not None and abs(ob.predicted_n - pred) > 0.5:
            ob = dataclasses.replace(ob, note=(ob.note + "; " if ob.note else "")
                                     + f"predicted at entry {ctx.q(ob.predicted_n, 'force', fd)}")
        if pred is None:
            diff, out = "", ""
        else:
            d = ob.hook_load_n - pred
            tol = ctx.info.band * abs(pred)
            out = "outside" if abs(d) > tol else "inside"
            diff = ctx.n(d, "force", fd)
            if out == "outside":
                alarms.append((str(ob.step), ctx.q(ob.hook_load_n, "force", fd),
                               ctx.q(pred, "force", fd), ctx.q(d, "force", fd), ob.note or ""))
        rrows.append((ob.ts[:16].replace("T", " "), str(ob.step),
                      ctx.n(ob.hook_load_n, "force", fd),
                      "" if pred is None else ctx.n(pred, "force", fd), diff, out, ob.note or ""))
    for ob, undo_ts in getattr(state, "withdrawn", ()):
        # a reading undone after it raised an alarm stays in the record
        pred = (float(hook_asrun[ob.step - 1]) if 1 <= ob.step <= len(hook_asrun)
                else ob.predicted_n)
        if pred is not None and abs(ob.hook_load_n - pred) > ctx.info.band * abs(pred):
            alarms.append((str(ob.step), ctx.q(ob.hook_load_n, "force", fd),
                           ctx.q(pred, "force", fd), ctx.q(ob.hook_load_n - pred, "force", fd),
                           f"read {ob.ts[:16].replace('T', ' ')}, withdrawn (undone) at "
                           f"{undo_ts[:16].replace('T', ' ')} UTC"
                           + (f"; {ob.note}" if ob.note else "")))
    sec.blocks.append(Table("Weight readings against the predictions",
                            ("time (UTC)", "step", ctx.head("read", "force"),
                             ctx.head("predicted", "force"), ctx.head("difference", "force"),
                             f"band +/- {100 * ctx.info.band:g} %", "note"),
                            tuple(rrows), "lrrrrll", (2.6, 1, 2, 2, 2, 1.8, 4),
                            note="" if rrows else "No weight readings were recorded.",
                            key="readings"))
    # landed depths
    planned = well_schematic(ar.planned, None)
    asrun = well_schematic(ar.landing, None)
    drows = []
    for kind in ("shoe", "float collar", "float shoe"):
        a, b = planned.mark(kind), asrun.mark(kind)
        if a is not None:
            drows.append((kind, ctx.n(a.depth, "length", 2),
                          ctx.n(b.depth, "length", 2) if b is not None else "",
                          ctx.n(b.depth - a.depth, "length", 2) if b is not None else ""))
    pa = sorted(planned.boxes_of("screen"), key=lambda x: x.bottom, reverse=True)
    pb = sorted(asrun.boxes_of("screen"), key=lambda x: x.bottom, reverse=True)
    for i, a in enumerate(pa):
        b = pb[i] if i < len(pb) else None
        for end in ("top", "bottom"):
            va = getattr(a, end)
            vb = getattr(b, end) if b is not None else None
            drows.append((f"{a.label} {end}", ctx.n(va, "length", 2),
                          "" if vb is None else ctx.n(vb, "length", 2),
                          "" if vb is None else ctx.n(vb - va, "length", 2)))
    landed_words = ("as landed" if n_run >= n_all else
                    "as they will land: lengths measured so far, planned lengths for the rest")
    sec.blocks.append(Table(f"Landed depths against the plan ({landed_words})",
                            ("item", ctx.head("planned", "length"), ctx.head("as run", "length"),
                             ctx.head("difference", "length")),
                            tuple(drows), "lrrr", (5, 2, 2, 2), key="landed"))
    sec.blocks.append(Table("Alarms raised (readings outside the band)",
                            ("step", "read", "predicted", "difference", "note"), tuple(alarms),
                            "rrrrl", (1, 2, 2, 2, 5),
                            note="" if alarms else "No reading left its band.", key="alarms"))
    return sec


def build_packet(job, landing, system: str = "us", info: ReportInfo | None = None,
                 choices=(), as_run: AsRun | None = None, rig_name: str = "") -> Packet:
    """The whole job packet for ``landing`` (the chosen rig's plan)."""
    info = info or ReportInfo()
    paper = info.paper or PAPER_FOR_SYSTEM.get(W.primary(system), "letter")
    ctx = Context(job, landing, system, info, tuple(choices), as_run,
                  rig_name or getattr(job.rig, "name", ""))
    sections = [_cover(ctx), _inputs(ctx), _schematic(ctx), _hoisting(ctx), _charts(ctx),
                _schedule(ctx), _fill(ctx)]
    sg = _stages_grout(ctx)
    if sg is not None:
        sections.append(sg)
    sections.append(_crew(ctx))
    if as_run is not None:
        sections.append(_as_run(ctx))
    head = (f"{job.plan.name} - {ctx.rig_name} - rev. {info.revision or 'n/a'}"
            f"{' - ' + info.date if info.date else ''}")
    return Packet(f"Job plan: {job.plan.name}", head, sections, system, paper)
