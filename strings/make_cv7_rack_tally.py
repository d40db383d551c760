"""Write the demo rack tally of well CV-7's 16 in string (invented measurements).

The crew of the invented CV-7 job gauged every blank joint on the rack: the
wall with an ultrasonic gauge at three stations, the OD with a caliper in
two directions at three stations.  The numbers are made here, not measured:
walls scatter within the A53 tolerance around 0.375 in with a few thin
joints (one under the 12.5 % minimum), ODs are slightly oval, two joints
badly so.  A fixed seed makes the file the same on every run.

    python strings/make_cv7_rack_tally.py     # writes strings/cv7-16in-floated.rack.tally.csv

Use it with ``rigplan place strings/cv7-16in-floated.toml --rig mw80 --tally
strings/cv7-16in-floated.rack.tally.csv`` (or ``check --tally``).
"""

from __future__ import annotations

from pathlib import Path

import numpy as np

JOINTS = 80            # J1 sump, J2-J5 screens, J6-J80 blank


def rack_rows(seed: int = 7016):
    rng = np.random.default_rng(seed)
    rows = []
    for k in range(1, JOINTS + 1):
        label = f"J{k}"
        length = 20.0 + rng.normal(0.05, 0.12)
        if k <= 5:                      # sump and screens: lengths only
            rows.append((label, f"{length:.2f}", "", "", "", ""))
            continue
        wall = rng.normal(0.372, 0.008) + rng.normal(0, 0.003, 3)
        if k in (71, 76):
            wall -= 0.030               # thin joints from an older heat
        if k == 78:
            wall[1] = 0.325             # one reading under the 0.328 in minimum
        e = abs(rng.normal(0.004, 0.002))
        if k in (74, 79):
            e = 0.016                   # dropped off the truck: oval
        mean = 16.0 + rng.normal(0.0, 0.01)
        dmax = mean * (1 + e) + rng.normal(0, 0.004, 3)
        dmin = mean * (1 - e) + rng.normal(0, 0.004, 3)
        rows.append((label, f"{length:.2f}", "; ".join(f"{w:.3f}" for w in wall),
                     "; ".join(f"{d:.3f}" for d in dmax), "; ".join(f"{d:.3f}" for d in dmin),
                     "oval" if e > 0.01 else ""))
    return rows


def write_demo(path: Path) -> None:
    lines = ["# Rack tally for well CV-7 (invented): lengths taped, walls by ultrasonic gauge at",
             "# three stations, ODs by caliper in two directions at three stations.",
             "label,measured_length [ft],measured_wall [in],od_max [in],od_min [in],note"]
    for r in rack_rows():
        lines.append(",".join(r))
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")


if __name__ == "__main__":
    write_demo(Path(__file__).with_name("cv7-16in-floated.rack.tally.csv"))
