"""Glycol-water mixtures and seawater at a given concentration (CoolProp incompressible fits).

Outside references: handbook tables of glycol solutions, the `iapws` package (IAPWS-08
seawater), values recalled from the seawater literature (marked "from memory"), and
CoolProp itself (registry package, test-only dependency): its fit coefficients and its
evaluation of them, which ours must reproduce.
"""

from __future__ import annotations

import json
import math
from pathlib import Path

import numpy as np
import pytest

from workbench.core.fluid import (
    SOLUTIONS,
    FluidPropertyError,
    liquid_properties,
    solution_properties,
    water_properties,
)
from workbench.core.fluid.incompressible_fits import INCOMP_FITS, incomp_values

LB_FT3 = 16.018463  # kg/m^3 per lb/ft^3 (NIST SP 811)


def fahrenheit(t_f: float) -> float:
    return (t_f - 32.0) / 1.8 + 273.15


def mass_fraction_from_volume(phi: float, glycol_sg: float) -> float:
    """Glycol mass fraction of a mix of volume fraction ``phi`` of glycol before mixing,
    with water at 60 degF (999.0 kg/m^3, NIST) and glycol of specific gravity ``glycol_sg``
    at 60 degF."""
    glycol = phi * glycol_sg * 999.0
    return glycol / (glycol + (1.0 - phi) * 999.0)


# --- ethylene glycol - water --------------------------------------------------------------


@pytest.mark.parametrize(
    ("volume_fraction", "t_f", "density_lb_ft3"),
    [
        # ASHRAE Handbook - Fundamentals, ch. 31 (physical properties of secondary
        # coolants), density of aqueous ethylene glycol by volume % (lb/ft^3), read from a
        # reproduction of the table in a piping design manual.
        (0.30, 70.0, 65.30),
        (0.40, 70.0, 66.20),
        (0.30, 100.0, 64.86),
    ],
)
def test_ethylene_glycol_water_density_matches_the_ashrae_table(volume_fraction, t_f,
                                                                 density_lb_ft3):
    # Volume % converted with glycol specific gravity 1.1155 at 60 degF (ASHRAE, as quoted
    # with the table). Melinder's fit lies 0.5-0.7 % below these values (the table's
    # volume basis is not stated precisely): tolerance 1 %. Propylene glycol at the same
    # strength is 1.9 % lighter, so a mixed-up fit fails.
    w = mass_fraction_from_volume(volume_fraction, 1.1155)
    props = solution_properties("ethylene_glycol_water", fahrenheit(t_f), w)
    assert props.density == pytest.approx(density_lb_ft3 * LB_FT3, rel=0.01)


@pytest.mark.parametrize(
    ("w", "t_f", "viscosity_cp"),
    [
        # US Department of Veterans Affairs, HVAC Design Manual, table of ethylene glycol
        # solution viscosity by weight % (centipoise, given to two figures).
        (0.20, 40.0, 2.6),
        (0.30, 40.0, 3.2),
        (0.30, 180.0, 0.60),
        (0.20, 190.0, 0.48),
    ],
)
def test_ethylene_glycol_water_viscosity_matches_the_design_manual_table(w, t_f, viscosity_cp):
    # Tolerance 15 %: the table gives two figures and its cold 30-40 % values lie 10-13 %
    # below Melinder's fit; propylene glycol at 30 % and 40 degF is 70 % more viscous.
    props = solution_properties("ethylene_glycol_water", fahrenheit(t_f), w)
    assert props.viscosity * 1e3 == pytest.approx(viscosity_cp, rel=0.15)


@pytest.mark.parametrize(("w", "freezing_c"), [(0.30, -15.0), (0.40, -24.0)])
def test_ethylene_glycol_water_is_refused_below_its_freezing_point(w, freezing_c):
    # 30 % and 40 % ethylene glycol by mass freeze at about -15 and -24 degC (ASHRAE
    # Handbook, from memory): liquid 1.5 K above, refused 1.5 K below.
    solution_properties("ethylene_glycol_water", freezing_c + 1.5 + 273.15, w)
    with pytest.raises(FluidPropertyError, match=r"below its freezing point"):
        solution_properties("ethylene_glycol_water", freezing_c - 1.5 + 273.15, w)


