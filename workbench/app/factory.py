"""The one place the workbench app is built, for the CLI and for tests."""

from __future__ import annotations

from pathlib import Path
from typing import Any


def make_app(
    project: Any = None,
    *,
    path: str | Path | None = None,
    offer_new: bool = False,
    unit_system: str | None = None,
    debounce: float | None = None,
    prebuild_forms: bool = True,
    solve_ahead: bool = False,
):
    """Build the workbench around a project.

    Args:
        project: an already loaded ``Project`` (tests), or ``None``.
        path: a project file to load in the background after the first paint (the CLI).
        offer_new: with neither, ask to start from the starter template.
        unit_system: ``"SI"`` or ``"US"`` to override the file's display preference.
        debounce: seconds between an edit and its steady solve (tests may shorten it).
        prebuild_forms: build every section's form in idle time after loading, so that
            moving through the element list is quick (tests skip it to run faster).
        solve_ahead: with ``path``, load and solve the file in a child process on the
            other core while Textual is imported here and the first frame drawn
            (:mod:`workbench.app.solve_ahead`; the CLI asks for it). Started before the
            app module is imported, so the two overlap from the start.
    """
    ahead = None
    if solve_ahead and project is None and path is not None:
        from workbench.app.solve_ahead import SolveAhead

        ahead = SolveAhead.start(Path(path))
    from workbench.app.app import DEBOUNCE, WorkbenchApp

    return WorkbenchApp(
        project,
        path=Path(path) if path is not None else None,
        offer_new=offer_new,
        unit_system=unit_system,
        debounce=DEBOUNCE if debounce is None else debounce,
        prebuild_forms=prebuild_forms,
        ahead=ahead,
    )
