r"""Calibration: fit a few uncertain model parameters to what was measured on the plant.

A site test gives readings of a tank level, a line flow or a junction pressure, in time (a
drain timed with a dipstick, a level trend from the plant's historian) or as one steady
reading per test condition (the flow a meter showed at a valve opening). Pipes age and
valves wear, so a handbook roughness or loss coefficient can be well off; this module fits
one to three of them to the readings and says how well the data pin them down.

Model
-----
Each :class:`Observation` carries the system under its test conditions. The prediction is

* a reading in time: the rigid-column transient (:func:`workbench.core.transient.simulate`,
  run from zero to the last reading with no early stop) linearly interpolated at the
  reading times from an output grid of 2000 intervals;
* a steady reading: the steady network (:func:`workbench.core.network.solve_steady`).

The fit minimises the sum of squared weighted residuals
:math:`r_i = (y_{model}(t_i; x) - y_i)/w` (``w`` the largest magnitude among the
observation's readings, so observations of different quantities weigh alike) by bounded
nonlinear least squares (``scipy.optimize.least_squares``, trust-region reflective, with
its own forward-difference Jacobian) over the parameters scaled by their ranges to
``u = 1 + (x - lower)/(upper - lower)`` in [1, 2]. On that scale scipy's relative step
``diff_step`` (:data:`_DIFF_STEP`) is 0.1 % to 0.2 % of each range everywhere; on [0, 1] a
parameter at its lower bound (a roughness range from zero) would get scipy's fallback step
``sqrt(eps)``, far below the integration error of a run.

A parameter whose Jacobian column is negligible at the end of the search does not change
the model's values there. That may be the start's fault, not the parameter's: a bore so
wide that the tank has drained before the second reading leaves every reading unchanged by
a small step. Such a parameter is probed at five points of its range (the others held);
if it acts there the search starts again from the best probe, and only a parameter that
acts nowhere is said not to act.

Every fit has a limit of model runs (:func:`run_limit`, finite differences included). A
search cut short there does not converge; its best point still gets scipy's Jacobian (one
more ``least_squares`` call with ``max_nfev=1``), so its intervals and the correlation of
its parameters are reported: two parameters the readings cannot tell apart are the usual
reason a search creeps along a valley until the limit.

Confidence intervals follow the linearised theory of nonlinear regression (Bates & Watts,
*Nonlinear Regression Analysis and Its Applications*, Wiley 1988, ch. 2):

.. math::

    C = (J^T J)^{-1} s^2,\qquad s^2 = \frac{\sum r_i^2}{n - p},\qquad
    x_j \pm t_{0.975,\,n-p}\sqrt{C_{jj}}

and the correlation of two parameters is :math:`C_{jk}/\sqrt{C_{jj}C_{kk}}`; above about
0.95 in magnitude the data cannot tell them apart (only a combination of them is fitted).

A fitted value that ends on a bound of its range is a fit that did not converge: the
optimum lies outside the range, or the parameter does not act on the readings.

Nothing here imports pint or does file I/O: the project layer turns key paths, units and
files into :class:`FitParameter` and :class:`Observation`.
"""

from __future__ import annotations

import dataclasses
import math
from collections.abc import Callable, Sequence
from dataclasses import dataclass, field

import numpy as np

from workbench.core.model import Finding, System
from workbench.core.regression import cut_interval, linearised_statistics

__all__ = [
    "CORRELATION_LIMIT",
    "CalibrationError",
    "FitParameter",
    "FitResult",
    "Observation",
    "TARGETS",
    "cut_interval",
    "fit",
    "predict",
    "run_limit",
    "series_of",
    "with_conditions",
    "with_parameters",
]

#: Correlation between two fitted parameters above which (in magnitude) the data are said
#: not to tell them apart (common practice in regression diagnostics, no single source).
CORRELATION_LIMIT = 0.95

#: What a parameter can be: a line's ``roughness`` [m], ``diameter`` (bore) [m], fixed
#: ``friction_factor`` [-], a fixed-K fitting's ``fitting_k`` [-], its valve's
#: ``valve_k_open`` [-] or ``valve_kv_open`` [m^3/s].
TARGETS = ("roughness", "diameter", "friction_factor", "fitting_k", "valve_k_open",
           "valve_kv_open")

#: Output intervals per simulated span when predicting readings in time.
_GRID = 2000

