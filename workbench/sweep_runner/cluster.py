"""Sweeps on a Dask distributed cluster: an executor whose tasks run on the cluster's
workers, for sweeps that outgrow one machine.

Dask (``dask[distributed]``, the optional ``cluster`` extra) is the established engine for
this in the Python ecosystem; its client gives a :class:`concurrent.futures.Executor`
(``Client.get_executor``), which :func:`~workbench.sweep_runner.run.run_sweep` takes like
the local pool. Each task carries the project text and its case; each worker process keeps
the loaded project (:func:`~workbench.sweep_runner.case.cached_project`). The workers must
have the same version of ``workbench`` installed.
"""

from __future__ import annotations

from contextlib import contextmanager

__all__ = ["ClusterError", "cluster_executor"]

#: How long to wait for the scheduler to answer [s].
CONNECT_TIMEOUT = 20.0


class ClusterError(RuntimeError):
    """The cluster cannot be used: Dask is not installed or the scheduler does not answer."""


@contextmanager
def cluster_executor(address, *, timeout: float = CONNECT_TIMEOUT):
    """A :class:`concurrent.futures.Executor` running tasks on a Dask cluster.

    Parameters
    ----------
    address : str or distributed cluster
        The scheduler's address (``tcp://host:8786``, or ``host:8786``), or a cluster object
        such as ``distributed.LocalCluster``.
    timeout : float, optional
        Seconds to wait for the scheduler.

    Raises
    ------
    ClusterError
        When ``distributed`` is not installed or the scheduler cannot be reached.
    """
    try:
        from distributed import Client
    except ImportError:
        raise ClusterError(
            "running on a cluster needs Dask: pip install 'gravity-workbench[cluster]' "
            "(or pip install 'dask[distributed]')") from None
    try:
        client = Client(address, timeout=timeout, set_as_default=False)
    except (OSError, TimeoutError, ValueError) as exc:
        raise ClusterError(f"cannot reach the Dask scheduler at {address}: {exc}") from None
    try:
        yield client.get_executor(pure=False)
    finally:
        client.close()
