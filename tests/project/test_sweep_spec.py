"""Reading ``--vary`` and ``--require``: the grid of cases and the pass/fail logic of a sweep.

The outside facts used are unit conversions (SI definitions: 1 in = 25.4 mm exactly,
0 degC = 273.15 K, 1 min = 60 s, 1 L = 1e-3 m^3); the rest is the grammar's own logic,
checked by cases that must pass and cases that must fail.
"""

from __future__ import annotations

import math

import pytest

from workbench.project.sweep_spec import (
    Axis,
    SweepSpecError,
    check_criteria,
    judge,
    parse_criterion,
    parse_vary,
    sweep_cases,
)

DATA = {
    "reservoirs": {"T1": {"kind": "tank"}, "SUMP": {"kind": "constant_level"}},
    "receivers": {"OUT": {"kind": "open_discharge"}},
    "junctions": {},
    "lines": {"L1": {"from": "T1", "to": "OUT"}},
}


@pytest.mark.parametrize(
    ("text", "texts", "values"),
    [
        ("lines.L1.inner_diameter=80 mm,100 mm,150 mm", ("80 mm", "100 mm", "150 mm"), ("80 mm", "100 mm", "150 mm")),
        ("lines.L1.nominal_size=3 in, 4 in ,6 in", ("3 in", "4 in", "6 in"), ("3 in", "4 in", "6 in")),
        ("reservoirs.T1.level=0.5 m..4 m/8", tuple(f"{x:g} m" for x in (0.5, 1, 1.5, 2, 2.5, 3, 3.5, 4)), None),
        ("lines.L1.valve.opening=0..1/5", ("0", "0.25", "0.5", "0.75", "1"), (0.0, 0.25, 0.5, 0.75, 1.0)),
        # SI definition: 0 degC = 273.15 K, so 293.15 K is 20 degC; the range keeps the unit typed first.
        ("fluid.temperature=10 degC..293.15 K/3", ("10 degC", "15 degC", "20 degC"), None),
        # SI definition: 1 in = 25.4 mm, so 50.8 mm is 2 in.
        ("lines.L1.inner_diameter=1 in..50.8 mm/3", ("1 in", "1.5 in", "2 in"), None),
        ("lines.L1.valve.characteristic=linear,equal_percentage", ("linear", "equal_percentage"), None),
    ],
)
def test_vary_reads_lists_and_ranges_as_typed(text, texts, values) -> None:
    axis = parse_vary(text, DATA)
    assert axis.texts == texts
    if values is not None:
        assert axis.values == values


@pytest.mark.parametrize(
    ("text", "words"),
    [
        ("lines.L1.lenght=1 m", ["lenght", "did you mean 'length'"]),
        ("lines.L9.length=1 m", ["no line 'L9'", "known: L1"]),
        ("reservoirs.T1=1 m", ["expected reservoirs.ID.KEY"]),
        ("lines.L1.inner_diameter=80 mmm", ["inner_diameter", "unknown unit 'mmm'"]),
        ("lines.L1.inner_diameter=80 kPa", ["expected a diameter, got a pressure"]),
        ("lines.L1.valve.opening=0..2/3", ["above the largest valid value 1"]),
        ("lines.L1.valve.characteristic=lin", ["not one of", "did you mean 'linear'"]),
        ("lines.L1.nominal_size=3 in..6 in/3", ["a range needs a quantity or a number"]),
        ("reservoirs.T1.level=1 m..2 m", ["a range needs a point count"]),
        ("reservoirs.T1.level=1 m..2 m/1", ["at least 2 points"]),
        ("reservoirs.T1.level=1 m..2 m/x", ["whole number"]),
        ("lines.L1.length=1 m,,2 m", ["an empty value"]),
        ("lines.L1.length=1 m,1 m", ["listed twice"]),
        ("lines.L1.fittings=1", ["cannot be varied"]),
        ("lines.L1.length", ["expected KEYPATH=VALUES"]),
        ("pipes.L1.length=1 m", ["unknown section 'pipes'"]),
    ],
)
def test_bad_vary_text_gets_a_message_naming_what_was_wrong(text, words) -> None:
    with pytest.raises(SweepSpecError) as info:
        parse_vary(text, DATA)
    for word in words:
        assert word in str(info.value)


