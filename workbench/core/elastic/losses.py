r"""Friction and fittings of the lines in an elastic run, per line and per reach.

Friction is quasi-steady Darcy-Weisbach, odd in ``Q`` so reverse flow is handled:

* ``"initial"`` (default): the friction factor of each line (and its fittings' K) is taken
  from :func:`workbench.core.friction.darcy_friction` (and
  :func:`workbench.core.fittings.fitting_k`) at the **initial** Reynolds number and held;
  the usual choice for a surge run of seconds to minutes and the fastest. When the initial
  flow is zero there is no initial Reynolds number and ``"quasi_steady"`` is used;
* ``"quasi_steady"``: ``f`` is updated at every node and step from the local Reynolds number
  (laminar ``64/Re`` through Colebrook), through ``f*Re`` so that zero flow is regular.

The loss of one reach is ``F(Q) = (c_phi phi(Re) + c_lin) Q + R Q|Q|`` [m].
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from workbench.core.model import G, Line

#: Friction models by name -> description. The stepping code reads the name.
FRICTION_MODELS: dict[str, str] = {
    "initial": "quasi-steady Darcy-Weisbach, f (and fittings' K) at the initial Reynolds "
    "number, held over the run",
    "quasi_steady": "quasi-steady Darcy-Weisbach, f updated at every node and step from the "
    "local Reynolds number",
}


@dataclass(frozen=True)
class LineLoss:
    """Head loss of a whole line as ``c_phi*phi(Re)*Q + c_lin*Q + c_quad*Q|Q|`` [m]."""

    c_phi: float
    """``nu L/(2 g D^2 A)`` [s/m^2], times ``phi = f Re``."""
    c_lin: float
    """``sum K_re nu/(2 g D A)`` [s/m^2], the fittings' ``K1/Re`` part."""
    c_quad: float
    """``sum K_const/(2 g A^2)`` [s^2/m^5], the fittings' constant part."""
    fixed_f: float | None
    """A friction factor given in the file [-]."""
    rel_roughness: float
    re_per_q: float
    """``Re = re_per_q |Q|`` [s/m^3]."""
    length: float
    area: float
    diameter: float

    def head_loss(self, q: float) -> float:
        """Loss over the whole line at flow ``q`` [m], odd in ``q``."""
        from workbench.core.friction import friction_re_product

        if self.fixed_f is not None:
            phi = self.fixed_f * self.re_per_q * abs(q)
        else:
            phi = float(friction_re_product(self.re_per_q * abs(q), self.rel_roughness)[0])
        return self.c_phi * phi * q + self.c_lin * q + self.c_quad * q * abs(q)


def line_loss(line: Line, density: float, viscosity: float) -> LineLoss:
    """The :class:`LineLoss` of a line (pipe friction and fittings, no valve, no ends)."""
    from workbench.core.fittings import fitting_constants

    d = line.diameter
    area = math.pi * d * d / 4.0
    nu = viscosity / density
    k_re = 0.0
    k_const = 0.0
    for fit in line.fittings:
        loss = fitting_constants(fit, d)
        k_re += loss.k_re * fit.count
        k_const += loss.k_const * fit.count
    return LineLoss(
        c_phi=nu * line.length / (2.0 * G * d * d * area),
        c_lin=k_re * nu / (2.0 * G * d * area),
        c_quad=k_const / (2.0 * G * area * area),
        fixed_f=line.friction_factor,
        rel_roughness=line.roughness / d,
        re_per_q=d / (area * nu),
        length=line.length,
        area=area,
        diameter=d,
    )


@dataclass(frozen=True, eq=False)
class ReachFriction:
    """Per-node coefficients of the loss of one reach (arrays over the grid's nodes).

    ``quasi`` is false for held friction: then only ``r`` is used, ``F = R Q|Q|``.
    """

    r: np.ndarray
    """``R`` [s^2/m^5]."""
    quasi: bool
    cphi: np.ndarray
    clin: np.ndarray
    re_per_q: np.ndarray
    rel_roughness: np.ndarray
    fixed_f: np.ndarray
    """A fixed friction factor, NaN where the roughness gives it."""


def reach_friction(model: str, losses: list[LineLoss], counts: list[int],
                   flows: list[float]) -> ReachFriction:
    """Per-node friction of one reach for ``model`` (a key of :data:`FRICTION_MODELS`).

    Held friction: ``R = h_f(Q0)/(N Q0|Q0|)`` on each line (its whole loss at the initial
    flow, spread over its ``N`` reaches).
    """
    def per_node(values):
        return np.concatenate([np.full(c + 1, float(v)) for v, c in zip(values, counts)])

    frac = [1.0 / c for c in counts]
    zeros = np.zeros(sum(c + 1 for c in counts))
    if model == "initial":
        r = [ls.head_loss(q) / (q * abs(q)) * fr for ls, q, fr in zip(losses, flows, frac)]
        return ReachFriction(per_node(r), False, zeros, zeros, zeros, zeros, zeros)
    return ReachFriction(
        r=per_node([ls.c_quad * fr for ls, fr in zip(losses, frac)]),
        quasi=True,
        cphi=per_node([ls.c_phi * fr for ls, fr in zip(losses, frac)]),
        clin=per_node([ls.c_lin * fr for ls, fr in zip(losses, frac)]),
        re_per_q=per_node([ls.re_per_q for ls in losses]),
        rel_roughness=per_node([ls.rel_roughness for ls in losses]),
        fixed_f=per_node([np.nan if ls.fixed_f is None else ls.fixed_f for ls in losses]),
    )
