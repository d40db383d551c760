"""The app's tab contents: overview, string and tally grid, running, rig.

Each pane has ``show(session)``, which redraws it from the session's landing
plan; the texts come from :mod:`rigplan.present.wording`.
"""

from __future__ import annotations

from rich.table import Table
from rich.text import Text
from textual.app import ComposeResult
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.widgets import DataTable, Static

from rigplan.present import wording as P


class OverviewPane(VerticalScroll):
    """Verdict, governing limit, hoisting path and what the crew does next."""

    def compose(self) -> ComposeResult:
        yield Static("", id="verdict", markup=False)
        yield Static("", id="next-action", classes="line next", markup=False)
        # the governing limit and the hook limit (the figure the driller
        # compares with the weight indicator) before the longer notes, so
        # they stay in view on a small terminal
        yield Static("", id="governing", classes="line", markup=False)
        yield Static("", id="path-line", classes="line", markup=False)
        yield Static("", id="reasons", classes="line dim", markup=False)
        yield Static("", id="fill-plan", classes="line", markup=False)
        yield Static("", id="float-line", classes="line", markup=False)
        yield Static("", id="switch-line", classes="line", markup=False)
        yield Static("", id="set-down-line", classes="line", markup=False)
        yield Static("", id="progress", classes="line", markup=False)
        yield Static("", id="landing", classes="line", markup=False)
        yield Static("", id="warnings", classes="line dim", markup=False)

    def show(self, session) -> None:
        lp = session.landing
        sys_ = session.units
        verdict = self.query_one("#verdict", Static)
        verdict.remove_class("good", "fair", "bad")
        if lp is None:
            verdict.update("NO PLAN")
            verdict.add_class("bad")
            self.query_one("#governing", Static).update(f"The planner refused the input: {session.error}")
            for wid in ("#path-line", "#next-action", "#fill-plan", "#float-line",
                        "#switch-line", "#set-down-line", "#reasons"):
                self.query_one(wid, Static).update("")
        else:
            verdict.update(P.verdict_text(lp))
            verdict.add_class(P.VERDICT_CLASS.get(lp.verdict, "fair"))
            self.query_one("#governing", Static).update(P.governing_text(lp, sys_))
            self.query_one("#path-line", Static).update(P.path_text(lp, sys_))
            self.query_one("#next-action", Static).update(
                "Next for the crew: " + P.fill_instruction(lp, session.step, sys_))
            self.query_one("#fill-plan", Static).update(P.fill_plan_text(lp, sys_))
            self.query_one("#float-line", Static).update(P.float_text(lp, sys_))
            self.query_one("#switch-line", Static).update(P.switch_text(lp))
            self.query_one("#set-down-line", Static).update(P.set_down_text(lp, sys_))
            notes = P.reason_lines(lp, sys_)
            self.query_one("#reasons", Static).update(
                Text("\n".join(notes)) if notes else "")
        nxt = session.next_joint()
        total = len(session.plan.running_joints())
        self.query_one("#progress", Static).update(
            f"Run log: {session.step} of {total} joints in the hole, "
            f"{len(session.state.rejected)} set aside, "
            f"weight readings: {len(session.state.observations)}; next joint: "
            f"{nxt.label if nxt is not None else 'none (all in)'}"
            + ("   [plan edited, not saved: s on the String tab]" if session.dirty else ""))
        warnings = list(session.warnings) + [w for w in session.length_warnings
                                             if w not in session.warnings]
        lines = [text for _, text in P.finding_lines(warnings, sys_)]
        self.query_one("#warnings", Static).update(Text("\n".join(lines)) if lines else "")
        show_landing(self.query_one("#landing", Static), session)


def show_landing(box: Static, session) -> None:
    """The landing picture (engine depths, present words) into ``box``."""
    picture = session.landing_picture()
    box.set_class(bool(picture.moved), "warning")
    box.update(Text("\n".join(P.landing_lines(picture, session.units))))


