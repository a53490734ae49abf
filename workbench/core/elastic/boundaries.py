r"""Boundary conditions of the method of characteristics, one small function each.

Every function works on plain floats and calls no other function (the root of
``b Q + k Q|Q| = delta`` is written out where needed), so that the numpy kernel calls it as
it is and the compiled kernel (:mod:`workbench.core.elastic.compiled`) compiles the very same
code with numba, loaded only when that kernel is chosen.

Notation (SI, Wylie & Streeter, *Fluid Transients in Systems*, 1993, ch. 3): a line end
meeting a node brings one known characteristic value ``c``: ``C_P`` when the line ends at
the node (``H = C_P - B Q``), ``C_M`` when it starts there (``H = C_M + B Q``). In both cases
the flow from that line **into** the node is ``(c - H)/B`` and the value the node sends back
into the line is ``2H - c`` (``w = H - BQ`` at a line's last node, ``u = H + BQ`` at its
first), which is how the kernels store the state.

Vapour cavities (discrete vapour cavity model; Wylie & Streeter 1993, ch. 8; Bergant,
Simpson & Tijsseling 2006): a node may hold a cavity of volume ``V`` [m^3]. Its head is the
vapour head ``H_v`` while ``V > 0``, and ``V`` changes by the difference of the flows leaving
and entering the node, with the weighting ``psi = 1`` (the flows at the new time level)::

    V' = V + dt (sum of outflows - sum of inflows)

A node is solved first as liquid with the cavity's volume taken as an extra inflow
``V/dt`` over the step (so that a cavity that closes within the step closes exactly, its
volume conserved); if that head is below ``H_v`` the cavity (re)opens at ``H_v``. With
``V = 0`` and a head above vapour this is the ordinary liquid boundary condition.
"""

from __future__ import annotations

import math


def end_flow(b: float, k: float, delta: float) -> float:
    r"""Root of ``b Q + k Q|Q| = delta`` for ``Q``; ``k = inf`` gives no flow.

    Written in the stable form ``Q = 2 delta/(b + sqrt(b^2 + 4 k |delta|))`` (no
    cancellation when ``k`` is small), odd in ``delta``.
    """
    if k == math.inf:
        return 0.0
    return 2.0 * delta / (b + math.sqrt(b * b + 4.0 * k * abs(delta)))


def junction(sum_cb: float, sum_inv_b: float, vol: float, dt: float,
             h_vap: float) -> tuple[float, float]:
    r"""Head and cavity volume at a node where line ends meet (no loss between them).

    Continuity with a common head (Wylie & Streeter 1993, ch. 3, branching pipes):
    ``sum (c_j - H)/B_j + V/dt = 0`` gives

    .. math:: H = \frac{\sum c_j/B_j - V/\Delta t}{\sum 1/B_j}

    and with ``H < H_v`` the node holds a cavity: ``H = H_v`` and
    ``V' = V + dt sum (H_v - c_j)/B_j`` (> 0). Otherwise ``V' = 0``. A dead end is a
    junction of one line end; an interior computing section one of two equal ``B``.

    Parameters
    ----------
    sum_cb, sum_inv_b : ``sum c_j/B_j`` [m^3/s... m s/m^2] and ``sum 1/B_j`` [m^2/s].
    vol : cavity volume before the step [m^3]; dt : time step [s].
    h_vap : vapour head at the node [m] (``-inf``: no cavities).

    Returns
    -------
    (H, V')
    """
    h = (sum_cb - vol / dt) / sum_inv_b
    if h < h_vap:
        return h_vap, vol + dt * (h_vap * sum_inv_b - sum_cb)
    return h, 0.0