# --- propylene glycol - water -------------------------------------------------------------


@pytest.mark.parametrize(
    ("volume_fraction", "specific_gravity", "freezing_c"),
    [
        # Lange's Handbook of Chemistry, 15th ed., table 5.13 (compositions of aqueous
        # antifreeze solutions): propylene glycol by volume, specific gravity at
        # 15.6/15.6 degC and freezing point.
        (0.30, 1.024, -12.8),
        (0.40, 1.032, -20.6),
    ],
)
def test_propylene_glycol_water_matches_langes_antifreeze_table(volume_fraction,
                                                                 specific_gravity, freezing_c):
    # Volume % converted with propylene glycol specific gravity 1.038 (as quoted with the
    # ASHRAE tables). Tolerances: density 0.6 % (Melinder's fit lies 0.3-0.5 % above),
    # freezing point 1.5 K.
    w = mass_fraction_from_volume(volume_fraction, 1.038)
    t = 288.71  # 60 degF
    props = solution_properties("propylene_glycol_water", t, w)
    assert props.density == pytest.approx(specific_gravity * 999.0, rel=0.006)
    solution_properties("propylene_glycol_water", freezing_c + 1.5 + 273.15, w)
    with pytest.raises(FluidPropertyError, match=r"freezing point"):
        solution_properties("propylene_glycol_water", freezing_c - 1.5 + 273.15, w)


def test_propylene_glycol_water_viscosity_is_near_the_handbook_value():
    # 30 % propylene glycol by mass at 20 degC: about 3 mPa s (ASHRAE Handbook table,
    # from memory); tolerance 20 % (ethylene glycol at the same strength is 27 % lower).
    props = solution_properties("propylene_glycol_water", 293.15, 0.30)
    assert props.viscosity * 1e3 == pytest.approx(3.0, rel=0.20)


def test_glycol_vapour_pressure_is_pure_waters_and_says_so():
    # Water's vapour pressure (IAPWS) is an upper bound for an aqueous glycol (Raoult's
    # law; glycols are far less volatile than water).
    props = solution_properties("ethylene_glycol_water", 313.15, 0.3)
    assert props.vapor_pressure == pytest.approx(water_properties(313.15).vapor_pressure,
                                                 rel=1e-12)
    assert any("pure water's" in n and "upper bound" in n for n in props.notes)
    assert props.bulk_modulus is None


# --- seawater -----------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("t_c", "salinity"),
    [(10.0, 0.035), (20.0, 0.035), (40.0, 0.035), (20.0, 0.010), (25.0, 0.040)],
)
def test_seawater_density_matches_iapws08(t_c, salinity):
    # iapws.SeaWater: IAPWS-08 seawater formulation (registry package), 0.101325 MPa.
    # Sharqawy et al. give their density correlation as within 0.1 % of data.
    from iapws import SeaWater

    t = t_c + 273.15
    ref = SeaWater(T=t, P=0.101325, S=salinity).rho
    assert solution_properties("seawater", t, salinity).density == pytest.approx(ref, rel=0.001)


@pytest.mark.parametrize(("t_c", "viscosity_mpa_s"), [(15.0, 1.22), (20.0, 1.08)])
def test_seawater_viscosity_matches_the_standard_table(t_c, viscosity_mpa_s):
    # ITTC Recommended Procedure 7.5-02-01-03 (2011), fresh water and seawater properties
    # at 35 g/kg: about 1.22 mPa s at 15 degC and 1.08 at 20 degC (from memory);
    # tolerance 2 %.
    props = solution_properties("seawater", t_c + 273.15, 0.035)
    assert props.viscosity * 1e3 == pytest.approx(viscosity_mpa_s, rel=0.02)


@pytest.mark.parametrize("salinity", [0.035, 0.070])
def test_seawater_vapour_pressure_is_one_atmosphere_at_its_iapws08_boiling_point(salinity):
    # iapws.iapws08._Tb: boiling temperature of seawater at 0.101325 MPa (IAPWS-08).
    # Tolerance 1 % in pressure (about 0.3 K in temperature).
    from iapws.iapws08 import _Tb

    t_boil = _Tb(0.101325, salinity)
    props = solution_properties("seawater", t_boil, salinity)
    assert props.vapor_pressure == pytest.approx(101325.0, rel=0.01)


