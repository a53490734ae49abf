"""Pipe sizes against ASME B36.10M/B36.19M and fluids' tables; the pipe-material table."""

from __future__ import annotations

import math

import pytest
from fluids.friction import HHR_roughness, _Farshad_roughness, _roughness
from fluids.piping import NPSS10, SS10DN, nearest_pipe

from workbench.core.pipes import (
    ASME_SCHEDULES,
    DN_TO_NPS,
    ROUGHNESS,
    MaterialError,
    PipeSizeError,
    pipe_dimensions,
    pipe_material,
)

MM = 1e-3


@pytest.mark.parametrize(
    ("nominal", "schedule", "od_mm", "wall_mm", "id_inch_table"),
    [
        # ASME B36.10M-2004 Table 1: OD and wall in mm; ID in inches from the inch
        # columns of the same table (from memory), converted at 25.4 mm/in.
        ("4", "40", 114.3, 6.02, 4.026),
        ("12", "40", 323.8, 10.31, 11.938),
        ("2", "40", 60.3, 3.91, 2.067),
        ("6", "80", 168.3, 10.97, 5.761),
        ("8", "40", 219.1, 8.18, 7.981),
        ("1-1/2", "80", 48.3, 5.08, 1.500),
        # ASME B36.19M-2004: NPS 2 Sch 10S, OD 60.3 mm, wall 2.77 mm (0.109 in).
        ("2", "10S", 60.3, 2.77, 2.157),
    ],
)
def test_dimensions_match_the_asme_tables(nominal, schedule, od_mm, wall_mm, id_inch_table):
    size = pipe_dimensions(nominal, schedule)
    # The SI columns: ID = OD - 2 t exactly as printed (to float rounding).
    assert size.outer_diameter == pytest.approx(od_mm * MM, abs=1e-9)
    assert size.wall_thickness == pytest.approx(wall_mm * MM, abs=1e-9)
    assert size.inner_diameter == pytest.approx((od_mm - 2 * wall_mm) * MM, abs=1e-9)
    # The inch columns round differently; fluids' docs put the differences below 0.1 mm.
    assert size.inner_diameter == pytest.approx(id_inch_table * 25.4 * MM, abs=0.1 * MM)


@pytest.mark.parametrize(
    ("nominal", "schedule"),
    [("4", "40"), ("12", "40"), ("2", "40"), ("6", "80"), ("3/4", "40S"), ("24", "STD"),
     ("10", "XS"), ("1", "160"), ("16", "10")],
)
def test_dimensions_agree_with_fluids_nearest_pipe(nominal, schedule):
    # fluids.piping.nearest_pipe (registry library; ASME B36.10M/B36.19M tables).
    nps, di, do, t = nearest_pipe(NPS=pipe_dimensions(nominal, schedule).nps, schedule=schedule)
    size = pipe_dimensions(nominal, schedule)
    assert (size.inner_diameter, size.outer_diameter, size.wall_thickness) == pytest.approx(
        (di, do, t), abs=1e-9
    )


@pytest.mark.parametrize(
    "typed",
    ["4", "4 in", '4"', "4 inch", "NPS 4", "4.0", "DN100", "DN 100", "dn100", "100 DN", 4, 4.0],
)
def test_every_way_of_writing_nps_4_gives_the_same_pipe(typed):
    assert pipe_dimensions(typed, "40").inner_diameter == pytest.approx(102.26 * MM, abs=1e-9)


@pytest.mark.parametrize("typed", ["1-1/2", "1 1/2", "1-1/2 in", '1-1/2"', "1.5 in", "1.5", "DN40"])
def test_mixed_fractions_and_decimals_read_alike(typed):
    # ASME B36.10M: NPS 1-1/2 Sch 40, OD 48.3 mm, wall 3.68 mm.
    assert pipe_dimensions(typed, "40").inner_diameter == pytest.approx(
        (48.3 - 2 * 3.68) * MM, abs=1e-9
    )


@pytest.mark.parametrize(
    ("typed", "canonical"),
    [("40", "40"), ("Sch 40", "40"), ("sch40", "40"), ("std", "STD"), ("xs", "XS"),
     ("10s", "10S"), ("40S", "40S"), ("Schedule 80", "80"), (80, "80")],
)
def test_schedules_are_read_as_the_trade_writes_them(typed, canonical):
    assert pipe_dimensions("2", typed).schedule == canonical


def test_no_schedule_means_schedule_40():
    # Common practice, no source: Sch 40 is the default assumption for process pipe.
    assert pipe_dimensions("4", None) == pipe_dimensions("4", "40")


def test_dn_designations_match_fluids_stainless_table():
    # fluids.piping lists DN beside NPS for ASME B36.19M Sch 10S (SS10DN, NPSS10).
    for dn, nps in zip(SS10DN, NPSS10):
        assert DN_TO_NPS[dn] == nps


def test_dn_above_nps_4_is_25_times_nps():
    # ASME B36.10M Table 1 (DN column): DN = 25 x NPS from NPS 4 upward (from memory).
    assert all(dn == 25 * nps for dn, nps in DN_TO_NPS.items() if nps >= 4)


