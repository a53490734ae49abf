"""``workbench cautions`` prints every caution of workbench.cautions (the README's list)."""

from __future__ import annotations

from workbench.cautions import CAUTIONS
from workbench.cli import main


def test_cautions_command_prints_every_topic(capsys) -> None:
    assert main(["cautions"]) == 0
    out = capsys.readouterr().out
    for caution in CAUTIONS:
        assert caution.topic in out


def test_readme_names_every_caution_topic() -> None:
    from pathlib import Path

    readme = (Path(__file__).resolve().parents[2] / "README.md").read_text(encoding="utf-8").lower()
    for word in ("surge", "vacuum collapse", "siphon break", "overflow", "confined spaces"):
        assert word in readme
