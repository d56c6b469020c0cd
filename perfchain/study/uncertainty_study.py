"""Uncertainty in a study file: an optional ``uncertainty`` table per engine and per vehicle.

::

    [engine.uncertainty]            # the engine's design point, with uncertain inputs
    samples = 2000                  # optional (default 4000)
    seed = 0                        # optional (default 0)
    sensitivity = "local"           # or "sobol" (optional; default local for engines)
    vary = { mixture_ratio = "+/-2%", cstar_efficiency = "0.95..0.98" }

    [vehicle.uncertainty]           # default sensitivity "sobol"
    vary = { "stage1.isp" = "+/-1%", "stage2.structural_ratio" = "0.08..0.1" }

The syntax of each distribution is that of ``--vary`` (:mod:`perfchain.inputs.uncertainty`).
The runner adds, per subject, a samples table and rows of the ``uncertainty`` and
``sensitivity`` tables; :mod:`perfchain.study.uncertainty_report` draws and reports them.
"""

from __future__ import annotations

from typing import Literal

from pydantic import Field

from perfchain.study.fields import Section

__all__ = ["UncertaintySpec", "engine_uncertainty", "study_vehicle_uncertainty", "uncertainty_tables",
           "flat_key"]


class UncertaintySpec(Section):
    """``[engine.uncertainty]`` / ``[vehicle.uncertainty]``: the varied inputs and how to sample them."""

    vary: dict[str, str] = Field(min_length=1)
    samples: int | None = None
    seed: int | None = None
    sensitivity: Literal["local", "sobol"] | None = None


def flat_key(key: str) -> str:
    """A JSON key as a table column (the flattening of the design-point table).

    >>> flat_key("delivered.isp_vacuum"), flat_key("stage1.isp")
    ('delivered_isp_vacuum', 'stage1_isp')
    """
    return key.replace(".", "_")


def engine_uncertainty(es, mixture_ratio, spec: UncertaintySpec, index: int):
    """An engine's design point with its ``uncertainty`` table -> (nominal Performance, Propagation).

    Parameters
    ----------
    es : perfchain.study.engines.EngineSettings
    mixture_ratio : float or None
        The design O/F [-] (None for a formulation).
    spec : UncertaintySpec
    index : int
        1-based place of the engine (errors name ``engine[i].uncertainty.<input>``).
    """
    from perfchain.inputs import point_args
    from perfchain.study.uncertainty import point_uncertainty

    losses = None if es.losses is None else {k: getattr(es.losses, k) for k in es.losses.__dataclass_fields__}
    args = point_args(**es.propellant_kwargs(mixture_ratio), **es.point_kwargs(),
                      contraction_ratio=es.spec.contraction_ratio, losses=losses, thrust=es.spec.thrust,
                      thrust_at=es.spec.thrust_at)
    return point_uncertainty(args, spec.vary, samples=spec.samples, seed=spec.seed,
                             sensitivity=spec.sensitivity or "local", where=f"engine[{index}].uncertainty")


def study_vehicle_uncertainty(spec, index: int, stage_rows: list):
    """A vehicle with its ``uncertainty`` table -> Propagation (stages as stated; an engine's stage by its Isp).

    Parameters
    ----------
    spec : perfchain.study.schema.Vehicle
    index : int
        1-based place of the vehicle.
    stage_rows : list of dict
        The vehicle's stage rows (:func:`perfchain.study.sections.vehicle_rows`): the Isp of a stage
        whose engine is named comes from there.
    """
    from perfchain.errors import InputError
    from perfchain.inputs import value
    from perfchain.study.uncertainty_vehicle import vehicle_uncertainty

    where = f"vehicle[{index}]"
    if not spec.stage:
        raise InputError(f"{where}.uncertainty", "given", "stages to vary ([[vehicle.stage]])")
    stages = []
    for j, (s, row) in enumerate(zip(spec.stage, stage_rows), 1):
        kw = {"isp": row["isp"]} if s.engine is not None or s.isp is not None else \
            {"exhaust_velocity": row["exhaust_velocity"]}
        for key, field in (("dry", "dry_mass"), ("propellant", "propellant_mass"), ("mass", "total_mass"),
                           ("propellant_fraction", "propellant_fraction"), ("structural_ratio", "structural_ratio")):
            if getattr(s, key) is not None:
                kw[field] = value(field, getattr(s, key), name=f"{where}.stage[{j}].{key}")
        stages.append(kw)
    payload = value("payload", spec.payload, name=f"{where}.payload")
    return vehicle_uncertainty(stages, payload, spec.uncertainty.vary, samples=spec.uncertainty.samples,
                               seed=spec.uncertainty.seed, sensitivity=spec.uncertainty.sensitivity or "sobol")


def uncertainty_tables(results: dict, engines, vehicles) -> dict:
    """The tables of a study's uncertainty: samples per subject, and the summary and sensitivity rows.

    Parameters
    ----------
    results : dict
        Subject (``"engine E"``, ``"vehicle V"``) -> Propagation.
    engines, vehicles : iterable of str
        Every engine's and vehicle's name (their file stems are those of the whole study).

    Returns
    -------
    dict
        File stem -> DataFrame (SI; columns named as the design-point table names them).
    """
    import pandas as pd

    from perfchain.study.columns import si_unit
    from perfchain.study.names import file_stems

    stems = {"engine": file_stems(engines), "vehicle": file_stems(vehicles)}
    tables, summary, shares = {}, [], []
    for subject, p in results.items():
        kind, name = subject.split(" ", 1)
        frame = p.frame()
        frame.columns = [flat_key(c) for c in frame.columns]
        tables[f"{kind}-{stems[kind][name]}-samples"] = frame
        run = p.run_block()
        for out, s in p.uncertainty_block().items():
            summary.append({kind: name, "output": out, "unit": si_unit(flat_key(out)), **s,
                            "samples": run["samples"], "failed": run["failed"], "seed": run["seed"]})
            for inp in p.names:
                shares.append({kind: name, "output": out, "input": inp, "method": p.method,
                               "share": p.first[out][inp],
                               "total_index": None if p.total is None else p.total[out][inp],
                               "elasticity": p.elasticity[out][inp],
                               "at_input_p5": p.tornado[out][inp][0], "at_input_p95": p.tornado[out][inp][1]})
    if summary:
        tables["uncertainty"] = pd.DataFrame(summary)
        tables["sensitivity"] = pd.DataFrame(shares)
    return tables