class _Grid(DataTable):
    """A DataTable redrawn from ``(row key, cells)`` rows.

    Column widths are set from the text (never measured by the table), so a
    redraw with the same rows and columns updates only the cells that
    changed; anything else rebuilds the table.
    """

    def __init__(self, **kwargs):
        super().__init__(zebra_stripes=True, **kwargs)
        self._columns_sig = None
        self._rows_sig = None
        self._widths = ()
        self._cells = {}
        self._hl = None

    def load(self, columns, rows, highlight=None) -> None:
        """columns: ``[(key, title)]``; rows: ``[(key, [cells])]``."""
        col_sig = tuple(columns)
        row_sig = tuple(k for k, _ in rows)
        keys = [c[0] for c in columns]
        widths = [len(title) for _, title in columns]
        for _, cells in rows:
            for i, c in enumerate(cells):
                if len(c) > widths[i]:
                    widths[i] = len(c)
        if (col_sig != self._columns_sig or row_sig != self._rows_sig
                or any(w > old for w, old in zip(widths, self._widths))):
            cursor = self.cursor_coordinate
            self.clear(columns=True)
            for (key, title), w in zip(columns, widths):
                self.add_column(Text(title), key=key, width=w)
            for key, cells in rows:
                self.add_row(*self._styled(key, cells, highlight), key=key)
            self._cells = {key: list(cells) for key, cells in rows}
            self._columns_sig, self._rows_sig, self._widths = col_sig, row_sig, tuple(widths)
            self._hl = highlight
            if self.row_count:
                self.move_cursor(row=min(cursor.row, self.row_count - 1),
                                 column=min(cursor.column, len(columns) - 1), animate=False)
            return
        for key, cells in rows:
            old = self._cells.get(key)
            if old != cells or key == highlight or key == self._hl:
                for ck, value in zip(keys, self._styled(key, cells, highlight)):
                    self.update_cell(key, ck, value)
                self._cells[key] = list(cells)
        self._hl = highlight

    def _styled(self, key, cells, highlight):
        style = "bold reverse" if key == highlight else ""
        return [Text(c, style=style) for c in cells]


def fit_columns(columns, rows, priority, budget: int):
    """The columns that fit ``budget`` cells, taken in ``priority`` order and
    shown in their own order; rows cut to match.  Each column takes its
    widest text plus the table's padding; the first priority always stays.

    Returns ``(columns, rows, hidden titles)``.
    """
    keys = [k for k, _ in columns]
    widths = {k: len(t) for k, t in columns}
    for _, cells in rows:
        for k, c in zip(keys, cells):
            if len(c) > widths[k]:
                widths[k] = len(c)
    used = 2                                    # the vertical scroll bar
    keep = set()
    for k in list(priority) + [k for k in keys if k not in priority]:
        if k not in widths:
            continue
        need = widths[k] + 2                    # cell padding, one each side
        if keep and used + need > budget:
            continue
        keep.add(k)
        used += need
    idx = [i for i, k in enumerate(keys) if k in keep]
    hidden = [t for k, t in columns if k not in keep]
    return ([columns[i] for i in idx], [(key, [cells[i] for i in idx]) for key, cells in rows],
            hidden)


class TallyPane(Vertical):
    """The string joint by joint with its loads; plan edits."""

    def compose(self) -> ComposeResult:
        yield Static("", id="tally-status", classes="line", markup=False)
        yield _Grid(id="tally-table", cursor_type="cell")

    @property
    def table(self) -> _Grid:
        return self.query_one("#tally-table", _Grid)

    def show(self, session) -> None:
        sys_ = session.units
        columns = [(key, P.column_title(title, kind, sys_)) for key, title, kind, _ in P.TALLY_COLUMNS]
        rows = P.tally_cells(session)
        columns, rows, hidden = fit_columns(columns, rows, P.TALLY_PRIORITY,
                                            self.app.size.width - 2)
        nxt = session.next_joint()
        self.table.load(columns, rows, highlight=nxt.label if nxt is not None else None)
        status = ("* EDITED, NOT SAVED (s saves)   " if session.dirty else "") + (
            f"{len(rows)} joints, {sys_.upper()} units.  e/Enter edit  i insert  d delete  "
            f"[ ] move  t import tally  s save")
        if hidden:
            status += f"   ({len(hidden)} more columns in a wider window)"
        self.query_one("#tally-status", Static).update(status)

    def cursor_cell(self):
        """(row label, column key) under the cursor, or (None, None)."""
        t = self.table
        if not t.row_count:
            return None, None
        cell = t.coordinate_to_cell_key(t.cursor_coordinate)
        return cell.row_key.value, cell.column_key.value

    def focus_row(self, label: str) -> None:
        t = self.table
        try:
            row = t.get_row_index(label)
        except Exception:
            return
        t.move_cursor(row=row, animate=False)


