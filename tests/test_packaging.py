"""The package metadata says what is true: one version, a licence file that matches, data
globs that ship files.

Sources: the MIT licence text (opensource.org, "The MIT License"); PEP 639 for
``license``/``license-files``; setuptools' ``package-data`` globs are ``glob`` patterns
relative to the package folder (setuptools documentation, "Data Files Support").
"""

from __future__ import annotations

import importlib.metadata
import tomllib
from pathlib import Path

import workbench

ROOT = Path(__file__).resolve().parents[1]
PYPROJECT = tomllib.loads((ROOT / "pyproject.toml").read_text(encoding="utf-8"))


def test_the_version_is_written_once_and_the_installed_metadata_reads_it():
    project = PYPROJECT["project"]
    assert "version" not in project and "version" in project["dynamic"]
    assert PYPROJECT["tool"]["setuptools"]["dynamic"]["version"] == {"attr": "workbench.__version__"}
    assert importlib.metadata.version("gravity-workbench") == workbench.__version__


def test_the_licence_file_is_the_mit_licence_the_metadata_names():
    assert PYPROJECT["project"]["license"] == "MIT"
    assert PYPROJECT["project"]["license-files"] == ["LICENSE"]
    text = (ROOT / "LICENSE").read_text(encoding="utf-8")
    assert text.startswith("MIT License")
    assert "the Gravity workbench authors" in text
    assert "Permission is hereby granted, free of charge" in text
    assert 'THE SOFTWARE IS PROVIDED "AS IS", WITHOUT WARRANTY OF ANY KIND' in text


def test_every_package_data_glob_matches_a_file_in_the_package():
    for package, patterns in PYPROJECT["tool"]["setuptools"]["package-data"].items():
        folder = ROOT / package.replace(".", "/")
        for pattern in patterns:
            assert list(folder.glob(pattern)), f"{package}: {pattern!r} matches nothing"
