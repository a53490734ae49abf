"""Each tank's state at the end of a run: its rate of change of volume and a word for it
(``steady``, ``rising``, ``falling``, ``spilling``, ``drained`` or ``still``)."""

from __future__ import annotations

import numpy as np

from workbench.core.transient.model import TransientModel
from workbench.core.transient.state import RunState

#: A tank whose net inflow is below this fraction of the flow through it counts as steady
#: at the end of a run (common practice, no source).
STEADY_FRACTION = 1e-3


def end_states(model: TransientModel, state: RunState, ys, feeds, draws):
    """Per tank, the rate of change of volume at the end of the run [m^3/s] and a word for
    its state (see :attr:`TransientResult.end_states`)."""
    rates: dict[str, float] = {}
    states: dict[str, str] = {}
    if not model.nt or not ys.shape[1]:
        return rates, states
    # Outlets held shut (a drained tank's, a stopped discharge) carry no flow at the end,
    # even where the last recorded point is the moment they stopped: the end rate is the
    # rate the tank goes on with, so it agrees with the end state.
    q = np.where(state.blocked | state.backstopped, 0.0, ys[: model.nl, -1])
    for k, tid in enumerate(model.tank_ids):
        row = model.t_rows[k]
        line_net = float(row @ q)
        through = float(np.abs(row) @ np.abs(q)) + feeds[k, -1] + draws[k, -1]
        net = line_net + feeds[k, -1] - draws[k, -1]
        if state.spilling[k]:
            rates[tid], states[tid] = 0.0, "spilling"
            continue
        rates[tid] = net
        if through <= 1e-12:
            states[tid] = "drained" if state.drained[k] else "still"
        elif abs(net) <= STEADY_FRACTION * through:
            states[tid] = "steady"
        elif state.drained[k] and net <= 0.0:
            states[tid] = "drained"
        else:
            states[tid] = "rising" if net > 0.0 else "falling"
    return rates, states
