"""Steady network solver: Hagen-Poiseuille, a three-reservoir problem solved independently
with brentq, continuity on a looped network, reversal, shut valves and open discharges."""

from __future__ import annotations

import math
import warnings

import numpy as np
import pytest
from steady_cases import (
    WATER_20C,
    make_system,
    pipe,
    tank,
    three_reservoirs,
)

from workbench.core.line import LineSet
from workbench.core.model import FluidProps, G, Junction, Receiver, Valve
from workbench.core.network import solve_steady

# Source: HYDRAULICS.md computed Hagen-Poiseuille case.
OIL = FluidProps(name="test oil", density=880.0, viscosity=0.25)
HP_D, HP_L, HP_DP, HP_Q = 0.050, 30.0, 50e3, 1.022654e-3


def _hp_system(entrance_k: float = 0.5):
    dh = HP_DP / (OIL.density * G)
    return make_system(
        reservoirs=[tank("upper", 0.0, 2.0 + dh), tank("lower", 0.0, 2.0)],
        lines=[pipe("oil_line", "upper", "lower", HP_L, HP_D, 0.0, entrance_k=entrance_k)],
        fluid=OIL,
    )


def test_laminar_friction_loss_is_hagen_poiseuille_exactly():
    # Source: HYDRAULICS.md, Q = pi D^4 dp/(128 mu L) = 1.022654e-3 m3/s for this case.
    lines = LineSet(_hp_system())
    d = lines.details(np.array([HP_Q]))
    assert d["friction_loss"][0] == pytest.approx(HP_DP / (OIL.density * G), rel=1e-6)
    assert d["reynolds"][0] == pytest.approx(91.67, abs=0.005)
    assert d["regime"][0] == "laminar"


@pytest.mark.parametrize("entrance_k", [0.0, 0.5])
def test_laminar_flow_between_two_levels_solves_hagen_poiseuille_with_end_losses(entrance_k):
    # Source: Hagen-Poiseuille resistance 128 mu L/(pi rho g D^4) plus (K_entrance + 2 exit)
    # velocity heads, the exit of a fully developed laminar profile taking its kinetic-energy
    # coefficient alpha = 2 (HYDRAULICS.md "Minor losses"); H = (64/Re L/D + K_ent + 2) v^2/2g
    # is a quadratic in Q, solved in closed form here.
    result = solve_steady(_hp_system(entrance_k))
    assert result.success, result.message
    assert result.lines["oil_line"].reynolds < 2000.0  # laminar, so alpha is 2 exactly
    area = math.pi * HP_D**2 / 4
    r_lin = 128 * OIL.viscosity * HP_L / (math.pi * OIL.density * G * HP_D**4)
    a = (entrance_k + 2.0) / (2 * G * area**2)
    dh = HP_DP / (OIL.density * G)
    q = (-r_lin + math.sqrt(r_lin**2 + 4 * a * dh)) / (2 * a)
    assert result.lines["oil_line"].flow == pytest.approx(q, rel=1e-10)
    # With no end losses the answer would be HYDRAULICS.md's Q; ends take a little off it.
    assert q < HP_Q


# Glycerol-like custom liquid of our own: density 1260 kg/m3, viscosity 1.41 Pa s (glycerol at
# 20 degC is about 1261 kg/m3 and 1.41 Pa s, CRC Handbook, from memory; only "very viscous"
# matters here).
SYRUP = FluidProps(name="test syrup", density=1260.0, viscosity=1.41)


