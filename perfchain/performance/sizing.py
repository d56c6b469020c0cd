"""Thrust-chamber sizing from a thrust and an operating point.

Definitions (Sutton & Biblarz, "Rocket Propulsion Elements", ch. 2-3; these
are the definitions of Isp and c*, so they hold exactly):

    mdot = F / (Isp g0)            total propellant mass flow
    At   = mdot c* / pc            c* = pc At / mdot
    Ae   = eps At                  D = sqrt(4 A / pi)
    mdot_ox = mdot r / (1 + r),  mdot_f = mdot / (1 + r),   r = O/F by mass
    Vdot = mdot / rho              volume flow of each propellant

Use the Isp and the c* of the same condition as the thrust (delivered values
for a real engine; ambient Isp for a sea-level thrust, vacuum Isp for a
vacuum thrust); ``pc`` is the nozzle-inlet stagnation pressure.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from perfchain.constants import G0
from perfchain.errors import InputError

__all__ = ["Sizing", "size_thrust_chamber", "mass_flow", "throat_area", "diameter"]


def _positive(name, value, allowed, minimum=0.0, inclusive=False):
    ok = isinstance(value, (int, float)) and not isinstance(value, bool) and math.isfinite(value)
    if not ok or value < minimum or (not inclusive and value == minimum):
        raise InputError(name, value, allowed)
    return float(value)


def mass_flow(thrust: float, isp: float) -> float:
    """Propellant mass flow mdot = F / (Isp g0).

    Parameters
    ----------
    thrust : float
        Thrust [N].
    isp : float
        Specific impulse [s].

    Returns
    -------
    float
        Mass flow [kg/s].

    Examples
    --------
    Definition of Isp: 9806.65 N at 100 s is 10 kg/s exactly

    >>> mass_flow(9806.65, 100.0)
    10.0
    """
    return _positive("thrust", thrust, "a thrust above 0 N") / (
        _positive("isp", isp, "a specific impulse above 0 s") * G0)


def throat_area(mass_flow: float, cstar: float, chamber_pressure: float) -> float:
    """Throat area At = mdot c* / pc (definition of c*).

    Parameters
    ----------
    mass_flow : float
        Mass flow [kg/s].
    cstar : float
        Characteristic velocity [m/s].
    chamber_pressure : float
        Nozzle-inlet stagnation pressure [Pa].

    Returns
    -------
    float
        Throat area [m^2].

    Examples
    --------
    Definition of c*: 10 kg/s at c* = 1500 m/s and 1.5 MPa needs 0.01 m^2

    >>> throat_area(10.0, 1500.0, 1.5e6)
    0.01
    """
    return (_positive("mass_flow", mass_flow, "a mass flow above 0 kg/s")
            * _positive("cstar", cstar, "a speed above 0 m/s")
            / _positive("chamber_pressure", chamber_pressure, "a pressure above 0 Pa"))


def diameter(area: float) -> float:
    """Diameter of a circle of the given area, D = sqrt(4 A / pi).

    Parameters
    ----------
    area : float
        Area [m^2].

    Returns
    -------
    float
        Diameter [m].

    Examples
    --------
    Closed form: a circle of area pi/4 m^2 has diameter 1 m

    >>> diameter(math.pi / 4)
    1.0
    """
    return math.sqrt(4.0 * _positive("area", area, "an area above 0 m**2") / math.pi)


@dataclass(frozen=True)
class Sizing:
    """Thrust-chamber size and flows (SI: m^2, m, kg/s, m^3/s; volume flows None without a density,
    oxidizer and fuel flows None for a formulation)."""

    throat_area: float
    throat_diameter: float
    exit_area: float
    exit_diameter: float
    mass_flow: float
    oxidizer_mass_flow: float | None
    fuel_mass_flow: float | None
    oxidizer_volume_flow: float | None
    fuel_volume_flow: float | None

    def to_dict(self) -> dict:
        """The fields as a plain dict."""
        return {k: getattr(self, k) for k in self.__dataclass_fields__}


def size_thrust_chamber(thrust: float, isp: float, cstar: float, chamber_pressure: float,
                        area_ratio: float, mixture_ratio: float,
                        oxidizer_density: float | None = None,
                        fuel_density: float | None = None) -> Sizing:
    """Throat and exit size and propellant flows for a required thrust.

    Parameters
    ----------
    thrust : float
        Required thrust [N], above 0.
    isp : float
        Specific impulse at that thrust condition [s].
    cstar : float
        Characteristic velocity [m/s].
    chamber_pressure : float
        Nozzle-inlet stagnation pressure [Pa].
    area_ratio : float
        Ae/At [-], at least 1.
    mixture_ratio : float or None
        Oxidizer-to-fuel mass ratio O/F [-], 0 or more (0: fuel only); None for a
        formulation (a solid grain, a monopropellant): the total mass flow only, the
        oxidizer and fuel flows None.
    oxidizer_density, fuel_density : float, optional
        Propellant densities [kg/m^3] for the volume flows.

    Returns
    -------
    Sizing

    Examples
    --------
    Definitions of Isp and c*: 9806.65 N at 100 s is 10 kg/s; at c* 1500 m/s and
    1.5 MPa the throat is 0.01 m^2; O/F 4 splits 8 + 2 kg/s

    >>> s = size_thrust_chamber(9806.65, 100.0, 1500.0, 1.5e6, 4.0, 4.0)
    >>> s.throat_area, round(s.exit_diameter / s.throat_diameter, 12), s.oxidizer_mass_flow
    (0.01, 2.0, 8.0)
    >>> size_thrust_chamber(9806.65, 100.0, 1500.0, 1.5e6, 4.0, None).oxidizer_mass_flow is None
    True
    """
    mdot = mass_flow(thrust, isp)
    at = throat_area(mdot, cstar, chamber_pressure)
    eps = _positive("area_ratio", area_ratio, "an area ratio of 1 or more", 1.0, inclusive=True)
    if mixture_ratio is None:   # a formulation: no oxidizer/fuel split
        m_ox = m_f = None
    else:
        r = _positive("mixture_ratio", mixture_ratio, "an O/F mass ratio of 0 or more", inclusive=True)
        m_ox, m_f = mdot * r / (1.0 + r), mdot / (1.0 + r)

    def volume(name, m, rho):
        if rho is None or m is None:
            return None
        return m / _positive(name, rho, "a density above 0 kg/m**3")

    return Sizing(throat_area=at, throat_diameter=diameter(at), exit_area=eps * at,
                  exit_diameter=diameter(eps * at), mass_flow=mdot,
                  oxidizer_mass_flow=m_ox, fuel_mass_flow=m_f,
                  oxidizer_volume_flow=volume("oxidizer_density", m_ox, oxidizer_density),
                  fuel_volume_flow=volume("fuel_density", m_f, fuel_density))