def test_a_grid_runs_in_sweep_order_first_axis_slowest() -> None:
    a = parse_vary("lines.L1.nominal_size=2 in,3 in", DATA)
    b = parse_vary("reservoirs.T1.level=1 m..3 m/3", DATA)
    cases = sweep_cases([a, b])
    assert [c.index for c in cases] == list(range(6))
    assert [(c.values["lines.L1.nominal_size"], c.values["reservoirs.T1.level"]) for c in cases] == [
        ("2 in", "1 m"), ("2 in", "2 m"), ("2 in", "3 m"),
        ("3 in", "1 m"), ("3 in", "2 m"), ("3 in", "3 m"),
    ]
    assert cases[4].settings == (("lines.L1.nominal_size", "3 in"), ("reservoirs.T1.level", "2 m"))


def test_the_same_key_varied_twice_is_refused() -> None:
    a = parse_vary("lines.L1.length=1 m,2 m", DATA)
    with pytest.raises(SweepSpecError, match="given twice"):
        sweep_cases([a, a])


def test_a_grid_larger_than_the_limit_is_refused_before_running() -> None:
    big = Axis("lines.L1.length", tuple(str(i) for i in range(400)), tuple(range(400)), "length")
    other = Axis("reservoirs.T1.level", tuple(str(i) for i in range(400)), tuple(range(400)), "length")
    with pytest.raises(SweepSpecError, match="more than the limit"):
        sweep_cases([big, other])


@pytest.mark.parametrize(
    ("text", "metric", "element", "op", "threshold"),
    [
        ("drain_time(T1) < 30 min", "drain_time", "T1", "<", 1800.0),  # 1 min = 60 s
        ("flow(L1) >= 10 L/s", "flow", "L1", ">=", 0.010),  # 1 L = 1e-3 m^3
        ("velocity(L1)<=3 m/s", "velocity", "L1", "<=", 3.0),
        ("reynolds(L1) > 4000", "reynolds", "L1", ">", 4000.0),
        ("max_pressure(L1) < 10 bar", "max_pressure", "L1", "<", 1.0e6),  # 1 bar = 1e5 Pa
        ("min_pressure(L1) > -50 kPa", "min_pressure", "L1", ">", -5.0e4),
    ],
)
def test_comparisons_parse_to_si_thresholds(text, metric, element, op, threshold) -> None:
    c = parse_criterion(text)
    assert (c.metric, c.element, c.op) == (metric, element, op)
    assert c.threshold == pytest.approx(threshold, rel=1e-12)


@pytest.mark.parametrize(
    ("text", "words"),
    [
        ("flw(L1) < 3 L/s", ["unknown result 'flw'", "did you mean 'flow'"]),
        ("flow L1 < 3 L/s", ["expected '(' and an element id"]),
        ("flow(L1) => 3 L/s", ["expected a comparison"]),
        ("flow(L1) < 3 m", ["expected a flow, got a length"]),
        ("flow(L1) < ", ["expected a threshold"]),
        ("reynolds(L1) < many", ["not a plain number"]),
        ("no", ["expected a warning code"]),
        ("no profile.vapor extra", ["expected the end"]),
        ("__import__('os')", ["unknown result '__import__'"]),
    ],
)
def test_bad_criteria_get_a_message_and_nothing_is_evaluated(text, words) -> None:
    with pytest.raises(SweepSpecError) as info:
        parse_criterion(text)
    for word in words:
        assert word in str(info.value)


def test_criteria_are_checked_against_the_project_elements() -> None:
    check_criteria([parse_criterion("drain_time(T1) < 30 min")], DATA, has_simulation=True)
    with pytest.raises(SweepSpecError, match="no \\[simulation\\] section"):
        check_criteria([parse_criterion("drain_time(T1) < 30 min")], DATA, has_simulation=False)
    with pytest.raises(SweepSpecError, match="'SUMP' is not a tank"):
        check_criteria([parse_criterion("drain_time(SUMP) < 30 min")], DATA, has_simulation=True)
    with pytest.raises(SweepSpecError, match="'T1' is not a line"):
        check_criteria([parse_criterion("flow(T1) > 1 L/s")], DATA, has_simulation=False)


