"""Run a study: every engine grid, optimum, comparison and vehicle of a :class:`~perfchain.study.schema.Study`.

:func:`compute_study` does the work and returns plain results (SI tables and
dicts); it writes nothing. :func:`run_study` checks the output folder, computes,
then writes tables, plots, the study copy and provenance, and the HTML report
last (to a temporary file moved into place), so a report exists only for a run
that finished.

Composition only: the engines are :mod:`perfchain.study.engines`, the comparisons,
vehicles and fixed-tank trades :mod:`perfchain.study.sections`, the files
:mod:`perfchain.study.writing`; the physics lives in :mod:`perfchain.study.sweep`,
:mod:`perfchain.study.optimum`, :mod:`perfchain.performance.chain`,
:mod:`perfchain.study.tradeoff` and :mod:`perfchain.vehicle.rocket`.
"""

from __future__ import annotations

import json
import math
import os
import shutil
import sys
import tempfile
from dataclasses import dataclass, field
from pathlib import Path

from perfchain.errors import InputError

from perfchain.study.engines import (EngineSettings, engine_grid, engine_optima, engine_point, engine_settings,
                                     lookup, resolve_ingredients)
from perfchain.study.files import STAGING_PREFIX, check_out_dir, folder_lock, remove_stale_temps
from perfchain.study.names import file_stems, shrink, slug
from perfchain.study.schema import Study
from perfchain.study.sections import comparison_rows, fixed_tank_tables, vehicle_rows
from perfchain.study.writing import provenance, study_copy, write_bytes, write_tables

__all__ = ["StudyResult", "compute_study", "run_study", "check_out_dir", "shrink", "slug",
           "stderr_progress", "REPORT", "EngineSettings", "engine_point", "lookup", "resolve_ingredients",
           "provenance", "study_copy", "write_tables"]

REPORT = "report.html"
STUDY_COPY = "study.toml"
PROVENANCE = "provenance.json"


def _say(progress, text):
    if progress is not None:
        progress(text)


def stderr_progress(text: str):
    """Default progress: one line on stderr.

    Examples
    --------
    >>> import contextlib, io
    >>> err = io.StringIO()
    >>> with contextlib.redirect_stderr(err):
    ...     stderr_progress("engine E: grid of 4 points")
    >>> err.getvalue()
    'perfchain: engine E: grid of 4 points\\n'
    """
    print(f"perfchain: {text}", file=sys.stderr, flush=True)


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
    thermal: dict = field(default_factory=dict)      # engine name -> ChamberDesign (thermal blocks)
    tables: dict = field(default_factory=dict)       # file stem -> DataFrame (SI)
    cap: int | None = None
    uncertainty: dict = field(default_factory=dict)  # "engine E" / "vehicle V" -> Propagation


