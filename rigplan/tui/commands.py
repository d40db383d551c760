"""Every action of the app in one list: key bindings, help and command palette.

The bindings, the help screen and the command palette are all built from
:data:`ACTIONS`, so a new action shows up in all three.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import partial

from textual.binding import Binding
from textual.command import DiscoveryHit, Hit, Provider

#: Where an action's key works (and shows in the footer).
GLOBAL, RUNNING, TALLY, CHARTS = "global", "running", "tally", "charts"


@dataclass(frozen=True)
class ActionSpec:
    """One action: the app action string, its keys, title, help and context."""

    action: str
    keys: str
    shown: str
    title: str
    help: str
    context: str = GLOBAL
    short: str = ""
    show: bool = True
    #: the trade's words the command palette finds it by, besides the title
    words: tuple = ()

    @property
    def footer(self) -> str:
        """Description in the footer (short)."""
        return self.short or self.title

    @property
    def name(self) -> str:
        """The action method name without arguments."""
        return self.action.split("(")[0]

    @property
    def binding_id(self) -> str:
        return "rigplan." + self.action.replace("(", ".").replace(")", "").replace("'", "")


ACTIONS = (
    ActionSpec("show_tab('overview')", "1", "1", "Overview",
               "Verdict, governing limit, hoisting path and the crew's next action", show=False,
               words=('verdict', 'next action', 'fill plan', 'margin', 'where it lands', 'screen depth')),
    ActionSpec("show_tab('tally')", "2", "2", "String and tally",
               "The joints in running order with their loads; edit the plan", short="String",
               show=False,
               words=('joints', 'string', 'tally', 'lengths', 'od', 'wall')),
    ActionSpec("show_tab('running')", "3", "3", "Running",
               "Record joints as they go in, weight readings, fill instructions", show=False,
               words=('run', 'fill', 'hook load', 'reading', 'landing')),
    ActionSpec("show_tab('charts')", "4", "4", "Charts",
               "Hook load against shoe depth, fill window, utilization per joint", show=False,
               words=('chart', 'plot', 'fill window', 'hook load', 'utilization')),
    ActionSpec("show_tab('rig')", "5", "5", "Rig",
               "Each hoisting path's components, their ratings and what governs", show=False,
               words=('hoisting', 'winch', 'mast', 'rope', 'elevator')),
    ActionSpec("record_run", "r", "r", "Record joint run",
               "The next joint went in the hole: asks its measured length (Enter keeps the "
               "planned length)", RUNNING, short="Run joint",
               words=('run joint', 'tally', 'tape', 'measured length', 'joint in the hole')),
    ActionSpec("undo", "z", "z", "Undo last entry",
               "Cancel the latest joint run or set aside (asks first)", RUNNING, short="Undo",
               words=('undo', 'cancel', 'mistake', 'reading', 'joint')),
    ActionSpec("reject", "j", "j", "Set joint aside",
               "Reject the selected (or next) joint, with a reason", RUNNING, short="Set aside",
               words=('reject', 'set aside', 'bad joint', 'dented', 'lay down')),
    ActionSpec("observe", "w", "w", "Weight reading",
               "Enter the weight indicator's hook load and compare it with the plan", RUNNING, short="Weight",
               words=('weight', 'reading', 'weight indicator', 'hook load')),
    ActionSpec("acknowledge", "a", "a", "Acknowledge weight alarm",
               "Clear the alarm bar of a reading outside the band (the reading stays in the "
               "run log)", short="Acknowledge", show=False,
               words=('alarm', 'acknowledge', 'weight', 'warning')),
    ActionSpec("band", "b", "b", "Weight band",
               "Set the agreement band for weight readings (10 % or a force)", RUNNING, short="Band",
               words=('band', 'tolerance', 'reading', 'weight')),
    ActionSpec("edit_cell", "e", "e/Enter", "Edit cell",
               "Change the selected cell of the string (planned data)", TALLY, short="Edit",
               words=('edit', 'length', 'od', 'wall', 'material', 'connection')),
    ActionSpec("insert_joint", "i", "i", "Insert joint",
               "Insert a copy of the selected joint above it", TALLY, short="Insert",
               words=('insert', 'add joint', 'pup')),
    ActionSpec("delete_joint", "d", "d", "Delete joint",
               "Take the selected joint out of the plan (asks first)", TALLY, short="Delete",
               words=('delete', 'remove joint')),
    ActionSpec("move_joint(-1)", "left_square_bracket", "[", "Move joint down the hole",
               "Move the selected joint one place earlier in the running order", TALLY, short="Down"),
    ActionSpec("move_joint(1)", "right_square_bracket", "]", "Move joint up the hole",
               "Move the selected joint one place later in the running order", TALLY, short="Up"),
    ActionSpec("import_tally", "t", "t", "Import tally CSV",
               "Apply measured lengths and set-asides from a tally sheet", TALLY, short="Import",
               words=('tally', 'import', 'csv', 'measured lengths', 'read')),
    ActionSpec("save_plan", "s", "s", "Save plan",
               "Write the edited plan over its file (atomic)", TALLY, short="Save",
               words=('save', 'write', 'plan file')),
    ActionSpec("export_tally", "x", "x", "Export tally CSV",
               "Write the site tally from the run log beside the plan", short="Export",
               words=('tally', 'export', 'csv', 'write')),
    ActionSpec("toggle_units", "u", "u", "Units US/SI",
               "Switch the display between US field units and SI", short="Units",
               words=('units', 'ppg', 'metric', 'feet', 'si', 'us')),
    ActionSpec("next_path", "p", "p", "Next hoisting path",
               "Plan with the rig's next hoisting path", short="Path",
               words=('hoisting path', 'line', 'top head', 'winch')),
    ActionSpec("job_settings", "g", "g", "Job settings",
               "Change the hole fluid, fill fluid, float equipment, design factors, running "
               "and set-down weights or the rig profile; the plan updates at once",
               short="Settings",
               words=('fill', 'float', 'density', 'mud', 'fluid', 'collar', 'shoe', 'valve', 'design factor', 'rig', 'settings', 'weight')),
    ActionSpec("rack", "k", "k", "Rack order and old casing",
               "Best running order of the gauged joints (rack placement); for a liner job the "
               "old casing from its caliper log: roundness, collapse rating, clearance",
               short="Rack",
               words=('rack', 'order', 'liner', 'caliper', 'old casing')),
    ActionSpec("next_chart", "c", "c", "Next chart",
               "Show the next chart (one at a time in a small terminal)", CHARTS, short="Chart",
               words=("chart", "plot", "fill window", "utilization")),
    ActionSpec("write_packet", "o", "o", "Write job packet (PDF)",
               "Write the job packet for the job file beside the plan (<plan>.packet.pdf): the "
               "plan, the schematic, charts, the crew sheet and, once joints are run, the record "
               "of the run; never over an existing file", short="Packet", show=False,
               words=("packet", "report", "pdf", "print", "job file")),
    ActionSpec("help", "question_mark,f1", "? F1", "Keys", "List every key",
               words=('keys', 'help')),
    ActionSpec("quit", "q", "q", "Quit", "Leave the app (the run log is already saved)",
               words=('quit', 'exit', 'leave')),
)

#: Keys of the widgets themselves, for the help screen.
WIDGET_KEYS = (
    ("Tables", (("arrows, PgUp/PgDn", "move the cursor"),
                ("Enter", "edit the selected cell (string table)"))),
    ("Charts (when a chart has focus)", (("+ / -", "zoom"), ("arrows", "pan"),
                                          ("r", "reset the scales"), ("Tab", "next chart"))),
    ("Anywhere", (("ctrl+p", "command palette: every action by name"),
                  ("Tab / shift+Tab", "move focus"))),
)


def _setting_actions() -> tuple:
    """One palette entry per job setting (no key of its own: ``g`` lists them)."""
    from rigplan.tui.session import JOB_SETTINGS
    extra = {"fill_density": ("fill", "mud", "water", "density"),
             "hole_fluid_density": ("mud", "mud weight", "density", "hole fluid"),
             "hole_fluid_level": ("fluid level", "lost circulation"),
             "float_equipment": ("float", "float shoe", "float collar", "check valve"),
             "valve_rating": ("float", "valve", "check valve"),
             "rig": ("rig", "profile")}
    return tuple(ActionSpec(f"edit_setting('{key}')", "", "g", f"Setting: {title}",
                            f"Change the job's {title.lower()}; the plan updates at once",
                            show=False, words=extra.get(key, ()) + tuple(title.lower().split()))
                 for key, (title, _kind, _hint) in JOB_SETTINGS.items())


#: Palette-only entries: each job setting by name.
SETTING_ACTIONS = _setting_actions()

#: Everything the command palette offers.
PALETTE = ACTIONS + SETTING_ACTIONS


def bindings() -> list:
    return [Binding(a.keys, a.action, a.footer, show=a.show, id=a.binding_id, tooltip=a.help,
                    key_display=a.shown.split()[0] if a.shown else None)
            for a in ACTIONS if a.keys]


def help_sections() -> list:
    titles = {GLOBAL: "Anywhere", RUNNING: "Running (Overview and Running tabs)",
              TALLY: "String and tally tab", CHARTS: "Charts tab"}
    out = []
    for ctx in (GLOBAL, RUNNING, TALLY, CHARTS):
        out.append((titles[ctx], [(a.shown, f"{a.title}: {a.help}")
                                  for a in ACTIONS if a.context == ctx]))
    out.extend(WIDGET_KEYS)
    return out


class RigplanCommands(Provider):
    """Command palette entries: every action in :data:`PALETTE`, found by its
    title or by the trade's words for it (fill, float, density, reject,
    reading, tally, save ...)."""

    def _command(self, spec: ActionSpec):
        return partial(self.app.run_from_palette, spec.action)

    async def discover(self):
        for spec in PALETTE:
            yield DiscoveryHit(f"{spec.title}  ({spec.shown})", self._command(spec),
                               text=spec.title, help=spec.help)

    async def search(self, query: str):
        matcher = self.matcher(query)
        q = query.strip().lower()
        for spec in PALETTE:
            score = matcher.match(spec.title)
            word = next((w for w in spec.words if q and (w.startswith(q) or q in w.split())),
                        None)
            if word is not None:
                score = max(score, 0.9 if score == 0 else score)
            if score > 0:
                shown = spec.title + (f"  ({word})" if word and word not in spec.title.lower()
                                      else "")
                yield Hit(score, matcher.highlight(shown), self._command(spec),
                          text=spec.title, help=f"{spec.help}  (key {spec.shown})")
