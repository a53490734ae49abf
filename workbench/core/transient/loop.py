"""The run loop: segments between schedule break points, solver steps, events and restarts.

A run is cut into *segments* at the valve, feed and draw-off schedules' break points (so a
valve shutting at a break point is landed exactly). Each segment is integrated step by
step through scipy's ``OdeSolver`` interface (progress and cancellation between steps);
after every accepted step the events are located on the dense output
(:mod:`.events`), the output grid points inside the step are kept, and the pressure
envelope is updated (:mod:`.recording`). A terminal event ends the step at its time, its
handler switches the run's state (:mod:`.handlers`), the lines are reconfigured and the
integrator restarts from there.
"""

from __future__ import annotations

import time

import numpy as np

from workbench.core.finding_text import duration_text
from workbench.core.transient import handlers, siphon
from workbench.core.transient.equations import Equations
from workbench.core.transient.events import EventSet, arm, find_events, first_terminal
from workbench.core.transient.model import TransientModel
from workbench.core.transient.options import RunOptions
from workbench.core.transient.recording import Recording
from workbench.core.transient.results import STATUS
from workbench.core.transient.state import RunState

#: Most integration steps of one run (a day's drain takes a few hundred).
STEP_BUDGET = 500_000
#: Most computing time of one run [s] (the demos take about a second).
WALL_BUDGET = 300.0


class InitialStateError(RuntimeError):
    """The steady state to start from was not found."""


