"""Uncertainty of an operating point: its inputs sampled, solved together on the batch solver.

:func:`point_uncertainty` checks the varied inputs (:mod:`perfchain.inputs.uncertainty`),
solves the nominal point, and pushes every sample through :func:`solve_samples`: samples that
share a chamber and nozzle (they differ only in efficiencies or thrust) share one ideal solve,
the ideal solves go through :func:`perfchain.performance.batched.expansion_batch` in chunks (in
this process or on worker processes; rows never mix, so the numbers do not depend on the
chunking or the number of workers), and the delivered values of a chunk are computed as arrays
by :func:`perfchain.performance.losses.delivered`, the function :func:`~perfchain.performance.
delivered.deliver` applies to one point. A sample that fails keeps its place, with its reason.
"""

from __future__ import annotations

import numpy as np

from perfchain.errors import InputError, PerfchainError
from perfchain.inputs.point import EFFICIENCY_KEYWORDS
from perfchain.inputs.uncertainty import check_draws, check_name, distribution, inside, vary_items
from perfchain.uncertainty.propagation import propagate

__all__ = ["point_uncertainty", "solve_samples", "POINT_INPUTS", "point_outputs"]

#: inputs of a point that may be varied (keywords of perfchain.point)
POINT_INPUTS = ("mixture_ratio", "equivalence_ratio", "fuel_percent", "chamber_pressure", "area_ratio",
                "exit_pressure", "ambient_pressure", "altitude", "contraction_ratio", "ammonia_dissociation",
                "oxidizer.enthalpy", "fuel.enthalpy",
                "cstar_efficiency", "divergence_factor", "cf_efficiency", "nozzle_half_angle", "thrust")
_IDEAL = POINT_INPUTS[:12]
#: an ingredient's enthalpy is varied per mole of its formula unit [J/mol] (as data sources state it)
_ENTHALPY = {"oxidizer.enthalpy": "oxidizer", "fuel.enthalpy": "fuel"}
#: chunk size of the sample solves (ideal solves per batch)
CHUNK = 512


def point_outputs(result) -> tuple:
    """The outputs sampled for a point: JSON keys of its result (dotted for nested blocks).

    >>> class R: delivered = None; sizing = None
    >>> point_outputs(R())[:3]
    ('chamber.temperature', 'cstar', 'cf_vacuum')
    """
    keys = ("chamber.temperature", "cstar", "cf_vacuum", "cf_ambient", "isp_vacuum", "isp_ambient")
    if result.delivered is not None:
        keys += ("delivered.cstar", "delivered.isp_vacuum", "delivered.isp_ambient")
    if result.sizing is not None:
        keys += ("sizing.mass_flow", "sizing.throat_diameter")
    return keys


def _nominal(key: str, args: dict, name: str | None = None):
    """The nominal SI value of a varied input in the point's checked arguments (None if not given)."""
    if key in EFFICIENCY_KEYWORDS:
        return (args.get("losses") or {}).get(EFFICIENCY_KEYWORDS[key])
    if key in _ENTHALPY and _ENTHALPY[key] in args:
        ing = args[_ENTHALPY[key]]
        return ing.enthalpy * ing.molar_mass / 1000.0
    if key in _IDEAL and key not in args:
        raise InputError(name or key, "varied", "an input this point is given: " + ", ".join(
            k for k in POINT_INPUTS if k in args or k in EFFICIENCY_KEYWORDS or k == "thrust"))
    return args.get(key)


def _with(args: dict, key: str, x: float) -> dict:
    """A copy of the point's arguments with one input set [SI]."""
    out = dict(args)
    if key in _ENTHALPY:
        from dataclasses import replace

        ing = args[_ENTHALPY[key]]
        out[_ENTHALPY[key]] = replace(ing, enthalpy=float(x) / (ing.molar_mass / 1000.0))
    elif key in EFFICIENCY_KEYWORDS:
        out["losses"] = {**(args.get("losses") or {}), EFFICIENCY_KEYWORDS[key]: float(x)}
    else:
        out[key] = float(x)
    return out


