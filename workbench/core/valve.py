"""Throttling valves: inherent characteristics, loss coefficient at an opening, schedules.

A valve's loss coefficient, referred to the line velocity head, is ``K = K_open / c(x)^2``
where ``x`` is the relative travel (0 shut, 1 fully open) and ``c(x)`` the relative flow
coefficient of its inherent characteristic (IEC 60534-2-4 names: linear, equal percentage,
quick opening). ``c(0) = 0`` for every characteristic, so a shut valve passes no flow;
:func:`valve_k` then returns ``inf`` without a division by zero and the solvers impose
zero flow on that line.
"""

from __future__ import annotations

from collections.abc import Callable

import numpy as np

from workbench.core.model import Valve


def _linear(x: np.ndarray, rangeability) -> np.ndarray:
    return x


def _quick_opening(x: np.ndarray, rangeability) -> np.ndarray:
    # c = sqrt(x): the usual idealisation of a quick-opening plug (common practice, no source).
    return np.sqrt(x)


def _equal_percentage(x: np.ndarray, rangeability) -> np.ndarray:
    r = np.asarray(rangeability, dtype=float)
    steep = r > np.e  # below e there is no tangent point inside the travel: use linear
    ln_r = np.log(np.where(steep, r, np.e**2))
    x_t = 1.0 / ln_r  # where the line through the origin touches R^(x-1)
    r_safe = np.where(steep, r, np.e**2)
    c_t = r_safe ** (x_t - 1.0)
    c = np.where(x >= x_t, r_safe ** (x - 1.0), x * (c_t / x_t))
    return np.where(steep, c, x)


def _equal_percentage_iec(x: np.ndarray, rangeability) -> np.ndarray:
    # IEC 60534-2-4's inherent curve all the way down; a shut valve (x = 0) seats.
    r = np.asarray(rangeability, dtype=float)
    return np.where(x > 0.0, r ** (x - 1.0), 0.0)


#: How an equal-percentage valve is taken below ``x = 1/ln R`` (``Valve.low_opening``).
LOW_OPENING = {"tangent": _equal_percentage, "iec": _equal_percentage_iec}

#: Characteristic name -> ``c(x, rangeability)``.
CHARACTERISTICS: dict[str, Callable[[np.ndarray, float], np.ndarray]] = {
    "linear": _linear,
    "equal_percentage": _equal_percentage,
    "quick_opening": _quick_opening,
}


def relative_flow_coefficient(characteristic: str, x, rangeability: float = 50.0,
                              low_opening: str = "tangent"):
    r"""Relative flow coefficient ``c(x)`` of an inherent valve characteristic, 0..1.

    * ``linear``: :math:`c = x`;
    * ``equal_percentage``: :math:`c = R^{x-1}` (IEC 60534-2-4) for
      :math:`x \ge 1/\ln R`, and below that the tangent line through the origin,
      :math:`c = x\,e\ln R/R`, so that ``c(0) = 0`` and ``c`` is smooth (our choice: a real
      equal-percentage valve is not tight at ``R^{-1}``; at ``x = 0.1`` and ``R = 50`` it
      gives 0.72 times IEC's ``c``, so 1.93 times its ``K``, and 2.3 times at ``R = 30``);
      ``low_opening="iec"`` keeps ``R^{x-1}`` for every ``x > 0`` (IEC 60534-2-4) and 0 at
      ``x = 0``;
    * ``quick_opening``: :math:`c = \sqrt{x}` (common practice, no source).

    Parameters
    ----------
    characteristic : str
        A key of :data:`CHARACTERISTICS`.
    x : array_like
        Relative travel [-], clipped to 0..1.
    rangeability : float
        Equal-percentage rangeability ``R`` [-].
    low_opening : {"tangent", "iec"}
        Equal percentage below ``x = 1/ln R`` (see above).

    Returns
    -------
    float or ndarray
        ``c`` [-], with ``c(0) = 0`` and ``c(1) = 1``.

    Examples
    --------
    >>> relative_flow_coefficient("equal_percentage", 0.5, 50.0)
    0.1414213562373095
    """
    try:
        fn = CHARACTERISTICS[characteristic]
        if characteristic == "equal_percentage":
            fn = LOW_OPENING[low_opening]
    except KeyError:
        raise KeyError(
            f"unknown valve characteristic {characteristic!r}; known: {', '.join(CHARACTERISTICS)}"
        ) from None
    xa = np.clip(np.asarray(x, dtype=float), 0.0, 1.0)
    c = fn(xa, rangeability)
    return float(c) if np.ndim(c) == 0 else c


