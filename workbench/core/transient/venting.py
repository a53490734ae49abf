"""The gas spaces after a run: pressure series, required venting and the tank findings.

``tank.vacuum`` (danger beyond the tank's ``design_vacuum``; a caution beyond
``ATMOSPHERIC_TANK_VACUUM`` when no design figure is given), ``tank.overpressure`` (danger
beyond ``design_pressure``), ``tank.vent_undersized`` (the vent cannot pass the required
venting, :data:`workbench.core.vent.REQUIRED_VENTING_SOURCE`, at the design differential)
and ``tank.sealed_stop`` (the drain stopped against the vacuum short of the drained level).
"""

from __future__ import annotations

import numpy as np

from workbench.core.finding_text import finding, slots
from workbench.core.model import Finding
from workbench.core.transient.model import TransientModel
from workbench.core.transient.results import Event
from workbench.core.vent import REQUIRED_VENTING_SOURCE, vent_capacity

#: Vacuum an atmospheric storage tank is commonly built for when no design figure is given
#: [Pa] (API 650's basic design external pressure, 0.25 kPa; from memory).
ATMOSPHERIC_TANK_VACUUM = 250.0

#: A drain counts as stopped when the outflow stays below this fraction of its peak.
STOPPED_FRACTION = 1e-2

_VACUUM_SOURCE = "the tank's design vacuum; API 650 / EN 14015 tank design"


def gas_series(model: TransientModel, ys: np.ndarray):
    """Gauge pressure [Pa] and gas mass [kg] of each gas space at the output times."""
    gas, nl, nt = model.gas, model.nl, model.nt
    n = ys.shape[1]
    if not gas.ng:
        return np.zeros((0, n)), np.zeros((0, n))
    p = np.zeros((gas.ng, n))
    mass = np.zeros((gas.ng, n))
    for j in range(n):
        pj, rho, vg = gas.state(ys[nl:nl + nt, j], ys[nl + nt:model.ne, j])
        p[:, j] = pj - gas.p_atm
        mass[:, j] = rho * vg
    return p, mass


def required_venting(model: TransientModel, ys, feeds, draws, spills):
    """Per gas tank the largest liquid outflow and inflow less spill [m^3/s]: the required
    in- and outbreathing for liquid movement (API 2000 / ISO 28300)."""
    inb: dict[str, float] = {}
    outb: dict[str, float] = {}
    if not model.ng or not ys.shape[1]:
        return inb, outb
    net = model.t_rows @ ys[: model.nl] + feeds - draws - spills
    for g, k in enumerate(model.gas.tank.tolist()):
        tid = model.gas.ids[g]
        noise = 1e-9 * float(np.max(np.abs(net[k])))  # round-off of a stopped line
        inb[tid] = max(float(np.max(-net[k])), 0.0)
        outb[tid] = max(float(np.max(net[k])), 0.0)
        inb[tid], outb[tid] = (v if v > noise else 0.0 for v in (inb[tid], outb[tid]))
    return inb, outb


def vent_findings(model: TransientModel, t, p_gauge, inb, outb) -> list[Finding]:
    """``tank.vacuum``, ``tank.overpressure`` and ``tank.vent_undersized`` per gas tank."""
    out: list[Finding] = []
    gas = model.gas
    for g, k in enumerate(gas.tank.tolist()):
        if not p_gauge.shape[1]:
            break
        res = model.tanks[k]
        tid = gas.ids[g]
        j_min, j_max = int(np.argmin(p_gauge[g])), int(np.argmax(p_gauge[g]))
        vac, t_vac = -float(p_gauge[g, j_min]), float(t[j_min])
        out.extend(_vacuum(tid, res.design_vacuum, vac, t_vac))
        if gas.p_floor > 0.0 and gas.p_atm - vac <= gas.p_floor * (1.0 + 1e-9):
            out.append(finding(
                "tank.vapor", tid,
                f"the gas space of tank {tid} falls to the liquid's vapour pressure, {{pv}}, "
                f"at t = {t_vac:.4g} s: the liquid boils into it and the pressure is held "
                "there. No atmospheric tank withstands this vacuum: it would have collapsed "
                "long before", "danger", "ideal gas and the liquid's vapour pressure",
                pv=(gas.p_floor, "pressure_abs")))
        if res.design_pressure is not None and p_gauge[g, j_max] > res.design_pressure:
            out.append(finding(
                "tank.overpressure", tid,
                f"the gas space of tank {tid} reaches {{p}} gauge at t = {t[j_max]:.4g} s, "
                "above its design pressure of {d}: the roof and shell are loaded beyond their "
                "design; enlarge the vent or slow the fill (defer to the tank's design code)",
                "danger", "the tank's design pressure",
                p=(float(p_gauge[g, j_max]), "pressure"), d=(res.design_pressure, "pressure")))
        out.extend(_undersized(model, g, res, tid, inb[tid], outb[tid]))
    return out


