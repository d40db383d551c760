"""Reliability figures: generated bad inputs per edge, and kills while recording.

    .venv/bin/python benchmarks/fuzz_report.py            # the CI counts, a new seed
    .venv/bin/python benchmarks/fuzz_report.py --scale 3 --kills 200 --seed 7

Runs the same generators and judge as the test suite (``tests/fuzzlib.py``:
mutations of the bundled plans, rigs, tallies and a materials file, damaged
run logs, quantity text, the app's prompt validators and command-line
argument sets, in process) and prints, per edge: inputs tried, accepted,
refused in one line, tracebacks, silent accepts (an accepted value outside
its range or not finite), refusals naming no file/key/row, runs with a
Python warning and runs over 10 s.  Then it starts a process that records
tally entries in a run log and kills it with SIGKILL at random moments:
every entry the writer printed as saved must be in the log afterwards.
The README's Reliability section quotes the last run.
"""

from __future__ import annotations

import argparse
import os
import random
import signal
import subprocess
import sys
import tempfile
import textwrap
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT / "tests"))

import fuzzlib as F  # noqa: E402

WRITER = textwrap.dedent("""\
    import sys
    from rigplan.files.runlog import RunLog
    log = RunLog(sys.argv[1])
    start = len(log.state().run)
    k = start
    while True:
        k += 1
        eid = log.record_run(f"J{k}", 6.0 + (k % 100) / 1000)
        print(eid, f"J{k}", flush=True)
""")


def kill_test(kills: int, seed: int) -> tuple:
    """(kills, entries acknowledged, entries lost) of a writer killed ``kills`` times."""
    from rigplan.files.runlog import RunLog
    rng = random.Random(seed)
    work = Path(tempfile.mkdtemp(prefix="kill-"))
    log = work / "k.rigrun.sqlite"
    script = work / "writer.py"
    script.write_text(WRITER)
    acked = []
    for _ in range(kills):
        p = subprocess.Popen([sys.executable, str(script), str(log)], stdout=subprocess.PIPE,
                             text=True, cwd=ROOT)
        deadline = time.monotonic() + rng.uniform(0.3, 0.9)
        while time.monotonic() < deadline:
            line = p.stdout.readline()
            if not line:
                break
            eid, label = line.split()
            acked.append((int(eid), label))
        p.send_signal(signal.SIGKILL)
        p.wait()
        for line in p.stdout:      # printed before the kill: acknowledged too
            if line.strip():
                eid, label = line.split()
                acked.append((int(eid), label))
    with RunLog(log, snapshot=True) as rl:
        have = {(e.id, e.label) for e in rl.events()}
    lost = [a for a in acked if a not in have]
    return kills, len(acked), len(lost)


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--seed", type=int, default=int(time.time()) % 100_000)
    ap.add_argument("--scale", type=float, default=1.0,
                    help="multiply the CI counts (10,000 per parser, 2,000 argument sets)")
    ap.add_argument("--kills", type=int, default=50)
    args = ap.parse_args(argv)
    print(f"seed {args.seed}, scale {args.scale:g}, Python {sys.version.split()[0]}, "
          f"{os.cpu_count()} cores")
    print("| edge | inputs tried | accepted | refused in one line | tracebacks | silent accepts "
          "| refusals naming nothing | with a warning | over 10 s | seconds |")
    print("|---|---:|---:|---:|---:|---:|---:|---:|---:|---:|")
    total = F.Stats("all")
    failed = []
    for name, (fn, n) in F.CI_COUNTS.items():
        t0 = time.perf_counter()
        s = F.run_parallel(fn, int(n * args.scale), args.seed)
        dt = time.perf_counter() - t0
        total.merge(s)
        if s.failures:
            failed.append(s)
        print(f"| {name} | {s.tried:,} | {s.accepted:,} | {s.refused - s.unnamed:,} | "
              f"{s.tracebacks} | {s.silent} | {s.unnamed} | {s.warned} | {s.slow} | {dt:.0f} |")
    print(f"| **all** | **{total.tried:,}** | {total.accepted:,} | {total.refused - total.unnamed:,} "
          f"| **{total.tracebacks}** | **{total.silent}** | **{total.unnamed}** | {total.warned} "
          f"| {total.slow} | |")
    kills, acked, lost = kill_test(args.kills, args.seed)
    print(f"\nkill test: {kills} SIGKILLs of a process recording tally entries, {acked:,} entries "
          f"acknowledged, {lost} lost")
    for s in failed:
        print("\n" + s.report())
    return 1 if failed or lost else 0


if __name__ == "__main__":
    sys.exit(main())
