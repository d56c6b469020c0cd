"""Running a sweep's chunks: in this process, on a local process pool, or on a Dask cluster.

:func:`run_chunks` computes every chunk that is not already in the checkpoint folder, in any
order, and hands back the chunks in row order (rows in memory, DataFrames, or checkpoint
files). A finished chunk lands in its checkpoint file as soon as it is done, under a name
that carries the sweep's digest (:func:`perfchain.study.provenance.sweep_digest`), so a rerun
after an interruption resumes from them and gives the same table, byte for byte.
"""

from __future__ import annotations

import contextlib
import sys
from dataclasses import asdict
from pathlib import Path

from perfchain.errors import InputError
from perfchain.study.chunks import (CHUNK_SOLVES, chunk_triples, cluster_chunk, compute_chunk, compute_frame,
                                    compute_to_file)
from perfchain.study.files import chunk_problem, folder_lock, remove_stale_temps, write_chunk
from perfchain.study.provenance import code_fingerprint, sweep_digest
from perfchain.study.rows import COMPOSITION_TOP
from perfchain.study.tables import kinds_of
from perfchain.study.workers import cluster_client, process_pool

__all__ = ["run_chunks", "check_cluster_code", "executor"]


def check_cluster_code(client, address):
    """Refuse a cluster whose workers run other perfchain code (their tables would differ).

    A worker that cannot be reached right now (one that just died and is being
    restarted) is skipped here; every chunk checks its worker's code again anyway
    (:func:`perfchain.study.chunks.cluster_chunk`).

    Parameters
    ----------
    client : distributed.Client
        Anything with ``run(function, on_error=...)`` -> {worker: result}.
    address : str
        Named in the error.

    Examples
    --------
    >>> class Workers:
    ...     def run(self, f, on_error):
    ...         return {"w1": f(), "w2": OSError("restarting")}
    >>> check_cluster_code(Workers(), "tcp://127.0.0.1:8786") is None
    True
    """
    mine = code_fingerprint()
    theirs = client.run(code_fingerprint, on_error="return")
    bad = {w: f for w, f in theirs.items() if isinstance(f, str) and f != mine}
    if bad:
        worker, fp = next(iter(bad.items()))
        raise InputError("cluster", address, f"workers that run this perfchain code (fingerprint {mine}); "
                         f"worker {worker} runs {fp}")


def executor(workers: int, cluster, cluster_timeout=None):
    """The pool that runs the chunks, and whether this call made it (and must close it).

    Parameters
    ----------
    workers : int
        Local worker processes (1: none, run here); they die with this process
        (:func:`perfchain.study.workers.process_pool`).
    cluster : str or distributed.Client or None
        A Dask scheduler's address, or a client.
    cluster_timeout : float, optional
        Seconds to wait for the cluster's first worker
        (:func:`perfchain.study.workers.cluster_client`).

    Returns
    -------
    (pool or None, bool)

    Examples
    --------
    >>> executor(1, None)
    (None, False)
    """
    if cluster is not None:
        return cluster_client(cluster, cluster_timeout)
    if workers > 1:
        return process_pool(workers), True
    return None, False


class _Run:
    """The chunks of one sweep: which are on disk, which to compute, and where each lands."""

    def __init__(self, grid, parts, top, solves, on_chunk, as_frames, kinds):
        self.grid, self.parts, self.top = grid, parts, top
        self.on_chunk, self.as_frames, self.kinds = on_chunk, as_frames, kinds
        self.compute = compute_frame if as_frames else compute_chunk
        self.tasks = list(chunk_triples(grid, solves))
        # the checkpoint files' names (none without a folder: the digest hashes the whole provenance)
        self.digest = None if parts is None else sweep_digest(grid, top, solves)
        self.code = code_fingerprint()
        self.results: list = [None] * len(self.tasks)
        self.names = [None if parts is None else f"{self.digest}-{n:05d}.json" for n in range(len(self.tasks))]
        self.sizes = [len(t) * len(grid.flow) * len(grid.ambient_pressure) for t in self.tasks]
        self.todo = []
        for n, name in enumerate(self.names):
            path = None if parts is None else Path(parts) / name
            if path is not None and path.exists():
                problem = chunk_problem(path, self.sizes[n], self.code)
                if problem is None:
                    self.results[n] = path
                    continue
                # a chunk cut short by a full disk, emptied or edited: never trusted, computed again
                print(f"perfchain: checkpoint chunk {path} is {problem}; computing it again", file=sys.stderr)
                path.unlink(missing_ok=True)
            self.todo.append(n)
        self.gd = asdict(grid)
        self.bar = None

    def task(self, n, first_only=False, here=False):
        """Chunk n's task: the grid as a dict for a worker, or the grid itself ``here`` (this process)."""
        return (self.grid if here else self.gd, self.tasks[n][:1] if first_only else self.tasks[n], self.top)

    def start_bar(self, progress):
        from tqdm import tqdm

        show = sys.stderr.isatty() if progress is None else bool(progress)
        size = self.grid.size
        self.bar = tqdm(total=size, initial=size - sum(self.sizes[n] for n in self.todo), unit="pt",
                        disable=not show, file=sys.stderr, desc="sweep")

    def land(self, n, rows):
        """Chunk n computed: keep it (or its checkpoint file), note its column types."""
        if len(rows) != self.sizes[n]:
            raise RuntimeError(f"chunk {n} has {len(rows)} rows, {self.sizes[n]} expected")
        if self.parts is not None:
            path = Path(self.parts) / self.names[n]
            write_chunk(path, rows, self.code)
            self.results[n] = path
        else:
            self.results[n] = rows
        if self.kinds is not None and not self.as_frames:
            self.kinds[n] = kinds_of(rows)
        if self.on_chunk is not None:
            self.on_chunk(n, rows)
        self.bar.update(self.sizes[n])

    def landed_file(self, n, chunk_kinds):
        """Chunk n was written by a local worker itself."""
        path = Path(self.parts) / self.names[n]
        problem = chunk_problem(path, self.sizes[n], self.code)
        if problem is not None:
            raise InputError("checkpoint", str(path), f"a whole checkpoint chunk (this one is {problem})")
        self.results[n] = path
        if self.kinds is not None:
            self.kinds[n] = chunk_kinds
        self.bar.update(self.sizes[n])

    def on_cluster(self, pool, cluster):
        from distributed import as_completed

        check_cluster_code(pool, cluster if isinstance(cluster, str) else "client")
        futs = {pool.submit(cluster_chunk, (self.compute, self.task(n), self.code), pure=False): n
                for n in self.todo}
        for fut in as_completed(list(futs)):
            self.land(futs.pop(fut), fut.result())  # drop the future so its rows can be freed
            fut.release()

    def on_pool(self, pool):
        from concurrent.futures import as_completed

        own_files = self.parts is not None and self.on_chunk is None
        if own_files:
            futs = {pool.submit(compute_to_file, (self.task(n), str(Path(self.parts) / self.names[n]))): n
                    for n in self.todo}
        else:
            futs = {pool.submit(self.compute, self.task(n)): n for n in self.todo}
        for fut in as_completed(list(futs)):
            # drop the future so its rows can be freed
            (self.landed_file if own_files else self.land)(futs.pop(fut), fut.result())
            del fut