#: Integration tolerance of the runs inside a fit: tight, so that the difference quotients
#: of the Jacobian see the parameters and not the integrator's error control.
_RTOL = 1e-8


class CalibrationError(ValueError):
    """A fit that cannot be made or did not succeed; the message says why in words."""


class _Cancelled(Exception):
    pass


@dataclass(frozen=True)
class FitParameter:
    """One parameter to fit, already resolved to the model (SI units)."""

    key: str
    """Key path as the user wrote it, for messages (``lines.L1.roughness``)."""
    target: str
    """One of :data:`TARGETS`."""
    line: str
    """Id of the line the parameter belongs to."""
    lower: float
    """Lower bound [SI unit of the target]."""
    upper: float
    """Upper bound [SI unit of the target]."""
    start: float
    """Value in the project now [SI unit of the target]; the fit starts here (clipped into
    the bounds)."""
    index: int | None = None
    """For ``fitting_k``: position of the fitting in the line's list (0-based)."""


@dataclass(frozen=True, eq=False)
class Observation:
    """Readings of one quantity of one element under one set of test conditions."""

    name: str
    """Name of the measurement."""
    element: str
    """Tank or reservoir id (``level``), line id (``flow``) or junction id (``pressure``)."""
    quantity: str
    """``"level"`` [m above the tank bottom], ``"flow"`` [m^3/s, positive from -> to] or
    ``"pressure"`` [Pa, gauge]."""
    times: np.ndarray | None
    """Reading times from the start of the test [s]; ``None`` for a steady reading."""
    values: np.ndarray
    """The readings [SI]."""
    system: System
    """The system under the test's conditions (levels, valve openings, initial state)."""


@dataclass(frozen=True, eq=False)
class FitResult:
    """Outcome of :func:`fit`, shaped like scipy's results."""

    success: bool
    status: int
    """1 converged, 0 stopped at the evaluation limit, -1 a parameter ran to its bound,
    -2 cancelled, -3 the model failed at a trial point."""
    message: str
    parameters: tuple[FitParameter, ...]
    values: np.ndarray
    """Fitted values [SI]."""
    ci95: np.ndarray
    """Parameters x 2: the 95 % confidence interval [SI], cut to the range searched (so
    never below zero, see :attr:`ci95_cut`); ``nan`` where none exists."""
    std_error: np.ndarray
    correlation: np.ndarray
    """Parameters x parameters."""
    rms_before: dict[str, float]
    """Per observation, RMS of (model - reading) with the starting values [SI]."""
    rms_after: dict[str, float]
    max_before: dict[str, float]
    """Per observation, the largest |model - reading| with the starting values [SI]."""
    max_after: dict[str, float]
    predicted_before: dict[str, np.ndarray]
    predicted_after: dict[str, np.ndarray]
    warnings: tuple[Finding, ...] = ()
    evaluations: int = 0
    """Model runs made (each runs every observation once)."""
    at_bound: tuple[str, ...] = field(default_factory=tuple)
    """Key paths of the parameters that ended on a bound."""
    trace_before: dict[str, tuple[np.ndarray, np.ndarray]] = field(default_factory=dict)
    """Per observation in time, the model's whole output ``(t [s], series [SI])`` with the
    starting values (between readings too: a crossing time is read from it)."""
    trace_after: dict[str, tuple[np.ndarray, np.ndarray]] = field(default_factory=dict)
    """The same with the fitted values."""
    ci95_linear: np.ndarray | None = None
    """Parameters x 2: the linearised interval before it was cut [SI] (it can reach below
    zero, where no roughness, bore or loss coefficient can be)."""
    ci95_cut: np.ndarray | None = None
    """Parameters x 2 of bool: the interval's lower or upper end was cut to the range
    searched (whose lower end is zero or more: every fitted quantity is)."""


# ------------------------------------------------------------------------------------------
# Applying parameters and test conditions


def _replace_line(system: System, line_id: str, **changes) -> System:
    lines = dict(system.lines)
    lines[line_id] = dataclasses.replace(lines[line_id], **changes)
    return dataclasses.replace(system, lines=lines)