STEADY = {
    "lines": {"L1": {"flow_m3_s": 0.012, "velocity_m_s": 1.9, "reynolds": 1.5e5}},
    "nodes": {"T1": {"head_m": 14.0, "pressure_pa": 0.0}},
    "warnings": [{"code": "profile.subatmospheric", "element": "L1", "message": "..."}],
}
SIM = {
    "lines": {"L1": {"max_pressure_pa": 2.0e5, "min_pressure_pa": -1.0e4}},
    "events": [{"time_s": 1500.0, "code": "tank.drained", "element": "T1", "message": "..."}],
    "warnings": [],
}


@pytest.mark.parametrize(
    ("criteria", "expected"),
    [
        (["flow(L1) >= 10 L/s"], True),
        (["flow(L1) >= 12.5 L/s"], False),
        (["drain_time(T1) < 30 min"], True),  # 1500 s < 1800 s
        (["drain_time(T1) < 25 min"], False),  # 1500 s is exactly 25 min: not strictly less
        (["drain_time(T1) <= 25 min"], True),
        (["no profile.vapor"], True),
        (["no profile.subatmospheric"], False),
        (["no profile.subatmospheric(T1)"], True),  # the warning is on L1, not T1
        (["no tank.drained"], False),  # events count as codes too
        (["flow(L1) >= 10 L/s", "no profile.subatmospheric"], False),  # every criterion must pass
        ([], None),
    ],
)
def test_a_case_passes_only_when_every_criterion_holds(criteria, expected) -> None:
    passed, _ = judge([parse_criterion(t) for t in criteria], STEADY, SIM)
    assert passed is expected


def test_a_tank_that_never_drains_fails_a_drain_time_limit() -> None:
    sim = dict(SIM, events=[])
    passed, details = judge([parse_criterion("drain_time(T1) < 10 h")], STEADY, sim)
    assert passed is False
    assert details[0].value == math.inf


# Property (hypothesis): whatever a user types, the parsers answer with a Criterion/Axis or
# with the sweep's own error in words, never another exception.
from hypothesis import HealthCheck, given, settings  # noqa: E402
from hypothesis import strategies as st  # noqa: E402

_PIECES = st.sampled_from(
    ["flow", "drain_time", "no", "(", ")", "L1", "T1", "<", "<=", ">", "=", " ", "10", "L/s", "min",
     "profile.vapor", "..", "/", ",", "m", "lines", "reservoirs", ".", "level", "inner_diameter",
     "nominal_size", "valve", "opening", "e", "-", "1,5", "inf", "nan", "__", "degC", "0x1", "π"]
)
_TYPED = st.one_of(st.text(max_size=40), st.lists(_PIECES, max_size=12).map("".join))


@settings(max_examples=300, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(_TYPED)
def test_any_criterion_text_parses_or_gets_a_sweep_error(text: str) -> None:
    try:
        c = parse_criterion(text)
    except SweepSpecError as exc:
        assert str(exc)
    else:
        assert c.absent_code is not None or (c.metric is not None and math.isfinite(c.threshold))


@settings(max_examples=300, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(_TYPED, _TYPED)
def test_any_vary_text_parses_or_gets_a_sweep_error(keypath: str, values: str) -> None:
    try:
        axis = parse_vary(f"{keypath}={values}", DATA)
    except SweepSpecError as exc:
        assert str(exc)
    else:
        assert len(axis.texts) == len(axis.values) >= 1


@settings(max_examples=300, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.sampled_from(["lines.L1.inner_diameter", "reservoirs.T1.level", "fluid.temperature",
                        "lines.L1.valve.opening", "lines.L1.nominal_size", "reservoirs.T1.surface_pressure",
                        "lines.L1.valve.characteristic", "lines.L1.surge.reaches"]), _TYPED)
def test_any_values_for_a_valid_key_parse_or_get_a_sweep_error(keypath: str, values: str) -> None:
    try:
        axis = parse_vary(f"{keypath}={values}", DATA)
    except SweepSpecError as exc:
        assert keypath in str(exc)
    else:
        assert len(set(axis.texts)) == len(axis.texts)


def test_lowest_pressure_is_the_minimum_along_the_steady_profile() -> None:
    steady = {"lines": {"L1": {"profile": {"pressure_pa": [4.0e4, -2.5e4, 1.0e3]}}}, "warnings": []}
    passed, details = judge([parse_criterion("lowest_pressure(L1) > -20 kPa")], steady, None)
    assert details[0].value == -2.5e4
    assert passed is False
