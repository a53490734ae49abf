"""Editing a project: new validated Projects, the original untouched, one value one line."""

from __future__ import annotations

import difflib
from pathlib import Path

import pytest

from workbench.project.document import (
    ProjectError,
    add_element,
    delete_element,
    dependents,
    load_project,
    rename_element,
    save_project,
    set_value,
)

PROJECTS = Path(__file__).resolve().parents[2] / "projects"
TRANSFER = PROJECTS / "fellgate_process_water_transfer.toml"
NETWORK = PROJECTS / "fellgate_cooling_water_network.toml"
LINE = "310-PW-12"


def changed_lines(before: str, after: str) -> list[str]:
    return [l for l in difflib.unified_diff(before.splitlines(), after.splitlines(),
                                            lineterm="", n=0)
            if l[:1] in "+-" and not l.startswith(("+++", "---"))]


@pytest.fixture
def transfer():
    return load_project(TRANSFER)


@pytest.mark.parametrize("keypath, value", [
    (f"lines.{LINE}.length", "250 m"),
    (f"lines.{LINE}.valve.opening", "0.5"),
    (f"lines.{LINE}.valve.opening", 0.45),
    (f"lines.{LINE}.elastic_modulus", "200 GPa"),
    ("reservoirs.TK-310.level", "4.8 m"),
    ("project.title", "Transfer, revised"),
    ("simulation.duration", "3 min"),
    ("fluid.temperature", "30 degC"),
])
def test_a_save_after_setting_one_value_changes_exactly_one_line(transfer, tmp_path, keypath, value):
    edited = set_value(transfer, keypath, value)
    target = tmp_path / "edited.toml"
    save_project(edited, target)
    diff = changed_lines(TRANSFER.read_text(), target.read_text())
    assert len(diff) == 2, diff  # one line removed, one added
    key = keypath.rsplit(".", 1)[1]
    assert diff[0].startswith(f"-{key} = ") and diff[1].startswith(f"+{key} = ")


def test_a_changed_value_keeps_its_comment(transfer):
    edited = set_value(transfer, f"lines.{LINE}.pressure_rating", "10 bar")
    (line,) = [l for l in edited.text.splitlines() if l.startswith("pressure_rating")]
    assert line == 'pressure_rating = "10 bar"  # PN16 flanges'


def test_setting_a_value_leaves_the_original_project_untouched(transfer):
    text, system = transfer.text, transfer.system
    edited = set_value(transfer, f"lines.{LINE}.length", "300 m")
    assert edited.system.lines[LINE].length == 300.0
    assert transfer.system.lines[LINE].length == 240.0
    assert transfer.text == text and transfer.system is system
    assert transfer.doc.as_string() == text
    assert edited.modified and not transfer.modified


@pytest.mark.parametrize("keypath, value, words", [
    (f"lines.{LINE}.length", "15 mmm", "unknown unit 'mmm'"),
    (f"lines.{LINE}.length", "-4 m", "must be positive"),
    (f"lines.{LINE}.lenght", "4 m", "did you mean 'length'?"),
    ("lines.NOPE.length", "4 m", "names no element"),
    ("reservoirs.TK-310.level", "7 m", "overflow"),
    (f"lines.{LINE}.valve.opening", "wide", "expected a number"),
    (f"lines.{LINE}.valve.opening", 2.0, "out of range"),
    ("nonsense", "1", "not a key path"),
])
def test_an_invalid_value_raises_a_project_error_naming_the_key(transfer, keypath, value, words):
    with pytest.raises(ProjectError) as info:
        set_value(transfer, keypath, value)
    assert words in str(info.value)
    assert any(p.key == keypath for p in info.value.problems)


def test_none_removes_a_key(transfer):
    edited = set_value(transfer, f"lines.{LINE}.description", None)
    assert "description" not in edited.data["lines"][LINE]
    assert len(changed_lines(transfer.text, edited.text)) == 1


def test_an_added_element_is_validated_and_appears_in_the_model(transfer):
    edited = add_element(transfer, "receivers", "SUMP-1",
                         {"kind": "open_discharge", "elevation": "0.5 m"})
    edited = add_element(edited, "lines", "L-OVF", {
        "from": "TK-320", "to": "SUMP-1", "length": "25 m", "nominal_size": "3 in",
        "material": "commercial_steel", "fittings": [{"type": "elbow_90_standard", "count": 2}],
        "valve": {"characteristic": "linear", "k_open": 0.3, "opening": 0.0},
    })
    assert edited.system.lines["L-OVF"].valve.opening == 0.0
    assert edited.system.receivers["SUMP-1"].elevation == 0.5
    assert "L-OVF" not in transfer.system.lines
    assert dependents(edited, "SUMP-1") == ["L-OVF"]


def test_adding_an_invalid_or_duplicate_element_is_refused(transfer):
    with pytest.raises(ProjectError, match="already used"):
        add_element(transfer, "junctions", "TK-310", {"elevation": "1 m"})
    with pytest.raises(ProjectError, match="not connected"):
        add_element(transfer, "junctions", "J-9", {"elevation": "1 m"})
    with pytest.raises(ProjectError, match="not valid"):
        add_element(transfer, "junctions", "J 9", {"elevation": "1 m"})


def test_renaming_a_node_updates_the_lines_that_reference_it():
    network = load_project(NETWORK)
    renamed = rename_element(network, "VP-1", "VP-10")
    assert "VP-10" in renamed.system.junctions and "VP-1" not in renamed.system.junctions
    assert dependents(renamed, "VP-10") == ["400-CW-01", "410-CW-02", "400-CW-03"]
    diff = changed_lines(network.text, renamed.text)
    # the header and the three from/to lines, each replaced once
    assert len(diff) == 8
    assert "[junctions.VP-10]" in renamed.text
    assert dependents(network, "VP-1") == ["400-CW-01", "410-CW-02", "400-CW-03"]