def _apply_one(system: System, p: FitParameter, value: float) -> System:
    line = system.lines[p.line]
    if p.target == "roughness":
        return _replace_line(system, p.line, roughness=value)
    if p.target == "diameter":
        return _replace_line(system, p.line, diameter=value)
    if p.target == "friction_factor":
        return _replace_line(system, p.line, friction_factor=value)
    if p.target == "fitting_k":
        fittings = list(line.fittings)
        fittings[p.index] = dataclasses.replace(fittings[p.index], k=value)
        return _replace_line(system, p.line, fittings=tuple(fittings))
    if p.target == "valve_k_open":
        return _replace_line(system, p.line, valve=dataclasses.replace(line.valve, k_open=value))
    if p.target == "valve_kv_open":
        from workbench.core.valve import k_from_kv

        k_open = k_from_kv(value * 3600.0, line.diameter, system.fluid.density)
        return _replace_line(system, p.line, valve=dataclasses.replace(line.valve, k_open=k_open))
    raise ValueError(f"unknown parameter target {p.target!r}; expected one of {TARGETS}")


def with_parameters(system: System, parameters: Sequence[FitParameter],
                    values: Sequence[float]) -> System:
    """The system with each parameter set to its value [SI].

    Examples
    --------
    >>> from workbench.core.model import FluidProps, Line, Receiver, Reservoir, System
    >>> s = System("t", FluidProps("water", 998.2, 1e-3),
    ...     {"R": Reservoir("R", "constant_level", 0.0, 5.0)}, {},
    ...     {"O": Receiver("O", "open_discharge", 0.0)},
    ...     {"L": Line("L", "R", "O", 50.0, 0.1, roughness=4.5e-5)})
    >>> p = FitParameter("lines.L.roughness", "roughness", "L", 0.0, 1e-3, 4.5e-5)
    >>> with_parameters(s, [p], [6e-4]).lines["L"].roughness
    0.0006
    """
    for p, value in zip(parameters, values):
        system = _apply_one(system, p, float(value))
    return system


def with_conditions(system: System, *, levels: dict[str, float] | None = None,
                    openings: dict[str, float] | None = None,
                    initial_state: str | None = None) -> System:
    """The system under a test's conditions.

    Parameters
    ----------
    levels : dict, optional
        Reservoir id -> level at the start of the test [m above its bottom].
    openings : dict, optional
        Line id -> valve opening held through the test [-] (any opening schedule of that
        valve is dropped).
    initial_state : {"steady", "at_rest"}, optional
        How the run starts (``at_rest``: the outlet opened at time zero).
    """
    reservoirs = dict(system.reservoirs)
    for rid, level in (levels or {}).items():
        reservoirs[rid] = dataclasses.replace(reservoirs[rid], level=float(level))
    lines = dict(system.lines)
    for lid, opening in (openings or {}).items():
        valve = dataclasses.replace(lines[lid].valve, opening=float(opening), schedule=None)
        lines[lid] = dataclasses.replace(lines[lid], valve=valve)
    simulation = system.simulation
    if initial_state is not None:
        from workbench.core.model import SimulationSettings

        simulation = (SimulationSettings(1.0, initial_state) if simulation is None
                      else dataclasses.replace(simulation, initial_state=initial_state))
    return dataclasses.replace(system, reservoirs=reservoirs, lines=lines, simulation=simulation)


# ------------------------------------------------------------------------------------------
# Predictions


def predict(obs: Observation, system: System | None = None, *,
            cancel: Callable[[], bool] | None = None, rtol: float = _RTOL) -> np.ndarray:
    """The model's values at the observation's readings [SI].

    ``system`` defaults to the observation's own; a fit passes it with trial parameters.

    Raises
    ------
    CalibrationError
        When the model cannot be run (no steady solution, a failed integration).
    """
    system = obs.system if system is None else system
    if obs.times is None:
        return _predict_steady(obs, system)
    t, series = model_trace(obs, system, cancel=cancel, rtol=rtol)
    return np.interp(obs.times, t, series)


def model_trace(obs: Observation, system: System, *, cancel: Callable[[], bool] | None = None,
                rtol: float = _RTOL) -> tuple[np.ndarray, np.ndarray]:
    """The model's output for a reading in time, ``(t [s], series [SI])``, from zero to the
    last reading on a grid of :data:`_GRID` intervals (see :func:`predict`)."""
    from workbench.core.transient import simulate
    from workbench.core.transient.options import MAX_DURATION

    span = float(np.max(obs.times))
    if not span > 0.0:
        raise CalibrationError(f"measurement {obs.name}: the readings span no time; give a "
                               "steady reading (one point) or readings at different times")
    if span > MAX_DURATION:
        raise CalibrationError(f"measurement {obs.name}: the last reading is "
                               f"{span / 3.15576e7:.3g} years after the start, beyond the "
                               f"longest span a run simulates ({MAX_DURATION / 3.15576e7:.0f} "
                               "years); check the times and their unit")
    result = simulate(system, duration=span, stop_when=None, output_interval=span / _GRID,
                      rtol=rtol, cancel=cancel, junction_pressures=obs.quantity == "pressure")
    if result.status == 2:
        raise _Cancelled()
    if not result.success:
        raise CalibrationError(f"measurement {obs.name}: {result.message}")
    return np.asarray(result.t, dtype=float), series_of(obs, result)


