"""The entry points of the elastic model: :func:`simulate_elastic` and :func:`run_elastic`."""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import replace

from workbench.core.elastic.grid import SPEED_TOLERANCE
from workbench.core.elastic.kernel import run_march
from workbench.core.elastic.post import assemble
from workbench.core.elastic.results import (
    STATUS_MESSAGES,
    ElasticResult,
    ElasticSetupError,
    GridCheck,
    failed,
)
from workbench.core.elastic.setup import prepare
from workbench.core.elastic.topology import connected_lines
from workbench.core.finding_text import KeptText
from workbench.core.model import System


def simulate_elastic(
    system: System,
    line_id: str,
    *,
    duration: float | None = None,
    max_duration: float | None = None,
    reaches: int | dict[str, int] | None = None,
    friction: str = "initial",
    speed_tolerance: float = SPEED_TOLERANCE,
    wave_speeds: dict[str, float] | None = None,
    progress: Callable[[float], None] | None = None,
    cancel: Callable[[], bool] | None = None,
    kernel: str = "auto",
    cavities: bool = True,
    grid_check: bool = True,
) -> ElasticResult:
    r"""Run the method of characteristics on the lines run together with a line.

    Parameters
    ----------
    system : System
        The validated system (SI).
    line_id : str
        A line of the system; every line joined to it through junctions is run with it
        (:func:`workbench.core.elastic.topology.connected_lines`): lines in series, branches
        and loops, with reservoirs, tanks and receivers at their ends and valves wherever a
        line has one.
    duration : float, optional
        Simulated time [s]. Default: the last valve movement plus
        :data:`DEFAULT_ROUND_TRIPS` round trips ``2*sum(L/a)`` of the lines, but no longer
        than the project's simulation duration when that is shorter.
    max_duration : float, optional
        Upper limit on the default duration [s] (e.g. a shorter ``--duration`` given for
        the whole run); ignored when ``duration`` is given.
    reaches : int or dict, optional
        Reach count for ``line_id`` (an int) or per line (a dict); default each line's
        ``surge.reaches``, else automatic (:data:`AUTO_REACHES` on the line with the
        shortest travel time ``L/a``, finer when a valve movement needs it, see
        :func:`workbench.core.elastic.grid.choose_grid`).
    friction : str
        A key of :data:`FRICTION_MODELS`.
    speed_tolerance : float
        Largest relative wave-speed adjustment accepted before the time step is refined [-].
    wave_speeds : dict, optional
        Wave speeds [m/s] per line that replace the Korteweg value (e.g. measured ones).
    progress : callable, optional
        Called with the fraction of simulated time done, 0..1.
    cancel : callable, optional
        Polled between blocks of steps; returning true stops the run (status -2).
    kernel : str
        ``"compiled"`` (numba), ``"numpy"`` or ``"auto"`` (the compiled kernel for a long
        run or once it is loaded, see :func:`workbench.core.elastic.kernel.choose_kernel`).
        Both give the same numbers to round-off. Without numba, numpy is always used.
    cavities : bool
        Model vapour cavities (discrete vapour cavity model,
        :mod:`workbench.core.elastic.boundaries`); false only flags the first contact with
        vapour pressure and lets the head fall below it (for comparison).

    Returns
    -------
    ElasticResult
        Never raises for a physical set-up problem: ``success`` is false and ``message``
        says what is missing.

    Notes
    -----
    The initial state is the steady flow at the valve openings at ``t = 0``
    (:mod:`workbench.core.elastic.steady`), an equilibrium of the discrete equations, even
    when the project asks a rigid-column run to start at rest.

    References
    ----------
    Wylie, E. B. and Streeter, V. L. (1993). *Fluid Transients in Systems*. Prentice Hall,
    ch. 3 (characteristics, boundary conditions, series pipes, Courant number).

    Examples
    --------
    Instantaneous closure at the end of a frictionless 600 m line: the valve head rises by
    Joukowsky's ``a*v0/g``.

    >>> from workbench.core.model import (FluidProps, Line, Receiver, Reservoir, System,
    ...                                   Valve, ValveSchedule)
    >>> water = FluidProps("water", 998.2, 1.0e-3, 2339.2, 2.19e9)
    >>> shut = Valve("linear", 62.0, schedule=ValveSchedule((0.0, 1e-6), (1.0, 0.0)))
    >>> line = Line("L1", "R1", "OUT", 600.0, 0.3, friction_factor=0.0, entrance_k=0.0,
    ...             valve=shut)
    >>> system = System("doc", water, {"R1": Reservoir("R1", "constant_level", 0.0, 20.0)},
    ...                 {}, {"OUT": Receiver("OUT", "open_discharge", 0.0)}, {"L1": line})
    >>> res = simulate_elastic(system, "L1", wave_speeds={"L1": 1300.0}, duration=0.5)
    >>> round(float(res.valve_head[1] - res.valve_head[0]), 2)
    330.78
    """
    try:
        lines = [system.lines[lid] for lid in connected_lines(system, line_id)]
        setup = prepare(system, line_id, lines, duration=duration, max_duration=max_duration,
                        reaches=reaches, friction=friction, tolerance=speed_tolerance,
                        speeds=wave_speeds, cavities=cavities)
        notes = setup.notes
        out, steps, cancelled, used = run_march(setup.plan, kernel, notes, progress, cancel)
    except (ElasticSetupError, ValueError, KeyError) as exc:
        # set-up problems (missing data, unknown fitting or characteristic names, bad wave
        # speed inputs) come back as a failed result whose message says what was wrong
        text = exc.args[0] if isinstance(exc, KeyError) and exc.args else exc
        return failed(f"{STATUS_MESSAGES[-1]} {text}")
    res = assemble(setup, out, steps, cancelled, system, used)
    if grid_check and res.cavity_zones and res.status == 1:
        res = _with_grid_check(res, system, line_id, duration=res.duration, friction=friction,
                               speed_tolerance=speed_tolerance, wave_speeds=wave_speeds,
                               kernel=kernel, cancel=cancel)
    return res