def test_renaming_to_a_used_id_is_refused():
    network = load_project(NETWORK)
    with pytest.raises(ProjectError, match="already used"):
        rename_element(network, "VP-1", "TK-410")


def test_deleting_a_node_with_lines_is_refused_unless_cascaded():
    network = load_project(NETWORK)
    with pytest.raises(ProjectError, match="410-CW-02"):
        delete_element(network, "TK-410")
    smaller = delete_element(network, "TK-410", cascade=True)
    assert "TK-410" not in smaller.system.reservoirs
    assert "410-CW-02" not in smaller.system.lines
    assert "410-CW-02" in network.system.lines


def test_deleting_a_line_keeps_the_rest_of_the_file():
    network = load_project(NETWORK)
    smaller = delete_element(network, "410-CW-02")
    diff = changed_lines(network.text, smaller.text)
    assert all(line.startswith("-") for line in diff)


def test_changes_valid_only_together_are_made_with_set_values():
    drain = load_project(PROJECTS / "fellgate_neutraliser_drain.toml")
    with pytest.raises(ProjectError, match="density"):
        set_value(drain, "fluid.kind", "custom")
    from workbench.project.document import set_values

    custom = set_values(drain, {"fluid.kind": "custom", "fluid.temperature": None,
                                "fluid.density": "1050 kg/m3", "fluid.viscosity": "2.5 mPa*s",
                                "fluid.name": "spent brine"})
    assert custom.system.fluid.density == 1050.0
    assert custom.system.fluid.viscosity == pytest.approx(2.5e-3)
    assert custom.system.fluid.vapor_pressure is None  # vapour checks skipped, with a note
    assert drain.system.fluid.name == "water"


def test_a_value_no_toml_file_can_hold_is_a_project_error(transfer):
    with pytest.raises(ProjectError) as info:
        set_value(transfer, "project.title", object())
    assert info.value.problems[0].key == "project.title"


def quantity_keys(project):
    """(keypath, text) of every quantity-valued key in a project's sections and elements."""
    from workbench.project.schema import SECTIONS
    from workbench.project.units import QUANTITY_KINDS

    found = []
    for section in ("project", "fluid", "simulation"):
        for spec in SECTIONS[section]:
            if spec.kind in QUANTITY_KINDS and spec.name in project.data.get(section, {}):
                found.append((f"{section}.{spec.name}", spec.kind))
    for section in ("reservoirs", "junctions", "receivers", "lines"):
        for eid, table in project.data.get(section, {}).items():
            for spec in SECTIONS[section]:
                if spec.kind in QUANTITY_KINDS and spec.name in table:
                    found.append((f"{section}.{eid}.{spec.name}", spec.kind))
            for sub in ("valve", "surge"):
                for spec in SECTIONS.get(f"lines.{sub}", ()) if section == "lines" else ():
                    if spec.kind in QUANTITY_KINDS and spec.name in table.get(sub, {}):
                        found.append((f"lines.{eid}.{sub}.{spec.name}", spec.kind))
    return found


@pytest.mark.parametrize("path", sorted(PROJECTS.glob("*.toml")), ids=lambda p: p.stem)
def test_every_quantity_rewritten_in_other_units_changes_one_line_and_not_the_model(path):
    from workbench.project.units import format_quantity, parse_quantity

    project = load_project(path)
    keys = quantity_keys(project)
    assert len(keys) >= 8
    for keypath, kind in keys:
        table = project.data
        for part in keypath.split("."):
            table = table[part]
        si = parse_quantity(table, kind, atmosphere=project.system.atmospheric_pressure)
        other = "US" if project.unit_system == "SI" else "SI"
        text = format_quantity(si, kind, other, digits=12)
        if text == table:
            continue  # same spelling in both systems (seconds)
        edited = set_value(project, keypath, text)
        diff = changed_lines(project.text, edited.text)
        assert len(diff) == 2, (keypath, diff)
        assert f'= "{text}"' in diff[1], (keypath, diff)
        value = edited.data
        for part in keypath.split("."):
            value = value[part]
        again = parse_quantity(value, kind, atmosphere=project.system.atmospheric_pressure)
        assert again == pytest.approx(si, rel=1e-9, abs=1e-12)


def test_a_catalogue_liquid_takes_a_bulk_modulus_from_the_file():
    drain = load_project(PROJECTS / "fellgate_neutraliser_drain.toml")
    from workbench.project.document import set_values

    glycol = set_values(drain, {"fluid.kind": "ethylene_glycol",
                                "fluid.bulk_modulus": "3.0 GPa"})
    assert glycol.system.fluid.bulk_modulus == 3.0e9
    assert glycol.system.fluid.density > 1100  # MEG at 18 degC about 1115 kg/m3 (from memory)


def test_a_junction_is_added_together_with_the_lines_that_connect_it():
    from workbench.project.document import add_elements

    network = load_project(NETWORK)
    with pytest.raises(ProjectError, match="not connected to any line"):
        add_element(network, "junctions", "J-2", {"elevation": "15 m"})
    line = {"length": "50 m", "inner_diameter": "100 mm", "roughness": "0.05 mm"}
    bigger = add_elements(network, [
        ("junctions", "J-2", {"elevation": "15 m"}),
        ("lines", "L-5", {"from": "VP-1", "to": "J-2", **line}),
        ("lines", "L-6", {"from": "J-2", "to": "CT-B", **line}),
    ])
    assert dependents(bigger, "J-2") == ["L-5", "L-6"]
    assert bigger.system.junctions["J-2"].elevation == 15.0
