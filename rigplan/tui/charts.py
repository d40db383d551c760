"""Charts tab (textual-plot): imported only when the tab is first shown.

* hook load against shoe depth over the running steps: the planned run, the
  open-ended run beside it, the path's hook-load limit, the weight readings
  taken and a marker at the current step;
* the fill window: shallowest and deepest allowed fill level and the
  planned level at each step, with the current step marked;
* utilization per joint (tension, collapse) with the limit at 1.

Depth is plotted downward as a negative number and labelled positive.
Every series is the engine's, converted to display units by the
presentation layer.  Tick labels are spaced so they never run together, and
each chart's legend sits under it, outside the data.  In a small terminal
(narrower than :data:`WIDE` or lower than :data:`TALL`) one chart is shown at
a time; ``c`` shows the next.
"""

from __future__ import annotations

import numpy as np
from rich.markup import escape
from rich.text import Text
from textual.app import ComposeResult
from textual.containers import Horizontal, Vertical
from textual.widgets import Static
from textual_plot import HiResMode, NumericAxisFormatter, PlotWidget

from rigplan.present import wording as P

#: Below this width or height [cells] the tab shows one chart at a time.
WIDE, TALL = 110, 32

CHARTS = ("hook", "fill", "util")
TITLES = {"hook": "Hook load against shoe depth", "fill": "Fill window",
          "util": "Utilization per joint"}


class DepthFormatter(NumericAxisFormatter):
    """Ticks of a downward depth axis (values plotted as -depth) shown positive."""

    def get_labels_for_ticks(self, ticks):
        labels = super().get_labels_for_ticks(ticks)
        out = []
        for label in labels:
            text = label[1:] if label.startswith("-") else label
            out.append("0" if text.strip("0.") == "" else text)
        return out


class FittedFormatter(NumericAxisFormatter):
    """Ticks at nice intervals, no more than fit the axis: every label keeps
    at least two blanks from the next (thousands separators, depth shown
    positive when ``depth`` is set)."""

    def __init__(self, plot: PlotWidget, axis: str, depth: bool = False):
        self._plot = plot
        self._axis = axis
        self._depth = depth

    def _room(self) -> int:
        size = self._plot.size
        return max(size.width - 12, 10) if self._axis == "x" else max(size.height - 4, 3)

    def get_ticks(self, min_: float, max_: float, max_ticks: int = 8) -> list:
        if not (np.isfinite(min_) and np.isfinite(max_)) or max_ <= min_:
            return []
        eps = 1e-9 * (max_ - min_)
        ticks = [t for t in super().get_ticks(min_, max_, max_ticks)
                 if min_ - eps <= t <= max_ + eps]
        room = self._room()
        while len(ticks) > 2:
            if self._axis == "y":
                fits = len(ticks) <= room // 2 + 1
            else:
                widest = max(len(s) for s in self.get_labels_for_ticks(ticks))
                fits = len(ticks) * (widest + 2) <= room
            if fits:
                break
            ticks = ticks[::2]          # every other tick: still a nice spacing
        return ticks

    def get_labels_for_ticks(self, ticks) -> list:
        labels = []
        for text in super().get_labels_for_ticks(ticks):
            if self._depth and text.startswith("-"):
                text = text[1:]
            whole, _, frac = text.partition(".")
            sign = "-" if whole.startswith("-") else ""
            digits = whole.lstrip("-")
            if digits.isdigit() and len(digits) > 3:
                digits = f"{int(digits):,}"
            text = sign + digits + (f".{frac}" if frac else "")
            if text.strip("0.,") == "":
                text = "0"
            labels.append(text)
        return labels


