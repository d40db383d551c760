"""Words, tables and JSON for the rack and the old casing: joint placement and liner fit.

Presentation only: every number comes from ``rigplan.engine.placement`` and
``rigplan.engine.liner`` (through ``rigplan.files.linerjob``).
"""

from __future__ import annotations

import math

import numpy as np

from rigplan.files import units as U
from rigplan.present import wording as W

CAUTION_OLD_CASING = (
    "Old casing is rated on the minimum wall its standard allows and the roundness the "
    "caliper read; corrosion may have thinned it further. Gauge it where in doubt.")


def _f(x):
    if x is None:
        return None
    x = float(x)
    return x if math.isfinite(x) else None


def _pct(x) -> str:
    return W.percent(x)


# ---------------------------------------------------------------------------
# joint placement


def placement_dict(result, tallied_labels) -> dict:
    """``rigplan place --format json``: the orders and their least margins."""
    return {
        "least_margin_tallied": _f(result.least_margin_tallied),
        "least_margin_proposed": _f(result.least_margin_proposed),
        "governing_margin_tallied": _f(result.governing_margin_tallied),
        "governing_margin_proposed": _f(result.governing_margin_proposed),
        "order": list(result.labels),
        "tallied_order": list(tallied_labels),
        "governing_tallied": None if result.governing_tallied is None
        else str(result.governing_tallied.name),
        "governing_proposed": None if result.governing_proposed is None
        else str(result.governing_proposed.name),
        "movable_positions": result.movable,
        "moved": result.moved,
        "margin_basis": "least of the tension and collapse margins 1 - DF x load / rating over "
                        "every joint and running step",
        "method": "bottleneck assignment, exact threshold search with a greedy dominance test; "
                  "joints moved only as far as the whole run gains, fewest moves kept",
    }


def _limit_words(limit) -> str:
    if limit is None:
        return ""
    where = limit.label or (f"step {limit.step}" if limit.step else "")
    return f" ({limit.name}{' at ' + where if where else ''})"


def placement_lines(result, tallied_labels, system: str) -> list:
    """Text lines for ``rigplan place``."""
    lines = [
        f"Least pipe margin (tension and collapse, design factors applied): "
        f"tallied order {_pct(result.least_margin_tallied)}, "
        f"proposed order {_pct(result.least_margin_proposed)}",
        f"Least margin of the whole run: tallied {_pct(result.governing_margin_tallied)}"
        f"{_limit_words(result.governing_tallied)}, proposed "
        f"{_pct(result.governing_margin_proposed)}{_limit_words(result.governing_proposed)}",
        f"{result.movable} positions take interchangeable blank joints; {result.moved} "
        "change. Shoe, float equipment, screens and other kinds stay where planned. Joints "
        "move only as far as the whole run gains, and as few as can.",
    ]
    if result.moved == 0:
        lines.append("The tallied order is already the best order.")
    else:
        lines.append("Proposed running order, joint 1 (bottom) first:")
        row = []
        for i, (new, old) in enumerate(zip(result.labels, tallied_labels), start=1):
            row.append(f"{i}:{new}" + ("*" if new != old else ""))
        for k in range(0, len(row), 10):
            lines.append("  " + "  ".join(row[k:k + 10]))
        lines.append("  (* another joint than tallied)")
    return lines


# ---------------------------------------------------------------------------
# liner in an existing well


def liner_dict(lj, plan_doc: dict) -> dict:
    """``rigplan liner --format json`` (SI): fit, tightest spot, weak zones, the plan."""
    a = lj.assessment
    fit = a.fit
    return {
        "fits": bool(fit.fits),
        "tightest": {"depth": _f(fit.tightest_depth), "min_id": _f(fit.tightest_min_id),
                     "clearance": _f(fit.tightest_clearance)},
        "required_clearance": _f(fit.required),
        "refused_depth": _f(fit.refused_depth),
        "zones": [{"top": z.top, "bottom": z.bottom, "max_ellipticity": z.max_ellipticity,
                   "min_collapse_rating": _f(z.min_collapse_rating), "min_id": z.min_id}
                  for z in a.zones],
        "old_casing": {
            "od": lj.casing.od, "wall": lj.casing.wall, "rating_wall": lj.casing.rating_wall,
            "rating_basis": lj.basis, "top": lj.casing.top, "bottom": lj.casing.bottom,
            "collapse_method": "timoshenko at the logged ellipticity",
            "min_collapse_rating": _f(np.min(a.rating)),
            "collapse_least_margin": _f(a.old_collapse.least_margin),
            "collapse_worst_depth": _f(a.old_collapse.worst_depth),
        },
        "log": {"source": lj.log.source, "tool": lj.log.tool, "curves": list(lj.log.curves),
                "depths": int(lj.log.depth.size),
                "top": float(lj.log.depth[0]), "bottom": float(lj.log.depth[-1])},
        "plan": plan_doc,
        "cautions": [CAUTION_OLD_CASING],
    }