def _vacuum(tid, design, vac, when) -> list[Finding]:
    if design is not None and vac > design:
        return [finding(
            "tank.vacuum", tid,
            f"the gas space of tank {tid} is pulled to a vacuum of {{v}} at t = {when:.4g} s, "
            "beyond its design vacuum of {d}: the tank can be pulled in (shell or roof "
            "collapse); enlarge or clear the vent or slow the drain, and defer to the tank's "
            "design code", "danger", _VACUUM_SOURCE, v=(vac, "pressure"), d=(design, "pressure"))]
    if design is None and vac > ATMOSPHERIC_TANK_VACUUM:
        return [finding(
            "tank.vacuum", tid,
            f"the gas space of tank {tid} is pulled to a vacuum of {{v}} at t = {when:.4g} s; "
            "no design_vacuum is given, and atmospheric storage tanks are commonly built for "
            "about {d}: check the tank's design vacuum", "caution",
            "API 650 basic design external pressure", v=(vac, "pressure"),
            d=(ATMOSPHERIC_TANK_VACUUM, "pressure"))]
    return []


def _undersized(model, g, res, tid, inb, outb) -> list[Finding]:
    gas = model.gas
    area, n = float(gas.area[g]), float(gas.exponent[g])
    out = []
    if area <= 0.0:  # a sealed tank has no vent to size: see sealed_findings
        return out
    for need, design, inward, word in ((inb, res.design_vacuum, True, "inbreathing"),
                                       (outb, res.design_pressure, False, "outbreathing")):
        if need <= 0.0 or design is None:
            continue
        cap = vent_capacity(area, design, gas.p_atm, gas.rho_atm, inward, n)
        if cap < need:
            which = "vacuum" if inward else "pressure"
            out.append(finding(
                "tank.vent_undersized", tid,
                f"the vent of tank {tid} passes {{cap}} of air at its design {which} of {{d}}, "
                f"less than the {word} its liquid movement needs, {{need}} (the largest "
                "liquid flow of the run)", "danger" if inward else "caution",
                REQUIRED_VENTING_SOURCE, cap=(cap, "gas_flow"), d=(design, "pressure"),
                need=(need, "gas_flow")))
    return out


def sealed_findings(model: TransientModel, t, p_gauge, inb, outb, reported) -> list[Finding]:
    """``tank.sealed`` (caution) for a sealed tank (``vent = "none"``) whose liquid moved
    and whose drain did not stop against its vacuum (``reported``: the findings so far, a
    ``tank.sealed_stop`` among them says that already): its gas space alone takes up the
    liquid movement, with the gauge pressures it reached."""
    out: list[Finding] = []
    gas = model.gas
    stopped = {f.element for f in reported if f.code == "tank.sealed_stop"}
    for g, tid in enumerate(gas.ids):
        if gas.area[g] > 0.0 or tid in stopped or not p_gauge.shape[1]:
            continue
        if inb[tid] <= 0.0 and outb[tid] <= 0.0:
            continue
        j_min, j_max = int(np.argmin(p_gauge[g])), int(np.argmax(p_gauge[g]))
        out.append(finding(
            "tank.sealed", tid,
            f"tank {tid} is sealed (no vent): its gas space alone takes up the liquid "
            "moving out and in, and its pressure goes from {low} (at "
            f"t = {float(t[j_min]):.4g} s) to {{high}} gauge (at t = {float(t[j_max]):.4g} s); "
            "check that the tank is built for both, or give it a vent (API 2000 / ISO 28300)",
            "caution", "ideal gas (Boyle's law) in the gas space",
            low=(float(p_gauge[g, j_min]), "pressure"),
            high=(float(p_gauge[g, j_max]), "pressure")))
    return out


def stopped_drains(model: TransientModel, state, t, ys, p_gauge):
    """``tank.sealed_stop`` for drains that came to rest against the vacuum without a line
    stopping or reversing (the approach is then gradual): the outflow stays below
    ``STOPPED_FRACTION`` of its peak to the end, the tank is not drained, its gas space is
    under vacuum. Returns events and findings (findings for every sealed stop)."""
    events, findings = [], []
    gas, nl = model.gas, model.nl
    if not gas.ng or ys.shape[1] < 2:
        return events, findings
    net = model.t_rows @ ys[:nl]
    for g, k in enumerate(gas.tank.tolist()):
        tid = gas.ids[g]
        outflow = np.maximum(-net[k], 0.0)
        peak = float(np.max(outflow))
        when = state.sealed_stops.get(tid)
        if when is None and peak > 0.0 and not state.drained[k] and p_gauge[g, -1] < -1.0:
            low = outflow <= STOPPED_FRACTION * peak
            if low[-1]:
                j = len(low) - int(np.argmin(low[::-1])) if not low.all() else 0
                when = float(t[min(j, len(t) - 1)])
                level = model.geoms[k].level_extrapolated(float(ys[nl + k, j]))
                events.append(Event(when, "tank.sealed_stop", tid, *slots(
                    f"the drain of tank {tid} comes to rest at a level of {{level}}: the "
                    "vacuum in its gas space balances the head over its outlets",
                    level=(level, "length", 4))))
        if when is not None:
            findings.append(finding(
                "tank.sealed_stop", tid,
                f"the drain of tank {tid} stops at t = {when:.4g} s short of its drained level, "
                "held by a vacuum of {v} in its gas space: the vent is blocked, sealed or too "
                "small; a tank under this vacuum can be pulled in", "caution",
                "ideal gas (Boyle's law) and the line's head balance",
                v=(-float(p_gauge[g, -1]), "pressure")))
    return events, findings
