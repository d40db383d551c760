"""Engine data model: the string, the hole and the settings, in SI floats.

Everything here is plain data (dataclasses and numpy arrays); there is no
unit handling and no file I/O.  Readers in ``rigplan.files.formats`` build these
objects from the user's files; ``rigplan.engine.rating.rate_joints`` turns a list of
:class:`JointSpec` into the per-joint arrays of :class:`JointArrays` that the
load engine consumes.

Conventions (shared by every engine module):

* depth ``z`` downward from the rig floor [m]; the string top hangs at 0;
* axial force positive in tension [N]; pressures are gauge [Pa];
* joint 1 goes in the hole first and carries the shoe; array index 0 is
  joint 1.  At running step ``k`` (1-based) joints 1..k hang in the hole and
  the shoe is at ``Z_k = L_1 + ... + L_k``.
* ``nan`` in a rating array means *unrated*: never replaced by a guess.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace

import numpy as np

#: Standard gravity [m/s^2] (CGPM 1901, exact).
G = 9.80665

#: Joint kinds known to the planner.
JOINT_KINDS = (
    "blank",
    "screen",
    "reducer",
    "shoe",
    "float_shoe",
    "float_collar",
    "centralizer",
    "sump",
)

#: What a rating rests on: the specified wall (API TR 5C3 formulas), the
#: minimum wall the standard allows (other steel, thermoplastic by SDR), a
#: measured wall, the maker's figure (entered), or nothing (unrated).
RATING_BASES = ("specified wall", "minimum wall", "measured wall", "maker's figure", "unrated")

#: Connection kinds at the top of a joint.
CONNECTION_KINDS = (
    "butt_weld",         # field butt weld: efficiency x body yield
    "threaded_coupled",  # entered rating
    "spline",            # spline-lock (PVC): entered rating
    "flush",             # flush-threaded: entered rating
    "integral",          # part of the same piece (shoe to its joint): body
    "none",              # top of the string / nothing above
)


@dataclass(frozen=True)
class JointSpec:
    """One joint (or accessory) as the user described it, SI units.

    ``None`` means "not given".  Ratings that are entered (screens, threaded
    and spline connections) stay ``None`` when not entered and become *unrated*
    (``nan``) in :class:`JointArrays`; they are never assumed.
    """

    label: str                       # e.g. "J12" or the tally id
    kind: str                        # one of JOINT_KINDS
    material: str                    # key into the material library
    od: float                        # outside diameter [m]
    wall: float                      # specified (nominal) wall [m]
    length: float                    # planned length [m]
    measured_length: float | None = None   # tally length [m]; wins over length
    measured_wall: float | None = None     # measured minimum wall [m]
    bore: float | None = None              # pressure bore diameter [m] if not od - 2 wall
    connection: str = "butt_weld"          # connection at the joint's top
    weld_efficiency: float | None = None   # [-] for butt welds
    connection_rating: float | None = None  # entered tension rating [N]
    tensile_rating: float | None = None     # entered body tension rating [N] (screens)
    collapse_rating: float | None = None    # entered collapse rating [Pa] (screens)
    burst_rating: float | None = None       # entered burst rating [Pa]
    weight: float | None = None             # own air weight of the joint [N]
    weight_per_length: float | None = None  # own air weight per length [N/m]
    ellipticity: float | None = None        # (Dmax-Dmin)/(Dmax+Dmin) [-]
    dmax: float | None = None               # measured largest OD [m]
    dmin: float | None = None               # measured smallest OD [m]
    rejected: bool = False                  # set aside on site: not run
    note: str = ""                          # tally note (reason for rejection, etc.)

    @property
    def run_length(self) -> float:
        """Length used for loads [m]: the measured one when given."""
        return self.measured_length if self.measured_length is not None else self.length


@dataclass(frozen=True)
class JointArrays:
    """Per-joint arrays in running order (index 0 = joint 1), SI units.

    Attributes
    ----------
    label : tuple of str
    kind : tuple of str
    length : ndarray  joint length [m]
    od : ndarray      outside diameter for pressure area [m]
    bore : ndarray    inside diameter for pressure area [m]
    weight : ndarray  air weight of each joint [N]
    collapse_rating : ndarray  collapse resistance [Pa] (nan = unrated)
    burst_rating : ndarray     internal-yield (burst) rating [Pa] (nan = unrated)
    body_rating : ndarray      pipe-body tension rating [N] (nan = unrated)
    connection_rating : ndarray  tension rating of the connection at the
        joint's top [N] (nan = unrated; inf = no connection above, e.g. the
        top joint held in the elevator is checked against ``body_rating``)
    collapse_method : tuple of str  how each collapse rating was obtained
    yield_strength : ndarray  minimum yield of each joint's material [Pa]
        (optional; used for collapse under axial load)
    rating_wall : ndarray  the wall the collapse rating uses [m] (specified,
        minimum or measured, by the material's standard)
    displaced_area : ndarray  cross-section of the joint's own material [m^2],
        the area that displaces fluid: ``W / (rho g L)`` for an entered
        weight (screen weight per length, coupled casing at its nominal
        weight, a joint weight) with a known material density, else the
        tube section ``pi/4 (D^2 - d^2)``.  None: the tube section.
    collapse_basis, burst_basis, tension_basis : tuple of str  what each
        joint's rating rests on, one of :data:`RATING_BASES`
    derating : tuple of str  the temperature-derating table of each joint's
        material (``""`` for none; see ``rigplan.engine.materials``)
    rating_temperature : float  temperature the ratings are stated for [C]
    findings : tuple of ``rigplan.engine.findings.Finding``  what the rating
        found (a measured wall under the standard's minimum, an ellipticity
        above the plan's assumption)
    modulus : ndarray  Young's modulus of each joint's material [Pa] (optional,
        nan: unknown; used for buckling below the neutral point)
    """

    label: tuple
    kind: tuple
    length: np.ndarray
    od: np.ndarray
    bore: np.ndarray
    weight: np.ndarray
    collapse_rating: np.ndarray
    burst_rating: np.ndarray
    body_rating: np.ndarray
    connection_rating: np.ndarray
    collapse_method: tuple = ()
    yield_strength: np.ndarray | None = None   # minimum yield [Pa] (nan: unknown)
    rating_wall: np.ndarray | None = None      # wall the ratings use [m]
    displaced_area: np.ndarray | None = None   # own material's section [m^2]
    collapse_basis: tuple = ()
    burst_basis: tuple = ()
    tension_basis: tuple = ()
    derating: tuple = ()
    rating_temperature: float = 23.0
    findings: tuple = ()
    modulus: np.ndarray | None = None          # Young's modulus [Pa] (nan: unknown)

    def __post_init__(self):
        n = len(self.length)
        for name in ("od", "bore", "weight", "collapse_rating", "burst_rating",
                     "body_rating", "connection_rating"):
            arr = getattr(self, name)
            if len(arr) != n:
                raise ValueError(f"JointArrays.{name} has {len(arr)} entries, expected {n}")

    @property
    def n(self) -> int:
        return len(self.length)

    @property
    def pressure_outside_area(self) -> np.ndarray:
        """Outer area of each joint for the pressure-area faces [m^2].

        ``A_e = pi/4 d^2 + A_s`` with ``A_s`` the :attr:`displaced_area`:
        the section that holds the joint's own material and the bore, so
        that a joint in one fluid is buoyed by exactly the fluid its
        material displaces (Archimedes): open-ended in one fluid the true
        force at the top is ``sum W_i (1 - rho_f / rho_i)``.  Without
        ``displaced_area`` it is the area of the outside diameter.
        """
        bore = 0.25 * np.pi * np.asarray(self.bore, dtype=float) ** 2
        if self.displaced_area is None:
            return 0.25 * np.pi * np.asarray(self.od, dtype=float) ** 2
        return bore + np.asarray(self.displaced_area, dtype=float)

    def subset(self, start: int, stop: int) -> "JointArrays":
        """Joints ``start..stop-1`` (0-based, running order) as a new string."""
        sl = slice(start, stop)
        return JointArrays(
            label=tuple(self.label[sl]), kind=tuple(self.kind[sl]),
            length=self.length[sl], od=self.od[sl], bore=self.bore[sl],
            weight=self.weight[sl], collapse_rating=self.collapse_rating[sl],
            burst_rating=self.burst_rating[sl], body_rating=self.body_rating[sl],
            connection_rating=self.connection_rating[sl],
            collapse_method=tuple(self.collapse_method[sl]) if self.collapse_method else (),
            yield_strength=None if self.yield_strength is None else self.yield_strength[sl],
            rating_wall=None if self.rating_wall is None else self.rating_wall[sl],
            displaced_area=None if self.displaced_area is None else self.displaced_area[sl],
            collapse_basis=tuple(self.collapse_basis[sl]),
            burst_basis=tuple(self.burst_basis[sl]),
            tension_basis=tuple(self.tension_basis[sl]),
            derating=tuple(self.derating[sl]),
            rating_temperature=self.rating_temperature,
            findings=tuple(f if f.joint is None else replace(f, joint=f.joint - start)
                           for f in self.findings
                           if f.joint is None or start < f.joint <= stop),
            modulus=None if self.modulus is None else self.modulus[sl],
        )


@dataclass(frozen=True)
class Hole:
    """The hole the string is run into.

    fluid_density : drilling-fluid density in the annulus [kg/m^3]
    fluid_level : depth from the floor to the top of the annulus fluid [m]
        (0 = full to the floor; deeper after lost returns)
    depth : drilled depth [m] (the string must fit: shoe depth <= depth)
    diameter : hole (bit) diameter [m], nan when not given
    temperature : job temperature of the casing in the hole [C] (ground
        and fluid), default 23 C (73 F), the temperature thermoplastic
        ratings are stated at
    """

    fluid_density: float
    fluid_level: float = 0.0
    depth: float = float("nan")
    diameter: float = float("nan")
    temperature: float = 23.0


@dataclass(frozen=True)
class Closure:
    """How the bottom of the string is closed.

    valve_joint : None for an open shoe; 0 for a float shoe (check valve at
        the bottom of joint 1); m >= 1 for a float collar at the top of joint
        m (joints 1..m below it are the shoe track and fill with hole fluid).
    valve_rating : differential pressure the check valve holds [Pa]
        (nan = not rated; then not checked)
    """

    valve_joint: int | None = None
    valve_rating: float = float("nan")

    @property
    def is_open(self) -> bool:
        return self.valve_joint is None


@dataclass(frozen=True)
class DesignFactors:
    """Design factors [-] applied as load x factor <= rating.

    Defaults sit inside the ranges quoted in Lyons, *Standard Handbook of
    Petroleum and Natural Gas Engineering* (tension 1.6-1.8, collapse
    1.0-1.125, burst 1.1-1.33); local codes may require more.
    """

    tension: float = 1.6
    collapse: float = 1.125
    burst: float = 1.1


#: When stage 1 of a staged setting is released (see :class:`Settings`).
STAGE1_RELEASES = ("on_bottom", "after_grout")


@dataclass(frozen=True)
class Settings:
    """What the driller sets for the run, SI units.

    fill_density : density of the fluid the crew adds inside [kg/m^3]
    min_running_weight : least string load [N] (hook load less dead load)
        that still lets the string go down (float limit)
    set_down_weight : weight slacked off onto bottom when landed [N]
    fill_density_alternatives : other fill fluids to compare [kg/m^3]
    float_collar_positions : joints to try for a float collar (besides a
        float shoe) when the planner compares float positions
    screen_depth_tolerance : how far a screen interval may land from its
        planned depth before the crew is warned [m]; default 2 ft (0.6096 m,
        common practice, no source)
    stage1_release : when a staged setting releases stage 1: ``"on_bottom"``
        (released once on bottom: it stands on its own weight) or
        ``"after_grout"`` (held on the landing string until the grout placed
        at its shoe has set, then released: the grout carries it)
    """

    fill_density: float = 998.2
    min_running_weight: float = 0.0
    set_down_weight: float = 0.0
    design: DesignFactors = field(default_factory=DesignFactors)
    fill_density_alternatives: tuple = ()
    float_collar_positions: tuple = (1, 2, 3)
    screen_depth_tolerance: float = 0.6096
    stage1_release: str = "on_bottom"


@dataclass(frozen=True)
class GroutSpec:
    """Annular grout or cement placed after landing, SI units.

    density : grout density [kg/m^3]
    height : grout column above the shoe [m] (the full planned column)
    inside_density : fluid inside the casing while grouting [kg/m^3]
    inside_level : depth to the inside fluid top [m] (0 = full)
    temperature_rise : rise of the casing temperature over the job
        temperature while the grout sets (heat of hydration) [K]; the
        grouting collapse check derates thermoplastic casing at the job
        temperature plus this rise
    """

    density: float
    height: float
    inside_density: float = 998.2
    inside_level: float = 0.0
    temperature_rise: float = 0.0


@dataclass(frozen=True)
class StringPlan:
    """A whole job as read from a string-plan file (SI units throughout).

    ``joints`` lists every joint in running order (joint 1 first); rejected
    joints stay in the list with ``rejected=True`` and are skipped by the
    planner.  ``closure.valve_joint`` counts the *running* joints (rejected
    ones left out), as the planner sees the string.  ``source`` is the file
    it came from (for messages only).
    """

    name: str
    well: str
    hole: Hole
    joints: tuple
    closure: Closure = field(default_factory=Closure)
    settings: Settings = field(default_factory=Settings)
    grout: GroutSpec | None = None
    site: str = ""
    notes: str = ""
    source: str = ""
    report: tuple = ()       # (key, text) pairs of the file's [report] table (packet facts)

    def running_joints(self) -> tuple:
        """The joints that go in the hole, in running order."""
        return tuple(j for j in self.joints if not j.rejected)
