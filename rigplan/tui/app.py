"""The rigplan terminal app: plan, run and record a casing or screen string.

:func:`run_app` is what the command line calls; :func:`build_app` makes the
app for tests.  The app shows what the engine returns (through
:class:`rigplan.tui.session.JobSession`) and computes no physics.  Every
run, set-aside, undo and weight reading is committed to the run log as it is
entered; opening the same plan again resumes from the log.

textual-plot is imported only when the Charts tab is first shown.
"""

from __future__ import annotations

import gc
from pathlib import Path

from textual.app import App, ComposeResult
from textual.containers import Vertical
from textual.screen import ModalScreen
from textual.widgets import Footer, Header, Static, TabbedContent, TabPane

from rigplan.files import units as U
from rigplan.errors import InputError
from rigplan.files import ranges
from rigplan.files.job import LENGTH_WARNING
from rigplan.files.runlog import RunLogWriteError
from rigplan.present import wording as P
from rigplan.tui.commands import (CHARTS, GLOBAL, PALETTE, RUNNING, TALLY, RigplanCommands,
                                  bindings, help_sections)
from rigplan.tui.dialogs import ConfirmScreen, HelpScreen, PromptScreen, QuitScreen
from rigplan.tui.panes import RigPane, RunningPane, TallyPane
from rigplan.tui.schematic import OverviewWithSchematic
from rigplan.tui.session import EDITABLE_FIELDS, JobSession

TABS = ("overview", "tally", "running", "charts", "rig")
_CONTEXT_TABS = {RUNNING: ("overview", "running"), TALLY: ("tally",), CHARTS: ("charts",)}
_CONTEXT_OF = {a.name: a.context for a in PALETTE}
_HOME_TAB = {RUNNING: "running", TALLY: "tally", CHARTS: "charts"}


class ChartsPane(Vertical):
    """Holds the charts once loaded (textual-plot is imported on first show)."""

    def __init__(self, **kwargs):
        super().__init__(**kwargs)
        self.view = None

    def compose(self) -> ComposeResult:
        yield Static("Charts load when this tab is first shown.", id="charts-placeholder", markup=False)

    async def load(self) -> bool:
        """Import the plot library and mount the charts; True the first time."""
        if self.view is not None:
            return False
        from rigplan.tui.charts import ChartsView
        await self.query_one("#charts-placeholder").remove()
        self.view = ChartsView(id="charts-view")
        await self.mount(self.view)
        self.view.fit(self.app.size.width, self.app.size.height)
        return True

    def show(self, session) -> None:
        if self.view is not None:
            self.view.show(session)