def compute_study(study: Study, *, workers: int = 1, max_list: int | None = None, progress=None,
                  confirm: bool = False) -> StudyResult:
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
    confirm : bool
        Allow engine grids above :data:`perfchain.study.grid.MAX_POINTS` points (every
        engine is checked before any is computed).
    """
    import pandas as pd

    from perfchain.study.grid import MAX_POINTS
    from perfchain.study.sweep import flatten_result

    res = StudyResult(study, cap=max_list)
    custom = resolve_ingredients(study)
    sizes = {}
    for i, spec in enumerate(study.engine, 1):
        es = res.engines[spec.name] = engine_settings(spec, i, custom, max_list)
        n = sizes[spec.name] = math.prod(len(v) for v in (es.mixture_ratio, es.chamber_pressure, es.exits,
                                                            es.ambient_pressure, es.flow))
        if n > MAX_POINTS and not confirm:
            raise InputError(f"engine[{i}]", f"a grid of {n} points", f"at most {MAX_POINTS} points unless "
                             "confirmed (perfchain run --yes, or confirm=True)")
    for spec in study.engine:
        es = res.engines[spec.name]
        _say(progress, f"engine {spec.name}: {es.label}, grid of {sizes[spec.name]} points")
        res.grids[spec.name] = engine_grid(es, workers, confirm=True)
        if es.propellant is None:
            _say(progress, f"engine {spec.name}: optimum mixture ratios")
        res.optima[spec.name] = engine_optima(es)
        mr = spec.design_mixture_ratio
        if mr is None and es.propellant is None:   # a formulation has no O/F
            mr = next(o["mixture_ratio"] for o in res.optima[spec.name] if o["objective"] == spec.objective)
        res.design[spec.name] = engine_point(es, mr)
        if spec.uncertainty is not None:
            from perfchain.study.uncertainty_study import engine_uncertainty

            _say(progress, f"engine {spec.name}: uncertainty of the design point")
            res.uncertainty[f"engine {spec.name}"] = engine_uncertainty(es, mr, spec.uncertainty,
                                                                        study.engine.index(spec) + 1)[1]
        if spec.thermal is not None:
            from perfchain.study.thermal import thermal_design

            _say(progress, f"engine {spec.name}: chamber contour and wall heat flux")
            res.thermal[spec.name] = thermal_design(es, mr, study.engine.index(spec) + 1)
        failed = int((res.grids[spec.name]["status"] != "ok").sum())
        if failed:
            _say(progress, f"engine {spec.name}: {failed} grid points failed (kept with their reason)")
    for i, spec in enumerate(study.comparison, 1):
        _say(progress, f"comparison {spec.name}: {len(spec.pairs)} pairs at their optimum"
             + (f", {len(spec.propellants)} propellants" if spec.propellants else ""))
        res.comparisons[spec.name] = comparison_rows(spec, i, custom)
    for i, spec in enumerate(study.vehicle, 1):
        _say(progress, f"vehicle {spec.name}")
        total, rows = vehicle_rows(spec, i, res.engines, res.design)
        if rows:
            res.vehicles.append(total)
            res.stages.extend(rows)
        if spec.uncertainty is not None:
            from perfchain.study.uncertainty_study import study_vehicle_uncertainty

            _say(progress, f"vehicle {spec.name}: uncertainty of the delta-v")
            res.uncertainty[f"vehicle {spec.name}"] = study_vehicle_uncertainty(spec, i, rows)
        if spec.fixed_tank is not None:
            _say(progress, f"vehicle {spec.name}: fixed-tank trade over {len(spec.fixed_tank.engines)} engines")
            tables, best = fixed_tank_tables(spec, res.engines)
            res.fixed_tank.extend(tables)
            res.fixed_tank_best.extend(best)
    stems = file_stems(res.grids)
    for name, df in res.grids.items():
        res.tables[f"engine-{stems[name]}-grid"] = df
    optima = [r for rows in res.optima.values() for r in rows]   # none for formulation engines
    if optima:
        res.tables["optima"] = pd.DataFrame(optima)
    if res.design:
        res.tables["design-points"] = pd.DataFrame(
            [dict(engine=n, **flatten_result(p.to_dict())) for n, p in res.design.items()])
    if res.comparisons:
        res.tables["comparisons"] = pd.DataFrame([r for rows in res.comparisons.values() for r in rows])
    if res.vehicles:
        res.tables["vehicles"] = pd.DataFrame(res.vehicles)
        res.tables["vehicle-stages"] = pd.DataFrame(res.stages)
    if res.uncertainty:
        from perfchain.study.uncertainty_study import uncertainty_tables

        res.tables.update(uncertainty_tables(res.uncertainty, res.engines, [v.name for v in study.vehicle]))
    if res.fixed_tank:
        res.tables["fixed-tank"] = pd.concat(res.fixed_tank, ignore_index=True)
        res.tables["fixed-tank-optima"] = pd.DataFrame(res.fixed_tank_best)
    return res


# --------------------------------------------------------------------------- run and write
_OWN_FILES = (STUDY_COPY, PROVENANCE, REPORT)   # written at the top of the output folder
_OWN_FOLDERS = ("tables", "plots")


def _refuse_own_study(out: Path, source: str):
    """The run must never write over the study file it runs (``run dir/study.toml --out dir``)."""
    src = Path(source)
    if not src.is_file():
        return
    src, top = src.resolve(), out.resolve()
    if (src.parent == top and src.name in _OWN_FILES) or any(top / f in src.parents for f in _OWN_FOLDERS):
        raise InputError("--out", str(out), f"a folder where the run does not write over its own study file "
                         f"{source} (it writes {', '.join(_OWN_FILES)}, tables/ and plots/ there): copy the "
                         "study elsewhere or choose another --out")


def _previous_outputs(out: Path) -> list:
    """Files the previous run in ``out`` listed in its provenance (relative paths inside ``out``)."""
    try:
        listed = json.loads((out / PROVENANCE).read_text()).get("outputs", [])
    except (OSError, ValueError, AttributeError):
        return []
    top = out.resolve()
    keep = []
    for rel in listed if isinstance(listed, list) else []:
        p = (out / str(rel)).resolve()
        if isinstance(rel, str) and top in p.parents and p.is_file():   # never outside the folder
            keep.append(Path(rel).as_posix())
    return keep


def _publish(stage: Path, out: Path, outputs: list, source: str):
    """Move the staged files into place, report last; then drop the previous run's other files."""
    previous = _previous_outputs(out)
    for rel in sorted(outputs, key=lambda r: r == REPORT):
        target = out / rel
        target.parent.mkdir(parents=True, exist_ok=True)
        os.replace(stage / rel, target)
    src = Path(source).resolve() if Path(source).is_file() else None
    for rel in set(previous) - set(outputs):
        if (out / rel).resolve() != src:
            (out / rel).unlink(missing_ok=True)


