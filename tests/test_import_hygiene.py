"""The numeric core must stay importable without the UI libraries or pint, and the package's
imports point one way.

Every core module (sub-packages included) is imported, one after the other, in a fresh
interpreter; the test fails if textual, rich or pint was loaded as a side effect, and names
the module that loaded it (layering rule of STYLE.md, item 1).

The import graph is read from the source files by ``tools/import_graph.py`` (its docstring
says what counts as an edge: imports inside functions do, ``TYPE_CHECKING`` ones do not),
and must have no circle and no edge pointing up the layers core <- project <- output <-
sweep_runner <- cli/app.
"""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
CORE = ROOT / "workbench" / "core"


def _dotted(path: Path) -> str:
    parts = list(path.relative_to(ROOT).with_suffix("").parts)
    return ".".join(parts[:-1] if parts[-1] == "__init__" else parts)


#: Every core module, those of sub-packages (core/elastic/, core/fluid/, ...) included.
CORE_MODULES = sorted(_dotted(p) for p in CORE.rglob("*.py") if p.parent != CORE
                      or p.stem != "__init__")
#: The core's top-level modules and sub-packages; each is checked in one interpreter with
#: all the modules under it.
CORE_UNITS = sorted({".".join(m.split(".")[:3]) for m in CORE_MODULES})
FORBIDDEN = ("textual", "rich", "pint")


def fresh_stdout(code: str) -> str:
    """What ``code`` prints when run in a new interpreter (so its imports start from none)."""
    return subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, check=True
    ).stdout.strip()


def first_pulled_in(modules: list[str], path: Path | None = None) -> dict[str, str]:
    """Import ``modules`` in order in one new interpreter (``path`` first on its search
    path): ``{module: the forbidden modules first loaded by importing it}``.

    Imports only add modules, so the module after which a forbidden one appears is the one
    that pulls it in.
    """
    code = (
        "import sys, importlib\n"
        f"sys.path[:0] = {[str(path)] if path else []!r}\n"
        "seen = set()\n"
        f"for name in {modules!r}:\n"
        "    importlib.import_module(name)\n"
        f"    bad = sorted(m for m in sys.modules if m.split('.')[0] in {FORBIDDEN!r})\n"
        "    new = [m for m in bad if m not in seen]\n"
        "    seen.update(bad)\n"
        "    if new:\n"
        "        print(name, ','.join(new))\n"
    )
    return dict(line.split(" ", 1) for line in fresh_stdout(code).splitlines())


@pytest.fixture(scope="module")
def pulled_in() -> dict[str, str]:
    """Every core module in one interpreter: one start-up instead of one a sub-package
    (about 0.25 s each)."""
    return first_pulled_in(CORE_MODULES)


@pytest.mark.parametrize("unit", CORE_UNITS)
def test_core_module_imports_no_ui_and_no_units_library(unit: str, pulled_in) -> None:
    found = {m: bad for m, bad in pulled_in.items() if m == unit or m.startswith(unit + ".")}
    assert found == {}, "\n".join(f"{m} pulled in {bad}" for m, bad in found.items())


def test_the_import_check_names_the_module_that_pulls_a_forbidden_one_in(tmp_path) -> None:
    """A made-up package whose second module imports pint."""
    pkg = tmp_path / "madeup"
    pkg.mkdir()
    (pkg / "__init__.py").write_text("")
    (pkg / "plain.py").write_text("import math\n")
    (pkg / "edge.py").write_text("import pint\n")
    found = first_pulled_in(["madeup.plain", "madeup.edge"], path=tmp_path)
    assert list(found) == ["madeup.edge"] and "pint" in found["madeup.edge"].split(",")


def test_the_core_has_modules_to_check_in_sub_packages_too() -> None:
    assert "workbench.core.model" in CORE_MODULES
    assert "workbench.core.fluid.water" in CORE_MODULES
    assert "workbench.core.fluid" in CORE_UNITS and "workbench.core.fluid.water" not in CORE_UNITS


def test_cli_help_starts_without_scipy_or_textual() -> None:
    code = (
        "import sys\n"
        "from workbench.cli import build_parser\n"
        "build_parser()\n"
        "print(','.join(sorted(m for m in ('scipy', 'textual', 'pint', 'fluids') if m in sys.modules)))\n"
    )
    out = fresh_stdout(code)
    assert out == "", f"building the CLI parser imported {out}"


