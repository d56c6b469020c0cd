"""Station records: the properties a user reads at chamber, throat and exit."""

from __future__ import annotations

from dataclasses import dataclass, field

from perfchain.thermo.equilibrium import EquilibriumSystem, MixState

__all__ = ["Station", "make_station", "COMPOSITION_THRESHOLD", "TRANSPORT_FIELDS", "with_transport"]

#: products below this mole fraction are left out of reported compositions [-]
COMPOSITION_THRESHOLD = 5e-6


@dataclass(frozen=True)
class Station:
    """Properties at one station of the chamber and nozzle (SI units).

    Fields: name (``"chamber"``, ``"throat"`` or ``"exit"``), pressure [Pa],
    temperature [K], density [kg/m^3], enthalpy [J/kg], entropy [J/(kg K)],
    molar_mass [kg/kmol] (mass per kmol of gas),
    gamma [-] (isentropic exponent rho a^2 / p of the flow model),
    gamma_frozen [-] (frozen cp/cv), cp [J/(kg K)] (of the flow model),
    cp_frozen [J/(kg K)], sound_speed [m/s] (of the flow model),
    velocity [m/s], mach [-], area_ratio [-] (A/A*; None in the chamber),
    condensed_mass_fraction [-], composition (mole fractions above
    :data:`COMPOSITION_THRESHOLD`, condensed included).
    Transport properties of the gas (condensed products left out; None unless computed, see
    :func:`with_transport`): viscosity [Pa s], thermal_conductivity [W/(m K)] (frozen),
    thermal_conductivity_equilibrium [W/(m K)] (with the reaction contribution of shifting
    flow), prandtl [-] (frozen), prandtl_equilibrium [-].
    """

    name: str
    pressure: float
    temperature: float
    density: float
    enthalpy: float
    entropy: float
    molar_mass: float
    gamma: float
    gamma_frozen: float
    cp: float
    cp_frozen: float
    sound_speed: float
    velocity: float
    mach: float
    area_ratio: float | None
    condensed_mass_fraction: float
    composition: dict = field(default_factory=dict)
    viscosity: float | None = None
    thermal_conductivity: float | None = None
    thermal_conductivity_equilibrium: float | None = None
    prandtl: float | None = None
    prandtl_equilibrium: float | None = None

    def to_dict(self) -> dict:
        """Plain-dict form (SI units) for JSON and tables."""
        out = {k: getattr(self, k) for k in _FIELDS}
        out["composition"] = dict(self.composition)
        return out


_FIELDS = tuple(Station.__dataclass_fields__)
#: the transport fields of a :class:`Station` (None until :func:`with_transport` fills them)
TRANSPORT_FIELDS = ("viscosity", "thermal_conductivity", "thermal_conductivity_equilibrium",
                    "prandtl", "prandtl_equilibrium")


def with_transport(station: Station):
    """The station with its gas transport properties, and what was left out.

    The gas composition of the station (condensed products left out) at its temperature and
    pressure goes to :func:`perfchain.thermo.transport.gas_transport`; the equilibrium cp is
    that of the reacting gas. When gas species without transport data exceed
    :data:`perfchain.thermo.transport.UNCOVERED_LIMIT` of the gas, the fields stay None.

    Parameters
    ----------
    station : Station

    Returns
    -------
    (Station, GasTransport)

    Examples
    --------
    Nitrogen at 1000 K and 1 bar: 41.5 uPa s (NIST Chemistry WebBook, from memory):

    >>> s = Station("chamber", 1e5, 1000.0, 0.337, 0.0, 0.0, 28.0, 1.34, 1.34, 1167.0, 1167.0,
    ...             640.0, 0.0, 0.0, None, 0.0, {"N2": 1.0})
    >>> t, info = with_transport(s)
    >>> round(t.viscosity * 1e6, 1), round(t.prandtl, 2), info.excluded
    (41.5, 0.71, ())
    """
    from dataclasses import replace

    from perfchain.thermo.transport import gas_transport

    names = list(station.composition)
    tr = gas_transport(names, [station.composition[n] for n in names], station.temperature,
                       station.pressure)
    if not tr.ok:
        return station, tr
    return replace(station, viscosity=tr.viscosity, thermal_conductivity=tr.thermal_conductivity,
                   thermal_conductivity_equilibrium=tr.thermal_conductivity_equilibrium,
                   prandtl=tr.prandtl, prandtl_equilibrium=tr.prandtl_equilibrium), tr


def make_station(system: EquilibriumSystem, st: MixState, name: str, velocity: float,
                 sound_speed: float, cp: float, area_ratio: float | None,
                 threshold: float = COMPOSITION_THRESHOLD) -> Station:
    """Build a :class:`Station` from a solved state and its flow quantities.

    Parameters
    ----------
    system : EquilibriumSystem
        The system ``st`` was solved on.
    st : MixState
        The state [SI].
    name : str
        ``"chamber"``, ``"throat"`` or ``"exit"``.
    velocity, sound_speed : float
        Flow velocity and the flow model's sound speed [m/s].
    cp : float
        The flow model's specific heat [J/(kg K)].
    area_ratio : float or None
        A/A* [-] (None in the chamber).
    threshold : float
        Mole fractions below it are left out of the composition [-].

    Returns
    -------
    Station

    Examples
    --------
    Argon at rest: a monatomic ideal gas has rho a^2 / p = gamma = 5/3 (closed form) and Mach 0:

    >>> from perfchain.propellants.ingredients import get_ingredient
    >>> sys_ar = EquilibriumSystem(get_ingredient("Ar").elements)
    >>> c = sys_ar.tp(3000.0, 1e6)
    >>> s = make_station(sys_ar, c, "chamber", 0.0, sys_ar.sound_speed(c, False), c.cp_frozen, None)
    >>> round(s.gamma, 9), s.mach, list(s.composition)
    (1.666666667, 0.0, ['Ar'])
    """
    return Station(
        name=name, pressure=st.p, temperature=st.T, density=st.density, enthalpy=st.h,
        entropy=st.s, molar_mass=st.molar_mass,
        gamma=st.density * sound_speed ** 2 / st.p, gamma_frozen=st.gamma_frozen,
        cp=cp, cp_frozen=st.cp_frozen, sound_speed=sound_speed, velocity=velocity,
        mach=velocity / sound_speed, area_ratio=area_ratio,
        condensed_mass_fraction=system.condensed_mass_fraction(st),
        composition=system.mole_fractions(st, threshold),
    )