class Run:
    """One simulation: the loop and what it keeps between segments."""

    def __init__(self, model: TransientModel, options: RunOptions, state: RunState,
                 progress=None, cancel=None):
        self.model = model
        self.options = options
        self.state = state
        self.progress = progress
        self.cancel = cancel
        self.eq = Equations(model, state)
        self.rec = Recording(model)
        self.events: EventSet | None = None
        self.nfev = self.njev = self.nlu = self.nsteps = 0
        self.started = time.monotonic()
        self.fed = np.zeros(model.nt)
        """Volume fed into each tank so far [m^3] (see :meth:`_integrate_external`)."""
        self.drawn = np.zeros(model.nt)
        """Volume drawn off each tank so far [m^3]."""
        self.last_progress = -1.0
        self.t_final = 0.0
        self.line_volumes = np.zeros(model.nt)
        """Net volume into each tank through its lines over the run [m^3] (the state's
        accumulator, integrated with the flows: see :mod:`.equations`)."""
        self.spilled = np.zeros(model.nt)
        """Volume spilled over each tank's overflow over the run [m^3], likewise."""
        self.grid = np.zeros(0)
        self.grid_i = 0

    @property
    def duration(self) -> float:
        return self.options.duration

    # ---------------------------------------------------------------- start
    def initial(self) -> np.ndarray:
        """The initial state ``[Q, V]``: at rest, or the steady flows at the initial levels
        and openings."""
        model = self.model
        v0 = np.array([g.volume(r.level) if r.level <= g.top else np.nan
                       for g, r in zip(model.geoms, model.tanks)])
        if np.isnan(v0).any():
            bad = [r.id for r, v in zip(model.tanks, v0) if np.isnan(v)]
            raise ValueError(f"tank(s) {', '.join(bad)}: initial level above the top of the shape")
        q0 = np.zeros(model.nl)
        p0 = model.gas.p0.copy()
        if self.options.initial_state == "steady":
            q0, p0 = self._steady_start(p0)
        x0 = model.gas.excess(v0, p0) if model.ng else np.zeros(0)
        return np.concatenate([q0, v0, x0, np.zeros(model.nw)])

    def _steady_start(self, p0: np.ndarray):
        """Steady flows at the initial levels and openings [m^3/s], and the gas spaces'
        gauge pressures [Pa]: a vented tank's is the one at which its vent passes the air
        its steady outflow makes room for (:func:`steady_gas_pressures`); a sealed tank
        keeps its initial pressure."""
        from workbench.core.network import solve_steady
        from workbench.core.transient.gas import steady_gas_pressures

        model = self.model
        levels = {r.id: r.level for r in model.tanks}
        openings = {}
        for i in model.valve_lines:
            lid = model.topo.line_ids[i]
            openings[lid] = float(model.lines.openings_at(0.0)[i])

        def solve(system):
            res = solve_steady(system, levels=levels, openings=openings)
            if not res.success:
                raise InitialStateError(
                    "the steady state at the initial levels and openings was not found: "
                    f"{res.message} (set the initial state to at_rest to start from rest)"
                )
            return res

        if model.ng:
            try:
                res, p0 = steady_gas_pressures(model, solve, p0)
            except ValueError as exc:
                raise InitialStateError(f"{exc} (set the initial state to at_rest to start "
                                        "from rest)") from None
        else:
            res = solve(model.system)
        q0 = np.array([res.lines[lid].flow for lid in model.topo.line_ids], dtype=float)
        self.steady_breaks = dict(res.siphon_breaks)
        return q0, p0

    def _start(self, y: np.ndarray) -> None:
        """Which tanks can drain, and the tanks already at or beyond their limits."""
        model, state = self.model, self.state
        nl, nt = model.nl, model.nt
        # which tanks count as draining: a line leaves them by its positive direction, or
        # the initial flow draws from them
        leaves = (model.t_rows < 0).any(axis=1) if nt else np.zeros(0, bool)
        draws = (model.t_rows * y[:nl][None, :] < 0).any(axis=1) if nt else np.zeros(0, bool)
        asked = np.array([r.draw_off > 0.0 or (r.draw_off_schedule is not None
                                               and max(r.draw_off_schedule.flows) > 0.0)
                          for r in model.tanks], dtype=bool)
        state.draining_capable = leaves | draws | asked
        siphon.start_broken(model, state, getattr(self, "steady_breaks", {}), y)
        for k, r in enumerate(model.tanks):
            if y[nl + k] <= model.v_min[k] and state.draining_capable[k]:
                handlers.drain(model, state, k, 0.0, y, started=True)
            if y[nl + k] >= model.v_over[k]:
                state.spilling[k] = True
                state.event(0.0, "tank.overflow", r.id,
                            f"tank {r.id} starts at or above its overflow level")

    def _tolerances(self, y: np.ndarray):
        """The absolute tolerance: the one asked, else scaled with the initial flows and
        the tanks' volumes (overflow volumes where they have one)."""
        if self.options.atol is not None:
            return self.options.atol
        model = self.model
        nl = model.nl
        if model.nt:
            scale_v = np.maximum(np.abs(y[nl:nl + model.nt]), np.where(np.isfinite(model.v_over),
                                                             model.v_over, 0.0))
        else:
            scale_v = np.zeros(0)
        q_scale = max(float(np.max(np.abs(y[:nl]), initial=0.0)), 1e-4)
        v_tol = np.maximum(1e-9 * scale_v, 1e-9)
        gas = model.gas
        # gas state X to a thousandth of a pascal of gauge pressure: X ~ V_g p_gauge/(R T)
        x_tol = 1e-3 * gas.v_shell * gas.rho_atm / gas.p_atm if model.ng else np.zeros(0)
        # the volume accumulators as the volumes
        return np.concatenate([np.full(nl, 1e-6 * q_scale), v_tol, x_tol, v_tol, v_tol])

    def segment_breaks(self) -> list[float]:
        """Segment ends: valve, feed and draw-off schedule break points, then the end."""
        times = set()
        for i in self.model.valve_lines:
            valve = self.model.system.lines[self.model.topo.line_ids[i]].valve
            if valve.schedule is not None:
                times.update(t for t in valve.schedule.times if 0.0 < t < self.duration)
        times.update(t for t in self.model.schedule_times() if 0.0 < t < self.duration)
        return sorted(times) + [self.duration]

    # ---------------------------------------------------------------- configuration
    def configure(self, t_a: float, t_b: float, y: np.ndarray) -> np.ndarray:
        """Set the open lines for the segment ``[t_a, t_b]``; returns the adjusted state."""
        model, state = self.model, self.state
        lines = model.lines
        self.eq.clear_cache()
        shut_a = lines.closed(lines.openings_at(t_a))
        shut_b = lines.closed(lines.openings_at(t_b))
        valve_shut = shut_a & shut_b
        y = y.copy()
        if state.valve_shut is not None:
            self._valve_moves(t_a, shut_a, valve_shut, y)
        state.valve_shut = valve_shut
        floor = lines.has_valve & ~valve_shut
        # valves shutting at the end of this segment: the last 0.1 % of their flow is not
        # used for pressures (see Recording.track)
        self.rec.closing = lines.has_valve & ~valve_shut & shut_b
        for _ in range(model.nl + model.nt + 1):
            open_lines = ~valve_shut & ~state.blocked & ~state.backstopped & ~state.siphon_stopped
            y[: model.nl][~open_lines] = 0.0
            self.eq.reset(model.configuration(open_lines, state.spilling), floor)
            y[: model.nl] = self.eq.cfg.project(y[: model.nl])
            if handlers.end_spills_in_deficit(self.eq, t_a, y):
                continue  # a tank no longer held at its overflow: configure again
            if not self._stop_dry_discharges(t_a, y, open_lines):
                break
        # a reversal in the new configuration needs a real swing of the flow first
        state.peak_since_rev = np.zeros(model.nl)
        self.events = arm(self.eq)
        return y

    def _valve_moves(self, t_a, shut_a, valve_shut, y) -> None:
        """Valve moves landed exactly on the schedule's break points: a valve shut at
        ``t_a`` stops its line (``y`` changed in place), one opening is listed."""
        model, state = self.model, self.state
        prev = state.valve_shut
        for i in model.valve_lines:
            if state.blocked[i]:
                continue
            lid = model.topo.line_ids[i]
            if shut_a[i] and not prev[i]:
                y[i] = 0.0
                state.event(t_a, "valve.closed", lid, f"the valve on line {lid} is shut")
            if (prev[i] or shut_a[i]) and not valve_shut[i]:
                state.event(t_a, "valve.opened", lid, f"the valve on line {lid} starts to open")

    def _stop_dry_discharges(self, t_a, y, open_lines) -> bool:
        """Stop discharge lines at rest whose upstream head is below their open outlet (they
        cannot start); returns whether any was stopped (the lines are then reconfigured)."""
        model, state = self.model, self.state
        drive = self.eq.discharge_drive(t_a, y)
        q = y[: model.nl]
        stop = open_lines & model.is_discharge & (model.discharge_sign * q <= 0.0) & (drive < 0.0)
        if not stop.any():
            return False
        state.backstopped |= stop
        if t_a > 0.0:
            for i in np.flatnonzero(stop):
                lid = model.topo.line_ids[i]
                state.event(t_a, "line.reversal", lid,
                            f"line {lid} cannot discharge: the head upstream is below its "
                            "open outlet (air enters and the line stops)")
        return True

    # ---------------------------------------------------------------- main loop
    def execute(self) -> tuple[int, str]:
        """Run to the end, a stop condition, a cancel or a failure; returns ``(status,
        message)`` (see :data:`~workbench.core.transient.results.STATUS`)."""
        try:
            y = self.initial()
        except InitialStateError as exc:
            return -1, str(exc)
        self._start(y)
        atol = self._tolerances(y)
        self.state.q_peak = np.abs(y[: self.model.nl])
        grid = np.arange(0.0, self.duration + 0.5 * self.options.output_interval,
                         self.options.output_interval)
        self.grid = grid[grid <= self.duration]
        status, message, t = 0, STATUS[0], 0.0
        seg_start = 0.0
        for seg_end in self.segment_breaks():
            y = self.configure(seg_start, seg_end, y)
            if seg_start == 0.0:
                self._record_start(y)
            status, message, t, y = self._segment(seg_start, seg_end, y, atol)
            if status != 0:
                break
            if self.rec.t_out[-1] != seg_end:
                self.rec.record(seg_end, y, self.eq.cfg.open, self.state)
            # valve break point: closures landed exactly on the schedule time
            if seg_end >= self.duration:
                handlers.valve_end(self.model, self.state, seg_end)
            seg_start = seg_end
        if status in (1, 2, -1) and (not self.rec.t_out or self.rec.t_out[-1] != t):
            self.rec.record(t, y, self.eq.cfg.open, self.state)
        self.report_progress(t, force=True)
        self.t_final = t
        ne, nt = self.model.ne, self.model.nt
        self.line_volumes = np.array(y[ne:ne + nt], dtype=float)
        self.spilled = np.array(y[ne + nt:ne + 2 * nt], dtype=float)
        return status, message

    def _record_start(self, y: np.ndarray) -> None:
        self.rec.record(0.0, y, self.eq.cfg.open, self.state)
        self.rec.track(self.eq, 0.0, y, self.eq.rhs(0.0, y)[: self.model.nl])
        self.grid_i = 1

    def _solver(self, t, y, t_end, atol):
        from scipy import integrate

        solver_cls = getattr(integrate, self.options.method)
        kwargs = dict(rtol=self.options.rtol, atol=atol)
        if self.options.method == "LSODA" and self.model.sparse:  # ODEPACK: dense or banded
            kwargs["jac"] = lambda t, y: self.eq.jac(t, y).toarray()
        elif self.options.method != "RK45":
            kwargs["jac"] = self.eq.jac
        return solver_cls(self.eq.rhs, t, y, t_end, **kwargs)

    def _segment(self, seg_start, seg_end, y, atol):
        """Integrate one segment, restarting after terminal events; returns ``(status,
        message, t, y)`` with status 0 when the segment's end was reached."""
        t = seg_start
        while t < seg_end:
            solver = self._solver(t, y, seg_end, atol)
            status, message, t, y, restart = self._advance(solver, t, y, seg_end)
            self.nfev += solver.nfev
            self.njev += getattr(solver, "njev", 0)
            self.nlu += getattr(solver, "nlu", 0)
            if status != 0:
                return status, message, t, y
            if not restart:
                t, y = solver.t, solver.y.copy()
        return 0, STATUS[0], t, y

    def _advance(self, solver, t, y, seg_end):
        """Step ``solver`` until it finishes, fails, is cancelled or meets a terminal
        event; returns ``(status, message, t, y, restarted)``."""
        while solver.status == "running":
            if self.cancel is not None and self.cancel():
                return 2, f"cancelled at {duration_text(t)}", t, y, False
            t_old, y_old = solver.t, solver.y.copy()
            msg = solver.step()
            self.nsteps += 1
            over = self._over_budget(solver.t)
            if over:
                return -1, over, t, y, False
            if solver.status == "failed":
                return -1, (
                    f"integration failed at t = {solver.t:.6g} s: {msg}; results up "
                    "to then are kept. Check for a valve that shuts almost at once, a "
                    "line with almost no length or resistance, or a level at a tank's "
                    "limits; a slower valve move or a shorter duration may help"), t, y, False
            t, y, hits = self._accept(solver, t_old, y_old)
            if hits:
                stop = handlers.apply_terminal(self.model, self.state, self.events, hits, y,
                                               self.options.stop_when, eq=self.eq)
                if self.rec.t_out[-1] != t:
                    self.rec.record(t, y, self.eq.cfg.open, self.state)
                if stop:
                    return 1, f"every draining tank drained by {duration_text(t)}", t, y, False
                y = self.configure(t, seg_end, y)
                return 0, STATUS[0], t, y, True
        return 0, STATUS[0], t, y, False

    def _over_budget(self, t: float) -> str:
        """Why the run stops here (the step or computing-time budget is spent), or ``""``.

        Every run is bounded: a stiff system (a valve with a minute Kv, a schedule that
        moves every few milliseconds) could otherwise step for hours. The run stops as an
        integration failure does: the results up to ``t`` are kept and marked incomplete.
        """
        spent = time.monotonic() - self.started
        if self.nsteps < STEP_BUDGET and spent < WALL_BUDGET:
            return ""
        what = (f"{STEP_BUDGET:,} integration steps" if self.nsteps >= STEP_BUDGET
                else f"{WALL_BUDGET:.0f} s of computing")
        return (f"integration stopped at t = {t:.6g} s of {self.duration:.6g} s after {what} "
                "(the run's budget); results up to then are kept. The system is very stiff "
                "here: look for a valve that moves every few milliseconds, a valve or line "
                "with almost no flow area, or a level at a tank's limits; a coarser valve "
                "schedule or a shorter duration may help")

    def _accept(self, solver, t_old, y_old):
        """Handle one accepted step: events located, output points kept, peaks and
        pressures tracked, up to the first terminal event; returns ``(t, y, hits)``."""
        nl = self.model.nl
        t_new, y_new = solver.t, solver.y
        sol = solver.dense_output()
        found = find_events(self.eq, self.events, sol, t_old, y_old, t_new, y_new)
        hits = first_terminal(self.events, found)
        t_stop = hits[0][0] if hits else t_new
        self._record_grid(sol, t_old, t_stop)
        for te, k in found:
            if te <= t_stop and not self.events.terminal[k]:
                handlers.reversal(self.model, self.state, int(self.events.index_of[k]), te)
                if self.model.ng:
                    handlers.sealed_stop(self.model, self.state, int(self.events.index_of[k]),
                                         te, sol(te))
        y_stop = y_new.copy() if t_stop == t_new else sol(t_stop)
        self._integrate_external(t_old, t_stop)
        self.state.note_peaks(y_stop[:nl])
        delta = 1e-3 * (t_stop - t_old)
        if delta > 0.0:
            qdot = (y_stop[:nl] - sol(t_stop - delta)[:nl]) / delta
        else:  # an event right at the step's start
            qdot = self.eq.rhs(t_stop, y_stop)[:nl]
        self.rec.track(self.eq, t_stop, y_stop, qdot)
        self.report_progress(t_stop)
        return t_stop, y_stop, hits

    def _integrate_external(self, t_a: float, t_b: float) -> None:
        """Add the feed and the delivered draw-off of ``[t_a, t_b]`` to the run's totals.

        The segments end at every schedule break point, so within a step the schedules are
        linear and the trapezoidal rule is exact; a tank's drained state changes only at
        terminal events, which end a step. The totals are so exact however fast a tank
        drains and refills between output samples.
        """
        model = self.model
        if not model.has_ext or t_b <= t_a:
            return
        feed_a, draw_a = model.external(t_a)
        feed_b, draw_b = model.external(t_b)
        delivering = ~self.state.drained
        self.fed += 0.5 * (feed_a + feed_b) * (t_b - t_a)
        self.drawn += np.where(delivering, 0.5 * (draw_a + draw_b), 0.0) * (t_b - t_a)

    def _record_grid(self, sol, t_old, t_stop) -> None:
        """Keep the output grid points inside the accepted part ``(t_old, t_stop]``."""
        g_end = int(np.searchsorted(self.grid, t_stop, side="right"))
        if g_end > self.grid_i:
            tg = self.grid[self.grid_i:g_end]
            tg = tg[tg > t_old]
            if tg.size:
                self.rec.record_many(tg, sol(tg), self.eq.cfg.open, self.state)
            self.grid_i = g_end

    def report_progress(self, t, force=False) -> None:
        if self.progress is None:
            return
        frac = min(max(t / self.duration, 0.0), 1.0)
        if force or frac - self.last_progress >= 0.002:
            self.last_progress = frac
            self.progress(frac)
