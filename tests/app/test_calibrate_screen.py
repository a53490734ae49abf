"""The calibration view at 80x24 in the real workbench: fit in the background, apply as one
undoable edit.

The view must show what the project layer's fit gives for the same request
(:func:`workbench.project.calibration.calibrate`, run directly in the test; that fit is
itself checked against closed forms in tests/core/test_calibration.py), and its edit must be
the same as ``calibrate --write``'s (:func:`apply_fit`).
"""

from __future__ import annotations

from pathlib import Path

from tests.app.conftest import SIZE, make, settle
from tests.cli.test_calibrate import SMALL

FIT = "lines.L1.roughness=0.001..2 mm"


def _project(tmp_path: Path) -> Path:
    path = tmp_path / "rinse.toml"
    path.write_text(SMALL, encoding="utf-8")
    return path


async def _type(pilot, selector: str, text: str) -> None:
    """Put ``text`` in a field as a terminal pastes it (one event: the view is checked, not
    the typing of each character; keys typed one by one are checked below)."""
    from textual import events

    widget = pilot.app.screen.query_one(selector)
    widget.value = ""
    widget.focus()
    widget.post_message(events.Paste(text))
    await pilot.pause()
    assert widget.value == text


async def _wait_for_fit(pilot) -> None:
    screen = pilot.app.screen
    for _ in range(1200):
        await pilot.pause(0.05)
        await screen.workers.wait_for_complete()
        if not screen.running:
            await pilot.pause()
            return
    raise AssertionError("the fit never finished")


async def test_the_view_fits_in_the_background_and_applies_one_undoable_edit(tmp_path):
    from workbench.app.screens.calibrate import CalibrateScreen
    from workbench.project.calibration import calibrate
    from workbench.project.document import load_project

    path = _project(tmp_path)
    expected = calibrate(load_project(path), [FIT]).result.values[0]
    app = make(path)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("f11")
        await pilot.pause()
        assert isinstance(app.screen, CalibrateScreen)
        await _type(pilot, "#calib-fit", FIT)
        await pilot.press("ctrl+r")
        await _wait_for_fit(pilot)
        screen = app.screen
        assert screen.run.result.success
        assert abs(screen.run.result.values[0] - expected) <= 1e-9 * expected
        assert "lines.L1.roughness: 0.045 mm ->" in str(screen.query_one("#calib-result").render())
        await pilot.press("ctrl+t")
        await pilot.pause()
        assert not isinstance(app.screen, CalibrateScreen)
        assert abs(app.project.system.lines["L1"].roughness - expected) < 0.005 * expected
        assert "calibrated to drop on" in app.project.text
        await pilot.press("ctrl+z")
        await pilot.pause()
        assert app.project.text == SMALL


async def test_a_key_path_that_is_not_a_number_is_refused_in_words(tmp_path):
    path = _project(tmp_path)
    app = make(path)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("f11")
        await pilot.pause()
        await _type(pilot, "#calib-fit", "lines.L1.material")
        await pilot.press("ctrl+r")
        await _wait_for_fit(pilot)
        status = str(app.screen.query_one("#calib-status").render())
        assert "material is not a number" in status
        assert app.screen.run is None


async def test_the_progress_follows_the_real_model_runs_not_a_fixed_count(tmp_path, monkeypatch):
    """While the fit searches the bar has no end (how many runs it needs is not known
    beforehand) and the status counts the runs against the fit's limit
    (:func:`workbench.core.calibration.run_limit`); at the end the bar is full at the number
    of runs the fit really made."""
    from workbench.app.screens.calibrate import CalibrateScreen
    from workbench.core.calibration import run_limit

    seen = []
    shown = CalibrateScreen.on_calibrate_screen_progressed

    def watched(screen, message):  # what the view shows after each model run
        shown(screen, message)
        seen.append((message.runs, screen.query_one("#calib-progress").total,
                     str(screen.query_one("#calib-status").render())))

    monkeypatch.setattr(CalibrateScreen, "on_calibrate_screen_progressed", watched)
    app = make(_project(tmp_path))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await pilot.press("f11")
        await pilot.pause()
        await _type(pilot, "#calib-fit", FIT)
        await pilot.press("ctrl+r")
        await _wait_for_fit(pilot)
        screen = app.screen
        runs = screen.run.result.evaluations
        assert [n for n, _, _ in seen] == list(range(1, runs + 1))
        assert all(total is None for _, total, _ in seen)
        assert f"model run {runs} (at most {run_limit(1)})" in seen[-1][2]
        assert 3 <= runs <= run_limit(1) and runs != 60
        bar = screen.query_one("#calib-progress")
        assert (bar.total, bar.progress) == (runs, runs)
        assert f"({runs} model runs)" in str(screen.query_one("#calib-result").render())


async def test_keys_typed_at_once_after_f11_land_in_the_view(tmp_path):
    """F11 then the fit's text typed straight on, faster than the view is built (the keys
    are queued before the app has handled F11, as from a quick typist or a slow link):
    every key reaches the view's first field, none goes to the screen underneath."""
    from textual import events

    from workbench.app.screens.calibrate import CalibrateScreen

    app = make(_project(tmp_path))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        typed = "lines.L1"
        for key in ["f11", *typed]:
            app.post_message(events.Key(key, None if len(key) > 1 else key))
        for _ in range(100):
            await pilot.pause(0.05)
            if isinstance(app.screen, CalibrateScreen) and app.screen.query("KeyFooter"):
                break
        await pilot.pause()
        assert isinstance(app.screen, CalibrateScreen)
        assert app.screen.query_one("#calib-fit").value == typed
        assert app.project.text == SMALL  # nothing typed reached the project underneath


async def test_the_fits_modules_load_in_the_worker_not_on_the_screen(tmp_path, monkeypatch):
    """Neither opening the view nor starting a fit runs an import of the fitting modules
    (the least-squares search, the calibration layers) on the UI thread: they load in the
    worker, so the view answers keys while they load. (Showing the finished fit may use
    them: they are loaded by then.)"""
    import builtins
    import threading

    heavy = ("scipy.optimize", "workbench.core.calibration", "workbench.project.calibration")
    on_screen: list[str] = []
    real_import = builtins.__import__

    def watched(name, *args, **kwargs):
        if (threading.current_thread() is threading.main_thread() and name.startswith(heavy)
                and getattr(app.screen, "run", None) is None):  # before the fit's end
            on_screen.append(name)
        return real_import(name, *args, **kwargs)

    app = make(_project(tmp_path))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        monkeypatch.setattr(builtins, "__import__", watched)
        await pilot.press("f11")
        await pilot.pause()
        await _type(pilot, "#calib-fit", FIT)
        await pilot.press("ctrl+r")
        await pilot.pause()
        monkeypatch.setattr(builtins, "__import__", real_import)
        await _wait_for_fit(pilot)
        assert app.screen.run is not None and app.screen.run.result.success
    assert on_screen == []
