"""The schema is the one description of the file: validation, forms and docs agree with it."""

from __future__ import annotations

import pytest

from workbench.project.schema import (
    LIST_ITEMS,
    SECTIONS,
    choices_for,
    reference_markdown,
    spec_for,
)
from workbench.project.units import QUANTITY_KINDS

# The keys the issue fixes as a contract (issue 2, "Project files: TOML, schema 1").
CONTRACT_KEYS = {
    "project": {"title", "description", "units", "site_elevation"},
    "fluid": {"kind", "temperature", "density", "viscosity", "vapor_pressure", "bulk_modulus"},
    "reservoirs": {"kind", "bottom_elevation", "level", "surface_pressure", "shape", "diameter",
                   "length", "width", "cone_angle", "cone_height", "height", "min_level"},
    "junctions": {"elevation"},
    "receivers": {"kind", "elevation", "pressure"},
    "lines": {"from", "to", "length", "inner_diameter", "nominal_size", "schedule", "roughness",
              "material", "friction_factor", "entrance", "fittings", "profile",
              "wall_thickness", "elastic_modulus", "pressure_rating"},
    "lines.valve": {"characteristic", "k_open", "kv_open", "opening", "schedule"},
    "simulation": {"duration", "initial_state", "stop_when"},
}


@pytest.mark.parametrize("section", sorted(CONTRACT_KEYS))
def test_the_contract_keys_of_the_issue_are_all_in_the_schema(section):
    names = {spec.name for spec in SECTIONS[section]}
    assert CONTRACT_KEYS[section] <= names


def test_every_field_kind_is_a_quantity_kind_or_a_plain_kind():
    plain = {"number", "int", "text", "choice", "bool", "list", "table"}
    for specs in [*SECTIONS.values(), *LIST_ITEMS.values()]:
        for spec in specs:
            assert spec.kind in plain or spec.kind in QUANTITY_KINDS, spec


def test_choices_from_core_tables_are_found_by_name():
    assert "water" in choices_for("fluid", "kind") and "custom" in choices_for("fluid", "kind")
    assert "commercial_steel" in choices_for("lines", "material")
    assert "elbow_90_standard" in choices_for("lines.fittings", "type")
    assert "sharp" in choices_for("lines", "entrance")
    assert choices_for("lines.valve", "characteristic") == (
        "linear", "equal_percentage", "quick_opening")


def test_the_reference_lists_every_key():
    text = reference_markdown()
    for specs in [*SECTIONS.values(), *LIST_ITEMS.values()]:
        for spec in specs:
            assert f"| `{spec.name}` |" in text
    assert spec_for("lines", "length").required
