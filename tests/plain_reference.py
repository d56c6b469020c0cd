"""A plain, independent reference path for checks and benchmarks (not for users).

It shares nothing with the fast chain but Cantera and the NASA data: every gas
species of the propellant's elements (no pruning, no data-range filter), a
fresh equilibrium from a cold start at every state, the throat found as the
maximum of the mass flux rho*u by a bounded scalar search (no sound speed),
and the exit by a root search on the area ratio. Shifting flow, gas products
only. It is slow on purpose: simple enough to trust.
"""

from __future__ import annotations

import math

import numpy as np
from scipy.optimize import brentq, minimize_scalar, nnls

from perfchain.constants import G0

__all__ = ["plain_shifting_point"]


def plain_shifting_point(propellant, chamber_pressure: float, area_ratio: float | None = None,
                         exit_pressure: float | None = None, ambient_pressure: float = 101325.0) -> dict:
    """Shifting-equilibrium performance by the plain path [SI units].

    Returns a dict with ``chamber_temperature`` [K], ``cstar`` [m/s],
    ``isp_vacuum`` and ``isp_ambient`` [s], ``area_ratio`` [-],
    ``exit_pressure`` [Pa], ``throat_pressure`` [Pa].
    """
    import cantera as ct

    elements = {e for e, n in propellant.elements.items() if n > 0}
    species = [s for s in ct.Species.list_from_file("nasa_gas.yaml") if set(s.composition) <= elements]
    gas = ct.Solution(thermo="ideal-gas", species=species)
    names = gas.element_names
    A = np.array([[gas.n_atoms(k, e) for e in names] for k in range(gas.n_species)])
    b = np.array([propellant.elements.get(e, 0.0) for e in names])
    n0, _ = nnls(A.T, b)
    n0 = n0 + 1e-30

    def fresh(kind, target, p):
        gas.TPX = 3000.0, p, n0
        gas.equilibrate("TP")
        if kind == "h":
            gas.HP = target, p
            gas.equilibrate("HP")
        else:
            gas.SP = target, p
            gas.equilibrate("SP")
        return gas.h, gas.density

    fresh("h", propellant.enthalpy, chamber_pressure)
    t_c, h0, s0 = gas.T, gas.h, gas.s

    def mass_flux(p):
        h, rho = fresh("s", s0, p)
        return rho * math.sqrt(max(2.0 * (h0 - h), 0.0))

    opt = minimize_scalar(lambda x: -mass_flux(chamber_pressure * x), bounds=(0.3, 0.9),
                          method="bounded", options={"xatol": 1e-9})
    p_t = chamber_pressure * opt.x
    g_t = mass_flux(p_t)
    if exit_pressure is None:
        def f(lp):
            return math.log(g_t / mass_flux(math.exp(lp))) - math.log(area_ratio)

        lo = math.log(p_t) - 0.5
        while f(lo) < 0:
            lo -= 0.5
        exit_pressure = math.exp(brentq(f, lo, math.log(p_t * 0.999), xtol=1e-13))
    h_e, rho_e = fresh("s", s0, exit_pressure)
    u_e = math.sqrt(2.0 * (h0 - h_e))
    eps = g_t / (rho_e * u_e)
    c_vac = u_e + exit_pressure * eps / g_t
    c_amb = c_vac - ambient_pressure * eps / g_t
    return {"chamber_temperature": t_c, "cstar": chamber_pressure / g_t, "isp_vacuum": c_vac / G0,
            "isp_ambient": c_amb / G0, "area_ratio": eps, "exit_pressure": exit_pressure,
            "throat_pressure": p_t}
