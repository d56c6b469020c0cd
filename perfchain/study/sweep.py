"""Performance tables: a full grid of operating points, one tidy row per point.

The grid is the product of mixture ratios x chamber pressures x (area ratios
or exit pressures) x (ambient pressures or altitudes) x flow models, in that
order (the last one varies fastest). Each row carries the keys of
:meth:`perfchain.performance.chain.Performance.to_dict` with the stations flattened
(``chamber_temperature``, ``throat_pressure``, ``exit_mach``...), SI units,
plus ``status`` (``"ok"``/``"failed"``) and ``reason`` (the one-line message
of the :class:`~perfchain.errors.PerfchainError` that stopped a point).

The work is cut into chunks of up to :data:`CHUNK_SOLVES` solves in row order;
the shifting points of a chunk are solved together by the batch solver
(:mod:`perfchain.thermo.batch`), which keeps rows apart, so a row is the same number
the point gets alone. Ambient pressure changes only the ambient thrust
terms, so a chamber/nozzle solve is done once and the other ambient pressures
follow exactly from ``c_amb = c_vac - p_a eps c* / p_c``. Finished chunks can
be written to a checkpoint folder as they land; a rerun loads them and gives
the same table, byte for byte.
"""

from __future__ import annotations

import hashlib
import itertools
import json
import math
import os
import sys
import tempfile
from dataclasses import asdict, dataclass
from functools import lru_cache
from pathlib import Path

from perfchain.constants import G0
from perfchain import __version__
from perfchain.constants import ONE_ATM
from perfchain.errors import InputError, PerfchainError
from perfchain.units import to_si

__all__ = ["SweepGrid", "make_grid", "sweep", "sweep_to_file", "flatten_result",
           "column_unit", "MAX_POINTS", "provenance", "to_xarray"]

MAX_POINTS = 20_000   #: grids above this many points need ``confirm=True`` (CLI ``--yes``)
CHUNK_SOLVES = 256    #: most chamber/nozzle solves in one chunk (one batch of the batch solver)
COMPOSITION_TOP = 5   #: species kept per station in the ``<station>_composition`` column
_AMBIENT_KEYS = ("ambient_pressure", "cf_ambient", "isp_ambient", "exhaust_velocity_ambient")


# --------------------------------------------------------------------------- grid
def _items(value, field):
    if isinstance(value, str):
        parts = [p.strip() for p in value.split(",")]
    elif isinstance(value, (int, float)) and not isinstance(value, bool):
        parts = [value]
    else:
        try:
            parts = list(value)
        except TypeError:
            raise InputError(field, value, "a comma-separated list of values") from None
        parts = [p.strip() if isinstance(p, str) else p for p in parts]
    if not parts or any(p == "" or p is None for p in parts):
        raise InputError(field, value, "a comma-separated list of values, none empty")
    return parts


def _distinct(values, field, raw):
    seen = set()
    for v in values:
        if v in seen:
            raise InputError(field, raw, f"distinct values ({v!r} is given twice)")
        seen.add(v)
    return tuple(values)


def _numbers(value, field, allowed, low, exclusive=True):
    out = []
    for p in _items(value, field):
        try:
            x = float(p) if not isinstance(p, bool) else math.nan
        except (TypeError, ValueError):
            raise InputError(field, p, allowed) from None
        if not math.isfinite(x) or x < low or (exclusive and x == low):
            raise InputError(field, p, allowed)
        out.append(x)
    return _distinct(out, field, value)


def _quantities(value, kind, field, **bounds):
    return _distinct([to_si(p, kind, field, **bounds) for p in _items(value, field)], field, value)


@dataclass(frozen=True)
class SweepGrid:
    """A validated grid of operating points, SI values, in row order.

    Attributes
    ----------
    oxidizer, fuel : str
        Ingredient names.
    mixture_ratio : tuple of float
        O/F by mass [-].
    chamber_pressure : tuple of float
        [Pa]
    area_ratio, exit_pressure : tuple of float or None
        Exactly one is set: exit/throat areas [-] or exit pressures [Pa].
    ambient_pressure : tuple of float
        [Pa]
    altitude : tuple of float or None
        Geometric altitudes [m] the ambient pressures came from (US Standard
        Atmosphere 1976), if stated that way.
    flow : tuple of str
    """

    oxidizer: str
    fuel: str
    mixture_ratio: tuple
    chamber_pressure: tuple
    area_ratio: tuple | None
    exit_pressure: tuple | None
    ambient_pressure: tuple
    altitude: tuple | None
    flow: tuple

    @property
    def exit_key(self) -> str:
        """``"area_ratio"`` or ``"exit_pressure"``: how the exit is stated."""
        return "area_ratio" if self.area_ratio is not None else "exit_pressure"

    @property
    def exits(self) -> tuple:
        """The exit values of the grid ([-] or [Pa])."""
        return self.area_ratio if self.area_ratio is not None else self.exit_pressure

    @property
    def dims(self) -> dict:
        """Grid dimension name -> values, in row order (last varies fastest)."""
        amb = ("altitude", self.altitude) if self.altitude is not None else \
            ("ambient_pressure", self.ambient_pressure)
        return dict([("mixture_ratio", self.mixture_ratio), ("chamber_pressure", self.chamber_pressure),
                     (self.exit_key, self.exits), amb, ("flow", self.flow)])

    @property
    def size(self) -> int:
        """Number of points [-]."""
        return math.prod(len(v) for v in self.dims.values())


