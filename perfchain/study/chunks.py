"""Sweep chunks: the work units of a sweep, solved where they run (a process, a pool, a cluster).

The work is cut into chunks of up to :data:`CHUNK_SOLVES` solves in row order; the shifting
points of a chunk are solved together by the batch solver (:mod:`perfchain.thermo.batch`),
which keeps rows apart, so a row is the same number the point gets alone. Ambient pressure
changes only the ambient thrust terms, so a chamber/nozzle solve is done once per chunk and
the other ambient pressures follow exactly (:func:`perfchain.study.rows.with_ambient`).
"""

from __future__ import annotations

import contextlib
import gc
import itertools
from pathlib import Path

from perfchain.errors import InputError, PerfchainError
from perfchain.study.chunk_columns import chunk_frame
from perfchain.study.files import write_chunk
from perfchain.study.grid import SweepGrid
from perfchain.study.provenance import code_fingerprint
from perfchain.study.rows import ambient_row, canonical_rows, derivable, flat_performance
from perfchain.study.tables import kinds_of, rows_frame

__all__ = ["CHUNK_SOLVES", "chunk_triples", "as_grid", "compute_chunk", "compute_frame", "compute_to_file",
           "cluster_chunk"]

CHUNK_SOLVES = 256    #: most chamber/nozzle solves in one chunk (one batch of the batch solver)


