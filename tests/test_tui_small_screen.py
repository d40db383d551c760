"""The app on the smallest terminal planned for (80x24): what the crew must
see stays on screen (weight alarm, hook limit, the running table's columns).

The plan and rig are the invented test job of test_tui.py (not check values);
the checks are what is visible on the screen, against the engine's figures.
"""

from __future__ import annotations

import pytest

from _units import lbf
from test_tui import answer, engine_plan, job, make_app  # noqa: F401  (fixture)

SMALL = (80, 24)
LARGE = (120, 40)


def on_screen(app, widget) -> bool:
    """The widget is shown and lies wholly inside the terminal."""
    r = widget.region
    return (widget.display and r.height > 0 and r.y >= 0
            and r.bottom <= app.size.height and r.right <= app.size.width)


@pytest.mark.parametrize("size", [SMALL, LARGE], ids=["80x24", "120x40"])
async def test_weight_alarm_stays_on_screen_until_acknowledged_or_next_reading(job, size):
    plan, rig = job
    lp = engine_plan(plan, rig)
    app = make_app(plan, rig)
    async with app.run_test(size=size) as pilot:
        await pilot.press("3")
        for _ in range(3):
            await pilot.press("r", "enter")
            await pilot.pause()
        lp = engine_plan(plan, rig)
        planned = lp.hook_load[2] / lbf
        bar = app.query_one("#weight-alarm")
        assert not bar.display
        await pilot.press("w")
        await answer(pilot, f"{planned * 1.5:.0f} lbf")   # 50 % over: outside a 10 % band
        await pilot.pause(1.0)
        assert on_screen(app, bar) and bar.region.height == 1     # one line
        assert "HEAVIER" in str(bar.content)
        for tab in "125":                                  # on every tab
            await pilot.press(tab)
            await pilot.pause()
            assert on_screen(app, bar), tab
        await pilot.press("a")                             # acknowledged: gone
        await pilot.pause()
        assert not bar.display
        await pilot.press("3", "w")
        await answer(pilot, f"{planned * 0.5:.0f} lbf")   # a new alarm shows again
        await pilot.pause()
        assert on_screen(app, bar) and "LIGHTER" in str(bar.content)
        await pilot.press("w")
        await answer(pilot, f"{planned:.0f} lbf")          # next reading agrees: gone
        await pilot.pause()
        assert not bar.display


def demo_job(tmp_path):
    """The bundled CV-7 demo job (invented data) copied out of the repository."""
    import shutil
    from pathlib import Path
    root = Path(__file__).resolve().parents[1]
    plan = tmp_path / "cv7-16in-floated.toml"
    shutil.copy(root / "strings" / plan.name, plan)
    return plan, root / "rigs" / "mw80.toml"


def inside(widget, box) -> bool:
    """``widget`` lies wholly inside ``box``'s region on screen (not scrolled out)."""
    r, b = widget.region, box.region
    return r.height > 0 and r.y >= b.y and r.bottom <= b.bottom


@pytest.mark.parametrize("size", [SMALL, LARGE], ids=["80x24", "120x40"])
async def test_overview_keeps_the_hook_limit_in_view(tmp_path, size):
    from rigplan.present import wording as P
    plan, rig = demo_job(tmp_path)
    lp = engine_plan(plan, rig)
    app = make_app(plan, rig)
    async with app.run_test(size=size) as pilot:
        await pilot.pause()
        line = app.query_one("#path-line")
        # the hook limit as the planner gives it (string limit + dead load)
        limit = P.fmt(lp.path.hook_limit, "force", "us")
        assert f"hook limit {limit}" in str(line.content)
        assert inside(line, app.query_one("#overview-pane"))


async def test_running_table_keeps_the_shoe_depth_after_a_set_aside(job):
    plan, rig = job
    app = make_app(plan, rig)
    async with app.run_test(size=SMALL) as pilot:
        await pilot.press("3", "r", "enter")
        await pilot.pause()
        await pilot.press("j")
        await answer(pilot, "dented pin end, thread galled on the last two turns")
        await pilot.pause()
        table = app.query_one("#run-table")
        keys = [c.value for c in table.columns]
        for key in ("label", "status", "hook", "length", "shoe"):
            assert key in keys, key
        status = str(table.get_cell("J2", "status"))
        assert status == "set aside"            # the reason is in the run log
        # every kept column fits the terminal's width
        assert sum(c.get_render_width(table) for c in table.columns.values()) <= app.size.width
