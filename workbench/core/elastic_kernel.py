r"""The time-stepping kernel of the elastic surge model, compiled when numba is installed.

:mod:`workbench.core.elastic` sets up the grid, the ends and the friction coefficients; this
module marches the two characteristic variables ``u = H + BQ`` and ``w = H - BQ`` through
``m`` time steps. With a Courant number of one every interior node takes ``u`` from its
upstream neighbour and ``w`` from its downstream one, each less (or plus) the friction loss
of one reach (Wylie & Streeter, *Fluid Transients in Systems*, 1993, ch. 3):

.. math::

    u_i^{k+1} = u_{i-1}^k - F(Q_{i-1}^k),\qquad w_i^{k+1} = w_{i+1}^k + F(Q_{i+1}^k),

    F(Q) = (c_\phi\,\phi(Re) + c_{lin})\,Q + R\,Q|Q|,\qquad Q = (u - w)/(2B),

then the ends and junctions solve ``B Q + K Q|Q| = \Delta`` for their flow. The same pass
keeps the envelope (highest and lowest head at every node), the recorded series and the
first step at which any head reaches the vapour head.

numpy alone cannot do a step in fewer than about five array calls, and a call costs about a
microsecond whatever the array's length; at a few hundred nodes that overhead is most of the
work. :func:`march` is therefore written as plain loops that numba compiles to machine code
(cached on disk after the first run, and releasing the GIL so a UI thread stays live).
Loading it costs a fraction of a second per process, so :func:`choose_kernel` keeps short
runs on :mod:`workbench.core.elastic`'s own vectorised numpy stepping until the compiled
kernel is loaded; numpy is also used when numba is missing or ``WORKBENCH_KERNEL=numpy`` is
set. Both give the same numbers to round-off (tested).
"""

from __future__ import annotations

import math
import os

import numpy as np

from workbench.core import friction as _friction

#: Kernel choices for :func:`workbench.core.elastic.simulate_elastic`.
KERNELS = ("auto", "compiled", "numpy")

#: Environment variable that overrides ``"auto"`` (``numpy`` or ``compiled``).
KERNEL_ENV = "WORKBENCH_KERNEL"

_RE_LAMINAR = _friction.RE_LAMINAR
_RE_TURBULENT = _friction.RE_TURBULENT



def _make_jit():
    """numba's ``njit`` (cached, GIL released), or ``None`` without numba or when told not to."""
    if os.environ.get(KERNEL_ENV, "").strip().lower() == "numpy":
        return None
    try:
        import numba
    except Exception:  # not installed, or broken against this numpy
        return None
    return numba.njit(cache=True, nogil=True)


_JIT = _make_jit()


def _compiled(func):
    """Compile ``func`` when numba is here; otherwise leave the plain function."""
    return func if _JIT is None else _JIT(func)


# Colebrook's 1/sqrt(f) by Clamond's iteration, the very function the array path uses
# (plain arithmetic and np.log, which numba compiles for scalars as well as arrays)
_clamond_inv_sqrt_f = _compiled(_friction._clamond_inv_sqrt_f)