def make_grid(oxidizer, fuel, *, mixture_ratio, chamber_pressure, area_ratio=None, exit_pressure=None,
              ambient_pressure=None, altitude=None, flow="shifting", confirm=False) -> SweepGrid:
    """Validate the lists of a sweep and build its :class:`SweepGrid`.

    Each list is a sequence or comma-separated text; dimensioned values carry a
    unit (``"20 bar,50 bar"``) or, from Python, are SI floats.

    Parameters
    ----------
    oxidizer, fuel : str
    mixture_ratio : str or sequence
        O/F values [-], > 0.
    chamber_pressure : str or sequence
        [Pa]
    area_ratio : str or sequence, optional
        [-], > 1; exactly one of area_ratio, exit_pressure.
    exit_pressure : str or sequence, optional
        [Pa]
    ambient_pressure : str or sequence, optional
        [Pa], >= 0; default 1 atm. Not with ``altitude``.
    altitude : str or sequence, optional
        Geometric altitude [m], 0 to 86 km (US Standard Atmosphere 1976).
    flow : str or sequence
        Flow models.
    confirm : bool
        Allow grids above :data:`MAX_POINTS`.

    Examples
    --------
    The 1976 standard atmosphere gives 22 632 Pa at its 11 km' geopotential
    layer base, 11 019 m geometric (NOAA-S/T 76-1562; rounded to the pascal):

    >>> g = make_grid("LOX", "RP-1", mixture_ratio="2.2,2.6", chamber_pressure="70 bar",
    ...               area_ratio="10,40", altitude="0 km,11019 m")
    >>> g.size, [round(p) for p in g.ambient_pressure]
    (8, [101325, 22632])
    """
    from perfchain.atmosphere import pressure
    from perfchain.thermo.flow_models import check_flow
    from perfchain.propellants.mixture import make_propellant

    mr = _numbers(mixture_ratio, "mixture_ratio", "a list of O/F values above 0", 0.0)
    pc = _quantities(chamber_pressure, "pressure", "chamber_pressure", minimum=0.0)
    if (area_ratio is None) == (exit_pressure is None):
        raise InputError("exit", "both" if area_ratio is not None else "neither",
                         "exactly one of area_ratio or exit_pressure")
    eps = None if area_ratio is None else _numbers(area_ratio, "area_ratio",
                                                   "a list of exit/throat area ratios above 1", 1.0)
    pe = None if exit_pressure is None else _quantities(exit_pressure, "pressure", "exit_pressure",
                                                        minimum=0.0)
    if altitude is not None and ambient_pressure is not None:
        raise InputError("ambient", "both", "one of ambient_pressure or altitude")
    alt = None
    if altitude is not None:
        alt = _quantities(altitude, "length", "altitude", minimum=0.0, exclusive=False, maximum=86000.0)
        pa = tuple(float(pressure(z)) for z in alt)
    else:
        pa = _quantities(ONE_ATM if ambient_pressure is None else ambient_pressure, "pressure",
                         "ambient_pressure", minimum=0.0, exclusive=False)
    flows = _distinct([check_flow(f) for f in _items(flow, "flow")], "flow", flow)
    for r in mr:  # names and mixture checked once, before any work
        make_propellant(oxidizer, fuel, r)
    grid = SweepGrid(str(oxidizer), str(fuel), mr, pc, eps, pe, pa, alt, flows)
    if grid.size > MAX_POINTS and not confirm:
        raise InputError("grid", f"{grid.size} points",
                         f"at most {MAX_POINTS} points unless confirmed (--yes)")
    return grid


# --------------------------------------------------------------------------- rows
def flatten_result(d: dict, top: int = COMPOSITION_TOP) -> dict:
    """Flatten a :meth:`Performance.to_dict` into one table row (SI units).

    Station dicts become ``<station>_<key>`` columns; a composition keeps its
    ``top`` largest mole fractions as a JSON text column (none if ``top`` is
    0); other nested dicts are prefixed the same way, lists become JSON text.

    >>> flatten_result({"cstar": 1800.0, "exit": {"name": "exit", "mach": 3.1,
    ...                 "composition": {"H2O": 0.6, "H2": 0.4}}}, top=1)
    {'cstar': 1800.0, 'exit_mach': 3.1, 'exit_composition': '{"H2O": 0.6}'}
    """
    out = {}
    for key, value in d.items():
        if isinstance(value, dict):
            for k, v in value.items():
                if k == "name":
                    continue
                if k == "composition":
                    if top:
                        best = sorted(v.items(), key=lambda kv: -kv[1])[:top]
                        out[f"{key}_composition"] = _json_object(best)
                    continue
                if isinstance(v, (dict, list, tuple)) or (isinstance(v, int) and not isinstance(v, bool)):
                    out.update(flatten_result({f"{key}_{k}": v}, top))
                else:
                    out[f"{key}_{k}"] = v
        elif isinstance(value, (list, tuple)):
            out[key] = json.dumps(value)
        elif isinstance(value, int) and not isinstance(value, bool):
            out[key] = float(value)
        else:
            out[key] = value
    return out


