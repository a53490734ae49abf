"""The numeric core must stay importable without the UI libraries or pint.

Each core module is imported in a fresh interpreter; the test fails if textual, rich or pint
was loaded as a side effect (layering rule of STYLE.md, item 1).
"""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest

CORE = Path(__file__).resolve().parents[1] / "workbench" / "core"
CORE_MODULES = sorted(
    f"workbench.core.{p.stem}" for p in CORE.glob("*.py") if p.stem != "__init__"
)
FORBIDDEN = ("textual", "rich", "pint")


def fresh_stdout(code: str) -> str:
    """What ``code`` prints when run in a new interpreter (so its imports start from none)."""
    return subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, check=True
    ).stdout.strip()


@pytest.mark.parametrize("module", CORE_MODULES)
def test_core_module_imports_no_ui_and_no_units_library(module: str) -> None:
    code = (
        "import sys, importlib\n"
        f"importlib.import_module({module!r})\n"
        f"bad = sorted(m for m in sys.modules if m.split('.')[0] in {FORBIDDEN!r})\n"
        "print(','.join(bad))\n"
    )
    out = fresh_stdout(code)
    assert out == "", f"{module} pulled in {out}"


def test_the_core_has_modules_to_check() -> None:
    assert "workbench.core.model" in CORE_MODULES


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
