"""Minor losses: named fittings (2-K and 3-K methods), entrance shapes, and the exit.

Our own readable fitting names (``elbow_90_standard``, ``gate_valve``, ...) are mapped onto
the exact table entries of the two published Reynolds- and size-dependent methods as the
``fluids`` library tabulates them:

* Hooper (1981) 2-K: ``K = K1/Re + Kinf (1 + 1/D)``, ``D`` in inches
  (Hooper, W. B., Chem. Eng., Aug. 24, 1981, 96-100; table ``fluids.fittings.Hooper``);
* Darby (1999, 2001) 3-K: ``K = K1/Re + Ki (1 + Kd/D^0.3)``, ``D`` the nominal size in
  inches (Darby, R., Chem. Eng., 1999 and 2001; table ``fluids.fittings.Darby``).

Both split into a part proportional to ``1/Re`` and a constant part, which is how the line
model keeps its head loss smooth through zero flow: ``(K1/Re) v|v|/2g = K1 nu v/(2 g D)``.

Size: a line in the model carries its inside diameter only. The 2-K method takes it in
inches; for the 3-K size term the nominal size is estimated from it by interpolation in the
ASME B36.10M Schedule 40 table (as fluids' ``Darby3K`` does when given ``Di``), or passed as
``nominal_in`` where known.

Exit: where the line discharges into a free surface, a vessel or the air the flow loses its
kinetic energy, ``alpha`` velocity heads with ``alpha`` the kinetic-energy coefficient of the
velocity profile: 1 for turbulent flow, 2 for a fully developed laminar profile, blended
between (:func:`exit_k`). Entrance shapes: :data:`ENTRANCES`.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cache

import numpy as np

from workbench.core.friction import transition_weight
from workbench.core.model import Fitting

#: Loss coefficient of the exit into a free surface, a vessel or the air, turbulent flow [-]
#: (common practice; equals fluids' ``exit_normal()``).
EXIT_K = 1.0
#: Loss coefficient of the same exit for a fully developed laminar profile [-]: the
#: kinetic-energy coefficient of the Hagen-Poiseuille profile, alpha = 2 (HYDRAULICS.md,
#: "Minor losses").
EXIT_K_LAMINAR = 2.0


def exit_k(re):
    r"""Loss coefficient of an exit at Reynolds number ``re``, and its slope.

    Flow leaving a line into a free surface, a vessel or the air loses its kinetic energy,
    :math:`\alpha\,v^2/2g` with :math:`\alpha = \int u^3 dA/(\bar v^3 A)` the kinetic-energy
    coefficient of the velocity profile. For the parabolic (Hagen-Poiseuille) profile
    :math:`\alpha = 2`; for turbulent flow the model takes 1. Between Re 2000 and 4000
    :math:`K = 2 - w(Re)` with the same weight as the friction blend
    (:func:`workbench.core.friction.transition_weight`), so ``K`` and ``dK/dRe`` are
    continuous everywhere.

    Parameters
    ----------
    re : array_like
        Reynolds number [-]; its absolute value is used; ``Re = 0`` gives 2.

    Returns
    -------
    k, dk_dre : ndarray
        Exit loss coefficient referred to the line velocity head [-] and its derivative
        with respect to ``|Re|`` [-] (<= 0).

    References
    ----------
    HYDRAULICS.md, "Minor losses": one velocity head for turbulent flow, about 2 for a fully
    developed laminar profile (kinetic-energy coefficient alpha = 2). The value 2 follows by
    integrating the parabolic profile ``u = 2 v (1 - r^2/R^2)``. The turbulent 1 equals
    fluids' ``exit_normal()`` (common practice).

    Examples
    --------
    >>> k, dk = exit_k([100.0, 3000.0, 1e5])
    >>> k.tolist(), dk.tolist()
    ([2.0, 1.5, 1.0], [0.0, -0.00075, 0.0])
    """
    w, dw = transition_weight(np.abs(np.asarray(re, dtype=float)))
    span = EXIT_K_LAMINAR - EXIT_K
    return EXIT_K_LAMINAR - span * w, 0.0 - span * dw

_METHODS = ("darby_3k", "hooper_2k")


class FittingError(ValueError):
    """An unknown fitting or entrance name; the message lists the known ones."""


@dataclass(frozen=True)
class FittingData:
    """A fitting of ours, with the table entries it maps onto."""

    name: str
    description: str
    hooper: str | None
    """Exact key in ``fluids.fittings.Hooper`` (2-K), or ``None``."""
    darby: str | None
    """Exact key in ``fluids.fittings.Darby`` (3-K), or ``None``."""

    @property
    def methods(self) -> tuple[str, ...]:
        """Methods that tabulate this fitting, in the model's names."""
        out = []
        if self.darby is not None:
            out.append("darby_3k")
        if self.hooper is not None:
            out.append("hooper_2k")
        return tuple(out)