_SAFE_KEYS: set = set()


def _json_object(items) -> str:
    """``json.dumps(dict(items))`` for plain-text keys and finite floats, without the encoder."""
    for k, v in items:
        if type(v) is not float or not math.isfinite(v):
            return json.dumps(dict(items))
        if k not in _SAFE_KEYS:
            if not (isinstance(k, str) and k.isascii() and k.isprintable() and '"' not in k and "\\" not in k):
                return json.dumps(dict(items))
            _SAFE_KEYS.add(k)
    return "{" + ", ".join(f'"{k}": {v!r}' for k, v in items) + "}"


def _with_ambient(row: dict, pa: float) -> dict:
    """The same solve at another ambient pressure: only the ambient thrust terms change."""
    new = dict(row)
    c_amb = row["exhaust_velocity_vacuum"] - pa * row["area_ratio"] * row["cstar"] / row["chamber_pressure"]
    new.update(ambient_pressure=pa, exhaust_velocity_ambient=c_amb, cf_ambient=c_amb / row["cstar"],
               isp_ambient=c_amb / G0)
    return new


def _derivable(row: dict) -> bool:
    """True when the ambient shortcut reproduces this row's own ambient terms (1e-9)."""
    if not all(k in row for k in _AMBIENT_KEYS + ("exhaust_velocity_vacuum", "cstar", "area_ratio")):
        return False
    again = _with_ambient(row, row["ambient_pressure"])
    return all(abs(again[k] - row[k]) <= 1e-9 * max(abs(row[k]), 1.0) for k in _AMBIENT_KEYS[1:])


