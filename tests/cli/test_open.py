"""``workbench open``: the exit status of the app as a process.

The statuses are the README's (*Reference: error messages*): 0 when the workbench is left
normally, 1 when the project could not be opened and the user quits, 3 for an internal error.
"""

from __future__ import annotations

import os
import shutil
import subprocess
import sys
import textwrap
from pathlib import Path

import pytest

from workbench.cli.exit_codes import ExitCode
from workbench.cli.open_cmd import exit_status

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "projects" / "fellgate_neutraliser_drain.toml"

#: Runs ``workbench open`` in a real process, headless, with ``{behaviour}`` (a statement,
#: ``self`` the app) run after the app's own mount.
SCRIPT = textwrap.dedent("""
    import sys
    from workbench.app.app import WorkbenchApp

    mount = WorkbenchApp.on_mount

    def on_mount(self):
        mount(self)
        {behaviour}

    WorkbenchApp.on_mount = on_mount
    from workbench.cli import main
    sys.exit(main(["open", sys.argv[1]]))
""")


def _open_with(behaviour: str, project: Path) -> subprocess.CompletedProcess:
    env = dict(os.environ, TEXTUAL_DRIVER="textual.drivers.headless_driver:HeadlessDriver",
               NO_COLOR="1")
    env.pop("WORKBENCH_DEBUG", None)
    return subprocess.run([sys.executable, "-c", SCRIPT.format(behaviour=behaviour), str(project)],
                          capture_output=True, text=True, env=env, cwd=project.parent,
                          timeout=600)


@pytest.fixture
def project(tmp_path: Path) -> Path:
    target = tmp_path / DEMO.name
    shutil.copy(DEMO, target)
    return target


def test_an_app_that_dies_of_an_exception_makes_open_exit_with_the_internal_error_status(project):
    proc = _open_with("raise RuntimeError('injected failure')", project)
    assert proc.returncode == ExitCode.INTERNAL, proc.stderr[-2000:]
    assert "internal error" in proc.stderr
    assert "This is a bug" in proc.stderr


def test_an_app_left_normally_makes_open_exit_zero(project):
    proc = _open_with("self.call_after_refresh(self.exit)", project)
    assert proc.returncode == ExitCode.OK, proc.stderr[-2000:]
    assert "internal error" not in proc.stderr


def test_an_app_that_quits_after_a_project_it_could_not_open_exits_one(project):
    proc = _open_with("self.call_after_refresh(self.exit, 1)", project)
    assert proc.returncode == ExitCode.INVALID, proc.stderr[-2000:]


@pytest.mark.parametrize(("result", "return_code", "expected"), [
    (None, 1, ExitCode.INTERNAL),   # Textual: run() returns None after a crash, return_code 1
    (None, 0, ExitCode.OK),
    (1, 0, ExitCode.INVALID),
    (7, 0, ExitCode.OK),            # a value that is no status of ours
])
def test_the_status_follows_textuals_return_code_before_the_apps_result(
        result, return_code, expected, capsys):
    assert exit_status(result, return_code) == expected
    assert ("internal error" in capsys.readouterr().err) == (expected == ExitCode.INTERNAL)
