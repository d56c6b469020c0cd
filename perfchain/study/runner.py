"""Run a study: every engine grid, optimum, comparison and vehicle of a :class:`~perfchain.study.schema.Study`.

:func:`compute_study` does the work and returns plain results (SI tables and
dicts); it writes nothing. :func:`run_study` checks the output folder, computes,
then writes tables, plots, the study copy and provenance, and the HTML report
last (to a temporary file moved into place), so a report exists only for a run
that finished.

Composition only: the physics lives in :mod:`perfchain.study.sweep`,
:mod:`perfchain.study.optimum`, :mod:`perfchain.performance.chain`, :mod:`perfchain.study.tradeoff`
and :mod:`perfchain.vehicle.rocket`.
"""

from __future__ import annotations

import datetime
import hashlib
import json
import math
import os
import re
import sys
from dataclasses import dataclass, field
from pathlib import Path

from perfchain.constants import ONE_ATM
from perfchain.errors import InputError
from perfchain.study.schema import Engine, Study, pair_names

__all__ = ["StudyResult", "compute_study", "run_study", "check_out_dir", "shrink", "slug"]

REPORT = "report.html"


def _say(progress, text):
    if progress is not None:
        progress(text)


def stderr_progress(text: str):
    """Default progress: one line on stderr."""
    print(f"perfchain: {text}", file=sys.stderr, flush=True)


def slug(name: str) -> str:
    """A file-name-safe form of a name.

    >>> slug("Corvid-2 upper stage (LOX/LCH4)")
    'corvid-2-upper-stage-lox-lch4'
    """
    return re.sub(r"[^a-z0-9]+", "-", name.lower()).strip("-") or "item"


def shrink(values: list, cap: int | None) -> list:
    """At most ``cap`` evenly spaced values of a list, first and last kept.

    >>> shrink([1, 2, 3, 4, 5, 6, 7], 3)
    [1, 4, 7]
    """
    if cap is None or len(values) <= cap:
        return list(values)
    if cap <= 1:
        return [values[0]]
    idx = sorted({round(i * (len(values) - 1) / (cap - 1)) for i in range(cap)})
    return [values[i] for i in idx]


# --------------------------------------------------------------------------- ingredients
def resolve_ingredients(study: Study) -> dict:
    """Study ingredients and blends by lower-case name (bundled names may not be redefined)."""
    from perfchain.propellants.ingredients import blend, custom_ingredient, get_ingredient

    custom: dict = {}

    def taken(name, field):
        try:
            get_ingredient(name)
        except InputError:
            return
        raise InputError(field, name, "a name that is not a bundled ingredient (see `perfchain ingredients`)")

    for i, spec in enumerate(study.ingredient, 1):
        taken(spec.name, f"ingredient[{i}].name")
        custom[spec.name.lower()] = custom_ingredient(spec.name, spec.formula, spec.enthalpy, spec.temperature,
                                                      spec.density, spec.phase)
    for i, spec in enumerate(study.blend, 1):
        taken(spec.name, f"blend[{i}].name")
        parts = {lookup(k, custom, f"blend[{i}].parts"): v for k, v in spec.parts.items()}
        custom[spec.name.lower()] = blend(spec.name, parts, spec.density)
    return custom


def lookup(name: str, custom: dict, field: str):
    """A study ingredient or a bundled one, by name; one-line error naming ``field``."""
    from perfchain.propellants.ingredients import get_ingredient

    if name.lower() in custom:
        return custom[name.lower()]
    try:
        return get_ingredient(name, field=field)
    except InputError as exc:
        if custom:
            raise InputError(field, name, exc.allowed[:-1] + "; or one of this study's: "
                             + ", ".join(c.name for c in custom.values()) + ")") from None
        raise


