"""Hoisting capacity: block efficiency, line and derrick loads, and the
weakest part of each hoisting path of a rig.

Engine module: SI floats (numpy where it helps), no units library, no file
I/O.  Forces are in newtons [N], positive in tension.

A hoisting path (main winch reeved through a travelling block, the top head's
pull-up, an auxiliary winch on a single line, ...) can lift no more than its
weakest part.  :func:`path_capacity` refers every rating to the hook, takes
off the dead load of the gear riding on the line, the overpull the driller
keeps in reserve and a dynamic allowance, and reports the largest *string
load* (hook load less dead load) the path allows and which part governs.

References
----------
.. [1] A. T. Bourgoyne Jr., K. K. Millheim, M. E. Chenevert, F. S. Young Jr.,
   *Applied Drilling Engineering*, SPE Textbook Series vol. 2, 1986, ch. 1
   (hoisting system: block efficiency, fast-line load, derrick load,
   equivalent derrick load; Example 1.2; Table 1.2).
.. [2] API RP 9B, *Application, Care, and Use of Wire Rope for Oil Field
   Service* (block efficiency with sheave factor K; wire-rope design factors).
"""

from __future__ import annotations

import math
import numbers
from dataclasses import dataclass

import numpy as np

from rigplan.errors import InputError

#: Sheave factor K for roller-bearing sheaves [-]: line tension grows by this
#: factor over each sheave ([1] ch. 1; [2]).  Plain-bearing sheaves are usually
#: taken as 1.09 (from memory, same sources).
ROLLER_BEARING_SHEAVE_FACTOR = 1.04

#: Default wire-rope design factor [-] (minimum breaking force / working line
#: pull).  API RP 9B recommends at least 3 for hoisting service and allows 2
#: when setting casing or working stuck pipe (from memory, [2]); local codes
#: and the rope maker may ask for more.
DEFAULT_ROPE_DESIGN_FACTOR = 3.0

#: Kinds of hoisting component.
COMPONENT_KINDS = (
    "winch",
    "wire_rope",
    "mast",
    "top_head",
    "elevator",
    "clamp",
    "spider",
    "lifting_sub",
    "other",
)

#: Handling tools hold the string only, not the block, hook or top head: the
#: dead load of the gear is not subtracted from their rating.
HANDLING_TOOL_KINDS = ("elevator", "clamp", "spider", "lifting_sub")

#: Kinds allowed in ``HoistPath.tools``; winch, rope, mast and top head have
#: fields of their own.  ``"other"`` (hook, swivel, bails, ...) is taken to
#: carry the whole hook load, dead load included (the conservative reading).
TOOL_KINDS = HANDLING_TOOL_KINDS + ("other",)

_NAN = float("nan")


# ---------------------------------------------------------------------------
# input checks (one-line messages naming the key and what was expected)


def _is_real(value) -> bool:
    return isinstance(value, numbers.Real) and not isinstance(value, bool)


def _check_lines(where: str, lines) -> int:
    """A whole number of lines strung, >= 1."""
    if not _is_real(lines) or not math.isfinite(lines) or lines != math.floor(lines):
        raise InputError(where, f"expected a whole number of lines strung (>= 1), got {lines!r}")
    if lines < 1:
        raise InputError(where, f"expected at least 1 line strung, got {lines!r}")
    return int(lines)


def _check_lines_array(where: str, lines) -> np.ndarray:
    arr = np.asarray(lines)
    if arr.dtype == bool or not (np.issubdtype(arr.dtype, np.integer)
                                 or np.issubdtype(arr.dtype, np.floating)):
        raise InputError(where, f"expected a whole number of lines strung (>= 1), got {lines!r}")
    if not np.all(np.isfinite(arr)) or np.any(arr != np.floor(arr)):
        raise InputError(where, f"expected a whole number of lines strung (>= 1), got {lines!r}")
    if np.any(arr < 1):
        raise InputError(where, f"expected at least 1 line strung, got {lines!r}")
    return arr.astype(float)


