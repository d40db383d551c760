"""Hoisting capacity: block efficiency, line and derrick loads, and the
weakest part of each hoisting path of a rig.

Engine module: SI floats (numpy where it helps), no units library, no file
I/O.  Forces are in newtons [N], positive in tension.

A hoisting path (main winch reeved through a travelling block, the top head's
pull-up, an auxiliary winch on a single line, ...) can lift no more than its
weakest part.  :func:`path_capacity` returns the path's *hoisting chain*
(:class:`HoistChain`): each part's rating as stated, referred to the hook
through the lines strung and the block efficiency, the dead load each rating
must carry (once, as the rating states it: gross at the hook, or net of the
gear), and two separate load cases against every part:

* **shock** -- the dynamic factor times the load the part carries (string
  plus the gear its rating counts), as when slips or clamps are set;
* **overpull** -- the static pull over the string weight the driller keeps
  in reserve to work stuck pipe, plus the string and the gear counted.

The smallest string load either case allows over all parts is the path's
*string limit*; with the dead load added it is the *hook limit*.  The names
of these figures are defined once, in :class:`ChainFigure`.

References
----------
.. [1] A. T. Bourgoyne Jr., K. K. Millheim, M. E. Chenevert, F. S. Young Jr.,
   *Applied Drilling Engineering*, SPE Textbook Series vol. 2, 1986, ch. 1
   (hoisting system: block efficiency, fast-line load, derrick load,
   equivalent derrick load; Example 1.2; Table 1.2).
.. [2] API RP 9B, *Application, Care, and Use of Wire Rope for Oil Field
   Service* (block efficiency with sheave factor K; wire-rope design factors).
.. [3] API RP 7G, *Recommended Practice for Drill Stem Design and Operating
   Limits* (margin of overpull: a static pull over the string's weight kept in
   reserve for stuck pipe), from memory.
"""

from __future__ import annotations

import dataclasses
import enum
import math
import numbers
from dataclasses import dataclass

import numpy as np

from rigplan.errors import InputError

#: Sheave factor K for roller-bearing sheaves [-]: line tension grows by this
#: factor over each sheave ([1] ch. 1; [2]).  Plain-bearing sheaves are usually
#: taken as 1.09 (from memory, same sources).
ROLLER_BEARING_SHEAVE_FACTOR = 1.04

#: Lines strung accepted [-]: the block formula is used from a single line to
#: 24 (drilling blocks are reeved with up to 14 or 16 lines; beyond 24 the
#: input is taken as a typing error, and K^n would overflow long before the
#: formula stops making sense).
LINES_RANGE = (1, 24)

#: Sheave factors accepted [-]: 1 (no friction) up to 1.2.  Roller bearings
#: 1.04, plain bearings about 1.09 (API RP 9B, from memory); more than 1.2 is
#: taken as a typing error.
SHEAVE_FACTOR_RANGE = (1.0, 1.2)

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

#: How a rating states the dead load: ``"gross"`` -- the load at the hook,
#: the gear riding on the line included (the gear is deducted from it);
#: ``"net"`` -- what is left for the string after the gear (all of it, or the
#: weight given as *net of*), so that gear is not deducted again.
RATING_BASES = ("gross", "net")

#: Where each load case comes from.
SHOCK_SOURCE = "common practice, no source"
OVERPULL_SOURCE = "API RP 7G margin of overpull, from memory"

_NAN = float("nan")


class ChainFigure(enum.StrEnum):
    """The figures of a hoisting chain: one name each, used the same way by
    every output.  The JSON key is the member's name in lower case, the
    label its value.

    RATING : the part's rating as its maker states it (line pull, rope
        minimum breaking force, mast, top-head or tool rating) [N]
    TO_HOOK : factor from the rating to the hook [-]: lines x block
        efficiency for the winch, / design factor x lines x block efficiency
        for the rope, 1 for the others
    RATED_AT_HOOK : the rating referred to the hook [N]
    GEAR_COUNTED : the dead load that rating must carry besides the string
        [N]: the whole dead load for a gross rating, less what a net rating
        already excludes
    SHOCK_LIMIT : largest string load under the shock case [N]:
        ``rated_at_hook / dynamic_factor - gear_counted``
    OVERPULL_LIMIT : largest string load under the overpull case [N]:
        ``rated_at_hook - gear_counted - overpull_reserve``
    STRING_LIMIT : the smaller of the two for a part; for the path, the
        least over its parts [N] (hook load less the dead load)
    HOOK_LIMIT : the path's string limit plus the dead load [N]
    DEAD_LOAD : weight of the gear riding on the line [N]
    """

    RATING = "rating"
    TO_HOOK = "factor to hook"
    RATED_AT_HOOK = "rated at hook"
    GEAR_COUNTED = "gear counted"
    SHOCK_LIMIT = "shock limit"
    OVERPULL_LIMIT = "overpull limit"
    STRING_LIMIT = "string limit"
    HOOK_LIMIT = "hook limit"
    DEAD_LOAD = "dead load"

    @property
    def key(self) -> str:
        """The JSON key, e.g. ``rated_at_hook``."""
        return self.name.lower()


