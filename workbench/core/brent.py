"""A root of a scalar function in a bracket by Brent's method, without importing scipy.optimize.

``scipy.optimize.brentq`` is the method the core wants, but importing ``scipy.optimize`` costs
about 0.25 s of CPU (it loads scipy.linalg, scipy.sparse.linalg and every optimiser), several
times what the steady vent balance or the siphon-break search that need one root spend
solving: measurably too slow for ``workbench solve``'s start-up. :func:`brentq` here takes
the same arguments and makes the same floating-point operations in the same order as scipy's
implementation (Brent 1973, in the variant of scipy's ``brentq.c``: inverse quadratic
extrapolation or secant, else bisection), so it returns the same float;
``tests/core/test_brent.py`` checks that bit for bit against scipy on many functions.
"""

from __future__ import annotations

import math
from collections.abc import Callable

__all__ = ["brentq"]

#: scipy's smallest allowed relative tolerance, 4 machine epsilons [-].
RTOL_MIN = 4.0 * 2.220446049250313e-16


def _value(f: Callable[..., float], x: float, args: tuple) -> float:
    fx = float(f(x, *args))
    if math.isnan(fx):
        raise ValueError("The function value at x=%f is NaN; solver cannot continue." % x)
    return fx


def brentq(f: Callable[..., float], a: float, b: float, args: tuple = (), xtol: float = 2e-12,
           rtol: float = RTOL_MIN, maxiter: int = 100) -> float:
    """A root of ``f`` between ``a`` and ``b``, where ``f(a)`` and ``f(b)`` differ in sign.

    Brent's method: each step takes the inverse quadratic extrapolation through the last
    three points (the secant through two when the bracket has just moved), unless that
    step leaves the bracket or shrinks it too slowly, in which case it bisects. It stops
    when half the bracket is below ``delta = (xtol + rtol |x|) / 2``, so the root is
    found to within ``2 delta``.

    Parameters
    ----------
    f : callable
        ``f(x, *args) -> float``.
    a, b : float
        The bracket's ends [units of x].
    args : tuple, optional
        Extra arguments of ``f``.
    xtol : float, optional
        Absolute tolerance [units of x], positive.
    rtol : float, optional
        Relative tolerance [-], at least four machine epsilons.
    maxiter : int, optional
        Most iterations.

    Returns
    -------
    float
        The root, as ``scipy.optimize.brentq`` returns it.

    Raises
    ------
    ValueError
        When ``f(a)`` and ``f(b)`` have the same sign, ``f`` returns nan, or a tolerance is
        out of range.
    RuntimeError
        When the bracket is not narrow enough after ``maxiter`` iterations.

    Examples
    --------
    >>> round(brentq(lambda x: x * x - 2.0, 0.0, 2.0), 12)
    1.414213562373

    References
    ----------
    Brent, R. P. (1973), Algorithms for Minimization without Derivatives, Prentice-Hall,
    ch. 4; scipy.optimize.brentq (the variant reproduced here).
    """
    if xtol <= 0:
        raise ValueError(f"xtol too small ({xtol:g} <= 0)")
    if rtol < RTOL_MIN:
        raise ValueError(f"rtol too small ({rtol:g} < {RTOL_MIN:g})")
    x_prev, x_now = float(a), float(b)
    f_prev, f_now = _value(f, x_prev, args), _value(f, x_now, args)
    if f_prev == 0:
        return x_prev
    if f_now == 0:
        return x_now
    if math.copysign(1.0, f_prev) == math.copysign(1.0, f_now):
        raise ValueError("f(a) and f(b) must have different signs")
    # x_far: the other end of the bracket; step_prev, step: the last two steps taken.
    x_far = f_far = step_prev = step = 0.0
    for _ in range(maxiter):
        if f_prev != 0 and f_now != 0 and (f_prev < 0) != (f_now < 0):
            x_far, f_far = x_prev, f_prev
            step_prev = step = x_now - x_prev
        if abs(f_far) < abs(f_now):  # keep the best point in x_now
            x_prev, x_now, x_far = x_now, x_far, x_now
            f_prev, f_now, f_far = f_now, f_far, f_now
        delta = (xtol + rtol * abs(x_now)) / 2
        half = (x_far - x_now) / 2
        if f_now == 0 or abs(half) < delta:
            return x_now
        if abs(step_prev) > delta and abs(f_now) < abs(f_prev):
            if x_prev == x_far:  # secant
                trial = -f_now * (x_now - x_prev) / (f_now - f_prev)
            else:  # inverse quadratic extrapolation
                slope_prev = (f_prev - f_now) / (x_prev - x_now)
                slope_far = (f_far - f_now) / (x_far - x_now)
                trial = -f_now * (f_far * slope_far - f_prev * slope_prev) / (
                    slope_far * slope_prev * (f_far - f_prev))
            if 2 * abs(trial) < min(abs(step_prev), 3 * abs(half) - delta):
                step_prev, step = step, trial
            else:
                step_prev = step = half
        else:
            step_prev = step = half
        x_prev, f_prev = x_now, f_now
        x_now += step if abs(step) > delta else (delta if half > 0 else -delta)
        f_now = _value(f, x_now, args)
    raise RuntimeError(f"Failed to converge after {maxiter} iterations, value is {x_now!r}.")
