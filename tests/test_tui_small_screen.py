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
        assert on_screen(app, bar)
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
