"""Well schematic geometry: the drawable boxes and marks of a side view.

Shared by the printed packet (drawn with matplotlib) and the terminal app
(drawn by a Textual widget): this module computes *what* to draw -- depths
from the rig floor [m], downward, and radii from the well axis [m] -- and
never draws.  No matplotlib, no textual, no physics: every depth is read
from the landing plan (shoe depths, fill levels, joint lengths) and the
hole, grout and float equipment of the job.

Depth is to scale; the renderers may stretch the radial direction so thin
walls show.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

#: Box kinds, drawn back to front in this order.
BOX_KINDS = ("hole", "annulus fluid", "grout", "empty", "inside fluid", "fill fluid", "casing", "screen",
             "sump")


@dataclass(frozen=True)
class Box:
    """A rectangle of the side view, mirrored about the axis.

    kind : one of :data:`BOX_KINDS`
    top, bottom : depths from the rig floor [m], top < bottom
    inner, outer : radii from the axis [m] (inner 0: spans the axis)
    label : what it is, in words (for a legend or a tooltip)
    """

    kind: str
    top: float
    bottom: float
    inner: float
    outer: float
    label: str = ""


@dataclass(frozen=True)
class Mark:
    """A depth worth labelling: ``kind`` is one of "TD", "shoe", "float shoe",
    "float collar", "fluid level outside", "fill level inside", "grout top".
    """

    kind: str
    depth: float
    radius: float


@dataclass(frozen=True)
class Schematic:
    """Everything a side view draws at one running step.

    step : joints in the hole (0: none; n: landed)
    n : joints in the string
    depth_max : the deepest depth to show [m] (TD, or the landed shoe)
    radius_max : the largest radius to show [m] (hole or the widest pipe)
    boxes : :class:`Box` in drawing order
    marks : :class:`Mark` sorted by depth
    """

    step: int
    n: int
    depth_max: float
    radius_max: float
    boxes: tuple
    marks: tuple

    def boxes_of(self, kind: str) -> list:
        return [b for b in self.boxes if b.kind == kind]

    def mark(self, kind: str):
        for m in self.marks:
            if m.kind == kind:
                return m
        return None


def governing_step(landing) -> int:
    """The running step (1-based) where the schematic shows the fluid levels:
    the governing limit's step when it has one, else the least-margin step of
    the fill schedule, else the step of the least hoisting margin."""
    g = landing.governing
    if g is not None and getattr(g, "step", None):
        return int(g.step)
    if _staged_split(landing):
        return _staged_split(landing)      # stage 1 made up whole: its heaviest
    opt = landing.best_float
    chk = landing.chosen
    if opt is not None and opt.schedule is not None and not chk.closure.is_open \
            and opt.schedule.least_margin_step:
        return int(opt.schedule.least_margin_step)
    m = np.asarray(chk.capacity_margin, dtype=float)
    if m.size == 0 or not np.any(np.isfinite(m)):
        return int(m.size)
    return int(np.nanargmin(m)) + 1


def _sections(kinds, od, bore, first, last):
    """Runs of joints (indices first..last) with one kind, OD and bore."""
    out = []
    start = first
    for i in range(first + 1, last + 2):
        if i > last or kinds[i] != kinds[start] or od[i] != od[start] or bore[i] != bore[start]:
            out.append((start, i - 1))
            start = i
    return out


def _staged_split(landing) -> int:
    """The split of a staged setting when the chosen run is staged, else 0."""
    st = landing.stages
    if st is None or str(landing.verdict) != "lands in stages":
        return 0
    return int(st.split)


def joint_positions(landing, step: int):
    """Bottom and top depths [m] of joints 1..``step`` at running step ``step``.

    Each stage hangs from the floor while it is run: the shoe of step k is
    ``loads.shoe_depth[k-1]`` and joint i spans up from it by the lengths of
    joints 1..i.  In a staged setting, once stage 2 is being run, stage 1
    (joints 1..split) lies landed at the bottom (its shoe at the sum of all
    joint lengths) and stage 2 hangs from the floor above it.
    """
    j = landing.joints
    loads = landing.chosen.loads
    length = np.asarray(j.length, dtype=float)
    p = _staged_split(landing)
    if p and step > p:
        landed = float(np.sum(length))
        b1 = landed - np.concatenate(([0.0], np.cumsum(length[:p - 1])))
        shoe2 = float(loads.shoe_depth[step - 1])
        b2 = shoe2 - np.concatenate(([0.0], np.cumsum(length[p:step - 1])))
        bottoms = np.concatenate((b1, b2))
    else:
        shoe = float(loads.shoe_depth[step - 1])
        bottoms = shoe - np.concatenate(([0.0], np.cumsum(length[:step - 1])))
    tops = bottoms - length[:step]
    tops = np.where(np.abs(tops) < 1e-9, 0.0, tops)
    return bottoms, tops


def well_schematic(landing, step: int | None = None, grout=None) -> Schematic:
    """The side view with joints 1..``step`` in the hole (default: landed).

    Parameters
    ----------
    landing : rigplan.engine.planner.LandingPlan
    step : joints in the hole, 0..n (None: n, the landed string)
    grout : rigplan.engine.stringmodel.GroutSpec or None; the grout column
        is drawn in the annulus of the landed string only

    The shoe of step k is ``loads.shoe_depth[k-1]``; joint i (1-based) spans
    from the shoe up by the lengths of joints 1..i.  Inside the string, the
    fill fluid of a floated run stands from the step's fill level down to the
    check valve and the hole fluid fills the shoe track; an open string holds
    the hole fluid up to the hole's fluid level.
    """
    j = landing.joints
    hole = landing.hole
    chk = landing.chosen
    loads = chk.loads
    n = j.n
    step = n if step is None else max(0, min(int(step), n))
    length = np.asarray(j.length, dtype=float)
    od = np.asarray(j.od, dtype=float)
    bore = np.asarray(j.bore, dtype=float)
    landed_shoe = float(np.sum(length))
    td = float(hole.depth) if math.isfinite(hole.depth) else landed_shoe
    hole_r = float(hole.diameter) / 2 if math.isfinite(hole.diameter) else float(np.max(od)) * 0.7
    boxes = []
    marks = [Mark("TD", td, hole_r)]
    boxes.append(Box("hole", 0.0, td, 0.0, hole_r, "hole"))
    level = float(hole.fluid_level) if math.isfinite(hole.fluid_level) else 0.0
    if step == 0:
        boxes.append(Box("annulus fluid", level, td, 0.0, hole_r, "hole fluid"))
        marks.append(Mark("fluid level outside", level, hole_r))
        return Schematic(0, n, max(td, landed_shoe), max(hole_r, float(np.max(od)) / 2),
                         tuple(boxes), tuple(sorted(marks, key=lambda m: m.depth)))
    bottoms, tops = joint_positions(landing, step)
    shoe = float(bottoms[0])
    string_top = float(np.min(tops))
    outer = float(od[:step].max()) / 2
    # the annulus: hole fluid (and grout when landed), below the shoe the whole hole
    grout_top = None
    if grout is not None and step == n and math.isfinite(grout.height) and grout.height > 0:
        grout_top = max(shoe - float(grout.height), level)
    boxes.append(Box("annulus fluid", level, td, 0.0, hole_r, "hole fluid"))
    if grout_top is not None:
        boxes.append(Box("grout", grout_top, shoe, outer, hole_r, "grout"))
        marks.append(Mark("grout top", grout_top, hole_r))
    marks.append(Mark("fluid level outside", level, hole_r))
    # inside the string
    closure = chk.closure
    inner_r = float(bore[:step].min()) / 2
    if closure.is_open:
        boxes.append(Box("inside fluid", max(level, string_top), shoe, 0.0, inner_r,
                         "hole fluid inside"))
        if level > string_top:
            boxes.append(Box("empty", string_top, level, 0.0, inner_r, "empty pipe"))
    else:
        m = closure.valve_joint or 0            # valve at the bottom of joint m+1
        valve = float(bottoms[m]) if m < step else shoe
        if m > 0 and m <= step:
            boxes.append(Box("inside fluid", valve, shoe, 0.0, inner_r, "hole fluid (shoe track)"))
        fill = float(loads.fill_level[step - 1])
        if math.isfinite(fill) and fill < valve:
            fill = max(fill, string_top)
            boxes.append(Box("fill fluid", fill, valve, 0.0, inner_r, "fill fluid"))
        else:
            fill = valve
        if fill > string_top:
            boxes.append(Box("empty", string_top, fill, 0.0, inner_r, "empty pipe"))
        marks.append(Mark("fill level inside", fill, inner_r))
        marks.append(Mark("float shoe" if m == 0 else "float collar", valve, outer))
    # the pipe walls, section by section (a screen or sump run stands apart)
    split = _staged_split(landing)
    runs = (_sections(j.kind, od, bore, 0, split - 1) + _sections(j.kind, od, bore, split, step - 1)
            if split and step > split else _sections(j.kind, od, bore, 0, step - 1))
    for a, b in runs:
        kind = j.kind[a]
        box_kind = "screen" if kind == "screen" else "sump" if kind == "sump" else "casing"
        words = kind.replace("_", " ")
        label = f"{words} joints {a + 1}-{b + 1}" if b > a else f"{words} joint {a + 1}"
        boxes.append(Box(box_kind, float(tops[b]), float(bottoms[a]), float(bore[a]) / 2,
                         float(od[a]) / 2, label))
    marks.append(Mark("shoe", shoe, outer))
    order = {k: i for i, k in enumerate(BOX_KINDS)}
    boxes.sort(key=lambda bx: order[bx.kind])
    return Schematic(step, n, max(td, shoe), max(hole_r, outer), tuple(boxes),
                     tuple(sorted(marks, key=lambda m: (m.depth, m.kind))))