def _f(name, description, hooper, darby) -> FittingData:
    return FittingData(name, description, hooper, darby)


FITTINGS: dict[str, FittingData] = {
    d.name: d
    for d in (
        _f("elbow_90_standard", "90° elbow, standard radius (r/D = 1), flanged or welded",
           "Elbow, 90°, Standard (R/D = 1), Flanged/welded",
           "Elbow, 90°, flanged, welded, bends, (r/D = 1)"),
        _f("elbow_90_standard_threaded", "90° elbow, standard radius (r/D = 1), threaded",
           "Elbow, 90°, Standard (R/D = 1), Screwed", "Elbow, 90°, threaded, standard, (r/D = 1)"),
        _f("elbow_90_long_radius", "90° elbow, long radius (r/D = 1.5)",
           "Elbow, 90°, Long-radius (R/D = 1.5), All types",
           "Elbow, 90°, threaded, long radius, (r/D = 1.5)"),
        _f("bend_90_r2", "90° bend, r/D = 2", None, "Elbow, 90°, (r/D = 2)"),
        _f("bend_90_r4", "90° bend, r/D = 4", None, "Elbow, 90°, (r/D = 4)"),
        _f("bend_90_r6", "90° bend, r/D = 6", None, "Elbow, 90°, (r/D = 6)"),
        _f("elbow_90_mitered_1_weld", "90° mitred elbow, one weld (90°)",
           "Elbow, 90°, Mitered (R/D = 1.5), 1 weld (90° angle)",
           "Elbow, 90°, mitered, 1 weld, (90°)"),
        _f("elbow_90_mitered_2_welds", "90° mitred elbow, two welds (45°)",
           "Elbow, 90°, Mitered (R/D = 1.5), 2 weld (45° angle)", "Elbow, 90°, 2 welds, (45°)"),
        _f("elbow_90_mitered_3_welds", "90° mitred elbow, three welds (30°)",
           "Elbow, 90°, Mitered (R/D = 1.5), 3 weld (30° angle)", "Elbow, 90°, 3 welds, (30°)"),
        _f("elbow_45_standard", "45° elbow, standard radius (r/D = 1)",
           "Elbow, 45°, Standard (R/D = 1), All types", "Elbow, 45°, threaded standard, (r/D = 1)"),
        _f("elbow_45_long_radius", "45° elbow, long radius (r/D = 1.5)",
           "Elbow, 45°, Long-radius (R/D 1.5), All types", "Elbow, 45°, long radius, (r/D = 1.5)"),
        _f("elbow_45_mitered_1_weld", "45° mitred elbow, one weld",
           "Elbow, 45°, Mitered (R/D=1.5), 1 weld (45° angle)",
           "Elbow, 45°, mitered, 1 weld, (45°)"),
        _f("return_bend_180_standard", "180° return bend, r/D = 1, flanged",
           "Elbow, 180°, Standard (R/D = 1), Flanged/welded", "Elbow, 180°, flanged, (r/D = 1)"),
        _f("return_bend_180_long_radius", "180° return bend, long radius (r/D = 1.5)",
           "Elbow, 180°, Long-radius (R/D = 1.5), All types", "Elbow, 180°, all, (r/D = 1.5)"),
        _f("tee_run_through", "tee, flow through the run, flanged or welded",
           "Tee, Through, Flanged or welded", "Tee, Run-through, flanged, (r/D = 1)"),
        _f("tee_run_through_threaded", "tee, flow through the run, threaded",
           "Tee, Run, Screwed", "Tee, Run-through, threaded, (r/D = 1)"),
        _f("tee_branch", "tee, flow through the branch (used as an elbow), flanged or welded",
           "Elbow, Elbow, Standard, Flanged/welded",
           "Tee, Through-branch, (as elbow), flanged, (r/D = 1)"),
        _f("tee_branch_threaded", "tee, flow through the branch (used as an elbow), threaded",
           "Elbow, Used as, Standard, Screwed",
           "Tee, Through-branch, (as elbow), threaded, (r/D = 1)"),
        _f("tee_branch_stub_in", "stub-in branch connection, flow through the branch",
           "Elbow, Elbow, Stub-in type branch", "Tee, Through-branch, (as elbow), stub-in branch"),
        _f("gate_valve", "gate valve, full bore, fully open",
           "Valve, Gate, Full line size, Beta = 1", "Valve, Gate valve, standard, β = 1"),
        _f("globe_valve", "globe valve, standard pattern, fully open",
           "Valve, Globe, Standard", "Valve, Globe valve, standard, β = 1"),
        _f("angle_valve", "angle valve (90°) or Y-pattern globe, fully open",
           "Valve, Globe, Angle or Y-type", "Valve, Angle valve, 90°, full line size, β = 1"),
        _f("angle_valve_45", "angle valve, 45°, full line size, fully open",
           None, "Valve, Angle valve, 45°, full line size, β = 1"),
        _f("ball_valve", "ball valve, fully open (3-K: full bore; 2-K: reduced trim, beta 0.9)",
           "Valve, Ball, Reduced trim, Beta = 0.9", "Valve, Ball valve, standard, β = 1"),
        _f("plug_valve", "plug valve, straight through (2-K: reduced trim, beta 0.8)",
           "Valve, Plug, Reduced trim, Beta = 0.8", "Valve, Plug valve, straight through"),
        _f("plug_valve_branch", "plug valve, flow through the branch", None,
           "Valve, Plug valve, branch flow"),
        _f("plug_valve_three_way", "three-way plug valve, flow straight through", None,
           "Valve, Plug valve, three-way (flow through)"),
        _f("diaphragm_valve", "diaphragm valve, dam (weir) type, fully open",
           "Valve, Diaphragm, Dam type", "Valve, Diaphragm, dam type"),
        _f("butterfly_valve", "butterfly valve, fully open", "Valve, Butterfly,", None),
        _f("swing_check_valve", "swing check valve, fully open",
           "Valve, Check, Swing", "Valve, Swing check"),
        _f("lift_check_valve", "lift check valve, fully open",
           "Valve, Check, Lift", "Valve, Lift check"),
        _f("tilting_disc_check_valve", "tilting-disc check valve, fully open",
           "Valve, Check, Tilting-disc", None),
    )
}