# --------------------------------------------------------------------------- engines
@dataclass
class EngineSettings:
    """An engine's lists in SI (after the grid cap) and its resolved ingredients."""

    spec: Engine
    oxidizer: object
    fuel: object
    bundled: bool
    mixture_ratio: list
    chamber_pressure: list
    exit_key: str
    exits: list
    ambient_pressure: list
    altitude: list | None
    flow: list
    losses: object

    def point_kwargs(self) -> dict:
        """Keyword arguments of performance() at the design chamber pressure, exit, ambient, flow."""
        kw = {"chamber_pressure": self.chamber_pressure[0], self.exit_key: self.exits[0],
              "flow": self.flow[0]}
        if self.altitude is not None:
            kw["altitude"] = self.altitude[0]
        else:
            kw["ambient_pressure"] = self.ambient_pressure[0]
        return kw


def _engine_settings(spec: Engine, index: int, custom: dict, cap) -> EngineSettings:
    from perfchain.atmosphere import pressure
    from perfchain.performance.losses import LossModel
    from perfchain.units import to_si

    where = f"engine[{index}]"
    ox = lookup(spec.oxidizer, custom, f"{where}.oxidizer")
    fu = lookup(spec.fuel, custom, f"{where}.fuel")
    bundled = spec.oxidizer.lower() not in custom and spec.fuel.lower() not in custom

    def si(values, kind, key, **b):
        return [to_si(v, kind, f"{where}.{key}", **b) for v in shrink(values, cap)]

    if spec.area_ratio is not None:
        exit_key, exits = "area_ratio", shrink(spec.area_ratio, cap)
    else:
        exit_key, exits = "exit_pressure", si(spec.exit_pressure, "pressure", "exit_pressure", minimum=0.0)
    alt = None
    if spec.altitude is not None:
        alt = si(spec.altitude, "length", "altitude", minimum=0.0, exclusive=False)
        pa = [float(pressure(z)) for z in alt]
    else:
        pa = si(spec.ambient_pressure or ["1 atm"], "pressure", "ambient_pressure", minimum=0.0, exclusive=False)
    losses = spec.efficiency.loss_model(f"{where}.efficiency") if spec.efficiency else LossModel()
    return EngineSettings(spec, ox, fu, bundled, shrink(spec.mixture_ratio, cap),
                          si(spec.chamber_pressure, "pressure", "chamber_pressure", minimum=0.0),
                          exit_key, exits, pa, alt, shrink(spec.flow, cap), losses)


def _grid(es: EngineSettings, workers: int):
    """The engine's full performance table (SI), one row per grid point."""
    from perfchain.study.sweep import sweep

    amb = {"altitude": es.altitude} if es.altitude is not None else {"ambient_pressure": es.ambient_pressure}
    lists = dict(mixture_ratio=es.mixture_ratio, chamber_pressure=es.chamber_pressure,
                 flow=es.flow, **{es.exit_key: es.exits}, **amb)
    if es.bundled:
        df = sweep(es.oxidizer.name, es.fuel.name, workers=workers, progress=False, **lists)
    else:
        df = _plain_grid(es, lists)
    return _add_delivered(df, es.losses)


def _plain_grid(es: EngineSettings, lists: dict):
    """Grid of an engine with study-defined ingredients (sweep() takes bundled names only)."""
    import itertools

    import pandas as pd

    from perfchain.errors import PerfchainError
    from perfchain.propellants.mixture import make_propellant
    from perfchain.performance.chain import performance_batch
    from perfchain.study.sweep import flatten_result, make_grid

    grid = make_grid(es.oxidizer, es.fuel, **lists)
    props = [make_propellant(es.oxidizer, es.fuel, mr) for mr in grid.mixture_ratio]
    # one batch per ambient pressure and flow model (each point the number it gets alone)
    batched: dict = {}
    keys = [(i, pc, x) for i in range(len(props)) for pc in grid.chamber_pressure for x in grid.exits]
    for k, pa in enumerate(grid.ambient_pressure):
        for flow in grid.flow:
            solved = performance_batch([(props[i], pc, x) for i, pc, x in keys], exit_key=grid.exit_key,
                                       ambient_pressure=pa, flow=flow)
            batched.update({(i, pc, x, k, flow): r for (i, pc, x), r in zip(keys, solved)})
    rows = []
    for i, (mr, prop) in enumerate(zip(grid.mixture_ratio, props)):
        for pc, x, k, flow in itertools.product(grid.chamber_pressure, grid.exits,
                                                range(len(grid.ambient_pressure)), grid.flow):
            base = {"oxidizer": prop.oxidizer.name, "fuel": prop.fuel.name, "mixture_ratio": mr,
                    "chamber_pressure": pc, grid.exit_key: x, "ambient_pressure": grid.ambient_pressure[k]}
            if grid.altitude is not None:
                base["altitude"] = grid.altitude[k]
            base["flow"] = flow
            try:
                res = batched[(i, pc, x, k, flow)]
                if isinstance(res, Exception):
                    raise res
                rows.append(dict(base, status="ok", reason=None, **{
                    c: v for c, v in flatten_result(res.to_dict()).items() if c not in base}))
            except PerfchainError as exc:
                rows.append(dict(base, status="failed", reason=" ".join(str(exc).split())))
    return pd.DataFrame(rows)


