"""The plain logic behind the list editor: columns from the schema, rows back to entries."""

from __future__ import annotations

from workbench.app.listtable import (
    CellError,
    columns_for,
    items_from,
    list_key,
    new_row,
    place_text,
    places,
    quantity_problem,
    rows_from,
)
from workbench.project.problems import Problem

PROFILE = [{"distance": "0 m", "elevation": "18 m"}, {"distance": "20 m", "elevation": "2.5 m"},
           {"distance": "240 m", "elevation": "1.5 m"}]
SCHEDULE = [{"time": "0 s", "opening": 0.6}, {"time": "30 s", "opening": 0.6},
            {"time": "42 s", "opening": 0}]


def test_list_keys_drop_the_element_id():
    assert list_key("lines.L1.profile") == "lines.profile"
    assert list_key("lines.L1.valve.schedule") == "lines.valve.schedule"


def test_untouched_rows_come_back_exactly_as_stored():
    columns = columns_for("lines.L1.valve.schedule", SCHEDULE)
    items, problems = items_from(rows_from(SCHEDULE, columns), columns)
    assert problems == {}
    assert items == SCHEDULE
    assert type(items[2]["opening"]) is int  # 0 stays 0, not 0.0


def test_a_number_cell_that_is_not_a_number_is_named_by_row_and_column():
    columns = columns_for("lines.L1.valve.schedule", SCHEDULE)
    rows = rows_from(SCHEDULE, columns)
    rows[1].cells["opening"] = "half"
    _items, problems = items_from(rows, columns)
    assert problems == {(1, "opening"): "'half' is not a number"}
    assert issubclass(CellError, ValueError)


def test_an_empty_cell_leaves_the_key_out():
    columns = columns_for("lines.L1.fittings", [])
    rows = rows_from([{"type": "gate_valve", "count": 2, "label": "isolation"}], columns)
    rows[0].cells["label"] = " "
    items, _ = items_from(rows, columns)
    assert items == [{"type": "gate_valve", "count": 2}]


def test_a_new_profile_point_goes_halfway_to_the_next_or_a_step_beyond_the_last():
    columns = columns_for("lines.L1.profile", PROFILE)
    rows = rows_from(PROFILE, columns)
    # the optional air_valve cell starts empty (left out of the file when applied)
    assert new_row(rows, 0, columns).cells == {"distance": "10 m", "elevation": "10.25 m",
                                               "air_valve": ""}
    assert new_row(rows, 2, columns).cells == {"distance": "460 m", "elevation": "1.5 m",
                                               "air_valve": ""}


def test_a_new_point_between_rows_in_different_units_is_written_in_the_first_ones_unit():
    points = [{"distance": "0 ft", "elevation": "10 m"},
              {"distance": "10 m", "elevation": "20 m"}]
    columns = columns_for("lines.L1.profile", points)
    cells = new_row(rows_from(points, columns), 0, columns).cells
    # 10 m = 32.8084 ft (1 ft = 0.3048 m exactly, NIST SP 811 appendix B)
    assert cells["distance"] == "16.4042 ft"
    assert cells["elevation"] == "15 m"


def test_a_first_row_is_valid_where_it_can_be():
    schedule = columns_for("lines.L1.valve.schedule", [])
    assert new_row([], -1, schedule).cells == {"time": "0 s", "opening": "1.0"}
    fittings = columns_for("lines.L1.fittings", [])
    first = new_row([], -1, fittings).cells
    assert first["type"] == fittings[0].choices[0] and first["k"] == ""


def test_a_new_fitting_copies_the_current_one():
    fittings = [{"type": "gate_valve", "count": 2}, {"k": 1.2}]
    columns = columns_for("lines.L1.fittings", fittings)
    assert new_row(rows_from(fittings, columns), 1, columns).cells["k"] == "1.2"


def test_problems_are_placed_on_the_row_and_column_their_key_paths_name():
    found = places([
        Problem("f.toml", "lines.L1.profile[3].distance", "'260 m' is beyond the line"),
        Problem("f.toml", "lines.L1.profile[2]", "give both"),
        Problem("f.toml", "lines.L1.length", "too short"),
    ], "lines.L1.profile")
    assert [(p.row, p.column) for p in found] == [(2, "distance"), (1, None), (None, None)]
    assert place_text(found[0], "lines.L1.profile") == \
        "✗ row 3 · distance: '260 m' is beyond the line"
    assert place_text(found[2], "lines.L1.profile") == "✗ lines.L1.length: too short"


def test_keys_the_schema_does_not_describe_get_a_column_so_nothing_is_lost():
    items = [{"distance": "0 m", "elevation": "1 m", "note": "weir"}]
    columns = columns_for("lines.L1.profile", items)
    assert [c.name for c in columns] == ["distance", "elevation", "air_valve", "note"]
    assert items_from(rows_from(items, columns), columns)[0] == items


def test_a_quantity_cell_without_a_unit_says_so_while_typing():
    columns = columns_for("lines.L1.profile", PROFILE)
    assert "a unit is needed" in quantity_problem("4", columns[1])
    assert quantity_problem("4 ft", columns[1]) == ""
    assert quantity_problem("", columns[1]) == ""
