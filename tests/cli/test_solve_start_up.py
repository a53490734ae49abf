"""``workbench solve`` starts light: the libraries it does not need are never imported.

Start-up target of the project (``tests/benchmarks/bench_startup.py`` measures it): the
whole ``solve`` process within twice the CPU of ``python -c "import numpy, scipy.sparse"``.
Timing a process is no test on a shared machine, so these check what a ``solve`` process
imported instead (``sys.modules`` in a fresh interpreter), each library named below costing
0.05 s or more to import: the terminal UI, plotting, the compiled kernel, pandas (through
``chemicals``' data tables), the test-only fluid reference, ``scipy.optimize`` (about 0.25 s;
the core's one-root searches use :mod:`workbench.core.brent`) and Dask (which pint imports
whenever it is installed, unless told otherwise: :func:`workbench.project.units.import_pint`).
"""

from __future__ import annotations

import importlib.util
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
DEMOS = sorted(str(p) for p in (ROOT / "projects").glob("*.toml"))
SINGLE_LINE_DEMO = str(ROOT / "projects" / "fellgate_neutraliser_drain.toml")

#: Top-level packages a ``solve`` never needs.
NEVER = ("dask", "distributed", "textual", "textual_plotext", "plotext", "matplotlib", "numba",
         "llvmlite", "pandas", "CoolProp")
#: Sub-packages of a needed library that ``solve`` never needs.
NEVER_SUB = ("scipy.optimize", "scipy.integrate")


def imported_by_solve(argv_list: list[list[str]]) -> list[str]:
    """For each argument list run in turn in one fresh interpreter: the unwanted modules
    loaded so far (imports only add modules, so the first list that shows one pulled it in)."""
    code = (
        "import contextlib, io, sys\n"
        "from workbench.cli import main\n"
        f"for argv in {argv_list!r}:\n"
        "    with contextlib.redirect_stdout(io.StringIO()):\n"
        "        status = main(argv)\n"
        f"    bad = sorted({{m.split('.')[0] for m in sys.modules if m.split('.')[0] in {NEVER!r}}}\n"
        f"                 | {{m for m in {NEVER_SUB!r} if m in sys.modules}})\n"
        "    print(status, ' '.join(argv), ','.join(bad) or '-')\n"
    )
    proc = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                          cwd=ROOT)
    assert proc.returncode == 0, proc.stderr[-2000:]
    return proc.stdout.strip().splitlines()


def test_the_demos_are_there_to_check() -> None:
    assert len(DEMOS) >= 5 and SINGLE_LINE_DEMO in DEMOS


@pytest.mark.parametrize("fmt", [[], ["--json"]], ids=["tables", "json"])
def test_solving_every_demo_imports_no_ui_plotting_optimiser_dask_or_data_tables(fmt) -> None:
    runs = [["solve", *fmt, demo] for demo in DEMOS]
    lines = imported_by_solve(runs)
    assert len(lines) == len(DEMOS)
    for line in lines:
        status, *_, bad = line.split(" ")
        assert status == "0" and bad == "-", line


def test_json_output_imports_no_table_library_and_one_line_no_sparse_solver() -> None:
    """rich draws the tables only; a network without junctions solves without
    ``scipy.sparse.linalg`` (its Schur complement is empty)."""
    code = (
        "import contextlib, io, sys\n"
        "from workbench.cli import main\n"
        "with contextlib.redirect_stdout(io.StringIO()):\n"
        f"    status = main(['solve', '--json', {SINGLE_LINE_DEMO!r}])\n"
        "print(status, ','.join(sorted(m for m in ('rich', 'scipy.sparse.linalg', 'scipy.linalg')\n"
        "                              if m in sys.modules)) or '-')\n"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         cwd=ROOT).stdout.strip()
    assert out == "0 -"


@pytest.mark.skipif(importlib.util.find_spec("dask") is None, reason="Dask is not installed")
def test_pint_comes_without_dask_and_a_later_import_of_dask_is_the_real_one() -> None:
    """The cluster sweep imports Dask after the project (and pint) was loaded."""
    code = (
        "import sys\n"
        "from workbench.project.units import get_registry, parse_quantity\n"
        "get_registry()\n"
        "print(parse_quantity('3 ft', 'length'), 'dask' in sys.modules)\n"
        "import dask.base, distributed\n"
        "print(dask.base.__name__, callable(dask.base.compute), 'distributed' in sys.modules)\n"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=True).stdout.split("\n")
    feet, dask_loaded = out[0].split()
    assert float(feet) == pytest.approx(0.9144, rel=1e-12)  # 1 ft = 0.3048 m (1959 agreement)
    assert dask_loaded == "False"
    assert out[1] == "dask.base True True"


@pytest.mark.skipif(importlib.util.find_spec("dask") is None, reason="Dask is not installed")
def test_pint_imported_after_dask_keeps_its_dask_support() -> None:
    code = (
        "import dask\n"
        "from workbench.project.units import import_pint\n"
        "import_pint()\n"
        "import pint.compat\n"
        "print(pint.compat.HAS_DASK)\n"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=True).stdout.strip()
    assert out == "True"


def _command_parsers(parser) -> dict:
    import argparse

    action = next(a for a in parser._actions if isinstance(a, argparse._SubParsersAction))
    return action.choices


def test_a_parser_built_for_one_command_reads_it_as_the_full_parser_does() -> None:
    """``main`` builds the options of the command it runs only; the help of every command,
    and the top-level help, are those of the parser with every command built."""
    from workbench.cli import COMMANDS, build_parser

    full = build_parser()
    for name in COMMANDS:
        one = build_parser(only=name)
        assert one.format_help() == full.format_help()
        assert _command_parsers(one)[name].format_help() == _command_parsers(full)[name].format_help()
        assert set(_command_parsers(one)) == set(COMMANDS)


def test_solving_imports_no_other_commands_module() -> None:
    code = (
        "import contextlib, io, sys\n"
        "from workbench.cli import main\n"
        "with contextlib.redirect_stdout(io.StringIO()):\n"
        f"    main(['solve', '--json', {SINGLE_LINE_DEMO!r}])\n"
        "print(','.join(sorted(m for m in sys.modules if m.startswith('workbench.cli.')\n"
        "                      and m.endswith('_cmd'))))\n"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         cwd=ROOT).stdout.strip()
    assert out == "workbench.cli.solve_cmd"
