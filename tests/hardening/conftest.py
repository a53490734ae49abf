"""Shared fixtures: the app tests' copy of a demo project (tests never touch the demos)."""

from tests.app.conftest import private_state_folder, project_file  # noqa: F401 - fixtures