@_compiled
def friction_re_product_scalar(re: float, rr: float) -> float:
    """``phi = f*Re`` of the default friction method for one Reynolds number.

    The scalar twin of :func:`workbench.core.friction.friction_re_product` (laminar 64,
    a smooth blend over 2000-4000, Colebrook by Clamond's iteration above), so that numba
    can compile it into :func:`march`.
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


@_compiled
def _end_flow(b: float, k: float, delta: float) -> float:
    """Root of ``b Q + k Q|Q| = delta`` in the stable form; ``k = inf`` gives no flow."""
    if k == math.inf:
        return 0.0
    return 2.0 * delta / (b + math.sqrt(b * b + 4.0 * k * abs(delta)))


@_compiled
def march(u, w, un, wn, k0, m, inv2b, b, r, cphi, clin, repq, rr, fixed, quasi,
          bcode, bhead, bkf, bkb, bb1, bb2, bnode, kappa, h_max, h_min, series, snodes,
          h_vap, check_vap, sep_step, sep_head):
    """March ``m`` steps from step ``k0``; ``u`` and ``w`` hold the state before and after.

    Parameters (all SI; arrays over the ``n`` grid nodes unless said)
    ----------
    u, w : the state ``H + BQ`` and ``H - BQ`` [m], updated in place.
    un, wn : work arrays of ``n`` floats.
    k0, m : index of the step already held, and how many steps to take.
    inv2b, b : ``1/(2B)`` [m^2/s] and ``B = a/(gA)`` [s/m^2] per node.
    r : ``R`` per reach [s^2/m^5]; cphi, clin : the quasi-steady linear coefficients.
    repq, rr, fixed : Reynolds number per unit flow, eps/D, and a fixed f (NaN: none).
    quasi : true to update ``phi = f Re`` at every node and step.
    bcode .. bnode : one entry per connection: 0 downstream fixed head, 1 downstream dead
        end, 2 upstream fixed head, 3 upstream dead end, 4 junction; its head, forward and
        backward loss coefficients, ``B`` on each side, and its node (for a junction, the
        last node of the upstream line).
    kappa : (connections, steps + 1) valve loss coefficient ``K/(2gA^2)`` in time.
    h_max, h_min : envelope [m], updated. series, snodes : the recorded heads (rows are
        steps) and the nodes recorded. h_vap, check_vap : vapour head per node, and whether
        to look for it. sep_step, sep_head : one-element outputs, the first step and node
        (``[step, node]``) where the head reached the vapour head, and that head.
    """
    n = u.shape[0]
    nconn = bcode.shape[0]
    ns = snodes.shape[0]
    u0 = u
    w0 = w
    loss = np.empty(n)
    for j in range(m):
        k = k0 + j + 1
        # loss of one reach at every node, from the flow there (simple loops, so that the
        # compiler can vectorise them)
        if quasi:
            for i in range(n):
                q = (u[i] - w[i]) * inv2b[i]
                re = abs(q) * repq[i]
                if fixed[i] == fixed[i]:  # not NaN: a fixed friction factor
                    phi = fixed[i] * re
                else:
                    phi = friction_re_product_scalar(re, rr[i])
                loss[i] = r[i] * q * abs(q) + (cphi[i] * phi + clin[i]) * q
        else:
            for i in range(n):
                q = (u[i] - w[i]) * inv2b[i]
                loss[i] = r[i] * q * abs(q)
        # interior: u carried one node downstream, w one node upstream
        for i in range(1, n):
            un[i] = u[i - 1] - loss[i - 1]
        for i in range(n - 1):
            wn[i] = w[i + 1] + loss[i + 1]
        # ends and junctions
        for c in range(nconn):
            code = bcode[c]
            p = bnode[c]
            kv = kappa[c, k]
            if code == 0:  # downstream fixed head: C_P known, set w
                cp = un[p]
                delta = cp - bhead[c]
                kk = (bkf[c] if delta >= 0.0 else bkb[c]) + kv
                wn[p] = cp - 2.0 * bb1[c] * _end_flow(bb1[c], kk, delta)
            elif code == 2:  # upstream fixed head: C_M known, set u
                cm = wn[p]
                delta = bhead[c] - cm
                kk = (bkf[c] if delta >= 0.0 else bkb[c]) + kv
                un[p] = cm + 2.0 * bb1[c] * _end_flow(bb1[c], kk, delta)
            elif code == 1:  # downstream dead end
                wn[p] = un[p]
            elif code == 3:  # upstream dead end
                un[p] = wn[p]
            else:  # junction of two lines, with a valve's loss if one sits there
                cp = un[p]
                cm = wn[p + 1]
                bs = bb1[c] + bb2[c]
                q = _end_flow(bs, kv, cp - cm)
                wn[p] = cp - 2.0 * bb1[c] * q
                un[p + 1] = cm + 2.0 * bb2[c] * q
        # heads: envelope, series, vapour check (a min-reduction first, which vectorises;
        # the node is looked for only in the rare step where the vapour head is reached)
        lowest = math.inf
        if check_vap:
            for i in range(n):
                h = (un[i] + wn[i]) * 0.5
                h_max[i] = max(h_max[i], h)
                h_min[i] = min(h_min[i], h)
                lowest = min(lowest, h - h_vap[i])
        else:
            for i in range(n):
                h = (un[i] + wn[i]) * 0.5
                h_max[i] = max(h_max[i], h)
                h_min[i] = min(h_min[i], h)
        worst_node = -1
        if check_vap and lowest <= 0.0:
            worst = math.inf
            for i in range(n):
                d = (un[i] + wn[i]) * 0.5 - h_vap[i]
                if d < worst:
                    worst = d
                    worst_node = i
        for s in range(ns):
            i = snodes[s]
            series[k, s] = (un[i] + wn[i]) * 0.5
        if check_vap and worst_node >= 0:
            # numpy path's rule: the first step with any node at vapour head, and there the
            # node furthest below it
            sep_step[0] = k
            sep_step[1] = worst_node
            sep_head[0] = (un[worst_node] + wn[worst_node]) * 0.5
            check_vap = False
        u, un = un, u
        w, wn = wn, w
    if m % 2 == 1:  # the latest state is in the caller's work arrays
        for i in range(n):
            u0[i] = u[i]
            w0[i] = w[i]


_failure: str | None = None


def compiled_available() -> bool:
    """True when :func:`march` is compiled (numba present, not switched off, no failure)."""
    return _JIT is not None and _failure is None


def note_failure(exc: BaseException) -> None:
    """Record that compiling or running the compiled kernel failed: use numpy from now on."""
    global _failure
    _failure = f"{type(exc).__name__}: {exc}"


#: Node-updates (steps x nodes) from which ``"auto"`` takes the compiled kernel in a process
#: that has not loaded it yet. Loading it costs about 0.5-0.8 s (numba's start-up and the
#: on-disk cache; about 2 s the very first time, to compile), while numpy steps 60-110 M
#: node-updates/s and the compiled kernel about 900 M/s (measured on the 2-core build
#: machine, ``tests/benchmarks/bench_elastic.py``): below about 50 M numpy finishes first.
AUTO_COMPILED_UPDATES = 50_000_000

_warm = False  # the compiled kernel has run in this process


def choose_kernel(kernel: str = "auto", updates: float = math.inf) -> str:
    """Resolve a kernel choice to ``"compiled"`` or ``"numpy"``.

    ``"auto"`` follows the :data:`KERNEL_ENV` environment variable when it says
    ``compiled`` or ``numpy``; otherwise it takes the compiled kernel once it is loaded in
    this process, or for a run of at least :data:`AUTO_COMPILED_UPDATES` node-updates.
    Without numba (or after a compile failure) every choice gives ``"numpy"``.
    """
    if kernel not in KERNELS:
        raise ValueError(f"unknown kernel {kernel!r}; known: {', '.join(KERNELS)}")
    if kernel == "auto":
        env = os.environ.get(KERNEL_ENV, "").strip().lower()
        if env in ("compiled", "numpy"):
            kernel = env
        else:
            kernel = "compiled" if _warm or updates >= AUTO_COMPILED_UPDATES else "numpy"
    if kernel == "compiled" and not compiled_available():
        return "numpy"
    return kernel


def _mark_warm() -> None:
    global _warm
    _warm = True


def as_float_array(values) -> np.ndarray:
    """A contiguous float64 copy for the kernel."""
    return np.ascontiguousarray(values, dtype=np.float64)


#: Node-updates per call of the compiled kernel between progress reports and cancel polls.
CHUNK_UPDATES = 2_000_000

#: Progress reports (and cancel polls) over a run of the compiled kernel, at least [-].
PROGRESS_REPORTS = 32


def run_compiled(h_init, b_node, q0, r_node, quasi, bounds, kappa_t, n_steps, h_max, h_min,
                 series, series_nodes, h_vap, progress=None, cancel=None):
    """Drive the compiled :func:`march` over ``n_steps`` steps, in chunks.

    ``bounds`` is the list of connection tuples built by
    :mod:`workbench.core.elastic` ``(code, head, k_forward, k_backward, b1, b2, kappa,
    node, _)`` and ``kappa_t`` maps a connection index to its valve coefficient over the
    steps. ``h_max``, ``h_min`` and ``series`` are filled in place.

    Returns
    -------
    tuple
        ``(steps done, cancelled, sep)`` with ``sep`` ``None`` or ``(step, node, head)``
        for the first step at which a head reached the vapour head.
    """
    n = len(h_init)
    f = as_float_array
    b = f(b_node)
    u = f(h_init + b * q0)
    w = f(h_init - b * q0)
    un = np.empty(n)
    wn = np.empty(n)
    inv2b = 0.5 / b
    r = f(r_node)
    if quasi is None:
        zeros = np.zeros(n)
        cphi = clin = repq = rr = fixed = zeros
        is_quasi = False
    else:
        cphi, clin, repq, rr, fixed = (f(x) for x in quasi)
        is_quasi = True
    nconn = len(bounds)
    bcode = np.array([bd[0] for bd in bounds], dtype=np.int64)
    bhead = f([bd[1] for bd in bounds])
    bkf = f([bd[2] for bd in bounds])
    bkb = f([bd[3] for bd in bounds])
    bb1 = f([bd[4] for bd in bounds])
    bb2 = f([bd[5] for bd in bounds])
    bnode = np.array([bd[7] for bd in bounds], dtype=np.int64)
    kappa = np.zeros((nconn, n_steps + 1))
    for conn, values in kappa_t.items():
        kappa[conn] = values
    snodes = np.array(series_nodes, dtype=np.int64)
    check_vap = h_vap is not None
    hv = f(h_vap) if check_vap else np.zeros(n)
    sep_step = np.array([-1, -1], dtype=np.int64)
    sep_head = np.zeros(1)
    # at most CHUNK_UPDATES per call, and at least PROGRESS_REPORTS reports over the run
    chunk = max(64, min(CHUNK_UPDATES // max(n, 1), -(-n_steps // PROGRESS_REPORTS)))
    k = 0
    cancelled = False
    while k < n_steps:
        m = min(chunk, n_steps - k)
        march(u, w, un, wn, k, m, inv2b, b, r, cphi, clin, repq, rr, fixed,
              is_quasi, bcode, bhead, bkf, bkb, bb1, bb2, bnode, kappa, h_max, h_min, series,
              snodes, hv, check_vap and sep_step[0] < 0, sep_step, sep_head)
        k += m
        if progress is not None:
            progress(k / n_steps)
        if cancel is not None and cancel():
            cancelled = True
            break
    _mark_warm()
    sep = None if sep_step[0] < 0 else (int(sep_step[0]), int(sep_step[1]), float(sep_head[0]))
    return k, cancelled, sep
