"""The calibration fit recovers known parameters from readings made by independent closed forms.

Readings are not made with the model under test: a laminar drain follows the exponential
decay that Hagen-Poiseuille gives, a turbulent drain is integrated here with scipy from the
quasi-steady energy equation with the Colebrook friction factor of the ``fluids`` library
(an independent implementation). The fit must give back the parameter that made them, within
its 95 % confidence interval, with and without noise; parameters the data cannot tell apart
are flagged, a parameter that does not act and one whose optimum lies outside its range are
refused.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from fluids.friction import Colebrook
from scipy.integrate import solve_ivp
from scipy.optimize import brentq

from workbench.core.calibration import (
    CalibrationError,
    FitParameter,
    Observation,
    fit,
    predict,
    with_conditions,
)
from workbench.core.model import (
    Fitting,
    FluidProps,
    G,
    Line,
    Receiver,
    Reservoir,
    SimulationSettings,
    System,
    TankShape,
)

TANK_D = 1.0  # tank diameter [m]
AREA = math.pi * TANK_D**2 / 4.0
DROP = 5.0  # tank bottom above the free outlet [m]
H0 = 3.0  # initial level [m]


def _drain(fluid: FluidProps, line: Line, duration: float) -> System:
    tank = Reservoir("T", "tank", DROP, H0, shape=TankShape("vertical_cylinder", diameter=TANK_D))
    return System("drain", fluid, {"T": tank}, {}, {"O": Receiver("O", "open_discharge", 0.0)},
                  {"L": line}, simulation=SimulationSettings(duration, "steady"))


# --- laminar: exponential decay (Hagen-Poiseuille) ------------------------------------------

VISCOUS = FluidProps("viscous oil", 1000.0, 0.5)  # a custom liquid: 0.5 Pa s, 1000 kg/m3
LAM_L, LAM_D = 20.0, 0.025


def laminar_levels(times: np.ndarray, diameter: float) -> np.ndarray:
    r"""Closed form of a laminar drain, derived here.

    Hagen-Poiseuille: :math:`Q = \pi D^4 \rho g H/(128 \mu L)` with the driving head
    :math:`H = h + \Delta z`; the tank balance :math:`A\,dh/dt = -Q` then gives
    :math:`H(t) = H_0 e^{-t/\tau}`, :math:`\tau = 128 \mu L A/(\pi D^4 \rho g)`. Velocity
    heads (entrance, the exit's kinetic energy) are below 2e-4 of H here and are left out.
    """
    tau = 128.0 * VISCOUS.viscosity * LAM_L * AREA / (math.pi * diameter**4 * VISCOUS.density * G)
    return (H0 + DROP) * np.exp(-times / tau) - DROP


def _laminar_observation(noise: float, seed: int = 3) -> Observation:
    times = np.linspace(0.0, 10 * 3600.0, 41)  # drained (h = 0) at 10.9 h
    readings = laminar_levels(times, LAM_D)
    readings = readings + np.random.default_rng(seed).normal(0.0, noise, times.size) if noise else readings
    start_system = _drain(VISCOUS, Line("L", "T", "O", LAM_L, 0.030, entrance_k=0.0), times[-1])
    return Observation("lam", "T", "level", times, readings, start_system)


BORE = FitParameter("lines.L.inner_diameter", "diameter", "L", 0.015, 0.045, 0.030)


def test_a_laminar_drain_with_noise_gives_back_the_bore_that_made_it_within_its_interval():
    # 1 cm of noise (seed 3; seeds 0 to 4 all land within 0.9 standard errors)
    result = fit([_laminar_observation(0.01)], [BORE])
    assert result.success, result.message
    lo, hi = result.ci95[0]
    assert lo <= LAM_D <= hi
    assert result.values[0] == pytest.approx(LAM_D, rel=2e-3)
    assert result.rms_after["lam"] < result.rms_before["lam"] / 10


def test_a_laminar_drain_without_noise_gives_back_the_bore_sharply():
    # Without noise the residuals are only what the closed form leaves out (velocity heads,
    # below 2e-4 of the head): the interval is that narrow and holds the bore to 1e-4.
    result = fit([_laminar_observation(0.0)], [BORE])
    assert result.success, result.message
    assert result.values[0] == pytest.approx(LAM_D, rel=1e-4)
    lo, hi = result.ci95[0]
    assert lo <= result.values[0] <= hi and hi - lo < 1e-4 * LAM_D


# --- turbulent: quasi-steady drain integrated with scipy -------------------------------------

WATER = FluidProps("water", 998.2, 1.0016e-3)  # IAPWS at 20 degC (HYDRAULICS.md table)
TUR_L, TUR_D, ENTRANCE = 40.0, 0.05, 0.5


def turbulent_levels(times: np.ndarray, roughness: float) -> np.ndarray:
    r"""A quasi-steady turbulent drain of a vertical cylinder, integrated here.

    Energy from the free surface to the free outlet:
    :math:`h + \Delta z = (1 + K_{ent} + f L/D)\,v^2/2g` (exit: one velocity head), with
    ``f`` from Colebrook (``fluids.friction.Colebrook``, exact Lambert-W form) at
    :math:`Re = \rho v D/\mu`; :math:`A\,dh/dt = -v\,\pi D^2/4`, by ``solve_ivp``.
    """
    def velocity(h):
        def energy(v):
            re = WATER.density * v * TUR_D / WATER.viscosity
            f = Colebrook(re, roughness / TUR_D)
            return (1.0 + ENTRANCE + f * TUR_L / TUR_D) * v * v / (2 * G) - (h + DROP)
        return brentq(energy, 1e-6, 50.0, xtol=1e-14)

    def rate(_t, y):
        return [-velocity(y[0]) * math.pi * TUR_D**2 / 4.0 / AREA]

    sol = solve_ivp(rate, (0.0, times[-1]), [H0], t_eval=times, rtol=1e-10, atol=1e-12)
    return sol.y[0]


def _turbulent_observation(noise: float, roughness: float = 0.5e-3) -> Observation:
    times = np.linspace(0.0, 360.0, 31)  # drained (h = 0) near 460 s
    readings = turbulent_levels(times, roughness)
    if noise:
        readings = readings + np.random.default_rng(11).normal(0.0, noise, times.size)
    start = _drain(WATER, Line("L", "T", "O", TUR_L, TUR_D, roughness=4.5e-5,
                               entrance_k=ENTRANCE), times[-1])
    return Observation("tur", "T", "level", times, readings, start)


ROUGH = FitParameter("lines.L.roughness", "roughness", "L", 1e-5, 3e-3, 4.5e-5)


@pytest.fixture(scope="module")
def turbulent_fit():
    """The roughness fitted to the turbulent drain read with 5 mm of noise, once for the
    tests that read it."""
    return fit([_turbulent_observation(0.005)], [ROUGH])


def test_a_turbulent_drain_with_noise_gives_back_the_roughness_within_its_interval(turbulent_fit):
    result = turbulent_fit
    assert result.success, result.message
    lo, hi = result.ci95[0]
    assert lo <= 0.5e-3 <= hi
    assert result.values[0] == pytest.approx(0.5e-3, rel=0.02)


def test_a_turbulent_drain_without_noise_gives_back_the_roughness_sharply():
    # The rigid column's inertia (L/g dv/dt) is absent from the quasi-steady reference: it
    # shifts the fitted roughness by under 0.3 % here, and the interval is that narrow.
    result = fit([_turbulent_observation(0.0)], [ROUGH])
    assert result.success, result.message
    assert result.values[0] == pytest.approx(0.5e-3, rel=3e-3)
    lo, hi = result.ci95[0]
    assert lo <= result.values[0] <= hi and hi - lo < 3e-3 * 0.5e-3


def test_the_interval_narrows_when_the_noise_is_smaller():
    wide = fit([_turbulent_observation(0.02)], [ROUGH])
    narrow = fit([_turbulent_observation(0.002)], [ROUGH])
    assert np.diff(narrow.ci95[0])[0] < np.diff(wide.ci95[0])[0] / 4


# --- refusals and flags --------------------------------------------------------------------

def test_two_loss_coefficients_of_one_line_cannot_be_told_apart_and_are_flagged():
    # Only K1 + K2 enters the energy equation of a line (common practice, no source): the
    # Jacobian's two columns are equal and the correlation is -1.
    obs = _turbulent_observation(0.005)
    line = obs.system.lines["L"]
    two = (Fitting(k=1.0, label="strainer"), Fitting(k=1.0, label="check valve"))
    system = with_conditions(obs.system)
    system = type(system)(**{**system.__dict__, "lines": {"L": type(line)(
        **{**line.__dict__, "roughness": 0.5e-3, "fittings": two})}})
    observation = Observation("tur", "T", "level", obs.times, obs.values, system)
    params = [FitParameter(f"lines.L.fittings[{i}].k", "fitting_k", "L", 0.0, 10.0, 1.0, i - 1)
              for i in (1, 2)]
    result = fit([observation], params)
    codes = [w.code for w in result.warnings]
    assert "calibration.correlated" in codes
    assert abs(result.correlation[0, 1]) > 0.95


def test_a_roughness_in_laminar_flow_does_not_act_and_the_fit_says_so():
    rough = FitParameter("lines.L.roughness", "roughness", "L", 1e-5, 3e-3, 4.5e-5)
    result = fit([_laminar_observation(0.0)], [rough])
    assert not result.success
    assert "does not change" in result.message and "lines.L.roughness" in result.message


def test_an_optimum_outside_the_range_is_a_fit_that_ran_to_its_bound():
    narrow = FitParameter("lines.L.roughness", "roughness", "L", 1e-5, 1e-4, 4.5e-5)
    result = fit([_turbulent_observation(0.0)], [narrow])
    assert result.status == -1 and not result.success
    assert result.at_bound == ("lines.L.roughness",)
    assert result.values[0] == pytest.approx(1e-4)
    # the linearised interval assumes an optimum inside the range (Bates & Watts 1988,
    # ch. 2): a value on its bound gets none
    assert np.all(np.isnan(result.ci95[0]))


def test_a_steady_flow_reading_is_predicted_by_the_steady_solution():
    # Turbulent steady flow from a constant head: v from the same energy equation as above.
    obs = _turbulent_observation(0.0)
    system = obs.system
    flow = Observation("q", "L", "flow", None, np.array([0.004]), system)
    predicted = predict(flow)
    h = H0 + DROP
    v = brentq(lambda v: (1 + ENTRANCE + Colebrook(WATER.density * v * TUR_D / WATER.viscosity,
                                                   4.5e-5 / TUR_D) * TUR_L / TUR_D)
               * v * v / (2 * G) - h, 1e-6, 50.0)
    assert predicted[0] == pytest.approx(v * math.pi * TUR_D**2 / 4, rel=2e-3)


def test_a_fit_without_parameters_is_refused():
    with pytest.raises(CalibrationError):
        fit([_turbulent_observation(0.0)], [])


def test_the_models_time_to_a_level_is_read_from_its_whole_output_not_only_at_the_readings():
    """Two readings 10 h apart of the laminar drain: the model's trace between them follows
    the closed form ``H(t) = H_0 e^{-t/tau}`` (``laminar_levels``), so the time it reaches
    the level 90 % of the way down is ``tau ln(H_0/H)`` (8.8 h), not 90 % of the 10 h that a
    straight line between the two readings would say."""
    from workbench.output.calibration import crossing_time

    times = np.array([0.0, 10 * 3600.0])
    readings = laminar_levels(times, LAM_D)
    system = _drain(VISCOUS, Line("L", "T", "O", LAM_L, 0.030, entrance_k=0.0), times[-1])
    bore = FitParameter("lines.L.inner_diameter", "diameter", "L", 0.015, 0.045, 0.024)
    result = fit([Observation("lam", "T", "level", times, readings, system)], [bore])
    assert result.success, result.message
    mark = readings[0] + 0.9 * (readings[1] - readings[0])
    tau = 128.0 * VISCOUS.viscosity * LAM_L * AREA / (math.pi * result.values[0]**4
                                                      * VISCOUS.density * G)
    expected = tau * math.log((H0 + DROP) / (mark + DROP))
    t_model = crossing_time(*result.trace_after["lam"], mark)
    assert t_model == pytest.approx(expected, rel=2e-3)
    assert abs(t_model - 0.9 * times[-1]) > 0.01 * times[-1]  # the straight line is 2.4 % off


def test_an_interval_reaching_below_zero_is_cut_at_zero_and_says_so():
    """A nearly smooth pipe (0.5 um, relative roughness 1e-5: the Colebrook friction factor
    hardly moves below it at these Reynolds numbers) read with 1 cm of noise: the
    linearised interval x +- t s is symmetric and reaches below zero, where no roughness
    can be; the interval given is cut there, still holds the roughness that made the
    readings, and the cut is flagged."""
    from types import SimpleNamespace

    from workbench.output.calibration import interval_notes

    rough = FitParameter("lines.L.roughness", "roughness", "L", 0.0, 3e-3, 4.5e-5)
    result = fit([_turbulent_observation(0.01, roughness=0.5e-6)], [rough])
    assert result.success, result.message
    assert result.ci95_linear[0, 0] < 0.0  # what the linear theory says
    assert result.ci95[0, 0] == 0.0 and result.ci95_cut[0].tolist() == [True, False]
    assert result.ci95[0, 0] <= 0.5e-6 <= result.ci95[0, 1]
    run = SimpleNamespace(result=result, project=SimpleNamespace(unit_system="SI"))
    (key, words), = interval_notes(run)
    assert key == "lines.L.roughness" and "cut at zero" in words and "cannot be negative" in words


def test_an_interval_inside_the_range_is_not_cut(turbulent_fit):
    result = turbulent_fit
    assert result.success and not result.ci95_cut.any()
    np.testing.assert_array_equal(result.ci95, result.ci95_linear)


def test_a_start_far_from_the_answer_is_not_mistaken_for_a_parameter_that_does_not_act():
    """Hourly readings of the laminar drain (closed form ``laminar_levels``) and a start
    bore of 60 mm: tau goes as D^-4, so the model drains the tank in (25/60)^4 of the
    10.9 h, 20 min, before the second reading; a small step of the bore then changes no
    reading at all. Probed along its range the bore acts, and the fit gives it back."""
    times = np.linspace(0.0, 10 * 3600.0, 11)
    system = _drain(VISCOUS, Line("L", "T", "O", LAM_L, 0.060, entrance_k=0.0), times[-1])
    obs = Observation("lam", "T", "level", times, laminar_levels(times, LAM_D), system)
    wide = FitParameter("lines.L.inner_diameter", "diameter", "L", 0.015, 0.080, 0.060)
    result = fit([obs], [wide])
    assert result.success, result.message
    assert result.values[0] == pytest.approx(LAM_D, rel=1e-3)
    assert result.rms_before["lam"] > 1.0 and result.rms_after["lam"] < 1e-3


def test_every_fit_keeps_within_its_limit_of_model_runs_and_says_so():
    """The limit counts every model run (finite differences included); a fit that reaches
    it stops with its best point so far and says it did not converge (common practice, no
    source: a budget of function evaluations, as scipy's ``max_nfev``)."""
    progress = []
    result = fit([_turbulent_observation(0.005)], [ROUGH], max_evaluations=4,
                 progress=lambda n, rms: progress.append(n))
    assert not result.success and result.status == 0
    n = result.evaluations
    assert 1 <= n <= 4 and progress == list(range(1, n + 1))
    assert f"stopped after {n} model runs (the limit)" in result.message
    # the best point found still gets its interval (from scipy's Jacobian there)
    assert np.all(np.isfinite(result.ci95))


def test_readings_beyond_the_longest_simulated_span_are_refused_in_words():
    """1e9 s is the longest run (workbench.core.transient.options.MAX_DURATION): a reading
    after it cannot be compared, and the fit says so instead of failing inside the run."""
    obs = _laminar_observation(0.0)
    late = Observation("lam", "T", "level", np.array([0.0, 2e9]), np.array([3.0, 0.0]),
                       obs.system)
    with pytest.raises(CalibrationError, match="beyond the longest span a run simulates"):
        predict(late)
