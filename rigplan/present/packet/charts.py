"""The packet's drawings with matplotlib: the well schematic and the charts.

Each function returns a matplotlib ``Figure`` (Agg canvas, never a window)
drawn from the landing plan and, for the schematic, from the shared
geometry of :mod:`rigplan.present.packet.schematic`.  The PDF places the
figures as vector graphics (:mod:`rigplan.present.packet.mplflow`), the
HTML as inline SVG (:func:`svg`).  Imported only when a packet is written.
"""

from __future__ import annotations

import io
import math

import matplotlib

matplotlib.use("Agg")

import numpy as np  # noqa: E402
from matplotlib.figure import Figure  # noqa: E402
from matplotlib.patches import Rectangle  # noqa: E402

from rigplan.files import units as U  # noqa: E402
from rigplan.present import wording as W  # noqa: E402
from rigplan.present.packet.schematic import governing_step, well_schematic  # noqa: E402

#: rc settings for every packet figure: one font (the one the PDF embeds),
#: fixed ids and no date in the SVG, so the same input gives the same file.
RC = {
    "font.family": "DejaVu Sans",
    "font.size": 8.0,
    "axes.titlesize": 9.0,
    "axes.labelsize": 8.0,
    "legend.fontsize": 7.0,
    "xtick.labelsize": 7.0,
    "ytick.labelsize": 7.0,
    "svg.fonttype": "none",
    "svg.hashsalt": "rigplan-packet",
    "path.simplify": False,
    "axes.grid": True,
    "grid.color": "#d0d0d0",
    "grid.linewidth": 0.5,
    "lines.linewidth": 1.4,
}

#: Colours: print-safe, distinct in grey.
COLOURS = {
    "hole": "#f2ead8", "empty": "#ffffff", "annulus fluid": "#c9dff2", "grout": "#9e9e9e", "inside fluid": "#c9dff2",
    "fill fluid": "#6fa8dc", "casing": "#404040", "screen": "#b45f06", "sump": "#404040",
    "open": "#b45f06", "planned": "#1f4e79", "limit": "#c00000", "tension": "#1f4e79",
    "collapse": "#b45f06", "window": "#c9dff2",
}

WIDTH_IN = 7.0


def _new(height_in: float, ncols: int = 1, **kw):
    fig = Figure(figsize=(WIDTH_IN, height_in), dpi=72, layout="constrained")
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    FigureCanvasAgg(fig)
    axes = fig.subplots(1, ncols, **kw)
    return fig, axes


def _depth_axis(ax, system: str):
    ax.invert_yaxis()
    ax.set_ylabel(f"depth below the floor [{U.unit_label('length', system)}]")


def _d(values, system: str):
    return U.to_display(np.asarray(values, dtype=float), "length", system)


def _f(values, system: str):
    return U.to_display(np.asarray(values, dtype=float), "force", system)


def _draw_schematic(ax, s, system: str, title: str, stretch: float):
    """One side view from the shared geometry: each box mirrored about the
    axis, radii stretched by ``stretch`` so walls show at this depth scale."""
    depth_u = U.display_factor("length", system)
    for b in s.boxes:
        top, bot = b.top / depth_u, b.bottom / depth_u
        for sign in (-1, 1):
            x0 = sign * b.inner * stretch
            x1 = sign * b.outer * stretch
            lo, hi = min(x0, x1), max(x0, x1)
            if b.inner == 0 and sign == 1:
                continue                          # spans the axis: drawn once
            if b.inner == 0:
                lo, hi = -b.outer * stretch, b.outer * stretch
            ax.add_patch(Rectangle((lo, top), hi - lo, bot - top, linewidth=0,
                                   facecolor=COLOURS.get(b.kind, "#808080"),
                                   hatch="" if b.kind != "screen" else None,
                                   label=None))
    # marks
    rmax = s.radius_max * stretch
    for m in s.marks:
        y = m.depth / depth_u
        style = {"TD": ("k", "-"), "shoe": ("k", ":"), "float collar": ("#c00000", "-"),
                 "float shoe": ("#c00000", "-"), "fluid level outside": ("#1f4e79", "--"),
                 "fill level inside": ("#1f4e79", "-"), "grout top": ("#606060", "--")}
        colour, ls = style.get(m.kind, ("k", "-"))
        r = m.radius * stretch
        ax.plot([-r, r], [y, y], color=colour, linestyle=ls, linewidth=1.0)
    ax.set_xlim(-rmax * 1.05, rmax * 1.05)
    ax.set_ylim(s.depth_max / depth_u * 1.02, 0)
    ax.set_xticks([])
    ax.grid(False)
    ax.set_title(title)


