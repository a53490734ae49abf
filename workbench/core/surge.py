"""Surge screening: pressure-wave speed, the Joukowsky rise, and when a rigid-column answer
can be trusted for a valve closure.

A rigid-column simulation (:mod:`workbench.core.transient`) treats the liquid in a line as
one incompressible slug. That is sound for slow valve moves and wrong for fast ones: the
pressure then travels as a wave at speed ``a`` and the rise is bounded by Joukowsky's
``rho*a*dv``. A comparison made while planning this module against an independent
method-of-characteristics solution (a 600 m line, ``2L/a`` about 0.92 s) showed the
rigid-column peak within 3 % of the elastic one only once the *effective* closure time is at
least about five wave round trips; at about two round trips the rigid column overstates the
peak by half and exceeds Joukowsky, and as the closure time tends to zero it grows without
limit. The screening rules here follow from that:

* ``surge.rapid_closure``: effective closure time below :data:`RAPID_CLOSURE_ROUND_TRIPS`
  round trips ``2L/a``: an elastic (water-hammer) analysis is needed;
* any reported peak is capped at static plus Joukowsky;
* ``surge.pressure``: the peak exceeds the line's pressure rating;
* ``surge.column_separation``: the minimum pressure reaches vapour pressure.

These are screening estimates; surge protection is a matter for licensed practice and
local codes.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Callable, Literal

import numpy as np

from workbench.core.finding_text import finding
from workbench.core.model import Finding, FluidProps, G, Line, Valve

Support = Literal["anchored_upstream", "anchored", "expansion_joints"]

#: Effective closure shorter than this many wave round trips 2L/a: rigid column not valid
#: (planning comparison described in the module docstring; common practice puts the line
#: between "rapid" and "slow" closure at one round trip, which is too lenient for a
#: rigid-column *peak*).
RAPID_CLOSURE_ROUND_TRIPS = 5.0

#: D/e at which texts hand over from the thick-wall to the thin-wall forms (Wylie & Streeter
#: 1993 use the thin-wall forms for D/e > 25; from memory). Not used by ``wall="auto"``: the
#: thick-wall form is used at every D/e, since it tends to the thin-wall one as e/D -> 0
#: and switching at 25 made the wave speed jump by 0.7 % (a thinner wall giving a faster
#: wave). Kept for callers that ask which side of the usual limit a pipe lies.
THICK_WALL_RATIO = 25.0


def _c1_thin(nu: float) -> dict[str, float]:
    return {
        "anchored_upstream": 1.0 - 0.5 * nu,
        "anchored": 1.0 - nu * nu,
        "expansion_joints": 1.0,
    }


def _c1_thick(nu: float, d: float, e: float) -> dict[str, float]:
    base = 2.0 * e / d * (1.0 + nu)
    ratio = d / (d + e)
    return {
        "anchored_upstream": base + ratio * (1.0 - 0.5 * nu),
        "anchored": base + ratio * (1.0 - nu * nu),
        "expansion_joints": base + ratio,
    }


_SUPPORT_WORDS = {
    "anchored_upstream": "anchored at its upstream end only",
    "anchored": "anchored throughout against axial movement",
    "expansion_joints": "with expansion joints throughout",
}

_C1_TEXT = {
    ("thin", "anchored_upstream"): "c1 = 1 - nu/2",
    ("thin", "anchored"): "c1 = 1 - nu^2",
    ("thin", "expansion_joints"): "c1 = 1",
    ("thick", "anchored_upstream"): "c1 = 2e/D*(1 + nu) + D*(1 - nu/2)/(D + e)",
    ("thick", "anchored"): "c1 = 2e/D*(1 + nu) + D*(1 - nu^2)/(D + e)",
    ("thick", "expansion_joints"): "c1 = 2e/D*(1 + nu) + D/(D + e)",
}


@dataclass(frozen=True)
class WaveSpeed:
    """A pressure-wave speed and how it was obtained."""

    speed: float
    """Wave speed a [m/s]."""
    c1: float
    """Support factor used [-] (0 for a rigid pipe)."""
    wall: Literal["thin", "thick", "rigid"]
    """Which form was used."""
    support: str
    """Support condition (a ``Line.support`` value)."""
    formula: str
    """The formula and factor in words, for display next to the number."""


def wave_speed(
    bulk_modulus: float,
    density: float,
    diameter: float,
    wall_thickness: float | None,
    elastic_modulus: float | None,
    poisson_ratio: float = 0.3,
    support: Support = "anchored",
    wall: Literal["auto", "thin", "thick"] = "auto",
) -> WaveSpeed:
    r"""Pressure-wave speed in a liquid-filled elastic pipe (Korteweg).

    .. math:: a = \sqrt{\frac{K/\rho}{1 + c_1 \dfrac{K D}{E e}}}

    ``wall="auto"`` (the default) uses the thick-wall form at every ``D/e``: it tends to the
    thin-wall form as ``e/D -> 0`` (the ``2e/D`` term vanishes and ``D/(D+e) -> 1``), so the
    wave speed is continuous in the wall thickness.

    Thin-walled pipe (``wall="thin"``, texts use it for ``D/e > 25``), support factor ``c1``:

    * anchored at the upstream end only: ``c1 = 1 - nu/2``
    * anchored throughout against axial movement: ``c1 = 1 - nu^2``
    * expansion joints throughout: ``c1 = 1``

    Thick-walled pipe: ``c1 = 2e/D*(1 + nu) + D*(c1_thin)/(D + e)`` with the
    same three thin-wall factors (``D/(D + e)`` alone for expansion joints).

    The labels and the thick-wall forms are as we recall them from Wylie & Streeter,
    *Fluid Transients in Systems* (1993), ch. 2 -- **from memory, not re-read**; secondary
    sources sometimes swap the support labels, so the formula and factor actually used are
    returned in :attr:`WaveSpeed.formula` for display. With no elastic modulus or wall
    thickness the pipe is taken as rigid, ``a = sqrt(K/rho)`` (an upper bound).

    Parameters
    ----------
    bulk_modulus : float
        Liquid bulk modulus K [Pa].
    density : float
        Liquid density rho [kg/m^3].
    diameter : float
        Inside diameter D [m].
    wall_thickness : float or None
        Wall thickness e [m].
    elastic_modulus : float or None
        Young's modulus of the wall E [Pa].
    poisson_ratio : float
        Poisson's ratio nu of the wall [-].
    support : str
        ``"anchored_upstream"``, ``"anchored"`` or ``"expansion_joints"``.
    wall : str
        ``"auto"`` (the thick-wall form, continuous in ``e``), ``"thin"`` or ``"thick"``.

    Returns
    -------
    WaveSpeed

    Examples
    --------
    Steel NPS 12 Sch 40 with water (HYDRAULICS notes, computed):

    >>> round(wave_speed(2.19e9, 998.2, 0.30318, 0.01031, 207e9, 0.30, "anchored", "thin").speed, 1)
    1307.6
    """
    for name, value in (("bulk_modulus", bulk_modulus), ("density", density),
                        ("diameter", diameter)):
        if not (value > 0.0 and math.isfinite(value)):
            raise ValueError(f"{name} must be positive, got {value!r}")
    if support not in _SUPPORT_WORDS:
        raise ValueError(
            f"support must be one of {', '.join(_SUPPORT_WORDS)}, got {support!r}"
        )
    k_rho = bulk_modulus / density
    if wall_thickness is None or elastic_modulus is None:
        return WaveSpeed(
            speed=math.sqrt(k_rho), c1=0.0, wall="rigid", support=support,
            formula="a = sqrt(K/rho) (rigid pipe: no wall thickness or elastic modulus given)",
        )
    if not (wall_thickness > 0.0 and elastic_modulus > 0.0):
        raise ValueError("wall_thickness and elastic_modulus must be positive")
    if not (0.0 <= poisson_ratio < 0.5):
        raise ValueError(f"poisson_ratio must be in [0, 0.5), got {poisson_ratio!r}")
    if wall == "auto":
        wall = "thick"
    if wall == "thin":
        c1 = _c1_thin(poisson_ratio)[support]
    elif wall == "thick":
        c1 = _c1_thick(poisson_ratio, diameter, wall_thickness)[support]
    else:
        raise ValueError(f"wall must be 'auto', 'thin' or 'thick', got {wall!r}")
    speed = math.sqrt(k_rho / (1.0 + c1 * bulk_modulus * diameter / (elastic_modulus * wall_thickness)))
    formula = (
        f"a = sqrt((K/rho)/(1 + c1*K*D/(E*e))) (Korteweg), {wall}-walled pipe "
        f"{_SUPPORT_WORDS[support]}: {_C1_TEXT[(wall, support)]} = {c1:.4f} "
        f"(nu = {poisson_ratio:g}; factors per Wylie & Streeter, Fluid Transients in "
        "Systems, 1993, ch. 2; the thick-wall form at every D/e, which tends to the thin-wall "
        "one as the wall gets thinner)"
    )
    return WaveSpeed(speed=speed, c1=c1, wall=wall, support=support, formula=formula)


def joukowsky(density: float, wave_speed: float, dv: float) -> float:
    r"""Joukowsky pressure change for an instantaneous velocity change [Pa].

    .. math:: \Delta p = \rho\,a\,\Delta v \qquad (\Delta H = a\,\Delta v/g)

    Joukowsky (1898); Wylie & Streeter, *Fluid Transients in Systems* (1993).

    Parameters
    ----------
    density : float
        [kg/m^3]
    wave_speed : float
        [m/s]
    dv : float
        Velocity change [m/s]; the sign is kept.

    Examples
    --------
    >>> round(joukowsky(998.2, 1294.0, 2.0) / 1e6, 3)
    2.583
    """
    return density * wave_speed * dv


def joukowsky_head(wave_speed: float, dv: float) -> float:
    """Joukowsky head change ``a*dv/g`` [m]."""
    return wave_speed * dv / G


def round_trip(length: float, wave_speed: float) -> float:
    """Wave round-trip time ``2L/a`` [s] of a line of length ``length`` [m]."""
    return 2.0 * length / wave_speed


@dataclass(frozen=True)
class ClosureEstimate:
    """The effective closure of a valve schedule (see :func:`effective_closure_time`)."""

    effective_time: float
    """Equivalent linear closure time ``1/max(-dr/dt)`` [s]."""
    stroke_time: float
    """Duration of the closing movement that contains the fastest cut [s]."""
    fastest_cut_at: float
    """Time of the fastest flow cut [s]."""
    flow_ratio_end: float
    """Quasi-steady flow ratio at the end of that closing movement [-] (0: full closure)."""


def effective_closure_time(
    valve: Valve,
    coefficient: Callable[[np.ndarray], np.ndarray],
    k_line: float,
    samples: int = 4000,
) -> ClosureEstimate | None:
    r"""Effective closure time of a valve schedule, judged on the flow cut, not the stroke.

    Most of the flow through a throttling valve is cut in the last part of its stroke, so
    the actuator stroke time overstates how slowly the flow stops. The flow the schedule
    would allow at a fixed driving head (quasi-steady) is

    .. math:: r(t) = \frac{Q(t)}{Q(0)} = \sqrt{\frac{K_{line} + K_v(x_0)}{K_{line} + K_v(x(t))}},
              \qquad K_v(x) = K_{open}/c(x)^2

    with ``K_line`` the rest of the line's loss coefficient (entrance, friction, fittings,
    exit). The **effective closure time** is the time a linear flow cut at the schedule's
    fastest rate would take to stop the whole flow:

    .. math:: T_e = \frac{1}{\max_t\,(-\mathrm{d}r/\mathrm{d}t)}

    For a linear effective-area closure of a valve that controls the whole loss (``c``
    linear in time, ``K_line`` small) this equals the stroke time; for a linear-travel
    closure of an equal-percentage valve it is much shorter. It is the quantity that sets a
    rigid-column rise ``(L/gA)*dQ/dt`` and that is compared with the wave round trip.
    Definition of our own for screening (common practice, no source).

    Parameters
    ----------
    valve : Valve
        The valve; its ``schedule`` (``None``: no movement, returns ``None``).
    coefficient : callable
        ``c(x)``, relative flow coefficient as a function of relative travel, vectorised.
    k_line : float
        Loss coefficient of the rest of the line, referred to its velocity head [-].
    samples : int
        Sampling points per closing segment of the schedule.

    Returns
    -------
    ClosureEstimate or None
        ``None`` when the schedule never reduces the flow.
    """
    sched = valve.schedule
    if sched is None or len(sched.times) < 2:
        return None
    times = np.asarray(sched.times, dtype=float)
    x = np.asarray(sched.openings, dtype=float)
    x0 = x[0]

    def ratio(xs: np.ndarray) -> np.ndarray:
        c = np.asarray(coefficient(np.clip(xs, 0.0, 1.0)), dtype=float)
        c0 = float(np.asarray(coefficient(np.array([x0])), dtype=float)[0])
        if c0 <= 0.0:
            return np.zeros_like(c)
        k_v0 = valve.k_open / c0**2
        with np.errstate(divide="ignore"):
            k_v = np.where(c > 0.0, valve.k_open / np.maximum(c, 1e-300) ** 2, np.inf)
        out = np.sqrt((k_line + k_v0) / (k_line + k_v))
        return np.where(np.isfinite(k_v), out, 0.0)

    best_rate = 0.0
    best = None
    # closing movements: maximal runs of consecutive decreasing segments
    i = 0
    n = len(times)
    while i < n - 1:
        if x[i + 1] >= x[i]:
            i += 1
            continue
        j = i
        while j < n - 1 and x[j + 1] < x[j]:
            j += 1
        ts = np.concatenate([np.linspace(times[k], times[k + 1], samples) for k in range(i, j)])
        xs = np.interp(ts, times, x)
        rs = ratio(xs)
        rates = -np.diff(rs) / np.maximum(np.diff(ts), 1e-300)
        k = int(np.argmax(rates))
        if rates[k] > best_rate:
            best_rate = float(rates[k])
            best = ClosureEstimate(
                effective_time=1.0 / best_rate,
                stroke_time=float(times[j] - times[i]),
                fastest_cut_at=float(0.5 * (ts[k] + ts[k + 1])),
                flow_ratio_end=float(rs[-1]),
            )
        i = j
    return best


def is_rapid_closure(effective_time: float, round_trip_time: float,
                     limit: float = RAPID_CLOSURE_ROUND_TRIPS) -> bool:
    """True when the effective closure is shorter than ``limit`` wave round trips."""
    return effective_time < limit * round_trip_time


@dataclass(frozen=True)
class LineSurge:
    """Surge screening of one line after a rigid-column run (see :func:`screen_line`)."""

    wave_speed: float | None
    """Pressure-wave speed a [m/s]; ``None`` when the liquid's bulk modulus is unknown."""
    formula: str
    """How ``wave_speed`` was obtained (formula and support factor)."""
    joukowsky: float | None
    """``rho*a*v_max`` with the line's largest velocity of the run [Pa]."""
    round_trip: float | None
    """``2L/a`` [s]."""
    effective_closure: float | None
    """Effective closure time of the valve schedule [s] (:func:`effective_closure_time`);
    ``None`` without a closing move during the run."""
    rapid_closure: bool
    """Effective closure shorter than :data:`RAPID_CLOSURE_ROUND_TRIPS` round trips."""
    max_pressure_uncapped: float
    """Largest gauge pressure of the rigid-column run before the Joukowsky cap [Pa]."""
    capped: bool
    """The reported maximum was limited to static plus Joukowsky."""
    max_pressure: float = math.nan
    """Reported largest gauge pressure on the line [Pa] (after the cap)."""
    min_pressure: float = math.nan
    """Reported smallest gauge pressure on the line [Pa] (limited at vapour pressure)."""
    column_separation: bool = False
    """The minimum reached vapour pressure."""