@dataclass(frozen=True)
class Entrance:
    """An entrance shape: flow leaving a free surface into the line."""

    k: float
    """Loss coefficient, referred to the line velocity head [-]."""
    description: str
    source: str


ENTRANCES: dict[str, Entrance] = {
    "sharp": Entrance(0.5, "sharp-edged, flush with the wall",
                      "rule of thumb; Rennels & Hudson, Pipe Flow (2012) give 0.57"),
    "square_edged": Entrance(0.5, "square-edged, flush with the wall (same as sharp)",
                             "rule of thumb; Rennels & Hudson, Pipe Flow (2012) give 0.57"),
    "inward_projecting": Entrance(0.78, "pipe end projecting into the tank (re-entrant)",
                                  "textbook value (rule of thumb); fluids' entrance_distance "
                                  "(Rennels) gives about 0.9 for a thin wall"),
    "slightly_rounded": Entrance(0.28, "rounded inlet, r/D = 0.02",
                                 "Crane TP-410, via fluids.entrance_rounded(method='Crane')"),
    "rounded": Entrance(0.09, "rounded inlet, r/D = 0.10",
                        "Crane TP-410, via fluids.entrance_rounded(method='Crane')"),
    "well_rounded": Entrance(0.04, "well-rounded inlet or bellmouth, r/D >= 0.15",
                             "Crane TP-410, via fluids.entrance_rounded(method='Crane')"),
}


def entrance_k(name: str) -> float:
    """Loss coefficient of a named entrance shape [-] (see :data:`ENTRANCES`)."""
    try:
        return ENTRANCES[name].k
    except KeyError:
        raise FittingError(
            f"unknown entrance shape {name!r}; known: {', '.join(ENTRANCES)}"
        ) from None