def fixed_end(c: float, b: float, head: float, k_out: float, k_in: float, vol: float,
              dt: float, h_vap: float) -> tuple[float, float]:
    r"""Head and cavity volume at a line end meeting a fixed head through a loss.

    A reservoir, tank held at its level, receiver or free discharge at head ``head``,
    reached through an entrance or exit loss and any valve: ``H - head = k Q_f|Q_f|``
    with ``Q_f`` the flow from the pipe end into the fixed head and ``k = k_out`` for
    ``Q_f >= 0``, ``k_in`` otherwise [s^2/m^5]. With the line's ``(c - H)/B = Q_f + V/dt``:

    .. math:: B Q_f + k Q_f|Q_f| = c - B V/\Delta t - head,\qquad H = c - B(Q_f + V/\Delta t)

    (the root by :func:`end_flow`). Below the vapour head the end holds a cavity:
    ``H = H_v``, ``Q_f`` from ``k Q_f|Q_f| = H_v - head`` and
    ``V' = V + dt (Q_f - (c - H_v)/B)``.
    """
    c_eff = c - b * vol / dt
    delta = c_eff - head
    k = k_out if delta >= 0.0 else k_in
    q = 0.0 if k == math.inf else 2.0 * delta / (b + math.sqrt(b * b + 4.0 * k * abs(delta)))
    h = c_eff - b * q
    if h < h_vap and k > 0.0:
        d = h_vap - head
        k = k_out if d >= 0.0 else k_in
        q = 0.0 if k == math.inf else math.copysign(math.sqrt(abs(d) / k), d)
        return h_vap, vol + dt * (q - (c - h_vap) / b)
    return h, 0.0


def valve_between(c1: float, b1: float, c2: float, b2: float, k: float, vol1: float,
                  vol2: float, dt: float, hv1: float, hv2: float):
    r"""Heads and cavity volumes on the two faces of a valve joining two lines.

    Line 1 ends at the valve (``C_P = c1``), line 2 starts there (``C_M = c2``); the
    valve's loss is ``H_1 - H_2 = k Q|Q|`` (Wylie & Streeter 1993, ch. 3, valve in a
    line). As liquid, with each face's cavity volume as an extra inflow:

    .. math:: (B_1 + B_2) Q + k Q|Q| = (c_1 - B_1 V_1/\Delta t) - (c_2 + B_2 V_2/\Delta t)

    A face whose head falls below its vapour head holds a cavity at ``H_v`` and the valve
    flow follows from the other face's characteristic (or from both vapour heads).
    ``V_1' = V_1 + dt (Q - (c_1 - H_1)/B_1)``, ``V_2' = V_2 + dt ((H_2 - c_2)/B_2 - Q)``.

    Returns
    -------
    (H1, H2, V1', V2')
    """
    shut = k == math.inf
    c1e = c1 - b1 * vol1 / dt
    c2e = c2 + b2 * vol2 / dt
    bs = b1 + b2
    d = c1e - c2e
    q = 0.0 if shut else 2.0 * d / (bs + math.sqrt(bs * bs + 4.0 * k * abs(d)))
    h1 = c1e - b1 * q
    h2 = c2e + b2 * q
    cav1 = False
    cav2 = False
    if h2 < hv2:  # a cavity on the downstream face; the valve flow from line 1
        cav2 = True
        h2 = hv2
        d = c1e - hv2
        q = 0.0 if shut else 2.0 * d / (b1 + math.sqrt(b1 * b1 + 4.0 * k * abs(d)))
        h1 = c1e - b1 * q
    elif h1 < hv1:  # a cavity on the upstream face; the valve flow from line 2
        cav1 = True
        h1 = hv1
        d = hv1 - c2e
        q = 0.0 if shut else 2.0 * d / (b2 + math.sqrt(b2 * b2 + 4.0 * k * abs(d)))
        h2 = c2e + b2 * q
    if (cav2 and h1 < hv1) or (cav1 and h2 < hv2):  # cavities on both faces
        cav1 = True
        cav2 = True
        h1 = hv1
        h2 = hv2
        d = hv1 - hv2
        q = 0.0 if shut or k <= 0.0 else math.copysign(math.sqrt(abs(d) / k), d)
    v1 = max(0.0, vol1 + dt * (q - (c1 - h1) / b1)) if cav1 else 0.0
    v2 = max(0.0, vol2 + dt * ((h2 - c2) / b2 - q)) if cav2 else 0.0
    return h1, h2, v1, v2


