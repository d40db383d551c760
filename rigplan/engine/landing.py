"""Where the string lands: depths of the shoe, the float collar and the screens.

A water well is built for its screens: after measured lengths and joints set
aside, the crew needs to know where each screen interval will sit against
the planned depths and the drilled depth (TD).  Pure geometry on SI floats.

The string hangs from the rig floor (depth 0) when landed; joint 1 goes in
the hole first and is the deepest.  With lengths ``L_1 .. L_n`` [m] and the
top of the string at depth ``z_0`` [m] (0 at the floor)::

    bottom_k = z_0 + sum_{i=k..n} L_i          top_k = bottom_k - L_k

so the shoe (bottom of joint 1) is at ``z_0 + sum L_i`` and a float collar
on top of joint ``m`` is at ``top_m``.  Valid for any lengths > 0 (the
identity of a string of end-to-end joints; stretch under its own weight is
left out: a few hundredths of a per cent for steel in water wells, see the
README's model limits).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

__all__ = ["LandingPicture", "LandingRow", "joint_depths", "landing_picture",
           "screen_groups"]


def joint_depths(lengths, top: float = 0.0) -> tuple:
    """Top and bottom depth [m] of each joint of a landed string.

    Parameters
    ----------
    lengths : array_like
        Joint lengths [m] in running order (index 0 = joint 1, the deepest).
    top : float
        Depth of the top of the string [m] (0: at the rig floor).

    Returns
    -------
    (top_depth, bottom_depth) : two arrays [m]

    >>> t, b = joint_depths([6.0, 6.5, 7.0])
    >>> b.tolist(), t.tolist()
    ([19.5, 13.5, 7.0], [13.5, 7.0, 0.0])
    """
    lengths = np.asarray(lengths, dtype=float)
    below_top = np.cumsum(lengths[::-1])[::-1]          # sum_{i>=k} L_i
    above = np.append(below_top[1:], 0.0)               # sum_{i>k} L_i
    return top + above, top + below_top


def screen_groups(labels, is_screen) -> list:
    """Screen intervals of a string: runs of consecutive screen joints, as
    tuples of their labels (bottom joint first).

    >>> screen_groups(["J1", "J2", "J3", "J4", "J5"], [False, True, True, False, True])
    [('J2', 'J3'), ('J5',)]
    """
    groups, current = [], []
    for label, screen in zip(labels, is_screen):
        if screen:
            current.append(str(label))
        elif current:
            groups.append(tuple(current))
            current = []
    if current:
        groups.append(tuple(current))
    return groups


@dataclass(frozen=True)
class LandingRow:
    """One item of the landing picture, SI units.

    item : ``"shoe"``, ``"float collar"`` or ``"screen"``
    labels : joints the item belongs to (a screen interval: its joints, the
        bottom one first; the float collar: the joint it sits on top of;
        the shoe: joint 1)
    planned_top, planned_bottom : depths in the plan as written [m]
    top, bottom : depths as run (measured lengths, joints set aside) [m];
        nan when the item is no longer in the string
    shift : as-run minus planned, of the item's bottom [m] (+ = deeper)
    moved : the shift is larger than the tolerance (screens only)
    """

    item: str
    labels: tuple
    planned_top: float
    planned_bottom: float
    top: float
    bottom: float
    shift: float
    moved: bool = False


@dataclass(frozen=True)
class LandingPicture:
    """Shoe, float collar and screen intervals as run against the plan and TD.

    rows : :class:`LandingRow` list: the shoe, the float collar (if any),
        then each screen interval from the bottom up
    hole_depth : drilled depth, TD [m] (nan when not given)
    shoe_off_bottom : TD minus the as-run shoe depth [m] (negative: the
        string is longer than the hole)
    tolerance : screen depth tolerance [m]
    """

    rows: tuple
    hole_depth: float
    shoe_off_bottom: float
    tolerance: float

    @property
    def moved(self) -> tuple:
        """The screen intervals that moved more than the tolerance."""
        return tuple(r for r in self.rows if r.moved)


def _depths(labels, lengths):
    top, bottom = joint_depths(lengths)
    return {str(lab): (float(t), float(b)) for lab, t, b in zip(labels, top, bottom)}


def landing_picture(planned_labels, planned_lengths, planned_screen, planned_valve,
                    run_labels, run_lengths, run_valve, hole_depth: float,
                    tolerance: float) -> LandingPicture:
    """Landing depths as run against the plan (see the module equations).

    Parameters
    ----------
    planned_labels, planned_lengths, planned_screen : the running joints of
        the plan as written: labels, planned lengths [m], screen or not
    planned_valve : float collar position in the plan (running joint it sits
        on top of, 1-based), 0 for a float shoe, None for an open shoe
    run_labels, run_lengths : the running joints as run: joints set aside
        left out, measured lengths where taped, planned ones elsewhere [m]
    run_valve : float collar position in the as-run running order
    hole_depth : TD [m] (nan when unknown)
    tolerance : how far a screen interval may move before it is flagged [m]

    A screen interval keeps the joints the plan gave it; as run, it reaches
    from the top of its highest joint still in the string to the bottom of
    its lowest one.

    >>> p = landing_picture(["J1", "J2", "J3"], [6.0, 6.0, 6.0], [False, True, False], 2,
    ...                     ["J1", "J2", "J3"], [6.0, 6.3, 6.0], 2, 20.0, 0.2)
    >>> [(r.item, r.bottom, round(r.shift, 2), r.moved) for r in p.rows]
    [('shoe', 18.3, 0.3, False), ('float collar', 6.0, 0.0, False), ('screen', 12.3, 0.3, True)]
    >>> round(p.shoe_off_bottom, 2)
    1.7
    """
    planned = _depths(planned_labels, planned_lengths)
    run = _depths(run_labels, run_lengths)
    rows = []
    p_labels = [str(x) for x in planned_labels]
    r_labels = [str(x) for x in run_labels]
    nan = math.nan
    if p_labels:
        p_shoe = planned[p_labels[0]][1]
        r_shoe = run[r_labels[0]][1] if r_labels else nan
        rows.append(LandingRow("shoe", (r_labels[0] if r_labels else p_labels[0],),
                               p_shoe, p_shoe, r_shoe, r_shoe, r_shoe - p_shoe))
    if planned_valve:
        p_lab = p_labels[planned_valve - 1] if planned_valve <= len(p_labels) else None
        r_lab = r_labels[run_valve - 1] if run_valve and run_valve <= len(r_labels) else None
        p_z = planned[p_lab][0] if p_lab else nan
        r_z = run[r_lab][0] if r_lab else nan
        rows.append(LandingRow("float collar", (r_lab or p_lab,), p_z, p_z, r_z, r_z, r_z - p_z))
    for group in screen_groups(p_labels, planned_screen):
        p_top = min(planned[g][0] for g in group)
        p_bot = max(planned[g][1] for g in group)
        here = [g for g in group if g in run]
        if here:
            top = min(run[g][0] for g in here)
            bottom = max(run[g][1] for g in here)
        else:
            top = bottom = nan
        shift = bottom - p_bot
        top_shift = top - p_top
        moved = not (abs(shift) <= tolerance and abs(top_shift) <= tolerance)
        rows.append(LandingRow("screen", group, p_top, p_bot, top, bottom, shift, moved))
    shoe = rows[0].bottom if rows else nan
    return LandingPicture(rows=tuple(rows), hole_depth=float(hole_depth),
                          shoe_off_bottom=float(hole_depth) - shoe, tolerance=float(tolerance))