class RigplanApp(App):
    """Terminal app for one job (a string plan on a rig)."""

    CSS_PATH = "rigplan.tcss"
    TITLE = "rigplan"
    BINDINGS = bindings()
    COMMANDS = App.COMMANDS | {RigplanCommands}

    def __init__(self, session: JobSession):
        super().__init__()
        self.session = session
        self._stale = set(TABS)

    # -- layout --------------------------------------------------------------

    #: Seconds between looks at the run log when following another writer.
    FOLLOW_INTERVAL = 1.0

    def compose(self) -> ComposeResult:
        yield Header()
        yield Static("", id="read-only-banner", markup=False)
        yield Static("", id="weight-alarm", markup=False)
        with TabbedContent(initial="overview", id="tabs"):
            with TabPane("1 Overview", id="overview"):
                yield OverviewWithSchematic(id="overview-pane")
            with TabPane("2 String & tally", id="tally"):
                yield TallyPane(id="tally-pane")
            with TabPane("3 Running", id="running"):
                yield RunningPane(id="running-pane")
            with TabPane("4 Charts", id="charts"):
                yield ChartsPane(id="charts-pane")
            with TabPane("5 Rig", id="rig"):
                yield RigPane(id="rig-pane")
        yield Static(P.CAUTION, id="caution", markup=False)
        yield Footer()

    def on_mount(self) -> None:
        self._tabs = self.query_one("#tabs", TabbedContent)
        self._caution = self.query_one("#caution", Static)
        self._panes = {tab: self.query_one(f"#{tab}-pane") for tab in TABS}
        self._banner = self.query_one("#read-only-banner", Static)
        self._alarm = self.query_one("#weight-alarm", Static)
        self._alarm_acked = None
        self._fit(self.size.width, self.size.height)
        self.refresh_views()
        self._calm_collector()
        self.set_interval(self.FOLLOW_INTERVAL, self.follow_log)

    def on_unmount(self) -> None:
        self.session.close()
        self._restore_collector()

    def _calm_collector(self) -> None:
        """While the app runs: the widgets and the plan built so far live for
        the whole session, so they are moved out of the garbage collector's
        sight, and young collections are made rarer (each re-plan allocates
        many short-lived arrays).  A full collection then no longer stalls a
        keystroke on site.  Undone when the app closes, so the process is
        left as it was found (tests run many apps in one process)."""
        self._gc_threshold = gc.get_threshold()
        gc.collect()
        gc.freeze()
        gc.set_threshold(50_000, 50, 1000)

    def _restore_collector(self) -> None:
        threshold = getattr(self, "_gc_threshold", None)
        if threshold is not None:
            gc.set_threshold(*threshold)
            gc.unfreeze()
            self._gc_threshold = None

    #: Below this width or height [cells] the screens use their compact
    #: layout (80x24 is the smallest terminal planned for).
    COMPACT = (100, 30)

    def on_resize(self, event) -> None:
        self._fit(event.size.width, event.size.height)
        if hasattr(self, "_tabs"):
            self.refresh_views()

    def _fit(self, width: int, height: int) -> None:
        self.screen_stack[0].set_class(width < self.COMPACT[0] or height < self.COMPACT[1],
                                       "compact")
        if hasattr(self, "_panes") and self._panes["charts"].view is not None:
            self._panes["charts"].view.fit(width, height)

    def follow_log(self) -> None:
        """Read-only copy: show the writer's new entries; take over as the
        writer once the other copy has closed."""
        s = self.session
        if not s.read_only:
            return
        try:
            changed = s.follow()
        except (InputError, OSError) as exc:
            self._banner.update(f"{s.read_only_text()}  (cannot read the run log: {exc})")
            return
        if not s.read_only:
            self.refresh_views()
            self.notify("The other copy of rigplan has closed: this one now records the job.",
                        timeout=8)
        elif changed:
            self.refresh_views()

    @property
    def active_tab(self) -> str:
        return self._tabs.active

    def _pane(self, tab: str):
        return self._panes[tab]

    def refresh_views(self) -> None:
        """Redraw the visible tab now; the others when next shown."""
        s = self.session
        lp = s.landing
        self.sub_title = (("EDITED, NOT SAVED  |  " if s.dirty else "")
                          + ("READ-ONLY  |  " if s.read_only else "")
                          + f"{s.plan.name}" + (f", well {s.plan.well}" if s.plan.well else "")
                          + f"  |  rig {s.rig.name}"
                          + (f", path {lp.path.path}" if lp is not None else "")
                          + f"  |  {'US field' if s.units == 'us' else 'SI'} units")
        self._caution.update(P.cautions_text(lp))
        banner = s.read_only_text()
        self._banner.update(banner)
        self._banner.display = bool(banner)
        self._show_alarm()
        self._stale = set(TABS)
        self._show(self.active_tab)

    def _alarm_id(self):
        """The run-log id of the latest reading when it is outside its band."""
        s = self.session
        check = s.last_check
        if check is None or not check.outside or not s.state.observations:
            return None
        return s.state.observations[-1].id

    def _show_alarm(self) -> None:
        """A reading outside its band stays in a bar at the top of every tab
        until acknowledged (a) or replaced by the next reading."""
        alarm = self._alarm_id()
        shown = alarm is not None and alarm != self._alarm_acked
        if shown:
            self._alarm.update(P.alarm_line(self.session.last_check, self.session.units))
        self._alarm.display = shown

    def action_acknowledge(self) -> None:
        alarm = self._alarm_id()
        if alarm is None or alarm == self._alarm_acked:
            self.notify("No weight alarm to acknowledge.", timeout=3)
            return
        self._alarm_acked = alarm
        self._show_alarm()

    def _show(self, tab: str) -> None:
        self._pane(tab).show(self.session)
        self._stale.discard(tab)

    async def on_tabbed_content_tab_activated(self, event: TabbedContent.TabActivated) -> None:
        tab = event.pane.id
        if tab == "charts" and await self._pane("charts").load():
            self._stale.add("charts")
        if tab in self._stale:
            self._show(tab)
        # focus inside the shown pane: focus left in a hidden pane would
        # bring its tab back
        if tab == "tally":
            self._pane("tally").table.focus()
        elif tab == "running":
            self._pane("running").table.focus()
        elif tab == "charts":
            self._pane("charts").view.query_one("#chart-hook").focus()
        else:
            self.set_focus(None)
        self.refresh_bindings()

    def check_action(self, action: str, parameters) -> bool | None:
        ctx = _CONTEXT_OF.get(action)
        if ctx is None:
            return True
        if isinstance(self.screen, ModalScreen) or not hasattr(self, "_tabs"):
            return False  # a dialog is open: its own keys only
        if ctx in _CONTEXT_TABS:
            return self.active_tab in _CONTEXT_TABS[ctx]
        return True

    async def run_from_palette(self, action: str) -> None:
        """Command palette: go to the action's tab first, then run it."""
        ctx = _CONTEXT_OF.get(action.split("(")[0], GLOBAL)
        if ctx in _CONTEXT_TABS and self.active_tab not in _CONTEXT_TABS[ctx]:
            self._tabs.active = _HOME_TAB[ctx]
        await self.run_action(action)

    # -- helpers -------------------------------------------------------------

    def notify(self, message: str, *, title: str = "", severity="information",
               timeout: float | None = None, markup: bool = False) -> None:
        """Notifications show text as written (labels and paths may hold brackets)."""
        super().notify(message, title=title, severity=severity, timeout=timeout, markup=markup)

    def _error(self, exc: Exception) -> None:
        self.notify(str(exc), severity="error", timeout=8)

    def _committed(self, message: str) -> None:
        self.refresh_views()
        self.notify(message, timeout=4)

    # -- global actions -----------------------------------------------------

    def action_show_tab(self, tab: str) -> None:
        self._tabs.active = tab

    def action_toggle_units(self) -> None:
        system = self.session.toggle_units()
        self.refresh_views()
        self.notify(f"Units: {'US field' if system == 'us' else 'SI'}", timeout=2)

    def action_next_path(self) -> None:
        name = self.session.cycle_path()
        self.refresh_views()
        self.notify(f"Planning with hoisting path {name!r}", timeout=3)

    def action_job_settings(self) -> None:
        """Change a job setting (fluids, float equipment, design factors,
        weights, rig profile); the plan is recomputed at once."""
        from rigplan.tui.dialogs import ChoiceScreen
        from rigplan.tui.session import JOB_SETTINGS
        s = self.session
        choices = [(key, f"{title}: {s.setting_text(key)}")
                   for key, (title, _, _) in JOB_SETTINGS.items()]

        def picked(key) -> None:
            if key is not None:
                self.action_edit_setting(key)

        self.push_screen(ChoiceScreen("Job settings", choices, choice_id="settings"), picked)

    def action_edit_setting(self, key: str) -> None:
        """Change one job setting by name (from the settings list or the palette)."""
        from rigplan.tui.session import JOB_SETTINGS
        s = self.session
        title, kind, hint = JOB_SETTINGS[key]
        if kind not in (None, "dimensionless"):
            hint = (hint + "; " if hint else "") + (
                f"a bare number is in {P.unit(kind, s.units)} ({U.describe(kind)})")
        if key == "rig":
            self.push_screen(PromptScreen(title, value=s.setting_text(key), hint=hint,
                                          parse=s.change_rig, prompt_id="prompt-setting"),
                             lambda name: name is not None and self._committed(
                                 f"Planning with rig {name}"))
            return

        def apply(plan) -> None:
            s.apply_plan(plan)
            self._committed(f"{title} changed (not saved yet: s on the String tab saves)")

        def done(plan) -> None:
            if plan is None:
                return
            if not s.step:
                apply(plan)
                return
            # Mid-run: say what changes before it takes effect.
            try:
                after = s.preview(plan)
            except InputError as exc:
                self._error(exc)
                return
            lines = P.change_lines(s.landing, after, s.step, s.units)
            self.push_screen(ConfirmScreen(f"Change {title.lower()}?\n" + "\n".join(lines),
                                           yes="Change", no="Keep as it is"),
                             lambda yes: yes and apply(plan))

        self.push_screen(PromptScreen(title, value=s.setting_text(key), hint=hint,
                                      parse=lambda t: s.edited_setting(key, t),
                                      prompt_id="prompt-setting"), done)

    def action_next_chart(self) -> None:
        view = self._pane("charts").view
        if view is None:
            return
        name = view.next_chart()
        view.show(self.session)
        self.notify(f"Chart: {name}", timeout=2)

    def action_rack(self) -> None:
        from rigplan.tui.rack import RackScreen
        self.push_screen(RackScreen(self.session))

    def action_help(self) -> None:
        self.push_screen(HelpScreen(help_sections()))

    def action_write_packet(self) -> None:
        """Write the job packet (PDF) beside the plan, in a worker (about a second)."""
        self.notify("Writing the job packet ...", timeout=3)
        self.run_worker(self._write_packet, thread=True, exclusive=True, group="packet")

    def _write_packet(self) -> None:
        from rigplan.tui.session import write_packet
        try:
            out = write_packet(self.session)
        except (InputError, OSError, ValueError) as exc:
            self.call_from_thread(self._error, exc)
            return
        self.call_from_thread(self.notify, f"Job packet written to {out.name}", timeout=8)

    def action_export_tally(self) -> None:
        try:
            path = self.session.export_tally()
        except (InputError, OSError) as exc:
            self._error(exc)
            return
        self.notify(f"Tally written to {path}", timeout=8)

    async def action_quit(self) -> None:
        if not self.session.dirty:
            self.exit()
            return

        def answer(choice) -> None:
            if choice == "save":
                try:
                    self.session.save_plan()
                except (InputError, OSError, ValueError) as exc:
                    self._error(exc)
                    return
                self.exit()
            elif choice == "discard":
                self.exit()

        self.push_screen(QuitScreen(id="quit"), answer)

    # -- running -------------------------------------------------------------

    def _read_only(self) -> bool:
        """Refuse an entry in a read-only session (another app records)."""
        if self.session.read_only:
            self.notify(self.session.read_only_text(), severity="warning", timeout=8)
            return True
        return False

    def action_record_run(self) -> None:
        s = self.session
        if self._read_only():
            return
        nxt = s.next_joint()
        if nxt is None:
            self.notify("Every joint of the plan is in the hole.", severity="warning")
            return
        unit = P.unit("length", s.units)
        default = P.plain(nxt.length, "length", s.units, 2)
        caution = ""
        if s.landing is None:
            caution = "  There is no plan (see the Overview): record only what was run."
        elif not s.landing.lands:
            caution = f"  The plan says: {s.landing.verdict.value}."

        def parse(text: str):
            t = text.strip()
            if t in (default, ""):
                # nothing typed: the planned length stands, nothing measured
                length, basis = None, "planned"
            else:
                force = t.endswith("!")
                v = U.parse(t.rstrip("!").strip(), "length", unit,
                            f"{nxt.label} measured length")
                ranges.check("joint_length", v, f"{nxt.label} measured length", t, s.units)
                if not force and not LENGTH_WARNING[0] * nxt.length <= v <= LENGTH_WARNING[1] * nxt.length:
                    raise InputError(f"{nxt.label} measured length",
                                     f"{P.fmt(v, 'length', s.units, 2)} is far from the planned "
                                     f"{default}: check the tape (end the entry with ! to keep it)")
                length, basis = v, "measured"
            # committed here: a write error keeps the prompt open with the text
            event_id = s.record_run(length, basis=basis)
            return (event_id, length, basis)

        def done(result) -> None:
            if result is None:
                return
            event_id, length, basis = result
            shown = (P.fmt(length, "length", s.units) + " measured" if basis == "measured"
                     else f"planned {default}, not measured")
            self._committed(f"{nxt.label} in the hole ({shown}), entry {event_id}")

        self.push_screen(PromptScreen(
            f"{nxt.label} goes in the hole: measured length",
            value=default,
            hint=f"Type the length taped.  Enter on {default} records the planned length "
                 f"(marked planned, not measured).  A bare number is in {unit}; "
                 "20 ft 6 in, 20' 6\" or 6.25 m also work." + caution,
            parse=parse, prompt_id="prompt-run"), done)

    def action_undo(self) -> None:
        s = self.session
        if self._read_only():
            return
        last = s.last_undoable()
        if last is None:
            self.notify("Nothing to undo.", severity="warning")
            return
        if last.kind == "run":
            basis = last.length_basis
            what = f"the run of {last.label}" + (
                f" ({P.fmt(last.value, 'length', s.units)} measured)"
                if basis == "measured" and last.value is not None else " (planned length)")
        elif last.kind == "observe":
            what = (f"the weight reading {P.fmt(last.value, 'force', s.units)} "
                    f"with {last.step} joints in the hole")
        else:
            what = f"setting {last.label} aside ({last.note})"

        def done(yes) -> None:
            if not yes:
                return
            try:
                event_id = s.undo()
            except (RunLogWriteError, InputError) as exc:
                self._error(exc)
                return
            self._committed(f"Undone: {what} (entry {event_id})")

        self.push_screen(ConfirmScreen(f"Undo {what}?"), done)

    def _reject_target(self):
        s = self.session
        if self.active_tab == "running":
            label = self._pane("running").cursor_label()
            if label is not None and not s.in_hole(label) and not s.set_aside(label):
                spec = s.joint(label)
                if not spec.rejected:
                    return spec
        return s.next_joint()

    def action_reject(self) -> None:
        s = self.session
        if self._read_only():
            return
        target = self._reject_target()
        if target is None:
            self.notify("No joint left to set aside.", severity="warning")
            return

        def parse(text: str):
            if not text.strip():
                raise InputError("reason", "give the reason the joint is set aside "
                                           "(e.g. dented pin end, bad thread, short)")
            reason = text.strip()
            return s.reject(target.label, reason), reason

        def done(result) -> None:
            if result is None:
                return
            event_id, reason = result
            self._committed(f"{target.label} set aside: {reason} (entry {event_id})")

        self.push_screen(PromptScreen(f"Set {target.label} aside: reason", parse=parse,
                                      prompt_id="prompt-reject"), done)

    def action_observe(self) -> None:
        s = self.session
        if self._read_only():
            return
        unit = P.unit("force", s.units)
        predicted = s.predicted_hook_load()
        top = s.hook_rating()

        def parse(text: str):
            value = s.reading_value(text)
            return s.observe(value)

        def done(result) -> None:
            if result is None:
                return
            event_id, check = result
            self.refresh_views()
            head, causes = P.weight_text(check, s.units)
            if check is not None and check.outside:
                self.notify(head + "\n" + "\n".join(causes), title="Weight off the plan",
                            severity="warning", timeout=15)
            else:
                self.notify(f"Reading recorded (entry {event_id}). {head}", timeout=5)

        self.push_screen(PromptScreen(
            f"Weight indicator: hook load with {s.step} joints in the hole",
            hint=(f"Planned now: {P.fmt(predicted, 'force', s.units)}." if predicted is not None
                  else "No planned hook load to compare with (no plan).")
            + f"  A bare number is in {unit}; from 0 to the rig's hook rating"
            + (f" ({P.fmt(top, 'force', s.units)})." if top == top else ".")
            + "  z undoes a reading.",
            parse=parse, prompt_id="prompt-weight"), done)

    def action_band(self) -> None:
        s = self.session
        self.push_screen(PromptScreen(
            "Weight band: how far a reading may be from the plan",
            value=s.band_text().replace("+/- ", ""),
            hint="A percentage of the planned hook load (10 %) or a force (2000 lbf, 9 kN).",
            parse=s.set_band, prompt_id="prompt-band"),
            lambda r: r is not None and self._committed(f"Weight band {r}"))

    # -- tally edits ---------------------------------------------------------

    def _tally(self) -> TallyPane:
        return self._pane("tally")

    def on_data_table_cell_selected(self, event) -> None:
        if event.data_table.id == "tally-table":
            event.stop()
            self.action_edit_cell()

    def action_edit_cell(self) -> None:
        label, field = self._tally().cursor_cell()
        if label is None:
            return
        if field not in EDITABLE_FIELDS:
            self.notify(f"{field.replace('_', ' ')} comes from the planner; edit the joint's "
                        "entered data instead", severity="warning")
            return
        s = self.session
        title = next(t for k, t, _, _ in P.TALLY_COLUMNS if k == field)
        how, what = EDITABLE_FIELDS[field]
        if how == "choice":
            hint = "One of: " + ", ".join(what)
        elif how == "material":
            from rigplan.engine import materials
            hint = "One of: " + ", ".join(materials.known_keys())
        elif how in ("quantity", "optional_quantity"):
            hint = (f"A bare number is in {P.unit(what, s.units)}; a unit may be given "
                    f"({U.describe(what)})" + ("; empty: not measured" if how != "quantity" else ""))
        else:
            hint = "A label not used by another joint"

        def done(plan) -> None:
            if plan is None:
                return
            s.apply_plan(plan)
            self._committed(f"{label}: {title.lower()} changed (not saved yet: s saves the plan)")

        self.push_screen(PromptScreen(f"{label}: {title}", value=P.edit_text(s, label, field),
                                      hint=hint, parse=lambda t: s.edited_plan(label, field, t),
                                      prompt_id="prompt-edit"), done)

    def action_insert_joint(self) -> None:
        label, _ = self._tally().cursor_cell()
        if label is None:
            return
        try:
            new = self.session.insert_after(label)
        except InputError as exc:
            self._error(exc)
            return
        self.refresh_views()
        self._tally().focus_row(new)
        self.notify(f"Inserted {new} above {label} (a copy of its planned data)", timeout=4)

    def action_delete_joint(self) -> None:
        label, _ = self._tally().cursor_cell()
        if label is None:
            return

        def done(yes) -> None:
            if not yes:
                return
            try:
                self.session.delete(label)
            except InputError as exc:
                self._error(exc)
                return
            self._committed(f"{label} taken out of the plan (not saved yet)")

        self.push_screen(ConfirmScreen(f"Take {label} out of the plan?"), done)

    def action_move_joint(self, delta: int) -> None:
        label, _ = self._tally().cursor_cell()
        if label is None:
            return
        try:
            self.session.move(label, int(delta))
        except InputError as exc:
            self._error(exc)
            return
        self.refresh_views()
        self._tally().focus_row(label)

    def action_import_tally(self) -> None:
        s = self.session
        default = s.plan_path.stem + ".tally.csv"
        self.push_screen(PromptScreen(
            "Import a tally CSV (measured lengths, set-asides)", value=default,
            hint=f"Path, relative to {s.plan_path.parent}",
            parse=s.import_tally, prompt_id="prompt-tally"),
            lambda n: n is not None and self._committed(f"Tally applied: {n} rows (not saved yet)"))

    def action_save_plan(self) -> None:
        try:
            path = self.session.save_plan()
        except (InputError, OSError, ValueError) as exc:
            self._error(exc)
            return
        self.refresh_views()
        kept = self.session.last_backup
        self.notify(f"Plan saved to {path}" + (f"; the previous version kept as {kept.name}"
                                               if kept else ""), timeout=6)




