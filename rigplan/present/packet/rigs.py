"""Which rig? Every hoisting path of every rig offered, planned for one string.

``rigplan check PLAN --rig A --rig B`` (or ``--rig`` on a folder of rig
profiles) plans the string on each path of each rig and tabulates the
verdicts and margins; the packet's cover names the chosen rig and lists the
others.  The choice: a path that lands before one that does not, then the
largest least margin; ties go to the rig and path named first.
"""

from __future__ import annotations

import dataclasses
import math
from pathlib import Path

from rigplan.errors import InputError
from rigplan.present.packet.content import RigChoice


def expand_rigs(names, plan_path=None) -> list:
    """Rig profile paths from ``--rig`` values: files, bundled names, or folders
    (every ``*.toml`` in a folder, in name order); duplicates dropped."""
    from rigplan.files.job import resolve_rig
    out = []
    for name in names:
        p = Path(name)
        try:
            is_dir = p.is_dir()
        except (OSError, ValueError):     # a name too long: refused below as a file
            is_dir = False
        if is_dir:
            found = sorted(p.glob("*.toml"))
            if not found:
                raise InputError(str(p), "no rig profiles (*.toml) in this folder: expected "
                                         "a folder of rig profile files")
            out += found
        else:
            out.append(resolve_rig(str(name), Path(plan_path) if plan_path else None))
    seen, unique = set(), []
    for p in out:
        key = Path(p).resolve()
        if key not in seen:
            seen.add(key)
            unique.append(Path(p))
    return unique


@dataclasses.dataclass(frozen=True)
class Candidate:
    """One rig path planned: its table row, the job read with that rig, the plan."""

    choice: RigChoice
    job: object
    landing: object


def weigh_rigs(plan, rig_paths, path_name=None, fixed_closure: bool = False) -> list:
    """Plan ``plan`` (a StringPlan) on every path of every rig; best first is
    marked ``chosen``.  Returns :class:`Candidate` in the order given."""
    from rigplan.files.formats.rigfile import read_rig
    from rigplan.files.job import Job, plan_job
    cands = []
    for rp in rig_paths:
        rig = read_rig(rp)
        names = [p.name for p in rig.paths]
        if path_name is not None:
            if path_name not in names:
                raise InputError(f"{rp}: --path", f"no hoisting path named {path_name!r}; "
                                                  "the rig has: " + ", ".join(names))
            names = [path_name]
        for name in names:
            lp = plan_job(plan, rig, name, fixed_closure=fixed_closure)
            g = lp.governing
            choice = RigChoice(rig=rig.name, path=lp.path.path, verdict=str(lp.verdict),
                               lands=lp.lands, governing=str(g.name) if g else "",
                               margin=float(g.margin) if g else math.nan,
                               string_limit=float(lp.path.string_limit),
                               hook_limit=float(lp.path.hook_limit))
            job = Job(plan_path=None, rig_path=Path(rp), plan=plan, rig=rig, path_name=name)
            cands.append(Candidate(choice, job, lp))
    if cands:
        def key(i):
            c = cands[i].choice
            return (c.lands, c.margin if math.isfinite(c.margin) else -math.inf, -i)
        best = max(range(len(cands)), key=key)
        cands[best] = dataclasses.replace(
            cands[best], choice=dataclasses.replace(cands[best].choice, chosen=True))
    return cands
