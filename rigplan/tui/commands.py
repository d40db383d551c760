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
GLOBAL, RUNNING, TALLY = "global", "running", "tally"


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
               "Verdict, governing limit, hoisting path and the crew's next action", show=False),
    ActionSpec("show_tab('tally')", "2", "2", "String and tally",
               "The joints in running order with their loads; edit the plan", short="String",
               show=False),
    ActionSpec("show_tab('running')", "3", "3", "Running",
               "Record joints as they go in, weight readings, fill instructions", show=False),
    ActionSpec("show_tab('charts')", "4", "4", "Charts",
               "Hook load against shoe depth, fill window, utilization per joint", show=False),
    ActionSpec("show_tab('rig')", "5", "5", "Rig",
               "Each hoisting path's components, their ratings and what governs", show=False),
    ActionSpec("record_run", "r", "r", "Record joint run",
               "The next joint went in the hole: asks its measured length (Enter keeps the "
               "planned length)", RUNNING, short="Run joint"),
    ActionSpec("undo", "z", "z", "Undo last entry",
               "Cancel the latest joint run or set aside (asks first)", RUNNING, short="Undo"),
    ActionSpec("reject", "j", "j", "Set joint aside",
               "Reject the selected (or next) joint, with a reason", RUNNING, short="Set aside"),
    ActionSpec("observe", "w", "w", "Weight reading",
               "Enter the weight indicator's hook load and compare it with the plan", RUNNING, short="Weight"),
    ActionSpec("band", "b", "b", "Weight band",
               "Set the agreement band for weight readings (10 % or a force)", RUNNING, short="Band"),
    ActionSpec("edit_cell", "e", "e/Enter", "Edit cell",
               "Change the selected cell of the string (planned data)", TALLY, short="Edit"),
    ActionSpec("insert_joint", "i", "i", "Insert joint",
               "Insert a copy of the selected joint above it", TALLY, short="Insert"),
    ActionSpec("delete_joint", "d", "d", "Delete joint",
               "Take the selected joint out of the plan (asks first)", TALLY, short="Delete"),
    ActionSpec("move_joint(-1)", "left_square_bracket", "[", "Move joint down the hole",
               "Move the selected joint one place earlier in the running order", TALLY, short="Down"),
    ActionSpec("move_joint(1)", "right_square_bracket", "]", "Move joint up the hole",
               "Move the selected joint one place later in the running order", TALLY, short="Up"),
    ActionSpec("import_tally", "t", "t", "Import tally CSV",
               "Apply measured lengths and set-asides from a tally sheet", TALLY, short="Import"),
    ActionSpec("save_plan", "s", "s", "Save plan",
               "Write the edited plan over its file (atomic)", TALLY, short="Save"),
    ActionSpec("export_tally", "x", "x", "Export tally CSV",
               "Write the site tally from the run log beside the plan", short="Export"),
    ActionSpec("toggle_units", "u", "u", "Units US/SI",
               "Switch the display between US field units and SI", short="Units"),
    ActionSpec("next_path", "p", "p", "Next hoisting path",
               "Plan with the rig's next hoisting path", short="Path"),
    ActionSpec("job_settings", "g", "g", "Job settings",
               "Change the hole fluid, fill fluid, float equipment, design factors, running "
               "and set-down weights or the rig profile; the plan updates at once",
               short="Settings"),
    ActionSpec("rack", "k", "k", "Rack order and old casing",
               "Best running order of the gauged joints (rack placement); for a liner job the "
               "old casing from its caliper log: roundness, collapse rating, clearance",
               short="Rack"),
    ActionSpec("help", "question_mark,f1", "? F1", "Keys", "List every key"),
    ActionSpec("quit", "q", "q", "Quit", "Leave the app (the run log is already saved)"),
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


def bindings() -> list:
    return [Binding(a.keys, a.action, a.footer, show=a.show, id=a.binding_id, tooltip=a.help,
                    key_display=a.shown.split()[0] if a.shown else None)
            for a in ACTIONS]


def help_sections() -> list:
    titles = {GLOBAL: "Anywhere", RUNNING: "Running (Overview and Running tabs)",
              TALLY: "String and tally tab"}
    out = []
    for ctx in (GLOBAL, RUNNING, TALLY):
        out.append((titles[ctx], [(a.shown, f"{a.title}: {a.help}")
                                  for a in ACTIONS if a.context == ctx]))
    out.extend(WIDGET_KEYS)
    return out


class RigplanCommands(Provider):
    """Command palette entries: every action in :data:`ACTIONS`."""

    def _command(self, spec: ActionSpec):
        return partial(self.app.run_from_palette, spec.action)

    async def discover(self):
        for spec in ACTIONS:
            yield DiscoveryHit(f"{spec.title}  ({spec.shown})", self._command(spec),
                               text=spec.title, help=spec.help)

    async def search(self, query: str):
        matcher = self.matcher(query)
        for spec in ACTIONS:
            score = matcher.match(spec.title)
            if score > 0:
                yield Hit(score, matcher.highlight(spec.title), self._command(spec),
                          text=spec.title, help=f"{spec.help}  (key {spec.shown})")