def _check_sheave_factor(where: str, k) -> float:
    if not _is_real(k) or not math.isfinite(k) or k < 1.0:
        raise InputError(where, f"expected a sheave factor >= 1 [-] (1.04 for roller bearings), got {k!r}")
    return float(k)


def _check_force(where: str, value, *, allow_nan: bool, positive: bool, what: str) -> float:
    """A force [N]: finite, > 0 (or >= 0); nan allowed when it may be unrated."""
    if not _is_real(value):
        raise InputError(where, f"expected {what} in N, got {value!r}")
    value = float(value)
    if math.isnan(value):
        if allow_nan:
            return value
        raise InputError(where, f"expected {what} in N, got nan")
    if not math.isfinite(value):
        raise InputError(where, f"expected a finite {what} in N, got {value!r}")
    if positive and value <= 0.0:
        raise InputError(where, f"expected {what} > 0 N (nan when unrated), got {value!r}")
    if not positive and value < 0.0:
        raise InputError(where, f"expected {what} >= 0 N, got {value!r}")
    return value


def _check_hook_load(where: str, hook_load) -> np.ndarray:
    arr = np.asarray(hook_load, dtype=float)
    if not np.all(np.isfinite(arr)) or np.any(arr < 0.0):
        raise InputError(where, f"expected a finite hook load >= 0 N, got {hook_load!r}")
    return arr


def _check_efficiency(where: str, efficiency) -> float:
    if not _is_real(efficiency) or not (0.0 < efficiency <= 1.0):
        raise InputError(where, f"expected a block efficiency in (0, 1] [-], got {efficiency!r}")
    return float(efficiency)


def _scalar_or_array(arr: np.ndarray):
    return float(arr) if arr.ndim == 0 else arr


# ---------------------------------------------------------------------------
# block and derrick formulas


def block_efficiency(lines, sheave_factor: float = ROLLER_BEARING_SHEAVE_FACTOR):
    """Block-and-tackle efficiency with ``n`` lines strung, API RP 9B form.

    .. math::

        E_n = \\frac{K^n - 1}{n K^n (K - 1)}
            = \\frac{1}{n} \\sum_{i=1}^{n} K^{-i}

    Line tension grows by the sheave factor ``K`` over each sheave, so the
    ``n`` lines supporting the block carry ``F_f/K, F_f/K^2, ..., F_f/K^n`` of
    the fast-line pull ``F_f``; the hook load is ``W = E_n n F_f``.  For
    ``K = 1`` (no friction) the limit ``E_n = 1`` is returned.

    Parameters
    ----------
    lines : int or array of int
        Number of lines strung between crown and travelling block ``n`` [-],
        >= 1.  Whole numbers given as floats are accepted.
    sheave_factor : float
        Sheave factor ``K`` [-], >= 1; 1.04 for roller bearings.

    Returns
    -------
    float or ndarray
        Block efficiency ``E_n`` [-], in (0, 1].

    Notes
    -----
    Valid for a simple block and tackle with the fast line coming off the
    last sheave; takes the block as stationary or moving slowly upward
    (hoisting).  Lowering reverses the friction and is not covered.

    References
    ----------
    Bourgoyne et al., *Applied Drilling Engineering*, 1986, ch. 1; API RP 9B.

    Examples
    --------
    Eight lines on roller bearings (Applied Drilling Engineering, ch. 1,
    formula value 0.842):

    >>> round(block_efficiency(8), 3)
    0.842
    >>> block_efficiency(4, sheave_factor=1.0)
    1.0
    """
    n = _check_lines_array("lines", lines)
    k = _check_sheave_factor("sheave_factor", sheave_factor)
    if k == 1.0:
        e = np.ones_like(n)
    else:
        # (K^n - 1) via expm1 keeps full precision when K is close to 1;
        # K - 1 is exact in floating point for 1 <= K <= 2.
        e = np.expm1(n * math.log1p(k - 1.0)) / (n * k ** n * (k - 1.0))
    return _scalar_or_array(e)


