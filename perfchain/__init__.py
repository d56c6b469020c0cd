"""perfchain: rocket propellant performance from ingredients to vehicle delta-v.

``import perfchain as pc`` offers the job at the top level:

- one operating point and its best mixture ratio: :func:`pc.point <perfchain.api.point.point>`,
  :func:`pc.optimum <perfchain.api.point.optimum>`;
- tables and comparisons as pandas DataFrames: :func:`pc.sweep <perfchain.api.tables.sweep>`
  (or an xarray Dataset), :func:`pc.compare <perfchain.api.tables.compare>`;
- vehicles: :func:`pc.stage <perfchain.api.vehicle.stage>`, :func:`pc.delta_v
  <perfchain.api.vehicle.delta_v>`, :func:`pc.propellant_for_delta_v
  <perfchain.api.vehicle.propellant_for_delta_v>`, :func:`pc.max_payload
  <perfchain.api.vehicle.max_payload>`, :func:`pc.optimal_staging <perfchain.api.vehicle.optimal_staging>`;
- uncertainty and sensitivity: :func:`pc.point_uncertainty
  <perfchain.api.uncertainty.point_uncertainty>`, :func:`pc.delta_v_uncertainty
  <perfchain.api.uncertainty.delta_v_uncertainty>`;
- thrust-chamber geometry, contour and wall heat flux: :func:`pc.chamber <perfchain.api.chamber.chamber>`;
- studies: :func:`pc.run_study <perfchain.api.tables.run_study>`;
- ingredients: :func:`pc.ingredient <perfchain.api.ingredients.ingredient>`, :func:`pc.ingredients
  <perfchain.api.ingredients.ingredients>`, :func:`pc.blend <perfchain.api.ingredients.blend>`,
  :func:`pc.custom_ingredient <perfchain.api.ingredients.custom_ingredient>`.

Every quantity argument takes text with a unit (``"70 bar"``), a pint Quantity
(``pc.Q_(70, "bar")``) or a plain number in SI units. SI units inside (Pa, K, kg, m, s,
J/kg, kg/kmol); units only at the edges (see :mod:`perfchain.units` and
:mod:`perfchain.inputs`). The subpackages follow the chain: :mod:`~perfchain.propellants` ->
:mod:`~perfchain.thermo` -> :mod:`~perfchain.nozzle` -> :mod:`~perfchain.performance` ->
:mod:`~perfchain.study` and :mod:`~perfchain.vehicle`; :mod:`~perfchain.api` is the Python
face and :mod:`~perfchain.cli` the command line. Names are imported lazily, so
``import perfchain`` stays fast.
"""

from __future__ import annotations

import importlib

__version__ = "0.1.0"

#: public name -> module that defines it (imported on first use); a name that maps to
#: itself with a leading "perfchain." is a submodule
_LAZY = {
    "G0": "perfchain.constants",
    "ONE_ATM": "perfchain.constants",
    "R_UNIVERSAL": "perfchain.constants",
    "point": "perfchain.api.point",
    "optimum": "perfchain.api.point",
    "PointResult": "perfchain.api.point",
    "chamber": "perfchain.api.chamber",
    "sweep": "perfchain.api.tables",
    "compare": "perfchain.api.tables",
    "to_xarray": "perfchain.api.tables",
    "run_study": "perfchain.api.tables",
    "point_uncertainty": "perfchain.api.uncertainty",
    "delta_v_uncertainty": "perfchain.api.uncertainty",
    "stage": "perfchain.api.vehicle",
    "delta_v": "perfchain.api.vehicle",
    "propellant_for_delta_v": "perfchain.api.vehicle",
    "max_payload": "perfchain.api.vehicle",
    "optimal_staging": "perfchain.api.vehicle",
    "ingredient": "perfchain.api.ingredients",
    "ingredients": "perfchain.api.ingredients",
    "blend": "perfchain.api.ingredients",
    "custom_ingredient": "perfchain.api.ingredients",
    "Ingredient": "perfchain.propellants.ingredients",
    "LossModel": "perfchain.performance.losses",
    "Stage": "perfchain.vehicle.rocket",
    "Q_": "perfchain.units",
    "PerfchainError": "perfchain.errors",
    "InputError": "perfchain.errors",
    "SolverError": "perfchain.errors",
    "units": "perfchain.units",
    "inputs": "perfchain.inputs",
}

__all__ = sorted(_LAZY) + ["__version__"]


def __getattr__(name: str):
    module = _LAZY.get(name)
    if module is None:
        raise AttributeError(f"module 'perfchain' has no attribute {name!r}")
    mod = importlib.import_module(module)
    value = mod if module == f"perfchain.{name}" else getattr(mod, name)
    globals()[name] = value
    return value


def __dir__():
    return sorted(set(globals()) | set(_LAZY))