def valve_k(k_open, c):
    """Loss coefficient at a relative flow coefficient: ``K = K_open / c^2`` [-].

    Parameters
    ----------
    k_open : array_like
        K fully open, referred to the line velocity head [-].
    c : array_like
        Relative flow coefficient [-]; ``c = 0`` (shut) gives ``inf``.

    Examples
    --------
    >>> valve_k(0.2, 0.5)
    0.8
    """
    k_open = np.asarray(k_open, dtype=float)
    c = np.asarray(c, dtype=float)
    shut = c <= 0.0
    k = np.where(shut, np.inf, k_open / np.where(shut, 1.0, c) ** 2)
    return float(k) if k.ndim == 0 else k


def opening_at(valve: Valve, t: float) -> float:
    """Relative travel of ``valve`` at time ``t`` [s]: :func:`openings_over` at one time."""
    return float(openings_over(valve, t))


def openings_over(valve: Valve, times) -> np.ndarray:
    """Relative travel of ``valve`` at each of ``times`` [s] (shaped like ``times``): its
    schedule, or its steady opening [-].

    The schedule is piecewise linear between its points and holds its first and last
    openings before and after them.
    """
    times = np.asarray(times, dtype=float)
    if valve.schedule is None or not valve.schedule.times:
        return np.full(times.shape, float(valve.opening))
    return np.interp(times, valve.schedule.times, valve.schedule.openings).astype(float)


def k_from_kv(kv_m3_h: float, diameter_m: float, density: float = 1000.0) -> float:
    r"""Loss coefficient of a valve from its flow coefficient Kv, at a pipe diameter.

    Kv is the flow [m^3/h] of water (specific gravity 1) at a 1 bar pressure drop, so
    :math:`\Delta p = (\rho/1000)(Q/K_v)^2` bar and with :math:`K = 2\Delta p A^2/(\rho Q^2)`:
    :math:`K = 2\cdot 10^5\cdot 3600^2 A^2 / (1000\,K_v^2)`, i.e. ``d^4/(625.4 Kv^2)`` with
    ``d`` in mm. The density cancels; it is accepted for symmetry with other calls.

    Parameters
    ----------
    kv_m3_h : float
        Flow coefficient [m^3/h]. (Cv in US gpm is 1.156 Kv.)
    diameter_m : float
        Inside diameter of the pipe the valve sits in [m].
    density : float
        Liquid density [kg/m^3] (does not change K).

    Examples
    --------
    >>> round(k_from_kv(500.0, 0.100), 4)
    0.6396
    """
    del density  # K from Kv does not depend on the density (it cancels)
    if kv_m3_h <= 0.0:
        raise ValueError("Kv must be positive [m^3/h]")
    area = np.pi * diameter_m**2 / 4.0
    return float(2.0e5 * area**2 * 3600.0**2 / (1000.0 * kv_m3_h**2))


def equal_percentage_note(low_opening: str = "tangent", rangeability: float = 50.0) -> str:
    """Words for how an equal-percentage valve is taken below ``x = 1/ln R``, with the
    ratio of its ``K`` to IEC 60534-2-4's at ``x = 0.1`` (computed, not quoted)."""
    if low_opening == "iec":
        return ("equal percentage c = R^(x-1) down to any opening above zero (IEC 60534-2-4); "
                "the valve seats only at x = 0")
    x_t = 1.0 / np.log(rangeability)
    ratio = (relative_flow_coefficient("equal_percentage", 0.1, rangeability, "iec")
             / relative_flow_coefficient("equal_percentage", 0.1, rangeability)) ** 2
    return (f"equal percentage c = R^(x-1) above x = 1/ln R ({x_t:.3g} for R = "
            f"{rangeability:g}); below it the tangent through the origin, so the valve closes "
            f"smoothly to zero: at x = 0.1 its K is {ratio:.2g} times IEC's "
            "(valve.low_opening = \"iec\" keeps the pure curve)")