def test_seawater_vapour_pressure_is_below_waters():
    # Dissolved salt lowers the vapour pressure (Raoult): seawater's own value is used.
    sea = solution_properties("seawater", 303.15, 0.035).vapor_pressure
    assert sea < water_properties(303.15).vapor_pressure
    assert sea == pytest.approx(water_properties(303.15).vapor_pressure, rel=0.03)


def test_hot_seawater_at_low_pressure_is_liquid_just_above_boiling_with_a_note():
    props = solution_properties("seawater", 373.15, 0.035, pressure_pa=90000.0)
    assert any("boiling point" in n for n in props.notes)
    assert 950.0 < props.density < 1000.0  # hot seawater is lighter than cold water


# --- ranges -------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("kind", "t_k", "fraction", "words"),
    [
        ("ethylene_glycol_water", 293.15, 0.61, r"mass fraction 0\.61 is outside.*0 to 0\.6"),
        ("propylene_glycol_water", 293.15, -0.1, r"outside the range"),
        ("ethylene_glycol_water", 293.15, math.nan, r"outside the range"),
        ("ethylene_glycol_water", 380.0, 0.3, r"outside the range.*freezing point.*100 degC"),
        ("seawater", 293.15, 0.121, r"salinity 121 g/kg is outside.*0 to 120 g/kg"),
        ("seawater", 272.15, 0.035, r"outside the range.*0 degC to 120 degC"),
        ("seawater", 400.0, 0.035, r"outside the range"),
        ("brine", 293.15, 0.035, r"unknown solution"),
    ],
)
def test_outside_a_fits_range_the_solution_is_refused_with_the_range(kind, t_k, fraction, words):
    with pytest.raises(FluidPropertyError, match=words):
        solution_properties(kind, t_k, fraction)


NO_COOLPROP = "CoolProp (the reference for these checks) is not installed: pip install -e '.[test]'"


@pytest.fixture(scope="module")
def CP():
    """CoolProp's high-level interface; the test is skipped where CoolProp is missing."""
    return pytest.importorskip("CoolProp.CoolProp", reason=NO_COOLPROP)


@pytest.mark.parametrize("kind", sorted(SOLUTIONS))
def test_solution_ranges_are_those_coolprop_reports_for_its_fits(CP, kind):
    entry = SOLUTIONS[kind]
    fluid = f"INCOMP::{entry.incomp}[0.01]"
    assert CP.PropsSI("fraction_max", fluid) == pytest.approx(entry.fraction_max, abs=1e-12)
    assert CP.PropsSI("fraction_min", fluid) == 0.0
    assert CP.PropsSI("Tmin", fluid) == pytest.approx(entry.t_min, abs=1e-9)
    assert CP.PropsSI("Tmax", fluid) == pytest.approx(entry.t_max, abs=1e-9)


def test_a_solution_asked_for_by_name_alone_asks_for_its_concentration():
    with pytest.raises(FluidPropertyError, match=r"needs its concentration.*salinity"):
        liquid_properties("seawater", 293.15)


# --- our evaluation of the fits against CoolProp's ----------------------------------------


def coolprop_fluid_data(name: str) -> dict:
    """The JSON entry of an incompressible liquid as compiled into CoolProp's extension
    module (CoolProp keeps its fluid library as JSON text inside the binary)."""
    import CoolProp.CoolProp

    binary = Path(CoolProp.CoolProp.__file__)
    data = binary.read_bytes()
    key = b'"name": "%s",' % name.encode()
    at = data.find(key)
    assert at > 0 and data.find(key, at + 1) < 0, f"{name} not found once in {binary.name}"
    depth, start = 0, at
    while True:  # back to the brace that opens this entry
        start -= 1
        if data[start] == ord("}"):
            depth += 1
        elif data[start] == ord("{"):
            if depth == 0:
                break
            depth -= 1
    entry, _ = json.JSONDecoder().raw_decode(data[start:start + 100_000].decode("latin-1"))
    return entry


