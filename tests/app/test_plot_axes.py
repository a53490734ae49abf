"""The shared plot axes (workbench.app.plotaxes): plain functions, checked by hand."""

from __future__ import annotations

from workbench.app import plotaxes


def test_time_reads_in_seconds_minutes_or_hours_by_its_span():
    # Common practice, no source: a span is read in the largest unit that keeps it above
    # a few units (363.1 s reads as about 6 min).
    assert plotaxes.time_axis([0.0, 90.0])[1] == "s"
    values, unit, divisor = plotaxes.time_axis([0.0, 363.1, 726.1])
    assert unit == "min" and divisor == 60.0 and abs(values[-1] - 726.1 / 60) < 1e-12
    assert plotaxes.time_axis([0.0, 5 * 3600.0])[1] == "h"


def test_ticks_are_round_numbers_covering_the_range():
    ticks = plotaxes.nice_ticks(0.0, 24.2)
    assert ticks[0] == 0.0 and ticks[-1] <= 24.2
    steps = {round(b - a, 9) for a, b in zip(ticks, ticks[1:])}
    assert len(steps) == 1 and steps.pop() in {5.0, 10.0, 2.5}
    assert plotaxes.tick_labels([5.0, 7.5]) == ["5", "7.5"]


def test_a_limit_inside_the_data_is_drawn_and_one_off_the_scale_is_named_in_words():
    span = plotaxes.data_range([0.0, 10.0], [2.0, 8.0])
    assert span[0] < 0.0 and span[1] > 10.0
    rating = plotaxes.Limit("rating", [104.0, 103.0])
    vapour = plotaxes.Limit("vapour limit", [4.0, 5.0])
    drawn, words = plotaxes.place_limits([rating, vapour], span)
    assert drawn == [vapour]
    assert words == ["rating above the plot (lowest 103)"]


def test_values_below_the_vapour_limit_are_raised_to_it_and_counted():
    values, raised = plotaxes.clamp_below([5.0, -12.0, 1.0], [-9.9, -9.9, 2.0])
    assert values == [5.0, -9.9, 2.0] and raised == 2
    assert plotaxes.clamp_below([1.0], None) == ([1.0], 0)


def test_the_legend_is_one_line_of_marker_and_name_pairs():
    assert plotaxes.legend_text([("=", "pipe"), ("x", "valve")]) == "= pipe  x valve"
