"""``workbench report``: the calculation record holds every input, every warning and the cautions.

Outside references: the file's sha256 is recomputed with ``hashlib``; the inputs are read
back from the file with the standard library's ``tomllib`` (not the program's loader); the
Markdown tables are checked against the GitHub-flavoured Markdown table rule (every row has
the header's number of cells, a delimiter row of dashes under the header).
"""

from __future__ import annotations

import csv
import hashlib
import re
import tomllib
from pathlib import Path
from types import SimpleNamespace

import pytest

from workbench.cli import main

ROOT = Path(__file__).resolve().parents[2]
DEMOS = sorted((ROOT / "projects").glob("*.toml"))

# A project of our own with a valve schedule, fittings and a profile over a high point, so the
# record has warnings and events to show.
HILL_TRANSFER = """\
schema = 1

[project]
title = "Glycol day-tank transfer over the pipe bridge"
description = "Gravity transfer from the day tank to the dosing sump; valve shut after 5 min."
site_elevation = "310 m"

[fluid]
kind = "water"
temperature = "35 degC"

[reservoirs.DAY]
kind = "tank"
shape = "vertical_cylinder"
diameter = "1.8 m"
bottom_elevation = "14 m"
level = "2.2 m"
height = "2.6 m"
min_level = "0.1 m"

[reservoirs.SUMP]
kind = "constant_level"
bottom_elevation = "1 m"
level = "0.8 m"

[lines.L7]
from = "DAY"
to = "SUMP"
length = "64 m"
nominal_size = "2 in"
schedule = "40"
material = "commercial_steel"
entrance = "sharp"
fittings = [ { type = "elbow_90_standard", count = 4 }, { k = 1.2, label = "basket strainer" } ]
profile = [ { distance = "0 m", elevation = "14 m" }, { distance = "12 m", elevation = "21.5 m" }, { distance = "64 m", elevation = "1 m" } ]

[lines.L7.valve]
characteristic = "equal_percentage"
k_open = 0.3
opening = 1.0
schedule = [ { time = "0 s", opening = 1.0 }, { time = "5 min", opening = 1.0 }, { time = "6 min", opening = 0.0 } ]

[simulation]
duration = "20 min"
"""


@pytest.fixture(scope="module")
def hill(tmp_path_factory) -> tuple[Path, str]:
    """The hill transfer's file and its record, written once for the module."""
    path = tmp_path_factory.mktemp("hill") / "hill_transfer.toml"
    path.write_text(HILL_TRANSFER, encoding="utf-8")
    return path, _record(path, tmp_path_factory.mktemp("hill_record"))


@pytest.fixture(scope="module", params=["hill_transfer", *[p.stem for p in DEMOS]])
def project_path(request) -> Path:
    if request.param == "hill_transfer":
        return request.getfixturevalue("hill")[0]
    return ROOT / "projects" / f"{request.param}.toml"


@pytest.fixture(scope="module")
def record(request, project_path, tmp_path_factory) -> str:
    """The record of each project, written once by ``workbench report`` and read by the checks."""
    if project_path.stem == "hill_transfer":
        return request.getfixturevalue("hill")[1]
    return _record(project_path, tmp_path_factory.mktemp("record"))


def _leaves(value):
    if isinstance(value, dict):
        for v in value.values():
            yield from _leaves(v)
    elif isinstance(value, list):
        for v in value:
            yield from _leaves(v)
    else:
        yield value


def _record(project_path: Path, tmp_path: Path, *extra: str) -> str:
    out = tmp_path / "record.md"
    code = main(["report", str(project_path), "--output", str(out), *extra])
    assert code == 0
    return out.read_text(encoding="utf-8")


def test_the_record_names_the_file_hash_and_the_program_version(project_path, record) -> None:
    from workbench import __version__

    text = record
    assert hashlib.sha256(project_path.read_bytes()).hexdigest() in text  # hashlib, independently
    assert f"gravity workbench {__version__}" in text
    assert re.search(r"\| Date \| \d{4}-\d\d-\d\d \d\d:\d\d", text)


def test_every_input_appears_as_entered(project_path, record) -> None:
    text = record
    data = tomllib.loads(project_path.read_text(encoding="utf-8"))  # stdlib reader, not ours
    for section in ("project", "fluid", "reservoirs", "junctions", "receivers", "lines", "simulation"):
        for leaf in _leaves(data.get(section, {})):
            shown = f'"{leaf}"' if isinstance(leaf, str) else str(leaf).lower() if isinstance(leaf, bool) else str(leaf)
            assert shown.replace("|", "\\|") in text, f"{section}: {leaf!r} missing from the record"


def test_every_warning_and_event_of_the_run_is_in_the_record(project_path, record) -> None:
    from workbench.core.network import solve_steady
    from workbench.core.transient import simulate
    from workbench.output.common import finding_message
    from workbench.project.document import load_project

    text = record
    project = load_project(project_path)
    system = project.system
    findings = list(solve_steady(system).warnings)
    events = []
    if system.simulation is not None:
        sim = simulate(system)
        findings += list(sim.warnings)
        events = list(sim.events)
        from workbench.core.elastic import elastic_line_ids, run_elastic
        from workbench.output.elastic import elastic_findings

        ids = elastic_line_ids(system)
        if ids:  # lines the project marks model = "elastic" are run for the record too
            findings += [SimpleNamespace(**w) for w in elastic_findings(run_elastic(system, ids))]
    for f in findings:
        assert f"`{f.code}`" in text
        # numbers in the record follow the project's display units (README)
        assert finding_message(f, project.unit_system).replace("|", "\\|") in text
    for e in events:
        assert finding_message(e, project.unit_system).replace("|", "\\|") in text


