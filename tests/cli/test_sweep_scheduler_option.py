"""``workbench sweep --scheduler``: without Dask installed the command says what to install
and exits 2 (usage), running nothing; the option is in the help."""

from __future__ import annotations

import sys

from workbench.cli import main

PROJECT = """\
schema = 1
[project]
title = "Scheduler option"
[fluid]
kind = "water"
temperature = "20 degC"
[reservoirs.T]
kind = "constant_level"
bottom_elevation = "10 m"
level = "2 m"
[receivers.OUT]
kind = "open_discharge"
elevation = "0 m"
[lines.L]
from = "T"
to = "OUT"
length = "50 m"
inner_diameter = "100 mm"
roughness = "0.05 mm"
"""


def test_without_dask_the_scheduler_option_names_the_extra_and_exits_2(tmp_path, capsys, monkeypatch) -> None:
    path = tmp_path / "p.toml"
    path.write_text(PROJECT)
    monkeypatch.setitem(sys.modules, "distributed", None)  # import distributed -> ImportError
    code = main(["sweep", str(path), "--vary", "lines.L.length=40 m,60 m", "--json",
                 "--scheduler", "tcp://127.0.0.1:8786"])
    captured = capsys.readouterr()
    assert code == 2
    assert captured.out == ""
    assert "--scheduler: running on a cluster needs Dask" in captured.err
    assert "[cluster]" in captured.err and "Traceback" not in captured.err


def test_the_scheduler_option_is_in_the_sweep_help(capsys) -> None:
    try:
        main(["sweep", "--help"])
    except SystemExit as exc:
        assert exc.code == 0
    assert "--scheduler ADDRESS" in capsys.readouterr().out


def test_workers_with_a_scheduler_is_refused_in_words_not_silently_ignored(tmp_path, capsys,
                                                                            monkeypatch) -> None:
    """On a cluster the scheduler places the cases on the workers started there
    (``dask worker --nworkers``): a local process count cannot apply, so the two options
    together are a usage error (exit 2) said before anything runs or connects."""
    path = tmp_path / "p.toml"
    path.write_text(PROJECT)
    monkeypatch.setitem(sys.modules, "distributed", None)  # a connection attempt would fail
    code = main(["sweep", str(path), "--vary", "lines.L.length=40 m,60 m", "--json",
                 "--workers", "4", "--scheduler", "tcp://127.0.0.1:8786"])
    captured = capsys.readouterr()
    assert code == 2 and captured.out == ""
    assert "--workers" in captured.err and "does not apply with --scheduler" in captured.err
    assert "--nworkers" in captured.err and "needs Dask" not in captured.err