def screen_line(
    line_id: str,
    line: Line,
    fluid: FluidProps,
    *,
    atmospheric_pressure: float,
    station_max: np.ndarray,
    station_min: np.ndarray,
    station_elevation: np.ndarray,
    static_head: float,
    velocity_max: float,
    effective_closure: float | None,
    max_time: float | None = None,
    min_time: float | None = None,
    separation_time: float | None = None,
    flow_sign: float = 1.0,
) -> tuple[LineSurge, list[Finding]]:
    r"""Apply the surge screening rules to one line's rigid-column pressure extremes.

    Rules (see the module docstring for their basis):

    * ``surge.rapid_closure`` (danger) when the effective closure is shorter than five wave
      round trips ``2L/a``: an elastic analysis is needed;
    * every station's maximum is capped at static plus Joukowsky,
      :math:`p \le \rho g (H_{static} - z) + \rho a v_{max}`, with ``H_static`` the highest
      head at either end of the line during the run; the reported maximum is the largest
      capped value;
    * ``surge.pressure`` (danger) where the reported maximum exceeds ``pressure_rating``;
    * ``surge.column_separation`` (danger) where the minimum absolute pressure reaches the
      vapour pressure; the reported minimum is then limited to vapour pressure.

    Parameters
    ----------
    line_id : str
    line : Line
    fluid : FluidProps
    atmospheric_pressure : float
        Site atmospheric pressure, absolute [Pa].
    station_max, station_min : ndarray
        Largest and smallest gauge pressure at each tracked point of the line [Pa]
        (``-inf``/``inf`` where never tracked).
    station_elevation : ndarray
        Elevation of those points [m].
    static_head : float
        Highest end-node head of the line during the run [m].
    velocity_max : float
        Largest line velocity of the run [m/s].
    effective_closure : float or None
        Effective closure time of the line's valve [s].
    max_time, min_time : float, optional
        When the extremes occurred [s] (for the messages).
    separation_time : float, optional
        First time any point of the line reached vapour pressure [s]; the column-separation
        finding gives this time (not the time of the lowest clamped pressure), and a peak
        reached after it is quoted as untrustworthy.
    flow_sign : float
        Sign of the line's flow when the valve cuts it (``+1`` from-end to to-end). With a
        valve at the ``to`` end and forward flow the line upstream of it sees an upsurge; with
        the flow reversed the valve is upstream of the line, which sees a downsurge.

    Returns
    -------
    (LineSurge, list of Finding)
    """
    rho = fluid.density
    ws = None
    formula = "liquid bulk modulus unknown: no wave speed"
    if fluid.bulk_modulus is not None:
        ws = wave_speed(fluid.bulk_modulus, rho, line.diameter, line.wall_thickness,
                        line.elastic_modulus, line.poisson_ratio, line.support)
        formula = ws.formula
    a = ws.speed if ws is not None else None
    jouk = joukowsky(rho, a, velocity_max) if a is not None else None
    trip = round_trip(line.length, a) if a is not None else None
    rapid = bool(effective_closure is not None and trip is not None
                 and is_rapid_closure(effective_closure, trip))
    station_max = np.asarray(station_max, dtype=float)
    raw_max = float(np.max(station_max)) if station_max.size else -math.inf
    reported_max = raw_max
    capped = False
    if jouk is not None and station_max.size:
        cap = rho * G * (static_head - np.asarray(station_elevation, dtype=float)) + jouk
        reported_max = float(np.max(np.minimum(station_max, cap)))
        capped = reported_max < raw_max - 1e-9 * max(1.0, abs(raw_max))
    reported_min = float(np.min(station_min)) if np.size(station_min) else math.inf
    at_max = f" at t = {max_time:.4g} s" if max_time is not None else ""
    findings: list[Finding] = []
    separation = bool(fluid.vapor_pressure is not None
                      and reported_min + atmospheric_pressure <= fluid.vapor_pressure)
    if rapid:
        findings.append(_rapid_closure_finding(line_id, line, effective_closure, trip, a, jouk,
                                               flow_sign))
    if line.pressure_rating is not None and reported_max > line.pressure_rating:
        after = (separation and separation_time is not None and max_time is not None
                 and max_time > separation_time)
        findings.append(_rating_finding(line_id, line, reported_max, at_max,
                                        separation_time if after else None))
    if separation:
        first = separation_time if separation_time is not None else min_time
        at_first = f" first at t = {first:.4g} s" if first is not None else ""
        findings.append(Finding(
            "surge.column_separation", line_id,
            f"the pressure on line {line_id} falls to vapour pressure{at_first}: the liquid "
            "column separates (a vapour cavity forms, and its collapse can give pressures above "
            "Joukowsky); the rigid-column result is not valid there and the reported minimum "
            "is limited to vapour pressure. Risk of collapse of thin-walled or plastic pipe.",
            "danger", "Wylie & Streeter, Fluid Transients in Systems (1993)",
        ))
        reported_min = fluid.vapor_pressure - atmospheric_pressure
        # no point of the line can stand below vapour pressure either
        reported_max = max(reported_max, reported_min)
    return LineSurge(
        wave_speed=a, formula=formula, joukowsky=jouk, round_trip=trip,
        effective_closure=effective_closure, rapid_closure=rapid,
        max_pressure_uncapped=raw_max, capped=capped, max_pressure=reported_max,
        min_pressure=reported_min, column_separation=separation,
    ), findings


