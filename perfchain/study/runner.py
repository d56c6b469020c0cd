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
import sys
from dataclasses import dataclass, field
from pathlib import Path

from perfchain.study.engines import (EngineSettings, engine_grid, engine_optima, engine_point, engine_settings,
                                     lookup, resolve_ingredients)
from perfchain.study.files import check_out_dir
from perfchain.study.names import file_stems, shrink, slug
from perfchain.study.schema import Study
from perfchain.study.sections import comparison_rows, fixed_tank_tables, vehicle_rows
from perfchain.study.writing import provenance, study_copy, write_bytes, write_tables

__all__ = ["StudyResult", "compute_study", "run_study", "check_out_dir", "shrink", "slug",
           "stderr_progress", "REPORT", "EngineSettings", "engine_point", "lookup", "resolve_ingredients",
           "provenance", "study_copy", "write_tables"]

REPORT = "report.html"


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
        es = engine_settings(spec, i, custom, max_list)
        res.engines[spec.name] = es
        n = len(es.mixture_ratio) * len(es.chamber_pressure) * len(es.exits) * len(es.ambient_pressure) * len(es.flow)
        _say(progress, f"engine {spec.name}: {es.oxidizer.name}/{es.fuel.name}, grid of {n} points")
        res.grids[spec.name] = engine_grid(es, workers)
        _say(progress, f"engine {spec.name}: optimum mixture ratios")
        res.optima[spec.name] = engine_optima(es)
        mr = spec.design_mixture_ratio
        if mr is None:
            mr = next(o["mixture_ratio"] for o in res.optima[spec.name] if o["objective"] == spec.objective)
        res.design[spec.name] = engine_point(es, mr)
        failed = int((res.grids[spec.name]["status"] != "ok").sum())
        if failed:
            _say(progress, f"engine {spec.name}: {failed} grid points failed (kept with their reason)")
    for i, spec in enumerate(study.comparison, 1):
        _say(progress, f"comparison {spec.name}: {len(spec.pairs)} pairs at their optimum")
        res.comparisons[spec.name] = comparison_rows(spec, i, custom)
    for i, spec in enumerate(study.vehicle, 1):
        _say(progress, f"vehicle {spec.name}")
        total, rows = vehicle_rows(spec, i, res.engines, res.design)
        if rows:
            res.vehicles.append(total)
            res.stages.extend(rows)
        if spec.fixed_tank is not None:
            _say(progress, f"vehicle {spec.name}: fixed-tank trade over {len(spec.fixed_tank.engines)} engines")
            tables, best = fixed_tank_tables(spec, res.engines)
            res.fixed_tank.extend(tables)
            res.fixed_tank_best.extend(best)
    stems = file_stems(res.grids)
    for name, df in res.grids.items():
        res.tables[f"engine-{stems[name]}-grid"] = df
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


# --------------------------------------------------------------------------- run and write

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
    files = write_tables(res.tables, out, units, study.output.formats, meta)
    figures = []
    if make_plots:
        from perfchain.study.plots import make_plots as draw

        _say(progress, f"drawing plots to {out / 'plots'}")
        figures = draw(res, out / "plots", units, study.output.plot_formats)
    write_bytes(out / "study.toml", study_copy(study_text, meta).encode())
    write_bytes(out / "provenance.json", (json.dumps(meta, indent=1) + "\n").encode())
    from perfchain.study.report import render_report

    html = render_report(res, units=units, figures=figures, meta=meta, study_text=study_text,
                         files=[p.relative_to(out).as_posix() for p in files]
                         + [p.relative_to(out).as_posix() for f in figures for p in f.paths])
    write_bytes(out / REPORT, html.encode("utf-8"))
    _say(progress, f"report: {out / REPORT}")
    return out / REPORT