def _short_status(text: str) -> str:
    """A status without its reason ("set aside: bent" -> "set aside"), for
    the running table on a narrow screen (80 columns)."""
    head = text.split(":")[0]
    return "rejected" if head.startswith("rejected") else head


class RunningPane(Horizontal):
    """Joint by joint while running: next joint, hook load, fill, weight checks."""

    def compose(self) -> ComposeResult:
        yield _Grid(id="run-table", cursor_type="row")
        with VerticalScroll(id="run-side"):
            yield Static("", id="run-summary", markup=False)
            yield Static("", id="weight-check", markup=False)
            yield Static("", id="run-landing", markup=False)

    @property
    def table(self) -> _Grid:
        return self.query_one("#run-table", _Grid)

    def show(self, session) -> None:
        sys_ = session.units
        columns = [(key, P.column_title(title, kind, sys_)) for key, title, kind in P.RUN_COLUMNS]
        rows = [(label, [cells[c[0]] for c in P.RUN_COLUMNS])
                for label, cells in P.run_cells(session)]
        # the table has 3/5 of the width beside the side panel, or the
        # whole width above it in the compact layout
        width = self.app.size.width - 2
        if not self.screen.has_class("compact"):
            width = width * 3 // 5
        fitted = fit_columns(columns, rows, P.RUN_PRIORITY, width)
        if len(fitted[0]) < len(columns):
            # a narrow table: the status without a set-aside reason, so that
            # it does not push out the shoe depth (the whole reason is in the
            # run log, the tally export and a wider window)
            status = [k for k, _, _ in P.RUN_COLUMNS].index("status")
            short = [(label, [_short_status(c) if i == status else c
                              for i, c in enumerate(cells)]) for label, cells in rows]
            fitted = fit_columns(columns, short, P.RUN_PRIORITY, width)
        columns, rows, _ = fitted
        nxt = session.next_joint()
        self.table.load(columns, rows, highlight=nxt.label if nxt is not None else None)
        if nxt is not None:
            try:
                self.table.move_cursor(row=self.table.get_row_index(nxt.label), animate=False)
            except Exception:
                pass
        self.query_one("#run-summary", Static).update("\n".join(P.running_summary(session)))
        head, causes = P.weight_text(session.last_check, sys_)
        box = self.query_one("#weight-check", Static)
        box.set_class(bool(session.last_check and session.last_check.outside), "warning")
        box.update("\n".join((head,) + causes) if head else "")
        show_landing(self.query_one("#run-landing", Static), session)

    def cursor_label(self):
        t = self.table
        if not t.row_count:
            return None
        return t.coordinate_to_cell_key(t.cursor_coordinate).row_key.value


class RigPane(VerticalScroll):
    """Each hoisting path's chain: every part's rating, at the hook, the gear
    counted, the shock and overpull cases and the string limit."""

    def compose(self) -> ComposeResult:
        yield Static("", id="rig-view", markup=False)

    def show(self, session) -> None:
        rig = session.rig
        parts = []
        from rigplan.present.report import chain_table
        for chain, in_use in P.rig_chains(session):
            parts.append(chain_table(chain, session.units,
                                     f"{chain.path}{'  (in use)' if in_use else ''}"))
        ls = rig.landing_string
        from rich.console import Group
        head = Text(f"Rig: {rig.name}" + (f"   {rig.notes}" if rig.notes else ""), style="bold")
        extra = []
        if ls is not None:
            extra.append(Text(
                f"Landing string: {ls.name}, {P.fmt(ls.weight_per_length, 'linear_weight', session.units)}"
                f", tensile rating {P.fmt(ls.tensile_rating, 'force', session.units)}"))
        else:
            extra.append(Text("No landing string in the rig profile (no staged setting)."))
        self.query_one("#rig-view", Static).update(Group(head, *parts, *extra))