def test_a_laminar_drain_to_air_takes_two_velocity_heads_at_the_exit():
    # Source: Hagen-Poiseuille (64/Re) plus a sharp entrance 0.5 (common practice) and the
    # exit of a fully developed laminar profile, alpha = 2 (HYDRAULICS.md "Minor losses"):
    # H = (64/Re L/D + 0.5 + 2) v^2/2g = 32 nu L v/(g D^2) + 2.5 v^2/2g, solved in closed form.
    d, length, head = 0.08, 12.0, 3.0
    system = make_system(reservoirs=[tank("T", 0.0, 4.0)],
                         receivers=[Receiver("OUT", "open_discharge", 1.0)],
                         lines=[pipe("L", "T", "OUT", length, d, 4.5e-5, entrance_k=0.5)],
                         fluid=SYRUP)
    result = solve_steady(system)
    assert result.success, result.message
    nu = SYRUP.viscosity / SYRUP.density
    b = 32 * nu * length / (G * d * d)
    a = 2.5 / (2 * G)
    v = (-b + math.sqrt(b * b + 4 * a * head)) / (2 * a)
    line = result.lines["L"]
    assert line.reynolds < 2000.0
    assert line.flow == pytest.approx(v * math.pi * d * d / 4, rel=1e-9)
    assert line.exit_loss == pytest.approx(2.0 * line.velocity_head, rel=1e-12)


def test_a_turbulent_exit_still_takes_one_velocity_head():
    # Source: fluids.fittings.exit_normal() (K = 1) with fluids' Colebrook, through the
    # independent brentq below: water, 3 m of head, 30 m of 80 mm pipe to air.
    system = make_system(reservoirs=[tank("R", 0.0, 5.0)],
                         receivers=[Receiver("out", "open_discharge", 2.0)],
                         lines=[pipe("L", "R", "out", 30.0, 0.08)])
    result = solve_steady(system)
    line = result.lines["L"]
    assert line.reynolds > 4000.0
    assert line.exit_loss == pytest.approx(line.velocity_head, rel=1e-12)
    q = _independent_line_flow(3.0, 30.0, 0.08, 4.5e-5, 1.5, 1.5)
    assert line.flow == pytest.approx(q, rel=1e-8)


def _exit_test_lines():
    """Two lines of a viscous liquid whose flows below span laminar, blend and turbulent Re:
    a drain to air (exit at its to-end) and a line between two tanks (an exit either way)."""
    oil = FluidProps(name="light oil", density=850.0, viscosity=0.02)
    system = make_system(reservoirs=[tank("A", 0.0, 3.0), tank("B", 0.0, 1.0)],
                         receivers=[Receiver("OUT", "open_discharge", -1.0)],
                         lines=[pipe("D", "A", "OUT", 20.0, 0.05, entrance_k=0.5),
                                pipe("M", "A", "B", 15.0, 0.05, entrance_k=0.78)],
                         fluid=oil)
    return LineSet(system), oil


def test_the_head_loss_slope_matches_finite_differences_across_the_exit_blend():
    # Independent check of dh/dq: central differences of head_loss itself, relative step
    # 1e-6, at flows from laminar through the 2000-4000 blend to turbulent, both directions.
    lines, oil = _exit_test_lines()
    area = math.pi * 0.05**2 / 4
    re = np.concatenate((np.linspace(50.0, 6000.0, 120), [1999.0, 2001.0, 3380.0, 3999.0]))
    q_of_re = re * (oil.viscosity / oil.density) / 0.05 * area
    for sign in (1.0, -1.0):
        for q1 in sign * q_of_re:
            q = np.array([q1, q1])
            _, dh = lines.head_loss(q)
            step = 1e-6 * abs(q1)
            hp, _ = lines.head_loss(q + step)
            hm, _ = lines.head_loss(q - step)
            np.testing.assert_allclose(dh, (hp - hm) / (2 * step), rtol=2e-6)
            assert np.all(dh > 0.0)


