"""Saves land in the file the user means: through symbolic links, keeping hard links, and
never over a read-only file without being told to.

Checked on the file system itself (inode numbers, link counts, modes), for the project
layer's save, ``workbench format`` and the app's Ctrl+S.
"""

from __future__ import annotations

import os
import stat
import subprocess
import sys

import pytest

from tests.app.conftest import SIZE, TRANSFER, make, settle
from tests.hardening.harness import ROOT
from workbench.project.document import load_project, save_project, set_value
from workbench.project.save import ReadOnlyFile

DEMO = ROOT / "projects" / TRANSFER
LINE = "310-PW-12"


def workbench(*args: str) -> subprocess.CompletedProcess:
    return subprocess.run([sys.executable, "-m", "workbench", *args], capture_output=True,
                          text=True, cwd=ROOT, timeout=120)


@pytest.fixture
def linked(tmp_path):
    """A project kept in one folder and opened through a symbolic link from another."""
    real = tmp_path / "store" / "transfer.toml"
    real.parent.mkdir()
    real.write_bytes(DEMO.read_bytes())
    link = tmp_path / "work" / "transfer.toml"
    link.parent.mkdir()
    link.symlink_to(real)
    return link, real


def test_a_save_through_a_symbolic_link_writes_the_real_file_and_keeps_the_link(linked):
    link, real = linked
    edited = set_value(load_project(link), f"lines.{LINE}.length", "263 m")
    save_project(edited)
    assert link.is_symlink() and os.readlink(link) == str(real)
    assert load_project(real).system.lines[LINE].length == 263.0


def test_a_save_keeps_hard_links_naming_the_same_file(tmp_path):
    first = tmp_path / "transfer.toml"
    first.write_bytes(DEMO.read_bytes())
    second = tmp_path / "transfer-hard-link.toml"
    os.link(first, second)
    inode = first.stat().st_ino
    save_project(set_value(load_project(first), f"lines.{LINE}.length", "264 m"))
    assert first.stat().st_ino == inode == second.stat().st_ino
    assert first.stat().st_nlink == 2
    assert load_project(second).system.lines[LINE].length == 264.0
    assert not list(tmp_path.glob(".*.tmp"))  # the safety copy is gone once the file is whole


def test_a_read_only_file_is_not_replaced_unless_asked(tmp_path):
    path = tmp_path / "transfer.toml"
    path.write_bytes(DEMO.read_bytes())
    path.chmod(0o444)
    edited = set_value(load_project(path), f"lines.{LINE}.length", "265 m")
    with pytest.raises(ReadOnlyFile) as refused:
        save_project(edited)
    assert "read-only" in str(refused.value.problems[0])
    assert path.read_bytes() == DEMO.read_bytes()
    save_project(edited, replace_read_only=True)
    assert load_project(path).system.lines[LINE].length == 265.0
    assert stat.S_IMODE(path.stat().st_mode) == 0o444  # still read-only


def test_format_writes_through_a_link_and_names_the_file_written(linked):
    link, real = linked
    real.write_text(real.read_text().replace('length = "', 'length =   "', 1))
    done = workbench("format", str(link))
    assert done.returncode == 0, done.stderr
    assert f"through the link to {real}" in done.stdout
    assert link.is_symlink()
    assert 'length =   "' not in real.read_text()


def test_format_refuses_a_read_only_file(tmp_path):
    path = tmp_path / "transfer.toml"
    path.write_text(DEMO.read_text().replace('length = "', 'length =   "', 1))
    path.chmod(0o444)
    before = path.read_bytes()
    done = workbench("format", str(path))
    assert done.returncode == 1
    assert "read-only: not overwritten" in done.stderr
    assert path.read_bytes() == before


@pytest.mark.parametrize("special", ["fifo", "/dev/zero", "/dev/urandom"])
def test_a_path_that_is_not_a_regular_file_is_refused_at_once(tmp_path, special):
    if special == "fifo":
        special = str(tmp_path / "pipe.toml")
        os.mkfifo(special)
    for command in ("check", "format", "open"):  # open said "no such file" for a pipe
        done = workbench(command, special)
        assert done.returncode == 1
        assert "is not a regular file" in done.stderr


async def test_ctrl_s_asks_before_replacing_a_read_only_file(project_file):
    from workbench.app.screens.dialogs import AskScreen

    path = project_file(TRANSFER)
    path.chmod(0o444)
    before = path.read_bytes()
    app = make(path)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        app.apply_edit(set_value, f"lines.{LINE}.length", "267 m")
        await pilot.press("ctrl+s")
        await pilot.pause()
        assert isinstance(app.screen, AskScreen) and "read-only" in app.screen.question
        await pilot.press("c")
        await pilot.pause()
        assert app.modified and path.read_bytes() == before
        await pilot.press("ctrl+s")
        await pilot.pause()
        await pilot.press("r")
        await pilot.pause()
        assert not app.modified
    assert load_project(path).system.lines[LINE].length == 267.0


async def test_ctrl_s_through_a_link_says_which_file_was_written(linked):
    link, real = linked
    notices = []
    app = make(link)
    app.notify = lambda message, **kw: notices.append(message)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        app.apply_edit(set_value, f"lines.{LINE}.length", "268 m")
        await pilot.press("ctrl+s")
        await pilot.pause()
        assert not app.modified
    assert any(f"through the link to {real}" in n for n in notices)
    assert link.is_symlink() and load_project(real).system.lines[LINE].length == 268.0
