"""Typed results shared by the engine and the planner: verdicts, limits, findings.

The engine never writes sentences and never chooses display units.  What it
has to say about a plan (a note, a warning, a reason an option fails, a crew
action) is a :class:`Finding`: a code, the joint or step it concerns, and its
quantities as SI floats tagged with their :class:`Kind`.  The presentation
layer (``rigplan.present``) turns findings into words in the units the user
chose; the JSON output carries each finding's code beside its text.

Codes are members of a ``StrEnum`` defined in the engine module that raises
them (for example ``floatplan.FloatCode``), so a code reads the same in JSON
and in Python and a typo is an ``AttributeError``, not a silent mismatch.
"""

from __future__ import annotations

import enum
import math
from collections.abc import Mapping
from dataclasses import dataclass, field
from types import MappingProxyType


class Verdict(enum.StrEnum):
    """How the string lands, in the planner's order of trial."""

    LANDS_OPEN = "lands open"
    LANDS_FLOATED = "lands with float plan"
    LANDS_STAGED = "lands in stages"
    CANNOT_LAND = "cannot land"
    CANNOT_CONFIRM = "cannot confirm"

    @property
    def lands(self) -> bool:
        """True for the three verdicts under which the string can be run."""
        return self in (Verdict.LANDS_OPEN, Verdict.LANDS_FLOATED, Verdict.LANDS_STAGED)


class Kind(enum.StrEnum):
    """The physical kind of a quantity, which fixes its SI unit.

    The presentation layer picks the display unit from the kind and the
    user's unit system; the engine only ever stores SI values.
    """

    LENGTH = "length"                # [m] lengths along the pipe
    DEPTH = "depth"                  # [m] measured from the rig floor, downward
    DIAMETER = "diameter"            # [m]
    FORCE = "force"                  # [N]
    PRESSURE = "pressure"            # [Pa] gauge
    STRESS = "stress"                # [Pa]
    DENSITY = "density"              # [kg/m3]
    VOLUME = "volume"                # [m3]
    MASS_PER_LENGTH = "mass per length"  # [kg/m]
    TEMPERATURE = "temperature"      # [degC]
    RATIO = "ratio"                  # [-] margins, utilizations, efficiencies
    COUNT = "count"                  # [-] joints, lines, steps


class Severity(enum.StrEnum):
    """How much a finding matters to the crew."""

    INFO = "info"          # a fact of the plan worth knowing
    ACTION = "action"      # something the crew must do (fill, stop, top up)
    WARNING = "warning"    # something that could go wrong if ignored
    REASON = "reason"      # why an option, or the whole plan, fails


@dataclass(frozen=True)
class Quantity:
    """One SI value with its kind (``nan`` means not known / unrated)."""

    value: float
    kind: Kind

    def __post_init__(self) -> None:
        object.__setattr__(self, "value", float(self.value))
        object.__setattr__(self, "kind", Kind(self.kind))

    @property
    def known(self) -> bool:
        return math.isfinite(self.value)


def _frozen_quantities(q: Mapping[str, Quantity | tuple]) -> Mapping[str, Quantity]:
    out = {}
    for name, v in q.items():
        out[name] = v if isinstance(v, Quantity) else Quantity(*v)
    return MappingProxyType(out)


@dataclass(frozen=True)
class Finding:
    """Something the engine has to say about a plan, with no words in it.

    code : a ``StrEnum`` member of the raising module (its value is stable
        and appears in the JSON output)
    severity : :class:`Severity`
    joint : the joint concerned, 1-based position in running order (None: none)
    step : the running step concerned, 1-based (step k: joints 1..k hang)
    label : the joint's own label (tally id), when a joint is concerned
    quantities : named SI quantities, e.g. ``{"length": Quantity(185.6, Kind.LENGTH)}``;
        plain ``(value, kind)`` tuples are accepted and converted
    context : other named facts that are not quantities (a path name, a
        limit name, a valve joint); values are str, int, bool or None
    cause : the finding that explains this one (why an option fails)
    """

    code: str
    severity: Severity = Severity.INFO
    joint: int | None = None
    step: int | None = None
    label: str | None = None
    quantities: Mapping[str, Quantity] = field(default_factory=dict)
    context: Mapping[str, object] = field(default_factory=dict)
    cause: Finding | None = None

    def __post_init__(self) -> None:
        object.__setattr__(self, "severity", Severity(self.severity))
        object.__setattr__(self, "quantities", _frozen_quantities(self.quantities))
        object.__setattr__(self, "context", MappingProxyType(dict(self.context)))

    def value(self, name: str) -> float:
        """The SI value of the named quantity."""
        return self.quantities[name].value

    def get(self, name: str, default=None):
        """A context value (or ``default``)."""
        return self.context.get(name, default)


class LimitName(enum.StrEnum):
    """The limits the planner checks (the value appears in the JSON output)."""

    HOISTING = "hoisting capacity"
    CONNECTION_TENSION = "connection tension"
    COLLAPSE = "collapse"
    BURST = "burst"
    RUNNING_WEIGHT = "running weight"
    HOLE_DEPTH = "hole depth"
    CHECK_VALVE = "check valve"
    VALVE_BALANCE = "valve balance"
    STAGE1_HOISTING = "stage 1 hoisting"          # stage 1 run from the floor
    LOWERING_HOISTING = "lowering hoisting"        # stage 1 lowered on the landing string
    LANDING_STRING = "landing string"              # the landing string's own tension
    STAGE2_HOISTING = "stage 2 hoisting"           # stage 2 run from the floor
    SCREEN_BUCKLING = "screen buckling"     # set-down compression vs critical buckling load
    BUCKLING_STRESS = "buckling stress"     # axial + helical bending stress vs yield


@dataclass(frozen=True)
class Limit:
    """One checked limit: what, where, load against capacity, margin.

    margin = (capacity - load) / capacity [-], utilization = load / capacity
    (design factors already applied to the load).  Where it occurs is the
    1-based running ``step`` (hoisting limits: step k, joint k at the floor)
    or the 1-based ``joint`` (limits of one joint), with that joint's
    ``label``; a staged limit gives the split (stage 1 is joints 1..joint).
    ``load`` and ``capacity`` are SI values of ``kind``; both are nan when
    the limit is a margin only (a staged setting).  ``first_step`` (with
    ``first_label``) is the first running step at which a per-step limit is
    exceeded, when it is (the step given is the worst one); None otherwise.
    """

    name: LimitName
    load: float
    capacity: float
    margin: float
    kind: Kind = Kind.FORCE
    joint: int | None = None
    step: int | None = None
    label: str | None = None
    first_step: int | None = None
    first_label: str | None = None

    def __post_init__(self) -> None:
        object.__setattr__(self, "name", LimitName(self.name))
        object.__setattr__(self, "kind", Kind(self.kind))

    @property
    def utilization(self) -> float:
        return 1.0 - self.margin