def test_details_report_the_exit_coefficient_used_by_regime_and_direction():
    # Laminar 2 (HYDRAULICS.md "Minor losses", alpha = 2); turbulent 1 (fluids'
    # exit_normal()); the exit is met at whichever end the flow leaves by.
    lines, oil = _exit_test_lines()
    area = math.pi * 0.05**2 / 4
    q_lam = 500.0 * (oil.viscosity / oil.density) / 0.05 * area
    q_turb = 2e4 * (oil.viscosity / oil.density) / 0.05 * area
    lam = lines.details(np.array([q_lam, -q_lam]))  # M reversed: from B into A
    assert lam["exit_k"].tolist() == [2.0, 2.0] and lam["entrance_k"].tolist() == [0.5, 0.78]
    np.testing.assert_allclose(lam["exit_loss"], [2.0, -2.0] * lam["velocity_head"], rtol=1e-12)
    turb = lines.details(np.array([q_turb, -q_turb]))
    assert turb["exit_k"].tolist() == [1.0, 1.0]
    np.testing.assert_allclose(turb["exit_loss"], [1.0, -1.0] * turb["velocity_head"],
                               rtol=1e-12)
    # Half way through the blend (Re 3000): 1.5, the friction blend's weight 0.5.
    mid = lines.details(np.array([1.5 * q_lam * 4, 0.0]))
    assert mid["reynolds"][0] == pytest.approx(3000.0) and mid["exit_k"][0] == pytest.approx(1.5)


def _independent_line_flow(dh: float, length: float, diameter: float, roughness: float,
                           k_forward: float, k_reverse: float, k_of_re=None) -> float:
    """Flow through one line for a head difference, by brentq with fluids' Colebrook."""
    import fluids
    from scipy.optimize import brentq

    nu = WATER_20C.viscosity / WATER_20C.density
    area = math.pi * diameter**2 / 4
    k_ends = k_forward if dh > 0 else k_reverse

    def loss(q: float) -> float:
        v = q / area
        re = v * diameter / nu
        f = fluids.Colebrook(re, roughness / diameter)
        k = k_ends + (k_of_re(re) if k_of_re else 0.0)
        return (f * length / diameter + k) * v**2 / (2 * G) - abs(dh)

    return math.copysign(brentq(loss, 1e-6, 5.0, xtol=1e-15, rtol=1e-14), dh)


def test_three_reservoirs_agree_with_an_independent_brentq_on_the_junction_head():
    # Independent answer: for a trial junction head each line's flow comes from brentq with
    # fluids.Colebrook and fluids.Darby3K; brentq then finds the head where they balance.
    import fluids
    from scipy.optimize import brentq

    system = three_reservoirs()
    rho = WATER_20C.density
    h1, h2, h3 = (system.reservoirs[r].bottom_elevation + system.reservoirs[r].level
                  for r in ("head_tank", "mix_tank", "day_tank"))
    elbow = "Elbow, 90°, flanged, welded, bends, (r/D = 1)"
    # IEC 60534-2-4 equal percentage at x = 0.8, R = 50: c = 50^(-0.2); K = K_open/c^2.
    k_valve = 0.2 / (50.0 ** (0.8 - 1.0)) ** 2

    def imbalance(hj: float) -> float:
        q1 = _independent_line_flow(h1 - hj, 300.0, 0.15, 4.5e-5, 0.5, 1.0,
                                    lambda re: 3 * fluids.Darby3K(Di=0.15, Re=abs(re), name=elbow))
        q2 = _independent_line_flow(h2 - hj, 200.0, 0.10, 4.5e-5, 0.5, 1.0)
        q3 = _independent_line_flow(hj - h3, 400.0, 0.125, 4.5e-5, 1.0 + k_valve,
                                    0.5 + k_valve)
        return q1 + q2 - q3

    hj = brentq(imbalance, h3 + 1e-6, h1 - 1e-6, xtol=1e-13)
    result = solve_steady(system)
    assert result.success, result.message
    assert result.nodes["J1"].head == pytest.approx(hj, abs=1e-8)
    q3 = _independent_line_flow(hj - h3, 400.0, 0.125, 4.5e-5, 1.0 + k_valve, 0.5 + k_valve)
    assert result.lines["L3"].flow == pytest.approx(q3, rel=1e-8)
    # The junction's pressure is the lowest static pressure of the lines meeting there:
    # energy head less the largest velocity head (turbulent, alpha = 1; energy equation).
    q1 = _independent_line_flow(h1 - hj, 300.0, 0.15, 4.5e-5, 0.5, 1.0,
                                lambda re: 3 * fluids.Darby3K(Di=0.15, Re=abs(re), name=elbow))
    q2 = q3 - q1
    vh = max((q / (math.pi * d**2 / 4)) ** 2 / (2 * G)
             for q, d in ((q1, 0.15), (q2, 0.10), (q3, 0.125)))
    assert result.nodes["J1"].pressure == pytest.approx(rho * G * (hj - 10.0 - vh), rel=1e-8)
    for lid in ("L1", "L2", "L3"):
        prof = result.profiles[lid]
        at_j = prof.pressure_gauge[-1] if system.lines[lid].to_node == "J1" else prof.pressure_gauge[0]
        assert result.nodes["J1"].pressure <= at_j * (1 + 1e-12)