def schematic_figure(landing, plan, system: str) -> Figure:
    system = W.primary(system)
    """Two side views to the same depth scale: at the step of the least
    hoisting margin, and landed (with the grout column when planned)."""
    k = governing_step(landing)
    at_k = well_schematic(landing, k)
    landed = well_schematic(landing, None, plan.grout)
    fig, (a, b, c) = _new(6.4, 3, gridspec_kw={"width_ratios": (1, 1, 1.25)}, sharey=False)
    stretch = 1.0
    _draw_schematic(a, at_k, system, f"running: joint {k} at the floor", stretch)
    _draw_schematic(b, landed, system, "landed", stretch)
    ylim = max(at_k.depth_max, landed.depth_max) / U.display_factor("length", system) * 1.02
    for ax in (a, b):
        ax.set_ylim(ylim, 0)
    _depth_axis_labels(a, system)
    b.set_yticklabels([])
    # the depth labels of the landed string, in words, on the right panel
    c.axis("off")
    c.set_ylim(ylim, 0)
    c.set_xlim(0, 1)
    unit = U.unit_label("length", system)
    items = [(m.depth, m.kind) for m in landed.marks]
    items += [(bx.top, f"top of {bx.label}") for bx in landed.boxes
              if bx.kind in ("screen", "sump") or (bx.kind == "casing" and bx.top > 0)]
    items += [(m.depth, f"{m.kind}, at joint {k}") for m in at_k.marks
              if m.kind in ("fill level inside", "shoe")]
    items.sort()
    _label_column(c, items, ylim, system, unit)
    handles = [Rectangle((0, 0), 1, 1, facecolor=COLOURS[x], edgecolor="#808080",
                         linewidth=0.5) for x in
               ("casing", "screen", "annulus fluid", "fill fluid", "empty")]
    names = ["casing", "screen", "hole fluid", "fill fluid", "empty pipe"]
    if plan.grout is not None:
        handles.append(Rectangle((0, 0), 1, 1, facecolor=COLOURS["grout"]))
        names.append("grout")
    fig.legend(handles, names, loc="outside lower center", ncol=len(names), frameon=False)
    return fig


def _depth_axis_labels(ax, system):
    ax.set_ylabel(f"depth below the floor [{U.unit_label('length', system)}]")


def _label_column(ax, items, ylim, system, unit):
    """Depth labels spread down a column so none overlap, each tied to its depth."""
    if not items:
        return
    gap = ylim / 34.0
    ys = []
    last = -math.inf
    for depth, _ in items:
        y = max(depth / U.display_factor("length", system), last + gap)
        ys.append(y)
        last = y
    over = ys[-1] - ylim * 0.97
    if over > 0:              # pushed past the bottom: pull the run back up
        ys = [y - over for y in ys]
        for i in range(len(ys) - 2, -1, -1):
            ys[i] = min(ys[i], ys[i + 1] - gap)
    for (depth, words), y in zip(items, ys):
        d = depth / U.display_factor("length", system)
        ax.plot([0.0, 0.08], [d, y], color="#808080", linewidth=0.5)
        ax.text(0.1, y, f"{d:.1f} {unit}  {words}", va="center", fontsize=7)


def hook_load_figure(landing, system: str) -> Figure:
    """Hook load against shoe depth: open-ended, planned, and the hook limit."""
    system = W.primary(system)
    fig, ax = _new(4.2)
    lp = landing
    shoe_open = _d(lp.open_check.loads.shoe_depth, system)
    hook_open = _f(lp.open_check.loads.string_load + lp.dead_load, system)
    shoe = _d(lp.chosen.loads.shoe_depth, system)
    hook = _f(lp.hook_load, system)
    limit = float(_f(lp.path.hook_limit, system))
    ax.plot(hook_open, shoe_open, color=COLOURS["open"], linestyle="--", label="open-ended")
    ax.plot(hook, shoe, color=COLOURS["planned"], label=f"planned ({lp.verdict.value})")
    if math.isfinite(limit):
        ax.axvline(limit, color=COLOURS["limit"], linewidth=1.2,
                   label=f"hook limit, path '{lp.path.path}'")
    k = governing_step(lp)
    ax.plot([hook[k - 1]], [shoe[k - 1]], marker="o", color=COLOURS["planned"],
            linestyle="none", label=f"least margin, joint {k}")
    _depth_axis(ax, system)
    ax.set_xlabel(f"hook load [{U.unit_label('force', system)}]")
    ax.set_xlim(left=min(0.0, float(np.nanmin(hook)), float(np.nanmin(hook_open))))
    ax.legend(loc="lower left")
    return fig


