"""Edits the app makes in one step that the document layer offers only one at a time.

A junction is valid only with a line on it, so "add a junction" adds the junction and a
line to it together. The new text goes through the project layer's own loader and
validation (``load_project_text``), so nothing unchecked reaches the model; the result
keeps the original file's path, name and loaded hash.
"""

from __future__ import annotations

import dataclasses
from typing import Any


def add_elements(project: Any, additions: list[tuple[str, str, dict]]) -> Any:
    """A new Project with several ``(section, id, fields)`` elements added at once.

    Raises:
        ProjectError: the result is not a valid project (every problem listed).
    """
    import tomlkit

    from workbench.project.document import load_project_text

    doc = tomlkit.parse(project.doc.as_string())
    for section, element_id, fields in additions:
        if section not in doc:
            doc[section] = tomlkit.table(is_super_table=True)
        table = tomlkit.table()
        for key, value in fields.items():
            table.add(key, value)
        doc[section][element_id] = table
    new = load_project_text(doc.as_string(), name=project.name)
    return dataclasses.replace(new, path=project.path, loaded_hash=project.loaded_hash,
                               name=project.name)
