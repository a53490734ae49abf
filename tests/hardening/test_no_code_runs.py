"""Nothing in a project file runs as code: expression injection through every quantity.

Quantities are read by a strict number pattern and a unit parser (workbench.project.units),
never by an expression evaluator. Each attempt below is placed in every quantity field of
every demo project at once -- in the file, and through set_value as the app's forms do --
and must be refused with a message naming each field, while the side effect it would
have (a file created by a shell command) never happens.
"""

from __future__ import annotations

import re
import tomllib
from pathlib import Path

import pytest

from tests.hardening.harness import ROOT, run_cli
from workbench.cli.exit_codes import ExitCode
from workbench.project.document import ProjectError, load_project, load_project_text, set_value

DEMOS = sorted((ROOT / "projects").glob("*.toml"))
QUANTITY = re.compile(r"^-?[\d.]+(e-?\d+)?\s+\S")

ATTEMPTS = [
    "__import__('os').system('touch {marker}')",
    "1 __import__('os').system('touch {marker}')",
    "1 m; import os; os.system('touch {marker}')",
    "1e3*m",
    "2*3 m",
    "1 m*2",
    "(1+1) m",
    "${{x}}",
    "1 ${{HOME}}",
    "{{{{7*7}}}} m",
    "eval(1)",
    "1 eval('m')",
    "exec('open(\"{marker}\", \"w\")')",
    "1 `touch {marker}`",
    "1 $(touch {marker})",
    "1 m | touch {marker}",
    "%(x)s m",
    "1 meter.__class__",
    "1 __builtins__",
    "lambda: 1",
]


def quantity_paths(data, prefix=()):
    """Key paths of every quantity string (a number and a unit) in a file's data."""
    if isinstance(data, dict):
        for k, v in data.items():
            yield from quantity_paths(v, (*prefix, k))
    elif isinstance(data, list):
        for i, v in enumerate(data):
            yield from quantity_paths(v, (*prefix, i))
    elif isinstance(data, str) and QUANTITY.match(data):
        yield prefix


def dotted(path) -> str:
    out = ""
    for p in path:
        out += f"[{p + 1}]" if isinstance(p, int) else (f".{p}" if out else p)
    return out


def replaced_everywhere(text: str, value: str) -> tuple[str, list[str]]:
    """The file with every quantity replaced by ``value`` (same layout), and their paths."""
    data = tomllib.loads(text)
    paths = list(quantity_paths(data))
    quoted = '"' + value.replace("\\", "\\\\").replace('"', '\\"') + '"'
    new = re.sub(r'"-?[\d.]+(?:e-?\d+)?\s+[^"]+"', lambda m: quoted if QUANTITY.match(m.group(0)[1:])
                 else m.group(0), text)
    return new, [dotted(p) for p in paths]


@pytest.mark.parametrize("attempt", ATTEMPTS)
@pytest.mark.parametrize("demo", DEMOS, ids=[p.stem for p in DEMOS])
def test_an_injection_in_every_quantity_field_is_refused_and_never_runs(tmp_path, demo, attempt):
    marker = tmp_path / "INJECTED"
    value = attempt.format(marker=marker)
    text, paths = replaced_everywhere(demo.read_text(encoding="utf-8"), value)
    assert len(paths) >= 10
    with pytest.raises(ProjectError) as info:
        load_project_text(text, name="injected.toml")
    reported = {p.key for p in info.value.problems}
    missing = [p for p in paths if p not in reported]
    assert not missing, f"not refused: {missing}\n{info.value}"
    assert not marker.exists(), "code in a project file ran"


@pytest.mark.parametrize("attempt", ATTEMPTS[:6] + ATTEMPTS[12:16])
def test_an_injection_typed_into_a_form_is_refused_naming_the_field(tmp_path, attempt):
    marker = tmp_path / "INJECTED"
    project = load_project(ROOT / "projects" / "fellgate_process_water_transfer.toml")
    for keypath in ("lines.310-PW-12.length", "reservoirs.TK-310.level", "fluid.temperature",
                    "lines.310-PW-12.pressure_rating", "simulation.duration"):
        with pytest.raises(ProjectError) as info:
            set_value(project, keypath, attempt.format(marker=marker))
        assert keypath in {p.key for p in info.value.problems}
    assert not marker.exists()


def test_an_injection_in_the_simulate_duration_option_is_refused(tmp_path):
    marker = tmp_path / "INJECTED"
    demo = str(ROOT / "projects" / "fellgate_process_water_transfer.toml")
    outcome = run_cli(["simulate", demo, "--duration", f"__import__('os').system('touch {marker}')"])
    assert outcome.code == ExitCode.USAGE and "--duration" in outcome.stderr
    assert "Traceback" not in outcome.stderr
    assert not marker.exists()
    assert not Path(marker).exists()