def series_of(obs: Observation, result) -> np.ndarray:
    """The series of a run (:class:`~workbench.core.transient.TransientResult`) that an
    observation reads [SI]: a tank's level, a line's flow or a junction's gauge pressure
    (kept by ``simulate(..., junction_pressures=True)``).

    Raises
    ------
    CalibrationError
        When the run does not hold it, or no flowing line joins a junction to a fixed head
        during the test (it has no pressure then).
    """
    ids = {"level": result.tank_ids, "flow": result.line_ids,
           "pressure": result.junction_ids}[obs.quantity]
    if obs.element not in ids:
        raise CalibrationError(f"measurement {obs.name}: the run holds no {obs.quantity} of "
                               f"{obs.element}")
    rows = {"level": result.levels, "flow": result.flows,
            "pressure": result.junction_pressures}[obs.quantity]
    series = np.asarray(rows[list(ids).index(obs.element)], dtype=float)
    if np.isnan(series).any():
        t = float(np.asarray(result.t)[np.isnan(series)][0])
        raise CalibrationError(f"measurement {obs.name}: from t = {t:.6g} s no flowing line "
                               f"joins junction {obs.element} to a tank or an outlet (a tank "
                               "drained, or a valve shut): it has no pressure to compare")
    return series


def _predict_steady(obs: Observation, system: System) -> np.ndarray:
    from workbench.core.network import solve_steady

    result = solve_steady(system)
    if not result.success:
        raise CalibrationError(f"measurement {obs.name}: {result.message}")
    if obs.quantity == "flow":
        value = result.lines[obs.element].flow
    elif obs.quantity == "pressure":
        value = result.nodes[obs.element].pressure
    else:
        value = system.reservoirs[obs.element].level
    return np.full(len(obs.values), float(value))


def _rms(x: np.ndarray) -> float:
    return float(np.sqrt(np.mean(np.square(x)))) if x.size else 0.0


# ------------------------------------------------------------------------------------------
# The fit


class _OutOfRuns(Exception):
    pass


#: Relative finite-difference step of the Jacobian (scipy's ``diff_step``) on the scaled
#: parameters ``u`` in [1, 2]: a step of 0.1 % to 0.2 % of each parameter's range, far above
#: the runs' integration error (``_RTOL``) and small against the curvature.
_DIFF_STEP = 1e-3

#: Where along its range a parameter that seems not to act is probed (fractions of the
#: range), with the others held.
_PROBES = (0.0, 0.25, 0.5, 0.75, 1.0)


def run_limit(n_parameters: int) -> int:
    """Most model runs a fit of ``n_parameters`` makes (each runs every observation once):
    the search with its finite differences and the run at the start, the probes of a
    parameter that seems not to act, and a reserve for the end (the Jacobian at the best
    point of a search cut short, the run at the fitted values)."""
    return 25 * (n_parameters + 1) + len(_PROBES) * n_parameters + n_parameters + 1