def utilization_figure(landing, system: str) -> Figure:
    """Tension and collapse utilization of each joint at its landed depth."""
    system = W.primary(system)
    fig, ax = _new(4.0)
    lp = landing
    j = lp.joints
    shoe = float(np.sum(j.length))
    bottoms = shoe - np.concatenate(([0.0], np.cumsum(j.length[:-1])))
    mids = _d(bottoms - j.length / 2, system)
    tu = np.asarray(lp.chosen.tension_utilization, dtype=float)
    cu = np.asarray(lp.chosen.collapse_utilization, dtype=float)
    ax.plot(tu, mids, color=COLOURS["tension"], marker=".", markersize=3, label="tension")
    ax.plot(cu, mids, color=COLOURS["collapse"], marker=".", markersize=3, label="collapse")
    ax.axvline(1.0, color=COLOURS["limit"], linewidth=1.2, label="limit (1.0)")
    unr = np.isnan(tu) | np.isnan(cu)
    if np.any(unr):
        ax.plot(np.zeros(int(unr.sum())), mids[unr], linestyle="none", marker="x",
                color="#606060", label="unrated")
    _depth_axis(ax, system)
    ax.set_xlabel("utilization = design factor x load / rating [-]")
    top = np.nanmax(np.concatenate((tu, cu, [1.0])))
    ax.set_xlim(0, max(1.1, float(top) * 1.05))
    ax.legend(loc="lower right")
    return fig


def fill_window_figure(landing, system: str) -> Figure | None:
    """The fill window at every step with the planned fill level."""
    system = W.primary(system)
    opt = landing.best_float
    if opt is None or opt.window is None:
        return None
    w = opt.window
    fig, ax = _new(3.8)
    steps = np.asarray(w.joint, dtype=float)
    lo = _d(w.min_fill_level, system)
    hi = _d(w.max_fill_level, system)
    ok = np.isfinite(lo) & np.isfinite(hi)
    ax.fill_between(steps, lo, hi, where=ok, color=COLOURS["window"], linewidth=0,
                    label="allowed fill level", step="mid")
    if opt.schedule is not None:
        lvl = _d(opt.schedule.fill_level, system)
        ax.plot(steps, lvl, color=COLOURS["planned"], drawstyle="steps-mid",
                label="planned fill level")
    sh = _d(w.shoe_depth, system)
    ax.plot(steps, sh, color="#808080", linestyle=":", linewidth=1.0, label="shoe depth")
    _depth_axis(ax, system)
    ax.set_ylabel(f"depth of the fill surface [{U.unit_label('length', system)}]")
    ax.set_xlabel("joints in the hole")
    ax.legend(loc="lower left")
    return fig


#: figure key -> builder(landing, plan, system)
FIGURES = {
    "schematic": lambda lp, plan, system: schematic_figure(lp, plan, system),
    "hook_load": lambda lp, plan, system: hook_load_figure(lp, system),
    "utilization": lambda lp, plan, system: utilization_figure(lp, system),
    "fill_window": lambda lp, plan, system: fill_window_figure(lp, system),
}


def make(key: str, landing, plan, system: str):
    """Build the figure named ``key`` under the packet's rc settings."""
    with matplotlib.rc_context(RC):
        return FIGURES[key](landing, plan, system)


def svg(fig) -> str:
    """The figure as an inline ``<svg>`` element (no XML prolog, no date)."""
    buf = io.StringIO()
    with matplotlib.rc_context(RC):
        fig.savefig(buf, format="svg", metadata={"Date": None, "Creator": None})
    text = buf.getvalue()
    start = text.find("<svg")
    return text[start:]