def _looped_network(n: int = 6):
    """A plant ring main of our own: an n x n grid of junctions fed from two tanks and
    draining to a lower tank and an open discharge."""
    rng = np.random.default_rng(7)
    junctions = [Junction(f"J{i}_{j}", float(rng.uniform(0, 5))) for i in range(n)
                 for j in range(n)]
    lines = []
    k = 0
    for i in range(n):
        for j in range(n):
            for di, dj in ((1, 0), (0, 1)):
                if i + di < n and j + dj < n:
                    k += 1
                    lines.append(pipe(f"P{k}", f"J{i}_{j}", f"J{i + di}_{j + dj}",
                                      float(rng.uniform(20, 200)), float(rng.choice([0.05, 0.08,
                                                                                    0.1, 0.15]))))
    lines += [
        pipe("feed_a", "tank_a", "J0_0", 50.0, 0.2),
        pipe("feed_b", "tank_b", f"J0_{n - 1}", 80.0, 0.15),
        pipe("drain", f"J{n - 1}_{n - 1}", "sump", 60.0, 0.15),
        pipe("spout", f"J{n - 1}_0", "outfall", 30.0, 0.1),
    ]
    return make_system(
        reservoirs=[tank("tank_a", 30.0, 4.0), tank("tank_b", 25.0, 3.0), tank("sump", -10.0, 1.0)],
        junctions=junctions,
        receivers=[Receiver("outfall", "open_discharge", -5.0)],
        lines=lines,
    )


def test_continuity_holds_at_every_junction_of_a_looped_network():
    # Mass conservation (continuity): inflow equals outflow at each junction, to 1e-9 m3/s.
    system = _looped_network()
    result = solve_steady(system)
    assert result.success, result.message
    net = {jid: 0.0 for jid in system.junctions}
    for lid, line in system.lines.items():
        q = result.lines[lid].flow
        if line.from_node in net:
            net[line.from_node] -= q
        if line.to_node in net:
            net[line.to_node] += q
    assert max(abs(v) for v in net.values()) < 1e-9
    # Energy on every line: head difference equals the line's head loss.
    for lid, line in system.lines.items():
        dh = result.nodes[line.from_node].head - result.nodes[line.to_node].head
        assert dh == pytest.approx(math.copysign(result.lines[lid].head_loss, dh), abs=1e-8)
    assert result.iterations <= 20
    assert result.residuals["continuity"] < 1e-12 and result.residuals["energy"] < 1e-9