def fast_line_load(hook_load, lines, sheave_factor: float = ROLLER_BEARING_SHEAVE_FACTOR,
                   *, efficiency: float | None = None):
    """Fast-line tension while hoisting: ``F_f = W / (n E_n)``.

    Parameters
    ----------
    hook_load : float or array
        Load on the hook ``W`` [N], >= 0.
    lines : int
        Number of lines strung ``n`` [-], >= 1.
    sheave_factor : float
        Sheave factor ``K`` [-], >= 1 (1.04 roller bearings); used for
        ``E_n`` through :func:`block_efficiency` unless ``efficiency`` is
        given.
    efficiency : float, optional
        Block efficiency ``E`` [-] in (0, 1] from a table or the block
        maker, overriding the formula.

    Returns
    -------
    float or ndarray
        Fast-line tension ``F_f`` [N].

    Notes
    -----
    Same validity as :func:`block_efficiency` (hoisting, not lowering).

    References
    ----------
    Bourgoyne et al., *Applied Drilling Engineering*, 1986, ch. 1, Example
    1.2; API RP 9B.

    Examples
    --------
    Applied Drilling Engineering Example 1.2, 300,000 lbf on 8 lines with
    E = 0.841 (lbf in, lbf out):

    >>> round(fast_line_load(300_000.0, 8, efficiency=0.841))
    44590
    """
    w = _check_hook_load("hook_load", hook_load)
    n = _check_lines("lines", lines)
    if efficiency is None:
        e = block_efficiency(n, sheave_factor)
    else:
        e = _check_efficiency("efficiency", efficiency)
    return _scalar_or_array(w / (n * e))


def derrick_load(hook_load, lines, efficiency):
    """Total load on the derrick or mast: hook load plus fast and dead lines.

    .. math::

        F_d = W + \\frac{W}{E n} + \\frac{W}{n} = W \\frac{1 + E + E n}{E n}

    Parameters
    ----------
    hook_load : float or array
        Load on the hook ``W`` [N], >= 0.
    lines : int
        Number of lines strung ``n`` [-], >= 1.
    efficiency : float
        Block efficiency ``E`` [-], in (0, 1].

    Returns
    -------
    float or ndarray
        Derrick load ``F_d`` [N].

    Notes
    -----
    Takes the fast line and the dead line as pulling down on the crown,
    parallel to the hook load (drawworks and dead-line anchor at the floor).
    Rigs whose winch sits elsewhere load the mast differently.

    References
    ----------
    Bourgoyne et al., *Applied Drilling Engineering*, 1986, ch. 1, Example
    1.2.

    Examples
    --------
    >>> round(derrick_load(300_000.0, 8, 0.841))
    382090
    """
    w = _check_hook_load("hook_load", hook_load)
    n = _check_lines("lines", lines)
    e = _check_efficiency("efficiency", efficiency)
    return _scalar_or_array(w * (1.0 + e + e * n) / (e * n))


def equivalent_derrick_load(hook_load, lines):
    """Equivalent derrick load: four times the load on the most loaded leg.

    .. math::

        F_{de} = W \\frac{n + 4}{n}

    Parameters
    ----------
    hook_load : float or array
        Load on the hook ``W`` [N], >= 0.
    lines : int
        Number of lines strung ``n`` [-], >= 1.

    Returns
    -------
    float or ndarray
        Equivalent derrick load ``F_de`` [N].

    Notes
    -----
    Four-legged derrick with the hook load shared equally by the legs, the
    dead line anchored at one leg and the fast line pulled between two legs:
    the dead-line leg carries ``W/4 + W/n``, the most of any leg while
    ``E > 0.5``; ``F_de`` is four times that.

    References
    ----------
    Bourgoyne et al., *Applied Drilling Engineering*, 1986, ch. 1, Example
    1.2.

    Examples
    --------
    >>> equivalent_derrick_load(300_000.0, 8)
    450000.0
    """
    w = _check_hook_load("hook_load", hook_load)
    n = _check_lines("lines", lines)
    return _scalar_or_array(w * (n + 4.0) / n)


