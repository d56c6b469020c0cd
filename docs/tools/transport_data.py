"""Write mechanisms/transport.toml: Lennard-Jones parameters of product species that gri30.yaml lacks.

Run by hand when the list changes (needs the ``chemicals`` package):

    python3 docs/tools/transport_data.py

Each NASA gas product name below is mapped BY HAND to its CAS number (a formula lookup is
ambiguous: 'C2' resolves to ethane). For each, the collision diameter and epsilon/k come from the
``chemicals`` package's tables, with the table's own name as the source (Poling, Prausnitz &
O'Connell 2001, Appendix B, which reproduces Svehla 1962, NASA TR R-132; or Magalhaes et al.
2013), and where no table has the species, from its critical temperature and volume by the
Bird, Stewart & Lightfoot (2002) critical relations eps/k = 0.77 Tc, sigma = 0.841 Vc^(1/3)
(Vc in cm^3/mol, sigma in Angstrom), marked as an estimate. These fits are to viscosity data
with the nonpolar potential, so no dipole moment is stored (none is added on top).
"""

from __future__ import annotations

import pathlib

import chemicals
from chemicals.critical import Tc, Vc
from chemicals.lennard_jones import (Stockmayer, Stockmayer_methods, molecular_diameter,
                                     molecular_diameter_methods)

# NASA name -> (CAS, geometry); geometry as Cantera writes it (atom, linear, nonlinear)
SPECIES = {
    "He": ("7440-59-7", "atom"),
    "HCL": ("7647-01-0", "linear"),
    "CL2": ("7782-50-5", "linear"),
    "HF": ("7664-39-3", "linear"),
    "F2": ("7782-41-4", "linear"),
    "NOCL": ("2696-92-6", "nonlinear"),
    "CCL4": ("56-23-5", "nonlinear"),
    "CF4": ("75-73-0", "nonlinear"),
    "CH3CL": ("74-87-3", "nonlinear"),
    "CH2CL2": ("75-09-2", "nonlinear"),
    "CHCL3": ("67-66-3", "nonlinear"),
    "C2N2": ("460-19-5", "linear"),
    "C2H2,acetylene": ("74-86-2", "linear"),
    "CH3CN": ("75-05-8", "nonlinear"),
    "C6H6": ("71-43-2", "nonlinear"),
    "CH3OCH3": ("115-10-6", "nonlinear"),
    "C2H5OH": ("64-17-5", "nonlinear"),
    "C4H10,n-butane": ("106-97-8", "nonlinear"),
    "COCL2": ("75-44-5", "nonlinear"),
    "CLF3": ("7790-91-2", "nonlinear"),
    "NF3": ("7783-54-2", "nonlinear"),
    "HNO3": ("7697-37-2", "nonlinear"),
    "HNO2": ("7782-77-6", "nonlinear"),
    "COF2": ("353-50-4", "nonlinear"),
    "F2O": ("7783-41-7", "nonlinear"),
    "CLO2": ("10049-04-4", "nonlinear"),
    "HCOOH": ("64-18-6", "nonlinear"),
    "CH3COOH": ("64-19-7", "nonlinear"),
    "ALCL3": ("7446-70-0", "nonlinear"),
    "KOH": ("1310-58-3", "linear"),
    "KCL": ("7447-40-7", "linear"),
    "K": ("7440-09-7", "atom"),
    "AL": ("7429-90-5", "atom"),
}

BSL = "Bird, Stewart & Lightfoot (2002) critical relations (estimate) from Tc and Vc in the chemicals package"


def record(name: str, cas: str, geometry: str) -> dict | None:
    """The TOML record of one species, or None when neither a table nor Tc and Vc exist."""
    if Stockmayer_methods(cas) and molecular_diameter_methods(cas):
        method = Stockmayer_methods(cas)[0]
        eps = Stockmayer(cas, method=method)
        sigma = molecular_diameter(cas, method=method)
        source = f"{method} via chemicals {chemicals.__version__}"
    elif Tc(cas) and Vc(cas):
        eps = 0.77 * Tc(cas)
        sigma = 0.841 * (Vc(cas) * 1e6) ** (1.0 / 3.0)
        source = f"{BSL} {chemicals.__version__}"
    else:
        return None
    return {"cas": cas, "geometry": geometry, "well_depth": round(float(eps), 4),
            "diameter": round(float(sigma) * 1e-10, 16), "source": source}


def main() -> None:
    out = pathlib.Path(__file__).resolve().parents[2] / "mechanisms" / "transport.toml"
    lines = ["# Lennard-Jones parameters of NASA gas products that gri30.yaml does not cover.",
             "# Written by docs/tools/transport_data.py (do not edit by hand): well_depth is",
             "# epsilon/k [K], diameter sigma [m]; each record names its source.", ""]
    for name, (cas, geometry) in SPECIES.items():
        rec = record(name, cas, geometry)
        if rec is None:
            continue
        lines.append(f'[species."{name}"]')
        lines += [f"{k} = {v!r}".replace("'", '"') for k, v in rec.items()]
        lines.append("")
    out.write_text("\n".join(lines))
    print(f"wrote {out}")


if __name__ == "__main__":
    main()
