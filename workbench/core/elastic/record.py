"""What the time march records: envelope, series, vapour cavities and the first separation.

One :class:`MarchOutput` is filled in place by either kernel; its arrays are plain numpy so
that the compiled kernel writes into them directly.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from workbench.core.elastic.plan import MarchPlan


@dataclass(eq=False)
class MarchOutput:
    """Running record of one march (mutable: the kernels fill it)."""

    h_max: np.ndarray
    """Highest head per node [m]."""
    h_min: np.ndarray
    """Lowest head per node [m]."""
    series: np.ndarray
    """``(steps + 1, recorded nodes)`` heads [m]."""
    vol: np.ndarray
    """Cavity volume per node now [m^3]."""
    events: np.ndarray
    """Cavities opened per node [-]."""
    first_open: np.ndarray
    """Step a cavity first opened per node; -1: never."""
    last_close: np.ndarray
    """Step a cavity last collapsed per node; -1: never."""
    v_max: np.ndarray
    """Largest cavity volume per node [m^3]."""
    v_max_step: np.ndarray
    cavity_volume: np.ndarray
    """Total cavity volume every step [m^3]."""
    sep: np.ndarray
    """``[step, node]`` of the first vapour contact (a cavity opening); -1: none."""
    h_max_pre: np.ndarray
    """Highest head per node before the first cavity formed [m] (valid when ``sep`` is)."""
    sep_head: np.ndarray
    """The head at ``sep`` [m] (one value)."""

    @classmethod
    def start(cls, plan: MarchPlan) -> MarchOutput:
        n, steps = plan.n, plan.n_steps
        h0 = 0.5 * (plan.state0[:n] + plan.state0[n:][::-1])
        series = np.empty((steps + 1, len(plan.series_nodes)))
        series[0] = h0[plan.series_nodes]
        out = cls(h_max=h0.copy(), h_min=h0.copy(), series=series, vol=np.zeros(n),
                  events=np.zeros(n, dtype=np.int64), first_open=np.full(n, -1, np.int64),
                  last_close=np.full(n, -1, np.int64), v_max=np.zeros(n),
                  v_max_step=np.full(n, -1, np.int64), cavity_volume=np.zeros(steps + 1),
                  sep=np.array([-1, -1], dtype=np.int64), h_max_pre=h0.copy(),
                  sep_head=np.zeros(1))
        if plan.h_vap is not None and np.any(h0 <= plan.h_vap):
            out.sep[:] = (0, int(np.argmin(h0 - plan.h_vap)))
            out.sep_head[0] = h0[out.sep[1]]
        return out

    def reset(self, plan: MarchPlan) -> None:
        """Back to the start (after a kernel gave up part-way)."""
        fresh = MarchOutput.start(plan)
        for name in self.__dataclass_fields__:
            getattr(self, name)[...] = getattr(fresh, name)

    def _opened(self, node: int, k: int) -> None:
        if self.sep[0] < 0 or (self.sep[0] == k and node < self.sep[1]):
            self.sep[0] = k
            self.sep[1] = node

    def track_one(self, node: int, v_new: float, k: int) -> int:
        """Record a cavity volume at one node; +1 opened, -1 collapsed, 0 otherwise."""
        old = self.vol[node]
        self.vol[node] = v_new
        change = 0
        if old == 0.0 and v_new > 0.0:
            self.events[node] += 1
            if self.first_open[node] < 0:
                self.first_open[node] = k
            self._opened(node, k)
            change = 1
        elif old > 0.0 and v_new == 0.0:
            self.last_close[node] = k
            change = -1
        if v_new > self.v_max[node]:
            self.v_max[node] = v_new
            self.v_max_step[node] = k
        return change

    def track_many(self, idx: np.ndarray, v_new: np.ndarray, k: int) -> int:
        """:meth:`track_one` for many nodes at once; returns the change in open cavities."""
        old = self.vol[idx]
        self.vol[idx] = v_new
        opened = (old == 0.0) & (v_new > 0.0)
        closed = (old > 0.0) & (v_new == 0.0)
        if opened.any():
            o = idx[opened]
            self.events[o] += 1
            self.first_open[o] = np.where(self.first_open[o] < 0, k, self.first_open[o])
            self._opened(int(o.min()), k)
        if closed.any():
            self.last_close[idx[closed]] = k
        up = v_new > self.v_max[idx]
        if up.any():
            self.v_max[idx[up]] = v_new[up]
            self.v_max_step[idx[up]] = k
        return int(opened.sum()) - int(closed.sum())

    def take_block(self, hb: np.ndarray, k_step: int, plan: MarchPlan) -> None:
        """Envelope, series and first vapour contact from the heads of steps
        ``k_step + 1 ..`` (rows of ``hb``)."""
        m = len(hb)
        if self.sep[0] > k_step and plan.cavities:
            row = int(self.sep[0]) - k_step - 1  # the first cavity's step, in this block
            if row > 0:
                np.maximum(self.h_max, hb[:row].max(axis=0), out=self.h_max_pre)
            else:
                self.h_max_pre[:] = self.h_max
        np.maximum(self.h_max, hb.max(axis=0), out=self.h_max)
        np.minimum(self.h_min, hb.min(axis=0), out=self.h_min)
        self.series[k_step + 1:k_step + 1 + m] = hb[:, plan.series_nodes]
        if self.sep[0] < 0 and plan.h_vap is not None and not plan.cavities:
            below = hb <= plan.h_vap
            if below.any():
                row = int(np.argmax(below.any(axis=1)))
                self.sep[:] = (k_step + 1 + row, int(np.argmin(hb[row] - plan.h_vap)))
                self.sep_head[0] = hb[row, self.sep[1]]