def derrick_efficiency_factor(lines, efficiency) -> float:
    """Derrick efficiency factor ``E_d = F_d / F_de = (1 + E + E n) / (E (n + 4))``.

    Parameters
    ----------
    lines : int
        Number of lines strung ``n`` [-], >= 1.
    efficiency : float
        Block efficiency ``E`` [-], in (0, 1].

    Returns
    -------
    float
        Derrick efficiency factor [-].

    Notes
    -----
    Same layout as :func:`equivalent_derrick_load`.

    References
    ----------
    Bourgoyne et al., *Applied Drilling Engineering*, 1986, ch. 1, Example
    1.2.

    Examples
    --------
    >>> round(derrick_efficiency_factor(8, 0.841), 3)
    0.849
    """
    n = _check_lines("lines", lines)
    e = _check_efficiency("efficiency", efficiency)
    return (1.0 + e + e * n) / (e * (n + 4.0))


# ---------------------------------------------------------------------------
# data: components, paths, landing string, rig


@dataclass(frozen=True)
class Component:
    """One part of a hoisting path with its rating referred to the hook.

    name : label shown to the user ("winch line pull", "casing elevator")
    kind : one of :data:`COMPONENT_KINDS`
    rating : load the part allows on the hook [N] (nan = unrated)
    carries_dead_load : True when the part carries the block, hook and top
        head as well as the string (winch, rope, mast, top head, "other");
        False for handling tools that hold the string only
    note : how the rating was obtained
    """

    name: str
    kind: str
    rating: float
    carries_dead_load: bool
    note: str = ""

    def __post_init__(self):
        where = f"component {self.name!r}"
        if not isinstance(self.name, str) or not self.name.strip():
            raise InputError("component.name", f"expected a non-empty name, got {self.name!r}")
        if self.kind not in COMPONENT_KINDS:
            raise InputError(f"{where}.kind",
                             f"expected one of {', '.join(COMPONENT_KINDS)}, got {self.kind!r}")
        _check_force(f"{where}.rating", self.rating, allow_nan=True, positive=True,
                     what="a hook-load rating")


