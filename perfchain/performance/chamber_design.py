"""Thrust-chamber design for one operating point: geometry, contour, gas states and wall heat flux.

The chain (each step a module of its own): the point with a finite chamber of the given
contraction ratio and the contour's divergence loss (:mod:`perfchain.performance.chain`) ->
throat area sized for the thrust (or given) -> chamber from L* (:mod:`perfchain.nozzle.geometry`)
-> wall contour (:mod:`perfchain.nozzle.contour`) -> gas state at each station
(:mod:`perfchain.nozzle.profile`) -> transport properties (:mod:`perfchain.thermo.transport`) ->
Bartz heat transfer coefficient, adiabatic wall temperature, heat flux and an approximate
radiation estimate (:mod:`perfchain.nozzle.heat_flux`).

The Bartz group (mu^0.2 cp / Pr^0.6)_0 uses the frozen cp and frozen Prandtl number of the
nozzle's stagnation state; the recovery factor Pr^(1/3) uses the local frozen Prandtl number;
sigma uses the local Mach number and the flow model's isentropic exponent.

Preliminary design estimates: cooling design and hot-fire qualification follow licensed
practice and test.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace

import numpy as np

from perfchain.errors import InputError, SolverError
from perfchain.nozzle.contour import Contour, bell_angles, wall_contour
from perfchain.nozzle.contraction import finite_area_chamber
from perfchain.nozzle.expansion import throat_of
from perfchain.nozzle.geometry import ChamberGeometry, chamber_geometry
from perfchain.nozzle.heat_flux import (BARTZ_VISCOSITY_EXPONENT, adiabatic_wall_temperature, bartz_coefficient,
                                        bartz_sigma, check_wall_temperature, radiation_heat_flux,
                                        recovery_factor)
from perfchain.nozzle.profile import contour_states
from perfchain.performance.chain import performance_of
from perfchain.performance.delivered import deliver
from perfchain.performance.losses import LossModel
from perfchain.performance.result import Performance
from perfchain.thermo.equilibrium import EquilibriumSystem

__all__ = ["SAFETY_NOTE", "ChamberDesign", "chamber_design", "design_from_args", "CONTOUR_COLUMNS"]

SAFETY_NOTE = ("Preliminary design estimates: the heat flux of the Bartz correlation is typically good to "
               "+/- 30-50 %; cooling design and hot-fire qualification follow licensed practice and test.")

#: contour-table column -> unit (the JSON contour stations carry these keys)
CONTOUR_COLUMNS = {
    "x": "m", "radius": "m", "area_ratio": "-", "pressure": "Pa", "temperature": "K", "mach": "-",
    "velocity": "m/s", "gamma": "-", "viscosity": "Pa s", "thermal_conductivity": "W/(m K)",
    "prandtl": "-", "recovery_factor": "-", "sigma": "-", "heat_transfer_coefficient": "W/(m2 K)",
    "adiabatic_wall_temperature": "K", "wall_temperature": "K", "heat_flux": "W/m2",
    "radiation_heat_flux": "W/m2",
}
_DIVERGENCE_FIELDS = ("conical_half_angle", "bell_exit_angle", "divergence_factor")


@dataclass(frozen=True)
class ChamberDesign:
    """A designed thrust chamber (SI).

    Fields: geometry (ChamberGeometry), contour (Contour), stations (list of dicts with the keys
    of :data:`CONTOUR_COLUMNS`), performance (the point's Performance, finite chamber,
    delivered with the contour's divergence), bartz (the stagnation values of the correlation:
    throat_diameter [m], stagnation_pressure [Pa], stagnation_temperature [K], cstar [m/s],
    viscosity [Pa s], cp [J/(kg K)], prandtl [-], throat_curvature_radius [m],
    viscosity_exponent [-]), peak_heat_flux [W/m^2], peak_heat_flux_x [m], notes.
    """

    geometry: ChamberGeometry
    contour: Contour
    stations: list
    performance: Performance
    bartz: dict
    peak_heat_flux: float
    peak_heat_flux_x: float
    notes: tuple = field(default_factory=tuple)

    def table(self):
        """The contour stations as a pandas DataFrame (columns of :data:`CONTOUR_COLUMNS`, SI)."""
        import pandas as pd

        return pd.DataFrame(self.stations, columns=list(CONTOUR_COLUMNS))

    def to_dict(self) -> dict:
        """One JSON-ready dict (SI): geometry, nozzle, contour stations, peak, Bartz values, point."""
        g, c = self.geometry, self.contour
        i_rad = int(np.argmax([s["radiation_heat_flux"] for s in self.stations]))
        return {
            "throat_diameter": g.throat_diameter, "chamber_diameter": g.chamber_diameter,
            "chamber_length": g.chamber_length, "cylinder_length": g.cylinder_length,
            "convergent_length": g.convergent_length, "chamber_volume": g.chamber_volume,
            "characteristic_length": g.characteristic_length, "contraction_ratio": g.contraction_ratio,
            "convergent_half_angle": g.convergent_half_angle,
            "throat_upstream_radius": g.throat_upstream_radius,
            "throat_downstream_radius": g.throat_downstream_radius,
            "chamber_blend_radius": g.chamber_blend_radius,
            "nozzle": {"kind": c.kind, "area_ratio": c.exit_area_ratio, "length": c.nozzle_length,
                       "exit_diameter": 2.0 * float(c.radius[-1]), "initial_angle": c.initial_angle,
                       "exit_angle": c.exit_angle, "length_fraction": c.length_fraction,
                       "divergence_factor": c.divergence_factor},
            "total_length": float(c.x[-1]),
            "peak_heat_flux": self.peak_heat_flux, "peak_heat_flux_x": self.peak_heat_flux_x,
            "peak_radiation_heat_flux": self.stations[i_rad]["radiation_heat_flux"],
            "bartz": dict(self.bartz),
            "contour": [dict(s) for s in self.stations],
            "performance": self.performance.to_dict(),
            "notes": list(self.notes),
            "safety": SAFETY_NOTE,
        }


def _wall_temperatures(wall_temperature, x: np.ndarray) -> np.ndarray:
    """One wall temperature [K] per station: a number, or (x [m], T [K]) pairs interpolated in x."""
    if isinstance(wall_temperature, (int, float)) and not isinstance(wall_temperature, bool):
        return np.full(len(x), float(wall_temperature))
    try:
        pts = np.asarray(wall_temperature, dtype=float)
    except (TypeError, ValueError):
        pts = np.empty(0)
    if pts.ndim != 2 or pts.shape[1] != 2 or len(pts) < 2 or not np.all(np.diff(pts[:, 0]) > 0) \
            or not np.all(np.isfinite(pts)):
        raise InputError("wall_temperature", wall_temperature,
                         "a temperature in K, or at least two (x [m], T [K]) pairs with x increasing")
    return np.interp(x, pts[:, 0], pts[:, 1])


def _losses(losses, contour: str, half_angle: float, length_fraction: float, area_ratio: float) -> LossModel:
    """The point's loss factors with the contour's divergence (none may be given besides)."""
    given = dict(losses or {})
    for key in _DIVERGENCE_FIELDS:
        if given.get(key) is not None:
            raise InputError(key, given[key], "no divergence input: the contour sets it (use the contour "
                             "options: conical half-angle or bell length fraction)")
    if contour == "conical":
        given["conical_half_angle"] = half_angle
    else:
        given["bell_exit_angle"] = bell_angles(area_ratio, length_fraction)[1]
    return LossModel(**given)


def chamber_design(propellant, chamber_pressure: float, *, area_ratio: float, contraction_ratio: float,
                   characteristic_length: float, thrust: float | None = None, throat_diameter: float | None = None,
                   thrust_at: str = "vacuum", ambient_pressure: float = 101325.0, flow: str = "shifting",
                   losses: dict | None = None, contour: str = "bell", nozzle_half_angle: float = math.radians(15.0),
                   bell_length_fraction: float = 0.8, wall_temperature=800.0, points: int = 60,
                   wall_emissivity: float = 0.8, separation=None) -> ChamberDesign:
    """Design the thrust chamber of one operating point and estimate its wall heat flux.

    Parameters
    ----------
    propellant : Propellant
        :class:`perfchain.propellants.mixture.Propellant` (a mixture or a formulation).
    chamber_pressure : float
        Injector-face pressure [Pa].
    area_ratio : float
        Exit / throat area [-], above 1.
    contraction_ratio : float
        Chamber / throat area [-], above 1.
    characteristic_length : float
        L* [m], above 0.
    thrust, throat_diameter : float
        Exactly one: thrust [N] at ``thrust_at`` (sized with the delivered Isp), or the throat [m].
    thrust_at : str
        ``"vacuum"`` or ``"ambient"``.
    ambient_pressure : float
        [Pa]
    flow : str
        ``"shifting"``, ``"frozen"`` or ``"frozen-throat"``: the gas along the contour.
    losses : dict, optional
        LossModel fields other than divergence (the contour sets it).
    contour : str
        ``"bell"`` or ``"conical"``.
    nozzle_half_angle : float
        Cone half-angle [rad] (conical).
    bell_length_fraction : float
        Bell length / 15 deg cone length [-], 0.6 to 0.9 (bell).
    wall_temperature : float or sequence of (x, T)
        Hot-gas-side wall temperature [K], one value or pairs (x [m], T [K]) interpolated.
    points : int
        About how many contour stations (at least 20).
    wall_emissivity : float
        For the radiation estimate [-].
    separation : str, optional
        Separation criterion of the point.

    Returns
    -------
    ChamberDesign

    Examples
    --------
    Closed form: the chamber holds L* A_t, and the throat is sized by F = Cf p_c A_t
    (definition of Cf), here for 20 kN of LOX/RP-1 at 50 bar:

    >>> from perfchain.propellants.mixture import make_propellant
    >>> d = chamber_design(make_propellant("LOX", "RP-1", 2.6), 5e6, area_ratio=12.0, contraction_ratio=4.0,
    ...                    characteristic_length=1.1, thrust=2e4, points=24)
    >>> g = d.geometry
    >>> round(g.chamber_volume / (1.1 * g.throat_area), 12)
    1.0
    >>> p = d.performance
    >>> round(p.delivered["cf_vacuum"] * 5e6 * g.throat_area / 2e4, 9)
    1.0
    """
    from perfchain.thermo.transport import gas_transport

    if (thrust is None) == (throat_diameter is None):
        raise InputError("thrust", "both" if thrust is not None else "neither",
                         "exactly one of thrust or throat_diameter")
    model = _losses(losses, contour, nozzle_half_angle, bell_length_fraction, area_ratio)
    system = EquilibriumSystem(propellant.elements)
    ideal = performance_of(propellant, chamber_pressure, area_ratio=area_ratio, ambient_pressure=ambient_pressure,
                           flow=flow, system=system, contraction_ratio=contraction_ratio, separation=separation)
    if thrust is not None:
        perf = deliver(ideal, model, thrust=thrust, thrust_at=thrust_at)
        at = perf.sizing["throat_area"]
    else:
        if isinstance(throat_diameter, bool) or not isinstance(throat_diameter, (int, float)) \
                or not throat_diameter > 0:
            raise InputError("throat_diameter", throat_diameter, "a diameter above 0 m")
        at = math.pi * throat_diameter ** 2 / 4.0
        perf = deliver(ideal, model, throat_diameter=float(throat_diameter))
    geom = chamber_geometry(at, contraction_ratio, characteristic_length)
    wall = wall_contour(geom, area_ratio, contour, half_angle=nozzle_half_angle,
                        length_fraction=bell_length_fraction, points=points)
    fc = finite_area_chamber(system, propellant.enthalpy, chamber_pressure, contraction_ratio)
    stag = fc.stagnation
    throat = throat_of(system, stag, flow)
    states = contour_states(system, stag, throat, wall.area_ratio, wall.subsonic, flow)
    names = list(system.species_names)

    def transport(st, where):
        # species below 1e-12 change no property by more than ~1e-12 relative: leave them out
        keep = np.flatnonzero(st.X > 1e-12)
        tr = gas_transport([names[i] for i in keep], st.X[keep], st.T, st.p)
        if not tr.ok:   # no heat flux from a gas whose viscosity and Prandtl number miss a large part
            raise SolverError(f"no wall heat flux: gas species without transport data "
                              f"({', '.join(tr.uncovered)}) make {tr.uncovered_fraction:.1%} of the gas at "
                              f"{where}", propellant.describe())
        return tr

    t0 = transport(stag, "the chamber")
    g_t = throat[0].density * throat[1]
    curvature = 0.5 * (geom.throat_upstream_radius + geom.throat_downstream_radius)
    bartz = {"throat_diameter": geom.throat_diameter, "stagnation_pressure": stag.p,
             "stagnation_temperature": stag.T, "cstar": stag.p / g_t, "viscosity": t0.viscosity,
             "cp": t0.cp_frozen, "prandtl": t0.prandtl, "throat_curvature_radius": curvature,
             "viscosity_exponent": BARTZ_VISCOSITY_EXPONENT}
    tw = _wall_temperatures(wall_temperature, wall.x)
    index = {n: k for k, n in enumerate(names)}
    stations = []
    for k, ps in enumerate(states):
        st = ps.state
        tr = transport(st, f"x = {wall.x[k]:.4g} m")
        r = recovery_factor(tr.prandtl)
        taw = adiabatic_wall_temperature(st.T, stag.T, r)
        check_wall_temperature(float(tw[k]), taw, f"x = {wall.x[k]:.4g} m")
        sigma = bartz_sigma(tw[k], stag.T, ps.gamma, ps.mach)
        h = bartz_coefficient(geom.throat_diameter, stag.p, bartz["cstar"], t0.viscosity, t0.cp_frozen,
                              t0.prandtl, curvature, ps.area_ratio, sigma)
        x_h2o = st.X[index["H2O"]] if "H2O" in index else 0.0
        x_co2 = st.X[index["CO2"]] if "CO2" in index else 0.0
        q_rad = radiation_heat_flux(x_h2o * st.p, x_co2 * st.p, st.T, tw[k], 2.0 * wall.radius[k],
                                    wall_emissivity)
        stations.append({"x": float(wall.x[k]), "radius": float(wall.radius[k]), "area_ratio": ps.area_ratio,
                         "pressure": st.p, "temperature": st.T, "mach": ps.mach, "velocity": ps.velocity,
                         "gamma": ps.gamma, "viscosity": tr.viscosity,
                         "thermal_conductivity": tr.thermal_conductivity, "prandtl": tr.prandtl,
                         "recovery_factor": r, "sigma": sigma, "heat_transfer_coefficient": h,
                         "adiabatic_wall_temperature": taw, "wall_temperature": float(tw[k]),
                         "heat_flux": h * (taw - tw[k]), "radiation_heat_flux": q_rad})
    stations = [{k: float(v) for k, v in s.items()} for s in stations]
    peak = int(np.argmax([s["heat_flux"] for s in stations]))
    notes = list(wall.notes)
    if t0.uncovered_fraction > 1e-3:
        notes.append(f"transport data miss {t0.uncovered_fraction:.2%} of the chamber gas by mole "
                     f"({len(t0.uncovered)} species: {', '.join(t0.uncovered[:5])}"
                     f"{', ...' if len(t0.uncovered) > 5 else ''}); its viscosity and Prandtl number leave them out")
    notes.append("transport properties of the gas phase at every station (perfchain.thermo.transport: "
                 "Wilke viscosity, Mason-Saxena conductivity); the Bartz group uses the frozen cp and Prandtl "
                 "number of the nozzle's stagnation state")
    notes.append("radiation_heat_flux: approximate H2O/CO2 estimate (empirical radiant-flux formulas, "
                 "mean beam length 0.85 D), reported apart from the convective heat_flux")
    if any(s.state.condensed for s in states):
        notes.append("condensed products present: the gas transport leaves them out and the Bartz "
                     "correlation does not model particle heating of the wall")
    notes.extend(perf.notes or ())
    return ChamberDesign(geometry=geom, contour=wall, stations=stations, performance=perf, bartz=bartz,
                         peak_heat_flux=stations[peak]["heat_flux"], peak_heat_flux_x=stations[peak]["x"],
                         notes=tuple(notes))


def design_from_args(args: dict) -> ChamberDesign:
    """:func:`chamber_design` on the checked arguments of :func:`perfchain.inputs.chamber_args`.

    Parameters
    ----------
    args : dict
        The output of :func:`perfchain.inputs.chamber_args` (its ``characteristic_length_source``
        says whether L* was given or taken from the table of typical values).

    Returns
    -------
    ChamberDesign
        With a note first when L* came from the table (common practice).
    """
    args = dict(args)
    source = args.pop("characteristic_length_source", "given")
    design = chamber_design(**args)
    if source == "typical":
        note = (f"characteristic_length: {args['characteristic_length']:.4g} m, the middle of the typical range "
                "for this pair (common practice); give your own from test data")
        design = replace(design, notes=(note, *design.notes))
    return design
