"""The app's rack and old-casing screen (key k) on the CV-2 liner demo.

The numbers shown are the engine's (checked in test_liner.py and
test_placement.py against their sources); here the screen is checked to
show them, and to write the proposed order without overwriting anything.
"""

from __future__ import annotations

import shutil
from pathlib import Path

from rigplan.tui.app import RigplanApp
from rigplan.tui.session import JobSession

ROOT = Path(__file__).resolve().parents[1]


def _app(tmp_path):
    for name in ("cv2-liner.toml", "cv2-old-casing.las"):
        shutil.copy(ROOT / "strings" / name, tmp_path / name)
    session = JobSession(tmp_path / "cv2-liner.toml", ROOT / "rigs" / "th30.toml")
    return RigplanApp(session)


async def test_rack_screen_shows_the_old_casing_and_the_order(tmp_path):
    app = _app(tmp_path)
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.press("k")
        await pilot.pause()
        screen = app.screen
        assert screen.id == "rack-screen"
        liner = str(screen.query_one("#rack-liner").render())
        assert "FITS" in liner and "Weak zones" in liner
        assert screen.query_one("#rack-profile").row_count > 10
        assert len(screen.query("PlotWidget")) == 2
        order = str(screen.query_one("#rack-order").render())
        assert "already the best order" in order      # a uniform, ungauged rack
        await pilot.press("o")                         # nothing to write: no file appears
        await pilot.pause()
        assert not list(tmp_path.glob("*.placed.tally.csv"))
        await pilot.press("escape")
        await pilot.pause()
        assert app.screen.id != "rack-screen"


async def test_rack_screen_on_a_job_without_old_casing_shows_no_empty_charts(tmp_path):
    from rigplan.present.wording import CAUTION
    for name in ("cv3-8in-a53b.toml", "cv3-8in-a53b.tally.csv"):
        shutil.copy(ROOT / "strings" / name, tmp_path / name)
    session = JobSession(tmp_path / "cv3-8in-a53b.toml", ROOT / "rigs" / "th30.toml")
    app = RigplanApp(session)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.press("k")
        await pilot.pause()
        screen = app.screen
        assert "not a liner job" in str(screen.query_one("#rack-liner").render())
        assert not screen.query_one("#rack-charts").display
        assert str(screen.query_one("#rack-caution").render()).startswith(CAUTION[:20])


async def test_packet_from_the_app_is_written_beside_the_plan(tmp_path):
    # The same packet as `rigplan report`, reachable from the app; it never
    # replaces a file (rule of the project: nothing the user has is overwritten).
    import pypdf
    for name in ("cv3-8in-a53b.toml", "cv3-8in-a53b.tally.csv"):
        shutil.copy(ROOT / "strings" / name, tmp_path / name)
    (tmp_path / "cv3-8in-a53b.packet.pdf").write_text("keep me")
    session = JobSession(tmp_path / "cv3-8in-a53b.toml", ROOT / "rigs" / "th30.toml")
    app = RigplanApp(session)
    async with app.run_test(size=(120, 40)) as pilot:
        await pilot.press("o")
        import asyncio
        for _ in range(200):                 # the packet is written in a worker thread
            await asyncio.sleep(0.1)
            if (tmp_path / "cv3-8in-a53b-2.packet.pdf").exists():
                break
        await app.workers.wait_for_complete()
        await pilot.pause()
    assert (tmp_path / "cv3-8in-a53b.packet.pdf").read_text() == "keep me"
    out = tmp_path / "cv3-8in-a53b-2.packet.pdf"
    text = " ".join(p.extract_text() for p in pypdf.PdfReader(str(out)).pages)
    assert "LANDS OPEN" in text.upper()
