"""Shared fixtures: the app tests' copy of a demo project (tests never touch the demos)."""

from tests.app.conftest import project_file  # noqa: F401 - a fixture, used by name