class LoadCaseCode(enum.StrEnum):
    """The two load cases each part is checked against."""

    SHOCK = "shock"
    OVERPULL = "overpull"


# ---------------------------------------------------------------------------
# input checks (one-line messages naming the key and what was expected)


def _is_real(value) -> bool:
    return isinstance(value, numbers.Real) and not isinstance(value, bool)


def _check_lines(where: str, lines) -> int:
    """A whole number of lines strung, >= 1."""
    if not _is_real(lines) or not math.isfinite(lines) or lines != math.floor(lines):
        raise InputError(where, f"expected a whole number of lines strung (>= 1), got {lines!r}")
    if not LINES_RANGE[0] <= lines <= LINES_RANGE[1]:
        raise InputError(where, f"expected {LINES_RANGE[0]} to {LINES_RANGE[1]} lines strung, "
                                f"got {lines!r}")
    return int(lines)


def _check_lines_array(where: str, lines) -> np.ndarray:
    arr = np.asarray(lines)
    if arr.dtype == bool or not (np.issubdtype(arr.dtype, np.integer)
                                 or np.issubdtype(arr.dtype, np.floating)):
        raise InputError(where, f"expected a whole number of lines strung (>= 1), got {lines!r}")
    if not np.all(np.isfinite(arr)) or np.any(arr != np.floor(arr)):
        raise InputError(where, f"expected a whole number of lines strung (>= 1), got {lines!r}")
    if np.any(arr < LINES_RANGE[0]) or np.any(arr > LINES_RANGE[1]):
        raise InputError(where, f"expected {LINES_RANGE[0]} to {LINES_RANGE[1]} lines strung, "
                                f"got {lines!r}")
    return arr.astype(float)


def _check_sheave_factor(where: str, k) -> float:
    lo, hi = SHEAVE_FACTOR_RANGE
    if not _is_real(k) or not math.isfinite(k) or not lo <= k <= hi:
        raise InputError(where, f"expected a sheave factor from {lo:g} to {hi:g} [-] (1.04 for "
                                f"roller bearings), got {k!r}")
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


def _check_basis(where: str, basis) -> str:
    if basis not in RATING_BASES:
        raise InputError(where, f"expected one of {', '.join(RATING_BASES)} (gross: at the hook, "
                                f"gear included; net: gear already deducted), got {basis!r}")
    return basis


def _check_net_of(where: str, net_of, basis: str, dead_load: float) -> float:
    """Gear weight a net rating already excludes [N]: nan (all of the dead
    load) or 0 <= net_of <= dead_load; only with a net rating."""
    if not _is_real(net_of):
        raise InputError(where, f"expected a force in N (or not given), got {net_of!r}")
    net_of = float(net_of)
    if math.isnan(net_of):
        return net_of
    if basis != "net":
        raise InputError(where, "given for a gross rating: a weight the rating is net of "
                                "needs the basis \"net\"")
    if not (math.isfinite(net_of) and 0.0 <= net_of <= dead_load):
        raise InputError(where, f"expected a weight from 0 to the path's dead load "
                                f"{dead_load:g} N, got {net_of!r}")
    return net_of


