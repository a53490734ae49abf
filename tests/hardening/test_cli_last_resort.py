"""The command line never greets a user with a traceback, even when the program has a bug.

An exception nobody foresaw becomes exit 3 (``ExitCode.INTERNAL``) with "internal error"
and "please report"; a reader that goes away (``| head``) ends the run quietly; numeric
warnings from numpy and scipy do not print ahead of the real message.
"""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

from tests.hardening.harness import ROOT
from workbench.cli import main
from workbench.cli.exit_codes import ExitCode

DEMO = ROOT / "projects" / "fellgate_cooling_water_network.toml"


def test_an_unforeseen_exception_becomes_exit_3_with_a_request_to_report(monkeypatch, capsys):
    import workbench.cli.solve_cmd as solve_cmd

    def broken(args):
        raise ZeroDivisionError("injected fault")

    monkeypatch.setattr(solve_cmd, "run", broken)
    monkeypatch.delenv("WORKBENCH_DEBUG", raising=False)
    code = main(["solve", str(DEMO)])
    err = capsys.readouterr().err
    assert code == ExitCode.INTERNAL
    assert "internal error: ZeroDivisionError: injected fault" in err
    assert "please report" in err and "Traceback" not in err


def test_with_workbench_debug_set_the_exception_is_raised_for_developers(monkeypatch):
    import workbench.cli.solve_cmd as solve_cmd

    monkeypatch.setattr(solve_cmd, "run", lambda args: 1 / 0)
    monkeypatch.setenv("WORKBENCH_DEBUG", "1")
    try:
        main(["solve", str(DEMO)])
    except ZeroDivisionError:
        return
    raise AssertionError("the exception should have propagated with WORKBENCH_DEBUG set")


def test_a_reader_that_closes_the_pipe_early_gets_no_traceback():
    # `workbench solve --json ... | head -c 10`: the JSON is larger than what head reads.
    proc = subprocess.Popen([sys.executable, "-m", "workbench", "simulate", str(DEMO), "--json"],
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE, cwd=ROOT)
    proc.stdout.read(10)
    proc.stdout.close()
    err = proc.stderr.read().decode()
    code = proc.wait(timeout=120)
    assert "Traceback" not in err and "BrokenPipeError" not in err, err
    assert code in (0, 1)


def test_numeric_warnings_do_not_print_ahead_of_the_message(tmp_path):
    # A line 1e307 m long overflows numpy arithmetic; the user must see only the message.
    text = (ROOT / "projects" / "fellgate_neutraliser_drain.toml").read_text()
    path = Path(tmp_path) / "huge.toml"
    path.write_text(text.replace('length = "86 m"', 'length = "9.9e307 m"'))
    proc = subprocess.run([sys.executable, "-m", "workbench", "solve", str(path)],
                          capture_output=True, text=True, cwd=ROOT, timeout=120)
    assert proc.returncode in (0, 1)
    assert "Warning" not in proc.stderr, proc.stderr
    if proc.returncode == 1:
        assert proc.stderr.startswith(str(path)), proc.stderr


def test_a_file_nested_too_deeply_for_the_reader_gets_a_message(tmp_path, capsys):
    # Found by the fuzz suite (twice: it came back in a refactor): tomllib recurses per
    # nesting level and raised RecursionError on ``x = [[[[...]]]]`` a thousand deep.
    path = Path(tmp_path) / "deep.toml"
    path.write_text("schema = 1\njunk = " + "[" * 3000 + "]" * 3000 + "\n")
    code = main(["check", str(path)])
    assert code == ExitCode.INVALID
    assert capsys.readouterr().err.startswith(f"{path}: lists or tables nested too deeply")