def _add_delivered(df, losses):
    """Delivered c*, vacuum and ambient Isp columns for the ok rows (NaN elsewhere)."""
    import numpy as np

    from perfchain.performance.losses import delivered

    ok = df["status"] == "ok"
    for key in ("cstar", "isp_vacuum", "isp_ambient"):
        df[f"delivered_{key}"] = np.nan
    if ok.any():
        d = delivered(df.loc[ok, "cstar"].to_numpy(), df.loc[ok, "cf_vacuum"].to_numpy(),
                      df.loc[ok, "area_ratio"].to_numpy(), df.loc[ok, "exit_pressure"].to_numpy(),
                      df.loc[ok, "chamber_pressure"].to_numpy(), df.loc[ok, "ambient_pressure"].to_numpy(), losses)
        for key in ("cstar", "isp_vacuum", "isp_ambient"):
            df.loc[ok, f"delivered_{key}"] = d[key]
    return df


def _optima(es: EngineSettings) -> list[dict]:
    """Optimum O/F at each chamber pressure, for the engine's objective and each Isp shown."""
    from perfchain.study.optimum import optimum_mixture_ratio

    objectives = [es.spec.objective, "isp_vacuum"]
    if es.ambient_pressure[0] > 0:
        objectives.append("isp_ambient")
    rows = []
    for pc in es.chamber_pressure:
        for objective in dict.fromkeys(objectives):
            o = optimum_mixture_ratio(es.oxidizer, es.fuel, pc, **{es.exit_key: es.exits[0]},
                                      ambient_pressure=es.ambient_pressure[0], flow=es.flow[0],
                                      objective=objective)
            p = o.performance
            rows.append({"engine": es.spec.name, "chamber_pressure": pc, "objective": objective,
                         "mixture_ratio": o.mixture_ratio, "objective_value": o.value,
                         "isp_vacuum": p.isp_vacuum, "isp_ambient": p.isp_ambient, "cstar": p.cstar,
                         "chamber_temperature": p.chamber.temperature, "bulk_density": p.bulk_density,
                         "at_bound": o.at_bound})
    return rows


def engine_point(es: EngineSettings, mixture_ratio: float):
    """The engine's delivered point at a mixture ratio (design pressure, exit, ambient, flow)."""
    from perfchain.performance.chain import performance

    return performance(es.oxidizer, es.fuel, mixture_ratio=mixture_ratio, **es.point_kwargs(),
                       contraction_ratio=es.spec.contraction_ratio, losses=es.losses,
                       thrust=es.spec.thrust, thrust_at=es.spec.thrust_at)


