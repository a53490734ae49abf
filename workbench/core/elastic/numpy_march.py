r"""The time march in numpy: interior nodes vectorised, boundaries as scalar calls.

Interior nodes (Courant number one, Wylie & Streeter, *Fluid Transients in Systems*, 1993,
ch. 3): ``u`` is carried one node downstream and ``w`` one node upstream, each corrected by
the loss of one reach ``F(Q)`` with ``Q = (u - w)/(2B)``:

.. math:: u_i^{k+1} = u_{i-1}^k - F(Q_{i-1}^k),\qquad w_i^{k+1} = w_{i+1}^k + F(Q_{i+1}^k)

With ``w`` stored reversed after ``u`` this is one shifted add over ``X``; the boundaries
(:mod:`workbench.core.elastic.boundaries`) then overwrite the line ends. Steps are taken in
blocks whose rows double as the record from which the envelope is taken.
"""

from __future__ import annotations

import math

import numpy as np

from workbench.core.elastic import boundaries as bc
from workbench.core.elastic.plan import MarchPlan
from workbench.core.elastic.record import MarchOutput

#: Steps per block before the envelope, series and vapour check are updated [-].
BLOCK = 256


class _Stepper:
    """The per-step work of the numpy kernel over one plan (arrays made once)."""

    def __init__(self, plan: MarchPlan, out: MarchOutput):
        self.plan = plan
        self.out = out
        n = plan.n
        self.n = n
        fr = plan.friction
        b2 = np.concatenate([plan.b_node, plan.b_node[::-1]])
        self.inv2b2 = 0.5 / b2
        self.r2 = -np.concatenate([fr.r, fr.r[::-1]]) * self.inv2b2 * self.inv2b2
        self.quasi = fr.quasi
        if fr.quasi:
            def both(a):
                return np.concatenate([a, a[::-1]])
            self.cphi2, self.clin2 = both(fr.cphi), both(fr.clin)
            self.repq2 = both(fr.re_per_q) * self.inv2b2
            self.rr2, self.fixed2 = both(fr.rel_roughness), both(fr.fixed_f)
            self.has_fixed = bool(np.isfinite(self.fixed2).any())
        self.frictionless = not fr.quasi and not np.any(fr.r)
        self.d_buf = np.empty(2 * n)
        self.e_buf = np.empty(2 * n)
        cav = plan.cavities and plan.h_vap is not None
        self.cav = cav
        hv = plan.h_vap if cav else np.full(n, -math.inf)
        self.hv = hv
        self.hv_interior = np.where(plan.interior, hv, -math.inf)
        self.bdt2 = plan.b_node / (2.0 * plan.dt)
        self.invb = 1.0 / plan.b_node
        self.mask = np.zeros(n, dtype=bool)
        self.active = 0  # nodes holding a cavity
        bd = plan.bounds
        self.fixed = list(zip(bd.fixed_node.tolist(), bd.fixed_in.tolist(),
                              bd.fixed_out.tolist(), bd.fixed_head.tolist(),
                              bd.fixed_k_out.tolist(), bd.fixed_k_in.tolist(),
                              bd.fixed_b.tolist(), bd.fixed_valve.tolist()))
        ptr = bd.junction_ptr.tolist()
        self.juncs = []
        for j in range(len(ptr) - 1):
            members = list(zip(bd.member_in[ptr[j]:ptr[j + 1]].tolist(),
                               bd.member_out[ptr[j]:ptr[j + 1]].tolist(),
                               bd.member_b[ptr[j]:ptr[j + 1]].tolist()))
            inv = sum(1.0 / b for _, _, b in members)
            self.juncs.append((int(bd.junction_node[j]), members, inv))
        self.pairs = [(tuple(bd.pair_node[i].tolist()), tuple(bd.pair_in[i].tolist()),
                       tuple(bd.pair_out[i].tolist()), tuple(bd.pair_b[i].tolist()),
                       int(bd.pair_valve[i])) for i in range(len(bd.pair_valve))]
        self.kappa = [row.tolist() for row in bd.kappa]
        vp = bd.vj_ptr.tolist()
        self.valve_juncs = []
        for j in range(len(vp) - 1):
            members = list(zip(bd.vj_in[vp[j]:vp[j + 1]].tolist(),
                               bd.vj_out[vp[j]:vp[j + 1]].tolist(),
                               bd.vj_b[vp[j]:vp[j + 1]].tolist()))
            inv = sum(1.0 / b for _, _, b in members)
            self.valve_juncs.append((int(bd.vj_node[j]), members, inv,
                                     tuple(bd.vj_face[j].tolist()), float(bd.vj_face_b[j]),
                                     int(bd.vj_valve[j])))
        self.hv_list = hv.tolist()

    def interior(self, cur: np.ndarray, cur_rev: np.ndarray, new_tail: np.ndarray,
                 cur_head: np.ndarray) -> None:
        """Shift ``u`` downstream and ``w`` upstream with the loss of one reach."""
        if self.frictionless:
            new_tail[:] = cur_head
            return
        d, e = self.d_buf, self.e_buf
        np.subtract(cur, cur_rev, out=d)
        if not self.quasi:
            np.abs(d, out=e)
            np.multiply(e, d, out=e)
            np.multiply(e, self.r2, out=e)
        else:
            from workbench.core.friction import friction_re_product

            q2 = d * self.inv2b2
            re2 = np.abs(d) * self.repq2
            phi, _ = friction_re_product(re2, self.rr2)
            if self.has_fixed:
                phi = np.where(np.isfinite(self.fixed2), self.fixed2 * re2, phi)
            e[:] = -(self.cphi2 * phi + self.clin2) * q2
            np.multiply(d, np.abs(d), out=d)
            e += self.r2 * d
        np.add(cur_head, e[:-1], out=new_tail)

    def interior_cavities(self, new: np.ndarray, k: int):
        """Discrete vapour cavities at interior sections (a junction of two equal ``B``).

        Returns ``(nodes, heads)`` where the head is not ``(u + w)/2``, or ``None``.
        """
        n, vol = self.n, self.out.vol
        u = new[:n]
        w = new[n:][::-1]
        hn = (u + w) * 0.5
        if self.active:
            hn -= vol * self.bdt2
        np.less(hn, self.hv_interior, out=self.mask)
        if self.active:
            self.mask |= (vol > 0.0) & self.plan.interior
        if not self.mask.any():
            return None
        idx = np.flatnonzero(self.mask)
        ui, wi, hi, hvi = u[idx], w[idx], hn[idx], self.hv[idx]
        cav = hi < hvi
        h = np.where(cav, hvi, hi)
        v_new = np.where(cav, vol[idx] + self.plan.dt * (2.0 * hvi - ui - wi) * self.invb[idx],
                         0.0)
        new[idx] = 2.0 * h - wi
        new[2 * n - 1 - idx] = 2.0 * h - ui
        self.active += self.out.track_many(idx, v_new, k)
        return idx, h

    def ends(self, new: np.ndarray, k: int) -> None:
        """Every boundary condition for step ``k``."""
        out, dt, hv, vol = self.out, self.plan.dt, self.hv_list, self.out.vol
        for node, s_in, s_out, head, k_out, k_in, b, valve in self.fixed:
            kv = 0.0 if valve < 0 else self.kappa[valve][k]
            c = new.item(s_in)
            h, v = bc.fixed_end(c, b, head, k_out + kv, k_in + kv, vol.item(node), dt, hv[node])
            new[s_out] = 2.0 * h - c
            if v > 0.0 or vol.item(node) > 0.0:
                self.active += out.track_one(node, v, k)
        for node, members, inv in self.juncs:
            sum_cb = 0.0
            for s_in, _, b in members:
                sum_cb += new.item(s_in) / b
            h, v = bc.junction(sum_cb, inv, vol.item(node), dt, hv[node])
            for s_in, s_out, _ in members:
                new[s_out] = 2.0 * h - new.item(s_in)
            if v > 0.0 or vol.item(node) > 0.0:
                self.active += out.track_one(node, v, k)
        for node, members, inv, (pf, fin, fout), bf, valve in self.valve_juncs:
            sum_cb, c_lo, c_hi = 0.0, math.inf, -math.inf
            for s_in, _, b in members:
                c = new.item(s_in)
                sum_cb += c / b
                c_lo, c_hi = min(c_lo, c), max(c_hi, c)
            cv = new.item(fin)
            vj, vf = vol.item(node), vol.item(pf)
            h, hf, vjn, vfn = bc.valve_at_junction(sum_cb, inv, c_lo, c_hi, cv, bf,
                                                   self.kappa[valve][k], vj, vf, dt, hv[node],
                                                   hv[pf])
            for s_in, s_out, _ in members:
                new[s_out] = 2.0 * h - new.item(s_in)
            new[fout] = 2.0 * hf - cv
            if vjn > 0.0 or vj > 0.0:
                self.active += out.track_one(node, vjn, k)
            if vfn > 0.0 or vf > 0.0:
                self.active += out.track_one(pf, vfn, k)
        for (p1, p2), (i1, i2), (o1, o2), (b1, b2), valve in self.pairs:
            c1, c2 = new.item(i1), new.item(i2)
            v1, v2 = vol.item(p1), vol.item(p2)
            h1, h2, v1n, v2n = bc.valve_between(c1, b1, c2, b2, self.kappa[valve][k], v1, v2,
                                                dt, hv[p1], hv[p2])
            new[o1] = 2.0 * h1 - c1
            new[o2] = 2.0 * h2 - c2
            if v1n > 0.0 or v1 > 0.0:
                self.active += out.track_one(p1, v1n, k)
            if v2n > 0.0 or v2 > 0.0:
                self.active += out.track_one(p2, v2n, k)


