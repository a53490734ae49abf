"""Editing a project: one value, one element at a time, always to a new validated Project.

The terminal app and parameter sweeps change projects through these functions. Each works
on a copy of the comment-preserving document, so the original Project is never touched,
and validates the result: an edit that would make the file invalid raises
:class:`ProjectError` naming the key path. A changed value keeps its line's comment, so a
save after one edit changes one line of the file.
"""

from __future__ import annotations

import re
import tomllib
from typing import Any

from workbench.project.load import Project, project_from_doc
from workbench.project.problems import Problem, ProjectError
from workbench.project.schema import ELEMENT_SECTIONS, SECTIONS, FieldSpec
from workbench.project.units import QUANTITY_KINDS
from workbench.project.validate import ID_PATTERN, did_you_mean

__all__ = ["add_element", "add_elements", "delete_element", "dependents", "rename_element", "set_value",
           "set_values"]

_SIMPLE_SECTIONS = ("project", "fluid", "simulation")
_SUB_TABLES = ("valve", "surge")
_SUB_TABLES_OF = {"lines": _SUB_TABLES, "reservoirs": ("vent",)}


def _fail(project: Project, key: str, message: str) -> ProjectError:
    return ProjectError(Problem(project.name, key, message))


def _copy_doc(project: Project):
    """A fresh document to edit: parsed from the text (the text is always the document's)."""
    from workbench.project.load import parse_doc

    return parse_doc(project.text, project.name)


def _item(value: Any):
    """A tomlkit item for a plain value, in canonical spelling (inline tables in lists)."""
    import tomlkit

    from workbench.project.save import render_value

    return tomlkit.parse(f"x = {render_value(value)}\n").item("x")


def _set(container, key: str, value: Any) -> None:
    """Set ``container[key]``, keeping the old item's comment."""
    new = _item(value)
    if key in container:
        old = container.item(key) if hasattr(container, "item") else container[key]
        trivia = getattr(old, "trivia", None)
        if trivia is not None and trivia.comment:
            new.trivia.comment = trivia.comment
            new.trivia.comment_ws = trivia.comment_ws or "  "
    container[key] = new


def _finish(project: Project, doc) -> Project:
    text = doc.as_string()
    if text.endswith("\n\n"):  # tables added or removed at the end leave blank lines
        import tomlkit

        text = text.rstrip("\n") + "\n"
        doc = tomlkit.parse(text)
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:  # a bug in the edit, not the user's input
        raise ProjectError(Problem(project.name, "", f"the edit produced invalid TOML: {exc}")) from None
    return project_from_doc(text, path=project.path, name=project.name,
                            loaded_hash=project.loaded_hash, doc=doc, data=data,
                            units=project.unit_system)


def _element_section(project: Project, element_id: str) -> str | None:
    for section in ELEMENT_SECTIONS:
        if element_id in project.data.get(section, {}):
            return section
    return None


def _coerce(spec: FieldSpec, value: Any, project: Project, keypath: str) -> Any:
    """Turn what a user typed into the value the file holds."""
    if value is None or not isinstance(value, str):
        return value
    text = value.strip()
    if spec.kind in {"number", "int"}:
        try:
            number = int(text) if spec.kind == "int" else float(text)
        except ValueError:
            raise _fail(project, keypath, f"expected {'a whole number' if spec.kind == 'int' else 'a number'}, "
                        f"got {value!r}") from None
        return number
    if spec.kind == "bool":
        if text.lower() in {"true", "yes", "on"}:
            return True
        if text.lower() in {"false", "no", "off"}:
            return False
        raise _fail(project, keypath, f"expected true or false, got {value!r}")
    if spec.name == "entrance" and re.fullmatch(r"[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?", text):
        return float(text)
    if spec.kind in QUANTITY_KINDS or spec.kind in {"choice", "text"}:
        return text
    return value


def set_value(project: Project, keypath: str, value: Any) -> Project:
    """A new Project with one key set (or removed with ``value=None``).

    Parameters
    ----------
    project : Project
        Left untouched.
    keypath : str
        ``"project.title"``, ``"lines.L1.length"``, ``"lines.L1.valve.opening"``, or a
        whole sub-table ``"lines.L1.valve"`` (value a dict, or ``None`` to remove it).
    value : str, number, bool, list, dict or None
        As the user typed it (``"150 mm"``); numbers typed as text are read for number keys.

    Raises
    ------
    ProjectError
        For an unknown key path, or a value that makes the project invalid (the problems
        name the key paths).
    """
    return set_values(project, {keypath: value})


