"""Station records: the properties a user reads at chamber, throat and exit."""

from __future__ import annotations

from dataclasses import dataclass, field

from perfchain.thermo.equilibrium import EquilibriumSystem, MixState

__all__ = ["Station", "make_station", "COMPOSITION_THRESHOLD"]

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

    def to_dict(self) -> dict:
        """Plain-dict form (SI units) for JSON and tables."""
        out = {k: getattr(self, k) for k in _FIELDS}
        out["composition"] = dict(self.composition)
        return out


_FIELDS = tuple(Station.__dataclass_fields__)


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
