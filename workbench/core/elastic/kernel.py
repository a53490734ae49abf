"""The time march behind one interface: which kernel, and running it.

Two kernels give the same numbers to round-off (tested): numpy (:mod:`.numpy_march`,
always there) and a compiled one (:mod:`.compiled`, numba, an optional extra). Loading the
compiled kernel costs a fraction of a second per process (numba's start-up and its on-disk
cache), so ``"auto"`` keeps short runs on numpy until the compiled kernel is loaded. numba is
imported only when the compiled kernel is chosen, never on importing this package.
"""

from __future__ import annotations

import importlib.util
import math
import os

import numpy as np

from workbench.core.elastic.plan import MarchPlan
from workbench.core.elastic.record import MarchOutput

#: Kernel choices for :func:`workbench.core.elastic.simulate_elastic`.
KERNELS = ("auto", "compiled", "numpy")

#: Environment variable that overrides ``"auto"`` (``numpy`` or ``compiled``).
KERNEL_ENV = "WORKBENCH_KERNEL"

#: Node-updates (steps x nodes) from which ``"auto"`` takes the compiled kernel in a process
#: that has not loaded it yet. Loading it costs about 0.5-0.8 s, while numpy steps about
#: 60-110 M node-updates/s and the compiled kernel several hundred M/s (measured on the 2-core
#: build machine, ``tests/benchmarks/bench_elastic.py``): below about 50 M numpy finishes first.
AUTO_COMPILED_UPDATES = 50_000_000

#: Node-updates per call of the compiled kernel between progress reports and cancel polls.
CHUNK_UPDATES = 2_000_000

#: Progress reports (and cancel polls) over a run of the compiled kernel, at least [-].
PROGRESS_REPORTS = 32

_failure: str | None = None
_warm = False  # the compiled kernel has run in this process
_numba_found: bool | None = None  # looked up once, without importing numba


def numba_installed() -> bool:
    """True when numba can be imported (looked up without importing it)."""
    global _numba_found
    if _numba_found is None:
        _numba_found = importlib.util.find_spec("numba") is not None
    return _numba_found


def compiled_available() -> bool:
    """True when the compiled kernel can be used (numba present, no earlier failure in
    this process)."""
    return numba_installed() and _failure is None


def note_failure(exc: BaseException) -> None:
    """Record that compiling or running the compiled kernel failed: use numpy from now on."""
    global _failure
    _failure = f"{type(exc).__name__}: {exc}"


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
    if kernel == "compiled" and not (numba_installed() and _failure is None):
        return "numpy"
    return kernel


def run_compiled(plan: MarchPlan, out: MarchOutput, progress=None, cancel=None):
    """Drive the compiled march over the plan in chunks; returns ``(steps, cancelled)``."""
    global _warm
    from workbench.core.elastic import compiled  # numba loads here, and only here

    n, n_steps = plan.n, plan.n_steps
    fr, bd = plan.friction, plan.bounds
    x = np.ascontiguousarray(plan.state0, dtype=np.float64).copy()
    xn = np.empty_like(x)
    cav = bool(plan.cavities and plan.h_vap is not None)
    hv = plan.h_vap if cav else np.full(n, -math.inf)
    check = plan.h_vap if (plan.h_vap is not None and not cav and out.sep[0] < 0) \
        else np.zeros(0)
    inv2b = 0.5 / plan.b_node
    r2 = -fr.r * inv2b * inv2b  # as the numpy kernel forms it, so both round alike
    fric = (r2, bool(fr.quasi), fr.cphi, fr.clin, fr.re_per_q * inv2b, fr.rel_roughness,
            fr.fixed_f)
    rec = (out.events, out.first_open, out.last_close, out.v_max, out.v_max_step, out.sep)
    fixed = (bd.fixed_node, bd.fixed_in, bd.fixed_out, bd.fixed_head, bd.fixed_k_out,
             bd.fixed_k_in, bd.fixed_b, bd.fixed_valve)
    juncs = (bd.junction_ptr, bd.member_in, bd.member_out, bd.member_b, bd.junction_node)
    pairs = (bd.pair_node, bd.pair_in, bd.pair_out, bd.pair_b, bd.pair_valve)
    vjs = (bd.vj_ptr, bd.vj_in, bd.vj_out, bd.vj_b, bd.vj_node, bd.vj_face, bd.vj_face_b,
           bd.vj_valve)
    kappa = bd.kappa if bd.kappa.shape[0] else np.zeros((1, n_steps + 1))
    env = (out.h_max, out.h_min, out.h_max_pre, check, out.sep_head)
    chunk = max(64, min(CHUNK_UPDATES // max(n, 1), -(-n_steps // PROGRESS_REPORTS)))
    k, active = 0, 0
    while k < n_steps:
        m = min(chunk, n_steps - k)
        active = compiled.march(x, xn, k, m, plan.dt, inv2b, plan.b_node, fric,
                                cav, hv, plan.interior, out.vol, rec, fixed, juncs, pairs,
                                vjs, kappa, env, out.series, plan.series_nodes,
                                out.cavity_volume, active)
        k += m
        if not np.isfinite(x).all():  # keep it, so that the guard after the run sees it
            out.h_max[:] = np.nan
            break
        if progress is not None:
            progress(k / n_steps)
        if cancel is not None and cancel():
            _warm = True
            return k, True
    _warm = True
    return k, False


def run_march(plan: MarchPlan, kernel: str, notes: list[str], progress=None, cancel=None):
    """March the plan on the chosen kernel (numpy when the compiled one fails here).

    Returns ``(output, steps done, cancelled, kernel used)``.
    """
    from workbench.core.elastic.numpy_march import march_numpy

    used = choose_kernel(kernel, updates=float(plan.n_steps) * plan.n)
    out = MarchOutput.start(plan)
    if used == "compiled":
        try:
            steps, cancelled = run_compiled(plan, out, progress, cancel)
            return out, steps, cancelled, used
        except Exception as exc:  # numba could not compile or run it here: numpy instead
            note_failure(exc)
            notes.append(f"compiled kernel failed ({exc}); the numpy kernel was used")
            out.reset(plan)
            used = "numpy"
    steps, cancelled = march_numpy(plan, out, progress, cancel)
    return out, steps, cancelled, used
