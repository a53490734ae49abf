r"""The time march compiled by numba: the same equations as the numpy kernel, as loops.

numpy cannot do a step in fewer than about five array calls, and a call costs about a
microsecond whatever the array's length; at a few hundred nodes that overhead is most of the
work. Here the step is plain loops that numba compiles to machine code (cached on disk after
the first run, :mod:`.jit_cache`; GIL released so a UI thread stays live). The boundary conditions are the
functions of :mod:`workbench.core.elastic.boundaries`, compiled as they are.

This module imports numba, so it is imported only when the compiled kernel is chosen
(:mod:`workbench.core.elastic.kernel`); without numba everything runs on numpy.
"""

from __future__ import annotations

import math
import sys

import numpy as np

from workbench.core import friction as _friction
from workbench.core.elastic import boundaries as _bc
from workbench.core.elastic.jit_cache import cached_jit

# Cached on disk, keyed on this module and the two whose functions are compiled into it.
_jit = cached_jit(sys.modules[__name__], _bc, _friction)

_RE_LAMINAR = _friction.RE_LAMINAR
_RE_TURBULENT = _friction.RE_TURBULENT
_clamond_inv_sqrt_f = _jit(_friction._clamond_inv_sqrt_f)
fixed_end = _jit(_bc.fixed_end)
junction = _jit(_bc.junction)
valve_between = _jit(_bc.valve_between)
valve_at_junction = _jit(_bc.valve_at_junction)


@_jit
def friction_re_product_scalar(re: float, rr: float) -> float:
    """``phi = f*Re`` of the default friction method for one Reynolds number.

    The scalar twin of :func:`workbench.core.friction.friction_re_product` (laminar 64,
    a smooth blend over 2000-4000, Colebrook by Clamond's iteration above).
    """
    re = abs(re)
    rr = abs(rr)
    r = re if re > _RE_LAMINAR else _RE_LAMINAR
    y = _clamond_inv_sqrt_f(r, rr)
    fc = 1.0 / (y * y)
    s = (r - _RE_LAMINAR) / (_RE_TURBULENT - _RE_LAMINAR)
    s = 0.0 if s < 0.0 else (1.0 if s > 1.0 else s)
    wgt = s * s * (3.0 - 2.0 * s)
    return 64.0 + wgt * (fc * r - 64.0)


@_jit
def _track(node, v_new, k, vol, events, first_open, last_close, v_max, v_max_step, sep):
    """Record a cavity volume at a node (see ``MarchOutput.track_one``); the change in
    open cavities."""
    old = vol[node]
    vol[node] = v_new
    change = 0
    if old == 0.0 and v_new > 0.0:
        events[node] += 1
        if first_open[node] < 0:
            first_open[node] = k
        if sep[0] < 0 or (sep[0] == k and node < sep[1]):
            sep[0] = k
            sep[1] = node
        change = 1
    elif old > 0.0 and v_new == 0.0:
        last_close[node] = k
        change = -1
    if v_new > v_max[node]:
        v_max[node] = v_new
        v_max_step[node] = k
    return change


@_jit
def _reach_loss(x, n, inv2b, r2, quasi, cphi, clin, repq2, rr, fixed, loss):
    """Change of ``u`` over one reach at every node, ``-F(Q)`` [m] (``w`` changes by
    ``+F``), in the very order of operations of the numpy kernel so both round alike."""
    if not quasi:
        for i in range(n):
            d = x[i] - x[2 * n - 1 - i]  # u - w = 2BQ
            loss[i] = abs(d) * d * r2[i]
        return
    for i in range(n):
        d = x[i] - x[2 * n - 1 - i]
        q2 = d * inv2b[i]
        re2 = abs(d) * repq2[i]
        if fixed[i] == fixed[i]:  # not NaN: a fixed friction factor
            phi = fixed[i] * re2
        else:
            phi = friction_re_product_scalar(re2, rr[i])
        loss[i] = -(cphi[i] * phi + clin[i]) * q2 + r2[i] * (d * abs(d))


