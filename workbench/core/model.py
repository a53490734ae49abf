"""The gravity system as the numeric core sees it: plain SI floats in frozen dataclasses.

This module is the contract between the project document (which reads TOML, parses
units and validates) and the solvers (steady network, rigid-column transient, elastic
surge). Everything here is already validated and in SI units:

* lengths and elevations in metres [m], diameters in metres [m]
* pressures in pascals [Pa]; *gauge* unless the attribute says absolute
* times in seconds [s], temperatures in kelvin [K]
* flows in cubic metres per second [m^3/s]

Piezometric head used throughout the core is ``z + p_gauge/(rho*g)`` [m], so a free
surface open to the atmosphere has head equal to its elevation.

Nothing here imports a UI library, pint or does file I/O.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Literal

#: Standard acceleration of gravity [m/s^2] (CGPM 1901, exact).
G = 9.80665

#: Standard atmospheric pressure at sea level [Pa] (ISO 2533, exact).
P_ATM_SEA_LEVEL = 101325.0

TankShapeKind = Literal["vertical_cylinder", "horizontal_cylinder", "rectangular", "cone_bottom"]
ValveCharacteristic = Literal["linear", "equal_percentage", "quick_opening"]
FittingMethod = Literal["darby_3k", "hooper_2k"]


@dataclass(frozen=True)
class FluidProps:
    """Properties of the (Newtonian, single-phase) liquid at the system temperature."""

    name: str
    """Readable name, e.g. ``"water"`` or ``"ethylene glycol"``."""
    density: float
    """Density [kg/m^3]."""
    viscosity: float
    """Dynamic viscosity [Pa*s]."""
    vapor_pressure: float | None = None
    """Saturation (vapour) pressure, absolute [Pa]; ``None`` when unknown: vapour checks
    are then skipped with a note."""
    bulk_modulus: float | None = None
    """Isentropic (or isothermal where only that is known) bulk modulus [Pa]; ``None``
    when unknown: surge wave speeds then need a value from the user."""
    temperature: float | None = None
    """Temperature [K]; ``None`` for a custom liquid given without one."""
    formulation: str = ""
    """Where the numbers came from (e.g. "IAPWS-95 density, IAPWS 2008 viscosity")."""
    notes: tuple[str, ...] = ()
    """Cautions about the values, e.g. a temperature outside a correlation's range."""


@dataclass(frozen=True)
class TankShape:
    """Geometry of a tank whose level changes with flow. Dimensions [m]."""

    kind: TankShapeKind
    diameter: float | None = None
    """Vertical cylinder, horizontal cylinder and cone bottom: inside diameter [m]."""
    length: float | None = None
    """Horizontal cylinder (flat ends): length [m]; rectangular: length [m]."""
    width: float | None = None
    """Rectangular: width [m]."""
    cone_height: float | None = None
    """Cone bottom: height of the conical part, apex at the tank bottom [m]."""


@dataclass(frozen=True)
class FlowSchedule:
    """Piecewise-linear flow in time, holding its first and last values outside its times."""

    times: tuple[float, ...]
    """[s], strictly increasing."""
    flows: tuple[float, ...]
    """Flow at each time [m^3/s], never negative."""


@dataclass(frozen=True)
class Vent:
    """A tank's opening to the atmosphere for its gas space (see :mod:`workbench.core.vent`).

    Every form the project file allows reduces to one effective area ``C_d A = A/sqrt(K)``:
    a bore ``A`` with loss coefficient ``K`` (``dp = K rho v^2/2``), or a stated flow of air
    at a stated pressure drop (air at 20 degC and 1 atm). A sealed tank has none (0).
    """

    effective_area: float
    """``C_d A`` [m^2]; 0 for a sealed tank (``vent = "none"``)."""
    diameter: float | None = None
    """Bore of a vent given by size [m]."""
    k: float | None = None
    """Loss coefficient of a vent given by size, referred to its bore's velocity [-]."""
    rated_flow: float | None = None
    """Stated air flow [m^3/s] at :attr:`rated_pressure_drop` (air at 20 degC, 1 atm)."""
    rated_pressure_drop: float | None = None
    """[Pa]"""

    @property
    def sealed(self) -> bool:
        return self.effective_area <= 0.0


