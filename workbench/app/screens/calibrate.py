"""The calibration view: fit roughness, bores or losses to the project's site tests.

The screen gathers the parameters to fit (``KEYPATH[=LOW..HIGH]``, the same text as
``workbench calibrate --fit``) and the measurements to fit to, runs
:func:`workbench.project.calibration.calibrate` in a thread worker that reports each model
run and can be stopped, shows the fitted values with their intervals and a plot of the
readings against the model, and offers the fitted values as one undoable edit.
"""

from __future__ import annotations

from typing import Any, ClassVar

from textual import work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.message import Message
from textual.screen import Screen
from textual.suggester import SuggestFromList
from textual.widgets import Input, Label, ProgressBar, Static
from textual.worker import Worker, WorkerState, get_current_worker


def fit_suggestions(project: Any) -> list[str]:
    """``KEYPATH=`` texts of the numbers a fit can change, for the input's completion."""
    data = getattr(project, "data", {}) or {}
    out: list[str] = []
    for lid, table in (data.get("lines") or {}).items():
        out += [f"lines.{lid}.roughness=", f"lines.{lid}.inner_diameter="]
        valve = table.get("valve") if isinstance(table, dict) else None
        if isinstance(valve, dict):
            out += [f"lines.{lid}.valve.{k}=" for k in ("k_open", "kv_open") if k in valve]
        for n, item in enumerate(table.get("fittings") or [] if isinstance(table, dict) else [], 1):
            if isinstance(item, dict) and "k" in item:
                out.append(f"lines.{lid}.fittings[{n}].k=")
    return out


def result_text(run: Any, unit_system: str) -> str:
    """The fit in a few lines: each parameter (was, fitted, interval), each measurement's
    residuals, the warnings and the tested range."""
    import math

    from workbench.output.calibration import (
        DISPLAY_KIND,
        caution_text,
        interval_notes,
        interval_text,
    )
    from workbench.project.calibration import value_text
    from workbench.project.units import format_quantity

    res = run.result
    # the status line above says why a fit failed; here only that it did
    lines = [f"Fit {'converged' if res.success else 'did not succeed'} "
             f"({res.evaluations} model runs)."]
    cut = res.ci95_cut
    for i, p in enumerate(res.parameters):
        lo, hi = res.ci95[i]
        ends = (False, False) if cut is None else (bool(cut[i, 0]), bool(cut[i, 1]))
        interval = ("95 % " + interval_text(p, lo, hi, ends, unit_system)
                    if math.isfinite(lo) and math.isfinite(hi) else "no interval")
        lines.append(f"  {p.key}: {value_text(p, p.start, unit_system)} -> "
                     f"{value_text(p, float(res.values[i]), unit_system)} ({interval})")
    if interval_notes(run):  # the full words are in calibrate's table; the view is small
        lines.append("  * cut at zero or at the range searched: the readings bound it on one "
                     "side only")
    for m in run.measurements:
        kind = DISPLAY_KIND[m.quantity]
        before, after = res.rms_before.get(m.name), res.rms_after.get(m.name)

        def q(v):
            return "—" if v is None or not math.isfinite(v) else format_quantity(v, kind, unit_system, 3)
        lines.append(f"  {m.name}: RMS residual {q(before)} before, {q(after)} after")
    lines += [f"  {w.severity.upper()} {w.message}" for w in res.warnings]
    lines.append("CAUTION " + caution_text(run))
    return "\n".join(lines)