def _with_grid_check(res: ElasticResult, system: System, line_id: str, **kw) -> ElasticResult:
    """``res`` with the peaks of the same run on twice the reaches, and a note comparing them."""
    finer = {lid: 2 * n for lid, n in res.reaches.items()}
    check = simulate_elastic(system, line_id, reaches=finer, grid_check=False, **kw)
    if not check.success:
        return res
    gc = GridCheck(
        reaches=dict(check.reaches),
        max_head={lid: float(e.max_head.max()) for lid, e in check.envelopes.items()},
        max_pressure={lid: float(e.max_pressure.max()) for lid, e in check.envelopes.items()})
    parts, values = [], {}
    for k, (lid, e) in enumerate(res.envelopes.items()):
        values[f"a{k}"] = (float(e.max_pressure.max()), "pressure", 4)
        values[f"b{k}"] = (gc.max_pressure[lid], "pressure", 4)
        parts.append(f"{lid} {{a{k}}} with {res.reaches[lid]} reaches, {{b{k}}} with "
                     f"{gc.reaches[lid]}")
    note = KeptText("vapour cavities formed; the highest pressure depends on the grid (lumped "
                    "cavities at the computing sections): " + "; ".join(parts), **values)
    return replace(res, grid_check=gc, notes=res.notes + (note,))


def run_elastic(
    system: System,
    line_ids: tuple[str, ...] | list[str],
    *,
    duration: float | None = None,
    max_duration: float | None = None,
    progress: Callable[[float], None] | None = None,
    cancel: Callable[[], bool] | None = None,
) -> dict[str, ElasticResult]:
    """Run every group of lines that contains one of ``line_ids`` once; map each line to it.

    This is the entry point of ``workbench simulate``: pass
    ``elastic_line_ids(system, extra)``. A group that cannot be run gives a failed result
    (``success`` false) under each of its requested lines.

    Returns
    -------
    dict
        Line id -> the :class:`ElasticResult` of its group, for every line of every group
        run (requested lines first).
    """
    out: dict[str, ElasticResult] = {}
    n = max(len(line_ids), 1)
    for done, lid in enumerate(line_ids):
        if lid in out:
            continue
        try:
            chain = connected_lines(system, lid)
        except ElasticSetupError as exc:
            out[lid] = failed(f"{STATUS_MESSAGES[-1]} {exc}", line_ids=(lid,))
            continue
        sub = None
        if progress is not None:
            base = done / n
            sub = lambda frac, base=base: progress(base + frac / n)  # noqa: E731
        res = simulate_elastic(system, lid, duration=duration, max_duration=max_duration,
                               progress=sub, cancel=cancel)
        for member in chain:
            out.setdefault(member, res)
        if res.status == -2:
            break
    return out
