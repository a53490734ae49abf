"""``check`` tells of unsaved edits a crashed workbench left beside a project.

The workbench keeps unsaved edits in a hidden copy beside the project and offers them at the
next ``open``; ``check`` (what a script or a colleague runs first) must not be silent about
them. It notes each copy left by a workbench that ended without saving, with the copy's
path, and a workbench still running with edits of its own, on stderr (and in ``--json``),
valid file or not. The exit status stays the file's verdict (README, *Exit status*: 0 valid,
1 invalid), and ``check`` changes nothing on disk.
"""

from __future__ import annotations

import json
import os
import re
import signal
import subprocess
import sys
import textwrap

from tests.hardening.harness import ROOT, run_cli, run_subprocess

DRAIN = ROOT / "projects" / "fellgate_neutraliser_drain.toml"
LINE = "210-DR-04"


def _keep_edits(path, length: str, *, stay: bool = False) -> subprocess.Popen:
    """Another process keeping a recovery copy of ``path`` as a workbench does; it exits at
    once (a crashed session) unless ``stay``."""
    script = textwrap.dedent(f"""
        import sys, time
        from workbench.project.document import load_project, set_value
        from workbench.project.recovery import Owner, write_recovery
        project = load_project({str(path)!r})
        edited = set_value(project, "lines.{LINE}.length", {length!r})
        write_recovery(project.path, edited.text, project.loaded_hash, Owner.new())
        print("kept", flush=True)
        if {stay!r}:
            time.sleep(120)
    """)
    process = subprocess.Popen([sys.executable, "-c", script], cwd=ROOT,
                               stdout=subprocess.PIPE, text=True)
    assert process.stdout.readline().strip() == "kept"
    if not stay:
        process.wait()
    return process


def _copies(path):
    return sorted(path.parent.glob(f".{path.stem}.recovery.*toml"))


def test_check_notes_a_crashed_sessions_copy_with_its_path_and_still_exits_0(tmp_path):
    path = tmp_path / "plant.toml"
    path.write_text(DRAIN.read_text())
    _keep_edits(path, "91 m")
    (copy,) = _copies(path)
    before = copy.read_bytes()
    outcome = run_cli(["check", str(path)], project_path=str(path))
    assert outcome.code == 0
    assert outcome.stdout.startswith(f"{path}: valid")
    note = outcome.stderr.strip()
    assert note.startswith(f"{path}: note: unsaved edits to plant.toml from ")
    assert str(copy) in note and f"'workbench open {path}' offers them back" in note
    assert _copies(path) == [copy] and copy.read_bytes() == before


def test_check_notes_the_copy_of_a_file_that_no_longer_loads_and_exits_1(tmp_path):
    path = tmp_path / "plant.toml"
    path.write_text(DRAIN.read_text())
    _keep_edits(path, "91 m")
    (copy,) = _copies(path)
    path.write_text("<<<<<<< ours\n" + DRAIN.read_text() + "=======\n>>>>>>> theirs\n")
    outcome = run_cli(["check", str(path)], project_path=str(path))
    assert outcome.code == 1
    assert "conflict marker" in outcome.stderr
    assert "note: unsaved edits to plant.toml" in outcome.stderr and str(copy) in outcome.stderr
    assert "changed on disk since those edits began" in outcome.stderr


def test_check_json_lists_the_copy_and_keeps_its_verdict(tmp_path):
    path = tmp_path / "plant.toml"
    path.write_text(DRAIN.read_text())
    _keep_edits(path, "91 m")
    (copy,) = _copies(path)
    outcome = run_cli(["check", str(path), "--json"], project_path=str(path))
    assert outcome.code == 0 and outcome.stderr == ""
    data = json.loads(outcome.stdout)
    assert data["valid"] is True
    (kept,) = data["files"][0]["recovery"]
    assert kept["path"] == str(copy) and "unsaved edits" in kept["message"]


def test_check_says_nothing_of_copies_when_there_are_none(tmp_path):
    path = tmp_path / "plant.toml"
    path.write_text(DRAIN.read_text())
    outcome = run_cli(["check", str(path)], project_path=str(path))
    assert outcome.code == 0 and outcome.stderr == ""


def test_check_notes_a_workbench_still_running_with_edits_and_does_not_offer_them(tmp_path):
    path = tmp_path / "plant.toml"
    path.write_text(DRAIN.read_text())
    other = _keep_edits(path, "91 m", stay=True)
    try:
        outcome = run_cli(["check", str(path)], project_path=str(path))
    finally:
        os.kill(other.pid, signal.SIGKILL)
        other.wait()
    assert outcome.code == 0
    assert (f"note: the file is open in another workbench (process {other.pid} on "
            in outcome.stderr)
    assert "offers them back" not in outcome.stderr


def test_check_leaves_a_stale_copy_where_it_is(tmp_path):
    """A copy equal to the file on disk (saved, copy not removed) is stale: ``open`` tidies
    it away, ``check`` neither reports nor touches it."""
    path = tmp_path / "plant.toml"
    path.write_text(DRAIN.read_text())
    _keep_edits(path, "91 m")
    (copy,) = _copies(path)
    lines = copy.read_text().split("\n")[1:]  # the copy's first line says what it is
    while lines and re.match(r"# (base-sha256|written|owner|project): ", lines[0]):
        lines.pop(0)  # then its header fields; the project's text follows
    path.write_text("\n".join(lines))
    outcome = run_cli(["check", str(path)], project_path=str(path))
    assert outcome.code == 0 and "note:" not in outcome.stderr
    assert _copies(path) == [copy]


def test_check_never_reads_a_pipe_or_device_in_the_place_of_a_copy(tmp_path):
    """A FIFO named like a copy, or a copy that links to /dev/zero, would block the read or
    never end it (issue: the project path must be a regular file; so must a copy)."""
    path = tmp_path / "plant.toml"
    path.write_text(DRAIN.read_text())
    os.mkfifo(tmp_path / ".plant.recovery.h-1-a.toml")
    (tmp_path / ".plant.recovery.h-2-b.toml").symlink_to("/dev/zero")
    outcome = run_subprocess(["check", str(path)], project_path=str(path), limit=20.0)
    assert outcome.ok and outcome.code == 0 and "note:" not in outcome.stderr