@_jit
def _ends(xn, k, dt, hv, vol, rec, fixed, juncs, pairs, kappa):
    """Every boundary condition of step ``k``; returns the change in open cavities."""
    f_node, f_in, f_out, f_head, f_kout, f_kin, f_b, f_valve = fixed
    ptr, m_in, m_out, m_b, j_node = juncs
    p_node, p_in, p_out, p_b, p_valve = pairs
    events, first_open, last_close, v_max, v_max_step, sep = rec
    change = 0
    for e in range(f_node.shape[0]):
        p = f_node[e]
        kv = 0.0 if f_valve[e] < 0 else kappa[f_valve[e], k]
        c = xn[f_in[e]]
        h, v = fixed_end(c, f_b[e], f_head[e], f_kout[e] + kv, f_kin[e] + kv, vol[p], dt,
                         hv[p])
        xn[f_out[e]] = 2.0 * h - c
        if v > 0.0 or vol[p] > 0.0:
            change += _track(p, v, k, vol, events, first_open, last_close, v_max,
                             v_max_step, sep)
    for j in range(ptr.shape[0] - 1):
        p = j_node[j]
        sum_cb = 0.0
        inv = 0.0
        for s in range(ptr[j], ptr[j + 1]):
            sum_cb += xn[m_in[s]] / m_b[s]
            inv += 1.0 / m_b[s]
        h, v = junction(sum_cb, inv, vol[p], dt, hv[p])
        for s in range(ptr[j], ptr[j + 1]):
            xn[m_out[s]] = 2.0 * h - xn[m_in[s]]
        if v > 0.0 or vol[p] > 0.0:
            change += _track(p, v, k, vol, events, first_open, last_close, v_max,
                             v_max_step, sep)
    for e in range(p_valve.shape[0]):
        p1 = p_node[e, 0]
        p2 = p_node[e, 1]
        c1 = xn[p_in[e, 0]]
        c2 = xn[p_in[e, 1]]
        h1, h2, v1, v2 = valve_between(c1, p_b[e, 0], c2, p_b[e, 1], kappa[p_valve[e], k],
                                       vol[p1], vol[p2], dt, hv[p1], hv[p2])
        xn[p_out[e, 0]] = 2.0 * h1 - c1
        xn[p_out[e, 1]] = 2.0 * h2 - c2
        if v1 > 0.0 or vol[p1] > 0.0:
            change += _track(p1, v1, k, vol, events, first_open, last_close, v_max,
                             v_max_step, sep)
        if v2 > 0.0 or vol[p2] > 0.0:
            change += _track(p2, v2, k, vol, events, first_open, last_close, v_max,
                             v_max_step, sep)
    return change


@_jit
def _valve_junctions(xn, k, dt, hv, vol, rec, vjs, kappa):
    """Junctions where one line joins through a valve; the change in open cavities."""
    ptr, m_in, m_out, m_b, j_node, face, face_b, valve = vjs
    events, first_open, last_close, v_max, v_max_step, sep = rec
    change = 0
    for j in range(ptr.shape[0] - 1):
        p = j_node[j]
        pf = face[j, 0]
        sum_cb = 0.0
        inv = 0.0
        c_lo = math.inf
        c_hi = -math.inf
        for s in range(ptr[j], ptr[j + 1]):
            c = xn[m_in[s]]
            sum_cb += c / m_b[s]
            inv += 1.0 / m_b[s]
            c_lo = min(c_lo, c)
            c_hi = max(c_hi, c)
        cv = xn[face[j, 1]]
        vj = vol[p]
        vf = vol[pf]
        h, hf, vjn, vfn = valve_at_junction(sum_cb, inv, c_lo, c_hi, cv, face_b[j],
                                            kappa[valve[j], k], vj, vf, dt, hv[p], hv[pf])
        for s in range(ptr[j], ptr[j + 1]):
            xn[m_out[s]] = 2.0 * h - xn[m_in[s]]
        xn[face[j, 2]] = 2.0 * hf - cv
        if vjn > 0.0 or vj > 0.0:
            change += _track(p, vjn, k, vol, events, first_open, last_close, v_max,
                             v_max_step, sep)
        if vfn > 0.0 or vf > 0.0:
            change += _track(pf, vfn, k, vol, events, first_open, last_close, v_max,
                             v_max_step, sep)
    return change


