"""2,000 generated argument sets through the command line, in process.

Argument sets are drawn from the bundled jobs, mutated copies of their
plans, rigs, tallies and a materials file, run logs sound and damaged beside
some plans, bad names (missing, a folder, a device, 300 characters), every
option with good and bad values, ``-o`` onto each file the command reads,
and odd tokens (``tests/fuzzlib.py``).  ``open`` builds the app without
running it.  Judged: exit 0 or 1 with clean output (no ``nan``/``inf``
number in the text, valid JSON with its exit code), or exit 2 with exactly
one line on stderr naming what is wrong; never exit 3 (internal error) or a
traceback, never a Python warning, and no file of the job folder written
over.  A handful of the same cases run as real processes too.

The requirement is the project's own (README "Exit codes"; DEVELOPERS.md
"Errors and user data").
"""

from __future__ import annotations

import json
import os
import subprocess
import sys

import fuzzlib as F

SEED = 20261202
REPO = F.ROOT


def test_generated_argument_sets_in_process():
    n = F.CI_COUNTS["command line"][1]
    stats = F.run_parallel(F.fuzz_cli, n, SEED)
    assert stats.tried >= 2000, stats.summary()
    assert stats.failures == 0, stats.report()


def _run(*args, cwd=REPO):
    env = {k: v for k, v in os.environ.items() if not k.startswith("RIGPLAN_")}
    return subprocess.run([sys.executable, "-m", "rigplan", *args], cwd=cwd, env=env,
                          capture_output=True, text=True, timeout=60)


def test_a_handful_as_real_processes(tmp_path):
    # The same promise seen from outside: exit status and stderr of a real
    # process (the in-process runs above cannot see an interpreter crash).
    deep = tmp_path / "deep.toml"
    deep.write_text((REPO / "strings" / "cv3-8in-a53b.toml").read_text()
                    + "x = " + "[" * 5000 + "]" * 5000 + "\n")
    huge = tmp_path / "huge.toml"
    huge.write_text((REPO / "rigs" / "mw80.toml").read_text()
                    .replace("lines = 4", "lines = 1" + "0" * 400))
    cases = [
        (["check", str(deep), "--rig", "th30"], str(deep)),
        (["check", "strings/cv7-16in-floated.toml", "--rig", str(huge)], f"{huge}: path[1].lines"),
        (["check", "strings/cv7-16in-floated.toml", "--rig", "x" * 300], "x" * 300),
        (["report", "strings/cv3-8in-a53b.toml", "--rig", "th30", "-o",
          "strings/cv3-8in-a53b.tally.csv"], "-o strings/cv3-8in-a53b.tally.csv"),
        (["check", "strings/cv7-16in-floated.toml", "--rig", "mw80", "--units", "metric"],
         "rigplan check: argument --units"),
    ]
    before = (REPO / "strings" / "cv3-8in-a53b.tally.csv").read_bytes()
    for args, named in cases:
        r = _run(*args)
        assert r.returncode == 2, (args, r.stderr)
        lines = r.stderr.strip().splitlines()
        assert len(lines) == 1 and "Traceback" not in r.stderr, r.stderr
        assert named in lines[0], lines[0]
    assert (REPO / "strings" / "cv3-8in-a53b.tally.csv").read_bytes() == before
    r = _run("check", str(deep), "--rig", "th30", "--format", "json")
    assert r.returncode == 2 and json.loads(r.stdout)["exit_code"] == 2
