"""Pictures of every screen at 120x40 and 80x24 (pytest-textual-snapshot).

A layout regression (a column cut, a label run together, a legend over the
data) shows as a changed picture; ``pytest --snapshot-update`` accepts a new
one after looking at it (``tests/__snapshots__/``).  Each picture is of the
bundled CV-7 demo job (invented data) with the same three joints and one
weight reading in its run log, so it is the same on every run: the clock is fixed,
animations are off, notifications are cleared before the picture is taken.
"""

from __future__ import annotations

import shutil
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]

TABS = ("overview", "tally", "running", "charts", "rig")
SIZES = ((120, 40), (80, 24))


@pytest.fixture
def demo_app(tmp_path, monkeypatch):
    """The CV-7 job with J1 taped, J2 and J3 run on their planned length and
    a weight reading in its run log (written before the app opens)."""
    from rigplan.files import runlog
    from rigplan.tui.app import build_app
    monkeypatch.setattr(runlog, "_utc_now", lambda: "2026-01-05T07:00:00.000+00:00")
    plan = tmp_path / "cv7-16in-floated.toml"
    shutil.copy(ROOT / "strings" / plan.name, plan)
    with runlog.RunLog.for_plan(plan) as log:
        log.record_run("J1", 20.25 * 0.3048)                  # 20 ft 3 in taped
        log.record_run("J2", 20 * 0.3048, basis="planned")
        log.record_run("J3", 20 * 0.3048, basis="planned")
        log.observe(3, 6500 * 4.4482216152605, None)          # 6,500 lbf
    app = build_app(plan, ROOT / "rigs" / "mw80.toml")
    app.animation_level = "none"
    app.FOLLOW_INTERVAL = 3600.0
    return app


def show(tab: str):
    """A run_before that shows ``tab``."""
    async def run_before(pilot) -> None:
        await pilot.press(str(TABS.index(tab) + 1))
        await pilot.pause()
    return run_before


@pytest.mark.parametrize("size", SIZES, ids=lambda s: f"{s[0]}x{s[1]}")
@pytest.mark.parametrize("tab", TABS)
def test_screen_snapshot(snap_compare, demo_app, tab, size):
    assert snap_compare(demo_app, terminal_size=size, run_before=show(tab))