def test_pipe_size_carries_its_dn_and_standard():
    size = pipe_dimensions("6", "10S")
    assert (size.dn, size.standard, size.nominal) == (150, "ASME B36.19M", "NPS 6")


def test_unknown_schedule_lists_the_valid_ones():
    with pytest.raises(PipeSizeError) as err:
        pipe_dimensions("4", "41")
    assert "valid schedules" in str(err.value)
    assert all(s in str(err.value) for s in ASME_SCHEDULES)


def test_size_missing_from_a_schedule_lists_that_schedules_sizes():
    with pytest.raises(PipeSizeError, match=r"schedule 5S.*1/2, 3/4, 1, 1-1/4"):
        pipe_dimensions("36", "5S")


@pytest.mark.parametrize("typed", ["DN110", "DN 99"])
def test_unknown_dn_lists_the_valid_dn(typed):
    with pytest.raises(PipeSizeError, match="valid DN: 6, 8, 10, 15"):
        pipe_dimensions(typed, "40")


@pytest.mark.parametrize("typed", ["four", "", "4 mm", "1/0", "-4", math.nan, True, None])
def test_unreadable_nominal_sizes_are_refused_in_words(typed):
    with pytest.raises(PipeSizeError, match="nominal pipe size"):
        pipe_dimensions(typed, "40")


# --- materials -------------------------------------------------------------------------

# Our entries that quote the Moody-chart value also found in fluids.friction's small
# material table (feet converted to metres); the quoted rounding stays within 3 %.
FLUIDS_MOODY_NAMES = {
    "galvanised_steel": "Galvanized iron",
    "cast_iron": "Cast iron",
    "asphalted_cast_iron": "Asphalted cast iron",
    "concrete_smooth": "Concrete",
    "concrete_rough": "Rough concrete",
    "riveted_steel": "Riveted steel",
    "drawn_tubing": "Brass",
    "glass": "Glass",
}


@pytest.mark.parametrize(("ours", "theirs"), sorted(FLUIDS_MOODY_NAMES.items()))
def test_moody_roughness_agrees_with_fluids_material_table(ours, theirs):
    assert ROUGHNESS[ours].roughness == pytest.approx(_roughness[theirs], rel=0.03)


@pytest.mark.parametrize(
    ("ours", "idelchik_name"),
    [
        # Idelchik, Handbook of Hydraulic Resistance (2007), via fluids.friction.HHR_roughness.
        ("commercial_steel", "Seamless steel tubes, New and unused"),
        ("copper", "Seamless tubes made from brass, copper, lead, aluminum, Commercially smooth"),
    ],
)
def test_roughness_lies_inside_idelchiks_range(ours, idelchik_name):
    low, high, _avg = HHR_roughness[idelchik_name]
    assert low <= ROUGHNESS[ours].roughness <= high


@pytest.mark.parametrize(
    ("ours", "farshad_name"),
    [("ductile_iron_cement_lined", "Cement lining"), ("grp", "Fiberglass lining")],
)
def test_roughness_matches_farshad_and_rieke(ours, farshad_name):
    # Farshad & Rieke (2006), average roughness, via fluids.friction._Farshad_roughness.
    assert ROUGHNESS[ours].roughness == pytest.approx(_Farshad_roughness[farshad_name][0], rel=1e-9)


@pytest.mark.parametrize("name", sorted(ROUGHNESS))
def test_every_material_names_its_source_and_has_sane_values(name):
    m = ROUGHNESS[name]
    assert 0.0 < m.roughness < 10e-3
    assert m.source and m.elastic_source
    # A value not re-read in a library table or the original (from memory, or common
    # practice with no source) is shown to the user as a rule of thumb, never "from memory".
    confirmed = "via fluids" in m.source or "fluids.friction's" in m.source
    assert confirmed or "rule of thumb" in m.source
    assert "from memory" not in m.source + m.elastic_source
    if m.elastic_modulus is not None:
        assert 0.1e9 < m.elastic_modulus < 300e9
        assert m.poisson_ratio is not None and 0.0 < m.poisson_ratio < 0.5
        assert "rule of thumb" in m.elastic_source


@pytest.mark.parametrize(
    ("typed", "key"),
    [("Commercial steel", "commercial_steel"), ("carbon steel", "commercial_steel"),
     ("HDPE", "pe100"), ("galvanized", "galvanised_steel"), ("PVC-U", "pvc"),
     ("ductile-iron cement-lined", "ductile_iron_cement_lined")],
)
def test_materials_are_found_by_readable_names(typed, key):
    assert pipe_material(typed) is ROUGHNESS[key]


def test_unknown_material_suggests_the_nearest_and_lists_all():
    with pytest.raises(MaterialError) as err:
        pipe_material("stainles steel")
    message = str(err.value)
    assert "did you mean 'stainless_steel'" in message
    assert all(name in message for name in ROUGHNESS)
