"""The app's helpers never reach back into the app: it hands them what they need.

``files.py`` (save, open, quit), ``recovery_copy.py`` (the copy of unsaved edits) and the
key list take the app as a :class:`~workbench.app.host.DocumentHost` or are given the app's
class; none imports ``workbench.app.app``, not even for type checking, so the import graph
of the app has no circle through them. Read from the modules' source with ``ast``.
"""

from __future__ import annotations

import ast
from pathlib import Path

import pytest

APP = Path(__file__).resolve().parents[2] / "workbench" / "app"


def _imported_modules(path: Path) -> set[str]:
    names = set()
    for node in ast.walk(ast.parse(path.read_text())):
        if isinstance(node, ast.ImportFrom) and node.module:
            names.add(node.module)
            names.update(f"{node.module}.{a.name}" for a in node.names)
        elif isinstance(node, ast.Import):
            names.update(a.name for a in node.names)
    return names


@pytest.mark.parametrize("helper", ["files.py", "recovery_copy.py", "host.py", "screens/keys.py"])
def test_a_helper_of_the_app_never_imports_the_app(helper):
    assert "workbench.app.app" not in _imported_modules(APP / helper)


def test_the_app_owns_its_recovery_keeper():
    from workbench.app.app import WorkbenchApp
    from workbench.app.recovery_copy import RecoveryKeeper

    app = WorkbenchApp()
    assert isinstance(app.recovery, RecoveryKeeper)
    assert WorkbenchApp().recovery.owner != app.recovery.owner  # one copy per workbench