def point_uncertainty(args: dict, vary, *, samples=None, seed=None, sensitivity="local", separation=None,
                      workers=1, chunk=CHUNK, where="vary"):
    """Spread of a point's results when some of its inputs are uncertain.

    Parameters
    ----------
    args : dict
        The point, checked: :func:`perfchain.inputs.point_args`.
    vary : mapping or list of str
        Input -> distribution text (``{"mixture_ratio": "+/-2%"}`` or ``["mixture_ratio=+/-2%"]``);
        see :mod:`perfchain.inputs.uncertainty`. An efficiency or thrust varied but not given
        is nominal at its distribution's median.
    samples : int, optional
        Samples behind the statistics (default 4000).
    seed : int, optional
        Seed of the scrambled Sobol sequence (default 0).
    sensitivity : str
        ``"local"`` (one-at-a-time slopes, 2 d + 1 extra solves) or ``"sobol"``
        (first-order and total indices, samples x (d + 2) solves).
    separation : str, optional
        As in :func:`perfchain.point`.
    workers : int
        Worker processes for the solves; the numbers are the same for any count.
    chunk : int
        Distinct ideal solves per batch (and per task on a worker).
    where : str
        Put before an input's name in messages (``vary.mixture_ratio``).

    Returns
    -------
    (Performance, Propagation)
        The nominal point and the samples' statistics (SI).

    Examples
    --------
    See :func:`perfchain.point_uncertainty` (the Python face) and ``tests/test_uncertainty.py``.
    """
    from perfchain.performance.chain import performance

    n, seed, method = check_draws(samples, seed, sensitivity)
    names, dists, base = [], [], dict(args)
    for key, spec in vary_items(vary, where):
        check_name(key, POINT_INPUTS, where)
        nominal = _nominal(key, base, f"{where}.{key}")
        dist = distribution(spec, "enthalpy" if key in _ENTHALPY else key, nominal, name=f"{where}.{key}")
        if nominal is None:
            nominal = float(dist.ppf(0.5))
            base = _with(base, key, nominal)
        names.append(key)
        dists.append(dist)
    if not names:
        raise InputError("vary", vary, "at least one input and its distribution, e.g. 'mixture_ratio=+/-2%'")
    nominal_result = performance(**base, separation=separation)
    outputs = point_outputs(nominal_result)
    nominal = [_nominal(k, base) for k in names]

    def model(X):
        return solve_samples(base, names, X, outputs, separation=separation, workers=workers, chunk=chunk)

    return nominal_result, propagate(model, names, dists, nominal, samples=n, seed=seed, method=method)


def solve_samples(base: dict, names, X, outputs, *, separation=None, workers=1, chunk=CHUNK):
    """Every sample of a point solved: the model of :func:`perfchain.uncertainty.propagation.propagate`.

    Parameters
    ----------
    base : dict
        The nominal point's checked arguments (SI).
    names : sequence of str
        The varied inputs (columns of X).
    X : numpy.ndarray
        Samples [SI], shape (m, d).
    outputs : sequence of str
        Output keys (:func:`point_outputs`).
    separation : str, optional
    workers : int
    chunk : int
        Distinct ideal solves per task.

    Returns
    -------
    (dict, list)
        output -> values (m,) [SI] (NaN where a sample failed), and per sample None or its reason.
    """
    from perfchain.study.execution import executor

    m = len(X)
    reasons = [None] * m
    ok = np.ones(m, bool)
    for j, key in enumerate(names):
        bad = ~inside("enthalpy" if key in _ENTHALPY else key, X[:, j])
        for i in np.nonzero(bad & ok)[0]:
            reasons[i] = f"{key} outside its allowed range ({X[i, j]:.6g})"
        ok &= ~bad
    ideal = [j for j, k in enumerate(names) if k in _IDEAL]
    keys: dict = {}
    for i in np.nonzero(ok)[0]:
        keys.setdefault(tuple(X[i, ideal].tolist()), []).append(int(i))
    groups = list(keys.values())
    chunks, size, at = [], 0, []
    for g in groups:
        at.append(g)
        size += 1
        if size >= chunk:
            chunks.append(at)
            at, size = [], 0
    if at:
        chunks.append(at)
    sent = _portable(base) if pool_wanted(workers, len(chunks)) else base
    tasks = [(sent, tuple(names), X[[i for g in c for i in g]], [len(g) for g in c], tuple(outputs), separation)
             for c in chunks]
    pool, own = executor(int(workers), None) if pool_wanted(workers, len(tasks)) else (None, False)
    try:
        results = list(pool.map(_solve_chunk, *zip(*tasks))) if pool is not None else \
            [_solve_chunk(*t) for t in tasks]
    finally:
        if own:
            pool.shutdown()
    values = {k: np.full(m, np.nan) for k in outputs}
    for c, (vals, why) in zip(chunks, results):
        rows = [i for g in c for i in g]
        for k in outputs:
            values[k][rows] = vals[k]
        for i, r in zip(rows, why):
            reasons[i] = r
    return values, reasons


