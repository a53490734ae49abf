"""Unsaved edits survive a crash: the recovery copy round trip.

Written beside the project after an edit, removed by a clean save or quit, found and
offered on the next open after a crash (here: a process killed with SIGKILL while it had
unsaved edits), and turned back into the same model with the edits in it.
"""

from __future__ import annotations

import signal
import subprocess
import sys
import textwrap

import pytest

from tests.hardening.harness import ROOT
from workbench.project.document import ProjectError, load_project, save_project, set_value
from workbench.project.recovery import (
    find_recovery,
    recover_project,
    recovery_path,
    remove_recovery,
    write_recovery,
)

DEMO = ROOT / "projects" / "fellgate_neutraliser_drain.toml"


@pytest.fixture
def project_file(tmp_path):
    path = tmp_path / "drain.toml"
    path.write_bytes(DEMO.read_bytes())
    return path


def test_the_recovery_copy_is_a_hidden_file_beside_the_project(project_file):
    path = recovery_path(project_file)
    assert path.parent == project_file.parent
    assert path.name == ".drain.recovery.toml"


def test_edits_kept_in_a_recovery_copy_come_back_as_the_same_model(project_file):
    project = load_project(project_file)
    edited = set_value(project, "reservoirs.TK-210.level", "3.9 m")
    write_recovery(project_file, edited.text, project.loaded_hash)
    found = find_recovery(project_file)
    assert found is not None and not found.disk_changed
    recovered = recover_project(found)
    assert recovered.system == edited.system
    assert recovered.system.reservoirs["TK-210"].level == pytest.approx(3.9)
    assert recovered.modified  # still unsaved: the file on disk has the old level
    assert recovered.path == project_file
    saved = save_project(recovered, check_unchanged=True)
    remove_recovery(project_file)
    assert load_project(project_file).system == edited.system
    assert not saved.modified
    assert find_recovery(project_file) is None


def test_a_clean_save_or_quit_leaves_no_copy_to_offer(project_file):
    project = load_project(project_file)
    edited = set_value(project, "lines.210-DR-04.length", "90 m")
    write_recovery(project_file, edited.text, project.loaded_hash)
    assert recovery_path(project_file).exists()
    assert remove_recovery(project_file) is True
    assert not recovery_path(project_file).exists()
    assert remove_recovery(project_file) is False
    assert find_recovery(project_file) is None


def test_a_copy_equal_to_the_saved_file_is_stale_and_removed(project_file):
    project = load_project(project_file)
    write_recovery(project_file, project.text, project.loaded_hash)
    assert find_recovery(project_file) is None
    assert not recovery_path(project_file).exists()


def test_the_offer_says_when_the_file_changed_on_disk_since_the_edits_began(project_file):
    project = load_project(project_file)
    edited = set_value(project, "reservoirs.TK-210.level", "3.9 m")
    write_recovery(project_file, edited.text, project.loaded_hash)
    other = set_value(project, "lines.210-DR-04.length", "88 m")
    save_project(other)  # someone else saved meanwhile
    found = find_recovery(project_file)
    assert found.disk_changed
    assert "changed on disk" in found.describe()


def test_a_damaged_recovery_copy_is_refused_naming_the_copy(project_file):
    project = load_project(project_file)
    write_recovery(project_file, project.text.replace('length = "86 m"', 'length = "86 kg"'),
                   project.loaded_hash)
    found = find_recovery(project_file)
    with pytest.raises(ProjectError) as info:
        recover_project(found)
    assert str(recovery_path(project_file)) in str(info.value)
    assert "lines.210-DR-04.length" in str(info.value)


def test_a_foreign_file_with_the_recovery_name_is_not_offered(project_file):
    recovery_path(project_file).write_text("schema = 1\n", encoding="utf-8")
    assert find_recovery(project_file) is None
    assert recovery_path(project_file).exists()  # not ours: left alone


CRASHING_EDITOR = textwrap.dedent("""
    import os, signal, sys
    from workbench.project.document import load_project, set_value
    from workbench.project.recovery import write_recovery

    path = sys.argv[1]
    project = load_project(path)
    edited = set_value(project, "reservoirs.TK-210.level", "2.75 m")
    edited = set_value(edited, "lines.210-DR-04.length", "91 m")
    write_recovery(path, edited.text, project.loaded_hash)
    os.kill(os.getpid(), signal.SIGKILL)  # the session dies with the edits unsaved
""")


def test_edits_of_a_process_killed_before_saving_are_offered_on_the_next_open(project_file):
    before = project_file.read_bytes()
    proc = subprocess.run([sys.executable, "-c", CRASHING_EDITOR, str(project_file)],
                          capture_output=True, text=True, timeout=120, cwd=ROOT)
    assert proc.returncode == -signal.SIGKILL, proc.stderr
    assert project_file.read_bytes() == before  # the project itself was never touched
    found = find_recovery(project_file)
    assert found is not None
    recovered = recover_project(found)
    assert recovered.system.reservoirs["TK-210"].level == pytest.approx(2.75)
    assert recovered.system.lines["210-DR-04"].length == pytest.approx(91.0)
    # Only the two edited lines differ from the file on disk: comments and layout kept.
    old_lines = before.decode().splitlines()
    new_lines = recovered.text.splitlines()
    assert len(old_lines) == len(new_lines)
    assert sum(a != b for a, b in zip(old_lines, new_lines, strict=True)) == 2
