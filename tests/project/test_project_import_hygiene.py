"""The project document imports fast: no textual, rich, pint or fluids until a file is read.

Layering and start-up rules of STYLE.md (items 1 and "speed is a feature"): the terminal app
imports the document module before it paints.
"""

from __future__ import annotations

import subprocess
import sys

import pytest

HEAVY = ("textual", "rich", "pint", "fluids", "scipy")


@pytest.mark.parametrize("module", [
    "workbench.project.document",
    "workbench.project.schema",
    "workbench.project.units",
    "workbench.cli.check_cmd",
    "workbench.cli.new_cmd",
    "workbench.cli.format_cmd",
])
def test_importing_a_project_module_loads_no_heavy_library(module):
    code = (
        "import sys, importlib\n"
        f"importlib.import_module({module!r})\n"
        f"print(','.join(sorted(m for m in {HEAVY!r} if m in sys.modules)))\n"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=True).stdout.strip()
    assert out == "", f"{module} imported {out}"


def test_checking_a_file_never_loads_the_user_interface_libraries():
    code = (
        "import sys\n"
        "from workbench.project.document import load_project_text, starter_text\n"
        "load_project_text(starter_text())\n"
        "print(','.join(sorted(m for m in ('textual', 'rich') if m in sys.modules)))\n"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=True).stdout.strip()
    assert out == ""