@dataclass(frozen=True)
class Component:
    """One part of a hoisting path with its rating referred to the hook.

    name : label shown to the user ("winch line pull", "casing elevator")
    kind : one of :data:`COMPONENT_KINDS`
    rating : load the part allows on the hook [N] (nan = unrated)
    carries_dead_load : True when the part's rating must carry any of the
        gear on the hook (a gross rating, or a net one that excludes only
        part of the gear); False for a rating net of all the gear (handling
        tools hold the string only)
    note : how the rating was obtained
    stated : the rating as the maker states it [N] (line pull, rope minimum
        breaking force, ...); ``rating = stated * to_hook``
    to_hook : factor from ``stated`` to the hook [-]
    basis : ``"gross"`` or ``"net"`` (:data:`RATING_BASES`)
    net_of : gear weight a net rating already excludes [N]; nan = all of
        the path's dead load
    """

    name: str
    kind: str
    rating: float
    carries_dead_load: bool
    note: str = ""
    stated: float = _NAN
    to_hook: float = 1.0
    basis: str = "gross"
    net_of: float = _NAN

    def __post_init__(self):
        where = f"component {self.name!r}"
        if not isinstance(self.name, str) or not self.name.strip():
            raise InputError("component.name", f"expected a non-empty name, got {self.name!r}")
        if self.kind not in COMPONENT_KINDS:
            raise InputError(f"{where}.kind",
                             f"expected one of {', '.join(COMPONENT_KINDS)}, got {self.kind!r}")
        _check_force(f"{where}.rating", self.rating, allow_nan=True, positive=True,
                     what="a hook-load rating")
        _check_basis(f"{where}.basis", self.basis)
        if math.isnan(self.stated):
            object.__setattr__(self, "stated", float(self.rating) / self.to_hook)

    def gear_counted(self, dead_load: float) -> float:
        """The part of ``dead_load`` [N] this rating must carry besides the
        string: all of it for a gross rating, ``dead_load - net_of`` for a
        net one (0 when net of all the gear)."""
        if self.basis == "gross":
            return float(dead_load)
        if math.isnan(self.net_of):
            return 0.0
        return max(float(dead_load) - self.net_of, 0.0)


