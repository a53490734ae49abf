r"""Linearised statistics of a nonlinear least-squares fit: intervals and correlation.

Used by :mod:`workbench.core.calibration`. The confidence intervals follow the linearised
theory of nonlinear regression (Bates & Watts, *Nonlinear Regression Analysis and Its
Applications*, Wiley 1988, ch. 2); scipy's ``least_squares`` returns the Jacobian but no
covariance, and ``curve_fit``'s covariance assumes the unbounded problem and one output
array, so the few lines are written here.
"""

from __future__ import annotations

import numpy as np

__all__ = ["cut_interval", "linearised_statistics"]


def linearised_statistics(jac_u: np.ndarray, r: np.ndarray, scale: np.ndarray, k: int):
    r"""Standard errors, 95 % half-widths and correlation [SI] from the Jacobian.

    Parameters
    ----------
    jac_u : ndarray
        Residuals x parameters: the Jacobian on the scaled parameters ``u``.
    r : ndarray
        The residuals at the fitted values [-].
    scale : ndarray
        ``dx/du`` per parameter [SI].
    k : int
        Number of parameters.

    Returns
    -------
    std, half, corr, dof, singular
        Standard errors and 95 % half-widths [SI], the correlation matrix (clipped to
        [-1, 1]; 1 off the diagonal where ``J^T J`` is singular), the degrees of freedom
        ``n - k`` and whether ``J^T J`` is singular.

    Notes
    -----
    :math:`C = (J^T J)^{-1} s^2`, :math:`s^2 = \sum r_i^2/(n - k)`, half-width
    :math:`t_{0.975,\,n-k}\sqrt{C_{jj}}` (Bates & Watts, *Nonlinear Regression Analysis
    and Its Applications*, Wiley 1988, ch. 2).
    """
    from scipy import stats

    n = r.size
    dof = n - k
    jac = jac_u / scale  # d r / d x
    nan = np.full(k, np.nan)
    if dof <= 0:
        return nan, nan, np.full((k, k), np.nan), dof, False
    s2 = float(r @ r) / dof
    jtj = jac.T @ jac
    singular = np.linalg.matrix_rank(jtj, tol=1e-12 * max(np.max(np.abs(jtj)), 1e-300)) < k
    cov = np.linalg.pinv(jtj) * s2
    std = np.sqrt(np.clip(np.diag(cov), 0.0, None))
    half = float(stats.t.ppf(0.975, dof)) * std
    with np.errstate(invalid="ignore", divide="ignore"):
        corr = np.clip(cov / np.outer(std, std), -1.0, 1.0)  # round-off gave 1 + 2e-16
    if singular:
        corr = np.where(np.eye(k, dtype=bool), 1.0, np.where(np.isfinite(corr), corr, 1.0))
    return std, half, corr, dof, singular


def cut_interval(ci: np.ndarray, lower: np.ndarray, upper: np.ndarray
                 ) -> tuple[np.ndarray, np.ndarray]:
    r"""A linearised interval cut to the range searched: ``(cut interval, was cut)``.

    The linearised interval :math:`x \pm t s` is symmetric and knows nothing of limits: for
    a roughness near zero it reaches below zero, where no roughness can be. The fit only
    looked inside ``[lower, upper]`` (``lower`` >= 0), so the interval is cut there and the
    cut is reported (``nan`` ends stay ``nan``).

    Examples
    --------
    >>> ci, cut = cut_interval(np.array([[-1e-4, 5e-4]]), np.array([0.0]), np.array([3e-3]))
    >>> ci.tolist(), cut.tolist()
    ([[0.0, 0.0005]], [[True, False]])
    """
    with np.errstate(invalid="ignore"):
        cut = np.column_stack([ci[:, 0] < lower, ci[:, 1] > upper])
    out = np.column_stack([np.where(cut[:, 0], lower, ci[:, 0]),
                           np.where(cut[:, 1], upper, ci[:, 1])])
    return out, cut