def pool_wanted(workers: int, tasks: int) -> bool:
    """Whether the samples go to worker processes: more than one worker and more than one task.

    >>> pool_wanted(2, 1), pool_wanted(2, 3), pool_wanted(1, 3)
    (False, True, False)
    """
    return int(workers) > 1 and tasks > 1


_RECORD = "ingredient record"


def _portable(base: dict) -> dict:
    """The point's arguments with every Ingredient as its plain record (picklable, for worker processes)."""
    from perfchain.propellants.ingredients import Ingredient
    from perfchain.study.grid import ingredient_record

    def plain(x):
        return (_RECORD, ingredient_record(x)) if isinstance(x, Ingredient) else x

    out = {k: plain(v) for k, v in base.items()}
    if base.get("propellant") is not None:
        p = base["propellant"]
        out["propellant"] = ("propellant", plain(p.oxidizer), plain(p.fuel), p.mixture_ratio,
                             tuple((plain(i), w) for i, w in p.parts))
    return out


def _restored(base: dict) -> dict:
    """The inverse of :func:`_portable` (records -> equal Ingredients, the same Propellant)."""
    from perfchain.propellants.mixture import Propellant
    from perfchain.study.grid import from_record

    def back(x):
        return from_record(x[1]) if isinstance(x, tuple) and len(x) == 2 and x[0] == _RECORD else x

    out = {k: back(v) for k, v in base.items()}
    p = base.get("propellant")
    if isinstance(p, tuple) and p and p[0] == "propellant":
        out["propellant"] = Propellant(back(p[1]), back(p[2]), p[3], tuple((back(i), w) for i, w in p[4]))
    return out


def _solve_chunk(base, names, X, sizes, outputs, separation):
    """One chunk of samples (rows grouped by shared ideal inputs, ``sizes`` rows a group) -> values, reasons."""
    base = _restored(base)
    rows = [dict(base) for _ in range(len(X))]
    for r, x in zip(rows, X):
        for key, v in zip(names, x):
            r.update(_with(r, key, v))
    firsts = np.concatenate([[0], np.cumsum(sizes)[:-1]]).astype(int)
    ideals = _ideal([rows[f] for f in firsts], separation)
    per_row = [ideals[g] for g, s in enumerate(sizes) for _ in range(s)]
    return _outputs(rows, per_row, outputs, separation)


def _ideal(points: list, separation) -> list:
    """Ideal results of distinct points (Performance or the error), batch solver where it applies."""
    from perfchain.atmosphere import pressure
    from perfchain.performance.batched import expansion_batch
    from perfchain.performance.chain import performance
    from perfchain.propellants.mixture import make_propellant

    out: list = [None] * len(points)
    batch = [k for k, p in enumerate(points) if p.get("contraction_ratio") is None
             and p.get("ammonia_dissociation") is None]
    for k in sorted(set(range(len(points))) - set(batch)):
        p = {key: v for key, v in points[k].items() if key not in ("losses", "thrust", "thrust_at")}
        try:
            out[k] = performance(**p, separation=separation)
        except PerfchainError as exc:
            out[k] = exc
    if not batch:
        return out
    p0 = points[batch[0]]
    exit_key = "area_ratio" if "area_ratio" in p0 else "exit_pressure"
    mix = next((key for key in ("mixture_ratio", "equivalence_ratio", "fuel_percent") if key in p0), None)
    props, triples = {}, []
    for k in batch:
        p = points[k]
        mk = (p.get(mix), p["oxidizer"].enthalpy, p["fuel"].enthalpy) if mix else None
        if mk not in props:
            try:
                props[mk] = p["propellant"] if mix is None else make_propellant(p["oxidizer"], p["fuel"],
                                                                                **{mix: mk[0]})
            except PerfchainError as exc:
                props[mk] = exc
        triples.append((props[mk], p["chamber_pressure"], p[exit_key]))
    solvable = [n for n, t in enumerate(triples) if not isinstance(t[0], Exception)]
    for n, t in enumerate(triples):
        if isinstance(t[0], Exception):
            out[batch[n]] = t[0]
    exps = expansion_batch([triples[n] for n in solvable], exit_key=exit_key, flow=p0["flow"])
    by_pa: dict = {}
    for j, n in enumerate(solvable):
        p = points[batch[n]]
        pa = float(pressure(p["altitude"])) if "altitude" in p else p["ambient_pressure"]
        by_pa.setdefault(pa, []).append(j)
    for pa, js in by_pa.items():
        got = exps.at_ambient(pa, separation, only=js)
        for j in js:
            out[batch[solvable[j]]] = got[j]
    return out


