"""Transport parameters of gas product species: Lennard-Jones data, each with its source.

Two sources, in this order, for a NASA gas product name (:mod:`perfchain.thermo.products`):

1. Cantera's ``gri30.yaml`` (GRI-Mech 3.0 transport data: collision diameter, well depth,
   dipole moment, polarizability, rotational relaxation number), matched by name
   (case-insensitive, a few NASA names mapped to their gri30 names) and checked by composition;
2. ``mechanisms/transport.toml``, written by ``docs/tools/transport_data.py`` from the
   ``chemicals`` package: the tables of Poling, Prausnitz & O'Connell (2001, Appendix B, from
   Svehla 1962, NASA TR R-132) or Magalhaes et al. (2013), else an estimate from the critical
   temperature and volume (Bird, Stewart & Lightfoot 2002). Each record names its source.

A species in neither has no transport data (``species_transport`` returns None); the mixture
rules leave it out and say so.
"""

from __future__ import annotations

import tomllib
from dataclasses import dataclass
from functools import lru_cache

__all__ = ["SpeciesTransport", "species_transport", "GRI30", "transport_file"]

#: Cantera data file with the transport records used first
GRI30 = "gri30.yaml"
#: NASA names whose gri30 name differs (same species, same composition)
_GRI_NAMES = {"HCHO,formaldehy": "CH2O", "C2H2,acetylene": "C2H2", "CH2CO,ketene": "CH2CO",
              "C2H3,vinyl": "C2H3", "CH3CHO,ethanal": "CH3CHO", "CHCO,ketyl": "HCCO",
              "C3H7,n-propyl": "C3H7"}
_ROT = {"atom": 0.0, "linear": 1.0, "nonlinear": 1.5}
#: rotational relaxation number where the source gives none [-] (common practice: order 1)
DEFAULT_ROT_RELAXATION = 1.0


@dataclass(frozen=True)
class SpeciesTransport:
    """Lennard-Jones transport parameters of one gas species.

    Fields: name (NASA name), molar_mass [kg/kmol], geometry (``"atom"``, ``"linear"``,
    ``"nonlinear"``), diameter [m] (collision diameter sigma), well_depth [K] (epsilon/k),
    dipole [C m], rotational_relaxation [-] (at 298 K), source (where the numbers come from).
    """

    name: str
    molar_mass: float
    geometry: str
    diameter: float
    well_depth: float
    dipole: float
    rotational_relaxation: float
    source: str

    @property
    def cv_rot(self) -> float:
        """Rotational heat capacity over R: 0, 1 or 1.5 [-]."""
        return _ROT[self.geometry]


@lru_cache(maxsize=1)
def _gri_species() -> dict:
    import cantera as ct

    return {s.name.upper(): s for s in ct.Species.list_from_file(GRI30)}


def transport_file() -> str:
    """Path of the bundled ``transport.toml`` (the records outside gri30).

    >>> transport_file().endswith("transport.toml")
    True
    """
    from pathlib import Path
    from importlib import resources

    here = Path(__file__).resolve().parents[2] / "mechanisms" / "transport.toml"
    if here.exists():
        return str(here)
    return str(resources.files("perfchain.mechanisms") / "transport.toml")


@lru_cache(maxsize=1)
def _bundled() -> dict:
    with open(transport_file(), "rb") as fh:
        return tomllib.load(fh)["species"]


def _molar_mass(composition: dict) -> float:
    from perfchain.propellants.ingredients import atomic_weight

    return float(sum(atomic_weight(e) * k for e, k in composition.items()))


@lru_cache(maxsize=512)
def species_transport(name: str) -> SpeciesTransport | None:
    """Transport parameters of the NASA gas species ``name``, or None if no source covers it.

    Parameters
    ----------
    name : str
        NASA gas product name (``"H2O"``, ``"HCL"``, ``"C2H2,acetylene"``...).

    Returns
    -------
    SpeciesTransport or None

    Examples
    --------
    Water from GRI-Mech 3.0 (sigma 2.605 Angstrom, epsilon/k 572.4 K, 1.844 D) and hydrogen
    chloride from Poling et al. (2001), Appendix B (3.339 Angstrom, 344.7 K):

    >>> w = species_transport("H2O")
    >>> round(w.diameter * 1e10, 3), round(w.well_depth, 1), w.source
    (2.605, 572.4, 'gri30.yaml (GRI-Mech 3.0 transport data)')
    >>> h = species_transport("HCL")
    >>> round(h.diameter * 1e10, 3), h.well_depth, h.source.split(" via")[0]
    (3.339, 344.7, 'Poling et al. (2001)')
    >>> species_transport("ALCL2") is None
    True
    """
    from perfchain.thermo.products import gas_species

    try:
        nasa = gas_species(name)
    except KeyError:
        return None
    m = _molar_mass(nasa.composition)
    gri = _gri_species().get(_GRI_NAMES.get(name, name).upper())
    if gri is not None and gri.composition == nasa.composition and gri.transport is not None:
        tr = gri.transport
        from scipy.constants import k

        return SpeciesTransport(name, m, tr.geometry, tr.diameter, tr.well_depth / k, tr.dipole,
                                tr.rotational_relaxation,
                                "gri30.yaml (GRI-Mech 3.0 transport data)")
    rec = _bundled().get(name)
    if rec is None:
        return None
    return SpeciesTransport(name, m, rec["geometry"], rec["diameter"], rec["well_depth"], 0.0,
                            DEFAULT_ROT_RELAXATION, rec["source"])