def test_reverse_flow_swaps_entrance_and_exit():
    # R_low -> J -> R_high is drawn against the flow: L1 runs backwards into R_low (exit, one
    # velocity head) and L2 backwards out of R_high (entrance). Source: the exit K = 1 of
    # fluids.exit_normal() and the flow direction.
    system = make_system(
        reservoirs=[tank("low", 0.0, 2.0), tank("high", 10.0, 2.0)],
        junctions=[Junction("J", 0.0)],
        lines=[pipe("L1", "low", "J", 100.0, 0.1, entrance_k=0.5),
               pipe("L2", "J", "high", 100.0, 0.1, entrance_k=0.5)],
    )
    result = solve_steady(system)
    assert result.success, result.message
    l1, l2 = result.lines["L1"], result.lines["L2"]
    assert l1.flow < 0 and l2.flow < 0
    assert l1.exit_loss == pytest.approx(l1.velocity_head) and l1.entrance_loss == 0.0
    assert l2.entrance_loss == pytest.approx(0.5 * l2.velocity_head) and l2.exit_loss == 0.0
    # Independent: same pipe, both in series: 12 - 2 = (f L/D)*2 + 0.5 + 1 velocity heads.
    q = _independent_line_flow(10.0, 200.0, 0.1, 4.5e-5, 1.5, 1.5)
    assert -l1.flow == pytest.approx(q, rel=1e-8)


def test_line_details_swap_entrance_and_exit_with_the_sign_of_the_flow():
    system = make_system(reservoirs=[tank("R", 0.0, 1.0)], junctions=[Junction("J", 0.0)],
                         receivers=[Receiver("V", "vessel", 0.0, 1e4)],
                         lines=[pipe("L", "R", "J", 10.0, 0.05, entrance_k=0.78),
                                pipe("M", "J", "V", 10.0, 0.05)])
    lines = LineSet(system)
    fwd = lines.details(np.array([0.002, 0.002]))
    rev = lines.details(np.array([-0.002, -0.002]))
    assert fwd["entrance_k"].tolist() == [0.78, 0.0] and fwd["exit_k"].tolist() == [0.0, 1.0]
    assert rev["entrance_k"].tolist() == [0.0, 0.5] and rev["exit_k"].tolist() == [1.0, 0.0]


def test_head_loss_is_smooth_through_zero_flow():
    system = three_reservoirs()
    lines = LineSet(system)
    q = np.array([1e-7, -1e-7, 0.0])
    h, dh = lines.head_loss(q)
    assert np.all(dh > 0)
    eps = 1e-9
    hp, _ = lines.head_loss(q + eps)
    hm, _ = lines.head_loss(q - eps)
    np.testing.assert_allclose((hp - hm) / (2 * eps), dh, rtol=1e-5)


def test_a_shut_valve_stops_its_line_and_the_rest_still_flows():
    base = three_reservoirs()
    result = solve_steady(base, openings={"L3": 0.0})
    assert result.success, result.message
    assert result.lines["L3"].flow == 0.0 and result.lines["L3"].status == "closed"
    assert result.lines["L1"].flow == pytest.approx(-result.lines["L2"].flow, rel=1e-10)
    assert result.lines["L1"].flow > 0
    assert any(w.code == "line.closed" and w.element == "L3" for w in result.warnings)


def test_a_junction_behind_shut_valves_is_reported_without_a_head():
    shut = Valve("linear", 0.2, opening=0.0)
    system = make_system(
        reservoirs=[tank("A", 5.0, 1.0), tank("B", 0.0, 1.0)],
        junctions=[Junction("J", 0.0)],
        lines=[pipe("L1", "A", "J", 10.0, 0.05, valve=shut),
               pipe("L2", "J", "B", 10.0, 0.05, valve=shut)],
    )
    with np.errstate(all="raise"):
        result = solve_steady(system)
    assert result.success, result.message
    assert math.isnan(result.nodes["J"].head)
    assert any(w.code == "node.isolated" and w.element == "J" for w in result.warnings)


def test_a_discharge_above_the_source_carries_no_flow_rather_than_sucking_air():
    system = make_system(
        reservoirs=[tank("R", 0.0, 5.0)], junctions=[Junction("J", 0.0)],
        receivers=[Receiver("low_out", "open_discharge", -3.0),
                   Receiver("high_out", "open_discharge", 4.9)],
        lines=[pipe("L1", "R", "J", 20.0, 0.1), pipe("L2", "J", "low_out", 20.0, 0.1),
               pipe("L3", "J", "high_out", 20.0, 0.05)],
    )
    result = solve_steady(system)
    assert result.success, result.message
    assert result.lines["L3"].flow == 0.0 and result.lines["L3"].status == "drains_back"
    assert any(w.code == "line.drains_back" and w.element == "L3" for w in result.warnings)
    # Independent: then R -> low_out is one line of 40 m with entrance 0.5 and exit 1.
    q = _independent_line_flow(5.0 + 3.0, 40.0, 0.1, 4.5e-5, 1.5, 1.5)
    assert result.lines["L2"].flow == pytest.approx(q, rel=1e-8)


