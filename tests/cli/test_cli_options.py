"""The options every command shares: ``--units``, ``NO_COLOR``, ``check --json``, ``solve --csv``.

Outside references: unit conversions are exact by definition (1 ft = 0.3048 m; 1 US gallon
= 231 in^3 = 3.785411784 L, so 1 gpm = 6.30901964e-5 m^3/s); ``NO_COLOR`` follows the
convention published at no-color.org (set and not empty: no ANSI colour; bold is allowed);
the colour codes are ECMA-48's select graphic rendition; CSV is read back
with the standard library's ``csv`` and compared with the JSON of the same solve.
"""

from __future__ import annotations

import csv
import io
import json
import re
from pathlib import Path

import pytest

from workbench.cli import main
from workbench.cli.common import want_colour

ROOT = Path(__file__).resolve().parents[2]
DRAIN = ROOT / "projects" / "fellgate_neutraliser_drain.toml"  # units = "SI"
NETWORK = ROOT / "projects" / "fellgate_cooling_water_network.toml"  # units = "US"
GPM = 3.785411784e-3 / 60.0  # m^3/s
SGR = re.compile(r"\x1b\[([0-9;]*)m")


def _colour_codes(text: str) -> list[str]:
    """The ANSI select-graphic-rendition sequences in ``text`` that set a colour (foreground
    30-38 and 90-97, background 40-48 and 100-107; ECMA-48); bold, dim or a reset is not."""
    found = []
    for params in SGR.findall(text):
        codes = [int(c) for c in params.split(";") if c]
        if any(30 <= c <= 38 or 40 <= c <= 48 or 90 <= c <= 97 or 100 <= c <= 107 for c in codes):
            found.append(params)
    return found


def _run(argv, capsys):
    code = main([str(a) for a in argv])
    out, err = capsys.readouterr()
    return code, out, err


def _flow_m3s(path: Path, capsys) -> dict[str, float]:
    code, out, _ = _run(["solve", path, "--json"], capsys)
    assert code == 0
    return {k: v["flow_m3_s"] for k, v in json.loads(out)["lines"].items()}


# --- --units --------------------------------------------------------------------------------


def test_solve_units_us_shows_an_si_project_in_gallons_per_minute(capsys):
    flows = _flow_m3s(DRAIN, capsys)
    code, out, _ = _run(["solve", DRAIN, "--units", "US"], capsys)
    assert code == 0
    assert f"{flows['210-DR-04'] / GPM:.1f} gpm" in out
    assert " L/s" not in out


def test_solve_units_si_shows_a_us_project_in_litres_per_second(capsys):
    flows = _flow_m3s(NETWORK, capsys)
    code, out, _ = _run(["solve", NETWORK, "--units", "SI"], capsys)
    assert code == 0
    assert "gpm" not in out
    for flow in flows.values():
        assert f"{flow * 1000:.2f}" in out or f"{flow * 1000:.3g}" in out


def test_without_units_the_projects_own_preference_is_used(capsys):
    code, out, _ = _run(["solve", NETWORK], capsys)
    assert code == 0 and "gpm" in out


def test_simulate_units_us_shows_levels_in_feet(capsys):
    code, out, _ = _run(["simulate", DRAIN, "--units", "US", "--duration", "60 s"], capsys)
    assert code == 0
    assert " ft" in out
    assert not re.search(r"\d m\b", out)


def test_report_units_us_names_the_display_units_in_the_record(tmp_path, capsys):
    target = tmp_path / "record.md"
    code, _, err = _run(["report", DRAIN, "--units", "US", "--steady-only", "--output", target],
                        capsys)
    assert code == 0, err
    text = target.read_text(encoding="utf-8")
    assert re.search(r"Display units\s*\|\s*US", text)
    assert "gpm" in text


def test_sweep_units_us_shows_the_cases_in_us_units(capsys):
    code, out, err = _run(["sweep", DRAIN, "--units", "US", "--quick",
                           "--vary", "lines.210-DR-04.nominal_size=3 in,4 in"], capsys)
    assert code == 0, err
    assert "gpm" in out and " L/s" not in out


def test_check_units_us_writes_the_problems_and_summary_of_an_si_project_in_us_units(tmp_path, capsys):
    """A bore below the plausible 1 mm (README's range) refused in the chosen units: 1 mm =
    1/25.4 in = 0.03937 in (exact by definition), written rounded inward to two figures as
    0.04 in, so that every bore inside the words is accepted; the valid file's summary
    gives its 18 degC water as 18 * 9/5 + 32 = 64.4 degF."""
    bad = tmp_path / "bad.toml"
    text = DRAIN.read_text(encoding="utf-8")
    assert 'temperature = "18 degC"' in text and 'nominal_size = "4 in"' in text
    bad.write_text(text.replace('nominal_size = "4 in"', 'inner_diameter = "0.5 mm"'), encoding="utf-8")
    code, _, err = _run(["check", bad, "--units", "US"], capsys)
    assert code == 1
    assert "lines.210-DR-04.inner_diameter" in err and "from 0.04 in" in err and "1 mm" not in err
    code, _, err = _run(["check", bad], capsys)
    assert code == 1 and "1 mm" in err  # the file's own SI without --units
    code, out, _ = _run(["check", DRAIN, "--units", "US"], capsys)
    assert code == 0 and "64.4 degF" in out