@dataclass(frozen=True)
class HoistPath:
    """One way the rig can hold the string, SI units.

    name : label ("main winch, 4 lines", "top head pull-up")
    lines : lines strung between crown and travelling block [-], >= 1
    sheave_factor : sheave factor K [-], >= 1 (1.04 roller bearings)
    winch_line_pull : winch line pull at the drum layer in use [N] (nan = unrated)
    rope_breaking_force : wire rope minimum breaking force [N] (nan = unrated)
    rope_design_factor : breaking force over working line pull [-], > 0;
        default 3 (API RP 9B minimum for hoisting service, from memory)
    mast_rating : static hook-load rating of the mast for the lines strung [N]
    top_head_pullup : top-head pull-up rating [N] (nan = unrated)
    tools : handling tools as ``(name, kind, rating [N])``, kind in
        :data:`TOOL_KINDS`, rating nan when unrated
    dead_load : weight of the gear riding on the line [N]: block, hook,
        elevators or clamp, and the top head where it rides on the line
    overpull_reserve : pull the driller keeps in reserve to work stuck pipe [N]
    dynamic_factor : allowance for setting slips or clamps [-], >= 1; every
        rating is divided by it
    notes : free text
    """

    name: str
    lines: int = 1
    sheave_factor: float = ROLLER_BEARING_SHEAVE_FACTOR
    winch_line_pull: float = _NAN
    rope_breaking_force: float = _NAN
    rope_design_factor: float = DEFAULT_ROPE_DESIGN_FACTOR
    mast_rating: float = _NAN
    top_head_pullup: float = _NAN
    tools: tuple = ()
    dead_load: float = 0.0
    overpull_reserve: float = 0.0
    dynamic_factor: float = 1.0
    notes: str = ""

    def __post_init__(self):
        if not isinstance(self.name, str) or not self.name.strip():
            raise InputError("hoist path.name", f"expected a non-empty path name, got {self.name!r}")
        where = f"hoist path {self.name!r}"
        object.__setattr__(self, "lines", _check_lines(f"{where}.lines", self.lines))
        _check_sheave_factor(f"{where}.sheave_factor", self.sheave_factor)
        _check_force(f"{where}.winch_line_pull", self.winch_line_pull, allow_nan=True,
                     positive=True, what="a winch line pull")
        _check_force(f"{where}.rope_breaking_force", self.rope_breaking_force, allow_nan=True,
                     positive=True, what="a rope minimum breaking force")
        df = self.rope_design_factor
        if not _is_real(df) or not math.isfinite(df) or df <= 0.0:
            raise InputError(f"{where}.rope_design_factor",
                             f"expected a rope design factor > 0 [-] (3 is usual), got {df!r}")
        _check_force(f"{where}.mast_rating", self.mast_rating, allow_nan=True,
                     positive=True, what="a mast hook-load rating")
        _check_force(f"{where}.top_head_pullup", self.top_head_pullup, allow_nan=True,
                     positive=True, what="a top-head pull-up rating")
        _check_force(f"{where}.dead_load", self.dead_load, allow_nan=False,
                     positive=False, what="a dead load")
        _check_force(f"{where}.overpull_reserve", self.overpull_reserve, allow_nan=False,
                     positive=False, what="an overpull reserve")
        dyn = self.dynamic_factor
        if not _is_real(dyn) or not math.isfinite(dyn) or dyn < 1.0:
            raise InputError(f"{where}.dynamic_factor",
                             f"expected a dynamic factor >= 1 [-], got {dyn!r}")
        tools = []
        names = {"winch line pull", "wire rope", "mast", "top head pull-up"}
        try:
            entries = tuple(self.tools)
        except TypeError:
            raise InputError(f"{where}.tools",
                             "expected a list of (name, kind, rating N) entries") from None
        for i, entry in enumerate(entries):
            w = f"{where}.tools[{i}]"
            try:
                name, kind, rating = entry
            except (TypeError, ValueError):
                raise InputError(w, f"expected (name, kind, rating N), got {entry!r}") from None
            if not isinstance(name, str) or not name.strip():
                raise InputError(f"{w}.name", f"expected a non-empty tool name, got {name!r}")
            if kind not in TOOL_KINDS:
                raise InputError(f"{w}.kind", f"expected one of {', '.join(TOOL_KINDS)}, got {kind!r}")
            rating = _check_force(f"{w}.rating", rating, allow_nan=True, positive=True,
                                  what="a tool rating")
            if name in names:
                raise InputError(f"{w}.name", f"expected a name not used twice in the path, got {name!r}")
            names.add(name)
            tools.append((name, kind, rating))
        object.__setattr__(self, "tools", tuple(tools))

    def components(self) -> tuple:
        """Every part of the path as :class:`Component`, ratings at the hook [N].

        Order: winch, wire rope, mast, top head, then the tools as listed.

        * winch: ``line_pull * n * E_n``;
        * wire rope: ``MBF / DF * n * E_n``;
        * mast, top head and tools: as given.
        """
        n = self.lines
        e = block_efficiency(n, self.sheave_factor)
        rope_allowed = self.rope_breaking_force / self.rope_design_factor
        parts = [
            Component("winch line pull", "winch", self.winch_line_pull * n * e, True,
                      f"line pull x {n} lines x block efficiency {e:.3f}"),
            Component("wire rope", "wire_rope", rope_allowed * n * e, True,
                      f"breaking force / design factor {self.rope_design_factor:g}"
                      f" x {n} lines x block efficiency {e:.3f}"),
            Component("mast", "mast", float(self.mast_rating), True,
                      f"static hook-load rating for {n} lines"),
            Component("top head pull-up", "top_head", float(self.top_head_pullup), True,
                      "pull-up rating"),
        ]
        for name, kind, rating in self.tools:
            parts.append(Component(name, kind, rating, kind not in HANDLING_TOOL_KINDS,
                                   "holds the string only" if kind in HANDLING_TOOL_KINDS
                                   else "carries the whole hook load"))
        return tuple(parts)