def set_values(project: Project, changes: dict[str, Any]) -> Project:
    """A new Project with several keys set at once, validated once at the end.

    For changes that are only valid together (``fluid.kind = "custom"`` with its
    ``density`` and ``viscosity``). Same rules as :func:`set_value`.
    """
    doc = _copy_doc(project)
    changed = False
    for keypath, value in changes.items():
        changed |= _apply(project, doc, keypath, value)
    return _finish(project, doc) if changed else project


def _apply(project: Project, doc, keypath: str, value: Any) -> bool:
    """Make one change in ``doc``; return whether anything changed."""
    parts = keypath.split(".") if isinstance(keypath, str) else []
    section = parts[0] if parts else ""
    if section in _SIMPLE_SECTIONS and len(parts) == 2:
        spec_section, container_path, key = section, [section], parts[1]
    elif section in ELEMENT_SECTIONS and len(parts) == 3:
        spec_section, container_path, key = section, parts[:2], parts[2]
    elif len(parts) == 4 and parts[2] in _SUB_TABLES_OF.get(section, ()):
        spec_section, container_path, key = f"{section}.{parts[2]}", parts[:3], parts[3]
    else:
        raise _fail(project, str(keypath), "not a key path this editor can set: expected "
                    "'section.key', 'section.ID.key' or 'lines.ID.valve.key'")
    if section in ELEMENT_SECTIONS and parts[1] not in project.data.get(section, {}):
        raise _fail(project, keypath, f"'{parts[1]}' names no element in {section}")
    specs = {s.name: s for s in SECTIONS[spec_section]}
    if key not in specs:
        raise _fail(project, keypath, f"unknown key '{key}'{did_you_mean(key, specs)}")
    spec = specs[key]
    value = _coerce(spec, value, project, keypath)
    container = doc
    for part in container_path:
        if part not in container:
            if value is None:
                return False
            import tomlkit

            container[part] = tomlkit.table()
        container = container[part]
    try:
        if value is None:
            if key not in container:
                return False
            del container[key]
        elif spec.kind == "table" and isinstance(value, str):
            _set(container, key, value)  # a word in the table's stead (vent = "none"): validated
        elif spec.kind == "table":
            if not isinstance(value, dict):
                raise _fail(project, keypath, f"expected a table of keys, got {value!r}")
            if key in container:
                del container[key]
            container[key] = _table(value)
        else:
            _set(container, key, value)
    except TypeError as exc:  # a value no TOML file can hold (e.g. a Python object)
        raise _fail(project, keypath, str(exc)) from None
    return True


def _table(fields: dict):
    import tomlkit

    table = tomlkit.table()
    subtables = []
    for key, value in fields.items():
        if isinstance(value, dict):
            subtables.append((key, value))
        elif value is not None:
            table.add(key, _item(value))
    for key, value in subtables:
        table.add(key, _table(value))
    if not subtables:
        table.add(tomlkit.nl())
    return table


def add_element(project: Project, section: str, element_id: str, fields: dict) -> Project:
    """A new Project with an element ``[section.element_id]`` holding ``fields``.

    ``fields`` maps keys to values as they go in the file (``{"kind": "tank", "level":
    "2 m", ...}``); for a line, ``"valve"``/``"surge"`` may map to dicts. A junction must
    be connected by a line to be valid: add both at once with :func:`add_elements`.
    """
    return add_elements(project, [(section, element_id, fields)])