def chunk_triples(grid: SweepGrid, solves: int = CHUNK_SOLVES):
    """Work units in row order: lists of (mixture-ratio, pc, exit) index triples.

    Parameters
    ----------
    grid : SweepGrid
    solves : int
        Most solves in one chunk; each triple takes one solve per flow model.

    Yields
    ------
    list of (int, int, int)

    Examples
    --------
    3 x 1 x 2 = 6 triples with 2 flow models at 4 solves a chunk: 2 triples a chunk,
    3 chunks (closed form):

    >>> from perfchain.study.grid import make_grid
    >>> g = make_grid("LOX", "LCH4", mixture_ratio="2.8,3.2,3.6", chamber_pressure="20 bar",
    ...               area_ratio="8,30", flow="shifting,frozen")
    >>> [len(c) for c in chunk_triples(g, 4)]
    [2, 2, 2]
    """
    per_triple = len(grid.flow)
    size = max(1, solves // per_triple)
    triples = list(itertools.product(range(len(grid.mixture_ratio)), range(len(grid.chamber_pressure)),
                                     range(len(grid.exits))))
    for j in range(0, len(triples), size):
        yield triples[j:j + size]


class _Chunk:
    """One chunk's propellants and equilibrium systems, built on first use (in the worker)."""

    def __init__(self, grid: SweepGrid, top: int):
        from perfchain.performance.ambient import infeasibility, separation_rule

        self.grid, self.top = grid, top
        self.rule = separation_rule(grid.separation)
        self._feasibility = infeasibility
        self.props: dict = {}
        self.systems: dict = {}
        self.pending: list = []     # rows of separated nozzles, filled together by finish()

    def prop(self, i):
        if i not in self.props:
            self.props[i] = self.grid.propellant_at(i)   # a bipropellant at O/F i, or the formulation
        return self.props[i]

    def system(self, i):
        from perfchain.thermo.equilibrium import EquilibriumSystem

        if i not in self.systems:
            self.systems[i] = EquilibriumSystem(self.prop(i).elements)
        return self.systems[i]

    def infeasible(self, pc, pa, x):
        """The feasibility rule of every path (:func:`perfchain.performance.ambient.infeasibility`)."""
        return self._feasibility(pc, pa, x if self.grid.exit_key == "exit_pressure" else None)

    def batches(self, triples) -> dict:
        """flow -> (Expansions, triple -> index) of the triples feasible at vacuum."""
        from perfchain.performance.batched import expansion_batch

        grid = self.grid
        feasible: dict = {}     # per (pc, exit) index pair
        for _, ip, ix in triples:
            if (ip, ix) not in feasible:
                feasible[ip, ix] = self.infeasible(grid.chamber_pressure[ip], 0.0, grid.exits[ix]) is None
        todo = [t for t in triples if feasible[t[1:]]]
        points = [(self.prop(i), grid.chamber_pressure[ip], grid.exits[ix]) for i, ip, ix in todo]
        results: dict = {}
        for flow in grid.flow:
            results[flow] = (expansion_batch(points, exit_key=grid.exit_key, flow=flow),
                             {t: n for n, t in enumerate(todo)})
        return results

    def table_rows(self, triples, expansions) -> list:
        """The chunk's rows (:func:`compute_chunk`) from its :meth:`batches`."""
        pa0 = self.grid.ambient_pressure[0]
        results = {flow: (exps, index, self.first_rows(exps, pa0)) for flow, (exps, index) in expansions.items()}
        rows = []
        for triple in triples:
            rows.extend(self.rows(triple, self.solved(triple, results)))
        self.finish(results)
        return canonical_rows(rows)

    def solved(self, triple, results) -> list:
        """Per flow model (base, first row or None, template row or None, reason, flow, index): the
        row at the first ambient pressure and the row the others are derived from."""
        grid = self.grid
        i, ip, ix = triple
        prop, pa0 = self.prop(i), grid.ambient_pressure[0]
        pc, x = grid.chamber_pressure[ip], grid.exits[ix]
        out = []
        for flow in grid.flow:
            ox, fu = prop.oxidizer, prop.fuel   # None for a formulation
            base = {"propellant": prop.name, "oxidizer": ox and ox.name, "fuel": fu and fu.name,
                    "mixture_ratio": prop.mixture_ratio, "chamber_pressure": pc, grid.exit_key: x,
                    "ambient_pressure": pa0, "flow": flow}
            exps, index, first = results.get(flow, (None, {}, None))
            n = index.get(triple)
            row = template = None
            try:
                err = self.infeasible(pc, 0.0, x) if n is None else None   # batches() kept the feasible
                if err is not None:
                    raise err
                res = first[n]
                if isinstance(res, Exception) and not isinstance(exps.items[n], Exception):
                    # the solve is fine, the first ambient pressure is not: vacuum as the template
                    vacuum = self.first_rows(exps, 0.0, only=[n])[n]
                    if not isinstance(vacuum, Exception):   # else the point fails at every ambient
                        template = vacuum
                if isinstance(res, Exception):
                    raise res
                row = template = res
                reason = None
            except PerfchainError as exc:
                reason = " ".join(str(exc).split())
            out.append((base, row, template, reason, flow, n))
        return out

    def first_rows(self, exps, pa, only=None) -> list:
        """A batch's rows at ambient pressure ``pa``: straight from the solver's arrays, or through
        Performance records when the grid asks for transport properties (they need each
        station's whole composition)."""
        if not self.grid.transport:
            return exps.rows(pa, self.rule, self.top, only=only)
        return [r if isinstance(r, Exception) or r is None else self.flat(r)
                for r in exps.at_ambient(pa, self.rule, only=only)]

    def flat(self, res) -> dict:
        """The table row of a solved point, with its transport properties when the grid asks."""
        if self.grid.transport:
            from perfchain.performance.transport import add_transport

            res = add_transport(res)
        return flat_performance(res, self.top)

    def rows(self, triple, solved) -> list:
        """The rows of one triple at every ambient pressure (derived from the first solve)."""
        grid = self.grid
        rows = []
        for k, pa in enumerate(grid.ambient_pressure):
            for base, row, template, reason, flow, n in solved:
                alt = {} if grid.altitude is None else {"altitude": grid.altitude[k]}
                if k == 0 and row is not None:
                    r = dict(row, **alt, status="ok", reason=None)
                elif k == 0 or template is None:
                    r = dict(base, ambient_pressure=pa, **alt, status="failed", reason=reason)
                else:
                    r = self.derived(triple, base, template, pa, alt, flow, n)
                rows.append(r)
        return rows

    def derived(self, triple, base, template, pa, alt, flow, n) -> dict:
        """The row of a solved point at another ambient pressure: the full-flowing formula, or a
        place held for the cut-nozzle estimate (:meth:`finish`)."""
        from perfchain.performance.chain import performance_of

        grid = self.grid
        failed = dict(base, ambient_pressure=pa, **alt, status="failed")
        bad = self.infeasible(base["chamber_pressure"], pa, base[grid.exit_key])
        if bad is not None:
            return dict(failed, reason=" ".join(str(bad).split()))
        if self.rule.separates(template["exit_pressure"], pa, template["exit_mach"]):
            r = dict(template, **alt, status="ok", reason=None)
            self.pending.append((r, failed, flow, n, pa))
            return r
        try:
            # a separated template carries the cut estimate, but its vacuum terms are the solve's own
            if not template["flows_full"] or derivable(template):
                r = ambient_row(template, pa, self.rule)
            else:  # the core changed what ambient pressure touches: solve again
                i = triple[0]
                r = self.flat(performance_of(
                    self.prop(i), base["chamber_pressure"], ambient_pressure=pa, flow=flow, system=self.system(i),
                    separation=self.rule, **{grid.exit_key: base[grid.exit_key]}))
        except PerfchainError as exc:
            return dict(failed, reason=" ".join(str(exc).split()))
        return dict(r, **alt, status="ok", reason=None)

    def finish(self, results) -> None:
        """Fill the rows of separated nozzles: their separation stations solved together per flow model."""
        for flow in self.grid.flow:
            todo = [p for p in self.pending if p[2] == flow]
            if not todo:
                continue
            terms = results[flow][0].ambient_terms([(n, pa) for _, _, _, n, pa in todo], self.rule)
            for (r, failed, _, _, _), t in zip(todo, terms):
                if isinstance(t, Exception):
                    r.clear()
                    r.update(failed, reason=" ".join(str(t).split()))
                else:
                    r.update(t)
        self.pending = []


def compute_chunk(task) -> list:
    """Rows of one chunk (run in a worker: builds its own Cantera objects).

    The points of the chunk go through the batch solver together, one batch per flow model
    (:func:`perfchain.performance.chain.performance_batch`); each row is the number
    that point gets alone.

    Parameters
    ----------
    task : (dict, list, int)
        The grid as a dict (``dataclasses.asdict`` of a :class:`SweepGrid`; in this process,
        the grid itself), the chunk's index triples (:func:`chunk_triples`) and the species
        kept per composition column.

    Returns
    -------
    list of dict
        One row per point (SI units), in row order; a failed point keeps its grid values,
        ``status="failed"`` and the one-line ``reason``.

    Examples
    --------
    Ideal shifting LOX/RP-1 at O/F 2.56, 1000 psia to 1 atm gives about 300 s at sea level
    (Sutton & Biblarz, Rocket Propulsion Elements, Table 5-5; from memory, +/- 1 %); an exit
    pressure above the chamber's fails with its reason:

    >>> from dataclasses import asdict
    >>> from perfchain.study.grid import make_grid
    >>> g = make_grid("LOX", "RP-1", mixture_ratio="2.56", chamber_pressure="1000 psi",
    ...               exit_pressure="1 atm,100 bar")
    >>> rows = compute_chunk((asdict(g), next(chunk_triples(g)), 0))
    >>> [r["status"] for r in rows], bool(abs(rows[0]["isp_ambient"] / 300 - 1) < 0.01)
    (['ok', 'failed'], True)
    """
    grid_dict, triples, top = task
    with collector_paused():
        chunk = _Chunk(as_grid(grid_dict), top)
        return chunk.table_rows(triples, chunk.batches(triples))


def as_grid(grid) -> SweepGrid:
    """A task's grid: a :class:`SweepGrid` as it is (in this process: its propellants are made
    already), or one from its ``dataclasses.asdict`` (sent to a worker).

    Examples
    --------
    >>> from dataclasses import asdict
    >>> from perfchain.study.grid import make_grid
    >>> g = make_grid("LOX", "RP-1", mixture_ratio="2.56", chamber_pressure="70 bar", area_ratio="40")
    >>> as_grid(g) is g, as_grid(asdict(g)) == g
    (True, True)
    """
    return grid if isinstance(grid, SweepGrid) else SweepGrid(**grid)


@contextlib.contextmanager
def collector_paused():
    """Pause Python's cyclic garbage collector while a chunk is built (reference counting still frees).

    A chunk makes thousands of small containers (its rows); each one can start a collection,
    and the full ones walk every long-lived object of the libraries loaded (NumPy, pandas, numba,
    Cantera) to free nothing: about a tenth of a liquid sweep's time. Cycles made meanwhile are
    collected once it runs again. It is switched back on only if it was on (threads that pause it
    together leave it on once the first that paused it is done).

    Examples
    --------
    >>> import gc
    >>> with collector_paused():
    ...     gc.isenabled()
    False
    >>> gc.isenabled()
    True
    """
    was = gc.isenabled()
    gc.disable()
    try:
        yield
    finally:
        if was:
            gc.enable()


def compute_to_file(task) -> dict:
    """Compute a chunk and write its checkpoint file here (a local worker).

    Parameters
    ----------
    task : (tuple, str)
        The :func:`compute_chunk` task and the checkpoint file's path.

    Returns
    -------
    dict
        The chunk's column types (:func:`perfchain.study.tables.kinds_of`), so the table
        writer need not read the file back for them.

    Examples
    --------
    >>> import tempfile
    >>> from dataclasses import asdict
    >>> from perfchain.study.files import load_chunk
    >>> from perfchain.study.grid import make_grid
    >>> g = make_grid("LOX", "RP-1", mixture_ratio="2.56", chamber_pressure="1000 psi",
    ...               exit_pressure="1 atm")
    >>> with tempfile.TemporaryDirectory() as d:
    ...     kinds = compute_to_file(((asdict(g), next(chunk_triples(g)), 0), f"{d}/c.json"))
    ...     len(load_chunk(Path(f"{d}/c.json")))
    1
    >>> kinds["isp_ambient"], kinds["status"]
    ('float64', 'string')
    """
    inner, path = task
    rows = compute_chunk(inner)
    write_chunk(Path(path), rows, code_fingerprint())
    return kinds_of(rows)


def cluster_chunk(task):
    """A chunk on a cluster worker: refuse to run if this worker's perfchain code differs.

    Parameters
    ----------
    task : (callable, tuple, str)
        The compute function (:func:`compute_chunk` or :func:`compute_frame`), its task and
        the :func:`~perfchain.study.provenance.code_fingerprint` the caller runs.

    Returns
    -------
    The compute function's result.

    Examples
    --------
    >>> try:
    ...     cluster_chunk((compute_chunk, None, "0000000000000000"))
    ... except InputError as exc:
    ...     print(exc.field)
    cluster
    """
    compute, inner, expected = task
    mine = code_fingerprint()
    if mine != expected:
        raise InputError("cluster", "worker", f"workers that run this perfchain code (fingerprint "
                         f"{expected}); a worker runs {mine}")
    return compute(inner)


def compute_frame(task):
    """:func:`compute_chunk` as a pandas DataFrame (built where the chunk was solved).

    Parameters
    ----------
    task : (dict, list, int)
        As in :func:`compute_chunk`.

    Returns
    -------
    pandas.DataFrame
        One row per point (SI units), the columns in the table's order
        (:func:`~perfchain.study.tables.rows_frame`: the grid's columns first).

    Examples
    --------
    Sea-level Isp of about 300 s (Sutton & Biblarz, Table 5-5; from memory, +/- 1 %):

    >>> from dataclasses import asdict
    >>> from perfchain.study.grid import make_grid
    >>> g = make_grid("LOX", "RP-1", mixture_ratio="2.56", chamber_pressure="1000 psi",
    ...               exit_pressure="1 atm")
    >>> df = compute_frame((asdict(g), next(chunk_triples(g)), 0))
    >>> len(df), bool(abs(df.isp_ambient[0] / 300 - 1) < 0.01)
    (1, True)
    """
    with collector_paused():    # one pause for all: the chunk's objects are gone before it runs again
        return _frame(task)


def _frame(task):
    """:func:`compute_frame` with the collector paused: only the frame outlives it."""
    grid_dict, triples, top = task
    chunk = _Chunk(as_grid(grid_dict), top)
    expansions = chunk.batches(triples)
    frame = chunk_frame(chunk.grid, chunk.rule, top, triples, expansions)   # the common chunk
    return rows_frame(chunk.grid, chunk.table_rows(triples, expansions)) if frame is None else frame
