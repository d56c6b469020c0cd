"""The chain for many points of one flow model at once (infinite-area chamber).

Points go through the batch solver of :mod:`perfchain.thermo.batch` grouped by element set;
points sharing propellant and chamber pressure share one chamber and throat solve. Any point
the batch solver hands back is solved on the general path
(:mod:`perfchain.performance.general`). Rows never mix: every point gets the bits it gets alone.
"""

from __future__ import annotations

from functools import lru_cache

import numpy as np

from perfchain.constants import ONE_ATM
from perfchain.errors import PerfchainError
from perfchain.nozzle.stations import COMPOSITION_THRESHOLD, Station
from perfchain.performance.general import performance_general
from perfchain.performance.result import assemble_performance, propellant_fields
from perfchain.thermo.equilibrium import EquilibriumSystem

__all__ = ["performance_batch"]


def performance_batch(points, *, exit_key: str = "area_ratio", ambient_pressure: float = ONE_ATM,
                      system: EquilibriumSystem | None = None, flow: str = "shifting") -> list:
    """Performance of many points at once (infinite-area chamber, SI).

    Parameters
    ----------
    points : list of (Propellant, chamber pressure [Pa], exit value)
        The exit value is an area ratio [-] or an exit pressure [Pa], by ``exit_key``.
    exit_key : str
        ``"area_ratio"`` or ``"exit_pressure"``.
    ambient_pressure : float
        [Pa]
    system : EquilibriumSystem, optional
        A system of the points' elements, reused.
    flow : str
        ``"shifting"``, ``"frozen"`` or ``"frozen-throat"`` (all points).

    Returns
    -------
    list
        Per point a :class:`~perfchain.performance.result.Performance`, or the
        :class:`~perfchain.errors.PerfchainError` that stopped it.

    Every point gets the numbers it gets alone (:mod:`perfchain.thermo.batch` keeps
    rows apart); points sharing propellant and chamber pressure share one
    chamber and throat solve. ``flow`` is checked by the caller.

    Examples
    --------
    LOX/RP-1 at O/F 2.56 and 1000 psia expanded to 1 atm gives about 300 s at
    sea level (Sutton & Biblarz, Rocket Propulsion Elements, Table 5-5; from
    memory, +/- 1 %); an exit pressure above the chamber's keeps its place as
    an error:

    >>> from perfchain.propellants.mixture import make_propellant
    >>> p = make_propellant("LOX", "RP-1", 2.56)
    >>> a, b = performance_batch([(p, 6894757.29, 101325.0), (p, 6894757.29, 8e6)],
    ...                          exit_key="exit_pressure")
    >>> abs(a.isp_ambient / 300 - 1) < 0.01, type(b).__name__
    (True, 'InputError')
    """
    out: list = [None] * len(points)
    groups: dict = {}
    elements = {}
    for k, (prop, _, _) in enumerate(points):
        if id(prop) not in elements:
            elements[id(prop)] = prop.elements
        key = frozenset(e for e, n in elements[id(prop)].items() if n > 0)
        groups.setdefault(key, []).append(k)
    for ks in groups.values():
        prop0 = points[ks[0]][0]
        full = system if system is not None and len(groups) == 1 else _template(frozenset(
            e for e, n in elements[id(prop0)].items() if n > 0))
        _solve_group(points, ks, full, elements, out, exit_key, ambient_pressure, flow)
    return out


