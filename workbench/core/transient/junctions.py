r"""Junction pressures in time: the series a pressure gauge at a junction would have read.

Junction heads are algebraic in the rigid-column model (the package docstring): at each
output time the run keeps them under the configuration of that moment
(:class:`JunctionHeads`): the output times of one step, which share its configuration, at
once from :meth:`Equations.heads_many` (``H_J = -w G`` with ``w = (M diag(a) M^T)^+ M
diag(a)`` fixed by the configuration: one product, or one factorised solve for a large
system, over a matrix of right-hand sides ``G``, lines x times), a single time from
:meth:`Equations.heads`; and :func:`junction_pressures` turns them into gauge
pressures as the steady solution reports them
(:func:`workbench.core.network.node_static_heads`): the junction's head is an energy head
shared by the lines meeting there, and the pressure a gauge reads is the lowest static
pressure among them,

.. math::

    p_J = \rho g \left(H_J - \max_k \alpha_k \frac{v_k^2}{2g} - z_J\right)

over the open lines ``k`` meeting the junction (``alpha`` the kinetic-energy coefficient,
2 laminar, 1 turbulent). A junction no open line joins to a fixed head has no pressure:
``nan``.
"""

from __future__ import annotations

import numpy as np

from workbench.core.fittings import exit_k
from workbench.core.model import G
from workbench.core.transient.model import TransientModel

__all__ = ["JunctionHeads", "junction_pressures"]


class JunctionHeads:
    """Junction heads kept at the output times of one run [m] (``nan`` where unreached).

    Kept only when asked (``simulate(..., junction_pressures=True)``): each output time
    costs the losses of one state; the times of one step are evaluated together.
    """

    def __init__(self, model: TransientModel):
        self.model = model
        self.nj = model.topo.n_junctions
        self.heads_of = None
        """``Equations.heads`` of the run when asked for; nothing is kept without it."""
        self.heads_many_of = None
        """``Equations.heads_many`` of the run: the heads at several times at once."""
        self.rows: list[np.ndarray] = []
        self._reached: dict[bytes, np.ndarray] = {}

    def _reached_by(self, open_lines: np.ndarray) -> np.ndarray:
        """Junctions an open line joins to a fixed head, per configuration (cached)."""
        key = np.asarray(open_lines, bool).tobytes()
        reached = self._reached.get(key)
        if reached is None:
            reached = self.model.topo._reached(open_lines)
            self._reached[key] = reached
        return reached

    def keep(self, t: float, y: np.ndarray, open_lines: np.ndarray) -> None:
        """Keep the junction heads at time ``t`` and state ``y`` (lines ``open_lines``)."""
        if not self.nj or self.heads_of is None:
            return
        h = np.asarray(self.heads_of(t, y), dtype=float)[: self.nj]
        self.rows.append(np.where(self._reached_by(open_lines), h, np.nan))

    def keep_many(self, ts: np.ndarray, ys: np.ndarray, open_lines: np.ndarray) -> None:
        """Keep the junction heads at times ``ts`` and states ``ys`` (state x times), all
        in the configuration of open lines ``open_lines``."""
        if not self.nj or self.heads_of is None or not len(ts):
            return
        if self.heads_many_of is None:
            for k, t in enumerate(ts):
                self.keep(float(t), ys[:, k], open_lines)
            return
        h = np.asarray(self.heads_many_of(ts, ys), dtype=float)[: self.nj]
        self.rows.extend(np.where(self._reached_by(open_lines)[:, None], h, np.nan).T)



def junction_pressures(model: TransientModel, kept: JunctionHeads, flows: np.ndarray) -> dict:
    """``junction_ids`` and ``junction_pressures`` (junctions x times [Pa], the module
    docstring's formula) for the result; none when they were not kept.

    Parameters
    ----------
    model : TransientModel
    kept : JunctionHeads
        The junction heads of the run.
    flows : ndarray
        Line flows, lines x times [m^3/s] (zero on shut lines).
    """
    n_times = flows.shape[1] if flows.ndim == 2 else 0
    if not kept.nj or kept.heads_of is None or len(kept.rows) != n_times:
        return {"junction_ids": (), "junction_pressures": np.zeros((0, n_times))}
    heads = np.array(kept.rows).T
    nj = kept.nj
    lines = model.lines
    v = flows / lines.area[:, None]
    alpha, _ = exit_k(np.abs(v) * (lines.diameter / lines.kinematic_viscosity)[:, None])
    ke = np.where(flows != 0.0, alpha * v * v / (2.0 * G), 0.0)
    largest = np.zeros_like(heads)
    topo = model.topo
    for i in range(model.nl):
        for node in (topo.line_from[i], topo.line_to[i]):
            if node < nj:
                largest[node] = np.maximum(largest[node], ke[i])
    z = np.array([model.system.junctions[j].elevation for j in topo.junction_ids])
    return {"junction_ids": topo.junction_ids,
            "junction_pressures": model.rho * G * (heads - largest - z[:, None])}