class _Problem:
    """Residuals of every observation as a function of the scaled parameters
    ``u = 1 + (x - lower)/(upper - lower)``, in [1, 2]."""

    def __init__(self, observations, parameters, progress, cancel, limit):
        self.obs = list(observations)
        self.params = list(parameters)
        self.lower = np.array([p.lower for p in self.params], dtype=float)
        self.upper = np.array([p.upper for p in self.params], dtype=float)
        self.scale = self.upper - self.lower
        self.weights = [max(float(np.max(np.abs(o.values))), 1e-300) for o in self.obs]
        self.progress = progress
        self.cancel = cancel
        self.limit = limit
        self.evaluations = 0
        self._cache: dict[bytes, tuple[np.ndarray, list[np.ndarray]]] = {}
        self.traces: dict[bytes, dict[str, tuple[np.ndarray, np.ndarray]]] = {}
        """Model traces of the runs kept for the result (the start and the fitted values)."""
        self.keep_traces = False
        self.best: tuple[float, np.ndarray] | None = None
        """``(cost, u)`` of the best run so far."""

    def to_x(self, u: np.ndarray) -> np.ndarray:
        return self.lower + (np.asarray(u, dtype=float) - 1.0) * self.scale

    def to_u(self, x: np.ndarray) -> np.ndarray:
        return 1.0 + np.clip((np.asarray(x, dtype=float) - self.lower) / self.scale, 0.0, 1.0)

    def run(self, u: np.ndarray) -> tuple[np.ndarray, list[np.ndarray]]:
        key = np.asarray(u, dtype=float).tobytes()
        if key in self._cache:
            return self._cache[key]
        if self.cancel is not None and self.cancel():
            raise _Cancelled()
        if self.evaluations >= self.limit:
            raise _OutOfRuns()
        x = self.to_x(u)
        preds = []
        traces = {}
        for o in self.obs:
            system = with_parameters(o.system, self.params, x)
            try:
                if o.times is None or not self.keep_traces:
                    preds.append(predict(o, system, cancel=self.cancel))
                    continue
                t, series = model_trace(o, system, cancel=self.cancel)
                traces[o.name] = (t, series)
                preds.append(np.interp(o.times, t, series))
            except CalibrationError as exc:
                values = ", ".join(f"{p.key} = {v:.4g}" for p, v in zip(self.params, x))
                raise CalibrationError(f"the model could not be run at {values} (SI): {exc}") \
                    from None
        r = np.concatenate([(pred - o.values) / w for pred, o, w in
                            zip(preds, self.obs, self.weights)])
        self.evaluations += 1
        cost = float(r @ r)
        if self.best is None or cost < self.best[0]:
            self.best = (cost, np.array(u, dtype=float))
        if self.progress is not None:
            self.progress(self.evaluations, float(np.sqrt(np.mean(r * r))))
        if len(self._cache) > 64:
            self._cache.clear()
        self._cache[key] = (r, preds)
        if self.keep_traces:
            self.traces[key] = traces
        return r, preds

    def traced(self, u: np.ndarray) -> tuple[list[np.ndarray], dict]:
        """Predictions and model traces at ``u`` (a cached run without traces is rerun)."""
        key = np.asarray(u, dtype=float).tobytes()
        if key not in self.traces:
            self._cache.pop(key, None)
            self.keep_traces = True
            try:
                self.run(u)
            finally:
                self.keep_traces = False
        return self._cache[key][1], self.traces[key]

    def residuals(self, u: np.ndarray) -> np.ndarray:
        return self.run(u)[0]

    def search(self, u_start: np.ndarray, budget: int | None = None):
        """``scipy.optimize.least_squares`` from ``u_start`` with its own forward
        differences (``diff_step``; on ``u`` in [1, 2] the relative step is a fixed fraction
        of each range, never the ``sqrt(eps)`` it falls back to at zero). ``budget=1``
        gives the Jacobian at ``u_start`` and stops."""
        from scipy.optimize import least_squares

        budget = budget or max(self.limit - self.evaluations, 1)
        return least_squares(self.residuals, u_start, jac="2-point", diff_step=_DIFF_STEP,
                             bounds=(1.0, 2.0), method="trf", x_scale="jac", max_nfev=budget,
                             xtol=1e-6, ftol=1e-8, gtol=1e-8)

    def inert(self, jac_u: np.ndarray, r: np.ndarray) -> list[int]:
        """Parameters whose Jacobian column is negligible: they do not change the model's
        values near this point."""
        floor = 1e-9 * max(float(np.max(np.abs(r))), 1e-12)
        return [j for j in range(jac_u.shape[1]) if not np.any(np.abs(jac_u[:, j]) > floor)]

    def probe(self, u: np.ndarray, j: int) -> tuple[bool, np.ndarray | None]:
        """Parameter ``j`` along its range (:data:`_PROBES`), the others held at ``u``:
        ``(acts somewhere, the probe point of least cost if below the cost at u)``."""
        r0 = self.residuals(u)
        floor = 1e-9 * max(float(np.max(np.abs(r0))), 1e-12)
        acts, best, best_cost = False, None, float(r0 @ r0)
        for frac in _PROBES:
            trial = np.array(u, dtype=float)
            trial[j] = 1.0 + frac
            if abs(trial[j] - u[j]) < 1e-9:
                continue
            try:
                r = self.residuals(trial)
            except CalibrationError:  # the model cannot be run there: probe elsewhere
                continue
            acts = acts or bool(np.any(np.abs(r - r0) > floor))
            if float(r @ r) < best_cost:
                best, best_cost = trial, float(r @ r)
        return acts, best