@dataclass(frozen=True)
class Reservoir:
    """A free liquid surface: a constant-level source/sink, or a tank whose level moves."""

    id: str
    kind: Literal["constant_level", "tank"]
    bottom_elevation: float
    """Elevation of the tank bottom, where outlet lines leave or enter [m]."""
    level: float
    """Liquid depth above the bottom [m] (the initial level of a tank)."""
    surface_pressure: float = 0.0
    """Gauge gas pressure on the surface [Pa]."""
    shape: TankShape | None = None
    """Tank geometry; ``None`` for a constant-level reservoir."""
    height: float | None = None
    """Level at which the tank overflows [m above bottom]; ``None`` when not given."""
    min_level: float = 0.0
    """Level counted as drained [m above bottom]."""
    inflow: float = 0.0
    """Tank: constant feed into the tank from outside the modelled lines [m^3/s], >= 0."""
    inflow_schedule: FlowSchedule | None = None
    """Tank: the feed in time; replaces :attr:`inflow` when given."""
    draw_off: float = 0.0
    """Tank: constant flow taken out by something outside the model (a pump to process)
    [m^3/s], >= 0. It stops while the tank is drained."""
    draw_off_schedule: FlowSchedule | None = None
    """Tank: the draw-off in time; replaces :attr:`draw_off` when given."""
    restart_level: float | None = None
    """Tank: level at which a drained tank's outlets and draw-off start again [m above
    bottom], above :attr:`min_level`; ``None``: see :func:`restart_level`."""
    vent: Vent | None = None
    """Tank: its vent; ``None`` for a tank open to the atmosphere (the gas space is not
    modelled and the surface stands at :attr:`surface_pressure`)."""
    gas_pressure: float = 0.0
    """Tank with a vent: gauge pressure of the gas space at the start [Pa]."""
    design_vacuum: float | None = None
    """The vacuum the tank is built for, a positive gauge figure [Pa]."""
    design_pressure: float | None = None
    """The gas-space pressure the tank is built for, gauge [Pa]."""
    gas_process: Literal["isothermal", "adiabatic"] = "isothermal"
    """How the gas space's pressure follows its density (see :mod:`workbench.core.vent`)."""
    shell_height: float | None = None
    """Tank with a vent: height of the gas space's top above the bottom [m]; ``None``: the
    overflow level :attr:`height` (or the top of a closed shape)."""

    @property
    def has_external_flow(self) -> bool:
        """True when the tank has a feed or a draw-off (constant or scheduled)."""
        return bool(self.inflow or self.draw_off or self.inflow_schedule is not None
                    or self.draw_off_schedule is not None)


@dataclass(frozen=True)
class Junction:
    """A point where lines meet; continuity holds there."""

    id: str
    elevation: float
    """[m]"""


@dataclass(frozen=True)
class Receiver:
    """Where a line ends outside the tanks: free discharge to air, or a closed vessel."""

    id: str
    kind: Literal["open_discharge", "vessel"]
    elevation: float
    """Elevation of the discharge point or the vessel inlet [m]."""
    pressure: float = 0.0
    """Vessel gauge pressure [Pa]; zero for open discharge."""


@dataclass(frozen=True)
class Fitting:
    """A minor loss: a named fitting (resolved by :mod:`workbench.core.fittings`) or a fixed K."""

    type: str | None = None
    """Our readable fitting name, a key of ``workbench.core.fittings.FITTINGS``."""
    k: float | None = None
    """A fixed loss coefficient [-] (used when ``type`` is ``None``)."""
    count: int = 1
    label: str = ""
    method: FittingMethod = "darby_3k"
    """Published method used for a named fitting."""


@dataclass(frozen=True)
class ValveSchedule:
    """Piecewise-linear valve opening in time."""

    times: tuple[float, ...]
    """[s], strictly increasing."""
    openings: tuple[float, ...]
    """Relative stem travel 0..1 at each time [-]."""