def _rating_finding(line_id: str, line: Line, reported_max: float, at_max: str,
                    separated_at: float | None) -> Finding:
    """``surge.pressure``: the peak above the rating, marked untrustworthy when it came after
    the column separated at ``separated_at`` [s]."""
    caveat = (f" -- after the column separated at t = {separated_at:.4g} s, so this "
              "rigid-column peak is not trustworthy (the cavity's collapse can give more "
              "or less)" if separated_at is not None else "")
    return finding(
        "surge.pressure", line_id,
        f"the pressure on line {line_id} reaches {{p}} gauge{at_max}{caveat}, above its "
        "rating of {rating}: slow the valve closure or add surge protection (defer to "
        "local codes and licensed practice)",
        "danger", "pressure rating from the project file",
        p=(reported_max, "pressure"), rating=(line.pressure_rating, "pressure"))


def _rapid_closure_finding(line_id: str, line: Line, effective_closure: float, trip: float,
                           a: float, jouk: float, flow_sign: float) -> Finding:
    """``surge.rapid_closure``, worded for the side of the valve the line is on.

    With the valve at the line's downstream end (in the direction the liquid actually runs)
    the line sees an upsurge, capped here at static plus Joukowsky; with the valve at its
    upstream end the line sees a downsurge of up to Joukowsky, limited by vapour pressure.
    """
    valve_at_to = line.valve is None or line.valve.position == "to"
    upsurge = (flow_sign >= 0.0) == valve_at_to
    if upsurge:
        what = ("The reported peak is capped at static plus Joukowsky ({jump} rise). "
                "Consider a slower or two-stage closure and defer to licensed surge practice.")
    else:
        what = ("The flow runs away from the valve, so the line sees a downsurge of up to "
                "Joukowsky ({jump} fall), limited by vapour pressure: column separation is "
                "likely. Consider a slower closure or an air or vacuum valve, and defer to "
                "licensed surge practice.")
    return finding(
        "surge.rapid_closure", line_id,
        f"the valve on line {line_id} cuts the flow in an effective {{te}}, "
        f"{effective_closure / trip:.2g} wave round trips 2L/a ({{trip}} at a = {{a}}); "
        f"below about {RAPID_CLOSURE_ROUND_TRIPS:g} round trips the rigid-column pressure is "
        "not valid: an elastic (water-hammer) analysis is needed. " + what,
        "danger",
        "Joukowsky (1898); Wylie & Streeter, Fluid Transients in Systems (1993); the "
        "5-round-trip limit from a method-of-characteristics comparison of our own",
        te=(effective_closure, "time"), trip=(trip, "time"), a=(a, "velocity", 4),
        jump=(jouk, "pressure"))
