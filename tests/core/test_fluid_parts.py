"""Each module of the liquid-property package on its own (the package's public functions
are tested against outside references in test_fluid*.py).

Sources: 0 degC = 273.15 K (SI definition of the Celsius scale, exact). Water boils at
373.124 K under 101.325 kPa by the IAPWS-IF97 saturation equation (IAPWS R7-97(2012),
from memory; checked here against the independent ``iapws`` package). The ethanol
equation of state (Schroeder et al. 2014) ends at its critical point 514.71 K (from memory;
the test reads the limit from the generated table instead).
"""

from __future__ import annotations

import math

import pytest

from workbench.core.fluid.basics import FluidPropertyError, celsius, check_temperature
from workbench.core.fluid.bulk_modulus import eos_bulk_modulus
from workbench.core.fluid.catalogue import CATALOGUE, liquid_names
from workbench.core.fluid.custom import custom_properties
from workbench.core.fluid.incompressible_fits import INCOMP_FITS, incomp_values
from workbench.core.fluid.water import water_psat, water_vapour_pressure


def test_the_celsius_text_of_the_ice_point_is_zero_degrees() -> None:
    assert celsius(273.15) == "0.0 degC"


@pytest.mark.parametrize("bad", [0.0, -5.0, math.nan, "warm"])
def test_a_temperature_that_is_not_a_positive_kelvin_value_is_refused(bad) -> None:
    with pytest.raises(FluidPropertyError):
        check_temperature(bad)


def test_waters_saturation_pressure_at_its_normal_boiling_point_is_one_atmosphere() -> None:
    from iapws.iapws97 import _PSat_T  # independent IF97 implementation (registry package)

    assert water_psat(373.124) == pytest.approx(_PSat_T(373.124) * 1e6, rel=1e-9)
    assert water_psat(373.124) == pytest.approx(101325.0, rel=2e-5)


def test_supercooled_waters_vapour_pressure_is_below_that_at_the_ice_point() -> None:
    assert water_vapour_pressure(268.15) < water_vapour_pressure(273.15)


def test_the_equation_of_state_gives_no_bulk_modulus_above_the_critical_point() -> None:
    from workbench.core.liquid_tables import TABLES

    entry = CATALOGUE["ethanol"]
    bulk, note = eos_bulk_modulus(entry, TABLES[entry.eos].t_critical + 1.0, 101325.0)
    assert bulk is None and "critical point" in note
    bulk, note = eos_bulk_modulus(entry, 293.15, 101325.0)
    assert note == "" and 0.5e9 < bulk < 2.0e9  # liquid ethanol ~1 GPa (common practice, no source)


def test_the_catalogues_names_start_with_water_and_list_every_entry() -> None:
    assert liquid_names() == ["water", *CATALOGUE]


def test_a_glycol_fit_at_its_base_point_returns_its_leading_coefficients() -> None:
    # At (t_base, x_base) every power of the offsets is zero but the constant term: the
    # polynomial form of the fit (closed form).
    fit = INCOMP_FITS["MEG"]
    values = incomp_values("MEG", fit.t_base, fit.x_base)
    assert values["density"] == pytest.approx(fit.density[0][0], rel=1e-12)
    assert values["viscosity"] == pytest.approx(math.exp(fit.log_viscosity[0][0]), rel=1e-12)
    assert math.isnan(values["vapor_pressure"])


def test_a_custom_liquid_refuses_a_negative_density() -> None:
    with pytest.raises(FluidPropertyError, match="density"):
        custom_properties(-1.0, 1e-3)