@dataclass(frozen=True)
class Valve:
    """A throttling valve on a line."""

    characteristic: ValveCharacteristic
    k_open: float
    """Loss coefficient at full opening, referred to the line's velocity head [-]."""
    opening: float = 1.0
    """Steady opening (relative travel) 0..1 [-]."""
    rangeability: float = 50.0
    """Equal-percentage rangeability R [-] (c = R^(x-1))."""
    schedule: ValveSchedule | None = None
    """Opening in time for simulations; ``None`` holds ``opening``."""
    position: Literal["from", "to"] = "to"
    """Which end of the line the valve sits at (for surge and pressure checks)."""
    low_opening: Literal["tangent", "iec"] = "tangent"
    """Equal percentage below ``x = 1/ln R``: ``"tangent"`` (the line through the origin
    touching ``R^(x-1)``, so the valve closes smoothly) or ``"iec"`` (``R^(x-1)`` down to
    any opening above zero, IEC 60534-2-4's inherent curve; tight only at ``x = 0``)."""


@dataclass(frozen=True)
class SurgeSettings:
    """How surge is computed for a line."""

    model: Literal["rigid", "elastic"] = "rigid"
    reaches: int | None = None
    """Reach count for the elastic (method of characteristics) model; ``None``: automatic."""


@dataclass(frozen=True)
class Line:
    """A pipe run between two nodes, with fittings, an optional valve and a profile."""

    id: str
    from_node: str
    to_node: str
    length: float
    """[m]"""
    diameter: float
    """Inside diameter [m]."""
    roughness: float = 0.0
    """Absolute roughness [m]."""
    friction_factor: float | None = None
    """A fixed Darcy friction factor that overrides the correlation [-]."""
    entrance_k: float = 0.5
    """Loss coefficient where flow leaves a free surface into the line [-]."""
    entrance_name: str = "sharp"
    fittings: tuple[Fitting, ...] = ()
    profile: tuple[tuple[float, float], ...] = ()
    """Centreline ``(distance from the from-end [m], elevation [m])`` points, increasing
    distance; empty means a straight run between the end nodes' elevations."""
    air_valves: tuple[float, ...] = ()
    """Distances [m] of profile points with an air (vacuum-breaking) valve: the column parts
    there once the pressure falls below atmospheric, the valve admitting air."""
    wall_thickness: float | None = None
    """[m]"""
    elastic_modulus: float | None = None
    """Young's modulus of the pipe wall [Pa]."""
    poisson_ratio: float = 0.30
    support: Literal["anchored_upstream", "anchored", "expansion_joints"] = "anchored"
    """Pipe restraint for the Korteweg wave speed."""
    pressure_rating: float | None = None
    """Allowable gauge pressure [Pa]."""
    valve: Valve | None = None
    surge: SurgeSettings = field(default_factory=SurgeSettings)
    material: str | None = None


@dataclass(frozen=True)
class SimulationSettings:
    duration: float
    """[s]"""
    initial_state: Literal["steady", "at_rest"] = "steady"
    stop_when: Literal["drained"] | None = None
    output_interval: float | None = None
    """Spacing of the reported time series [s]; ``None``: automatic."""


@dataclass(frozen=True)
class System:
    """A whole gravity system, validated and in SI units."""

    title: str
    fluid: FluidProps
    reservoirs: dict[str, Reservoir]
    junctions: dict[str, Junction]
    receivers: dict[str, Receiver]
    lines: dict[str, Line]
    atmospheric_pressure: float = P_ATM_SEA_LEVEL
    """Absolute atmospheric pressure at the site [Pa]."""
    site_elevation: float = 0.0
    """[m]"""
    simulation: SimulationSettings | None = None

    def node_elevation(self, node_id: str) -> float:
        """Elevation where a line meets the node [m]."""
        if node_id in self.reservoirs:
            return self.reservoirs[node_id].bottom_elevation
        if node_id in self.junctions:
            return self.junctions[node_id].elevation
        return self.receivers[node_id].elevation

    def node_kind(self, node_id: str) -> str:
        """``"reservoir"``, ``"junction"`` or ``"receiver"``."""
        if node_id in self.reservoirs:
            return "reservoir"
        if node_id in self.junctions:
            return "junction"
        if node_id in self.receivers:
            return "receiver"
        raise KeyError(node_id)