def _solve_group(points, ks, full, elements, out, exit_key, ambient_pressure, flow):
    """Solve the points ``ks`` (one element set) on the batch solver over ``full``'s species;
    fill ``out[k]`` with a Performance or the error, handing failed rows to the general path."""
    from perfchain.thermo import batch

    tab = batch.tables_for(full)
    chambers: dict = {}
    source = []
    for k in ks:
        prop, pc, _ = points[k]
        el = elements[id(prop)]
        key = (tuple(float(el.get(e, 0.0)) for e in tab.element_names), prop.enthalpy, pc)
        source.append(chambers.setdefault(key, len(chambers)))
    keys = list(chambers)
    nz = stations = None
    if tab.supported:
        nz = batch.nozzle(tab, [k[0] for k in keys], np.array([k[1] for k in keys]),
                          np.array([k[2] for k in keys]), np.array(source), flow=flow,
                          **{exit_key: np.array([float(points[k][2]) for k in ks])})
        stations = _batch_stations(nz, full)
    fixed: dict = {}
    for j, k in enumerate(ks):
        prop, pc, x = points[k]
        try:
            if nz is not None and nz.ok[j]:
                if id(prop) not in fixed:
                    fixed[id(prop)] = propellant_fields(prop)
                ci = int(nz.source[j])
                out[k] = assemble_performance(
                    fixed[id(prop)], pc, ambient_pressure, flow,
                    stations[0][ci], stations[1][ci], stations[2][j],
                    float(nz.throat_mass_flux[ci]), float(nz.exit_velocity[j]),
                    float(nz.exit.p[j]), float(nz.area_ratio[j]), None,
                    lambda: f"{prop.describe()}, chamber pressure {pc:.6g} Pa, {flow} flow")
            else:   # handed back: the general path, on a system of this point's own elements
                same = np.array_equal(full.b, [float(elements[id(prop)].get(e, 0.0))
                                               for e in full.element_names])
                out[k] = performance_general(prop, pc, ambient_pressure=ambient_pressure, flow=flow,
                                             system=full if same else None, **{exit_key: x})
        except PerfchainError as exc:
            out[k] = exc


@lru_cache(maxsize=32)
def _template(elements: frozenset) -> EquilibriumSystem:
    """A system over the products of these elements (its element totals are placeholders):
    species lists and tables for the batch solver, shared by every mixture of them."""
    return EquilibriumSystem({e: 1.0 for e in elements})


def _batch_stations(nz, full):
    """Chamber, throat and exit :class:`~perfchain.nozzle.stations.Station` lists of a solved batch nozzle
    (rows the batch handed back get None)."""
    n_ch = len(nz.chamber.T)
    specs = (("chamber", nz.chamber, nz.chamber_props, nz.chamber_deriv, np.zeros(n_ch), None),
             ("throat", nz.throat, nz.throat_props, nz.throat_deriv, nz.throat_velocity, 1.0),
             ("exit", nz.exit, nz.exit_props, nz.exit_deriv, nz.exit_velocity, nz.area_ratio))
    names = full.species_names
    cnames = full.cond_names
    out = []
    for name, bt, pr, d, vel, eps in specs:
        ok = bt.ok
        ng = pr["n_gas"]
        nc = np.where(bt.act, bt.nc, 0.0)
        total = ng + nc.sum(-1)
        with np.errstate(all="ignore"):
            xg = (pr["nj"] / ng[:, None]) * ng[:, None] / total[:, None]
            xc = nc / total[:, None]
            cmf = (nc * full.cond_mw[None, :]).sum(-1) if len(cnames) else np.zeros(len(ng))
            a = d["sound_speed"]
            gamma = pr["density"] * a * a / bt.p
            mach = vel / a
            gf = pr["cp_frozen"] / pr["cv_frozen"]
        cols = [c.tolist() for c in (bt.p, bt.T, pr["density"], pr["h"], pr["s"], 1.0 / ng, gamma, gf, d["cp"],
                                     pr["cp_frozen"], a, vel, mach, cmf)]
        eps_list = [eps] * len(ng) if not isinstance(eps, np.ndarray) else eps.tolist()
        above_g = xg > COMPOSITION_THRESHOLD
        above_c = xc > COMPOSITION_THRESHOLD
        rows = []
        for i in range(len(ng)):
            if not ok[i]:
                rows.append(None)
                continue
            comp = {names[k]: float(xg[i, k]) for k in np.nonzero(above_g[i])[0]}
            for c in np.nonzero(above_c[i])[0]:
                comp[cnames[c]] = comp.get(cnames[c], 0.0) + float(xc[i, c])
            comp = dict(sorted(comp.items(), key=lambda kv: -kv[1]))
            (p_, T_, rho, h, s_, mm, g_, gf_, cp, cpf, a_, u, m_, cmf_) = (col[i] for col in cols)
            rows.append(Station(name=name, pressure=p_, temperature=T_, density=rho, enthalpy=h, entropy=s_,
                                molar_mass=mm, gamma=g_, gamma_frozen=gf_, cp=cp, cp_frozen=cpf,
                                sound_speed=a_, velocity=u, mach=m_, area_ratio=eps_list[i],
                                condensed_mass_fraction=cmf_, composition=comp))
        out.append(rows)
    return out
