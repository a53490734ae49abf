"""The project document: load, validate, build, edit, save and format project files.

This is the one import for front ends and sweeps; the work is done in small modules:

* :mod:`~workbench.project.load` -- TOML text -> :class:`Project` (syntax errors with line
  and column, conflict markers named);
* :mod:`~workbench.project.validate` -- every problem at once, and the core
  :class:`~workbench.core.model.System` (:func:`build_system`);
* :mod:`~workbench.project.edit` -- :func:`set_value`, :func:`add_element`,
  :func:`rename_element`, :func:`delete_element`, :func:`dependents`;
* :mod:`~workbench.project.save` -- atomic :func:`save_project`, canonical :func:`format_text`;
* :mod:`~workbench.project.starter` -- :func:`starter_text` for ``workbench new``.

Importing this module loads neither textual, rich, pint nor fluids: they are imported when a
file is actually checked.
"""

from __future__ import annotations

from workbench.project.edit import (
    add_element,
    add_elements,
    delete_element,
    dependents,
    rename_element,
    set_value,
    set_values,
)
from workbench.project.load import Project, load_project, load_project_text
from workbench.project.problems import Problem, ProjectError
from workbench.project.save import format_text, save_project
from workbench.project.starter import starter_text
from workbench.project.validate import build_system, check_data

__all__ = [
    "Problem",
    "Project",
    "ProjectError",
    "add_element",
    "add_elements",
    "build_system",
    "check_data",
    "delete_element",
    "dependents",
    "format_text",
    "load_project",
    "load_project_text",
    "rename_element",
    "save_project",
    "set_value",
    "set_values",
    "starter_text",
]
