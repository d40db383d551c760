"""Saving an edited plan over the engineer's own file, changing only what changed.

A plan file is written by a person: comments, the order of the tables, a
``tally`` link and notations such as ``8-5/8 in`` or ``1150 kg/m3`` in a
US file carry meaning.  :func:`save_plan` keeps all of that where the value
did not change:

1. the plan the file holds now and the edited plan are both rendered as
   plan documents (:func:`rigplan.files.formats.planfile.plan_text`);
2. only the keys whose values differ (compared as quantities: ``8-5/8 in``
   equals ``8.625 in``) are written into the file's own document, read with
   tomlkit, which keeps comments, spacing and key order;
3. the result is read back and must give the edited plan, else the file is
   written in full from the plan (nothing is ever saved wrong);
4. it is written atomically and the previous version is kept beside it
   (``<plan>.~N~``, :mod:`rigplan.files.atomicio`).

A plan with a ``tally`` link keeps its link: measured lengths and set-asides
that came from the tally sheet are left there, not copied into the plan.

tomlkit is imported here only (saving), never on the app's start-up path.
"""

from __future__ import annotations

import dataclasses
import math
import re
import tomllib
from pathlib import Path

from rigplan.errors import InputError
from rigplan.files import units
from rigplan.files.atomicio import atomic_write_text

#: Keys holding quantities, by kind, for comparing the file's notation with
#: the value to write.
_KIND_OF_KEY = {
    **dict.fromkeys(("joint_length", "length", "measured_length", "fluid_level", "depth",
                     "height", "inside_level", "screen_depth_tolerance"), "length"),
    **dict.fromkeys(("od", "wall", "measured_wall", "bore", "dmax", "dmin", "diameter"),
                    "diameter"),
    **dict.fromkeys(("fluid_density", "fill_density", "density", "inside_density",
                     "fill_alternatives"), "density"),
    **dict.fromkeys(("collapse_rating", "burst_rating", "valve_rating"), "pressure"),
    **dict.fromkeys(("connection_rating", "tensile_rating", "joint_weight",
                     "min_running_weight", "set_down_weight"), "force"),
    "weight_per_length": "linear_weight",
}

#: Two quantities closer than this (relative) are the same value: the file
#: writer keeps 12 significant digits.
_SAME = 1e-9

_MISSING = object()

#: Top-level keys of the file that the rendered plan never holds but that
#: stay (the tally link).
_KEPT = ("tally",)


def _quantity(value, kind: str, system: str):
    if isinstance(value, str) and value.strip().lower() == "unrated":
        return math.nan
    return units.parse(value, kind, units.default_units(system)[kind] or None, "")


def _close(a: float, b: float) -> bool:
    if math.isnan(a) or math.isnan(b):
        return math.isnan(a) and math.isnan(b)
    return abs(a - b) <= _SAME * max(abs(a), abs(b), 1e-12)


def _same(key: str, old, new, system: str) -> bool:
    """The file's value ``old`` means the same as ``new`` for ``key``."""
    if old == new and type(old) is type(new):
        return True
    if isinstance(old, list) and isinstance(new, list):
        return len(old) == len(new) and all(_same(key, o, n, system) for o, n in zip(old, new))
    if isinstance(old, dict) or isinstance(new, dict):
        return False
    kind = _KIND_OF_KEY.get(key)
    if kind is not None:
        try:
            return _close(_quantity(old, kind, system), _quantity(new, kind, system))
        except (InputError, TypeError, ValueError):
            return False
    if isinstance(old, (int, float)) and isinstance(new, (int, float)) \
            and not isinstance(old, bool) and not isinstance(new, bool):
        return _close(float(old), float(new))
    return False


_UNIT_TAIL = re.compile(r"^[\s0-9.+\-eE/']+?\s*(?P<unit>[A-Za-z%][A-Za-z0-9/^ .%]*?)\s*$")


def _in_old_notation(key: str, old, new, system: str):
    """``new`` written in the unit the file used for ``key`` (``1150 kg/m3``
    in a US file stays in kg/m3), or ``new`` as rendered."""
    kind = _KIND_OF_KEY.get(key)
    if kind is None or not isinstance(old, str) or not isinstance(new, str):
        return new
    m = _UNIT_TAIL.match(old)
    if m is None:
        return new
    unit = m.group("unit")
    try:
        factor = units.parse(f"1 {unit}", kind, None, "")
        value = _quantity(new, kind, system)
    except (InputError, TypeError, ValueError):
        return new
    if not math.isfinite(value) or not factor > 0:
        return new
    return f"{value / factor:.12g} {unit}"


def _is_aot(value) -> bool:
    return isinstance(value, list) and bool(value) and all(isinstance(v, dict) for v in value)


def _set(container, key: str, value) -> None:
    """Set ``key`` keeping the trailing comment of the line it replaces."""
    import tomlkit
    old = container.get(key) if key in container else None
    comment = None
    trivia = getattr(old, "trivia", None)
    if trivia is not None and trivia.comment:
        comment = trivia.comment
    if _is_aot(value):
        aot = tomlkit.aot()
        for table in value:
            aot.append(tomlkit.item(table))
        container[key] = aot
        return
    item = tomlkit.item(value)
    if comment and hasattr(item, "comment") and not isinstance(value, dict):
        item.comment(comment.lstrip("# ").rstrip())
    container[key] = item