def liner_profile_rows(lj, system: str, every: float | None = None) -> list:
    """Rows (depth, mean ID, min ID, ellipticity, collapse rating, clearance) along the log.

    ``every``: spacing of the rows [m] (default: about 40 rows over the
    casing), always including the tightest spot and each zone's worst depth.
    """
    a = lj.assessment
    z = a.shape.depth
    if z.size == 0:
        return []
    step = every or max((z[-1] - z[0]) / 40.0, 1e-9)
    marks = np.floor((z - z[0]) / step)
    keep = np.concatenate(([True], np.diff(marks) > 0))
    keep[int(np.argmin(np.where(np.isfinite(a.fit.clearance), a.fit.clearance, np.inf)))] = True
    keep[int(np.argmax(np.nan_to_num(a.shape.ellipticity)))] = True
    for zn in a.zones:   # each zone's narrowest depth
        inz = np.flatnonzero((z >= zn.top) & (z <= zn.bottom))
        keep[inz[int(np.argmin(a.shape.min_id[inz]))]] = True
    keep[-1] = True
    rows = []
    for i in np.flatnonzero(keep):
        rows.append((W.fmt(z[i], "length", system, 1),
                     W.fmt(a.shape.mean_id[i], "diameter", system, 3),
                     W.fmt(a.shape.min_id[i], "diameter", system, 3),
                     f"{100 * a.shape.ellipticity[i]:.2f} %",
                     W.fmt(a.rating[i], "pressure", system, 0),
                     "" if not np.isfinite(a.fit.clearance[i])
                     else W.fmt(a.fit.clearance[i], "diameter", system, 3)))
    return rows


def liner_lines(lj, system: str) -> list:
    """Summary lines for ``rigplan liner``."""
    a = lj.assessment
    fit = a.fit
    f = lambda v, k, d=None: W.fmt(v, k, system, d)   # noqa: E731
    lines = [f"Old casing: {f(lj.casing.od, 'diameter', 3)} OD x {f(lj.casing.wall, 'diameter', 3)} "
             f"wall, {f(lj.casing.top, 'length', 1)} to {f(lj.casing.bottom, 'length', 1)}; "
             f"ratings on the {lj.basis}",
             f"Caliper log: {lj.log.source}, {lj.log.tool}, {lj.log.depth.size} depths "
             f"({', '.join(lj.log.curves[:4])}{' ...' if len(lj.log.curves) > 4 else ''})"]
    if fit.fits:
        lines.append(f"FITS: least clearance {f(fit.tightest_clearance, 'diameter', 3)} at "
                     f"{f(fit.tightest_depth, 'length', 1)} (smallest ID "
                     f"{f(fit.tightest_min_id, 'diameter', 3)}), required "
                     f"{f(fit.required, 'diameter', 3)}")
    else:
        lines.append(f"DOES NOT FIT: the liner would stop at {f(fit.refused_depth, 'length', 1)}: "
                     f"clearance under the required {f(fit.required, 'diameter', 3)}; tightest "
                     f"{f(fit.tightest_clearance, 'diameter', 3)} at "
                     f"{f(fit.tightest_depth, 'length', 1)}")
    if a.zones:
        lines.append("Weak zones (oval beyond the plan's assumption, or dented):")
        for zn in a.zones:
            lines.append(f"  {f(zn.top, 'length', 1)} to {f(zn.bottom, 'length', 1)}: ellipticity "
                         f"up to {100 * zn.max_ellipticity:.2f} %, collapse rating down to "
                         f"{f(zn.min_collapse_rating, 'pressure', 0)}, smallest ID "
                         f"{f(zn.min_id, 'diameter', 3)}")
    else:
        lines.append("No weak zone: the casing is within the plan's assumed roundness.")
    oc = a.old_collapse
    if np.nanmax(oc.utilization, initial=0.0) <= 0.0:
        lines.append("Old casing collapse with the liner in place: no collapse load (what is "
                     "left inside is at least as heavy as the water outside at every depth)")
    else:
        lines.append(f"Old casing collapse with the liner in place: least margin "
                     f"{_pct(oc.least_margin)} at {f(oc.worst_depth, 'length', 1)}")
    return lines