@cache
def _tables():
    from fluids.fittings import Darby, Hooper

    return Hooper, Darby


def _nominal_from_inside(diameter_m: float) -> float:
    """Nominal size [in] of the Schedule 40 pipe with this inside diameter, interpolated
    (extrapolated outside the table) in ASME B36.10M Schedule 40, as fluids' ``Darby3K``
    does when given ``Di``."""
    from fluids.numerics import interp
    from fluids.piping import NPS40, S40i

    return float(interp(diameter_m * 1000.0, S40i, NPS40, extrapolate=True))


@dataclass(frozen=True)
class FittingLoss:
    """A fitting's K split as ``K = k_re/Re + k_const`` at one size."""

    k_re: float
    """Coefficient of ``1/Re`` [-]."""
    k_const: float
    """Size-dependent constant part [-]."""
    method: str
    """Method actually used: ``"darby_3k"``, ``"hooper_2k"`` or ``"fixed"``."""
    table_name: str = ""
    """The table entry used (empty for a fixed K)."""


def fitting_constants(fitting: Fitting, diameter_m: float,
                      nominal_in: float | None = None) -> FittingLoss:
    """Split a fitting's loss into ``k_re/Re + k_const`` at a pipe size (one fitting, count 1).

    A fitting with ``type`` ``None`` uses its fixed ``k``. A named fitting uses its chosen
    method; when that method does not tabulate it, the other one is used and reported.

    Parameters
    ----------
    fitting : Fitting
    diameter_m : float
        Inside diameter [m].
    nominal_in : float, optional
        Nominal size [in] for the 3-K size term; default: estimated from the inside
        diameter as the Schedule 40 size with that bore.

    Raises
    ------
    FittingError
        Unknown fitting name, or neither fixed ``k`` nor a name given.
    """
    if fitting.type is None:
        if fitting.k is None:
            raise FittingError("a fitting needs either a type or a fixed k")
        return FittingLoss(0.0, float(fitting.k), "fixed")
    try:
        data = FITTINGS[fitting.type]
    except KeyError:
        raise FittingError(
            f"unknown fitting {fitting.type!r}; known: {', '.join(FITTINGS)}"
        ) from None
    method = fitting.method if fitting.method in data.methods else data.methods[0]
    hooper, darby = _tables()
    d_in = diameter_m / 0.0254
    if method == "hooper_2k":
        k1, kinf = hooper[data.hooper]
        return FittingLoss(float(k1), float(kinf * (1.0 + 1.0 / d_in)), method, data.hooper)
    k1, ki, kd = darby[data.darby]
    size = _nominal_from_inside(diameter_m) if nominal_in is None else nominal_in
    return FittingLoss(float(k1), float(ki * (1.0 + kd / size**0.3)), method, data.darby)


def fitting_k(fitting: Fitting, re, diameter_m: float, nominal_in: float | None = None):
    """Loss coefficient of one fitting at Reynolds number ``re`` [-] (``count`` not applied).

    ``K = K1/Re + Kinf(1 + 1/D_in)`` (Hooper 2-K) or ``K = K1/Re + Ki(1 + Kd/D^0.3)``
    (Darby 3-K); a fixed ``k`` is returned as is.

    Parameters
    ----------
    fitting : Fitting
    re : array_like
        Reynolds number [-] (absolute value; ``0`` gives ``inf`` for named fittings).
    diameter_m : float
        Inside diameter [m].
    nominal_in : float, optional
        Nominal size [in] for the 3-K size term.

    Examples
    --------
    >>> from workbench.core.model import Fitting
    >>> round(float(fitting_k(Fitting(type="gate_valve", method="hooper_2k"), 1.241e5,
    ...                       0.10226)), 4)
    0.1273
    """
    loss = fitting_constants(fitting, diameter_m, nominal_in)
    re = np.abs(np.asarray(re, dtype=float))
    with np.errstate(divide="ignore"):
        k = loss.k_const + (loss.k_re / re if loss.k_re else 0.0 * re)
    return float(k) if np.ndim(k) == 0 else k


def fittings_names() -> list[str]:
    """Our fitting names, for forms and help text."""
    return list(FITTINGS)
