r"""The configuration matrices of a large system, kept sparse.

A system of many lines (thousands of parallel lines between two tanks, a long chain of
headers) gives matrices that do not fit dense: the projection ``S`` and the Jacobian are
``n x n`` for ``n`` lines (10,000 lines: 800 MB each, and Radau factorises a complex copy).
:class:`SparseConfiguration` builds the same quantities as
:class:`~workbench.core.transient.model.Configuration` with ``scipy.sparse``:

* the junction system ``L = M diag(a) M^T`` is factorised once per configuration with
  SuperLU (``scipy.sparse.linalg.splu``) instead of a pseudo-inverse. ``L`` is singular
  only on a group of junctions that no open line joins to a fixed node (a group cut off by
  shut valves); there the head is defined up to a constant, the right-hand side sums to zero
  over the group, and one junction of the group is pinned (its diagonal entry doubled):
  summing the group's rows shows the pinned head is then zero and the others satisfy the
  original equations, so the flows are those of the pseudo-inverse;
* ``S = diag(a) - A^T L^{-1} A`` with ``A = M diag(a)`` is block diagonal over the groups
  of lines joined through junctions: it is formed from ``L^{-1} A`` in column chunks, with
  exact zeros outside each group, and stored CSR. A line between two fixed nodes keeps
  ``S_ii = a_i`` alone. A group of ``k`` lines meeting at junctions gives a ``k x k``
  dense block (the heads of a junction depend on every line into it): the total is
  bounded by :data:`MAX_COUPLED_ENTRIES`, past which the run is refused with the reason.

The dense path stays for small systems (under :data:`SPARSE_LINES` lines), where numpy's
dense products are faster than sparse ones: 0.043 s against 0.061 s of CPU at 90 parallel
lines, 0.30 s against 0.055 s at 110 (``bench_transient_large.py --threshold``).
"""

from __future__ import annotations

import numpy as np

#: Lines from which a system's matrices are kept sparse.
SPARSE_LINES = 100

#: Most entries of the coupling blocks of ``S`` (lines meeting at the same junctions):
#: 20 million entries take about 240 MB in CSR, and a Jacobian as large again.
MAX_COUPLED_ENTRIES = 20_000_000

#: Columns of ``L^{-1} A`` solved at once (bounds the dense work array).
_CHUNK = 256


class LargeSystemError(ValueError):
    """The lines meeting at junctions are too many for the rigid-column model's matrices."""


class SparseConfiguration:
    """Matrices for one configuration of open lines and spilling tanks, sparse (see the
    module docstring); the same attributes and methods as the dense ``Configuration``."""

    def __init__(self, model, open_lines: np.ndarray, spilling: np.ndarray):
        from scipy import sparse

        self.open = open_lines.copy()
        self.open_f = open_lines.astype(float)
        self.spilling = spilling.copy()
        alpha = np.where(open_lines, model.alpha, 0.0)
        self._alpha = alpha
        self._m = model.m_sparse
        self._lu = None
        self._a = None
        s = sparse.diags(alpha, format="csr")
        if model.m_sparse.shape[0]:
            self._factorise(model, alpha)
            s = s - self._coupling(model, alpha)
        self.s = sparse.csr_matrix(s)
        self.s_tank = sparse.csr_matrix(self.s @ model.ft_tank_sparse)  # lines x tanks
        t_rows = model.t_rows.copy()
        t_rows[spilling, :] = 0.0
        self.t_rows = t_rows
        self.t_rows_sparse = sparse.csr_matrix(t_rows)
        self.ext_on = (~spilling).astype(float)

    def _factorise(self, model, alpha: np.ndarray) -> None:
        """Factorise ``L`` with one junction pinned in every group no open line joins to a
        fixed node (module docstring)."""
        from scipy import sparse
        from scipy.sparse.csgraph import connected_components
        from scipy.sparse.linalg import splu

        m = self._m
        self._a = sparse.csr_matrix(m @ sparse.diags(alpha))
        self._a.eliminate_zeros()
        lap = sparse.csc_matrix(self._a @ m.T)
        n_groups, group = connected_components(lap, directed=False)
        grounded_j = (abs(m) @ (alpha * model.touches_fixed)) > 0.0
        grounded = np.zeros(n_groups, bool)
        np.logical_or.at(grounded, group, grounded_j)
        _, first = np.unique(group, return_index=True)
        pin = first[~grounded]
        if pin.size:
            diag = lap.diagonal()[pin]
            bump = np.zeros(lap.shape[0])
            bump[pin] = np.where(diag > 0.0, diag, 1.0)
            lap = sparse.csc_matrix(lap + sparse.diags(bump))
        self._group = group
        self._lu = splu(lap)

    def _coupling(self, model, alpha: np.ndarray):
        """``A^T L^{-1} A`` (lines x lines, sparse), or :class:`LargeSystemError` when its
        blocks would hold more than :data:`MAX_COUPLED_ENTRIES` entries."""
        from scipy import sparse

        a = self._a
        a_csc = a.tocsc()
        cols = np.flatnonzero(np.diff(a_csc.indptr) > 0)  # open lines at a junction
        if not cols.size:
            return sparse.csr_matrix((model.nl, model.nl))
        # every such line's group: that of its first junction (both ends share one)
        first_j = a_csc.indices[a_csc.indptr[cols]]
        sizes = np.bincount(self._group[first_j])
        entries = int(np.sum(sizes.astype(np.int64) ** 2))
        if entries > MAX_COUPLED_ENTRIES:
            big = int(sizes.max())
            raise LargeSystemError(
                f"{big:,} lines meet at one junction or one group of junctions joined by "
                f"lines: the transient model couples every pair of them ({entries:,} "
                f"coefficients, more than its limit of {MAX_COUPLED_ENTRIES:,}); split the "
                "header into fewer, larger lines, or simulate a part of the plant")
        rows = cols  # A^T L^{-1} A is nonzero only between lines at junctions
        at_rows = sparse.csr_matrix(a_csc[:, rows].T)
        blocks = []
        for c0 in range(0, cols.size, _CHUNK):
            chunk = cols[c0:c0 + _CHUNK]
            x = self._lu.solve(a[:, chunk].toarray())
            blocks.append(sparse.csr_matrix(at_rows @ x))
        coupled = sparse.hstack(blocks, format="coo")
        return sparse.csr_matrix((coupled.data, (rows[coupled.row], cols[coupled.col])),
                                 shape=(model.nl, model.nl))

    def junction_heads(self, g: np.ndarray) -> np.ndarray:
        """Junction heads [m] for ``g = F^T H_F + h`` on the open lines: ``-L^{-1} A g``
        (``g`` lines, or lines x times solved with the same factors: junctions x times)."""
        if self._lu is None:
            return np.zeros((self._m.shape[0],) + g.shape[1:])
        return -self._lu.solve(self._a @ g)

    def project(self, q: np.ndarray) -> np.ndarray:
        """Flows made to satisfy continuity at every junction after lines were stopped
        (see ``Configuration.project``), with the sparse factors."""
        if self._lu is None:
            return q
        imbalance = self._m @ q
        if not np.any(np.abs(imbalance) > 0.0):
            return q
        return q - self._alpha * (self._m.T @ self._lu.solve(imbalance))