def run_study(study: Study, out, *, study_text: str, source: str = "study.toml", units: str | None = None,
              overwrite: bool = False, workers: int = 1, max_list: int | None = None, plots: bool | None = None,
              confirm: bool = False, progress=stderr_progress, result: StudyResult | None = None) -> Path:
    """Compute a study and write its folder; returns the report path.

    ``units`` and ``plots`` override the study's ``[output]`` section; ``confirm`` allows
    engine grids above :data:`perfchain.study.grid.MAX_POINTS` points (``run --yes``).
    The folder is locked for the run; every file is written to a staging folder inside it
    and moved into place only when all of them were written, the report last, so a failed
    run (a full disk included: one line naming the file) leaves nothing of itself. With
    ``overwrite``, the files the previous run listed in its ``provenance.json`` and this run
    does not write again are removed; nothing else in the folder is touched, and the run
    refuses a folder where it would write over its own study file. ``result``, the
    :func:`compute_study` of this same study (and ``max_list``), writes it again without
    computing (another folder, other units).
    """
    from perfchain.study.columns import check_units

    units = check_units(units or study.output.units)
    make_plots = study.output.plots if plots is None else plots
    out = check_out_dir(out, overwrite)
    _refuse_own_study(out, source)
    with folder_lock(out, "--out"):
        _clean_leftovers(out)
        (out / REPORT).unlink(missing_ok=True)  # an old report must not stand for this run
        res = result if result is not None else compute_study(study, workers=workers, max_list=max_list,
                                                              progress=progress, confirm=confirm)
        stage = Path(tempfile.mkdtemp(prefix=STAGING_PREFIX, dir=out))
        try:
            outputs = _write_all(res, stage, study, study_text, source, units, max_list, make_plots, progress)
            _publish(stage, out, outputs, source)
        except (OSError, InputError) as exc:   # a full disk: from a writer, or from an atomic write
            if isinstance(exc, InputError) and exc.field != "out":
                raise
            name = exc.filename if isinstance(exc, OSError) else exc.value
            why = exc.strerror if isinstance(exc, OSError) else exc.allowed
            where = Path(str(name)).name if name else "a file"
            raise InputError("--out", str(out), f"a folder where the results can be written ({why}, writing "
                             f"{where}); nothing of this run was kept") from None
        finally:
            shutil.rmtree(stage, ignore_errors=True)
    _say(progress, f"report: {out / REPORT}")
    return out / REPORT


def _clean_leftovers(out: Path):
    """A killed run's staging folders and temporary files (the caller holds the folder's lock)."""
    for p in out.glob(STAGING_PREFIX + "*"):
        shutil.rmtree(p, ignore_errors=True)
    for folder in (out, *(out / f for f in _OWN_FOLDERS)):
        remove_stale_temps(folder)


def _write_all(res, stage: Path, study, study_text, source, units, max_list, make_plots, progress) -> list:
    """Every file of the run into ``stage``; returns their paths relative to it."""
    meta = provenance(study_text, source, units, max_list)
    _say(progress, f"writing tables ({', '.join(study.output.formats)})")
    files = write_tables(res.tables, stage, units, study.output.formats, meta)
    figures = []
    if make_plots:
        from perfchain.study.plots import make_plots as draw

        _say(progress, "drawing plots")
        figures = draw(res, stage / "plots", units, study.output.plot_formats)
    if res.thermal:
        from perfchain.study.thermal import write_thermal

        figures += write_thermal(res.thermal, file_stems(res.engines), stage)
    data = [p.relative_to(stage).as_posix() for p in files] + \
        [p.relative_to(stage).as_posix() for f in figures for p in f.paths]
    written = sorted(p.relative_to(stage).as_posix() for p in stage.rglob("*") if p.is_file())  # sidecars too
    meta["outputs"] = written + list(_OWN_FILES)
    write_bytes(stage / STUDY_COPY, study_copy(study_text, meta).encode())
    write_bytes(stage / PROVENANCE, (json.dumps(meta, indent=1) + "\n").encode())
    from perfchain.study.report import render_report

    html = render_report(res, units=units, figures=figures, meta=meta, study_text=study_text, files=data)
    write_bytes(stage / REPORT, html.encode("utf-8"))
    return meta["outputs"]