def march_numpy(plan: MarchPlan, out: MarchOutput, progress=None, cancel=None):
    """March ``plan.n_steps`` steps, filling ``out``; returns ``(steps done, cancelled)``."""
    n, n_steps = plan.n, plan.n_steps
    st = _Stepper(plan, out)
    xb = np.empty((BLOCK + 1, 2 * n))
    xb[0] = plan.state0
    rows = [xb[j] for j in range(BLOCK + 1)]
    rows_rev = [row[::-1] for row in rows]
    rows_head = [row[:-1] for row in rows]
    rows_tail = [row[1:] for row in rows]
    k_step = 0
    while k_step < n_steps:
        m = min(BLOCK, n_steps - k_step)
        patches = []
        for j in range(m):
            k = k_step + j + 1
            new = rows[j + 1]
            st.interior(rows[j], rows_rev[j], rows_tail[j + 1], rows_head[j])
            if st.cav:
                patch = st.interior_cavities(new, k)
                if patch is not None:
                    patches.append((j, patch))
            st.ends(new, k)
            if st.cav:
                out.cavity_volume[k] = float(out.vol.sum()) if st.active else 0.0
        hb = xb[1:m + 1, :n] + xb[1:m + 1, n:][:, ::-1]
        hb *= 0.5
        for j, (idx, h) in patches:
            hb[j, idx] = h
        out.take_block(hb, k_step, plan)
        xb[0] = xb[m]
        k_step += m
        if progress is not None:
            progress(k_step / n_steps)
        if cancel is not None and cancel():
            return k_step, True
    return k_step, False