def test_a_discharge_that_the_source_can_reach_flows_normally():
    system = make_system(reservoirs=[tank("R", 0.0, 5.0)],
                         receivers=[Receiver("out", "open_discharge", 2.0)],
                         lines=[pipe("L", "R", "out", 30.0, 0.08)])
    result = solve_steady(system)
    q = _independent_line_flow(3.0, 30.0, 0.08, 4.5e-5, 1.5, 1.5)
    assert result.lines["L"].flow == pytest.approx(q, rel=1e-8)


def test_a_junction_with_no_path_to_a_known_head_is_named():
    system = make_system(
        reservoirs=[tank("R", 0.0, 1.0)],
        junctions=[Junction("J1", 0.0), Junction("J2", 0.0), Junction("J3", 0.0)],
        lines=[pipe("L1", "R", "J1", 10.0, 0.05), pipe("L2", "J2", "J3", 10.0, 0.05)],
    )
    result = solve_steady(system)
    assert not result.success and result.status == 3
    assert "'J2'" in result.message and "'J3'" in result.message
    assert "'J1'" not in result.message


def test_a_tank_level_given_at_solve_time_replaces_the_stored_level():
    result = solve_steady(three_reservoirs(), levels={"head_tank": 1.0})
    assert result.nodes["head_tank"].head == pytest.approx(31.0)
    stored = solve_steady(three_reservoirs())
    assert result.lines["L1"].flow < stored.lines["L1"].flow


def test_a_fixed_friction_factor_overrides_the_correlation():
    system = make_system(reservoirs=[tank("A", 0.0, 10.0), tank("B", 0.0, 1.0)],
                         lines=[pipe("L", "A", "B", 100.0, 0.1, friction_factor=0.03)])
    result = solve_steady(system)
    area = math.pi * 0.1**2 / 4
    # Source: Darcy-Weisbach with the given f: 9 m = (0.03*1000 + 0.5 + 1) v^2/2g.
    v = math.sqrt(2 * G * 9.0 / (0.03 * 1000 + 1.5))
    assert result.lines["L"].flow == pytest.approx(v * area, rel=1e-10)
    assert result.lines["L"].friction_factor == 0.03


def test_the_analytic_jacobian_matches_finite_differences_and_the_schur_step_solves_it():
    # Check of the solver's own algebra against central differences of its residual and
    # against scipy.sparse.linalg.spsolve on the full Jacobian.
    from scipy.sparse.linalg import spsolve

    from workbench.core.network import _Newton, fixed_heads
    from workbench.core.topology import build_topology

    system = _looped_network(4)
    topo = build_topology(system)
    lines = LineSet(system, topo)
    x_open = lines.steady_openings()
    newton = _Newton(lines, topo, fixed_heads(system, topo), x_open, lines.closed(x_open))
    x = newton.start()
    fc, fe, dh = newton.residual(x)
    jac = newton.jacobian(dh, x[newton.nj:]).toarray()
    numeric = np.empty_like(jac)
    for k in range(x.size):
        e = np.zeros(x.size)
        e[k] = 1e-7 * max(1.0, abs(x[k]))
        fp = np.concatenate(newton.residual(x + e)[:2])
        fm = np.concatenate(newton.residual(x - e)[:2])
        numeric[:, k] = (fp - fm) / (2 * e[k])
    np.testing.assert_allclose(jac, numeric, rtol=1e-5, atol=1e-6)
    full = spsolve(newton.jacobian(dh, x[newton.nj:]).tocsc(), -np.concatenate([fc, fe]))
    np.testing.assert_allclose(newton.step(fc, fe, dh), full, rtol=1e-9, atol=1e-12)


