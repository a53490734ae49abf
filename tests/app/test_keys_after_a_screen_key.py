"""Keys typed straight after F9 (sweep), F8 (cautions) or F1 (keys): none is lost.

The keys are queued before the app has handled the screen key, as from a quick typist or a
slow link; they belong to the screen the key opens (its first field, or Esc to close it).
"""

from __future__ import annotations

from tests.app.conftest import SIZE, TRANSFER, make, settle


async def _type_at_once(app, pilot, keys, answered) -> None:
    """Queue ``keys`` at once, then wait until ``answered()`` has held, with no key waiting
    to be replayed, for a fifth of a second (at most about 10 s)."""
    from textual import events

    for key in keys:
        app.post_message(events.Key(key, None if len(key) > 1 else key))
    steady = 0
    for _ in range(200):
        await pilot.pause(0.05)
        steady = steady + 1 if app._held_keys is None and answered() else 0
        if steady >= 4:
            break
    await app.workers.wait_for_complete()
    await pilot.pause()


async def test_a_key_path_typed_at_once_after_f9_lands_in_the_sweeps_first_field(project_file):
    from workbench.app.screens.cautions import CautionsScreen
    from workbench.app.screens.sweep import SweepScreen

    app = make(project_file(TRANSFER))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        text_before = app.project.text
        typed = "lines.310"
        await _type_at_once(app, pilot, ["f9", *typed], lambda: isinstance(
            app.screen, SweepScreen) and app.screen.query_one("#sweep-vary-1").value == typed)
        assert isinstance(app.screen, SweepScreen)
        assert app.screen.query_one("#sweep-vary-1").value == typed
        # Esc typed at once after F8 closes the cautions again and lands back on the sweep
        await _type_at_once(app, pilot, ["f8", "escape"],
                            lambda: isinstance(app.screen, SweepScreen))
        assert not isinstance(app.screen, CautionsScreen)
        assert isinstance(app.screen, SweepScreen)
        # F1 opens the keys and F1 again closes them, as their own key line says
        await _type_at_once(app, pilot, ["f1"], lambda: type(app.screen).__name__ == "KeysScreen")
        assert type(app.screen).__name__ == "KeysScreen"
        await _type_at_once(app, pilot, ["f1"], lambda: isinstance(app.screen, SweepScreen))
        assert isinstance(app.screen, SweepScreen)
        assert app.project.text == text_before  # nothing typed reached the project