@dataclass(frozen=True)
class PathCapacity:
    """What one hoisting path allows, SI units.

    path : the path's name
    components : ``(name, kind, rating_at_hook [N], allowed_string_load [N])``
        for every rated component, in path order
    string_limit : largest string load [N] (hook load less dead load) the
        path allows; nan when nothing on the path is rated; negative when
        the dead load and reserve alone exceed a rating
    hook_limit : ``string_limit + dead_load`` [N]
    governing : name of the component that sets ``string_limit`` ("" when
        nothing is rated)
    unrated : names of the components with no rating (skipped)
    """

    path: str
    components: tuple
    string_limit: float
    hook_limit: float
    governing: str
    unrated: tuple
    unrated_on_path: tuple = ()


@dataclass(frozen=True)
class LandingString:
    """Pipe used to run a lower section of the string (staged setting).

    name : label
    weight_per_length : air weight per length [N/m], > 0
    tensile_rating : tension rating of body and connections [N] (nan = unrated)
    density : steel density for buoyancy [kg/m^3]
    od, bore : outside and inside diameters [m] (nan = not given)
    """

    name: str
    weight_per_length: float
    tensile_rating: float
    density: float = 7850.0
    od: float = _NAN
    bore: float = _NAN

    def __post_init__(self):
        where = f"landing string {self.name!r}"
        w = self.weight_per_length
        if not _is_real(w) or not math.isfinite(w) or w <= 0.0:
            raise InputError(f"{where}.weight_per_length",
                             f"expected an air weight per length > 0 N/m, got {w!r}")
        _check_force(f"{where}.tensile_rating", self.tensile_rating, allow_nan=True,
                     positive=True, what="a tensile rating")
        rho = self.density
        if not _is_real(rho) or not math.isfinite(rho) or rho <= 0.0:
            raise InputError(f"{where}.density", f"expected a density > 0 kg/m^3, got {rho!r}")
        for key in ("od", "bore"):
            v = getattr(self, key)
            if not _is_real(v) or (not math.isnan(v) and not (math.isfinite(v) and v > 0.0)):
                raise InputError(f"{where}.{key}", f"expected a diameter > 0 m (or not given), got {v!r}")
        if not math.isnan(self.od) and not math.isnan(self.bore) and self.bore >= self.od:
            raise InputError(f"{where}.bore",
                             f"expected a bore smaller than the od {self.od!r} m, got {self.bore!r}")


@dataclass(frozen=True)
class Rig:
    """A rig: its hoisting paths and, optionally, a landing string.

    source : the file it came from (for messages only)
    """

    name: str
    paths: tuple
    landing_string: LandingString | None = None
    notes: str = ""
    source: str = ""

    def __post_init__(self):
        where = f"{self.source}: rig {self.name!r}" if self.source else f"rig {self.name!r}"
        try:
            paths = tuple(self.paths)
        except TypeError:
            raise InputError(f"{where}.paths", "expected a list of hoisting paths") from None
        seen = set()
        for i, p in enumerate(paths):
            if not isinstance(p, HoistPath):
                raise InputError(f"{where}.paths[{i}]", f"expected a HoistPath, got {type(p).__name__}")
            if p.name in seen:
                raise InputError(f"{where}.paths[{i}].name",
                                 f"expected a path name not used twice, got {p.name!r}")
            seen.add(p.name)
        if self.landing_string is not None and not isinstance(self.landing_string, LandingString):
            raise InputError(f"{where}.landing_string",
                             f"expected a LandingString or none, got {type(self.landing_string).__name__}")
        object.__setattr__(self, "paths", paths)


# ---------------------------------------------------------------------------
# capacity