def fit(observations: Sequence[Observation], parameters: Sequence[FitParameter], *,
        progress: Callable[[int, float], None] | None = None,
        cancel: Callable[[], bool] | None = None,
        max_evaluations: int | None = None) -> FitResult:
    """Fit parameters to observations by bounded nonlinear least squares.

    Parameters
    ----------
    observations : sequence of Observation
        At least one, with at least one reading each.
    parameters : sequence of FitParameter
        One to three, with ``lower < upper``.
    progress : callable, optional
        Called as ``progress(evaluations, rms)`` after each model run (``rms`` of the
        weighted residuals [-]); ``evaluations`` never exceeds the limit.
    cancel : callable, optional
        Polled during the runs; when it returns ``True`` the fit stops (status -2).
    max_evaluations : int, optional
        Most model runs, finite differences, probes and the runs before and after
        included; default :func:`run_limit`.

    Returns
    -------
    FitResult

    Raises
    ------
    CalibrationError
        When the model cannot be run at the starting values (the "before" state).

    Notes
    -----
    See the module docstring for the weights, the scaling, the probing of a parameter that
    seems not to act, and the confidence intervals (Bates & Watts 1988, ch. 2).
    """
    if not observations or not parameters:
        raise CalibrationError("a fit needs at least one measurement and one parameter")
    k = len(parameters)
    limit = run_limit(k) if max_evaluations is None else int(max_evaluations)
    # the search may use all but the reserve: a Jacobian at its best point if it is cut
    # short (k runs) and the run at the fitted values
    prob = _Problem(observations, parameters, progress, cancel, max(limit - k - 1, 1))
    if np.any(prob.scale <= 0.0):
        bad = next(p.key for p, s in zip(prob.params, prob.scale) if s <= 0.0)
        raise CalibrationError(f"{bad}: the lower bound must be below the upper bound")
    u0 = prob.to_u(np.array([p.start for p in prob.params], dtype=float))
    try:
        before, trace_before = prob.traced(u0)
    except _Cancelled:
        return _stopped(prob, u0, None, -2, "cancelled before the first model run ended")
    cut_short = False
    try:
        try:
            sol, plateau = _search_and_probe(prob, u0)
        except _OutOfRuns:  # the best point so far, with its Jacobian: intervals, correlation
            cut_short, prob.limit = True, max(limit, prob.evaluations + k + 1)
            sol, plateau = prob.search(prob.best[1], budget=1), []
        after, trace_after = prob.traced(sol.x)
    except _Cancelled:
        return _stopped(prob, u0, before, -2, "cancelled by the user")
    except _OutOfRuns:
        return _stopped(prob, prob.best[1], before, 0, f"stopped after {prob.evaluations} "
                        "model runs (the limit) before converging")
    except CalibrationError as exc:
        return _stopped(prob, u0, before, -3, str(exc))
    result = _summarise(prob, sol, sol.jac, before, after, plateau)
    if result.status == 0 or (cut_short and result.status > 0):
        result = dataclasses.replace(result, success=False, status=0, message=(
            f"stopped after {prob.evaluations} model runs (the limit) before converging; "
            "the values are the best found"))
    return dataclasses.replace(result, trace_before=trace_before, trace_after=trace_after)


def _search_and_probe(prob: _Problem, u0: np.ndarray):
    """The search from ``u0``; when a parameter then seems not to act, it is probed along
    its range and, if it acts elsewhere, the search starts again from the best probe (a
    poor start value can sit where the readings do not see it: a bore so wide that the tank
    has drained before the second reading). Returns ``(solution, plateau)``: ``plateau``
    lists the parameters that act elsewhere in their range but not near the solution."""
    sol = prob.search(u0)
    inert = prob.inert(sol.jac, sol.fun)
    if not inert:
        return sol, []
    plateau, restart = [], None
    for j in inert:
        acts, best = prob.probe(sol.x, j)
        if acts and best is not None and restart is None:
            restart = best
        elif acts:
            plateau.append(j)
    if restart is None:
        return sol, plateau
    sol = prob.search(restart)
    return sol, [j for j in prob.inert(sol.jac, sol.fun) if j in plateau]


