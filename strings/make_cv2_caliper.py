"""Write the demo caliper log of the old casing in well CV-2 (an invented well).

The log is made, not measured: round 12-3/4 in x 0.250 in casing (12.25 in
bore) from the floor to 400 ft, read every 0.5 ft by an X-Y caliper with a
little reading noise, an oval zone from 180 to 230 ft (ellipticity rising to
2.5 % and back), and a dent from 305 to 309 ft where one arm reads 12.0 in.
A fixed random seed makes the file the same on every run.

    python strings/make_cv2_caliper.py            # writes strings/cv2-old-casing.las
"""

from __future__ import annotations

from pathlib import Path

import numpy as np

NOMINAL_ID_IN = 12.25


def caliper_profile(depth_ft: np.ndarray, seed: int = 20261202):
    """X and Y inside diameters [in] along the demo casing."""
    rng = np.random.default_rng(seed)
    e = np.zeros_like(depth_ft)
    oval = (depth_ft >= 180) & (depth_ft <= 230)
    e[oval] = 0.025 * np.sin(np.pi * (depth_ft[oval] - 180) / 50.0)
    x = NOMINAL_ID_IN * (1 + e) + rng.normal(0, 0.004, depth_ft.size)
    y = NOMINAL_ID_IN * (1 - e) + rng.normal(0, 0.004, depth_ft.size)
    dent = (depth_ft >= 305) & (depth_ft <= 309)
    y[dent] = 12.0
    x[dent] = 12.30
    return x, y


def write_demo(path: Path) -> None:
    import lasio

    depth = np.arange(0.0, 400.0 + 0.25, 0.5)
    x, y = caliper_profile(depth)
    las = lasio.LASFile()
    las.well["WELL"].value = "CV-2 (invented demo well)"
    las.well["COMP"].value = "Coldbrook Valley demo water district"
    las.well["FLD"].value = "Coldbrook Valley wellfield"
    las.well["DATE"].value = "2026-11-20"
    las.params.append(lasio.HeaderItem("CSGOD", "IN", "12.75", "old casing OD"))
    las.params.append(lasio.HeaderItem("CSGWT", "IN", "0.250", "old casing specified wall"))
    las.append_curve("DEPT", depth, unit="FT", descr="depth")
    las.append_curve("CALX", np.round(x, 4), unit="IN", descr="caliper X, inside diameter")
    las.append_curve("CALY", np.round(y, 4), unit="IN", descr="caliper Y, inside diameter")
    with open(path, "w", newline="\n") as f:
        las.write(f, version=2.0, wrap=False, fmt="%.4f")


if __name__ == "__main__":
    write_demo(Path(__file__).with_name("cv2-old-casing.las"))