def reservoir_head(res: Reservoir, density: float, level: float | None = None) -> float:
    """Piezometric head of a free surface, gauge based [m].

    ``H = z_bottom + h + p_surface/(rho*g)``, with ``level`` overriding the stored level.
    """
    h = res.level if level is None else level
    return res.bottom_elevation + h + res.surface_pressure / (density * G)


def flow_at(constant: float, schedule: FlowSchedule | None, t: float) -> float:
    """A feed or draw-off at time ``t`` [s]: the schedule (piecewise linear, holding its end
    values) when given, else the constant [m^3/s]."""
    if schedule is None or not schedule.times:
        return constant
    times, flows = schedule.times, schedule.flows
    if t <= times[0]:
        return flows[0]
    if t >= times[-1]:
        return flows[-1]
    lo, hi = 0, len(times) - 1
    while hi - lo > 1:
        mid = (lo + hi) // 2
        if times[mid] <= t:
            lo = mid
        else:
            hi = mid
    w = (t - times[lo]) / (times[hi] - times[lo])
    return flows[lo] + w * (flows[hi] - flows[lo])


def inflow_at(res: Reservoir, t: float) -> float:
    """The tank's feed at time ``t`` [m^3/s] (zero for a constant-level reservoir)."""
    return flow_at(res.inflow, res.inflow_schedule, t)


def draw_off_at(res: Reservoir, t: float) -> float:
    """The draw-off asked of the tank at time ``t`` [m^3/s], before any stop because the
    tank is drained."""
    return flow_at(res.draw_off, res.draw_off_schedule, t)


#: Restart band of a drained tank when no ``restart_level`` is given, as a fraction of the
#: depth from ``min_level`` to the overflow level (or to the initial level of a tank without
#: one) [-]. A band keeps a level switch from chattering (common practice, no source).
RESTART_BAND = 0.05


def restart_level(res: Reservoir) -> float:
    """Level at which a drained tank's outlets and draw-off start again [m above bottom].

    ``res.restart_level`` when given; otherwise ``min_level`` plus :data:`RESTART_BAND` of
    the depth from ``min_level`` to ``height`` (to the initial level without a height), at
    least 1 mm above ``min_level``.
    """
    if res.restart_level is not None:
        return res.restart_level
    top = res.height if res.height is not None else res.level
    return res.min_level + max(RESTART_BAND * (top - res.min_level), 1e-3)


def receiver_head(rec: Receiver, density: float) -> float:
    """Piezometric head at a receiver, gauge based [m]: ``z + p/(rho*g)``."""
    return rec.elevation + rec.pressure / (density * G)


Severity = Literal["info", "caution", "danger"]


@dataclass(frozen=True)
class Finding:
    """Something the engineer should see about a result: a warning with a stable code.

    ``code`` is stable across versions (e.g. ``"profile.vapor"``) because files, scripts and
    tests match on it; ``message`` is words a user can act on; ``source`` names the published
    reference or says ``"rule of thumb"``.

    A finding made by :func:`workbench.core.finding_text.finding` also keeps its numbers:
    ``template`` is the message with ``{name}`` slots and ``values`` the SI value and
    quantity kind of each slot, so the output layer can write the same words in the
    display unit system (``message`` is the SI text).
    """

    code: str
    element: str
    message: str
    severity: Severity = "caution"
    source: str = ""
    template: str = ""
    """The message with ``{name}`` slots for :attr:`values` ("" when it has no numbers)."""
    values: tuple[tuple[str, float, str, int], ...] = ()
    """``(name, SI value, quantity kind, significant digits)`` per slot of :attr:`template`."""