def path_capacity(path: HoistPath) -> PathCapacity:
    """Largest string load a hoisting path allows, and the part that governs.

    For each rated component with hook rating ``R``:

    * parts that carry the dead load (winch, rope, mast, top head, other):
      ``allowed = R / f_dyn - reserve - dead_load``;
    * handling tools (elevator, clamp, spider, lifting sub), which hold the
      string only: ``allowed = R / f_dyn - reserve``;

    ``string_limit = min(allowed)``, ``governing`` the first component that
    reaches it, ``hook_limit = string_limit + dead_load``.  Hook ratings of
    the winch and rope follow :meth:`HoistPath.components`.

    Parameters
    ----------
    path : HoistPath
        The path; its fields carry their own units (forces in N).

    Returns
    -------
    PathCapacity
        Limits in N.  Unrated (nan) components are listed in ``unrated`` and
        take no part; with nothing rated the limits are nan.

    Notes
    -----
    The weakest-link rule and the order of deductions follow the hoisting
    summary of Bourgoyne et al., *Applied Drilling Engineering*, 1986,
    ch. 1; the dead-load, overpull-reserve and dynamic deductions are common
    practice, no source.

    Examples
    --------
    Winch 40 kN on 2 lines with frictionless sheaves (80 kN at the hook) and a
    mast rated 100 kN, 5 kN of gear on the hook:

    >>> cap = path_capacity(HoistPath("main", lines=2, sheave_factor=1.0,
    ...                               winch_line_pull=40e3, mast_rating=100e3,
    ...                               dead_load=5e3))
    >>> cap.governing, cap.string_limit, cap.hook_limit
    ('winch line pull', 75000.0, 80000.0)
    """
    if not isinstance(path, HoistPath):
        raise InputError("path", f"expected a HoistPath, got {type(path).__name__}")
    rows = []
    unrated = []
    for c in path.components():
        if math.isnan(c.rating):
            unrated.append(c.name)
            continue
        allowed = c.rating / path.dynamic_factor - path.overpull_reserve
        if c.carries_dead_load:
            allowed -= path.dead_load
        rows.append((c.name, c.kind, float(c.rating), float(allowed)))
    if rows:
        i = min(range(len(rows)), key=lambda j: rows[j][3])
        governing = rows[i][0]
        string_limit = rows[i][3]
        hook_limit = string_limit + path.dead_load
    else:
        governing = ""
        string_limit = hook_limit = _NAN
    return PathCapacity(path=path.name, components=tuple(rows), string_limit=string_limit,
                        hook_limit=hook_limit, governing=governing, unrated=tuple(unrated),
                        unrated_on_path=unrated_parts_in_use(path))


def unrated_parts_in_use(path: HoistPath) -> tuple:
    """Names of parts that carry the string on this path but have no rating.

    A handling tool listed on the path always carries it.  A path hoisting
    on the winch (line pull or wire rope given) also carries it through the
    other of the two and the mast.  A part left out of a path that does not
    use it (a top-head path's winch) is not in use.  Such parts make the
    capacity unknown, never assumed (common practice, no source).
    """
    missing = [name for name, _kind, rating in path.tools if math.isnan(rating)]
    winch = not math.isnan(path.winch_line_pull)
    rope = not math.isnan(path.rope_breaking_force)
    if winch or rope:
        if not winch:
            missing.append("winch line pull")
        if not rope:
            missing.append("wire rope")
        if math.isnan(path.mast_rating):
            missing.append("mast")
    return tuple(missing)


def rig_capacity(rig: Rig) -> tuple:
    """:func:`path_capacity` of every path of the rig, in the rig's order."""
    if not isinstance(rig, Rig):
        raise InputError("rig", f"expected a Rig, got {type(rig).__name__}")
    return tuple(path_capacity(p) for p in rig.paths)


def best_path(rig: Rig) -> PathCapacity:
    """The path with the largest rated ``string_limit`` [N] (first one on a tie).

    Raises :class:`rigplan.errors.InputError` when no path has any rated
    component: the rig's capacity is then unknown, not assumed.
    """
    caps = [c for c in rig_capacity(rig) if not math.isnan(c.string_limit)]
    if not caps:
        where = f"{rig.source}: rig {rig.name!r}" if rig.source else f"rig {rig.name!r}"
        raise InputError(f"{where}.paths",
                         "expected at least one hoisting path with a rated component "
                         "(winch line pull, rope breaking force, mast, top head or tool)")
    return max(caps, key=lambda c: c.string_limit)
