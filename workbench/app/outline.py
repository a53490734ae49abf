"""What the System view lists and edits, worked out from the project's plain data.

No Textual here: the element list, the key paths of a form, the text shown for a stored
value and the starting fields of a new element are plain functions, easy to test.
"""

from __future__ import annotations

import json
import re
import tomllib
from dataclasses import dataclass
from typing import Any

from workbench.printable import printable
from workbench.project.schema import ELEMENT_SECTIONS, SECTIONS, FieldSpec

#: Singular words for the element sections, as the list and the questions say them.
NOUN = {"reservoirs": "reservoir", "junctions": "junction", "receivers": "receiver",
        "lines": "line"}
#: Settings sections shown above the elements.
SETTINGS = ("project", "fluid", "simulation")
#: Same rule as the project layer (workbench.project.validate.ID_PATTERN).
ID_PATTERN = re.compile(r"^[A-Za-z0-9][A-Za-z0-9_-]*$")


@dataclass(frozen=True)
class Entry:
    """One row of the element list: a settings section or an element."""

    section: str
    element: str | None = None

    @property
    def key(self) -> str:
        return f"{self.section}:{self.element}" if self.element else self.section

    @classmethod
    def from_key(cls, key: str) -> "Entry":
        section, _, element = key.partition(":")
        return cls(section, element or None)


def entries(data: dict) -> list[Entry]:
    """Settings first, then every element by section, in file order."""
    found = [Entry(s) for s in SETTINGS]
    for section in ELEMENT_SECTIONS:
        for element in (data.get(section) or {}):
            found.append(Entry(section, element))
    return found


@dataclass(frozen=True)
class Field:
    """One input of a form: the key path it edits and the schema entry describing it."""

    keypath: str
    spec: FieldSpec
    group: str = ""
    """The sub-table the key lives in (``"valve"``, ``"surge"``) or ``""``."""
    heading: str = ""
    """The form's heading the field is shown under (``"size and route"``) or ``""``."""


#: A line's ~30 keys in a few headed groups, the common what-if keys first (the size,
#: length and valve opening fit on the first screen at 80x24). Key names relative to the
#: line; a name not listed here falls into the last group.
LINE_HEADINGS: tuple[tuple[str, tuple[str, ...]], ...] = (
    ("size and route", ("from", "to", "length", "nominal_size", "schedule",
                        "inner_diameter")),
    ("valve", ("valve.opening", "valve.characteristic", "valve.k_open", "valve.kv_open",
               "valve.rangeability", "valve.position", "valve.schedule")),
    ("losses", ("material", "roughness", "friction_factor", "entrance", "fittings",
                "profile")),
    ("wall and surge", ("pressure_rating", "wall_thickness", "elastic_modulus",
                        "poisson_ratio", "support", "surge.model", "surge.reaches")),
    ("notes", ("description",)),
)


#: Sub-tables whose key may hold a word instead of a table: the key gets a field of its
#: own above the table's keys (a tank's ``vent = "none"`` seals it; no vent key leaves it
#: open to the air, its gas space not modelled).
TABLE_WORDS: dict[str, FieldSpec] = {
    "reservoirs.vent": FieldSpec(
        "vent", "choice", False,
        "'none' for a sealed tank (no vent); empty for a tank open to the air (its gas "
        "space not modelled); a vent's keys typed below give it a vent",
        choices=("none",)),
}


def form_fields(entry: Entry) -> list[Field]:
    """Every editable key of an entry, with its key path; a line's in :data:`LINE_HEADINGS`
    order, other sections in schema order (a sub-table's keys under its name)."""
    if entry.element is None:
        return [Field(f"{entry.section}.{s.name}", s) for s in SECTIONS[entry.section]]
    base = f"{entry.section}.{entry.element}"
    fields = [Field(f"{base}.{s.name}", s) for s in SECTIONS[entry.section] if s.kind != "table"]
    for sub in (s for s in SECTIONS[entry.section] if s.kind == "table"):
        sub_specs = SECTIONS.get(f"{entry.section}.{sub.name}", ())
        word = TABLE_WORDS.get(f"{entry.section}.{sub.name}")
        if word is not None:  # the key itself first: a word in the table's stead
            fields.append(Field(f"{base}.{sub.name}", word, "", sub.name))
        fields += [Field(f"{base}.{sub.name}.{s.name}", s, sub.name, sub.name)
                   for s in sub_specs]
    if entry.section == "lines":
        return _headed(fields, base)
    return fields


def _headed(fields: list[Field], base: str) -> list[Field]:
    """``fields`` reordered and headed by :data:`LINE_HEADINGS` (unlisted keys go last)."""
    by_name = {f.keypath[len(base) + 1:]: f for f in fields}
    out: list[Field] = []
    for heading, names in LINE_HEADINGS:
        for name in names:
            field = by_name.pop(name, None)
            if field is not None:
                out.append(Field(field.keypath, field.spec, field.group, heading))
    last = LINE_HEADINGS[-1][0]
    out += [Field(f.keypath, f.spec, f.group, last) for f in by_name.values()]
    return out


def lookup(data: dict, keypath: str) -> Any:
    """The stored value at a key path, or ``None`` when absent."""
    node: Any = data
    for part in _split(keypath):
        if not isinstance(node, dict) or part not in node:
            return None
        node = node[part]
    return node


def _split(keypath: str) -> list[str]:
    """Key path to parts; element ids never contain dots (see :data:`ID_PATTERN`)."""
    return keypath.split(".")


def value_text(value: Any) -> str:
    """A stored value as the user would type it (inline TOML for lists)."""
    if value is None:
        return ""
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, str):
        return printable(value)  # control characters from the file shown, never sent
    if isinstance(value, (list, tuple)):
        return "[" + ", ".join(_inline(v) for v in value) + "]"
    if isinstance(value, dict):
        return _inline(value)
    return str(value)