def build_app(plan_path, rig_path, path_name: str | None = None, units: str = "us",
              tally=None, **session_options) -> RigplanApp:
    """The app for a plan and a rig (raises InputError for bad files).

    ``tally``: a tally CSV applied at once (not saved), as ``t`` does.
    ``session_options`` go to :class:`JobSession` (``band_fraction``,
    ``band_force``).
    """
    session = JobSession(Path(plan_path), rig_path, path_name=path_name, units=units,
                         **session_options)
    if tally is not None:
        try:
            session.import_tally(Path(tally).resolve())
        except BaseException:
            session.close()
            raise
    return RigplanApp(session)


def run_app(plan_path, rig_path, path_name: str | None = None, units: str = "us",
            tally=None) -> None:
    """Open the terminal app on a plan and a rig and run it until the user quits.

    A damaged run log is never changed: the app first offers to set it aside
    (renamed, kept) and start a new one; refused, the error stands (one line).
    """
    from rigplan.files.runlog import RunLogDamaged
    from rigplan.tui.dialogs import DamagedLogApp
    try:
        app = build_app(plan_path, rig_path, path_name=path_name, units=units, tally=tally)
    except RunLogDamaged as exc:
        if DamagedLogApp(exc).run() is None:
            raise
        app = build_app(plan_path, rig_path, path_name=path_name, units=units, tally=tally)
    app.run()