def _apply(container, old: dict, new: dict, system: str, top: bool = False) -> None:
    """Change ``container`` (a tomlkit table) where ``new`` differs from ``old``."""
    for key in list(dict.fromkeys(list(old) + list(new))):
        o = old.get(key, _MISSING)
        n = new.get(key, _MISSING)
        if n is _MISSING:
            if key in container and not (top and key in _KEPT):
                del container[key]
            continue
        if o is not _MISSING and _same(key, o, n, system):
            continue
        here = container.get(key) if key in container else None
        if isinstance(n, dict) and isinstance(o, dict) and isinstance(here, dict):
            _apply(here, o, n, system)
            continue
        if (_is_aot(n) and _is_aot(o) and here is not None and isinstance(here, list)
                and len(here) == len(o)):
            # table by table in place (their comments and notations stay);
            # tables added or dropped at the end
            import tomlkit
            for item, oi, ni in zip(here, o, n):
                _apply(item, oi, ni, system)
            for ni in n[len(o):]:
                here.append(tomlkit.item(ni))
            for i in range(len(o) - 1, len(n) - 1, -1):
                del here[i]
            continue
        if here is not None and not isinstance(n, (dict, list)):
            n = _in_old_notation(key, here.unwrap() if hasattr(here, "unwrap") else here, n,
                                 system)
        if top and key in ("section", "joint"):
            other = "joint" if key == "section" else "section"
            if other in container:
                del container[other]
        _set(container, key, n)


def _rendered(plan, system: str) -> dict:
    from rigplan.files.formats.planfile import plan_text
    return tomllib.loads(plan_text(plan, system))


def _without_tally_data(plan, file_plan, tallied_plan):
    """``plan`` with the tally's contributions (unchanged since reading)
    taken back to the file's own values, so they stay in the tally sheet."""
    own = {j.label: j for j in file_plan.joints}
    tallied = {j.label: j for j in tallied_plan.joints}
    joints = []
    for j in plan.joints:
        f, t = own.get(j.label), tallied.get(j.label)
        if f is not None and t is not None:
            changes = {}
            for name in ("measured_length", "measured_wall", "rejected", "note"):
                if getattr(j, name) == getattr(t, name) != getattr(f, name):
                    changes[name] = getattr(f, name)
            if changes:
                j = dataclasses.replace(j, **changes)
        joints.append(j)
    return dataclasses.replace(plan, joints=tuple(joints))


def _collar_as_read(data: dict, system_plan) -> dict:
    """The file's ``collar_joint`` as the label the reader resolved it to."""
    fe = data.get("float_equipment")
    if isinstance(fe, dict) and isinstance(fe.get("collar_joint"), int):
        m = system_plan.closure.valve_joint
        running = system_plan.running_joints()
        if m and 1 <= m <= len(running):
            return {"collar_joint": running[m - 1].label}
    return {}


def plan_file_text(plan, path) -> str:
    """The text :func:`save_plan` would write for ``plan`` over ``path``."""
    import tomlkit
    from rigplan.files.formats import file_system, parse_toml_text
    from rigplan.files.formats.planfile import plan_from_data, plan_text
    path = Path(path)
    source = str(path)
    text = path.read_text(encoding="utf-8")
    data = parse_toml_text(text, source)
    system = file_system(data, source)
    read = plan_from_data(data, source, base_dir=path.parent, default_name=path.stem)
    target = plan
    if "tally" in data:
        own = plan_from_data({k: v for k, v in data.items() if k != "tally"}, source,
                             base_dir=path.parent, default_name=path.stem).plan
        target = _without_tally_data(plan, own, read.plan)
        file_plan = own
    else:
        file_plan = read.plan
    old = _rendered(file_plan, system)
    new = _rendered(target, system)
    # The rendered plan writes the collar by label; the file may hold its
    # running position: compare like with like.
    if isinstance(old.get("float_equipment"), dict):
        old["float_equipment"].update(_collar_as_read(data, file_plan))
    doc = tomlkit.parse(text)
    _apply(doc, old, new, system, top=True)
    out = tomlkit.dumps(doc)
    if not _agrees(out, source, path.parent, plan, system):
        out = plan_text(target, system)    # the file in full: never saved wrong
        if "tally" in data:
            out = plan_text(plan, system)
    return out


def _agrees(text: str, source: str, base_dir: Path, plan, system: str) -> bool:
    from rigplan.files.formats import parse_toml_text
    from rigplan.files.formats.planfile import plan_from_data, plan_text
    try:
        back = plan_from_data(parse_toml_text(text, source), source, base_dir=base_dir,
                              default_name=Path(source).stem).plan
    except InputError:
        return False
    return _deep_same("", tomllib.loads(plan_text(back, "si")),
                      tomllib.loads(plan_text(plan, "si")))


def _deep_same(key: str, a, b) -> bool:
    if isinstance(a, dict) and isinstance(b, dict):
        return a.keys() == b.keys() and all(_deep_same(k, a[k], b[k]) for k in a)
    if _is_aot(a) and _is_aot(b):
        return len(a) == len(b) and all(_deep_same(key, x, y) for x, y in zip(a, b))
    return _same(key, a, b, "si")


def save_plan(plan, path) -> Path | None:
    """Write ``plan`` over the plan file ``path``, keeping its comments,
    layout and notations where nothing changed; atomic, with the previous
    version kept as ``<path>.~N~``.  Returns the backup's path.

    Raises
    ------
    InputError
        The file cannot be read back (it was changed outside the app and is
        no longer a plan): nothing is written.
    OSError
        The file could not be written; the old one is unchanged.
    """
    kept = atomic_write_text(path, plan_file_text(plan, path), backup=True)
    return Path(kept) if kept else None