class _Factors:
    """The efficiency factors of many samples as arrays: what :func:`~perfchain.performance.losses.delivered`
    reads of a LossModel (``cstar_efficiency``, ``cf_efficiency``, ``cf_factor``)."""

    def __init__(self, models):
        self.cstar_efficiency = np.array([m.cstar_efficiency for m in models])
        self.cf_efficiency = np.array([m.cf_efficiency for m in models])
        self.cf_factor = np.array([m.cf_factor for m in models])


def _outputs(rows, ideals, outputs, separation):
    """Output values of every row from its ideal result: delivered values as arrays where they can be."""
    from perfchain.performance.delivered import deliver
    from perfchain.performance.losses import LossModel, delivered
    from perfchain.performance.sizing import size_thrust_chamber

    m = len(rows)
    vals = {k: np.full(m, np.nan) for k in outputs}
    why: list = [None] * m
    good = [i for i in range(m) if not isinstance(ideals[i], Exception)]
    for i in range(m):
        if isinstance(ideals[i], Exception):
            why[i] = str(ideals[i])
    for k in outputs:
        if "." not in k:
            vals[k][good] = [getattr(ideals[i], k) for i in good]
    vals["chamber.temperature"][good] = [ideals[i].chamber.temperature for i in good]
    if not any(k.startswith(("delivered.", "sizing.")) for k in outputs):
        return vals, why
    models, fast, slow = {}, [], []
    for i in good:
        try:
            models[i] = LossModel(**(rows[i].get("losses") or {}))
        except PerfchainError as exc:
            why[i] = str(exc)
            continue
        (slow if ideals[i].chamber.condensed_mass_fraction > 0 else fast).append(i)
    for i in slow:   # condensed products: the two-phase loss needs the whole deliver()
        try:
            r = deliver(ideals[i], models[i], thrust=rows[i]["thrust"], thrust_at=rows[i]["thrust_at"],
                        separation=separation)
        except PerfchainError as exc:
            why[i] = str(exc)
            continue
        for k in outputs:
            block, _, field = k.partition(".")
            if block in ("delivered", "sizing"):
                vals[k][i] = getattr(r, block)[field]
    if not fast:
        return vals, why
    P = [ideals[i] for i in fast]
    arr = {a: np.array([getattr(p, a) for p in P]) for a in ("cstar", "cf_vacuum", "area_ratio", "chamber_pressure",
                                                               "ambient_pressure")}
    pe = np.array([p.exit.pressure for p in P])
    f = _Factors([models[i] for i in fast])
    try:
        d = delivered(arr["cstar"], arr["cf_vacuum"], arr["area_ratio"], pe, arr["chamber_pressure"],
                      arr["ambient_pressure"], f)
    except PerfchainError as exc:
        for i in fast:
            why[i] = str(exc)
        return vals, why
    cut = [n for n, p in enumerate(P) if not p.flows_full]
    if cut:   # a separated nozzle: delivered ambient values of the nozzle cut at its separation station
        Q = [P[n] for n in cut]
        c, pc = arr["cstar"][cut], arr["chamber_pressure"][cut]
        eps = np.array([q.separation_area_ratio for q in Q])
        psep = np.array([q.separation_pressure for q in Q])
        cf = (np.array([q.separation_velocity for q in Q]) + psep * eps * c / pc) / c
        sub = _Factors([models[fast[n]] for n in cut])
        dc = delivered(c, cf, eps, psep, pc, arr["ambient_pressure"][cut], sub)
        for key in ("cf_ambient", "isp_ambient", "exhaust_velocity_ambient"):
            d[key][cut] = dc[key]
    for k in outputs:
        if k.startswith("delivered."):
            vals[k][fast] = d[k.partition(".")[2]]
    if "sizing.mass_flow" in outputs:
        for n, i in enumerate(fast):
            row, p = rows[i], P[n]
            isp = d["isp_vacuum" if row["thrust_at"] == "vacuum" else "isp_ambient"][n]
            try:
                s = size_thrust_chamber(row["thrust"], float(isp), float(d["cstar"][n]), p.chamber_pressure,
                                        p.area_ratio, p.mixture_ratio, p.oxidizer_density, p.fuel_density)
            except PerfchainError as exc:
                why[i] = str(exc)
                continue
            vals["sizing.mass_flow"][i], vals["sizing.throat_diameter"][i] = s.mass_flow, s.throat_diameter
    for i in range(m):
        if why[i] is not None:
            for k in outputs:
                vals[k][i] = np.nan
    return vals, why
