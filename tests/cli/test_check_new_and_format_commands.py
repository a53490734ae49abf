"""``workbench new`` writes a valid starter and never overwrites; ``workbench format``."""

from __future__ import annotations

from pathlib import Path

from workbench.cli import main
from workbench.cli.exit_codes import ExitCode

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "projects" / "fellgate_neutraliser_drain.toml"


def test_new_writes_a_starter_that_passes_check(tmp_path, capsys):
    path = tmp_path / "drain.toml"
    assert main(["new", str(path)]) == ExitCode.OK
    assert main(["check", str(path)]) == ExitCode.OK
    assert "valid" in capsys.readouterr().out


def test_new_refuses_to_overwrite_an_existing_file(tmp_path, capsys):
    path = tmp_path / "mine.toml"
    path.write_text("# my work\n", encoding="utf-8")
    assert main(["new", str(path)]) == ExitCode.INVALID
    assert path.read_text(encoding="utf-8") == "# my work\n"
    assert "already exists" in capsys.readouterr().err


def test_format_check_passes_on_a_canonical_file_and_fails_on_a_messy_one(tmp_path, capsys):
    assert main(["format", "--check", str(DEMO)]) == ExitCode.OK
    messy = tmp_path / "messy.toml"
    messy.write_text(DEMO.read_text(encoding="utf-8").replace(" = ", "="), encoding="utf-8")
    before = messy.read_bytes()
    assert main(["format", "--check", str(messy)]) == ExitCode.INVALID
    assert messy.read_bytes() == before  # --check writes nothing
    assert "not in canonical form" in capsys.readouterr().err


def test_format_rewrites_a_messy_file_to_identical_bytes_as_the_canonical_one(tmp_path):
    messy = tmp_path / "messy.toml"
    messy.write_text(DEMO.read_text(encoding="utf-8").replace(" = ", "  =   "), encoding="utf-8")
    assert main(["format", str(messy)]) == ExitCode.OK
    assert messy.read_bytes() == DEMO.read_bytes()
    assert main(["format", str(messy)]) == ExitCode.OK
    assert messy.read_bytes() == DEMO.read_bytes()


def test_format_reports_a_syntax_error_with_line_and_column(tmp_path, capsys):
    bad = tmp_path / "bad.toml"
    bad.write_text('schema = 1\n[project]\ntitle = "x\n', encoding="utf-8")
    assert main(["format", str(bad)]) == ExitCode.INVALID
    assert f"{bad}:3:" in capsys.readouterr().err