def _stopped(prob: _Problem, u0, before, status: int, message: str) -> FitResult:
    k = len(prob.params)
    nan = np.full(k, np.nan)
    rms = {o.name: math.nan for o in prob.obs}
    if before is not None:
        rms = {o.name: _rms(p - o.values) for o, p in zip(prob.obs, before)}
    return FitResult(False, status, message, tuple(prob.params), prob.to_x(u0),
                     np.full((k, 2), np.nan), nan, np.full((k, k), np.nan), rms,
                     {o.name: math.nan for o in prob.obs}, {}, {},
                     {} if before is None else dict(zip((o.name for o in prob.obs), before)),
                     {}, evaluations=prob.evaluations)


def _summarise(prob: _Problem, sol, jac_u, before, after, plateau=()) -> FitResult:
    k = len(prob.params)
    x = prob.to_x(sol.x)
    r = np.concatenate([(p - o.values) / w for p, o, w in zip(after, prob.obs, prob.weights)])
    std, half, corr, dof, singular = linearised_statistics(jac_u, r, prob.scale, k)
    warnings: list[Finding] = []
    at_bound = tuple(p.key for p, u in zip(prob.params, sol.x)
                     if u - 1.0 <= 1e-6 or u - 1.0 >= 1 - 1e-6)
    status, success = (1, True) if sol.status > 0 else (0, False)
    message = "converged" if success else "stopped at the evaluation limit before converging"
    inert = prob.inert(jac_u, r)
    if inert:
        keys = tuple(prob.params[j].key for j in inert)
        words = (f"{', '.join(keys)} does not change the model's values at these readings "
                 "anywhere in its range (it does not act on them: e.g. a roughness in laminar "
                 "flow)") if not any(j in plateau for j in inert) else (
                 f"{', '.join(keys)} does not change the model's values near the value the "
                 "search stopped at, though it does elsewhere in its range: start from another "
                 "value")
        return dataclasses.replace(_stopped(prob, sol.x, before, -1,
                                            f"the fit did not converge: {words}"), at_bound=keys)
    if at_bound:
        status, success = -1, False
        words = "; ".join(_bound_words(prob, key, x) for key in at_bound)
        message = (f"the fit did not converge: {words}. Widen the range, or check that the "
                   "parameter acts on these readings and that the test conditions are right")
    if dof <= 0:
        warnings.append(Finding("calibration.no_interval", "calibration",
                                f"{r.size} reading(s) for {k} parameter(s): no confidence "
                                "interval can be given; add readings", "caution"))
    for i in range(k):
        for j in range(i + 1, k):
            if abs(corr[i, j]) > CORRELATION_LIMIT or (singular and dof > 0):
                warnings.append(Finding(
                    "calibration.correlated", prob.params[i].key,
                    f"{prob.params[i].key} and {prob.params[j].key} are correlated "
                    f"(r = {corr[i, j]:+.3f}): these readings cannot tell them apart, only a "
                    "combination of them is fitted; fit one of them, or add a test at other "
                    "conditions", "caution", "linearised regression statistics"))
    linear = np.column_stack([x - half, x + half])
    ci, cut = cut_interval(linear, np.maximum(prob.lower, 0.0), prob.upper)
    on_bound = np.array([p.key in at_bound for p in prob.params])
    ci[on_bound] = np.nan  # the linear theory needs an optimum inside the range: none here
    cut[on_bound] = False
    names = [o.name for o in prob.obs]
    return FitResult(
        success, status, message, tuple(prob.params), x, ci, std, corr,
        {o.name: _rms(p - o.values) for o, p in zip(prob.obs, before)},
        {o.name: _rms(p - o.values) for o, p in zip(prob.obs, after)},
        {o.name: float(np.max(np.abs(p - o.values))) for o, p in zip(prob.obs, before)},
        {o.name: float(np.max(np.abs(p - o.values))) for o, p in zip(prob.obs, after)},
        dict(zip(names, before)), dict(zip(names, after)), tuple(warnings),
        prob.evaluations, at_bound, ci95_linear=linear, ci95_cut=cut)


def _bound_words(prob: _Problem, key: str, x: np.ndarray) -> str:
    i = [p.key for p in prob.params].index(key)
    u = (x[i] - prob.lower[i]) / prob.scale[i]
    side = "lower" if u < 0.5 else "upper"
    return f"{key} ran to its {side} bound ({x[i]:.4g} SI)"
