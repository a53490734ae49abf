"""Property: a mutated project file only ever raises ProjectError (never another exception).

Mutations are drawn by hypothesis from the demo projects: characters deleted, inserted or
replaced, lines dropped or repeated, quoted values replaced by arbitrary text or numbers.
Loading, formatting and the check command must answer each with a Project or a
ProjectError.
"""

from __future__ import annotations

import re
from pathlib import Path

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from workbench.project.document import (
    Project,
    ProjectError,
    format_text,
    load_project_text,
    set_value,
)

PROJECTS = sorted((Path(__file__).resolve().parents[2] / "projects").glob("*.toml"))
TEXTS = [p.read_text(encoding="utf-8") for p in PROJECTS]
VALUE = re.compile(r'= ("[^"\n]*"|[-0-9.]+|true|false)')

values = st.one_of(
    st.text(max_size=12).map(lambda s: '"' + s.replace("\\", "").replace('"', "") + '"'),
    st.sampled_from(['"1,5 m"', '"1 000 m"', '"inf m"', '"nan kPa"', '"-1 m"', '"0 mm"',
                     '"15 mmm"', '"3 kPa"', '"1e400 m"', '"2*3 m"', '"1 barg"', '"5 psia"',
                     "nan", "inf", "-0.0", "0", "1e308", "-5", "true", "[]", "{}",
                     '"DN0"', '"4 in"', '"XXS"', '"-300 degC"', '"90 deg"', '"0 deg"']),
    st.floats(allow_nan=False, allow_infinity=False).map(repr),
    st.integers(-10**6, 10**6).map(str),
)


@st.composite
def mutated(draw):
    text = draw(st.sampled_from(TEXTS))
    for _ in range(draw(st.integers(1, 3))):
        kind = draw(st.sampled_from(["value", "value", "value", "delete_line", "repeat_line",
                                     "char"]))
        lines = text.splitlines(keepends=True)
        if kind == "value":
            spots = list(VALUE.finditer(text))
            spot = draw(st.sampled_from(spots))
            text = text[: spot.start(1)] + draw(values) + text[spot.end(1):]
        elif kind == "delete_line" and lines:
            i = draw(st.integers(0, len(lines) - 1))
            text = "".join(lines[:i] + lines[i + 1:])
        elif kind == "repeat_line" and lines:
            i = draw(st.integers(0, len(lines) - 1))
            text = "".join(lines[: i + 1] + lines[i:])
        else:
            i = draw(st.integers(0, max(len(text) - 1, 0)))
            char = draw(st.characters(codec="utf-8"))
            text = text[:i] + draw(st.sampled_from(["", char])) + text[i + 1:]
    return text


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(mutated())
def test_a_mutated_file_loads_or_raises_project_error_only(text):
    try:
        project = load_project_text(text, "mutated.toml")
    except ProjectError as exc:
        assert exc.problems and all(p.message for p in exc.problems)
    else:
        assert isinstance(project, Project)


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(mutated())
def test_formatting_a_mutated_file_is_idempotent_or_a_project_error(text):
    try:
        once = format_text(text)
    except ProjectError:
        return
    assert format_text(once) == once


@settings(max_examples=80, deadline=None)
@given(st.sampled_from(["lines.310-PW-12.length", "lines.310-PW-12.valve.opening",
                        "reservoirs.TK-310.level", "project.site_elevation",
                        "fluid.temperature", "simulation.duration",
                        "lines.310-PW-12.entrance", "lines.310-PW-12.fittings"]),
       st.one_of(st.text(max_size=10), st.floats(), st.integers(), st.none(), st.booleans()))
def test_setting_any_value_gives_a_project_or_a_project_error(keypath, value):
    project = load_project_text(PROJECTS_TRANSFER, "transfer.toml")
    try:
        edited = set_value(project, keypath, value)
    except ProjectError as exc:
        assert exc.problems
    else:
        assert isinstance(edited, Project)


PROJECTS_TRANSFER = next(t for p, t in zip(PROJECTS, TEXTS) if "transfer" in p.name)