# --------------------------------------------------------------------------- comparisons, vehicles
def _comparison(spec, index, custom) -> list[dict]:
    from perfchain.atmosphere import pressure
    from perfchain.performance.delivered import deliver
    from perfchain.study.optimum import optimum_mixture_ratio
    from perfchain.units import to_si

    where = f"comparison[{index}]"
    pa = (float(pressure(to_si(spec.altitude, "length", f"{where}.altitude"))) if spec.altitude is not None
          else to_si(spec.ambient_pressure or ONE_ATM, "pressure", f"{where}.ambient_pressure", minimum=0.0,
                     exclusive=False))
    losses = spec.efficiency.loss_model(f"{where}.efficiency") if spec.efficiency else None
    exit_kw = {"area_ratio": spec.area_ratio} if spec.area_ratio is not None else {"exit_pressure": spec.exit_pressure}
    rows = []
    for j, text in enumerate(spec.pairs, 1):
        ox_name, fu_name = pair_names(text, f"{where}.pairs[{j}]")
        ox = lookup(ox_name, custom, f"{where}.pairs[{j}] oxidizer")
        fu = lookup(fu_name, custom, f"{where}.pairs[{j}] fuel")
        o = optimum_mixture_ratio(ox, fu, spec.chamber_pressure, ambient_pressure=pa, flow=spec.flow,
                                  objective=spec.objective, **exit_kw)
        p = o.performance
        rho = p.bulk_density
        row = {"comparison": spec.name, "pair": f"{p.oxidizer}/{p.fuel}", "objective": spec.objective,
               "mixture_ratio": o.mixture_ratio, "chamber_pressure": p.chamber_pressure,
               "area_ratio": p.area_ratio, "ambient_pressure": pa,
               "chamber_temperature": p.chamber.temperature, "cstar": p.cstar,
               "isp_vacuum": p.isp_vacuum, "isp_ambient": p.isp_ambient, "bulk_density": rho,
               "density_isp": None if rho is None else rho * p.isp_vacuum,
               "density_isp_ambient": None if rho is None else rho * p.isp_ambient, "at_bound": o.at_bound}
        if losses is not None:
            d = deliver(p, losses).delivered
            row.update(delivered_isp_vacuum=d["isp_vacuum"], delivered_isp_ambient=d["isp_ambient"])
        rows.append(row)
    key = spec.rank_by or spec.objective
    rows.sort(key=lambda r: -(r[key] if r[key] is not None else -math.inf))
    for rank, r in enumerate(rows, 1):
        r["rank"] = rank
    return rows


def _vehicle(spec, index, engines: dict, design: dict):
    from perfchain.study.tradeoff import stage_from_point
    from perfchain.units import to_si
    from perfchain.vehicle.rocket import Vehicle, make_stage, max_payload

    where = f"vehicle[{index}]"
    stages, info = [], []
    for j, s in enumerate(spec.stage, 1):
        f = f"{where}.stage[{j}]"

        def m(key, s=s, f=f):
            v = getattr(s, key)
            return None if v is None else to_si(v, "mass", f"{f}.{key}", minimum=0.0)

        masses = dict(dry_mass=m("dry"), propellant_mass=m("propellant"), total_mass=m("mass"),
                      propellant_fraction=s.propellant_fraction, structural_ratio=s.structural_ratio)
        thrust = None if s.thrust is None else to_si(s.thrust, "force", f"{f}.thrust", minimum=0.0)
        name = s.name or (f"stage {j} ({s.engine})" if s.engine else f"stage {j}")
        if s.engine is not None:
            es = engines[s.engine]
            perf = design[s.engine] if s.mixture_ratio is None else engine_point(es, s.mixture_ratio)
            stage = stage_from_point(perf, which=s.which, thrust=thrust, name=name, **masses)
            pair, mr = f"{perf.oxidizer}/{perf.fuel}", perf.mixture_ratio
        else:
            speed = dict(isp=to_si(s.isp, "time", f"{f}.isp", minimum=0.0)) if s.isp is not None else \
                dict(exhaust_velocity=to_si(s.exhaust_velocity, "speed", f"{f}.exhaust_velocity", minimum=0.0))
            stage = make_stage(thrust=thrust, name=name, **speed, **masses)
            pair, mr = "", None
        stages.append(stage)
        info.append({"engine": s.engine or "", "pair": pair, "mixture_ratio": mr, "which": s.which,
                     "isp": stage.isp, "exhaust_velocity": stage.exhaust_velocity, "dry_mass": stage.dry_mass,
                     "propellant_mass": stage.propellant_mass})
    result = {"vehicle": spec.name, "payload_mass": to_si(spec.payload, "mass", f"{where}.payload", minimum=0.0,
                                                         exclusive=False)}
    if not stages:
        return result, []
    r = Vehicle(stages, result["payload_mass"]).performance().to_dict()
    result.update(total_delta_v=r["total_delta_v"], liftoff_mass=r["liftoff_mass"],
                  payload_fraction=r["payload_fraction"])
    if spec.target is not None:
        target = to_si(spec.target, "speed", f"{where}.target", minimum=0.0)
        try:
            best = max_payload(stages, target)
        except InputError as exc:
            raise InputError(f"{where}.target", spec.target, exc.allowed) from None
        result.update(target_delta_v=target, max_payload=best)
    rows = [dict({"vehicle": spec.name, "stage": k}, **st, **extra)
            for k, (st, extra) in enumerate(zip(r["stages"], info), 1)]
    return result, rows


