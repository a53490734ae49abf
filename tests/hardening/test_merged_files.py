"""A file left in the middle of a version-control merge is named as such.

Conflict markers are seven '<', '=', '>' (or '|' in the diff3 style) at the start of a line
(git-merge(1), "How conflicts are presented"). Whatever the merge broke, the message names
the markers and their lines, and says what to do -- never a TOML syntax error about '<'.
"""

from __future__ import annotations

import pytest

from tests.hardening.harness import ROOT, run_cli
from workbench.cli.exit_codes import ExitCode

DEMO = ROOT / "projects" / "fellgate_process_water_transfer.toml"


def _conflicted(style: str) -> tuple[str, list[int]]:
    lines = DEMO.read_text(encoding="utf-8").splitlines()
    i = next(n for n, line in enumerate(lines) if line.startswith("length = "))
    ours, theirs = lines[i], 'length = "255 m"'
    if style == "merge":
        block = ["<<<<<<< HEAD", ours, "=======", theirs, ">>>>>>> feature/longer-line"]
    else:  # diff3: the common ancestor between '|||||||' and '======='
        block = ["<<<<<<< ours", ours, "||||||| base", 'length = "230 m"', "=======", theirs,
                 ">>>>>>> theirs"]
    new = lines[:i] + block + lines[i + 1:]
    markers = [i + 1 + k for k, line in enumerate(block) if line[:7] in
               ("<<<<<<<", "=======", ">>>>>>>", "|||||||")]
    return "\n".join(new) + "\n", markers


@pytest.mark.parametrize("command", ["check", "solve", "simulate", "format"])
@pytest.mark.parametrize("style", ["merge", "diff3"])
def test_conflict_markers_are_named_with_their_lines_by_every_command(tmp_path, command, style):
    text, marker_lines = _conflicted(style)
    path = tmp_path / "merged.toml"
    path.write_text(text, encoding="utf-8")
    argv = [command, str(path)] + (["--duration", "1 s"] if command == "simulate" else [])
    outcome = run_cli(argv, project_path=str(path))
    assert outcome.ok, outcome.report()
    assert outcome.code == ExitCode.INVALID
    err = outcome.stderr
    assert "conflict marker" in err and "merge" in err
    for line in marker_lines:
        assert f"{path}:{line}:1: version-control conflict marker" in err, err
    assert path.read_text(encoding="utf-8") == text  # format must not rewrite it
