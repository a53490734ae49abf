"""The options of one run, checked and completed from the system's ``[simulation]`` settings."""

from __future__ import annotations

import math
from dataclasses import dataclass

from workbench.core.model import Finding, System

#: Integration methods by name (all scipy OdeSolver classes); the first three are implicit.
METHODS: dict[str, str] = {
    "Radau": "implicit Runge-Kutta of order 5 (Radau IIA), analytic Jacobian",
    "BDF": "backward differentiation formulas of variable order, analytic Jacobian",
    "LSODA": "ODEPACK LSODA: switches between Adams and BDF, analytic Jacobian",
    "RK45": "explicit Runge-Kutta 5(4) (for comparison: slow on stiff systems)",
}

#: Longest simulated duration accepted [s] (about 32 years).
MAX_DURATION = 1e9

#: Most points of the reported series; a finer output interval is widened (with a note).
MAX_OUTPUT_POINTS = 200_000


@dataclass(frozen=True)
class RunOptions:
    """How one run integrates and reports."""

    duration: float
    """Simulated time [s]."""
    method: str
    """A key of :data:`METHODS`."""
    rtol: float
    atol: object
    """Absolute tolerance (scalar or per state), or ``None`` to scale it with the state."""
    output_interval: float
    """Spacing of the reported series [s]."""
    initial_state: str
    """``"steady"`` or ``"at_rest"``."""
    stop_when: str | None
    """``"drained"`` or ``None``."""


def resolve_options(system: System, *, duration, method, rtol, atol, output_interval,
                    initial_state, stop_when) -> tuple[RunOptions, list[Finding]]:
    """Check the arguments of :func:`~workbench.core.transient.simulate` and fill the
    missing ones from ``system.simulation``; returns the options and notes for the result.

    Raises ``ValueError`` naming what is wrong.
    """
    settings = system.simulation
    if duration is None:
        if settings is None:
            raise ValueError("no duration: give duration= or a [simulation] duration")
        duration = settings.duration
    if not (duration > 0.0 and math.isfinite(duration)):
        raise ValueError(f"duration must be a positive number of seconds, got {duration!r}")
    if duration > MAX_DURATION:  # far past any drain or transfer; near 1e300 s steps overflow
        raise ValueError(f"a simulated duration of {duration:.3g} s is more than "
                         f"{MAX_DURATION / 3.15576e7:.0f} years: give a shorter "
                         "simulation.duration (or --duration)")
    if method not in METHODS:
        raise ValueError(f"unknown method {method!r}; choose one of {', '.join(METHODS)}")
    if initial_state is None:
        initial_state = settings.initial_state if settings is not None else "steady"
    if initial_state not in ("steady", "at_rest"):
        raise ValueError(f"initial_state must be 'steady' or 'at_rest', got {initial_state!r}")
    if stop_when == "settings":
        stop_when = settings.stop_when if settings is not None else None
    if output_interval is None and settings is not None:
        output_interval = settings.output_interval
    if output_interval is None or not output_interval > 0.0:
        output_interval = duration / 1000.0
    asked = output_interval
    notes: list[Finding] = []
    if duration / output_interval > MAX_OUTPUT_POINTS:  # memory and time stay bounded
        output_interval = duration / MAX_OUTPUT_POINTS
        notes.append(Finding(
            "simulation.output_interval", "simulation",
            f"an output interval of {asked:.3g} s gives more than {MAX_OUTPUT_POINTS:,} points "
            f"over {duration:.6g} s: the series are reported every {output_interval:.3g} s "
            "instead (events keep their exact times)", "info", "workbench output limit"))
    options = RunOptions(float(duration), method, rtol, atol, output_interval, initial_state,
                         stop_when)
    return options, notes