def test_the_hill_transfer_record_shows_its_warnings(hill) -> None:
    # The line crests 7.5 m above the tank bottom: the grade line check must flag
    # sub-atmospheric pressure there (HYDRAULICS.md, "Checks the engineer expects").
    _, text = hill
    assert "`profile.subatmospheric`" in text
    assert "### Profile of L7" in text
    assert "`valve.closed`" in text


def test_the_record_carries_the_cautions_methods_and_sign_off(project_path, record) -> None:
    from workbench.cautions import CAUTIONS

    text = record
    for caution in CAUTIONS:
        assert f"**{caution.topic}.**" in text
    assert "## 3. Methods and correlations" in text
    assert "Colebrook (1939)" in text
    assert "| Checked by |" in text


def test_the_record_tables_are_well_formed_gfm(project_path, record) -> None:
    # GFM table rule: header row, delimiter row of ---/---:, and every row with as many cells.
    text = record
    lines = text.splitlines()
    split = re.compile(r"(?<!\\)\|")
    tables = 0
    for i, line in enumerate(lines):
        if line.startswith("| ---") or line.startswith("| ---:"):
            tables += 1
            width = len(split.findall(lines[i - 1]))
            j = i + 1
            while j < len(lines) and lines[j].startswith("|"):
                assert len(split.findall(lines[j])) == width, lines[j]
                j += 1
            assert lines[i - 2] == "", "a table must follow a blank line"
    assert tables >= 5
    assert "<" not in re.sub(r"`[^`]*`", "", text).replace("<=", "").replace("->", "")  # no raw HTML


def test_csv_exports_hold_the_results_and_time_series(tmp_path) -> None:
    path = tmp_path / "hill.toml"
    path.write_text(HILL_TRANSFER, encoding="utf-8")
    _record(path, tmp_path, "--csv-dir", str(tmp_path / "csv"))
    names = sorted(p.name for p in (tmp_path / "csv").iterdir())
    assert names == ["events.csv", "lines.csv", "nodes.csv", "profiles.csv", "timeseries.csv", "warnings.csv"]
    series = list(csv.reader((tmp_path / "csv" / "timeseries.csv").open(encoding="utf-8")))
    assert series[0] == ["time [s]", "flow L7 [m^3/s]", "level DAY [m]"]
    times = [float(r[0]) for r in series[1:]]
    assert times == sorted(times) and len(times) > 10
    # Volume balance of the vertical tank (geometry, no source needed): the level drop times the
    # tank area equals the integral of the outflow (trapezoid rule on the exported series).
    import math

    flows = [float(r[1]) for r in series[1:]]
    levels = [float(r[2]) for r in series[1:]]
    out = sum((t1 - t0) * (q0 + q1) / 2 for t0, t1, q0, q1 in zip(times, times[1:], flows, flows[1:]))
    assert math.pi * 1.8**2 / 4 * (levels[0] - levels[-1]) == pytest.approx(out, rel=2e-2)


def test_a_broken_project_gets_messages_not_a_record(tmp_path, capsys) -> None:
    path = tmp_path / "bad.toml"
    path.write_text(HILL_TRANSFER.replace('length = "64 m"', 'length = "64 mmm"'), encoding="utf-8")
    code = main(["report", str(path)])
    err = capsys.readouterr().err
    assert code == 1
    assert "lines.L7.length" in err and "mmm" in err


def test_lines_marked_elastic_get_the_elastic_surge_run_and_its_findings(tmp_path) -> None:
    # A near-instant closure (3 s) on the hill line, run by the method of characteristics:
    # the crest reaches vapour pressure, and the elastic run's own finding must be recorded.
    # The valve shuts from the start, so the elastic runs (the record's and the reference)
    # cover seconds, not the 5 min before a later closure (5.7 s of CPU each on numpy).
    from workbench.core.elastic import elastic_line_ids, run_elastic
    from workbench.output.elastic import elastic_findings
    from workbench.project.document import load_project

    text_in = HILL_TRANSFER.replace("[simulation]", '[lines.L7.surge]\nmodel = "elastic"\n\n[simulation]')
    text_in = text_in.replace('{ time = "5 min", opening = 1.0 }, { time = "6 min", opening = 0.0 }',
                              '{ time = "3 s", opening = 0.0 }')
    assert '{ time = "3 s", opening = 0.0 }' in text_in
    path = tmp_path / "hill_elastic.toml"
    path.write_text(text_in, encoding="utf-8")
    text = _record(path, tmp_path)
    system = load_project(path).system
    findings = elastic_findings(run_elastic(system, elastic_line_ids(system)))
    assert "### Elastic surge (method of characteristics)" in text
    assert findings, "the closure was meant to give an elastic finding"
    for w in findings:
        assert w["message"].replace("|", "\\|") in text


def test_every_table_renders_as_a_table_in_a_gfm_parser(record) -> None:
    # Outside reference: markdown-it-py (CommonMark with the GFM table extension, the parser
    # rich itself uses). Every delimiter row must give one <table>, and nothing may pass
    # through as raw HTML.
    from markdown_it import MarkdownIt

    html = MarkdownIt("commonmark", {"html": False}).enable("table").render(record)
    delimiter_rows = sum(1 for line in record.splitlines() if re.match(r"^\| (---:?|:?---) \|", line))
    assert html.count("<table>") == delimiter_rows > 0
    assert "&lt;" not in html.replace("&lt;=", "")