def _fixed_tank(spec, engines: dict) -> tuple[list, list]:
    import pandas as pd

    from perfchain.study.tradeoff import best_fixed_tank_mixture_ratio, fixed_tank_sweep

    ft = spec.fixed_tank
    tables, best = [], []
    for name in ft.engines:
        es = engines[name]
        kw = dict(chamber_pressure=es.chamber_pressure[0], **{es.exit_key: es.exits[0]},
                  tank_volume=ft.tank_volume, payload_mass=spec.payload, fixed_dry_mass=ft.fixed_dry_mass,
                  tank_mass_per_volume=ft.tank_mass_per_volume, ambient_pressure=es.ambient_pressure[0],
                  flow=es.flow[0], which=ft.which)
        t = fixed_tank_sweep([(es.oxidizer, es.fuel)], es.mixture_ratio, **kw)
        t.insert(0, "engine", name)
        t.insert(0, "vehicle", spec.name)
        tables.append(t)
        b = best_fixed_tank_mixture_ratio(es.oxidizer, es.fuel, **kw)
        b["bounds"] = f"{b['bounds'][0]:.4g}-{b['bounds'][1]:.4g}"
        best.append(dict({"vehicle": spec.name, "engine": name, "pair": f"{b['oxidizer']}/{b['fuel']}"}, **b))
    return [pd.concat(tables, ignore_index=True)], best


# --------------------------------------------------------------------------- the whole study
@dataclass
class StudyResult:
    """Everything a study computed, SI units; ``tables`` are the files to write."""

    study: Study
    engines: dict = field(default_factory=dict)      # name -> EngineSettings
    grids: dict = field(default_factory=dict)        # engine name -> DataFrame
    optima: dict = field(default_factory=dict)       # engine name -> list of dict
    design: dict = field(default_factory=dict)       # engine name -> Performance
    comparisons: dict = field(default_factory=dict)  # comparison name -> list of dict
    vehicles: list = field(default_factory=list)     # dicts (totals)
    stages: list = field(default_factory=list)       # dicts (one per stage)
    fixed_tank: list = field(default_factory=list)   # DataFrames
    fixed_tank_best: list = field(default_factory=list)
    tables: dict = field(default_factory=dict)       # file stem -> DataFrame (SI)
    cap: int | None = None