def add_elements(project: Project, elements) -> Project:
    """A new Project with several elements added, validated once at the end.

    ``elements`` is a sequence of ``(section, element_id, fields)``, e.g. a junction and
    the lines that connect it, which are only valid together.
    """
    import tomlkit

    doc = _copy_doc(project)
    used = {eid: section for section in ELEMENT_SECTIONS for eid in project.data.get(section, {})}
    for section, element_id, fields in elements:
        key = f"{section}.{element_id}"
        if section not in ELEMENT_SECTIONS:
            raise _fail(project, str(section), f"unknown section '{section}'"
                        f"{did_you_mean(str(section), ELEMENT_SECTIONS)}; expected one of "
                        + ", ".join(ELEMENT_SECTIONS))
        if not isinstance(element_id, str) or not ID_PATTERN.match(element_id):
            raise _fail(project, key, f"id {element_id!r} is not valid: use letters, digits, '_' "
                        "and '-', starting with a letter or digit")
        if element_id in used:
            raise _fail(project, key, f"id '{element_id}' is already used in {used[element_id]}")
        if not isinstance(fields, dict):
            raise _fail(project, key, f"expected a table of keys, got {fields!r}")
        used[element_id] = section
        if section not in doc:
            doc[section] = tomlkit.table(is_super_table=True)
        try:
            doc[section][element_id] = _table(fields)
        except TypeError as exc:  # a value no TOML file can hold
            raise _fail(project, key, str(exc)) from None
    return _finish(project, doc)


def dependents(project: Project, element_id: str) -> list[str]:
    """Ids of the lines that start or end at ``element_id``, in file order."""
    return [lid for lid, line in project.data.get("lines", {}).items()
            if isinstance(line, dict) and element_id in (line.get("from"), line.get("to"))]


def delete_element(project: Project, element_id: str, *, cascade: bool = False) -> Project:
    """A new Project without ``element_id``.

    A node that lines still connect to is refused (the message lists them) unless
    ``cascade`` is true, which deletes those lines too.
    """
    section = _element_section(project, element_id)
    if section is None:
        raise _fail(project, str(element_id), f"'{element_id}' names no element")
    lines = dependents(project, element_id) if section != "lines" else []
    if lines and not cascade:
        raise _fail(project, f"{section}.{element_id}",
                    f"cannot delete '{element_id}': line(s) {', '.join(lines)} connect to it; "
                    "delete or reconnect them first")
    doc = _copy_doc(project)
    for lid in lines:
        del doc["lines"][lid]
    del doc[section][element_id]
    return _finish(project, doc)


def rename_element(project: Project, old_id: str, new_id: str) -> Project:
    """A new Project with ``old_id`` renamed ``new_id``; lines' ``from``/``to`` follow."""
    section = _element_section(project, old_id)
    if section is None:
        raise _fail(project, str(old_id), f"'{old_id}' names no element")
    if not isinstance(new_id, str) or not ID_PATTERN.match(new_id):
        raise _fail(project, f"{section}.{old_id}", f"id {new_id!r} is not valid: use letters, "
                    "digits, '_' and '-', starting with a letter or digit")
    if new_id == old_id:
        return project
    existing = _element_section(project, new_id)
    if existing is not None:
        raise _fail(project, f"{section}.{old_id}", f"id '{new_id}' is already used in {existing}")
    import tomlkit

    # Expected data: the element under its new name (same place), references renamed.
    expected = {k: v for k, v in project.data.items()}
    expected[section] = {(new_id if k == old_id else k): v for k, v in project.data[section].items()}
    expected["lines"] = {
        lid: {k: (new_id if k in ("from", "to") and v == old_id else v) for k, v in line.items()}
        for lid, line in expected.get("lines", {}).items()
    }
    # Rename the table headers in the text (keeps comments and layout), then the references.
    header = re.compile(
        r"^(\s*\[\s*" + re.escape(section) + r"\s*\.\s*)(" + re.escape(old_id)
        + r"|\"" + re.escape(old_id) + r"\")(\s*[\].])", re.M)
    text = header.sub(lambda mt: mt.group(1) + new_id + mt.group(3), project.text)
    doc = tomlkit.parse(text)
    for lid in dependents(project, old_id):
        line = doc["lines"][lid]
        for end in ("from", "to"):
            if line.get(end) == old_id:
                _set(line, end, new_id)
    if tomllib.loads(doc.as_string()) != expected:
        # The element was not written as [section.ID] tables: rebuild it in place.
        doc = _copy_doc(project)
        fields = project.data[section][old_id]
        del doc[section][old_id]
        doc[section][new_id] = _table(fields)
        for lid in dependents(project, old_id):
            line = doc["lines"][lid]
            for end in ("from", "to"):
                if line.get(end) == old_id:
                    _set(line, end, new_id)
    return _finish(project, doc)
