"""Saving is atomic: a file is either the old one or the complete new one, never partial."""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import pytest

from workbench.project import save as save_module
from workbench.project.document import ProjectError, load_project, save_project, set_value

DEMO = Path(__file__).resolve().parents[2] / "projects" / "fellgate_neutraliser_drain.toml"


@pytest.fixture
def project_file(tmp_path):
    path = tmp_path / "drain.toml"
    path.write_bytes(DEMO.read_bytes())
    return path


def leftovers(folder: Path) -> list[str]:
    return sorted(p.name for p in folder.iterdir() if p.name.endswith(".tmp"))


def test_a_save_writes_the_complete_new_file_and_no_temporary_files(project_file):
    project = set_value(load_project(project_file), "reservoirs.TK-210.level", "4.2 m")
    saved = save_project(project)
    assert project_file.read_text(encoding="utf-8") == project.text
    assert load_project(project_file).system.reservoirs["TK-210"].level == 4.2
    assert leftovers(project_file.parent) == []
    assert not saved.modified


@pytest.mark.parametrize("failing", ["replace", "fsync", "write"])
def test_a_save_that_fails_part_way_leaves_the_old_file_whole(project_file, monkeypatch, failing):
    old = project_file.read_bytes()
    project = set_value(load_project(project_file), "reservoirs.TK-210.level", "4.2 m")

    def boom(*args, **kwargs):
        raise OSError(28, "No space left on device")

    if failing == "replace":
        monkeypatch.setattr(save_module.os, "replace", boom)
    elif failing == "fsync":
        monkeypatch.setattr(save_module.os, "fsync", boom)
    else:
        real_fdopen = os.fdopen

        class HalfWriter:
            def __init__(self, handle):
                self.handle = handle

            def __enter__(self):
                return self

            def __exit__(self, *exc):
                self.handle.close()

            def write(self, data):
                self.handle.write(data[: len(data) // 2])
                raise OSError(28, "No space left on device")

        monkeypatch.setattr(save_module.os, "fdopen", lambda fd, mode: HalfWriter(real_fdopen(fd, mode)))
    with pytest.raises(ProjectError, match="No space left on device"):
        save_project(project)
    assert project_file.read_bytes() == old
    assert leftovers(project_file.parent) == []


def test_a_reader_never_sees_a_partial_file_while_saves_run(project_file):
    # Another process saves two versions in turn; every read here must be one of them.
    old = load_project(project_file)
    new = set_value(old, "project.description", "x" * 20000)
    versions = {old.text, new.text}
    writer = (
        "import sys\n"
        "from workbench.project.save import atomic_write\n"
        "texts = [open(sys.argv[2], encoding='utf-8').read(), open(sys.argv[3], encoding='utf-8').read()]\n"
        "for i in range(120):\n"
        "    atomic_write(sys.argv[1], texts[i % 2])\n"
    )
    a, b = project_file.parent / "a.txt", project_file.parent / "b.txt"
    a.write_text(old.text, encoding="utf-8")
    b.write_text(new.text, encoding="utf-8")
    proc = subprocess.Popen([sys.executable, "-c", writer, str(project_file), str(a), str(b)])
    reads = 0
    try:
        while proc.poll() is None:
            assert project_file.read_text(encoding="utf-8") in versions
            reads += 1
    finally:
        proc.wait(timeout=60)
    assert proc.returncode == 0 and reads > 0


def test_saving_a_project_without_a_path_is_refused(project_file):
    from workbench.project.document import load_project_text

    project = load_project_text(project_file.read_text(encoding="utf-8"))
    with pytest.raises(ProjectError, match="no file name"):
        save_project(project)


def test_a_file_changed_on_disk_is_not_overwritten_when_asked_to_check(project_file):
    project = load_project(project_file)
    project_file.write_text(project.text + "\n# edited elsewhere\n", encoding="utf-8")
    with pytest.raises(ProjectError, match="changed on disk"):
        save_project(project, check_unchanged=True)


def test_a_save_keeps_the_file_permissions(project_file):
    project_file.chmod(0o640)
    save_project(set_value(load_project(project_file), "project.title", "Drain"))
    assert project_file.stat().st_mode & 0o777 == 0o640