def compute_study(study: Study, *, workers: int = 1, max_list: int | None = None, progress=None) -> StudyResult:
    """Compute every part of a study (nothing is written).

    Parameters
    ----------
    study : Study
    workers : int
        Worker processes for the engine grids.
    max_list : int, optional
        Use at most this many values of each engine list (evenly spaced, ends
        kept): for quick looks and tests.
    progress : callable, optional
        Called with one line of text per step.
    """
    import pandas as pd

    from perfchain.study.sweep import flatten_result

    res = StudyResult(study, cap=max_list)
    custom = resolve_ingredients(study)
    for i, spec in enumerate(study.engine, 1):
        es = _engine_settings(spec, i, custom, max_list)
        res.engines[spec.name] = es
        n = len(es.mixture_ratio) * len(es.chamber_pressure) * len(es.exits) * len(es.ambient_pressure) * len(es.flow)
        _say(progress, f"engine {spec.name}: {es.oxidizer.name}/{es.fuel.name}, grid of {n} points")
        res.grids[spec.name] = _grid(es, workers)
        _say(progress, f"engine {spec.name}: optimum mixture ratios")
        res.optima[spec.name] = _optima(es)
        mr = spec.design_mixture_ratio
        if mr is None:
            mr = next(o["mixture_ratio"] for o in res.optima[spec.name] if o["objective"] == spec.objective)
        res.design[spec.name] = engine_point(es, mr)
        failed = int((res.grids[spec.name]["status"] != "ok").sum())
        if failed:
            _say(progress, f"engine {spec.name}: {failed} grid points failed (kept with their reason)")
    for i, spec in enumerate(study.comparison, 1):
        _say(progress, f"comparison {spec.name}: {len(spec.pairs)} pairs at their optimum")
        res.comparisons[spec.name] = _comparison(spec, i, custom)
    for i, spec in enumerate(study.vehicle, 1):
        _say(progress, f"vehicle {spec.name}")
        total, rows = _vehicle(spec, i, res.engines, res.design)
        if rows:
            res.vehicles.append(total)
            res.stages.extend(rows)
        if spec.fixed_tank is not None:
            _say(progress, f"vehicle {spec.name}: fixed-tank trade over {len(spec.fixed_tank.engines)} engines")
            tables, best = _fixed_tank(spec, res.engines)
            res.fixed_tank.extend(tables)
            res.fixed_tank_best.extend(best)
    for name, df in res.grids.items():
        res.tables[f"engine-{slug(name)}-grid"] = df
    if res.optima:
        res.tables["optima"] = pd.DataFrame([r for rows in res.optima.values() for r in rows])
    if res.design:
        res.tables["design-points"] = pd.DataFrame(
            [dict(engine=n, **flatten_result(p.to_dict())) for n, p in res.design.items()])
    if res.comparisons:
        res.tables["comparisons"] = pd.DataFrame([r for rows in res.comparisons.values() for r in rows])
    if res.vehicles:
        res.tables["vehicles"] = pd.DataFrame(res.vehicles)
        res.tables["vehicle-stages"] = pd.DataFrame(res.stages)
    if res.fixed_tank:
        res.tables["fixed-tank"] = pd.concat(res.fixed_tank, ignore_index=True)
        res.tables["fixed-tank-optima"] = pd.DataFrame(res.fixed_tank_best)
    return res


# --------------------------------------------------------------------------- files
def check_out_dir(out, overwrite: bool) -> Path:
    """Refuse an output folder that holds files unless ``overwrite``; make it if missing."""
    path = Path(out)
    if path.exists() and not path.is_dir():
        raise InputError("--out", str(out), "a folder (this is a file)")
    if path.is_dir() and any(path.iterdir()) and not overwrite:
        raise InputError("--out", str(out), "a new or empty folder, or --overwrite to replace its results")
    try:
        path.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise InputError("--out", str(out), f"a folder that can be made ({exc.strerror})") from None
    if not os.access(path, os.W_OK | os.X_OK):
        raise InputError("--out", str(out), "a writable folder")
    return path


def provenance(study_text: str, source: str, units: str, cap) -> dict:
    """Versions, data files, date and the study's hash."""
    import platform

    import cantera

    from perfchain import __version__
    from perfchain.propellants.ingredients import DATA_FILE
    from perfchain.thermo.products import CONDENSED_DATA, GAS_DATA

    return {
        "perfchain": __version__, "cantera": cantera.__version__, "python": platform.python_version(),
        "thermo_data": {"gas": GAS_DATA, "condensed": CONDENSED_DATA,
                        "source": f"NASA Glenn polynomials as shipped with Cantera {cantera.__version__}"},
        "ingredient_data": {"file": "mechanisms/ingredients.toml",
                            "sha256": hashlib.sha256(Path(DATA_FILE).read_bytes()).hexdigest()},
        "date": datetime.datetime.now(datetime.timezone.utc).replace(microsecond=0).isoformat(),
        "study_file": source, "study_sha256": hashlib.sha256(study_text.encode()).hexdigest(),
        "units": units, "grid_cap": cap,
    }


