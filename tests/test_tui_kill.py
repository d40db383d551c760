"""A killed app loses no committed joint.

The app runs in a child process under Textual's headless driver and records
joints through the same key path the crew uses (``r``, the measured length,
Enter).  After each commit the child prints the event id, label and length
it was told were saved, then the parent kills it with SIGKILL in the middle
of the run.  Reopening the log must show every printed entry, in order, and
the app must resume at the next joint.

The requirement (nothing committed is lost on a kill) is the project's own;
SQLite's write-ahead log with ``synchronous=FULL`` makes a returned COMMIT
durable (SQLite documentation, "Write-Ahead Logging" and "PRAGMA
synchronous").
"""

from __future__ import annotations

import os
import signal
import subprocess
import sys
import textwrap
import time
from pathlib import Path

import pytest
from numpy.testing import assert_allclose

from _units import ft
from rigplan.files.runlog import RunLog, log_path_for
from test_tui import SIZE, make_app, write_job

REPO = Path(__file__).resolve().parents[1]

CHILD = textwrap.dedent("""\
    import asyncio, sys
    from textual.widgets import Input
    from rigplan.tui.app import build_app

    async def main(plan, rig, start):
        app = build_app(plan, rig)
        app.animation_level = "none"
        async with app.run_test(size=(140, 45)) as pilot:
            await pilot.press("3")
            i = start
            while app.session.next_joint() is not None:
                label = app.session.next_joint().label
                length_ft = 19.5 + 0.01 * i
                await pilot.press("r")
                app.screen.query_one(Input).value = f"{length_ft:.2f} ft"
                await pilot.press("enter")
                await pilot.pause()
                print(app.session.last_event_id, label, repr(length_ft), flush=True)
                i += 1

    asyncio.run(main(sys.argv[1], sys.argv[2], int(sys.argv[3])))
""")


def run_and_kill(script: Path, plan: Path, rig: Path, start: int, commits: int) -> list:
    """Start the child, read ``commits`` printed entries, SIGKILL it."""
    env = dict(os.environ, PYTHONPATH=str(REPO))
    proc = subprocess.Popen([sys.executable, str(script), str(plan), str(rig), str(start)],
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True,
                            env=env, cwd=str(REPO))
    printed = []
    deadline = time.monotonic() + 60
    try:
        while len(printed) < commits:
            line = proc.stdout.readline()
            if not line:
                raise AssertionError(f"child ended early: {proc.stderr.read()[-2000:]}")
            event_id, label, length_ft = line.split()
            printed.append((int(event_id), label, float(length_ft)))
            assert time.monotonic() < deadline, "child too slow"
        time.sleep(0.05)   # most likely inside the next commit or recompute
    finally:
        proc.send_signal(signal.SIGKILL)
        proc.wait(timeout=10)
    assert proc.returncode == -signal.SIGKILL
    return printed


@pytest.mark.skipif(not hasattr(signal, "SIGKILL"), reason="needs SIGKILL (POSIX)")
async def test_sigkill_mid_run_loses_no_committed_joint(tmp_path):
    plan, rig = write_job(tmp_path)
    script = tmp_path / "child.py"
    script.write_text(CHILD, encoding="utf-8")

    printed = run_and_kill(script, plan, rig, start=0, commits=5)
    with RunLog(log_path_for(plan)) as log:
        first = log.state().run
    printed += run_and_kill(script, plan, rig, start=len(first), commits=4)

    with RunLog(log_path_for(plan)) as log:
        events = {e.id: e for e in log.events()}
        run = log.state().run
    # every entry the app reported as saved is in the log, as reported
    for event_id, label, length_ft in printed:
        e = events[event_id]
        assert (e.kind, e.label) == ("run", label)
        assert_allclose(e.value, length_ft * ft, rtol=1e-12)   # ft = 0.3048 m, NIST SP 811
    # and the joints in the hole are the plan's first ones, in order, with at
    # most one more per kill (committed, killed before it was printed)
    labels = [lab for lab, _ in run]
    assert labels == [f"J{i}" for i in range(1, len(labels) + 1)]
    assert len(printed) <= len(labels) <= len(printed) + 2
    assert [p[1] for p in printed] == labels[:len(first)][:5] + labels[len(first):][:4]

    # reopening the app resumes at the next joint
    app = make_app(plan, rig)
    async with app.run_test(size=SIZE) as pilot:
        await pilot.press("3")
        assert app.session.next_joint().label == f"J{len(labels) + 1}"
        table = app.query_one("#run-table")
        assert str(table.get_cell(labels[-1], "status")) == "in hole"
        assert str(table.get_cell(f"J{len(labels) + 1}", "status")) == "NEXT"
