"""What a run knows between steps besides the integrated state: tanks drained or spilling,
lines held shut, flow peaks, and the events listed so far.

The integrated state ``y = [Q, V]`` lives in the solver; :class:`RunState` holds the
discrete part that events switch (a drained tank's outlets held shut, a spilling tank's
level held at the overflow, a discharge line stopped because its upstream head fell below
its open outlet) and the counters the event handlers need.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from workbench.core.model import Finding
from workbench.core.transient.results import Event


@dataclass
class RunState:
    """The switched part of a run's state, per tank (``nt``) and per line (``nl``)."""

    drained: np.ndarray
    """Tanks standing drained, their outlets held shut [bool, nt]."""
    spilling: np.ndarray
    """Tanks held at their overflow level, spilling the surplus [bool, nt]."""
    blocked: np.ndarray
    """Lines held shut because a tank they draw from is drained [bool, nl]."""
    blocked_by: np.ndarray
    """Which tank holds each outlet shut [bool, nt x nl]."""
    backstopped: np.ndarray
    """Discharge lines stopped: they would draw air back from an open outlet [bool, nl]."""
    drain_count: np.ndarray
    """Times each tank drained [-]."""
    q_peak: np.ndarray
    """Largest flow magnitude of each line so far [m^3/s]."""
    peak_since_rev: np.ndarray
    """Largest flow magnitude since the last listed reversal [m^3/s]."""
    rev_count: np.ndarray
    """Reversals listed per line [-]."""
    draining_capable: np.ndarray = field(default_factory=lambda: np.zeros(0, bool))
    """Tanks that can drain (an outlet, an initial outflow or a draw-off) [bool, nt]."""
    valve_shut: np.ndarray | None = None
    """Valves shut over the whole current segment [bool, nl]; ``None`` before the first."""
    siphon_broken: np.ndarray = field(default_factory=lambda: np.zeros(0, bool))
    """Lines whose column has parted at a high point (:mod:`.siphon`) [bool, nl]."""
    siphon_stopped: np.ndarray = field(default_factory=lambda: np.zeros(0, bool))
    """Broken lines stopped: the source is too low to lift anything [bool, nl]."""
    siphon_frac: np.ndarray = field(default_factory=lambda: np.zeros(0))
    """Where each broken line parted, as a fraction of its length from the from-end [-]."""
    siphon_head: np.ndarray = field(default_factory=lambda: np.zeros(0))
    """Head of the cavity at the parting point, gauge based [m]."""
    siphon_sign: np.ndarray = field(default_factory=lambda: np.zeros(0))
    """Direction of the flow when the line broke (+1 from-end to to-end)."""
    events: list[Event] = field(default_factory=list)
    drain_times: dict[str, float] = field(default_factory=dict)
    """Time each tank first drained [s]."""
    notes: list[Finding] = field(default_factory=list)
    """Findings about the run itself (an output interval widened, ...)."""
    sealed_stops: dict[str, float] = field(default_factory=dict)
    """Tanks whose drain stopped against their gas space's vacuum, with the time [s]."""

    @classmethod
    def empty(cls, n_lines: int, n_tanks: int) -> "RunState":
        """Nothing drained, spilling or stopped, no peaks yet."""
        return cls(
            drained=np.zeros(n_tanks, bool),
            spilling=np.zeros(n_tanks, bool),
            blocked=np.zeros(n_lines, bool),
            blocked_by=np.zeros((n_tanks, n_lines), bool),
            backstopped=np.zeros(n_lines, bool),
            drain_count=np.zeros(n_tanks, dtype=int),
            q_peak=np.zeros(n_lines),
            peak_since_rev=np.zeros(n_lines),
            rev_count=np.zeros(n_lines, dtype=int),
            siphon_broken=np.zeros(n_lines, bool),
            siphon_stopped=np.zeros(n_lines, bool),
            siphon_frac=np.zeros(n_lines),
            siphon_head=np.zeros(n_lines),
            siphon_sign=np.ones(n_lines),
        )

    def event(self, t: float, code: str, element: str, message: str, template: str = "",
              values: tuple = ()) -> None:
        """List an event at time ``t`` [s] (``template``/``values``: its numbers kept, see
        :func:`workbench.core.finding_text.slots`)."""
        self.events.append(Event(float(t), code, element, message, template, values))

    def note_peaks(self, q: np.ndarray) -> None:
        """Raise the flow peaks to the magnitudes of ``q`` [m^3/s]."""
        aq = np.abs(q)
        self.q_peak = np.maximum(self.q_peak, aq)
        self.peak_since_rev = np.maximum(self.peak_since_rev, aq)