@pytest.mark.parametrize("incomp", sorted(INCOMP_FITS))
def test_typed_fit_coefficients_equal_coolprops_data(CP, incomp):
    data = coolprop_fluid_data(incomp)
    fit = INCOMP_FITS[incomp]
    assert (fit.t_base, fit.x_base) == (data["Tbase"], data["xbase"])
    assert data["density"]["type"] == "polynomial"
    assert [list(r) for r in fit.density] == data["density"]["coeffs"]
    assert data["viscosity"]["type"] == "exppolynomial"
    assert [list(r) for r in fit.log_viscosity] == data["viscosity"]["coeffs"]
    if fit.freezing is None:
        assert data["T_freeze"]["type"] != "polynomial"
    else:
        assert data["T_freeze"]["type"] == "polynomial"
        assert [list(fit.freezing)] == data["T_freeze"]["coeffs"]
    if fit.log_vapor_pressure is None:
        assert data["saturation_pressure"]["type"] == "notdefined"
    else:
        assert data["saturation_pressure"]["type"] == "exppolynomial"
        assert [list(r) for r in fit.log_vapor_pressure] == data["saturation_pressure"]["coeffs"]


def coolprop_solution(incomp: str, t: float, x: float) -> dict[str, float]:
    """Density, viscosity, freezing point and vapour pressure straight from CoolProp."""
    import CoolProp
    from CoolProp.CoolProp import AbstractState

    state = AbstractState("INCOMP", incomp)
    state.set_mass_fractions([x])
    out = {"freezing": state.keyed_output(CoolProp.iT_freeze)}
    p = 101325.0
    if INCOMP_FITS[incomp].log_vapor_pressure is not None:
        state.update(CoolProp.QT_INPUTS, 0.0, t)
        out["vapor_pressure"] = state.p()
        p = max(p, 1.001 * out["vapor_pressure"])  # the fit refuses p below saturation
    state.update(CoolProp.PT_INPUTS, p, t)
    out["density"], out["viscosity"] = state.rhomass(), state.viscosity()
    return out


@pytest.mark.parametrize("kind", sorted(SOLUTIONS))
def test_our_fit_evaluation_matches_coolprop_to_1e_9_over_the_range(CP, kind):
    # A 12 x 9 grid over temperature and concentration, the liquid part only (above the
    # freezing point): density, viscosity, vapour pressure where the fit has one, and the
    # freezing point, to 1e-9 relative.
    entry = SOLUTIONS[kind]
    compared = 0
    # (CoolProp's seawater vapour pressure refuses exactly its own lowest temperature,
    # 273.15 K, by a rounding: the grid starts 1 uK above.)
    for x in np.linspace(0.0, entry.fraction_max, 9):
        ref_x = coolprop_solution(entry.incomp, entry.t_max, x)
        for t in np.linspace(entry.t_min + 1e-6, entry.t_max, 12):
            if t < ref_x["freezing"]:
                with pytest.raises(FluidPropertyError):
                    solution_properties(kind, t, x)
                continue
            ref = coolprop_solution(entry.incomp, t, x)
            props = solution_properties(kind, t, x, pressure_pa=1e6)
            assert props.density == pytest.approx(ref["density"], rel=1e-9)
            assert props.viscosity == pytest.approx(ref["viscosity"], rel=1e-9)
            if "vapor_pressure" in ref:
                assert props.vapor_pressure == pytest.approx(ref["vapor_pressure"], rel=1e-9)
            compared += 1
        if INCOMP_FITS[entry.incomp].freezing is not None:
            ours = incomp_values(entry.incomp, entry.t_max, x)["freezing"]
            assert ours == pytest.approx(ref_x["freezing"], rel=1e-9)
    assert compared > 60


def test_coolprops_seawater_fit_has_no_freezing_limit_above_its_range(CP):
    # CoolProp's MITSW freezing "fit" is exp(700/(x - 60) - 10), about 4e-10 K: no limit
    # inside the fit's 0-120 degC, which is why our seawater entry carries none.
    import CoolProp
    from CoolProp.CoolProp import AbstractState

    for x in (0.0, 0.035, 0.12):
        state = AbstractState("INCOMP", "MITSW")
        state.set_mass_fractions([x])
        assert state.keyed_output(CoolProp.iT_freeze) < SOLUTIONS["seawater"].t_min
