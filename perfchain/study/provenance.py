"""Where a sweep table comes from: versions, data files, exact inputs, and the code's fingerprint.

No time stamps, so a rerun of the same sweep gives the same metadata and the same checkpoint
names. :func:`code_fingerprint` hashes every ``.py`` file of the perfchain package plus the
ingredient data: checkpoint chunks carry it in their names (:func:`sweep_digest`), and cluster
workers must report the same value.
"""

from __future__ import annotations

import hashlib
import json
from dataclasses import asdict
from functools import lru_cache
from pathlib import Path

from perfchain import __version__
from perfchain.study.grid import SweepGrid
from perfchain.study.rows import COMPOSITION_TOP

__all__ = ["provenance", "code_fingerprint", "sweep_digest"]


def provenance(grid: SweepGrid, top: int = COMPOSITION_TOP, options: dict | None = None) -> dict:
    """Versions, data files and exact inputs of a sweep (no time stamps, so reruns match).

    Parameters
    ----------
    grid : SweepGrid
        The sweep's grid (SI values).
    top : int
        Species kept per station composition column.
    options : dict, optional
        The texts as given on the command line (how many workers ran is left out).

    Returns
    -------
    dict
        ``perfchain``, ``cantera``, ``thermo_data``, ``inputs`` (SI), ``grid_order``,
        ``points``, ``composition_top``, ``units_system``, ``reactants`` (per mixture ratio of
        the grid, the ``reactants`` block of a point: ``mixture_ratio`` [-] or None for a
        formulation, ``enthalpy`` [J/kg], ``elements`` [mol/kg], ``ingredients``) and, if given,
        ``options``.

    Examples
    --------
    A grid of 2 x 1 x 2 x 1 x 1 points (closed form: the product of the list lengths):

    >>> from perfchain.study.grid import make_grid
    >>> meta = provenance(make_grid("LOX", "RP-1", mixture_ratio="2.2,2.6", chamber_pressure="70 bar",
    ...                             area_ratio="10,40"))
    >>> meta["points"], meta["grid_order"][:3], meta["units_system"]
    (4, ['mixture_ratio', 'chamber_pressure', 'area_ratio'], 'SI')
    """
    import cantera

    from perfchain.thermo.products import CONDENSED_DATA, GAS_DATA

    meta = {"perfchain": __version__, "cantera": cantera.__version__,
            "thermo_data": {"gas": GAS_DATA, "condensed": CONDENSED_DATA,
                            "source": "NASA Glenn polynomials as shipped with Cantera " + cantera.__version__},
            "inputs": asdict(grid), "grid_order": list(grid.dims), "points": grid.size,
            "composition_top": top, "units_system": "SI",
            "reactants": [{"mixture_ratio": r, **grid.propellant_at(i).reactants_dict()}
                          for i, r in enumerate(grid.mixture_ratio)]}
    if options is not None:
        meta["options"] = options  # the texts as given (how many workers ran is left out)
    return meta


def code_fingerprint() -> str:
    """Hash of perfchain's own source and ingredient data (16 hex digits).

    Checkpoint chunks carry it in their names, so chunks computed by other code are
    never mixed into a table, and cluster workers must report the same value.

    Returns
    -------
    str
        The first 16 hex digits of a SHA-256 (FIPS 180-4) over every ``.py`` file of the
        package and the ingredient data.

    Examples
    --------
    >>> fp = code_fingerprint()
    >>> len(fp), int(fp, 16) >= 0, fp == code_fingerprint()
    (16, True, True)
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


def sweep_digest(grid: SweepGrid, top: int, solves: int) -> str:
    """Name stem of a sweep's checkpoint chunks: inputs, chunking and code, hashed.

    Parameters
    ----------
    grid : SweepGrid
    top : int
        Species kept per station composition column.
    solves : int
        Solves per chunk.

    Returns
    -------
    str
        16 hex digits; any change of grid, ``top``, ``solves`` or code changes it.

    Examples
    --------
    >>> from perfchain.study.grid import make_grid
    >>> g = make_grid("LOX", "RP-1", mixture_ratio="2.6", chamber_pressure="70 bar", area_ratio="40")
    >>> len(sweep_digest(g, 5, 256)), sweep_digest(g, 5, 256) != sweep_digest(g, 5, 128)
    (16, True)
    """
    meta = provenance(grid, top)
    meta["chunk_solves"] = solves
    meta["code"] = code_fingerprint()
    return hashlib.sha256(json.dumps(meta, sort_keys=True).encode()).hexdigest()[:16]