class ChartsView(Vertical):
    """The three charts side by side, or one at a time in a small terminal."""

    def __init__(self, **kwargs):
        super().__init__(**kwargs)
        self.current = "hook"
        self.single = False

    def compose(self) -> ComposeResult:
        yield Static("", id="charts-note", classes="line dim", markup=False)
        with Horizontal(id="charts-row"):
            with Vertical(id="box-hook", classes="chart-box"):
                yield PlotWidget(id="chart-hook")
                yield Static("", id="legend-hook", classes="chart-legend")
            with Vertical(id="charts-right"):
                with Vertical(id="box-fill", classes="chart-box"):
                    yield PlotWidget(id="chart-fill")
                    yield Static("", id="legend-fill", classes="chart-legend")
                with Vertical(id="box-util", classes="chart-box"):
                    yield PlotWidget(id="chart-util")
                    yield Static("", id="legend-util", classes="chart-legend")

    def fit(self, width: int, height: int) -> None:
        """Show all charts, or only the current one in a small terminal."""
        self.single = width < WIDE or height < TALL
        self._arrange()

    def _arrange(self) -> None:
        for name in CHARTS:
            self.query_one(f"#box-{name}").display = not self.single or name == self.current
        self.query_one("#charts-right").display = (
            not self.single or self.current in ("fill", "util"))
        self.query_one("#box-hook").display = not self.single or self.current == "hook"

    def next_chart(self) -> str:
        """Show the next chart (one-at-a-time layout); return its name."""
        self.current = CHARTS[(CHARTS.index(self.current) + 1) % len(CHARTS)]
        self._arrange()
        plot = self.query_one(f"#chart-{self.current}", PlotWidget)
        if self.single:
            plot.focus()
        return self.current

    @staticmethod
    def _legend(box: Static, items) -> None:
        """A legend line under the chart: ``(marker, style, label)`` items."""
        text = Text()
        for marker, style, label in items:
            if text:
                text.append("   ")
            text.append(marker, style=style)
            text.append(f" {label}")
        box.update(text)

    def show(self, session) -> None:
        lp = session.landing
        sys_ = session.units
        hook = self.query_one("#chart-hook", PlotWidget)
        fill = self.query_one("#chart-fill", PlotWidget)
        util = self.query_one("#chart-util", PlotWidget)
        for p in (hook, fill, util):
            p.clear()
            p.show_legend(is_visible=False)
        note = self.query_one("#charts-note", Static)
        if lp is None:
            note.update(f"No plan to chart: {session.error}")
            return
        f_unit = P.unit("force", sys_)
        l_unit = P.unit("length", sys_)
        shoe = P.to_display(np.asarray(lp.chosen.loads.shoe_depth, dtype=float), "length", sys_)
        load = P.to_display(np.asarray(session.step_hook_loads(), dtype=float), "force", sys_)
        k = session.step

        # -- hook load against shoe depth
        hook.set_xlabel(escape(f"hook load [{f_unit}]"))
        hook.set_ylabel(escape(f"shoe depth [{l_unit}]"))
        hook.set_x_formatter(FittedFormatter(hook, "x"))
        hook.set_y_formatter(FittedFormatter(hook, "y", depth=True))
        legend = []
        planned_label, planned_style = "planned", "bright_cyan"
        hook.plot(load, -shoe, line_style=planned_style, hires_mode=HiResMode.BRAILLE,
                  label=planned_label)
        legend.append(("───", planned_style, planned_label))
        open_load = P.to_display(np.asarray(lp.open_check.loads.string_load, float)
                                 + lp.dead_load, "force", sys_)
        if not lp.chosen.closure.is_open:
            hook.plot(open_load, -shoe, line_style="bright_magenta",
                      hires_mode=HiResMode.BRAILLE, label="open-ended")
            legend.append(("───", "bright_magenta", "open-ended"))
        limit = float(P.to_display(lp.path.hook_limit, "force", sys_))
        if np.isfinite(limit):
            hook.add_v_line(limit, line_style="bright_red", label="hook limit")
            legend.append(("│", "bright_red", f"hook limit ({lp.path.path})"))
        obs = [o for o in session.state.observations if 1 <= o.step <= len(shoe)]
        if obs:
            hook.scatter([P.to_display(o.hook_load_n, "force", sys_) for o in obs],
                         [-shoe[o.step - 1] for o in obs], marker="x",
                         marker_style="bright_yellow", label="readings")
            legend.append(("x", "bright_yellow", "readings"))
        if 1 <= k <= len(shoe):
            hook.scatter([load[k - 1]], [-shoe[k - 1]], marker="◆",
                         marker_style="bold bright_white", label="now")
            legend.append(("◆", "bold bright_white", f"now: step {k}"))
        curves = [load] + ([open_load] if not lp.chosen.closure.is_open else [])
        hi = max(max(float(np.nanmax(c)) for c in curves), limit if np.isfinite(limit) else 0.0)
        lo = min(min(float(np.nanmin(c)) for c in curves), 0.0)
        # the limit line stays inside the scale
        hook.set_xlimits(lo - 0.05 * (hi - lo), hi + 0.08 * (hi - lo))
        self._legend(self.query_one("#legend-hook", Static), legend)

        # -- fill window
        steps = np.arange(1, lp.joints.n + 1, dtype=float)
        fill.set_xlabel(escape("joints in the hole"))
        fill.set_ylabel(escape(f"fill level [{l_unit}]"))
        fill.set_x_formatter(FittedFormatter(fill, "x"))
        fill.set_y_formatter(FittedFormatter(fill, "y", depth=True))
        legend = []
        bf = lp.best_float
        if bf is not None:
            w = bf.window
            for series, style, label in (
                    (w.min_fill_level, "green", "shallowest allowed"),
                    (w.max_fill_level, "bright_red", "deepest allowed"),
                    (bf.schedule.fill_level, "bright_cyan", "planned level")):
                fill.plot(steps, -P.to_display(np.asarray(series, float), "length", sys_),
                          line_style=style, hires_mode=HiResMode.BRAILLE, label=label)
                legend.append(("───", style, label))
            if 1 <= k <= len(steps):
                level = float(P.to_display(float(bf.schedule.fill_level[k - 1]), "length", sys_))
                if np.isfinite(level):
                    fill.scatter([float(k)], [-level], marker="◆",
                                 marker_style="bold bright_white", label="now")
                    legend.append(("◆", "bold bright_white", f"now: step {k}"))
        fill.plot(steps, -shoe, line_style="grey50", hires_mode=HiResMode.BRAILLE, label="shoe")
        legend.append(("───", "grey50", "shoe" if bf is not None
                       else "shoe (no float: no fill window)"))
        self._legend(self.query_one("#legend-fill", Static), legend)

        # -- utilization
        util.set_xlabel(escape("joint (1 = bottom)"))
        util.set_ylabel(escape("utilization"))
        util.set_x_formatter(FittedFormatter(util, "x"))
        util.set_y_formatter(FittedFormatter(util, "y"))
        t_u = np.asarray(lp.chosen.tension_utilization, float)
        c_u = np.asarray(lp.chosen.collapse_utilization, float)
        util.plot(steps, t_u, line_style="bright_cyan", hires_mode=HiResMode.BRAILLE,
                  label="tension")
        util.plot(steps, c_u, line_style="bright_magenta", hires_mode=HiResMode.BRAILLE,
                  label="collapse")
        util.plot([steps[0], steps[-1]], [1.0, 1.0], line_style="bright_red", label="limit")
        util.set_ylimits(0.0, None)
        self._legend(self.query_one("#legend-util", Static), [
            ("───", "bright_cyan", "tension"), ("───", "bright_magenta", "collapse"),
            ("───", "bright_red", "limit (1 = 100 %)")])

        unrated_t = int(np.isnan(t_u).sum())
        unrated_c = int(np.isnan(c_u).sum())
        parts = [f"Verdict: {lp.verdict.value}"]
        if unrated_t or unrated_c:
            parts.append(f"unrated (not drawn): tension {unrated_t} joints, collapse {unrated_c} joints")
        if self.single:
            parts.append(f"{TITLES[self.current]}; c: next chart")
        parts.append("focus a chart (Tab) to zoom with + and -, pan with the arrows, r resets")
        note.update("   ".join(parts))
