"""CoolProp's incompressible-liquid fits (glycol-water and seawater), coefficients typed
here and evaluated with numpy, so the workbench never imports CoolProp (about 2.5 s)."""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["INCOMP_FITS", "IncompressibleFit", "incomp_values"]


# CoolProp's incompressible-liquid fits, coefficients typed from the fluid data compiled into
# CoolProp 8.0.0 (its JSON entries "MEG", "MPG" and "MITSW"; tests/core/test_fluid_solutions.py
# checks them against the installed package and our evaluation against its results). CoolProp
# evaluates a fit in the temperature and mass fraction offsets from the fit's base values,
#     f(T, x) = sum_ij c[i][j] (T - t_base)^i (x - x_base)^j,
# density as f itself [kg/m^3], viscosity [Pa s] and seawater's vapour pressure [Pa] as exp(f),
# and the glycol freezing point as the polynomial sum_j c[j] (x - x_base)^j [K].


@dataclass(frozen=True)
class IncompressibleFit:
    """Coefficients of one CoolProp incompressible-liquid fit (see the comment above)."""

    t_base: float
    """Base temperature of the fit [K]."""
    x_base: float
    """Base mass fraction of the fit [-]."""
    density: tuple[tuple[float, ...], ...]
    """c[i][j] of the density [kg/m^3]; i counts powers of temperature, j of fraction."""
    log_viscosity: tuple[tuple[float, ...], ...]
    """c[i][j] of ln(viscosity [Pa s])."""
    freezing: tuple[float, ...] | None = None
    """c[j] of the freezing point [K] in powers of fraction; ``None``: no freezing fit
    (CoolProp's seawater one returns about 4e-10 K, i.e. none: the fit's 0 degC holds)."""
    log_vapor_pressure: tuple[tuple[float, ...], ...] | None = None
    """c[i][j] of ln(vapour pressure [Pa]); ``None``: the fit has none."""


INCOMP_FITS: dict[str, IncompressibleFit] = {
    "MEG": IncompressibleFit(
        t_base=304.878, x_base=0.308462,
        density=(
            (1034.0, 131.1, 0.749, -106.2, -96.23, 489.1),
            (-0.4781, -0.6876, 0.7855, 1.229, -7.211, 0.0),
            (-0.002692, 0.004805, -0.003995, -0.01153, 0.0, 0.0),
            (4.725e-06, 1.69e-06, 4.982e-05, 0.0, 0.0, 0.0),
        ),
        log_viscosity=(
            (-6.437255, 2.471, 0.03328, 1.659, 3.089, -18.65),
            (-0.0255, -0.01171, 0.01086, 0.003157, 0.01831, 0.0),
            (0.0001782, 0.0001052, 0.0001051, 0.0004063, 0.0, 0.0),
            (-7.669e-07, -1.634e-06, -6.475e-06, 0.0, 0.0, 0.0),
        ),
        freezing=(257.9, -80.8, -133.4, -72.93, 100.6, 11.4),
    ),
    "MPG": IncompressibleFit(
        t_base=305.8583, x_base=0.307031,
        density=(
            (1018.0, 76.04, -24.98, -155.0, -113.1, 234.2),
            (-0.5406, -0.945, 0.27, 2.829, -2.221, 0.0),
            (-0.002666, 0.005541, -0.004018, -0.007175, 0.0, 0.0),
            (1.347e-05, -1.343e-05, 3.376e-05, 0.0, 0.0, 0.0),
        ),
        log_viscosity=(
            (-6.224055, 3.328, 0.5453, -3.9, -1.587, 35.64),
            (-0.03045, -0.03984, -0.00086, 0.1054, 0.04475, 0.0),
            (0.0002525, 0.0004332, -0.0001593, -0.001589, 0.0, 0.0),
            (-1.399e-06, -1.86e-06, -4.465e-07, 0.0, 0.0, 0.0),
        ),
        freezing=(259.9, -66.31, -109.4, -228.3, -340.9, 146.5),
    ),
    "MITSW": IncompressibleFit(
        t_base=333.15, x_base=0.06,
        density=(
            (1027.453, 735.8869, -0.5539933, 35.62186, 955.8692, -40607.96),
            (-0.5344166, -0.3162168, 0.07281257, 1.008607, -69.92442, 0.0),
            (-0.002586938, 0.01108874, 0.001005488, 0.04584576, 0.0, 0.0),
            (9.645543e-06, -3.347615e-05, 6.331083e-05, 0.0, 0.0, 0.0),
        ),
        log_viscosity=(
            (-7.525886, 2.594336, 1.002852, -10.9672, 11.93372, 1194.663),
            (-0.01458715, 0.004295508, -0.02948796, 0.05636889, -0.07837899, 0.0),
            (8.596225e-05, -2.535294e-05, 0.0005298163, -0.0008049656, 0.0, 0.0),
            (-5.652294e-07, 6.443543e-08, 8.257508e-07, 0.0, 0.0, 0.0),
        ),
        log_vapor_pressure=(
            (9.867011, -0.6257486, -0.4402794, -0.3124263, -5.37504, -150.008),
            (0.04626598, 3.944406e-05, -0.0009964331, -0.01074101, 0.2440279, 0.0),
            (-0.0001646446, -1.152724e-06, -1.908068e-06, 0.0005749479, 0.0, 0.0),
            (5.36429e-07, -5.064038e-09, -4.651789e-08, 0.0, 0.0, 0.0),
        ),
    ),
}


def incomp_values(incomp: str, t: float, x: float) -> dict[str, float]:
    """Density [kg/m^3], viscosity [Pa s], freezing point [K] (``nan``: none) and vapour
    pressure [Pa] (``nan``: none) of a CoolProp incompressible-liquid fit at (t [K], x [-])."""
    from numpy import exp, nan
    from numpy.polynomial.polynomial import polyval, polyval2d

    fit = INCOMP_FITS[incomp]
    dt, dx = t - fit.t_base, x - fit.x_base
    return {
        "density": float(polyval2d(dt, dx, fit.density)),
        "viscosity": float(exp(polyval2d(dt, dx, fit.log_viscosity))),
        "freezing": nan if fit.freezing is None else float(polyval(dx, fit.freezing)),
        "vapor_pressure": (nan if fit.log_vapor_pressure is None
                           else float(exp(polyval2d(dt, dx, fit.log_vapor_pressure)))),
    }