@_jit
def march(x, xn, k0, m, dt, inv2b, b, fric, cav, hv, interior, vol, rec, fixed, juncs,
          pairs, vjs, kappa, env, series, snodes, cav_volume, active):
    """March ``m`` steps from step ``k0``; ``x`` holds the state before and after.

    Returns the number of nodes holding a cavity at the end.
    """
    n = b.shape[0]
    r2, quasi, cphi, clin, repq2, rr, fixed_f = fric
    h_max, h_min, h_max_pre, h_vap_check, sep_head = env
    events, first_open, last_close, v_max, v_max_step, sep = rec
    x0 = x
    loss = np.empty(n)
    heads = np.empty(n)
    for j in range(m):
        k = k0 + j + 1
        _reach_loss(x, n, inv2b, r2, quasi, cphi, clin, repq2, rr, fixed_f, loss)
        for i in range(1, n):  # u carried one node downstream
            xn[i] = x[i - 1] + loss[i - 1]
        for p in range(n - 1):  # w carried one node upstream
            xn[2 * n - 1 - p] = x[2 * n - 2 - p] - loss[p + 1]
        for i in range(n):
            heads[i] = 0.5 * (xn[i] + xn[2 * n - 1 - i])
        if cav:  # interior sections: a junction of two equal B (boundaries.junction)
            for i in range(n):
                h = heads[i] - vol[i] * (b[i] / (2.0 * dt))
                if (h < hv[i] or vol[i] > 0.0) and interior[i]:
                    u = xn[i]
                    w = xn[2 * n - 1 - i]
                    v_new = 0.0
                    if h < hv[i]:
                        h = hv[i]
                        v_new = vol[i] + dt * (2.0 * hv[i] - u - w) * (1.0 / b[i])
                    xn[i] = 2.0 * h - w
                    xn[2 * n - 1 - i] = 2.0 * h - u
                    heads[i] = h
                    active += _track(i, v_new, k, vol, events, first_open, last_close, v_max,
                                     v_max_step, sep)
        active += _ends(xn, k, dt, hv, vol, rec, fixed, juncs, pairs, kappa)
        active += _valve_junctions(xn, k, dt, hv, vol, rec, vjs, kappa)
        for i in range(n):  # line ends: the boundaries set their heads
            if not interior[i]:
                heads[i] = 0.5 * (xn[i] + xn[2 * n - 1 - i])
        if sep[0] == k and cav:
            for i in range(n):
                h_max_pre[i] = h_max[i]
        for i in range(n):
            h_max[i] = max(h_max[i], heads[i])
            h_min[i] = min(h_min[i], heads[i])
        if not cav and h_vap_check.shape[0] == n and sep[0] < 0:
            worst = math.inf
            node = -1
            for i in range(n):
                d = heads[i] - h_vap_check[i]
                if d <= 0.0 and d < worst:
                    worst = d
                    node = i
            if node >= 0:
                sep[0] = k
                sep[1] = node
                sep_head[0] = heads[node]
        for s in range(snodes.shape[0]):
            series[k, s] = heads[snodes[s]]
        if cav:
            total = 0.0
            if active > 0:
                for i in range(n):
                    total += vol[i]
            cav_volume[k] = total
        x, xn = xn, x
    if m % 2 == 1:  # the latest state is in the caller's work array
        for i in range(2 * n):
            x0[i] = x[i]
    return active
