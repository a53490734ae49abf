"""What an elastic surge run hands back: the result, its envelopes, wave speeds and cavities.

All values SI; arrays along a line run from its from-end to its to-end.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from workbench.core.model import Finding

STATUS_MESSAGES = {
    0: "The run reached its end; the results hold throughout.",
    1: "The run reached its end, but the pressure fell to vapour pressure and the liquid "
    "column separated: vapour cavities are modelled (discrete vapour cavity model), but the "
    "figures after that time are not trustworthy as design values.",
    -1: "The elastic model could not be set up.",
    -2: "The run was cancelled.",
}


class ElasticSetupError(ValueError):
    """The lines cannot be run by the elastic model; the message says why in words."""


@dataclass(frozen=True)
class WaveSpeedUse:
    """The wave speed of one line: from the Korteweg formula and as used on the grid."""

    line: str
    korteweg: float
    """Wave speed from the Korteweg formula [m/s]."""
    used: float
    """Wave speed used, ``L/(N dt)`` [m/s]."""
    formula: str
    """How the Korteweg speed was obtained (formula and support factor, in words)."""

    @property
    def adjustment(self) -> float:
        """Relative change ``used/korteweg - 1`` [-]."""
        return self.used / self.korteweg - 1.0


@dataclass(frozen=True, eq=False)
class Envelope:
    """Extremes over the run at every grid node of one line."""

    line: str
    distance: np.ndarray
    """Chainage of the nodes from the line's from-end [m]."""
    elevation: np.ndarray
    """Pipe centreline elevation at the nodes, interpolated from the profile [m]."""
    max_head: np.ndarray
    """Highest piezometric head reached [m]."""
    min_head: np.ndarray
    """Lowest piezometric head reached [m] (never below the vapour head with cavities on)."""
    initial_head: np.ndarray
    """Steady head at ``t = 0`` [m]."""
    max_pressure: np.ndarray
    """Highest gauge pressure ``rho g (H - z)`` [Pa]."""
    min_pressure: np.ndarray
    """Lowest gauge pressure [Pa]."""
    max_head_before_separation: np.ndarray | None = None
    """Highest head reached before the first vapour cavity formed [m]; ``None``: none formed."""
    cavity_max_volume: np.ndarray | None = None
    """Largest vapour cavity volume at each node [m^3]; ``None``: no cavity model."""


@dataclass(frozen=True)
class ColumnSeparation:
    """Where and when the first vapour cavity formed (the pressure reached vapour pressure)."""

    time: float
    """[s]"""
    line: str
    distance: float
    """Chainage on that line [m]."""
    pressure_abs: float
    """Absolute pressure there [Pa]: the vapour pressure."""


@dataclass(frozen=True)
class CavityZone:
    """Vapour cavities at neighbouring computing sections of one line."""

    line: str
    start: float
    """Chainage of the first section with a cavity [m]."""
    end: float
    """Chainage of the last section with a cavity [m]."""
    sections: int
    """Computing sections in the zone that held a cavity [-]."""
    events: int
    """Cavities opened in the zone, summed over its sections [-]."""
    first_open: float
    """Time the first cavity in the zone opened [s]."""
    last_collapse: float | None
    """Time the last cavity in the zone collapsed [s]; ``None``: still open at the end."""
    max_volume: float
    """Largest volume of one cavity in the zone [m^3]."""
    max_volume_time: float
    """Time of that largest volume [s]."""
    max_volume_at: float
    """Chainage of that largest cavity [m]."""


@dataclass(frozen=True)
class GridCheck:
    """The same run repeated with twice the reaches, to show the grid's effect on the peaks."""

    reaches: dict[str, int]
    """Reach counts of the check run."""
    max_head: dict[str, float]
    """Per line, the highest head of the check run [m]."""
    max_pressure: dict[str, float]
    """Per line, the highest gauge pressure of the check run [Pa]."""


@dataclass(frozen=True, eq=False)
class ElasticResult:
    """Result of an elastic surge run, shaped like scipy's solver results.

    ``status``: 0 ran to the end and holds throughout; 1 ran to the end but the liquid
    column separated (see :attr:`trusted_until`); -1 set-up failed (the message says why);
    -2 cancelled. ``success`` is ``status >= 0``.
    """

    success: bool
    status: int
    message: str
    line_ids: tuple[str, ...] = ()
    """The lines run together: a chain upstream to downstream, or a connected network."""
    time: np.ndarray = field(default_factory=lambda: np.zeros(0))
    """Times of the series [s], every step from 0."""
    dt: float = float("nan")
    """Time step [s]."""
    reaches: dict[str, int] = field(default_factory=dict)
    wave_speeds: dict[str, WaveSpeedUse] = field(default_factory=dict)
    friction: str = ""
    """Friction model used (a key of :data:`FRICTION_MODELS`)."""
    initial_flow: float = float("nan")
    """Steady flow at ``t = 0`` in the requested line [m^3/s]."""
    valve_line: str | None = None
    """The line whose valve the valve series refer to (``None``: no valve)."""
    valve_head: np.ndarray = field(default_factory=lambda: np.zeros(0))
    """Head at the pipe side of that valve [m]."""
    valve_pressure: np.ndarray = field(default_factory=lambda: np.zeros(0))
    """Gauge pressure at the pipe side of that valve [Pa]."""
    midline_head: dict[str, np.ndarray] = field(default_factory=dict)
    """Per line, head at the node nearest mid-length [m]."""
    midline_pressure: dict[str, np.ndarray] = field(default_factory=dict)
    """Per line, gauge pressure at the node nearest mid-length [Pa]."""
    envelopes: dict[str, Envelope] = field(default_factory=dict)
    column_separation: ColumnSeparation | None = None
    trusted_until: float | None = None
    """Time after which the results are not trustworthy [s]; ``None``: trusted throughout."""
    findings: tuple[Finding, ...] = ()
    notes: tuple[str, ...] = ()
    """Plain-language notes on the model (held levels, friction, adjustments)."""
    kernel: str = ""
    """Time-stepping kernel used: ``"compiled"`` or ``"numpy"`` (same numbers to round-off)."""
    initial_flows: dict[str, float] = field(default_factory=dict)
    """Steady flow at ``t = 0`` per line [m^3/s]."""
    traces: dict[str, np.ndarray] = field(default_factory=dict)
    """Head in time at valves and junctions [m], keyed ``"valve LINE"``/``"junction NODE"``."""
    cavity_volume: np.ndarray = field(default_factory=lambda: np.zeros(0))
    """Total vapour cavity volume in the lines run, every step [m^3] (empty: model off)."""
    cavity_zones: tuple[CavityZone, ...] = ()
    grid_check: GridCheck | None = None
    """The peaks with twice the reaches, when cavities formed (``None`` otherwise)."""
    vapour_head: dict[str, np.ndarray] = field(default_factory=dict)
    """Per line, the head at which the liquid boils at each node [m]."""
    template: str = ""
    """:attr:`message` with ``{name}`` slots for :attr:`values`, written in the display units
    by the output layer (:mod:`workbench.core.finding_text`); "" without numbers."""
    values: tuple = ()
    """``(name, SI value, quantity kind, digits)`` per slot of :attr:`template`."""

    @property
    def duration(self) -> float:
        """Simulated time [s]."""
        return float(self.time[-1]) if len(self.time) else 0.0


def failed(message: str, status: int = -1, **kwargs) -> ElasticResult:
    """A result that carries only a failure (or cancellation) message."""
    return ElasticResult(success=False, status=status, message=message, **kwargs)