def valve_at_junction(sum_cb: float, sum_inv_b: float, c_lo: float, c_hi: float, cv: float,
                      bv: float, k: float, vol_j: float, vol_f: float, dt: float, hv_j: float,
                      hv_f: float):
    r"""Head at a junction of several lines where one of them joins through a valve.

    The other line ends meet at the common head ``H`` (as :func:`junction`); the valve's
    line brings ``c_v`` and its face, at ``H_f = c_v - B_v (q + V_f/dt)``, passes ``q`` into
    the junction through ``H_f - H = k q|q|``. Continuity at the junction,

    .. math:: F(H) = \sum (c_j - H)/B_j + q(H) + V_J/\Delta t = 0,

    is monotone in ``H`` and solved by regula falsi (Illinois variant) on a bracket of the
    characteristics. A face below its vapour head holds a cavity (``H_f = H_v``,
    ``q = sign sqrt(|H_v - H|/k)``); a junction below its vapour head likewise
    (``H = H_v``, ``V_J' = V_J + dt (sum (H_v - c_j)/B_j - q)``).

    Returns
    -------
    (H, H_f, V_J', V_f')
    """
    shut = k == math.inf
    cve = cv - bv * vol_f / dt
    face_cav = False
    h = hv_j
    q = 0.0
    for attempt in range(2):  # the face as liquid first, then holding a cavity
        lo = min(c_lo, cve) - (vol_j / dt) / sum_inv_b - 1.0
        hi = max(c_hi, cve) + (vol_j / dt) / sum_inv_b + 1.0
        if face_cav:  # hv_f is finite here
            lo = min(lo, hv_f - 1.0)
            hi = max(hi, hv_f + 1.0)
        f_lo = 1.0
        f_hi = -1.0
        side = 0
        h = 0.5 * (lo + hi)
        for it in range(200):
            if it == 0:
                h = lo
            elif it == 1:
                h = hi
            else:
                h = (lo * f_hi - hi * f_lo) / (f_hi - f_lo)
            if face_cav:
                d = hv_f - h
                q = 0.0 if shut or k <= 0.0 else math.copysign(math.sqrt(abs(d) / k), d)
            else:
                d = cve - h
                q = 0.0 if shut else 2.0 * d / (bv + math.sqrt(bv * bv + 4.0 * k * abs(d)))
            f = sum_cb - h * sum_inv_b + q + vol_j / dt
            if it == 0:
                f_lo = f
                continue
            if it == 1:
                f_hi = f
                continue
            if f == 0.0 or hi - lo <= 1e-13 * (1.0 + abs(h)):
                break
            if f > 0.0:
                lo, f_lo = h, f
                if side == 1:
                    f_hi *= 0.5
                side = 1
            else:
                hi, f_hi = h, f
                if side == -1:
                    f_lo *= 0.5
                side = -1
        h_face = hv_f if face_cav else cve - bv * q
        if face_cav or shut or h_face >= hv_f:
            break
        face_cav = True
    v_j = 0.0
    if h < hv_j:
        h = hv_j
        if face_cav:
            d = hv_f - h
            q = 0.0 if shut or k <= 0.0 else math.copysign(math.sqrt(abs(d) / k), d)
        else:
            d = cve - h
            q = 0.0 if shut else 2.0 * d / (bv + math.sqrt(bv * bv + 4.0 * k * abs(d)))
        v_j = max(0.0, vol_j + dt * (h * sum_inv_b - sum_cb - q))
    h_face = hv_f if face_cav else cve - bv * q
    v_f = max(0.0, vol_f + dt * (q - (cv - h_face) / bv)) if face_cav else 0.0
    return h, h_face, v_j, v_f