def sparse_jacobian(eq, y: np.ndarray, dh: np.ndarray, inv_a: np.ndarray):
    """The Jacobian of :meth:`~workbench.core.transient.equations.Equations.jac` as a sparse
    CSC matrix: ``-S diag(dh/dQ)``, ``-S F_T^T diag(dH/dV)`` (and ``dH/dX`` for gas spaces),
    the tanks' rows ``T`` and the gas spaces' rows ``rho_atm T`` plus their own slopes.

    ``dh`` are the open lines' loss slopes [s/m^2], ``inv_a`` the tanks' ``1/A(h)`` [1/m^2].
    """
    from scipy import sparse

    model, cfg = eq.model, eq.cfg
    nt, ng = model.nt, model.ng
    jqq = cfg.s.copy()
    jqq.data *= -dh[jqq.indices]
    if not nt:
        return sparse.csc_matrix(jqq)
    j = _tank_blocks(eq, y, jqq, inv_a)
    # the volume accumulators (see workbench.core.transient.equations)
    t0 = sparse.csr_matrix(model.t_rows)
    w_rows = sparse.vstack([t0, sparse.diags(cfg.spilling.astype(float)) @ t0])
    w_rows = sparse.hstack([w_rows, sparse.csr_matrix((2 * nt, nt + ng))])
    return sparse.bmat([[j, None], [w_rows, sparse.csr_matrix((2 * nt, 2 * nt))]],
                       format="csc")


def _tank_blocks(eq, y, jqq, inv_a):
    """The Jacobian over ``[Q, V, X]`` (sparse) from its line block ``jqq``."""
    from scipy import sparse

    from workbench.core.model import G

    model, cfg = eq.model, eq.cfg
    nl, nt, ng = model.nl, model.nt, model.ng
    dh_dv = inv_a.copy()
    if not ng:
        jqv = cfg.s_tank @ sparse.diags(-dh_dv)
        return sparse.bmat([[jqq, jqv], [cfg.t_rows_sparse, None]], format="csr")
    gas = model.gas
    dp_dv, dp_dx, dm_dp = gas.derivatives(y[nl:nl + nt], y[nl + nt:nl + nt + ng])
    rg = model.rho * G
    dh_dv[gas.tank] += dp_dv / rg
    jqv = cfg.s_tank @ sparse.diags(-dh_dv)
    jqx = cfg.s_tank[:, gas.tank] @ sparse.diags(-(dp_dx / rg))
    jxq = gas.rho_atm * cfg.t_rows_sparse[gas.tank]
    jxv = sparse.csr_matrix((dm_dp * dp_dv, (np.arange(ng), gas.tank)), shape=(ng, nt))
    jxx = sparse.diags(dm_dp * dp_dx)
    return sparse.bmat([[jqq, jqv, jqx], [cfg.t_rows_sparse, None, None], [jxq, jxv, jxx]],
                       format="csr")