def test_check_units_si_writes_the_problems_of_a_us_project_in_si(tmp_path, capsys):
    """The US demo with an implausible bore: --units SI gives the range as 1 mm to 20,000 mm,
    the file's own US units as 0.04 in to 780 in (1 mm = 0.03937 in and 20 m = 787.4 in, as
    1 in = 25.4 mm exactly, rounded inward to two figures)."""
    bad = tmp_path / "bad.toml"
    text = NETWORK.read_text(encoding="utf-8")
    assert 'inner_diameter = "8 in"' in text
    bad.write_text(text.replace('inner_diameter = "8 in"', 'inner_diameter = "0.01 in"'), encoding="utf-8")
    code, _, err = _run(["check", bad, "--units", "SI"], capsys)
    assert code == 1 and "from 1 mm to 20,000 mm" in err
    code, _, err = _run(["check", bad], capsys)
    assert "from 0.04 in to 780 in" in err


def test_json_stays_si_whatever_the_display_units(capsys):
    assert _flow_m3s(DRAIN, capsys) == {
        k: v["flow_m3_s"]
        for k, v in json.loads(_run(["solve", DRAIN, "--json", "--units", "US"], capsys)[1])["lines"].items()}


# --- NO_COLOR -------------------------------------------------------------------------------


class _Terminal(io.StringIO):
    def isatty(self) -> bool:
        return True


@pytest.mark.parametrize(("value", "expected"), [(None, True), ("1", False), ("", True)])
def test_colour_is_written_to_a_terminal_unless_no_color_is_set(monkeypatch, value, expected):
    if value is None:
        monkeypatch.delenv("NO_COLOR", raising=False)
    else:
        monkeypatch.setenv("NO_COLOR", value)
    assert want_colour(_Terminal()) is expected
    assert want_colour(io.StringIO()) is False  # never into a file or a pipe


@pytest.mark.parametrize("no_color", [True, False])
def test_simulate_plot_on_a_terminal_has_colour_codes_only_without_no_color(monkeypatch, no_color):
    if no_color:
        monkeypatch.setenv("NO_COLOR", "1")
    else:
        monkeypatch.delenv("NO_COLOR", raising=False)
    terminal = _Terminal()
    monkeypatch.setattr("sys.stdout", terminal)
    code = main(["simulate", str(DRAIN), "--duration", "60 s", "--plot"])
    assert code == 0
    assert bool(_colour_codes(terminal.getvalue())) is not no_color


# --- check --json and solve --csv -----------------------------------------------------------


def test_check_json_lists_each_file_with_its_problems_and_the_status_says_invalid(tmp_path, capsys):
    broken = tmp_path / "broken.toml"
    broken.write_text(DRAIN.read_text(encoding="utf-8").replace('length = "86 m"', 'length = "86"'),
                      encoding="utf-8")
    code, out, err = _run(["check", DRAIN, broken, "--json"], capsys)
    assert code == 1 and err == ""
    data = json.loads(out)
    assert data["valid"] is False
    good, bad = data["files"]
    assert good["valid"] is True and good["problems"] == [] and good["summary"].startswith(str(DRAIN))
    assert bad["valid"] is False and bad["summary"] is None
    assert [p["key"] for p in bad["problems"]] == ["lines.210-DR-04.length"]
    assert bad["problems"][0]["text"].startswith(f"{broken}: lines.210-DR-04.length: ")


def test_check_json_of_valid_files_exits_zero(capsys):
    code, out, _ = _run(["check", DRAIN, NETWORK, "--json"], capsys)
    data = json.loads(out)
    assert code == 0 and data["valid"] is True and len(data["files"]) == 2


def test_solve_csv_holds_the_lines_of_the_json_in_si(tmp_path, capsys):
    target = tmp_path / "lines.csv"
    code, _, err = _run(["solve", NETWORK, "--csv", target], capsys)
    assert code == 0, err
    with open(target, newline="", encoding="utf-8") as handle:
        rows = list(csv.DictReader(handle))
    flows = _flow_m3s(NETWORK, capsys)
    assert {r["line"]: float(r["flow [m^3/s]"]) for r in rows} == flows


def test_solve_csv_to_a_folder_that_does_not_exist_is_a_message(tmp_path, capsys):
    code, _, err = _run(["solve", DRAIN, "--csv", tmp_path / "nowhere" / "lines.csv"], capsys)
    assert code == 1
    assert "cannot write the CSV file" in err and "Traceback" not in err


# --- progress on stderr ---------------------------------------------------------------------

TRANSFER = ROOT / "projects" / "fellgate_process_water_transfer.toml"  # elastic on 310-PW-12


@pytest.mark.parametrize("terminal", [True, False])
def test_report_shows_its_progress_on_stderr_only_when_it_is_a_terminal(monkeypatch, tmp_path,
                                                                         terminal):
    stderr = _Terminal() if terminal else io.StringIO()
    monkeypatch.setattr("sys.stderr", stderr)
    code = main(["report", str(TRANSFER), "--output", str(tmp_path / "record.md")])
    assert code == 0
    shown = stderr.getvalue()
    assert ("simulating" in shown and "elastic surge" in shown) is terminal
    assert f"wrote {tmp_path / 'record.md'}" in shown


@pytest.mark.parametrize("terminal", [True, False])
def test_simulate_elastic_shows_its_progress_on_stderr_only_when_it_is_a_terminal(
        monkeypatch, terminal, capsys):
    stderr = _Terminal() if terminal else io.StringIO()
    monkeypatch.setattr("sys.stderr", stderr)
    code = main(["simulate", str(TRANSFER), "--elastic", "310-PW-12", "--json"])
    assert code == 0
    assert ("elastic surge" in stderr.getvalue()) is terminal
    assert json.loads(capsys.readouterr().out)["surge"]["310-PW-12"]["elastic"]
