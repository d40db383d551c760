"""The well schematic in the app: beside the overview, following the run.

The side view draws the shared geometry of the packet's schematic; these
checks hold it to the geometry's identities (the shoe of step k is the sum
of the lengths of joints 1..k) as joints are recorded.
"""

from __future__ import annotations

import shutil
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]


@pytest.fixture
def floated(tmp_path):
    plan = tmp_path / "job.toml"
    shutil.copyfile(ROOT / "strings" / "cv7-16in-floated.toml", plan)
    return plan, ROOT / "rigs" / "mw80.toml"


async def test_schematic_beside_the_overview_follows_the_run(floated):
    from rigplan.present import wording as W
    from rigplan.tui.app import build_app
    app = build_app(*floated)
    app.animation_level = "none"
    async with app.run_test(size=(80, 24)) as pilot:       # the compact terminal
        await pilot.pause()
        view = app.query_one("#schematic")
        words = app.query_one("#overview-words")
        assert view.region.width >= 20 and view.region.x >= words.region.right - 1
        assert view.region.bottom <= 24 and view.region.height >= 8
        assert view.schematic.step == 0
        for _ in range(12):
            app.session.record_run(None)
        app.refresh_views()
        await pilot.pause()
        s = view.schematic
        lengths = app.session.landing.joints.length
        assert s.step == 12
        # identity: the shoe of step 12 is the sum of joints 1..12
        assert s.mark("shoe").depth == pytest.approx(float(lengths[:12].sum()))
        text = view.render().plain
        assert "joint 12/80" in text
        assert f"shoe {W.number(s.mark('shoe').depth, 'length', 'us', 0)}" in text
        assert "TD" in text and "█" in text