@pytest.mark.parametrize("opening", [1e-12, 1e-9, 1e-6])
def test_a_valve_opened_a_hair_still_converges_to_the_orifice_law(opening):
    # Source: K = K_open/c^2 (IEC 60534-2-4 characteristic) and h = K v^2/2g: a nearly shut
    # valve takes the whole head difference between J1 and the day tank, so
    # q = A sqrt(2 g dH / K), with c on the tangent line c = x e ln(R)/R below 1/ln R.
    result = solve_steady(three_reservoirs(), openings={"L3": opening})
    assert result.success, result.message
    r = 50.0
    c = opening * math.e * math.log(r) / r
    k = 0.2 / c**2
    dh = result.nodes["J1"].head - 8.0
    area = math.pi * 0.125**2 / 4
    assert result.lines["L3"].flow == pytest.approx(area * math.sqrt(2 * G * dh / k), rel=1e-4)


def test_lines_among_junctions_cut_off_by_shut_valves_carry_no_flow():
    # Trapped liquid between two shut valves cannot flow, whatever the junction elevations.
    shut = Valve("linear", 0.2, opening=0.0)
    system = make_system(
        reservoirs=[tank("A", 5.0, 1.0), tank("B", 0.0, 1.0)],
        junctions=[Junction("J1", 4.0), Junction("J2", 0.0)],
        lines=[pipe("L1", "A", "J1", 10.0, 0.05, valve=shut),
               pipe("L2", "J1", "J2", 10.0, 0.05),
               pipe("L3", "J2", "B", 10.0, 0.05, valve=shut)],
    )
    result = solve_steady(system)
    assert result.success, result.message
    assert result.lines["L2"].flow == 0.0 and result.lines["L2"].status == "isolated"
    assert {w.element for w in result.warnings if w.code == "node.isolated"} == {"J1", "J2"}


@pytest.mark.parametrize("size", [6, 10])  # 36 junctions: the dense LU; 100: scipy's SuperLU
def test_the_dense_and_the_sparse_junction_solve_reach_the_same_steady_state(monkeypatch, size):
    """The junction-head systems are solved dense up to DENSE_JUNCTIONS_MAX junctions and by
    scipy's spsolve beyond: both are exact direct solves, so Newton converges to the same
    flows (to its tolerance) whichever one does the steps."""
    from workbench.core import network

    system = _looped_network(size)
    assert (len(system.junctions) <= network.DENSE_JUNCTIONS_MAX) == (size == 6)
    native = solve_steady(system)
    monkeypatch.setattr(network, "DENSE_JUNCTIONS_MAX",
                        0 if size == 6 else 10 * len(system.junctions))  # the other solver
    other = solve_steady(system)
    assert native.success and other.success
    for lid in system.lines:
        assert other.lines[lid].flow == pytest.approx(native.lines[lid].flow, rel=1e-9, abs=1e-12)


@pytest.mark.parametrize("dense_max", [0, 64])
def test_a_singular_junction_system_gives_nan_from_either_solver(monkeypatch, dense_max):
    """A path graph's Laplacian without a fixed head is singular (its rows sum to zero):
    both solvers answer with nan, which the Newton loop reports as status 2."""
    import scipy.sparse

    from workbench.core import network

    monkeypatch.setattr(network, "DENSE_JUNCTIONS_MAX", dense_max)
    lap = scipy.sparse.csc_matrix(np.array([[1.0, -1.0, 0.0], [-1.0, 2.0, -1.0],
                                            [0.0, -1.0, 1.0]]))
    with np.errstate(all="ignore"), warnings.catch_warnings():
        warnings.simplefilter("ignore")  # spsolve's MatrixRankWarning
        x = network._solve_laplacian(lap, np.array([1.0, 0.0, -1.0]))
    assert x.shape == (3,) and not np.all(np.isfinite(x))
