"""A save killed at any step leaves the old file whole or the new one complete.

The save (workbench.project.save.atomic_write) writes a hidden temporary file beside the
project, flushes and fsyncs it, then renames it over the project with os.replace, which
POSIX makes atomic (rename(2): "If newpath already exists, it will be atomically replaced").
Here a real process is killed with SIGKILL -- no clean-up, no finally blocks -- at each
step in turn, and failures are injected at each step in-process; every time, the project
file must read back as exactly the old bytes or exactly the new ones.
"""

from __future__ import annotations

import os
import signal
import subprocess
import sys
import textwrap
from pathlib import Path

import pytest

from tests.hardening.harness import ROOT
from workbench.project import save as save_module
from workbench.project.document import ProjectError, load_project, save_project, set_value

DEMO = ROOT / "projects" / "fellgate_process_water_transfer.toml"

# Child process: load, change one value, and save with SIGKILL at the chosen step.
CHILD = textwrap.dedent("""
    import os, signal, sys
    from workbench.project import save as save_module
    from workbench.project.document import load_project, save_project, set_value

    step, path = sys.argv[1], sys.argv[2]
    project = set_value(load_project(path), "lines.310-PW-12.length", "250 m")
    real_fdopen, real_replace, real_open = os.fdopen, os.replace, os.open

    def die():
        os.kill(os.getpid(), signal.SIGKILL)

    class HalfThenDie:
        def __init__(self, handle):
            self.handle = handle
        def __enter__(self):
            return self
        def __exit__(self, *exc):
            return False
        def write(self, data):
            self.handle.write(data[: len(data) // 2])
            self.handle.flush()
            os.fsync(self.handle.fileno())
            die()

    if step == "before_write":
        save_module.os.fdopen = lambda fd, mode: die()
    elif step == "mid_write":
        save_module.os.fdopen = lambda fd, mode: HalfThenDie(real_fdopen(fd, mode))
    elif step == "before_replace":
        save_module.os.replace = lambda a, b: die()
    elif step == "after_replace":
        def replace_then_die(a, b):
            real_replace(a, b)
            die()
        save_module.os.replace = replace_then_die
    save_project(project)
    print("saved")
""")

STEPS = {  # step -> which file must be there afterwards
    "before_write": "old",
    "mid_write": "old",
    "before_replace": "old",
    "after_replace": "new",
    "no_kill": "new",
}


@pytest.fixture
def project_file(tmp_path):
    path = tmp_path / "transfer.toml"
    path.write_bytes(DEMO.read_bytes())
    return path


def _new_text(path: Path) -> str:
    return set_value(load_project(path), "lines.310-PW-12.length", "250 m").text


@pytest.mark.parametrize("step", STEPS)
def test_a_save_killed_at_each_step_leaves_the_old_file_or_the_complete_new_one(project_file, step):
    old = project_file.read_text(encoding="utf-8")
    new = _new_text(project_file)
    assert new != old
    proc = subprocess.run([sys.executable, "-c", CHILD, step, str(project_file)],
                          capture_output=True, text=True, timeout=120, cwd=ROOT)
    if step == "no_kill":
        assert proc.returncode == 0 and "saved" in proc.stdout, proc.stderr
    else:
        assert proc.returncode == -signal.SIGKILL, proc.stderr
    after = project_file.read_text(encoding="utf-8")
    assert after == (old if STEPS[step] == "old" else new)
    # Whatever is left behind is a hidden temporary file, never a second project file.
    others = [p.name for p in project_file.parent.iterdir() if p != project_file]
    assert all(name.startswith(".transfer.toml.") and name.endswith(".tmp") for name in others)
    assert load_project(project_file).system.lines["310-PW-12"].length in (240.0, 250.0)


@pytest.mark.parametrize("failing", ["mkstemp", "chmod", "replace"])
def test_a_save_that_fails_before_or_at_the_rename_keeps_the_old_file(project_file, monkeypatch,
                                                                     failing):
    old = project_file.read_bytes()
    project = set_value(load_project(project_file), "lines.310-PW-12.length", "250 m")

    def boom(*args, **kwargs):
        raise PermissionError(13, "Permission denied")

    import tempfile

    target = tempfile if failing == "mkstemp" else save_module.os
    monkeypatch.setattr(target, failing, boom)
    with pytest.raises(ProjectError, match="cannot save: Permission denied"):
        save_project(project)
    assert project_file.read_bytes() == old
    assert [p.name for p in project_file.parent.iterdir()] == ["transfer.toml"]


def test_a_save_into_a_read_only_folder_is_refused_with_a_message(project_file):
    if os.geteuid() == 0:
        pytest.skip("root ignores folder permissions")
    old = project_file.read_bytes()
    project = set_value(load_project(project_file), "lines.310-PW-12.length", "250 m")
    folder = project_file.parent
    folder.chmod(0o500)
    try:
        with pytest.raises(ProjectError, match="cannot save"):
            save_project(project)
    finally:
        folder.chmod(0o700)
    assert project_file.read_bytes() == old
