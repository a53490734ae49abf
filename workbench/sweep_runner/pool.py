"""The local process pool a sweep runs on by default: how its workers start (warm, and
safely from a threaded app) and a usable stderr while they do."""

from __future__ import annotations

import os
import sys
from contextlib import contextmanager

__all__ = ["CASE_MODULES", "local_pool", "pool_context", "stderr_is_real"]

#: Modules every case needs; imported before worker processes start so that they start warm.
CASE_MODULES = (
    "workbench.project.document",
    "workbench.core.network",
    "workbench.core.transient",
    "workbench.core.elastic",
    "workbench.output.steady",
    "workbench.output.transient",
    "workbench.output.elastic",
    "workbench.output.simulate_json",
    "workbench.sweep_runner",
)


def stderr_is_real() -> bool:
    """Whether ``sys.stderr`` has a real file descriptor."""
    try:
        return sys.stderr is not None and sys.stderr.fileno() >= 0
    except (AttributeError, OSError, ValueError):
        return False


@contextmanager
def _usable_stderr():
    """A real stderr while worker processes start.

    multiprocessing hands ``sys.stderr.fileno()`` to its helper processes; a full-screen
    app (Textual) replaces stderr by an object whose fileno is -1, and starting the pool
    would then fail with "bad value(s) in fds_to_keep".
    """
    if stderr_is_real():
        yield
        return
    saved = sys.stderr
    with open(os.devnull, "w") as null:
        sys.stderr = null
        try:
            yield
        finally:
            sys.stderr = saved


def _quiet_worker(quiet: bool) -> None:
    """Worker start-up: ``quiet`` sends the worker's own stderr to the null device (under a
    full-screen app a stray warning printed by a worker would land in the middle of the
    screen)."""
    if quiet:
        devnull = os.open(os.devnull, os.O_WRONLY)
        os.dup2(devnull, 2)
        os.close(devnull)


def pool_context():
    """How worker processes start.

    From a single-threaded process (the CLI), ``fork``: the workers inherit the modules
    already imported (and the base project already loaded) and start at once. From a
    threaded one (the app runs sweeps in a worker thread, where forking is unsafe),
    ``forkserver`` with the case modules preloaded, so each worker forks from one warm
    server instead of importing scipy and the rest again.
    """
    import importlib
    import multiprocessing
    import threading

    methods = multiprocessing.get_all_start_methods()
    if "fork" in methods and threading.active_count() == 1:
        for name in CASE_MODULES:
            importlib.import_module(name)
        return multiprocessing.get_context("fork")
    if "forkserver" in methods:
        ctx = multiprocessing.get_context("forkserver")
        ctx.set_forkserver_preload(list(CASE_MODULES))
        return ctx
    return multiprocessing.get_context("spawn")


@contextmanager
def local_pool(max_workers: int, context):
    """A :class:`~concurrent.futures.ProcessPoolExecutor` of ``max_workers`` processes
    started by ``context`` (from :func:`pool_context`); shut down on leaving."""
    from concurrent.futures import ProcessPoolExecutor

    quiet = not stderr_is_real()
    with _usable_stderr(), ProcessPoolExecutor(
        max_workers=max(1, max_workers), mp_context=context,
        initializer=_quiet_worker, initargs=(quiet,),
    ) as pool:
        yield pool