def run_chunks(grid, *, workers=1, cluster=None, parts=None, progress=None, top=COMPOSITION_TOP,
               solves=CHUNK_SOLVES, on_chunk=None, as_frames=False, kinds=None, cluster_timeout=None):
    """Compute every chunk not on disk; return the chunks in row order and the sweep's digest.

    Parameters
    ----------
    grid : SweepGrid
    workers : int
        Local worker processes (1: this process).
    cluster : str or distributed.Client, optional
        A running Dask scheduler.
    parts : str or Path, optional
        Checkpoint folder: whole chunks found there are reused (a damaged one is computed
        again), computed ones written there. The folder is locked for the run
        (:func:`perfchain.study.files.folder_lock`).
    progress : bool, optional
        Progress bar on stderr; by default only on a terminal.
    top : int
        Species kept per station composition column.
    solves : int
        Solves per chunk.
    on_chunk : callable, optional
        ``on_chunk(n, rows)`` is called in this process as chunk n lands (so its share of
        the table building overlaps the workers' solving).
    as_frames : bool
        Without a checkpoint folder: each worker returns its chunk as a pandas DataFrame,
        so the table is built in the workers, in parallel.
    kinds : dict, optional
        Receives each computed chunk's column types (:func:`perfchain.study.tables.kinds_of`)
        so the table writer need not read the chunk back; with a checkpoint folder and local
        workers, each worker writes its own chunk file.
    cluster_timeout : float, optional
        Seconds to wait for a cluster's first worker (default
        :data:`perfchain.study.workers.CLUSTER_TIMEOUT`, or ``PERFCHAIN_CLUSTER_TIMEOUT``).

    Returns
    -------
    (list, str or None)
        Per chunk its rows, DataFrame or checkpoint file; the digest naming the chunk files
        (None without ``parts``: no file is named).

    Examples
    --------
    Sea-level Isp of about 300 s for LOX/RP-1 at O/F 2.56, 1000 psia to 1 atm (Sutton &
    Biblarz, Rocket Propulsion Elements, Table 5-5; from memory, +/- 1 %):

    >>> from perfchain.study.grid import make_grid
    >>> g = make_grid("LOX", "RP-1", mixture_ratio="2.56", chamber_pressure="1000 psi",
    ...               exit_pressure="1 atm")
    >>> chunks, digest = run_chunks(g, progress=False)
    >>> len(chunks), bool(abs(chunks[0][0]["isp_ambient"] / 300 - 1) < 0.01), digest
    (1, True, None)
    """
    if as_frames and parts is not None:
        raise ValueError("as_frames needs parts=None: checkpoint files hold rows")
    if isinstance(workers, bool) or not isinstance(workers, int) or workers < 1:
        raise InputError("workers", workers, "a whole number of worker processes, at least 1")
    with folder_lock(parts, "checkpoint") if parts is not None else contextlib.nullcontext():
        if parts is not None:
            remove_stale_temps(parts)      # half-written chunks of a killed run
        return _run(grid, workers, cluster, parts, progress, top, solves, on_chunk, as_frames, kinds,
                    cluster_timeout)


def _run(grid, workers, cluster, parts, progress, top, solves, on_chunk, as_frames, kinds, cluster_timeout):
    """:func:`run_chunks` once its checkpoint folder (if any) is locked."""
    run = _Run(grid, parts, top, solves, on_chunk, as_frames, kinds)
    run.start_bar(progress)
    if workers > 1 and cluster is None and run.todo:
        # warm this process (data, tables, compiled kernel) before the pool forks it, so the
        # workers start hot instead of each loading everything again
        compute_chunk(run.task(run.todo[0], first_only=True, here=True))
    pool, own = executor(workers, cluster, cluster_timeout)
    try:
        if pool is None:
            for n in run.todo:
                run.land(n, run.compute(run.task(n, here=True)))
        elif cluster is not None:
            run.on_cluster(pool, cluster)
        else:
            run.on_pool(pool)
    finally:
        run.bar.close()
        if own:
            if cluster is not None:
                pool.close()
            else:
                pool.shutdown(wait=True, cancel_futures=True)
    return run.results, run.digest
