"""The laminar-transient caution quotes ratios that the exact solution gives."""

from __future__ import annotations

import numpy as np
import pytest
from scipy.optimize import brentq
from scipy.special import jn_zeros

from workbench.core.checks import LAMINAR_TRANSIENT_CAUTION


def _ratio(fraction: float) -> float:
    """Time for the exact laminar start-up to reach ``fraction`` of its final flow over the
    lumped model's time. Exact (Szymanski 1932): Q/Q_inf = 1 - sum 32/l_n^4 exp(-l_n^2 s),
    l_n the zeros of J0, s = nu t/R^2; lumped rigid column with f = 64/Re:
    Q/Q_inf = 1 - exp(-t/tau), tau = rho D^2/(32 mu), i.e. exp(-8 s)."""
    lam = jn_zeros(0, 2000)
    exact = brentq(lambda s: 1 - np.sum(32 / lam**4 * np.exp(-lam**2 * s)) - fraction, 1e-8, 10)
    lumped = -np.log(1 - fraction) / 8
    return exact / lumped


@pytest.mark.parametrize(("fraction", "quoted"), [(0.90, "1.36"), (0.99, "1.37")])
def test_the_quoted_ratio_is_the_exact_solution_s(fraction, quoted):
    assert f"{_ratio(fraction):.3g}" == quoted
    assert f"{quoted} times" in LAMINAR_TRANSIENT_CAUTION or f"about {quoted} times" in \
        LAMINAR_TRANSIENT_CAUTION


def test_a_laminar_start_up_in_a_run_carries_the_caution():
    # A viscous oil (our own) starting from rest through 30 m of 50 mm pipe: Re about 100.
    from steady_cases import make_system, pipe, tank

    from workbench.core.model import FluidProps, SimulationSettings
    from workbench.core.transient import simulate

    oil = FluidProps(name="test oil", density=880.0, viscosity=0.25)
    system = make_system(reservoirs=[tank("A", 0.0, 3.0), tank("B", 0.0, 1.0)],
                         lines=[pipe("L", "A", "B", 30.0, 0.05)], fluid=oil,
                         simulation=SimulationSettings(5.0, "at_rest"))
    res = simulate(system)
    (w,) = [w for w in res.warnings if w.code == "transient.laminar"]
    assert "Szymanski (1932)" in w.source and w.severity == "info"
