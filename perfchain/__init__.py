"""perfchain: rocket propellant performance from ingredients to vehicle delta-v.

SI units inside (Pa, K, kg, m, s, J/kg, kg/kmol); quantities with units only at
the edges (see :mod:`perfchain.units`). The subpackages follow the chain:
:mod:`~perfchain.propellants` -> :mod:`~perfchain.thermo` -> :mod:`~perfchain.nozzle` ->
:mod:`~perfchain.performance` -> :mod:`~perfchain.study` and :mod:`~perfchain.vehicle`;
:mod:`~perfchain.cli` is the command line. Names are imported lazily, so
``import perfchain`` stays fast.
"""

from __future__ import annotations

import importlib

__version__ = "0.1.0"

#: public name -> module that defines it (imported on first use)
_LAZY = {
    "G0": "perfchain.constants",
    "ONE_ATM": "perfchain.constants",
    "R_UNIVERSAL": "perfchain.constants",
}

__all__ = sorted(_LAZY) + ["__version__"]


def __getattr__(name: str):
    module = _LAZY.get(name)
    if module is None:
        raise AttributeError(f"module 'perfchain' has no attribute {name!r}")
    value = getattr(importlib.import_module(module), name)
    globals()[name] = value
    return value


def __dir__():
    return sorted(set(globals()) | set(_LAZY))
