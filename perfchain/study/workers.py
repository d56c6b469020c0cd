"""Where a sweep's chunks run: local worker processes that die with their parent, or a Dask cluster.

Local workers (:func:`process_pool`) are forked from the sweep's process. Each one asks the
Linux kernel to kill it when its parent ends, whatever ends the parent (SIGKILL and SIGTERM
included: ``prctl(PR_SET_PDEATHSIG, SIGKILL)``, see prctl(2)), and also watches its parent's
process id once a second, so on any system a worker never outlives its sweep. Ctrl-C goes to
the parent only; it stops the sweep and keeps the finished chunks.

A cluster (:func:`cluster_client`) must show at least one worker within a stated time
(:data:`CLUSTER_TIMEOUT`, or ``PERFCHAIN_CLUSTER_TIMEOUT`` in seconds, or the caller's value);
a scheduler with no workers is one error line, not a wait without end.
"""

from __future__ import annotations

import os
import signal
import sys
import threading
import time

from perfchain.errors import InputError

__all__ = ["process_pool", "worker_init", "cluster_client", "cluster_timeout", "CLUSTER_TIMEOUT"]

CLUSTER_TIMEOUT = 60.0   #: [s] default wait for a cluster's first worker
_PR_SET_PDEATHSIG = 1    # linux/prctl.h
_WATCH_PERIOD = 1.0      # [s] how often a worker looks for its parent


def _die_with_parent() -> bool:
    """Ask the kernel for SIGKILL when the parent ends (Linux); False where that is not available."""
    if not sys.platform.startswith("linux"):
        return False
    try:
        import ctypes

        libc = ctypes.CDLL(None, use_errno=True)
        return libc.prctl(_PR_SET_PDEATHSIG, signal.SIGKILL, 0, 0, 0) == 0
    except (OSError, AttributeError):
        return False


def _watch(parent: int):
    while True:
        time.sleep(_WATCH_PERIOD)
        if os.getppid() != parent:
            os._exit(1)     # orphaned: the sweep is gone, its results with it


def worker_init(parent: int):
    """Initializer of a local worker: ignore Ctrl-C, die with the parent ``parent``.

    Parameters
    ----------
    parent : int
        The sweep's process id (the worker's parent).

    Examples
    --------
    Run in a child process only; here it would tie this process to its own parent:

    >>> callable(worker_init)
    True
    """
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    _die_with_parent()
    if os.getppid() != parent:   # the parent ended before the request above took effect
        os._exit(1)
    threading.Thread(target=_watch, args=(parent,), name="perfchain-parent-watch", daemon=True).start()


def process_pool(workers: int):
    """A process pool of ``workers`` processes that die with this process.

    Parameters
    ----------
    workers : int
        Number of worker processes, at least 2.

    Returns
    -------
    concurrent.futures.ProcessPoolExecutor

    Examples
    --------
    >>> with process_pool(2) as pool:
    ...     pool.submit(abs, -3).result()
    3
    """
    from concurrent.futures import ProcessPoolExecutor

    return ProcessPoolExecutor(workers, initializer=worker_init, initargs=(os.getpid(),))


def cluster_timeout(value=None) -> float:
    """Seconds to wait for a cluster's first worker: ``value``, else ``PERFCHAIN_CLUSTER_TIMEOUT``, else 60.

    Examples
    --------
    >>> cluster_timeout(), cluster_timeout("5")
    (60.0, 5.0)
    """
    field = "cluster_timeout"
    if value is None:
        value, field = os.environ.get("PERFCHAIN_CLUSTER_TIMEOUT", CLUSTER_TIMEOUT), "PERFCHAIN_CLUSTER_TIMEOUT"
    from perfchain.units import as_float

    try:
        seconds = as_float(value) if not isinstance(value, bool) else -1.0
    except (TypeError, ValueError):
        seconds = -1.0
    if not 0.0 < seconds < 1e7:
        raise InputError(field, value, "a time in seconds, above 0")
    return seconds


def cluster_client(cluster, timeout=None):
    """A Dask client with at least one worker, and whether this call made it (and must close it).

    Parameters
    ----------
    cluster : str or distributed.Client
        A running scheduler's address, or a client.
    timeout : float or str, optional
        Seconds to wait for the first worker (:func:`cluster_timeout`).

    Returns
    -------
    (distributed.Client, bool)

    Raises
    ------
    InputError
        Dask not installed, no scheduler at the address, or no worker within the time.
    """
    seconds = cluster_timeout(timeout)
    try:
        from distributed import Client
    except ImportError:
        raise InputError("cluster", cluster, 'an installed Dask (pip install "dask[distributed]")') from None
    own = not isinstance(cluster, Client)
    if own:
        try:
            client = Client(cluster, timeout="10s")
        except (OSError, TimeoutError, ValueError) as exc:
            raise InputError("cluster", cluster, f"the address of a running Dask scheduler ({exc})") from None
    else:
        client = cluster
    try:
        client.wait_for_workers(1, timeout=seconds)
    except (TimeoutError, OSError):
        if own:
            client.close()
        raise InputError("cluster", cluster if isinstance(cluster, str) else "client",
                         f"a scheduler with at least one worker (none joined within {seconds:g} s; "
                         "set PERFCHAIN_CLUSTER_TIMEOUT or --cluster-timeout to wait longer)") from None
    return client, own