def _chunks(grid: SweepGrid, solves: int = CHUNK_SOLVES):
    """Work units in row order: lists of (mixture-ratio, pc, exit) index triples."""
    per_triple = len(grid.flow)
    size = max(1, solves // per_triple)
    triples = list(itertools.product(range(len(grid.mixture_ratio)), range(len(grid.chamber_pressure)),
                                     range(len(grid.exits))))
    for j in range(0, len(triples), size):
        yield triples[j:j + size]


def _compute_chunk(task) -> list:
    """Rows of one chunk (run in a worker: builds its own Cantera objects).

    The points of the chunk go through the batch solver together, one batch per flow model
    (:func:`perfchain.performance.chain.performance_batch`); each row is the number
    that point gets alone.
    """
    from perfchain.thermo.equilibrium import EquilibriumSystem
    from perfchain.propellants.mixture import make_propellant
    from perfchain.performance.chain import performance_batch, performance_of

    grid_dict, triples, top = task
    grid = SweepGrid(**grid_dict)
    props: dict = {}
    systems: dict = {}
    pa0 = grid.ambient_pressure[0]

    def prop_of(i):
        if i not in props:
            props[i] = make_propellant(grid.oxidizer, grid.fuel, grid.mixture_ratio[i])
        return props[i]

    def system_of(i):
        if i not in systems:
            systems[i] = EquilibriumSystem(prop_of(i).elements)
        return systems[i]

    def bad_exit(pc, x):
        if grid.exit_key == "exit_pressure" and not x < pc:
            return InputError("exit_pressure", x, f"a pressure below the chamber pressure ({pc:.6g} Pa)")
        return None

    results: dict = {}
    todo = [t for t in triples if bad_exit(grid.chamber_pressure[t[1]], grid.exits[t[2]]) is None]
    points = [(prop_of(i), grid.chamber_pressure[ip], grid.exits[ix]) for i, ip, ix in todo]
    for flow in grid.flow:
        solved = performance_batch(points, exit_key=grid.exit_key, ambient_pressure=pa0, flow=flow)
        for t, res in zip(todo, solved):
            results[(t, flow)] = res
    rows = []
    for i, ip, ix in triples:
        prop = prop_of(i)
        pc, x = grid.chamber_pressure[ip], grid.exits[ix]
        solved = []
        for flow in grid.flow:
            base = {"oxidizer": prop.oxidizer.name, "fuel": prop.fuel.name,
                    "mixture_ratio": grid.mixture_ratio[i], "chamber_pressure": pc, grid.exit_key: x,
                    "ambient_pressure": pa0, "flow": flow}
            try:
                err = bad_exit(pc, x)
                if err is not None:
                    raise err
                res = results.get(((i, ip, ix), flow))
                if res is None:
                    res = performance_of(prop, pc, ambient_pressure=pa0, flow=flow, system=system_of(i),
                                         **{grid.exit_key: x})
                if isinstance(res, Exception):
                    raise res
                row = _flat(res, top)
                solved.append((base, row, "ok", None))
            except PerfchainError as exc:
                solved.append((base, None, "failed", " ".join(str(exc).split())))
        for k, pa in enumerate(grid.ambient_pressure):
            for base, row, status, reason in solved:
                if row is None:
                    r = dict(base, ambient_pressure=pa)
                elif k == 0:
                    r = row
                elif _derivable(row):
                    r = _with_ambient(row, pa)
                else:  # the core changed what ambient pressure touches: solve again
                    res = performance_of(prop, pc, ambient_pressure=pa, flow=base["flow"],
                                         system=system_of(i), **{grid.exit_key: base[grid.exit_key]})
                    r = flatten_result(res.to_dict(), top)
                if grid.altitude is not None:
                    r = dict(r, altitude=grid.altitude[k])
                rows.append(dict(r, status=status, reason=reason))
    return _canonical(rows)


def _compute_to_file(task):
    """Compute a chunk and write its checkpoint file here (a local worker); return its column kinds."""
    inner, path = task
    rows = _compute_chunk(inner)
    _write_atomic(Path(path), lambda fh: fh.write(json.dumps(rows).encode()))
    return _kinds_of(rows)


def _cluster_chunk(task):
    """A chunk on a cluster worker: refuse to run if this worker's perfchain code differs."""
    compute, inner, expected = task
    mine = code_fingerprint()
    if mine != expected:
        raise InputError("cluster", "worker", f"workers that run this perfchain code (fingerprint "
                         f"{expected}); a worker runs {mine}")
    return compute(inner)


def _compute_frame(task):
    """:func:`_compute_chunk` as a pandas DataFrame (built where the chunk was solved)."""
    import pandas as pd

    return pd.DataFrame(_compute_chunk(task))


_PLAIN = (float, str, bool, type(None))


def _canonical(rows: list) -> list:
    """One form for fresh and reloaded chunks: every value as the JSON round trip gives it.

    Plain floats, text, booleans and None already are (the round trip is exact for
    floats); anything else (a numpy scalar, a tuple) goes through it.
    """
    for r in rows:
        for k, v in r.items():
            if type(v) not in _PLAIN:
                r[k] = json.loads(json.dumps(v, allow_nan=True))
    return rows


@lru_cache(maxsize=None)
def _flat_keys():
    from perfchain.performance.chain import Performance, _OPTIONAL
    from perfchain.nozzle.stations import Station

    fields = [k for k in Performance.__dataclass_fields__]
    station = [k for k in Station.__dataclass_fields__ if k not in ("name", "composition")]
    # one string object per column name, shared by every row (pickles once per chunk)
    names = {(f, k): sys.intern(f"{f}_{k}") for f in fields for k in station + ["composition"]}
    return fields, station, tuple(_OPTIONAL), names


def _flat(res, top: int) -> dict:
    """``flatten_result(res.to_dict(), top)`` for a Performance, without the nested dicts."""
    from perfchain.nozzle.stations import Station

    fields, station, optional, names = _flat_keys()
    if any(getattr(res, k) is not None for k in optional):
        return flatten_result(res.to_dict(), top)
    out = {}
    for key in fields:
        v = getattr(res, key)
        if isinstance(v, Station):
            d = v.__dict__
            for k in station:
                x = d[k]
                out[names[key, k]] = float(x) if type(x) is int else x
            if top:
                out[names[key, "composition"]] = _json_object(
                    sorted(v.composition.items(), key=lambda kv: -kv[1])[:top])
        elif v is None and key in optional:
            continue
        else:
            out[key] = float(v) if isinstance(v, int) and not isinstance(v, bool) else v
    return out


# --------------------------------------------------------------------------- running
def provenance(grid: SweepGrid, top: int = COMPOSITION_TOP, options: dict | None = None) -> dict:
    """Versions, data files and exact inputs of a sweep (no time stamps, so reruns match)."""
    import cantera

    from perfchain.thermo.products import CONDENSED_DATA, GAS_DATA

    meta = {"perfchain": __version__, "cantera": cantera.__version__,
            "thermo_data": {"gas": GAS_DATA, "condensed": CONDENSED_DATA,
                            "source": "NASA Glenn polynomials as shipped with Cantera " + cantera.__version__},
            "inputs": asdict(grid), "grid_order": list(grid.dims), "points": grid.size,
            "composition_top": top, "units_system": "SI"}
    if options is not None:
        meta["options"] = options  # the texts as given (how many workers ran is left out)
    return meta


def code_fingerprint() -> str:
    """Hash of perfchain's own source and ingredient data (16 hex digits).

    Checkpoint chunks carry it in their names, so chunks computed by other code are
    never mixed into a table, and cluster workers must report the same value.
    """
    return _fingerprint(str(Path(__file__).resolve().parent.parent))


@lru_cache(maxsize=4)
def _fingerprint(package_dir: str) -> str:
    from perfchain.propellants.ingredients import DATA_FILE

    h = hashlib.sha256()
    for path in sorted(Path(package_dir).rglob("*.py")) + [Path(DATA_FILE)]:
        h.update(path.name.encode())
        h.update(path.read_bytes())
    return h.hexdigest()[:16]


def _digest(grid: SweepGrid, top: int, solves: int) -> str:
    meta = provenance(grid, top)
    meta["chunk_solves"] = solves
    meta["code"] = code_fingerprint()
    return hashlib.sha256(json.dumps(meta, sort_keys=True).encode()).hexdigest()[:16]


def _check_cluster_code(client, address):
    """Refuse a cluster whose workers run other perfchain code (their tables would differ).

    A worker that cannot be reached right now (one that just died and is being
    restarted) is skipped here; every chunk checks its worker's code again anyway
    (:func:`_cluster_chunk`).
    """
    mine = code_fingerprint()
    theirs = client.run(code_fingerprint, on_error="return")
    bad = {w: f for w, f in theirs.items() if isinstance(f, str) and f != mine}
    if bad:
        worker, fp = next(iter(bad.items()))
        raise InputError("cluster", address, f"workers that run this perfchain code (fingerprint {mine}); "
                         f"worker {worker} runs {fp}")


def _write_atomic(path: Path, write):
    path = Path(path)
    fd, tmp = tempfile.mkstemp(dir=path.parent, prefix=f".{path.name}.", suffix=".tmp")
    try:
        with os.fdopen(fd, "wb") as fh:
            write(fh)
            fh.flush()
            os.fsync(fh.fileno())
        umask = os.umask(0)
        os.umask(umask)
        os.chmod(tmp, 0o666 & ~umask)
        os.replace(tmp, path)
    except BaseException:
        if os.path.exists(tmp):
            os.unlink(tmp)
        raise


def _executor(workers: int, cluster):
    if cluster is not None:
        try:
            from distributed import Client
        except ImportError:
            raise InputError("cluster", cluster, 'an installed Dask (pip install "dask[distributed]")') from None
        if isinstance(cluster, Client):
            return cluster, False
        try:
            return Client(cluster, timeout="10s"), True
        except (OSError, TimeoutError, ValueError) as exc:
            raise InputError("cluster", cluster, f"the address of a running Dask scheduler ({exc})") from None
    if workers > 1:
        import signal
        from concurrent.futures import ProcessPoolExecutor

        return ProcessPoolExecutor(workers, initializer=signal.signal,
                                   initargs=(signal.SIGINT, signal.SIG_IGN)), True
    return None, False


def _run(grid, *, workers=1, cluster=None, parts=None, progress=None, top=COMPOSITION_TOP,
         solves=CHUNK_SOLVES, on_chunk=None, as_frames=False, kinds=None):
    """Compute every chunk not on disk; return the ordered list of chunk row lists or file paths.

    ``on_chunk(n, rows)``, if given, is called in this process as chunk n lands (so
    its share of the table building overlaps the workers' solving). ``as_frames``
    (no checkpoint folder): each worker returns its chunk as a pandas DataFrame, so
    the table is built in the workers, in parallel. ``kinds`` (a dict), if given,
    receives the column kinds of every chunk computed here (so the table writer need
    not read the chunk back for them); with a checkpoint folder and local workers,
    each worker writes its own chunk file.
    """
    if as_frames and parts is not None:
        raise ValueError("as_frames needs parts=None: checkpoint files hold rows")
    compute = _compute_frame if as_frames else _compute_chunk
    if isinstance(workers, bool) or not isinstance(workers, int) or workers < 1:
        raise InputError("workers", workers, "a whole number of worker processes, at least 1")
    tasks = list(_chunks(grid, solves))
    digest = _digest(grid, top, solves)
    results: list = [None] * len(tasks)
    names = [f"{digest}-{n:05d}.json" for n in range(len(tasks))]
    todo = []
    for n, name in enumerate(names):
        if parts is not None and (Path(parts) / name).exists():
            results[n] = Path(parts) / name
        else:
            todo.append(n)
    sizes = [len(t) * len(grid.flow) * len(grid.ambient_pressure) for t in tasks]
    show = sys.stderr.isatty() if progress is None else bool(progress)
    from tqdm import tqdm

    bar = tqdm(total=grid.size, initial=grid.size - sum(sizes[n] for n in todo), unit="pt",
               disable=not show, file=sys.stderr, desc="sweep")
    gd = asdict(grid)

    def land(n, rows):
        if parts is not None:
            path = Path(parts) / names[n]
            _write_atomic(path, lambda fh: fh.write(json.dumps(rows).encode()))
            results[n] = path
        else:
            results[n] = rows
        if kinds is not None and not as_frames:
            kinds[n] = _kinds_of(rows)
        if on_chunk is not None:
            on_chunk(n, rows)
        bar.update(sizes[n])

    def landed_file(n, chunk_kinds):   # a local worker wrote chunk n itself
        results[n] = Path(parts) / names[n]
        if kinds is not None:
            kinds[n] = chunk_kinds
        bar.update(sizes[n])

    if workers > 1 and cluster is None and todo:
        # warm this process (data, tables, compiled kernel) before the pool forks it, so the
        # workers start hot instead of each loading everything again
        _compute_chunk((gd, tasks[todo[0]][:1], top))
    pool, own = _executor(workers, cluster)
    try:
        if pool is None:
            for n in todo:
                land(n, compute((gd, tasks[n], top)))
        elif cluster is not None:
            from distributed import as_completed

            _check_cluster_code(pool, cluster if isinstance(cluster, str) else "client")
            fp = code_fingerprint()
            futs = {pool.submit(_cluster_chunk, (compute, (gd, tasks[n], top), fp), pure=False): n
                    for n in todo}
            for fut in as_completed(list(futs)):
                land(futs.pop(fut), fut.result())  # drop the future so its rows can be freed
                fut.release()
        else:
            from concurrent.futures import as_completed

            own_files = parts is not None and on_chunk is None
            if own_files:
                futs = {pool.submit(_compute_to_file, ((gd, tasks[n], top), str(Path(parts) / names[n]))): n
                        for n in todo}
            else:
                futs = {pool.submit(compute, (gd, tasks[n], top)): n for n in todo}
            for fut in as_completed(list(futs)):
                # drop the future so its rows can be freed
                (landed_file if own_files else land)(futs.pop(fut), fut.result())
                del fut
    finally:
        bar.close()
        if own:
            if cluster is not None:
                pool.close()
            else:
                pool.shutdown(wait=True, cancel_futures=True)
    return results, digest


def _load(item):
    if isinstance(item, Path):
        return json.loads(item.read_text())
    return item


def sweep(oxidizer, fuel, *, mixture_ratio, chamber_pressure, area_ratio=None, exit_pressure=None,
          ambient_pressure=None, altitude=None, flow="shifting", workers: int = 1, cluster=None,
          checkpoint=None, progress=None, confirm=False, composition_top: int = COMPOSITION_TOP,
          chunk_solves: int = CHUNK_SOLVES):
    """Performance over a full grid, as a pandas DataFrame (one row per point, SI units).

    Parameters
    ----------
    oxidizer, fuel, mixture_ratio, chamber_pressure, area_ratio, exit_pressure,
    ambient_pressure, altitude, flow, confirm
        As in :func:`make_grid`.
    workers : int
        Local worker processes (1: this process).
    cluster : str or distributed.Client, optional
        Address of a running Dask scheduler (needs ``dask[distributed]``).
    checkpoint : str or Path, optional
        Folder for finished chunks; a rerun of the same sweep reuses them.
    progress : bool, optional
        Progress bar; by default only on a terminal.
    composition_top : int
        Species kept per station composition column (0: none).
    chunk_solves : int
        Solves per chunk (batch, checkpoint and progress unit).

    Returns
    -------
    pandas.DataFrame
        Columns as :func:`flatten_result`, plus ``status`` and ``reason``;
        units in ``df.attrs["units"]``, provenance in ``df.attrs["perfchain"]``.

    Examples
    --------
    Ideal shifting LOX/RP-1 at O/F 2.56 and 1000 psia to 1 atm is about 300 s
    at sea level (Sutton & Biblarz, Rocket Propulsion Elements, Table 5-5;
    from memory, +/- 1 %); a point with p_e above p_c keeps its row:

    >>> df = sweep("LOX", "RP-1", mixture_ratio="2.56", chamber_pressure="1000 psi",
    ...            exit_pressure="1 atm,100 bar")
    >>> list(df.status), bool(abs(df.isp_ambient[0] / 300 - 1) < 0.01)
    (['ok', 'failed'], True)
    """
    import numpy as np
    import pandas as pd

    grid = make_grid(oxidizer, fuel, mixture_ratio=mixture_ratio, chamber_pressure=chamber_pressure,
                     area_ratio=area_ratio, exit_pressure=exit_pressure, ambient_pressure=ambient_pressure,
                     altitude=altitude, flow=flow, confirm=confirm)
    if checkpoint is not None:
        Path(checkpoint).mkdir(parents=True, exist_ok=True)
    if isinstance(chunk_solves, bool) or not isinstance(chunk_solves, int) or chunk_solves < 1:
        raise InputError("chunk_solves", chunk_solves, "a whole number of solves per chunk, at least 1")
    if checkpoint is None:   # each worker hands back its chunk as a frame: the table builds in parallel
        frames, _ = _run(grid, workers=workers, cluster=cluster, progress=progress, top=composition_top,
                         solves=chunk_solves, as_frames=True)
        cols = _frame_columns(grid, frames)
    else:
        got: dict = {}
        results, _ = _run(grid, workers=workers, cluster=cluster, parts=checkpoint, progress=progress,
                          top=composition_top, solves=chunk_solves,
                          on_chunk=lambda n, rows: got.__setitem__(n, pd.DataFrame(rows)))
        chunks = [_load(item) for item in results]
        cols = _columns(grid, chunks)
        frames = [got[n] if n in got else pd.DataFrame(c) for n, c in enumerate(chunks)]
    df = pd.concat(frames, ignore_index=True).reindex(columns=list(cols))
    for c, kind in cols.items():
        if kind == "float64" and df[c].dtype != np.float64:
            df[c] = df[c].astype("float64")
        elif kind == "string" and df[c].isna().any():   # a missing text is None, as in the rows
            df[c] = df[c].astype(object).where(df[c].notna(), None)
    df.attrs["units"] = {c: column_unit(c) for c in cols}
    df.attrs["perfchain"] = provenance(grid, composition_top)
    return df


def to_xarray(df, grid: SweepGrid | None = None):
    """The table as an xarray Dataset over the grid dimensions (needs xarray).

    Returns None when xarray is not installed.
    """
    try:
        import xarray  # noqa: F401
    except ImportError:
        return None
    dims = grid.dims if grid is not None else {
        k: tuple(dict.fromkeys(df[k])) for k in df.attrs["perfchain"]["grid_order"]}
    return df.set_index(list(dims)).to_xarray()


# --------------------------------------------------------------------------- columns & files
def _kinds_of(rows) -> dict:
    """Column name -> kind of its first value that is not None (or None), in first-seen order."""
    kinds: dict = {}
    open_: set = set()          # keys seen only with None so far
    for row in rows:
        if row.keys() <= kinds.keys() and all(row[k] is None for k in open_ if k in row):
            continue            # nothing new in this row (most rows of a table)
        for k, v in row.items():
            if k not in kinds or kinds[k] is None:
                kinds[k] = None if v is None else ("bool" if isinstance(v, bool) else
                                                   "float64" if isinstance(v, (int, float)) else "string")
                (open_.add if v is None else open_.discard)(k)
    return kinds


def _columns(grid, chunks, known=None) -> dict:
    """Column name -> type (float64, bool, string), grid columns first, then first-seen order.

    ``known`` maps a chunk's index to its :func:`_kinds_of`, for chunks not to be read again.
    """
    names = ["oxidizer", "fuel", "mixture_ratio", "chamber_pressure", grid.exit_key, "ambient_pressure"]
    names += (["altitude"] if grid.altitude is not None else []) + ["flow", "status", "reason"]
    kinds: dict = {}
    for n, rows in enumerate(chunks):
        chunk = (known or {}).get(n)
        for k, v in (chunk if chunk is not None else _kinds_of(_load(rows))).items():
            if k not in kinds or kinds[k] is None:
                kinds[k] = v
    for k in kinds:
        if k not in names:
            names.append(k)
    return {k: kinds.get(k) or ("string" if k in ("reason", "status") else "float64") for k in names}


def _frame_columns(grid, frames) -> dict:
    """:func:`_columns` for chunks held as DataFrames (built from the same rows)."""
    import pandas as pd

    names = ["oxidizer", "fuel", "mixture_ratio", "chamber_pressure", grid.exit_key, "ambient_pressure"]
    names += (["altitude"] if grid.altitude is not None else []) + ["flow", "status", "reason"]
    kinds: dict = {}
    for f in frames:
        if all(kinds.get(c) is not None for c in f.columns):
            continue            # nothing new in this chunk (most chunks of a table)
        for c, dtype in f.dtypes.items():
            if kinds.get(c) is not None:
                continue
            if pd.api.types.is_bool_dtype(dtype):
                kind = "bool"
            elif pd.api.types.is_float_dtype(dtype):
                kind = "float64"
            elif pd.api.types.is_string_dtype(dtype) and not pd.api.types.is_object_dtype(dtype):
                kind = "string"      # pandas infers a text dtype only from text values
            else:
                v = next((x for x in f[c].to_numpy() if x is not None and x == x), None)
                kind = None if v is None else ("bool" if isinstance(v, bool) else
                                               "float64" if isinstance(v, (int, float)) else "string")
            kinds[c] = kind
    for k in kinds:
        if k not in names:
            names.append(k)
    return {k: kinds.get(k) or ("string" if k in ("reason", "status") else "float64") for k in names}


_UNITS = (("pressure", "Pa"), ("temperature", "K"), ("bulk_density", "kg/m^3"), ("density_isp", "kg s/m^3"),
          ("density", "kg/m^3"), ("enthalpy", "J/kg"), ("entropy", "J/(kg K)"), ("molar_mass", "kg/kmol"),
          ("cp", "J/(kg K)"), ("sound_speed", "m/s"), ("velocity", "m/s"), ("cstar", "m/s"),
          ("isp", "s"), ("altitude", "m"), ("fuel_percent", "%"))
_TEXT = ("oxidizer", "fuel", "flow", "status", "reason")


def column_unit(name: str) -> str:
    """SI unit of a table column; ``"1"`` for ratios and Mach numbers, ``""`` for text.

    >>> column_unit("exit_temperature"), column_unit("isp_vacuum"), column_unit("exit_mach")
    ('K', 's', '1')
    """
    if name in _TEXT or name.endswith("_composition"):
        return ""
    for part, unit in _UNITS:
        if part in name and not name.endswith("_ratio"):
            return unit
    return "1"


def _text(v):
    if v is None or (isinstance(v, float) and math.isnan(v)):
        return ""
    return repr(v) if isinstance(v, float) else str(v)


def _write_csv(fh, cols, chunks):
    import csv
    import io

    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(cols)
    for rows in chunks:
        for r in _load(rows):
            w.writerow([_text(r.get(c)) for c in cols])
        fh.write(buf.getvalue().encode())
        buf.seek(0)
        buf.truncate()


def _write_json(fh, cols, chunks, meta):
    head = json.dumps({"metadata": meta, "columns": list(cols)}, indent=1)[:-2]
    fh.write((head + ',\n "rows": [').encode())
    first = True
    for rows in chunks:
        for r in _load(rows):
            row = {c: (None if isinstance(r.get(c), float) and math.isnan(r[c]) else r.get(c)) for c in cols}
            fh.write(((" " if first else ",\n  ") + json.dumps(row, allow_nan=False)).encode())
            first = False
    fh.write(b"]\n}\n")


def _write_parquet(fh, cols, chunks, meta):
    import pyarrow as pa
    import pyarrow.parquet as pq

    types = {"float64": pa.float64(), "bool": pa.bool_(), "string": pa.string()}
    schema = pa.schema([(c, types[k]) for c, k in cols.items()],
                       metadata={b"perfchain": json.dumps(meta).encode()})
    with pq.ParquetWriter(fh, schema) as w:
        for rows in chunks:
            rows = _load(rows)
            w.write_table(pa.Table.from_pydict({c: [r.get(c) for r in rows] for c in cols}, schema=schema))


FORMATS = {".csv": "CSV", ".json": "JSON", ".parquet": "Parquet"}


def check_out(out) -> Path:
    """Refuse an output path early: unknown extension, missing or read-only folder."""
    path = Path(out)
    if path.suffix.lower() not in FORMATS:
        raise InputError("out", str(out), "a file name ending in " + ", ".join(FORMATS))
    if path.suffix.lower() == ".parquet":
        try:
            import pyarrow  # noqa: F401
        except ImportError:
            raise InputError("out", str(out), "a .csv or .json file (Parquet needs pyarrow installed)") from None
    parent = path.parent if str(path.parent) else Path(".")
    if path.is_dir() or not parent.is_dir() or not os.access(parent, os.W_OK | os.X_OK):
        raise InputError("out", str(out), "a file path in an existing, writable folder")
    return path


def sweep_to_file(out, grid: SweepGrid, *, workers=1, cluster=None, progress=None,
                  top=COMPOSITION_TOP, options=None, keep_parts=False, solves=CHUNK_SOLVES) -> Path:
    """Run a sweep with checkpoints in ``<out>.parts/`` and write the table atomically.

    The table is streamed chunk by chunk from the checkpoint files, so memory
    stays near one chunk whatever the grid size. CSV gets a sidecar
    ``<out>.meta.json`` (units, provenance); Parquet keeps them in its schema
    metadata (key ``perfchain``); JSON in its ``metadata`` member.
    """
    path = check_out(out)
    parts = Path(str(path) + ".parts")
    try:
        parts.mkdir(exist_ok=True)
    except OSError:
        raise InputError("out", str(out), "a path whose .parts checkpoint folder can be made") from None
    known: dict = {}
    results, digest = _run(grid, workers=workers, cluster=cluster, parts=parts, progress=progress,
                           top=top, solves=solves, kinds=known)
    cols = _columns(grid, results, known)
    meta = provenance(grid, top, options)
    meta["units"] = {c: column_unit(c) for c in cols}
    ext = path.suffix.lower()
    if ext == ".csv":
        side = Path(str(path) + ".meta.json")
        _write_atomic(side, lambda fh: fh.write((json.dumps(meta, indent=1) + "\n").encode()))
        _write_atomic(path, lambda fh: _write_csv(fh, cols, results))
    elif ext == ".json":
        _write_atomic(path, lambda fh: _write_json(fh, cols, results, meta))
    else:
        _write_atomic(path, lambda fh: _write_parquet(fh, cols, results, meta))
    if not keep_parts:
        for item in results:
            item.unlink(missing_ok=True)
        for stale in parts.glob(f".{digest}-*.tmp"):   # half-written chunks of a killed run
            stale.unlink(missing_ok=True)
        try:
            parts.rmdir()
        except OSError:
            pass  # other sweeps' chunks live here too
    return path