class CalibrateScreen(Screen[None]):
    """Fit parameters to the site tests in the background; apply the fit as one edit."""

    BINDINGS: ClassVar = [
        Binding("ctrl+r", "run_fit", "Run fit", id="calibrate.run"),
        Binding("ctrl+t", "apply_fit", "Apply fit", id="calibrate.apply"),
        Binding("escape", "stop_or_close", "Stop / close", id="calibrate.close"),
    ]

    DEFAULT_CSS = """
    CalibrateScreen { layout: vertical; }
    CalibrateScreen #calib-form { height: auto; padding: 0 1; }
    CalibrateScreen #calib-form Input { width: 1fr; height: 1; border: none; padding: 0 1; }
    CalibrateScreen #calib-form Input:focus { background: $boost; }
    CalibrateScreen .calib-row { height: 1; }
    CalibrateScreen .calib-row Label { width: 13; }
    CalibrateScreen #calib-status { height: auto; max-height: 3; padding: 0 1; }
    CalibrateScreen #calib-status.-error { color: $error; }
    CalibrateScreen #calib-progress { padding: 0 1; }
    CalibrateScreen #calib-result { height: auto; max-height: 10; padding: 0 1; overflow-y: auto; }
    CalibrateScreen #calib-plot-holder { height: 1fr; min-height: 6; }
    """

    class Progressed(Message):
        """A model run ended; ``rms`` is the relative residual so far, ``limit`` the most
        model runs the fit may make."""

        def __init__(self, runs: int, rms: float, limit: int = 0) -> None:
            super().__init__()
            self.runs = runs
            self.rms = rms
            self.limit = limit

    class Finished(Message):
        """The fit ended: ``run`` (a CalibrationRun), or ``error`` in words."""

        def __init__(self, run: Any, error: str | None) -> None:
            super().__init__()
            self.run = run
            self.error = error

    def __init__(self, project: Any = None) -> None:
        super().__init__()
        self._project = project
        self.run: Any = None
        """The last fit (a :class:`workbench.project.calibration.CalibrationRun`)."""
        self.running = False
        self.limit = 0
        """Most model runs the fit under way may make."""
        self.runs = 0
        """Model runs the fit under way has made so far."""

    @property
    def project(self) -> Any:
        return self._project if self._project is not None else getattr(self.app, "project", None)

    def compose(self) -> ComposeResult:
        suggestions = fit_suggestions(self.project)
        names = list((getattr(self.project, "data", {}) or {}).get("measurements") or {})
        with Vertical(id="calib-form"):
            with Horizontal(classes="calib-row"):
                yield Label("Fit")
                yield Input(placeholder="KEYPATH=LOW..HIGH; ... e.g. lines.L1.roughness=0.01..3 mm",
                            id="calib-fit", suggester=SuggestFromList(suggestions, case_sensitive=True))
            with Horizontal(classes="calib-row"):
                yield Label("Measurements")
                yield Input(placeholder="names separated by ',' (blank: all): " + ", ".join(names),
                            id="calib-measurements")
        words = ("Ctrl+R fits; Ctrl+T applies the fitted values as one edit (Ctrl+Z undoes); "
                 "Esc stops or closes.") if names else \
            "This project has no [measurements.NAME] tables: add the site test's readings first."
        yield Static(words, id="calib-status")
        yield ProgressBar(id="calib-progress", total=1, show_eta=False, show_percentage=False)
        yield Static("", id="calib-result", markup=False)
        yield Vertical(id="calib-plot-holder")
        # the key footer (a widget per key, most of the view's cost) comes after the form
        # has the focus: see on_mount

    def on_mount(self) -> None:
        self.query_one("#calib-fit", Input).focus()
        release = getattr(self.app, "release_keys", None)
        if release is not None:  # keys typed since F11, held by the app: to the form now
            release()
        self.call_after_refresh(self._mount_footer)

    def _mount_footer(self) -> None:
        from workbench.app.widgets.keyfooter import KeyFooter

        self.mount(KeyFooter(compact=True, show_command_palette=False))

    # --- running ---------------------------------------------------------------------
    def action_run_fit(self) -> None:
        if self.running or self.project is None:
            return
        fits = [t.strip() for t in self.query_one("#calib-fit", Input).value.split(";") if t.strip()]
        names = [t.strip() for t in self.query_one("#calib-measurements", Input).value.split(",")
                 if t.strip()]
        if not fits:
            self._status("Give a number to fit, as KEYPATH=LOW..HIGH.", error=True)
            return
        self.running = True
        self.run = None
        self.limit = 0  # the worker says (the fit's modules load there, not here)
        self._status("fitting… (each model run is a simulation of the test)")
        self.query_one("#calib-progress", ProgressBar).update(total=None, progress=0)
        self.fit_worker(self.project, fits, names or None)

    @work(thread=True, exclusive=True, exit_on_error=False, group="calibrate")
    def fit_worker(self, project: Any, fits: list[str], names: list[str] | None) -> None:
        # the fit's modules (scipy.optimize among them) load here, off the UI thread
        from workbench.core.calibration import CalibrationError, run_limit
        from workbench.project.calibration import FitSpecError, calibrate
        from workbench.project.problems import ProjectError

        worker = get_current_worker()
        limit = run_limit(len(fits))
        try:
            run = calibrate(project, fits, names,
                            progress=lambda n, rms: self.post_message(self.Progressed(n, rms, limit)),
                            cancel=lambda: worker.is_cancelled)
        except (FitSpecError, ProjectError, CalibrationError) as exc:
            self.post_message(self.Finished(None, str(exc)))
            return
        self.post_message(self.Finished(run, None))

    def on_calibrate_screen_progressed(self, message: Progressed) -> None:
        self.runs = message.runs
        self.limit = message.limit or self.limit
        self._status(f"fitting… model run {message.runs} (at most {self.limit}), relative RMS "
                     f"residual {message.rms:.3g}")

    def on_calibrate_screen_finished(self, message: Finished) -> None:
        self.running = False
        runs = message.run.result.evaluations if message.run is not None else self.runs
        self.query_one("#calib-progress", ProgressBar).update(total=max(runs, 1),
                                                              progress=max(runs, 1))
        if message.error is not None:
            self._status(message.error, error=True)
            return
        self.run = message.run
        res = self.run.result
        if res.success:
            self._status("The fit converged: Ctrl+T applies the fitted values (one edit).")
        elif res.status == -2:
            self._status("Stopped: nothing was changed.")
        else:
            self._status(res.message, error=True)
        self.query_one("#calib-result", Static).update(result_text(self.run, self._units()))
        self.draw_plot()

    def on_worker_state_changed(self, event: Worker.StateChanged) -> None:
        if event.worker.group == "calibrate" and event.state == WorkerState.ERROR:
            from workbench.app.jobs import explain

            self.running = False
            self._status(explain(event.worker.error), error=True)

    def action_stop_or_close(self) -> None:
        if self.running:
            self.workers.cancel_group(self, "calibrate")
            self._status("stopping… (the model run under way finishes first)")
            return
        self.dismiss(None)

    def action_apply_fit(self) -> None:
        from workbench.project.calibration import apply_fit
        from workbench.project.problems import ProjectError

        if self.run is None or not self.run.result.success:
            self._status("No converged fit to apply: run one with Ctrl+R.", error=True)
            return
        if self.run.project is not self.app.project:
            self._status("The project changed since the fit: run it again.", error=True)
            return
        try:
            self.app.apply_edit(apply_fit, self.run, label="calibration")
        except ProjectError as exc:
            self._status(str(exc), error=True)
            return
        keys = ", ".join(p.key for p in self.run.result.parameters)
        self.app.notify(f"calibrated {keys}; Ctrl+Z undoes it", timeout=4)
        self.dismiss(None)

    def _status(self, text: str, *, error: bool = False) -> None:
        status = self.query_one("#calib-status", Static)
        status.update(("✖ " if error else "") + text)
        status.set_class(error, "-error")

    def _units(self) -> str:
        return getattr(self.app, "unit_system", None) or getattr(self.project, "unit_system", "SI")

    # --- plot --------------------------------------------------------------------------
    def draw_plot(self) -> None:
        """Readings against the model before and after, for the first test in time."""
        import numpy as np
        from textual_plotext import PlotextPlot

        from workbench.output.calibration import DISPLAY_KIND
        from workbench.project.units import display_unit, to_display

        holder = self.query_one("#calib-plot-holder")
        plots = list(holder.query(PlotextPlot))
        plot = plots[0] if plots else PlotextPlot(id="calib-plot")
        if not plots:
            holder.mount(plot)
        plt = plot.plt
        plt.clear_data()
        plt.clear_figure()
        m = next((m for m in self.run.measurements if m.times is not None), None) if self.run else None
        if m is None:
            plt.title("no test in time to plot")
            plot.refresh()
            return
        units, kind = self._units(), DISPLAY_KIND[m.quantity]
        minutes = (m.times / 60.0).tolist()

        def y(values):
            return [float(v) for v in np.atleast_1d(to_display(np.asarray(values), kind, units))]
        for label, series, marker in (("model before", self.run.result.predicted_before, "."),
                                      ("model fitted", self.run.result.predicted_after, "*")):
            if m.name in series:
                plt.plot(minutes, y(series[m.name]), label=label, marker=marker)
        plt.scatter(minutes, y(m.values), label="measured", marker="o")
        plt.xlabel("time [min]")
        plt.ylabel(f"{m.quantity} {m.element} [{display_unit(kind, units)}]")
        plot.refresh()