def test_no_catalogue_liquid_or_solution_loads_coolprop() -> None:
    # CoolProp takes about 2.5 s to import and holds the interpreter lock meanwhile: it is
    # a test-only reference. Every liquid the project file can name, water, the catalogue
    # (bulk moduli included) and the solutions, is computed without it.
    code = (
        "import sys\n"
        "from workbench.core.fluid import CATALOGUE, SOLUTIONS, liquid_properties, "
        "solution_properties, water_properties\n"
        "water_properties(293.15)\n"
        "for key, e in CATALOGUE.items():\n"
        "    props = liquid_properties(key, 0.5 * (e.t_min + e.t_max))\n"
        "    assert (props.bulk_modulus is not None) == (e.eos is not None), key\n"
        "for key, e in SOLUTIONS.items():\n"
        "    solution_properties(key, 300.0, 0.5 * e.fraction_max)\n"
        "print(','.join(sorted(m for m in sys.modules if m.split('.')[0] == 'CoolProp')))\n"
    )
    out = fresh_stdout(code)
    assert out == "", f"computing liquid properties imported {out}"


def _graph_tool():
    import importlib.util

    spec = importlib.util.spec_from_file_location("import_graph", ROOT / "tools" / "import_graph.py")
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


@pytest.fixture(scope="module")
def tool():
    return _graph_tool()


@pytest.fixture(scope="module")
def graph(tool) -> dict:
    """The package's import graph, read once for the tests below (about 0.9 s)."""
    return tool.import_graph()


def test_no_workbench_modules_import_each_other_in_a_circle(tool, graph) -> None:
    assert "workbench.app.app" in graph and "workbench.core.fluid.water" in graph
    found = tool.cycles(graph)
    assert found == [], "import circles: " + "; ".join(" <-> ".join(c) for c in found)


def test_every_import_points_down_the_layers(tool, graph) -> None:
    """core <- project <- output <- sweep_runner <- cli/app (and the app never imports the
    CLI): no lower layer imports a higher one or a front end."""
    wrong = tool.bad_edges(graph)
    assert wrong == [], "\n".join(f"{s} -> {t}: {why}" for s, t, why in wrong)


def test_the_sweep_runner_imports_no_front_end(graph) -> None:
    runner = {m: t for m, t in graph.items() if m.startswith("workbench.sweep_runner")}
    assert len(runner) > 1
    assert not any(t.startswith(("workbench.cli", "workbench.app")) for ts in runner.values()
                   for t in ts)


SYNTHETIC = {
    "__init__.py": "",
    "core/__init__.py": "",
    "core/a.py": "from typing import TYPE_CHECKING\n"
                 "if TYPE_CHECKING:\n    from pkg.project import doc\n"
                 "def f():\n    from pkg.core import b\n",
    "core/b.py": "from . import a\nfrom pkg.words import W\n",
    "words.py": "W = 1\n",
    "project/__init__.py": "",
    "project/doc.py": "import pkg.core.a\n",
    "output/__init__.py": "",
    "output/table.py": "def g():\n    from pkg.cli import main\n",
    "cli/__init__.py": "",
    "cli/main.py": "def g():\n    return 1\n",
    "app/__init__.py": "",
    "app/pane.py": "from pkg.cli.main import g\n",
}


def test_the_graph_tool_finds_a_circle_through_a_lazy_import_and_an_upward_edge(tmp_path) -> None:
    """A made-up package: core.a imports core.b inside a function and core.b imports core.a
    (a circle); output imports the CLI (upward); the app imports the CLI (refused sideways);
    a TYPE_CHECKING import from core to project is no edge; a single module directly under the
    package is a shared leaf any layer may import."""
    tool = _graph_tool()
    root = tmp_path / "pkg"
    for rel, text in SYNTHETIC.items():
        (root / rel).parent.mkdir(parents=True, exist_ok=True)
        (root / rel).write_text(text)
    graph = tool.import_graph(root)
    assert graph["pkg.core.a"] == {"pkg.core.b"}
    assert graph["pkg.core.b"] == {"pkg.core.a", "pkg.words"}
    assert tool.layer("pkg.words", graph) == 0  # a single module under the package: shared
    assert tool.cycles(graph) == [["pkg.core.a", "pkg.core.b"]]
    wrong = {(s, t) for s, t, _ in tool.bad_edges(graph)}
    assert wrong == {("pkg.output.table", "pkg.cli.main"), ("pkg.app.pane", "pkg.cli.main")}
