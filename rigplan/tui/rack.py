"""The rack and old-casing screen: the best running order, and the caliper view of a liner job.

Shows what ``rigplan.files.linerjob`` returns (the engine's placement and
liner checks), worded by ``rigplan.present.rack``; computes nothing itself.
"""

from __future__ import annotations

import numpy as np
from rich.markup import escape
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, VerticalScroll
from textual.screen import Screen
from textual.widgets import DataTable, Footer, Static

from rigplan.errors import InputError
from rigplan.present import wording as P
from rigplan.present import rack as R


class RackScreen(Screen):
    """Running order of the gauged rack, and the old casing from its caliper log."""

    BINDINGS = [
        Binding("escape,q", "app.pop_screen", "Back", id="rack.back"),
        Binding("o", "write_order", "Write proposed tally", id="rack.write"),
    ]

    def __init__(self, session):
        super().__init__(id="rack-screen")
        self.session = session
        self.placement = None
        self.liner = None

    def compose(self) -> ComposeResult:
        with VerticalScroll(id="rack-body"):
            yield Static("Running order of the rack", classes="section-title", markup=False)
            yield Static("", id="rack-order", markup=False)
            yield Static("Old casing (caliper log)", classes="section-title", markup=False)
            yield Static("", id="rack-liner", markup=False)
            from textual_plot import PlotWidget   # about 0.6 s: only when this screen opens
            with Horizontal(id="rack-charts"):
                yield PlotWidget(id="rack-chart-e")
                yield PlotWidget(id="rack-chart-c")
            yield DataTable(id="rack-profile", zebra_stripes=True, cursor_type="row")
        from rigplan.present.wording import CAUTION
        yield Static(CAUTION, id="rack-caution", markup=False)
        yield Footer()

    def on_mount(self) -> None:
        self.refresh_view()

    def refresh_view(self) -> None:
        s = self.session
        system = s.units
        order = self.query_one("#rack-order", Static)
        liner = self.query_one("#rack-liner", Static)
        if s.landing is None:
            order.update(f"No plan: {s.error}")
            liner.update("")
            return
        from rigplan.files.linerjob import liner_job, running_order_for
        try:
            self.placement = running_order_for(s.plan, s.rig, s.path_name)
            tallied = [j.label for j in s.plan.running_joints()]
            order.update("\n".join(R.placement_lines(self.placement, tallied, system))
                         + ("\no: write the proposed order as a tally beside the plan"
                            if self.placement.moved else ""))
        except InputError as exc:
            order.update(f"No running order: {exc}")
        from rigplan.files.formats.linerfile import read_existing_casing
        try:
            spec = read_existing_casing(s.plan_path)
            if spec is None:
                liner.update("This plan has no [existing_casing] table: not a liner job.")
                self._show_liner(False)
                return
            self.liner = liner_job(s.plan_path, s.plan, s.landing)
        except InputError as exc:
            liner.update(f"Old casing: {exc}")
            self._show_liner(False)
            return
        self._show_liner(True)
        liner.update("\n".join(R.liner_lines(self.liner, system) + [R.CAUTION_OLD_CASING]))
        self._charts(system)
        table = self.query_one("#rack-profile", DataTable)
        table.clear(columns=True)
        table.add_columns("depth", "mean ID", "smallest ID", "ellipticity", "collapse rating",
                          "clearance")
        for row in R.liner_profile_rows(self.liner, system):
            table.add_row(*row)

    def _show_liner(self, shown: bool) -> None:
        """Charts and the profile table only for a liner job (no empty axes)."""
        self.query_one("#rack-charts").display = shown
        self.query_one("#rack-profile").display = shown

    def _charts(self, system: str) -> None:
        from textual_plot import HiResMode, PlotWidget
        from rigplan.tui.charts import DepthFormatter
        a = self.liner.assessment
        depth = -np.asarray(P.to_display(a.shape.depth, "length", system), dtype=float)
        l_unit = P.unit("length", system)
        for box, x, label, colour in (
                ("#rack-chart-e", 100.0 * a.shape.ellipticity, "ellipticity [%]", "bright_cyan"),
                ("#rack-chart-c", np.asarray(P.to_display(a.rating, "pressure", system), float),
                 f"collapse rating [{P.unit('pressure', system)}]", "bright_yellow")):
            plot = self.query_one(box, PlotWidget)
            plot.clear()
            plot.plot(x, depth, line_style=colour, hires_mode=HiResMode.BRAILLE)
            plot.set_xlabel(escape(label))
            plot.set_ylabel(escape(f"depth [{l_unit}]"))
            plot.set_y_formatter(DepthFormatter())

    def action_write_order(self) -> None:
        if self.placement is None or not self.placement.moved:
            self.notify("The tallied order is already the best: nothing to write.")
            return
        from rigplan.files.formats.tally import write_tally
        from rigplan.files.linerjob import free_path, placed_tally_rows
        s = self.session
        out = free_path(s.plan_path.with_name(s.plan_path.stem + ".placed.tally.csv"))
        try:
            write_tally(placed_tally_rows(s.plan, self.placement), out, s.units,
                        comment=f"Running order proposed for {s.plan.name}: joint 1 first.")
        except OSError as err:
            self.notify(f"Cannot write {out}: {err.strerror or err}", severity="error")
            return
        self.notify(f"Wrote {out.name}: import it with t to run in that order.")
