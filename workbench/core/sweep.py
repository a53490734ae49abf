"""Many steady cases of one line at once: the vectorised engine behind what-if sweeps.

A sizing question ("which nominal size passes 10 L/s at the lowest level?") asks the same
single-line problem hundreds or thousands of times with a different diameter, level,
temperature or valve opening. Solved one case at a time that is a loop of scalar root
finds; here the whole array of cases is solved together in numpy:

* the Darcy friction factor and its slope come from the core's one friction law
  (:func:`workbench.core.friction.friction_with_slope`: laminar ``64/Re`` below Re 2000,
  Colebrook (1939) by Clamond (2009) above 4000, a smooth blend between), the same the
  network solver's line model uses;
* the flow of each case between its two fixed heads comes from a safeguarded Newton
  iteration on the mean velocity, bracketed so that every case converges
  (:func:`solve_line_cases`).

Everything here is SI floats and numpy arrays; no file I/O, pint or UI.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from dataclasses import dataclass, fields

import numpy as np

from workbench.core.fittings import exit_k
from workbench.core.friction import DEFAULT_METHOD, friction_with_slope
from workbench.core.model import G, System, receiver_head, reservoir_head

__all__ = [
    "FRICTION_METHODS",
    "LineCases",
    "LineCasesResult",
    "line_cases_from_systems",
    "single_line_ends",
    "solve_line_cases",
]

VectorisedFriction = Callable[[np.ndarray, np.ndarray], tuple[np.ndarray, np.ndarray]]

#: Vectorised friction laws by name: each maps (Re, eps/D) to (f, df/dRe). One law, the
#: core's default (:mod:`workbench.core.friction`).
FRICTION_METHODS: dict[str, VectorisedFriction] = {DEFAULT_METHOD: friction_with_slope}


@dataclass(frozen=True)
class LineCases:
    """An array of single-line steady cases: one line between two fixed heads.

    Every attribute is an array of the same shape (scalars are broadcast on creation).
    Positive flow runs from the ``from`` end to the ``to`` end.
    """

    head_from: np.ndarray
    """Piezometric head at the from-end node (reservoir surface, vessel or outlet) [m]."""
    head_to: np.ndarray
    """Piezometric head at the to-end node [m]."""
    length: np.ndarray
    """Line length [m]."""
    diameter: np.ndarray
    """Inside diameter [m]."""
    roughness: np.ndarray
    """Absolute roughness [m]."""
    density: np.ndarray
    """Liquid density [kg/m^3]."""
    viscosity: np.ndarray
    """Dynamic viscosity [Pa*s]."""
    k_forward: np.ndarray
    """Sum of constant loss coefficients for forward flow: entrance, fixed-K fittings,
    the size-dependent part of 2-K/3-K fittings and the valve at its opening [-]
    (``inf`` for a shut valve). The exit, whose coefficient depends on Re, is not in it:
    see ``exit_forward``."""
    k_reverse: np.ndarray
    """The same for reverse flow (the entrance swaps ends) [-]."""
    k_re: np.ndarray
    """Sum of the ``K1`` coefficients of Re-dependent fittings: they add ``k_re/Re`` [-]."""
    friction_factor: np.ndarray
    """A fixed Darcy friction factor, or ``nan`` to use the correlation [-]."""
    exit_forward: np.ndarray
    """1 where forward flow leaves the line into a free surface or the air, else 0 [-]: the
    solver then adds the exit loss ``K_exit(Re)`` velocity heads, 2 laminar, 1 turbulent,
    blended between (:func:`workbench.core.fittings.exit_k`)."""
    exit_reverse: np.ndarray
    """The same for reverse flow, at the from-end [-]."""

    def __post_init__(self) -> None:
        arrays = [np.asarray(getattr(self, f.name), dtype=float) for f in fields(self)]
        for f, arr in zip(fields(self), np.broadcast_arrays(*arrays), strict=True):
            object.__setattr__(self, f.name, np.array(arr, dtype=float))

    @property
    def shape(self) -> tuple[int, ...]:
        return self.head_from.shape

    @property
    def size(self) -> int:
        return int(self.head_from.size)

    @classmethod
    def from_mapping(cls, values: Mapping[str, object]) -> LineCases:
        """Build from a mapping with defaults: no fittings, no fixed f, no Re-dependent exit
        (a constant exit loss may be put in ``k_forward``), ``k_reverse = k_forward`` and
        ``exit_reverse = exit_forward``."""
        data = dict(values)
        data.setdefault("k_re", 0.0)
        data.setdefault("friction_factor", np.nan)
        data.setdefault("k_reverse", data.get("k_forward", 0.0))
        data.setdefault("exit_forward", 0.0)
        data.setdefault("exit_reverse", data["exit_forward"])
        return cls(**data)


@dataclass(frozen=True)
class LineCasesResult:
    """Flows of an array of single-line cases, shaped like :class:`LineCases`."""

    success: bool
    """True when every case converged."""
    status: int
    """0 converged; 1 some cases did not converge (see ``converged``)."""
    message: str
    flow: np.ndarray
    """Volumetric flow, positive from->to [m^3/s]."""
    velocity: np.ndarray
    """Mean velocity [m/s]."""
    reynolds: np.ndarray
    """|Re| [-]."""
    friction_factor: np.ndarray
    """Darcy friction factor used [-] (``nan`` at zero flow)."""
    head_loss: np.ndarray
    """Head lost from the from-end to the to-end [m] (equals the head difference)."""
    converged: np.ndarray
    """Per-case convergence flags."""
    iterations: int
    """Newton iterations taken by the slowest case."""


def _resistance(v, cases: LineCases, k_const, n_exit, friction: VectorisedFriction):
    """Loss coefficient K_t(V) = f L/D + K_c + k_re/Re + n_exit K_exit(Re) and dK_t/dV,
    for V > 0 (``n_exit`` 1 where the flow leaves through an exit, else 0)."""
    nu = cases.viscosity / cases.density
    re = v * cases.diameter / nu
    rr = cases.roughness / cases.diameter
    f, df_dre = friction(re, rr)
    fixed = ~np.isnan(cases.friction_factor)
    f = np.where(fixed, cases.friction_factor, f)
    df_dre = np.where(fixed, 0.0, df_dre)
    dre_dv = cases.diameter / nu
    ld = cases.length / cases.diameter
    k_exit, dk_exit = exit_k(re)
    with np.errstate(divide="ignore", invalid="ignore"):
        k_t = f * ld + k_const + cases.k_re / re + n_exit * k_exit
        dk = (df_dre * ld - cases.k_re / (re * re) + n_exit * dk_exit) * dre_dv
    return k_t, dk, f, re


def solve_line_cases(
    cases: LineCases,
    *,
    method: str = DEFAULT_METHOD,
    rtol: float = 1e-12,
    max_iter: int = 60,
) -> LineCasesResult:
    r"""Flow of every case of one line between two fixed heads, all cases at once.

    For each case the velocity solves the energy equation between the end heads,

    .. math:: \Delta H = H_{from} - H_{to} = \left(f(Re)\frac{L}{D} + \Sigma K
              + \frac{K_{Re}}{Re} + n_{exit} K_{exit}(Re)\right)\frac{V|V|}{2g},

    with the loss coefficients of the actual flow direction; ``K_exit`` is 2 for laminar
    flow, 1 for turbulent, blended between (:func:`workbench.core.fittings.exit_k`, the
    same as the network solver's line model). The residual
    :math:`\phi(V) = K_t(V)V^2/2g - |\Delta H|` is increasing in V, negative at V = 0; the
    solver brackets the root (:func:`_bracket`), then takes Newton steps with the analytic
    derivative (including df/dRe) and bisects whenever a step leaves the bracket
    (:func:`_newton_bisect`), so every case converges.

    Parameters
    ----------
    cases : LineCases
        The cases [SI].
    method : str
        Name of a vectorised friction law in :data:`FRICTION_METHODS`.
    rtol : float
        Relative tolerance on the velocity [-].
    max_iter : int
        Iteration limit.

    Returns
    -------
    LineCasesResult
        Flows, velocities, Reynolds numbers and friction factors, shaped like the cases.

    Examples
    --------
    Water from a reservoir 10 m above a free outlet through 100 m of 100 mm pipe, smooth,
    entrance 0.5 plus the exit (1 velocity head, turbulent):

    >>> c = LineCases.from_mapping(dict(head_from=10.0, head_to=0.0, length=100.0,
    ...     diameter=0.1, roughness=0.0, density=998.2, viscosity=1.0016e-3, k_forward=0.5,
    ...     exit_forward=1.0))
    >>> r = solve_line_cases(c)
    >>> bool(r.success), round(float(r.velocity), 3)
    (True, 3.555)
    """
    if method not in FRICTION_METHODS:
        raise ValueError(
            f"unknown friction method {method!r}; known: {', '.join(sorted(FRICTION_METHODS))}"
        )
    friction = FRICTION_METHODS[method]
    dh = cases.head_from - cases.head_to
    sign = np.where(dh < 0.0, -1.0, 1.0)
    target = np.abs(dh)
    k_const = np.where(sign > 0, cases.k_forward, cases.k_reverse)
    n_exit = np.where(sign > 0, cases.exit_forward, cases.exit_reverse)
    moving = (target > 0.0) & np.isfinite(k_const) & (cases.diameter > 0.0)

    v = np.zeros(cases.shape)
    converged = np.ones(cases.shape, dtype=bool)
    iterations = 0
    if np.any(moving):
        sub = LineCases(**{f.name: getattr(cases, f.name)[moving] for f in fields(cases)})
        v[moving], converged[moving], iterations = _newton_bisect(
            sub, k_const[moving], n_exit[moving], target[moving], friction, rtol, max_iter)
    return _result(cases, sign * v, dh, converged, iterations, friction)


def _bracket(sub: LineCases, kc, ne, h, friction: VectorisedFriction):
    """A start and a bracket ``[lo, hi]`` of each case's velocity, ``phi(lo) <= 0 < phi(hi)``.

    Start from a turbulent guess ``f = 0.02``; ``hi`` from the minor losses alone, grown
    fourfold until the loss at ``hi`` exceeds the head (at most 80 times).
    """
    two_g = 2.0 * G
    v_start = np.sqrt(two_g * h / (0.02 * sub.length / sub.diameter + kc + ne + 1e-9))
    lo = np.zeros_like(h)
    hi = np.sqrt(two_g * h / np.maximum(kc + ne, 1e-9))
    for _ in range(80):
        k_hi, _, _, _ = _resistance(hi, sub, kc, ne, friction)
        short = k_hi * hi * hi / two_g < h
        if not np.any(short):
            break
        lo = np.where(short, hi, lo)
        hi = np.where(short, hi * 4.0, hi)
    return np.clip(v_start, lo, hi), lo, hi


def _newton_bisect(sub: LineCases, kc, ne, h, friction: VectorisedFriction, rtol: float,
                   max_iter: int):
    """Velocities of the flowing cases: Newton on ``phi(V) = K_t V^2/2g - h``, bisecting
    whenever a step leaves the bracket. Returns (V [m/s], converged flags, iterations)."""
    two_g = 2.0 * G
    v_k, lo, hi = _bracket(sub, kc, ne, h, friction)
    done = np.zeros(h.shape, dtype=bool)
    iterations = 0
    for iterations in range(1, max_iter + 1):  # noqa: B007 - count is reported
        k_t, dk, _, _ = _resistance(v_k, sub, kc, ne, friction)
        phi = k_t * v_k * v_k / two_g - h
        dphi = (2.0 * k_t * v_k + dk * v_k * v_k) / two_g
        lo = np.where(phi < 0.0, v_k, lo)
        hi = np.where(phi > 0.0, v_k, hi)
        with np.errstate(divide="ignore", invalid="ignore"):
            v_new = v_k - phi / dphi
        outside = ~np.isfinite(v_new) | (v_new < lo) | (v_new > hi)
        v_new = np.where(outside, 0.5 * (lo + hi), v_new)
        step = np.abs(v_new - v_k)
        done = (step <= rtol * np.abs(v_new)) | (phi == 0.0)
        v_k = v_new
        if np.all(done):
            break
    return v_k, done, iterations


def _result(cases: LineCases, v, dh, converged, iterations: int,
            friction: VectorisedFriction) -> LineCasesResult:
    """Flows, Reynolds numbers and friction factors of the solved velocities ``v`` [m/s]."""
    area = 0.25 * np.pi * cases.diameter**2
    nu = cases.viscosity / cases.density
    re = np.abs(v) * cases.diameter / nu
    f = np.full(cases.shape, np.nan)
    flowing = re > 0.0
    if np.any(flowing):
        f_all, _ = friction(re[flowing], (cases.roughness / cases.diameter)[flowing])
        fixed = cases.friction_factor[flowing]
        f[flowing] = np.where(np.isnan(fixed), f_all, fixed)
    ok = bool(np.all(converged))
    message = (
        "all cases converged"
        if ok
        else f"{int(np.count_nonzero(~converged))} of {cases.size} cases did not converge"
    )
    return LineCasesResult(
        success=ok,
        status=0 if ok else 1,
        message=message,
        flow=v * area,
        velocity=v,
        reynolds=re,
        friction_factor=f,
        head_loss=dh,
        converged=converged,
        iterations=iterations,
    )


# --- Building cases from core systems -------------------------------------------------------


def _fixed_head(system: System, node_id: str, density: float) -> float | None:
    if node_id in system.reservoirs:
        return reservoir_head(system.reservoirs[node_id], density)
    if node_id in system.receivers:
        return receiver_head(system.receivers[node_id], density)
    return None


def single_line_ends(system: System) -> str | None:
    """The id of the only line when the system is one line between two fixed heads.

    Returns ``None`` for anything else (junctions, several lines): such systems go through
    the network solver one case at a time.
    """
    if len(system.lines) != 1 or system.junctions:
        return None
    (line_id, line), = system.lines.items()
    fixed = set(system.reservoirs) | set(system.receivers)
    if line.from_node in fixed and line.to_node in fixed:
        return line_id
    return None


def line_cases_from_systems(systems, line_id: str | None = None) -> LineCases:
    """Stack single-line systems (one per case) into :class:`LineCases`.

    Each system must be one line between two fixed heads (:func:`single_line_ends`). The
    loss coefficients come from :class:`workbench.core.line.LineSet`, the same line model the
    network solver uses: entrance and exit by flow direction (the exit as a flag, its
    Re-dependent coefficient added by the solver), fittings split into
    ``k_re/Re + k_const`` at each case's size, the valve at its steady opening.

    Parameters
    ----------
    systems : sequence of System
        One system per case.
    line_id : str, optional
        The line; default the only line of each system.

    Raises
    ------
    ValueError
        When a system is not a single line between two fixed heads.
    """
    from workbench.core.line import LineSet

    columns: dict[str, list[float]] = {f.name: [] for f in fields(LineCases)}
    for n, system in enumerate(systems):
        only = single_line_ends(system)
        if only is None or (line_id is not None and only != line_id):
            raise ValueError(f"case {n}: the system is not one line between two fixed heads")
        line = system.lines[only]
        rho = system.fluid.density
        lines = LineSet(system)
        kv = float(lines.valve_k()[0])
        const = float(lines.fittings_k_const[0]) + kv
        columns["head_from"].append(_fixed_head(system, line.from_node, rho))
        columns["head_to"].append(_fixed_head(system, line.to_node, rho))
        columns["length"].append(line.length)
        columns["diameter"].append(line.diameter)
        columns["roughness"].append(line.roughness)
        columns["density"].append(rho)
        columns["viscosity"].append(system.fluid.viscosity)
        columns["k_forward"].append(const + float(lines.entrance_forward[0]))
        columns["k_reverse"].append(const + float(lines.entrance_reverse[0]))
        columns["exit_forward"].append(float(lines.exit_at_to[0]))
        columns["exit_reverse"].append(float(lines.exit_at_from[0]))
        columns["k_re"].append(float(lines.fittings_k_re[0]))
        columns["friction_factor"].append(np.nan if line.friction_factor is None else line.friction_factor)
    return LineCases(**{k: np.asarray(v, dtype=float) for k, v in columns.items()})
