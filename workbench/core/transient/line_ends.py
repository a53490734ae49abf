"""Piezometric heads inside each line at its two ends, for the pressures tracked along it.

Kept apart from the equations so that the pressure tracking (:mod:`.recording`) and the
siphon-break check (:mod:`.siphon`) can use it without importing the right-hand side.
"""

from __future__ import annotations

import numpy as np

from workbench.core.fittings import exit_k
from workbench.core.model import G
from workbench.core.transient.model import TransientModel


def line_end_heads(model: TransientModel, q, qdot, h_nodes_from, h_nodes_to):
    """Piezometric heads inside each line at its two ends, pipe side of any valve [m].

    Without a valve both ends follow from the node heads (less the entrance loss and the
    kinetic energy of the developed profile, ``alpha`` velocity heads, where the flow leaves
    a free surface; a line discharging into a free surface or the air keeps the head of
    what it discharges into, its exit loss being that ``alpha v^2/2g``; at a junction, whose
    head is an energy head, less the line's own ``alpha v^2/2g`` in either direction, as
    :func:`workbench.core.checks.line_profiles` does). With a valve, the
    valve's end is found from the momentum balance of the pipe instead,
    ``H_a - H_b = h_pipe(Q) + (L/gA) dQ/dt`` with ``dQ/dt`` taken from the integrated
    trajectory: near the end of a closure ``K_valve Q^2`` multiplies a tiny, inexact flow by
    a huge coefficient, while the column's deceleration stays well conditioned.
    """
    lines = model.lines
    v = q / lines.area
    vh = v * np.abs(v) / (2.0 * G)
    fwd = q >= 0.0
    # Leaving a free surface into the line: piezometric head drops by (alpha + K_entrance)
    # v^2/2g, alpha the kinetic-energy coefficient (2 laminar, 1 turbulent), as in the
    # steady grade line (workbench.core.checks.line_profiles).
    # At a junction the node head is the energy head shared by the lines meeting there (no
    # entrance or exit loss): each line's static head there is alpha velocity heads below it,
    # its own, in either direction (one grade line with solve's).
    alpha, _ = exit_k(np.abs(v) * (lines.diameter / lines.kinematic_viscosity))
    ke = alpha * np.abs(vh)
    drop_a = np.where(fwd & model.from_free, (alpha + model.entrance_k) * np.abs(vh),
                      np.where(model.from_junction, ke, 0.0))
    drop_b = np.where(~fwd & model.to_free, (alpha + model.entrance_k) * np.abs(vh),
                      np.where(model.to_junction, ke, 0.0))
    h_a = h_nodes_from - drop_a
    h_b = h_nodes_to - drop_b
    if model.valve_lines.size:
        x_open = np.where(lines.has_valve, 1.0, np.nan)
        h_open, _ = lines.head_loss(q, x_open)
        k_ent, k_exit, _ = lines.end_k(q)
        h_pipe = h_open - (lines.valve_k_open + k_ent + k_exit) * vh
        drive = h_pipe + lines.inertance_head * qdot
        h_b = np.where(model.valve_at_to, h_a - drive, h_b)
        h_a = np.where(model.valve_at_from, h_b + drive, h_a)
    return h_a, h_b