def _inline(value: Any) -> str:
    if isinstance(value, dict):
        return "{ " + ", ".join(f"{k} = {_inline(v)}" for k, v in value.items()) + " }"
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, str):
        return printable(json.dumps(value, ensure_ascii=False))
    if isinstance(value, (list, tuple)):
        return "[" + ", ".join(_inline(v) for v in value) + "]"
    return repr(value)


class EntryError(ValueError):
    """Text in a field that cannot even be read as the kind of value it should hold."""


def typed_value(text: str, spec: FieldSpec) -> Any:
    """Turn the text of a field into the value handed to ``set_value``.

    Quantities and words stay text (the project layer parses units and says what is
    wrong); numbers become numbers; lists are read as inline TOML; empty text removes
    the key (``None``).
    """
    text = text.strip()
    if text == "":
        return None
    if spec.kind == "list":
        try:
            value = tomllib.loads(f"v = {text}")["v"]
        except tomllib.TOMLDecodeError as error:
            raise EntryError(f"not a list in TOML form ({error}); e.g. "
                             "[{ k = 0.9, label = \"strainer\" }]") from None
        if not isinstance(value, list):
            raise EntryError("expected a list in square brackets: [ ... ]")
        return value
    if spec.kind == "int":
        try:
            return int(text)
        except ValueError:
            raise EntryError(f"'{text}' is not a whole number") from None
    if spec.kind == "number":
        try:
            return float(text)
        except ValueError:
            if spec.name == "entrance":
                return text
            raise EntryError(f"'{text}' is not a number") from None
    if spec.kind == "bool":
        return text.lower() in {"true", "yes", "on", "1"}
    if spec.name == "entrance":  # a named shape or a number K
        try:
            return float(text)
        except ValueError:
            return text
    return text


def check_new_id(data: dict, text: str) -> str:
    """Why ``text`` cannot be a new element id, or ``""`` when it can."""
    if not ID_PATTERN.match(text):
        return "an id starts with a letter or digit and holds letters, digits, _ or -"
    for section in ELEMENT_SECTIONS:
        if text in (data.get(section) or {}):
            return f"'{text}' is already used by a {NOUN[section]}"
    return ""


def suggest_id(data: dict, stem: str) -> str:
    """The first free id ``stem1``, ``stem2`` ... (or ``stem_2`` after an existing id)."""
    used = {e for s in ELEMENT_SECTIONS for e in (data.get(s) or {})}
    if stem in used or stem[-1:].isdigit():
        base = re.sub(r"\d+$", "", stem) or stem
    else:
        base = stem
    n = 1
    while f"{base}{n}" in used:
        n += 1
    return f"{base}{n}"


STEMS = {"reservoirs": "T", "junctions": "J", "receivers": "OUT", "lines": "L"}


#: A new element's sizes in the project's units: the same physical size rounded to a value
#: the trade uses (10 m about 30 ft; a 50 mm bore about an NPS 2 line; commercial steel
#: roughness 0.045 mm, 0.0018 in). Common practice, no source.
STARTING_SIZES = {
    "SI": {"zero": "0 m", "level": "1 m", "length": "10 m", "bore": ("inner_diameter", "50 mm"),
           "roughness": "0.045 mm"},
    "US": {"zero": "0 ft", "level": "3 ft", "length": "30 ft", "bore": ("nominal_size", "2 in"),
           "roughness": "0.0018 in"},
}


def starting_fields(data: dict, section: str) -> dict[str, Any]:
    """Fields of a new element: valid as they stand, for the user to edit next, in the
    project's own units (``[project] units``)."""
    units = (data.get("project") or {}).get("units", "SI")
    size = STARTING_SIZES.get(units, STARTING_SIZES["SI"])
    if section == "reservoirs":
        return {"kind": "constant_level", "bottom_elevation": size["zero"], "level": size["level"]}
    if section == "junctions":
        return {"elevation": size["zero"]}
    if section == "receivers":
        return {"kind": "open_discharge", "elevation": size["zero"]}
    nodes = [e for s in ("reservoirs", "junctions", "receivers") for e in (data.get(s) or {})]
    start = nodes[0] if nodes else ""
    end = next((n for n in reversed(nodes) if n != start), start)
    bore_key, bore = size["bore"]
    return {"from": start, "to": end, "length": size["length"], bore_key: bore,
            "roughness": size["roughness"]}


#: Keys a sub-table gets when a form creates it, so it is valid from the first edit:
#: a valve needs a characteristic and a loss at full opening (K 0.2 is a common-practice
#: figure for a fully open full-bore valve, no source; the user sets the real value).
SUB_TABLE_START = {"valve": {"characteristic": "linear", "k_open": 0.2}, "surge": {}}


def edit_target(data: dict, field: Field, value: Any) -> tuple[str, Any]:
    """The key path and value ``set_value`` gets for an edit of ``field``.

    Fields of an absent sub-table (``[lines.L1.valve]``) create it with
    :data:`SUB_TABLE_START`; clearing a required key of a sub-table removes the table.
    """
    if not field.group:
        return field.keypath, value
    base = field.keypath.rsplit(".", 1)[0]
    if not isinstance(lookup(data, base), dict):  # absent, or a word ("none") in its stead
        if value is None:
            return field.keypath, None
        fields = dict(SUB_TABLE_START.get(field.group, {}))
        if field.spec.name == "kv_open":
            fields.pop("k_open", None)
        fields[field.spec.name] = value
        return base, fields
    if value is None and field.spec.required:
        return base, None
    return field.keypath, value