@dataclass(frozen=True)
class HoistPath:
    """One way the rig can hold the string, SI units.

    name : label ("main winch, 4 lines", "top head pull-up")
    lines : lines strung between crown and travelling block [-], 1..24
    sheave_factor : sheave factor K [-], 1..1.2 (1.04 roller bearings)
    winch_line_pull : winch line pull at the drum layer in use [N] (nan = unrated)
    rope_breaking_force : wire rope minimum breaking force [N] (nan = unrated)
    rope_design_factor : breaking force over working line pull [-], > 0;
        default 3 (API RP 9B minimum for hoisting service, from memory)
    mast_rating : static hook-load rating of the mast for the lines strung [N]
    top_head_pullup : top-head pull-up rating [N] (nan = unrated)
    tools : handling tools as ``(name, kind, rating [N])``, kind in
        :data:`TOOL_KINDS`, rating nan when unrated; an entry may add the
        basis and the weight it is net of: ``(name, kind, rating, basis)``
        or ``(name, kind, rating, basis, net_of [N])``.  Stored as
        ``(name, kind, rating)`` with the bases in ``tool_bases``.
    dead_load : weight of the gear riding on the line [N]: block, hook,
        elevators or clamp, and the top head where it rides on the line
    overpull_reserve : static pull over the string weight the driller keeps
        in reserve to work stuck pipe [N] (the overpull load case)
    dynamic_factor : factor on the load while setting slips or clamps [-],
        >= 1 (the shock load case)
    mast_basis, top_head_basis : ``"gross"`` (default) or ``"net"``: whether
        the rating is the load at the hook with the gear, or already net of it
    mast_net_of, top_head_net_of : the gear weight a net rating excludes [N]
        (nan: all of ``dead_load``; e.g. a top-head pull-up net of the head's
        own weight)
    tool_bases : ``(basis, net_of [N])`` per tool; default ``"net"`` of all
        the gear for handling tools (they hold the string only) and
        ``"gross"`` for ``"other"`` (hook, swivel, bails)
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
    mast_basis: str = "gross"
    mast_net_of: float = _NAN
    top_head_basis: str = "gross"
    top_head_net_of: float = _NAN
    tool_bases: tuple = ()

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
        dead = _check_force(f"{where}.dead_load", self.dead_load, allow_nan=False,
                            positive=False, what="a dead load")
        _check_force(f"{where}.overpull_reserve", self.overpull_reserve, allow_nan=False,
                     positive=False, what="an overpull reserve")
        dyn = self.dynamic_factor
        if not _is_real(dyn) or not math.isfinite(dyn) or dyn < 1.0:
            raise InputError(f"{where}.dynamic_factor",
                             f"expected a dynamic factor >= 1 [-], got {dyn!r}")
        for part in ("mast", "top_head"):
            basis = _check_basis(f"{where}.{part}_basis", getattr(self, f"{part}_basis"))
            object.__setattr__(self, f"{part}_net_of", _check_net_of(
                f"{where}.{part}_net_of", getattr(self, f"{part}_net_of"), basis, dead))
        tools = []
        names = {"winch line pull", "wire rope", "mast", "top head pull-up"}
        try:
            entries = tuple(self.tools)
            given_bases = tuple(self.tool_bases)
        except TypeError:
            raise InputError(f"{where}.tools",
                             "expected a list of (name, kind, rating N) entries") from None
        if given_bases and len(given_bases) != len(entries):
            raise InputError(f"{where}.tool_bases",
                             f"expected one (basis, net_of N) per tool ({len(entries)}), "
                             f"got {len(given_bases)}")
        bases = []
        for i, entry in enumerate(entries):
            w = f"{where}.tools[{i}]"
            try:
                name, kind, rating, *extra = entry
            except (TypeError, ValueError):
                raise InputError(w, f"expected (name, kind, rating N), got {entry!r}") from None
            if len(extra) > 2:
                raise InputError(w, f"expected (name, kind, rating N[, basis[, net_of N]]), "
                                    f"got {entry!r}")
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
            if extra:
                basis, net_of = (list(extra) + [_NAN])[:2]
            elif given_bases:
                try:
                    basis, net_of = given_bases[i]
                except (TypeError, ValueError):
                    raise InputError(f"{where}.tool_bases[{i}]",
                                     f"expected (basis, net_of N), got {given_bases[i]!r}") from None
            else:
                basis, net_of = ("net" if kind in HANDLING_TOOL_KINDS else "gross"), _NAN
            basis = _check_basis(f"{w}.basis", basis)
            bases.append((basis, _check_net_of(f"{w}.net_of", net_of, basis, dead)))
        object.__setattr__(self, "tools", tuple(tools))
        object.__setattr__(self, "tool_bases", tuple(bases))

    def components(self) -> tuple:
        """Every part of the path as :class:`Component`, ratings at the hook [N].

        Order: winch, wire rope, mast, top head, then the tools as listed.

        * winch: ``line_pull * n * E_n`` (gross: the line carries the block);
        * wire rope: ``MBF / DF * n * E_n`` (gross);
        * mast, top head and tools: as given, on their stated basis.
        """
        n = self.lines
        e = block_efficiency(n, self.sheave_factor)
        to_rope = n * e / self.rope_design_factor
        parts = [
            Component("winch line pull", "winch", self.winch_line_pull * n * e, True,
                      f"line pull x {n} lines x block efficiency {e:.3f}",
                      stated=float(self.winch_line_pull), to_hook=n * e),
            Component("wire rope", "wire_rope", self.rope_breaking_force * to_rope, True,
                      f"breaking force / design factor {self.rope_design_factor:g}"
                      f" x {n} lines x block efficiency {e:.3f}",
                      stated=float(self.rope_breaking_force), to_hook=to_rope),
        ]
        for name, kind, rating, basis, net_of, note in (
                ("mast", "mast", self.mast_rating, self.mast_basis, self.mast_net_of,
                 f"static hook-load rating for {n} lines"),
                ("top head pull-up", "top_head", self.top_head_pullup, self.top_head_basis,
                 self.top_head_net_of, "pull-up rating")):
            comp = Component(name, kind, float(rating), True, note, basis=basis, net_of=net_of)
            parts.append(dataclasses.replace(
                comp, carries_dead_load=comp.gear_counted(self.dead_load) > 0.0
                or (basis == "gross")))
        for (name, kind, rating), (basis, net_of) in zip(self.tools, self.tool_bases):
            comp = Component(name, kind, rating, True,
                             "holds the string only" if kind in HANDLING_TOOL_KINDS
                             else "carries the whole hook load", basis=basis, net_of=net_of)
            parts.append(dataclasses.replace(
                comp, carries_dead_load=basis == "gross" or comp.gear_counted(self.dead_load) > 0.0))
        return tuple(parts)


@dataclass(frozen=True)
class LoadCase:
    """One load case of the hoisting chain.

    code : :class:`LoadCaseCode`
    factor : factor on the load the part carries [-] (the dynamic factor for
        shock, 1 for overpull)
    allowance : static pull added over the string weight [N] (the overpull
        reserve; 0 for shock)
    source : where the case comes from, or "common practice, no source"
    """

    code: LoadCaseCode
    factor: float
    allowance: float
    source: str


@dataclass(frozen=True)
class ChainPart:
    """One rated part of a hoisting chain, SI units.

    The figures follow :class:`ChainFigure` (same names): ``rating``,
    ``to_hook``, ``rated_at_hook``, ``gear_counted``, ``shock_limit``,
    ``overpull_limit``, ``string_limit`` [N except ``to_hook`` -].
    ``governing_case`` is the load case that sets the part's string limit.
    """

    name: str
    kind: str
    basis: str
    rating: float
    to_hook: float
    rated_at_hook: float
    gear_counted: float
    shock_limit: float
    overpull_limit: float
    string_limit: float
    governing_case: LoadCaseCode


@dataclass(frozen=True)
class HoistChain:
    """The hoisting chain of one path: what it allows and why, SI units.

    path : the path's name
    components : ``(name, kind, rated_at_hook [N], string_limit [N])`` for
        every rated part, in path order (the short form of ``parts``)
    string_limit : largest string load [N] (hook load less dead load) the
        path allows under both load cases; nan when nothing on the path is
        rated; negative when the gear and reserve alone exceed a rating
    hook_limit : ``string_limit + dead_load`` [N]
    governing : name of the part that sets ``string_limit`` ("" when
        nothing is rated)
    unrated : names of the components with no rating (skipped)
    unrated_on_path : unrated parts the path uses (:func:`unrated_parts_in_use`)
    parts : :class:`ChainPart` per rated part, in path order
    cases : the two :class:`LoadCase` (shock, overpull)
    governing_case : the case that sets ``string_limit`` (None: nothing rated)
    dead_load : gear riding on the line [N]
    lines, sheave_factor, block_efficiency : the reeving [-]
    """

    path: str
    components: tuple
    string_limit: float
    hook_limit: float
    governing: str
    unrated: tuple
    unrated_on_path: tuple = ()
    parts: tuple = ()
    cases: tuple = ()
    governing_case: LoadCaseCode | None = None
    dead_load: float = 0.0
    lines: int = 1
    sheave_factor: float = ROLLER_BEARING_SHEAVE_FACTOR
    block_efficiency: float = _NAN


#: The former name of :class:`HoistChain`.
PathCapacity = HoistChain


@dataclass(frozen=True)
class LandingString:
    """Pipe used to run a lower section of the string (staged setting).

    name : label
    weight_per_length : air weight per length [N/m], > 0
    tensile_rating : tension rating of body and connections [N] (nan = unrated)
    density : steel density for buoyancy [kg/m^3]
    od, bore : outside and inside diameters [m] (nan = not given)
    joint_length : length of one landing-string joint or stand [m], the
        step in which stage 1 is lowered; default 30 ft (9.144 m), the long
        end of range 2 drill pipe (API Spec 5DP, 27-30 ft, from memory)
    """

    name: str
    weight_per_length: float
    tensile_rating: float
    density: float = 7850.0
    od: float = _NAN
    bore: float = _NAN
    joint_length: float = 9.144

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
        jl = self.joint_length
        if not _is_real(jl) or not math.isfinite(jl) or not 0.5 <= jl <= 60.0:
            raise InputError(f"{where}.joint_length",
                             f"expected a joint length of 0.5 to 60 m, got {jl!r}")


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


def path_capacity(path: HoistPath) -> HoistChain:
    r"""The hoisting chain of a path: the largest string load it allows under
    each load case, and the part and case that govern.

    For each rated part with rating ``R`` at the hook (:meth:`HoistPath.
    components`) and ``g`` the gear its rating must carry
    (:meth:`Component.gear_counted`: the dead load ``D`` for a gross rating,
    ``D - net_of`` for a net one, 0 for handling tools that hold the string
    only), the string load ``S`` must satisfy two separate load cases:

    .. math::

        \text{shock:}\quad f_{dyn}\,(S + g) \le R
            \;\Rightarrow\; S \le R / f_{dyn} - g

        \text{overpull:}\quad S + g + F_{op} \le R
            \;\Rightarrow\; S \le R - g - F_{op}

    The part's string limit is the smaller of the two; the path's
    ``string_limit`` is the least over its parts, ``hook_limit =
    string_limit + D``.  The dead load is counted once, as each rating
    states it.

    Parameters
    ----------
    path : HoistPath
        The path; its fields carry their own units (forces in N).

    Returns
    -------
    HoistChain
        Limits in N.  Unrated (nan) components are listed in ``unrated`` and
        take no part; with nothing rated the limits are nan.

    Notes
    -----
    Shock (setting slips or clamps) and a static pull on stuck pipe happen
    at different moments, so they are separate cases, not stacked.  The
    dynamic factor is common practice, no source; the overpull reserve is
    the margin of overpull of API RP 7G (from memory).  The weakest-link
    rule and the reference of each rating to the hook through the lines
    and the block efficiency follow Bourgoyne et al., *Applied Drilling
    Engineering*, 1986, ch. 1, and API RP 9B.  Statics only: no drag or
    acceleration beyond the dynamic factor.

    Examples
    --------
    Winch 40 kN on 2 lines with frictionless sheaves (80 kN at the hook) and
    a mast rated 100 kN, 5 kN of gear on the hook, dynamic factor 1.25,
    overpull 10 kN.  Winch: shock 80/1.25 - 5 = 59 kN, overpull
    80 - 5 - 10 = 65 kN; mast: 75 and 85 kN.  The winch governs in shock:

    >>> chain = path_capacity(HoistPath("main", lines=2, sheave_factor=1.0,
    ...                                 winch_line_pull=40e3, mast_rating=100e3,
    ...                                 dead_load=5e3, dynamic_factor=1.25,
    ...                                 overpull_reserve=10e3))
    >>> chain.governing, str(chain.governing_case), chain.string_limit, chain.hook_limit
    ('winch line pull', 'shock', 59000.0, 64000.0)
    """
    if not isinstance(path, HoistPath):
        raise InputError("path", f"expected a HoistPath, got {type(path).__name__}")
    parts = []
    unrated = []
    for c in path.components():
        if math.isnan(c.rating):
            unrated.append(c.name)
            continue
        g = c.gear_counted(path.dead_load)
        shock = c.rating / path.dynamic_factor - g
        overpull = c.rating - g - path.overpull_reserve
        case = LoadCaseCode.SHOCK if shock <= overpull else LoadCaseCode.OVERPULL
        parts.append(ChainPart(
            name=c.name, kind=c.kind, basis=c.basis, rating=float(c.stated),
            to_hook=float(c.to_hook), rated_at_hook=float(c.rating), gear_counted=g,
            shock_limit=float(shock), overpull_limit=float(overpull),
            string_limit=float(min(shock, overpull)), governing_case=case))
    cases = (LoadCase(LoadCaseCode.SHOCK, float(path.dynamic_factor), 0.0, SHOCK_SOURCE),
             LoadCase(LoadCaseCode.OVERPULL, 1.0, float(path.overpull_reserve),
                      OVERPULL_SOURCE))
    if parts:
        gov = min(parts, key=lambda p: p.string_limit)
        governing, case = gov.name, gov.governing_case
        string_limit = gov.string_limit
        hook_limit = string_limit + path.dead_load
    else:
        governing, case = "", None
        string_limit = hook_limit = _NAN
    return HoistChain(
        path=path.name,
        components=tuple((p.name, p.kind, p.rated_at_hook, p.string_limit) for p in parts),
        string_limit=string_limit, hook_limit=hook_limit, governing=governing,
        unrated=tuple(unrated), unrated_on_path=unrated_parts_in_use(path),
        parts=tuple(parts), cases=cases, governing_case=case,
        dead_load=float(path.dead_load), lines=path.lines,
        sheave_factor=float(path.sheave_factor),
        block_efficiency=float(block_efficiency(path.lines, path.sheave_factor)))


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


def best_path(rig: Rig) -> HoistChain:
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
