"""What a rigid-column run returns: its events and the result shaped like scipy's ``OdeResult``.

The field names and meanings are read by :mod:`workbench.output.transient` (the ``--json``
contract), the sanity checks and the app; add fields, never rename them.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from workbench.core.model import Finding
from workbench.core.surge import LineSurge

#: Status codes of :class:`TransientResult`.
STATUS = {
    -1: "integration failed",
    0: "reached the end of the simulated duration",
    1: "stop condition met (every draining tank drained)",
    2: "cancelled",
}


@dataclass(frozen=True)
class Event:
    """Something that happened at an instant of the run."""

    time: float
    """[s]"""
    code: str
    """``tank.drained``, ``tank.draw_off_stopped``, ``tank.refilled``, ``tank.overflow``,
    ``tank.spill_end``, ``line.reversal``, ``line.restart``, ``valve.closed``,
    ``valve.opened``, ``outlet.submergence`` (placed between output times)."""
    element: str
    """Id of the tank, line or valve's line."""
    message: str
    template: str = ""
    """The message with ``{name}`` slots for :attr:`values` (see
    :mod:`workbench.core.finding_text`); "" when it carries no numbers."""
    values: tuple = ()
    """``(name, SI value, quantity kind, digits)`` per slot."""


@dataclass(frozen=True)
class TransientResult:
    """Outcome of :func:`simulate`, shaped like scipy's ``OdeResult``.

    Series are sampled at :attr:`t` (the output grid plus every event time).
    """

    success: bool
    status: int
    """See :data:`STATUS`."""
    message: str
    t: np.ndarray
    """Output times [s]."""
    line_ids: tuple[str, ...]
    flows: np.ndarray
    """Line flows, lines x times [m^3/s]."""
    tank_ids: tuple[str, ...]
    levels: np.ndarray
    """Tank levels above their bottoms, tanks x times [m]."""
    volumes: np.ndarray
    """Tank liquid volumes, tanks x times [m^3]."""
    events: tuple[Event, ...]
    max_pressure: dict[str, float]
    """Per line, the largest gauge pressure anywhere on the line over the run, valve inlet
    and profile points included, after the Joukowsky cap [Pa]."""
    min_pressure: dict[str, float]
    """Per line, the smallest gauge pressure anywhere on the line over the run [Pa]."""
    max_pressure_time: dict[str, float]
    """When the (uncapped) maximum occurred [s]."""
    min_pressure_time: dict[str, float]
    surge: dict[str, LineSurge]
    warnings: tuple[Finding, ...]
    drain_times: dict[str, float]
    """Time each tank first drained [s] (tanks that drained only)."""
    feeds: np.ndarray = field(default_factory=lambda: np.zeros((0, 0)))
    """Feed into each tank from outside the model, tanks x times [m^3/s] (zero without
    one)."""
    draw_offs: np.ndarray = field(default_factory=lambda: np.zeros((0, 0)))
    """Draw-off delivered by each tank, tanks x times [m^3/s]: the asked value, zero while
    the tank is drained."""
    feed_volumes: np.ndarray = field(default_factory=lambda: np.zeros(0))
    """Volume fed into each tank over the run [m^3], integrated step by step as the run
    went (exact for the piecewise-linear schedules), not from the output samples."""
    draw_off_volumes: np.ndarray = field(default_factory=lambda: np.zeros(0))
    """Volume drawn off each tank over the run [m^3], integrated like ``feed_volumes``
    (nothing while the tank stood drained, however fast it cycled)."""
    spill_volumes: np.ndarray = field(default_factory=lambda: np.zeros(0))
    """Volume spilled over each tank's overflow over the run [m^3], integrated with the
    flows as a state of the run (not from the output samples): with :attr:`line_volumes`,
    ``initial + fed + lines = final + drawn off + spilled`` to round-off."""
    line_volumes: np.ndarray = field(default_factory=lambda: np.zeros(0))
    """Net volume into each tank through its lines over the run [m^3] (negative: net
    outflow), integrated like :attr:`spill_volumes`."""
    end_rates: dict[str, float] = field(default_factory=dict)
    """Per tank, the rate of change of volume at the end of the run [m^3/s] (zero while it
    spills or stands drained)."""
    spills: np.ndarray = field(default_factory=lambda: np.zeros((0, 0)))
    """Surplus spilling over each tank's overflow, tanks x times [m^3/s]: lines, feed and
    draw-off's net inflow while the level is held at the overflow level, else zero."""
    end_states: dict[str, str] = field(default_factory=dict)
    """Per tank at the end of the run: ``"steady"`` (level no longer changing: inflows and
    outflows balance), ``"rising"``, ``"falling"``, ``"spilling"``, ``"drained"`` or
    ``"still"`` (nothing flowing in or out)."""
    junction_ids: tuple[str, ...] = ()
    """Junctions: the rows of :attr:`junction_pressures` (none unless ``simulate`` was
    asked for them with ``junction_pressures=True``)."""
    junction_pressures: np.ndarray = field(default_factory=lambda: np.zeros((0, 0)))
    """Gauge pressure at each junction, junctions x times [Pa], as the steady solution
    reports it (the lowest static pressure of the lines meeting there; ``nan`` while no
    open line joins it to a fixed head; see :mod:`.junctions`)."""
    gas_tank_ids: tuple[str, ...] = ()
    """Tanks with a vent (sealed included): the rows of :attr:`gas_pressures`."""
    gas_pressures: np.ndarray = field(default_factory=lambda: np.zeros((0, 0)))
    """Gauge pressure of each gas space, gas tanks x times [Pa]."""
    gas_masses: np.ndarray = field(default_factory=lambda: np.zeros((0, 0)))
    """Gas held in each gas space, gas tanks x times [kg]."""
    required_inbreathing: dict[str, float] = field(default_factory=dict)
    """Per gas tank, the largest liquid outflow of the run: the inbreathing a vent must
    pass for liquid movement (API 2000 / ISO 28300) [m^3/s]."""
    required_outbreathing: dict[str, float] = field(default_factory=dict)
    """Per gas tank, the largest liquid inflow less any spill [m^3/s]."""
    drain_notes: dict[str, str] = field(default_factory=dict)
    """Per tank that did not drain for a stated reason, the words (a siphon that broke and
    stopped: ``"does not drain: the siphon over line L breaks and stops at level X m"``)."""
    method: str = "Radau"
    nfev: int = 0
    njev: int = 0
    nlu: int = 0
    nsteps: int = 0
    wall_time: float = 0.0
    """Wall-clock time of the integration [s]."""
    stats: dict = field(default_factory=dict)
