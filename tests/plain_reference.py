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

__all__ = ["plain_shifting_point", "plain_multiphase_point", "PlainMultiphase"]


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


# ---------------------------------------------------------------- multiphase (condensed products)
_CONDENSED_VOLUME_DENSITY = 1e7   # [kg/m^3]: condensed volume negligible (see plain_multiphase_point)


def _condensed_phases(elements):
    """One fixed-stoichiometry Cantera phase per NASA condensed species of these elements."""
    import cantera as ct

    out = []
    for sp in ct.Species.list_from_file("nasa_condensed.yaml"):
        if not set(sp.composition) <= elements:
            continue
        d = sp.input_data
        d["equation-of-state"] = {"model": "constant-volume", "density": _CONDENSED_VOLUME_DENSITY}
        spc = ct.Species.from_dict(d)
        ph = ct.Solution(thermo="fixed-stoichiometry", species=[spc])
        out.append((sp.name, ph, sp.thermo.min_temp, sp.thermo.max_temp))
    return out


class PlainMultiphase:
    """Gas + condensed equilibrium of one propellant by Cantera's multiphase solver (VCS).

    Every gas species and every condensed species of the NASA data made of the propellant's
    elements; each condensed species its own fixed-stoichiometry phase, taken only inside its
    data's temperature range (at a range limit both sides are taken and the lever rule blends
    them). The condensed density is set so high (1e7 kg/m^3) that p*v/RT is negligible: the
    usual convention of theoretical rocket performance, which neglects condensed volume.
    T is an outer root (Brent) on enthalpy or entropy. Slow on purpose (a reference).
    """

    def __init__(self, propellant):
        import cantera as ct

        self.elements = {e for e, n in propellant.elements.items() if n > 0}
        species = [s for s in ct.Species.list_from_file("nasa_gas.yaml")
                   if set(s.composition) <= self.elements and "E" not in s.composition]
        self.gas = ct.Solution(thermo="ideal-gas", species=species)
        names = self.gas.element_names
        A = np.array([[self.gas.n_atoms(k, e) for e in names] for k in range(self.gas.n_species)])
        b = np.array([propellant.elements.get(e, 0.0) for e in names])
        self.n0, _ = nnls(A.T, b)
        self.condensed = _condensed_phases(self.elements)
        self.enthalpy = propellant.enthalpy

    def tp(self, T: float, p: float, side: int = 0) -> dict:
        """Equilibrium at T [K], p [Pa]; side -1/+1 keeps only the phase below/above a range limit.
        Returns h [J/kg], s [J/(kg K)], gas amount [kmol/kg], condensed mass fraction [-] and
        the gas density [kg/m^3]."""
        import cantera as ct

        phases = [(self.gas, 0.0)]
        for name, ph, tmin, tmax in self.condensed:
            if tmin <= T <= tmax and not (side < 0 and T == tmin) and not (side > 0 and T == tmax):
                ph.TP = T, p
                phases.append((ph, 0.0))
        self.gas.TPX = T, p, self.n0 + 1e-30
        mix = ct.Mixture(phases)
        mix.T, mix.P = T, p
        mix.species_moles = np.concatenate([self.n0 + 1e-30, np.zeros(len(phases) - 1)])
        mix.equilibrate("TP", solver="vcs", rtol=1e-13, max_steps=5000, estimate_equil=-1)
        h = s = m_cond = 0.0
        n_gas = mix.phase_moles(0)
        for k, (ph, _) in enumerate(phases):
            nk = mix.phase_moles(k)
            h += nk * ph.enthalpy_mole
            s += nk * ph.entropy_mole
            if k:
                m_cond += nk * ph.mean_molecular_weight
        return {"h": h, "s": s, "n_gas": n_gas, "condensed_mass_fraction": m_cond,
                "gas_density": p * self.gas.mean_molecular_weight / (ct.gas_constant * T),
                "T": T}

    def xp(self, kind: str, target: float, p: float, lo: float = 300.0, hi: float = 5000.0) -> dict:
        """State at enthalpy (kind "h") or entropy ("s") and p [Pa]; lever rule on a plateau."""
        def f(T):
            return self.tp(T, p)[kind] - target

        T = brentq(f, lo, hi, xtol=1e-10, rtol=1e-15)
        st = self.tp(T, p)
        if abs(st[kind] - target) <= 1e-9 * abs(target):
            return st
        limits = [t for _, _, a, b in self.condensed for t in (a, b) if abs(t - T) < 1e-6 * T]
        t_b = limits[0]
        a, b = self.tp(t_b, p, -1), self.tp(t_b, p, +1)
        w = (b[kind] - target) / (b[kind] - a[kind])
        return {k: w * a[k] + (1 - w) * b[k] for k in a}


def plain_multiphase_point(propellant, chamber_pressure: float, exit_pressure: float) -> dict:
    """Chamber and optimum expansion (exit at ``exit_pressure``), shifting equilibrium, by
    :class:`PlainMultiphase`. Returns ``chamber_temperature`` [K], ``chamber_condensed`` and
    ``exit_condensed`` (condensed mass fractions [-]), ``exit_temperature`` [K] and
    ``isp_optimum`` [s] = u_e / g0 with u_e = sqrt(2 (h_c - h_e)) (no pressure thrust)."""
    ref = PlainMultiphase(propellant)
    ch = ref.xp("h", propellant.enthalpy, chamber_pressure, 1000.0, 5000.0)
    ex = ref.xp("s", ch["s"], exit_pressure, 300.0, ch["T"])
    u_e = math.sqrt(2.0 * (ch["h"] - ex["h"]))
    return {"chamber_temperature": ch["T"], "chamber_condensed": ch["condensed_mass_fraction"],
            "exit_temperature": ex["T"], "exit_condensed": ex["condensed_mass_fraction"],
            "isp_optimum": u_e / G0}