def _atomic_write(path: Path, data: bytes):
    from perfchain.study.sweep import _write_atomic

    _write_atomic(path, lambda fh: fh.write(data))


def write_tables(res: StudyResult, out: Path, units: str, formats, meta: dict) -> list[Path]:
    """Each table in the output units, as Parquet (units in its metadata) and/or CSV (+ .meta.json)."""
    import pyarrow as pa
    import pyarrow.parquet as pq

    from perfchain.study.columns import convert_frame

    folder = out / "tables"
    folder.mkdir(exist_ok=True)
    written = []
    for stem, df in res.tables.items():
        table, col_units = convert_frame(df, units)
        info = json.dumps({"units": col_units, "provenance": meta}, default=str)
        if "parquet" in formats:
            path = folder / f"{stem}.parquet"
            arrow = pa.Table.from_pandas(table, preserve_index=False)
            arrow = arrow.replace_schema_metadata({**(arrow.schema.metadata or {}), b"perfchain": info.encode()})
            from perfchain.study.sweep import _write_atomic

            _write_atomic(path, lambda fh, t=arrow: pq.write_table(t, fh))
            written.append(path)
        if "csv" in formats:
            path = folder / f"{stem}.csv"
            _atomic_write(path, table.to_csv(index=False).encode())
            _atomic_write(folder / f"{stem}.csv.meta.json", (json.dumps(json.loads(info), indent=1) + "\n").encode())
            written.append(path)
    return written


def study_copy(study_text: str, meta: dict) -> str:
    """The study text as given, under a comment block of provenance (still valid TOML)."""
    head = ["# Copy of the study as run by perfchain (data only; nothing in it is executed).",
            f"# perfchain {meta['perfchain']}, Cantera {meta['cantera']}, Python {meta['python']}",
            f"# thermodynamic data: {meta['thermo_data']['gas']}, {meta['thermo_data']['condensed']} "
            f"({meta['thermo_data']['source']})",
            f"# ingredient data: {meta['ingredient_data']['file']} sha256 {meta['ingredient_data']['sha256']}",
            f"# run on {meta['date']} from {meta['study_file']} (sha256 {meta['study_sha256']})",
            f"# output units: {meta['units']}" + (f"; lists capped at {meta['grid_cap']} values"
                                                  if meta["grid_cap"] else ""), ""]
    return "\n".join(head) + study_text


def run_study(study: Study, out, *, study_text: str, source: str = "study.toml", units: str | None = None,
              overwrite: bool = False, workers: int = 1, max_list: int | None = None, plots: bool | None = None,
              progress=stderr_progress) -> Path:
    """Compute a study and write its folder; returns the report path.

    ``units`` and ``plots`` override the study's ``[output]`` section. The
    report is written last and only when everything before it succeeded.
    """
    from perfchain.study.columns import check_units

    units = check_units(units or study.output.units)
    make_plots = study.output.plots if plots is None else plots
    out = check_out_dir(out, overwrite)
    (out / REPORT).unlink(missing_ok=True)  # an old report must not stand for this run
    res = compute_study(study, workers=workers, max_list=max_list, progress=progress)
    meta = provenance(study_text, source, units, max_list)
    _say(progress, f"writing tables ({', '.join(study.output.formats)}) to {out / 'tables'}")
    files = write_tables(res, out, units, study.output.formats, meta)
    figures = []
    if make_plots:
        from perfchain.study.plots import make_plots as draw

        _say(progress, f"drawing plots to {out / 'plots'}")
        figures = draw(res, out / "plots", units, study.output.plot_formats)
    _atomic_write(out / "study.toml", study_copy(study_text, meta).encode())
    _atomic_write(out / "provenance.json", (json.dumps(meta, indent=1) + "\n").encode())
    from perfchain.study.report import render_report

    html = render_report(res, units=units, figures=figures, meta=meta, study_text=study_text,
                         files=[p.relative_to(out).as_posix() for p in files]
                         + [p.relative_to(out).as_posix() for f in figures for p in f.paths])
    _atomic_write(out / REPORT, html.encode("utf-8"))
    _say(progress, f"report: {out / REPORT}")
    return out / REPORT
