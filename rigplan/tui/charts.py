"""Charts tab (textual-plot): imported only when the tab is first shown.

* hook load against shoe depth over the running steps, with the path's
  hook-load limit and the weight readings taken;
* the fill window: shallowest and deepest allowed fill level and the
  planned level at each step;
* utilization per joint (tension, collapse) with the limit at 1.

Depth is plotted downward as a negative number and labelled positive.
Every series is the engine's, converted to display units.
"""

from __future__ import annotations

import numpy as np
from rich.markup import escape
from textual.app import ComposeResult
from textual.containers import Horizontal, Vertical
from textual.widgets import Static
from textual_plot import HiResMode, LegendLocation, NumericAxisFormatter, PlotWidget

from rigplan.present import wording as P


class DepthFormatter(NumericAxisFormatter):
    """Ticks of a downward depth axis (values plotted as -depth) shown positive."""

    def get_labels_for_ticks(self, ticks):
        labels = super().get_labels_for_ticks(ticks)
        out = []
        for label in labels:
            text = label[1:] if label.startswith("-") else label
            out.append("0" if text.strip("0.") == "" else text)
        return out


class ChartsView(Vertical):
    """The three charts side by side."""

    def compose(self) -> ComposeResult:
        yield Static("", id="charts-note", classes="line dim", markup=False)
        with Horizontal(id="charts-row"):
            yield PlotWidget(id="chart-hook")
            with Vertical(id="charts-right"):
                yield PlotWidget(id="chart-fill")
                yield PlotWidget(id="chart-util")

    def show(self, session) -> None:
        lp = session.landing
        sys_ = session.units
        hook = self.query_one("#chart-hook", PlotWidget)
        fill = self.query_one("#chart-fill", PlotWidget)
        util = self.query_one("#chart-util", PlotWidget)
        for p in (hook, fill, util):
            p.clear()
        note = self.query_one("#charts-note", Static)
        if lp is None:
            note.update(f"No plan to chart: {session.error}")
            return
        f_unit = P.unit("force", sys_)
        l_unit = P.unit("length", sys_)
        shoe = P.to_display(np.asarray(lp.chosen.loads.shoe_depth, dtype=float), "length", sys_)
        load = P.to_display(np.asarray(session.step_hook_loads(), dtype=float), "force", sys_)

        hook.set_xlabel(escape(f"hook load [{f_unit}]"))
        hook.set_ylabel(escape(f"shoe depth [{l_unit}]"))
        hook.set_y_formatter(DepthFormatter())
        hook.plot(load, -shoe, line_style="bright_cyan", hires_mode=HiResMode.BRAILLE,
                  label="planned hook load")
        limit = float(P.to_display(lp.path.hook_limit, "force", sys_))
        if np.isfinite(limit):
            hook.add_v_line(limit, line_style="bright_red", label=f"hook limit ({lp.path.path})")
        obs = [o for o in session.state.observations if 1 <= o.step <= len(shoe)]
        if obs:
            hook.scatter([P.to_display(o.hook_load_n, "force", sys_) for o in obs],
                         [-shoe[o.step - 1] for o in obs], marker="x",
                         marker_style="bright_yellow", label="readings")
        hi = max(float(np.nanmax(load)), limit if np.isfinite(limit) else 0.0)
        lo = min(float(np.nanmin(load)), 0.0)
        hook.set_xlimits(lo - 0.05 * (hi - lo), hi + 0.08 * (hi - lo))
        hook.show_legend(LegendLocation.TOPRIGHT)

        steps = np.arange(1, lp.joints.n + 1, dtype=float)
        fill.set_xlabel(escape("joints in the hole"))
        fill.set_ylabel(escape(f"fill level [{l_unit}]"))
        fill.set_y_formatter(DepthFormatter())
        bf = lp.best_float
        if bf is not None:
            w = bf.window
            fill.plot(steps, -P.to_display(np.asarray(w.min_fill_level, float), "length", sys_),
                      line_style="green", hires_mode=HiResMode.BRAILLE, label="shallowest allowed")
            fill.plot(steps, -P.to_display(np.asarray(w.max_fill_level, float), "length", sys_),
                      line_style="bright_red", hires_mode=HiResMode.BRAILLE, label="deepest allowed")
            fill.plot(steps, -P.to_display(np.asarray(bf.schedule.fill_level, float), "length", sys_),
                      line_style="bright_cyan", hires_mode=HiResMode.BRAILLE, label="planned level")
            fill.plot(steps, -shoe, line_style="grey50", label="shoe")
            fill.show_legend(LegendLocation.BOTTOMLEFT)
        else:
            fill.plot(steps, -shoe, line_style="grey50", label="shoe (no float: no fill window)")
            fill.show_legend(LegendLocation.BOTTOMLEFT)

        util.set_xlabel(escape("joint (1 = bottom)"))
        util.set_ylabel(escape("utilization"))
        t_u = np.asarray(lp.chosen.tension_utilization, float)
        c_u = np.asarray(lp.chosen.collapse_utilization, float)
        util.plot(steps, t_u, line_style="bright_cyan", hires_mode=HiResMode.BRAILLE, label="tension")
        util.plot(steps, c_u, line_style="bright_magenta", hires_mode=HiResMode.BRAILLE,
                  label="collapse")
        util.plot([steps[0], steps[-1]], [1.0, 1.0], line_style="bright_red", label="limit")
        util.set_ylimits(0.0, None)
        util.show_legend(LegendLocation.TOPRIGHT)
        unrated_t = int(np.isnan(t_u).sum())
        unrated_c = int(np.isnan(c_u).sum())
        parts = [f"Verdict: {lp.verdict.value}"]
        if unrated_t or unrated_c:
            parts.append(f"unrated (not drawn): tension {unrated_t} joints, collapse {unrated_c} joints")
        parts.append("focus a chart (Tab) to zoom with + and -, pan with the arrows, r resets")
        note.update("   ".join(parts))
