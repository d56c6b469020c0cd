"""Hot-gas-side wall heat flux: the Bartz correlation, adiabatic wall temperature, radiation.

Convection (Bartz, D. R., "A simple equation for rapid estimation of rocket nozzle convective
heat transfer coefficients", Jet Propulsion 27 (1957) 49-51), in SI units:

    h_g = 0.026 / D_t^0.2 (mu^0.2 cp / Pr^0.6)_0 (p_0 / c*)^0.8 (D_t / R_c)^0.1 (A_t / A)^0.9 sigma

with the transport properties at the stagnation (chamber) temperature, p_0 the nozzle's
stagnation pressure, R_c the throat's radius of curvature (here the mean of the upstream and
downstream radii, common practice) and the property-variation correction

    sigma = 1 / ( [0.5 (T_w / T_0) (1 + (g-1)/2 M^2) + 0.5]^(0.8 - w/5) (1 + (g-1)/2 M^2)^(w/5) )

with w = 0.6 (mu ~ T^w). The heat flux is q = h_g (T_aw - T_w), the adiabatic wall
temperature T_aw = T + r (T_0 - T) with the turbulent recovery factor r = Pr^(1/3) of the local
gas (Sutton & Biblarz, Rocket Propulsion Elements, ch. 8; Huzel & Huang ch. 4, from memory).

Radiation from H2O and CO2 (approximate, reported apart from convection): the empirical
radiant-flux formulas quoted in liquid-rocket design texts for combustion gases (from memory;
an order-of-magnitude estimate),

    q_H2O = 5.74 (p_H2O L)^0.3 (T / 100)^3.5,   q_CO2 = 4.07 (p_CO2 L)^(1/3) (T / 100)^3.5   [W/m^2]

with partial pressures in atm, the mean beam length L = 0.85 D [m] (Hottel's 0.95 D of a long
cylinder radiating to its wall, times the usual 0.9; from memory), the wall's own emission
removed by the factor 1 - (T_w / T)^3.5 and an effective wall emissivity (eps_w + 1) / 2.

Preliminary design estimates: cooling design and hot-fire qualification follow licensed
practice and test.
"""

from __future__ import annotations

import math

from perfchain.constants import ONE_ATM
from perfchain.errors import InputError

__all__ = ["BARTZ_VISCOSITY_EXPONENT", "MEAN_BEAM_LENGTH_FACTOR", "bartz_sigma", "bartz_coefficient",
           "recovery_factor", "adiabatic_wall_temperature", "radiation_heat_flux", "check_wall_temperature"]

#: exponent w of mu ~ T^w in Bartz's property-variation correction [-] (Bartz 1957)
BARTZ_VISCOSITY_EXPONENT = 0.6
#: mean beam length / diameter of the radiating gas column [-] (Hottel, from memory)
MEAN_BEAM_LENGTH_FACTOR = 0.85


def bartz_sigma(wall_temperature: float, stagnation_temperature: float, gamma: float, mach: float,
                exponent: float = BARTZ_VISCOSITY_EXPONENT) -> float:
    """Bartz's property-variation correction sigma [-].

    Parameters
    ----------
    wall_temperature, stagnation_temperature : float
        T_w and T_0 [K].
    gamma : float
        Isentropic exponent of the gas at the station [-].
    mach : float
        Local Mach number [-].
    exponent : float
        w in mu ~ T^w [-] (0.6).

    Returns
    -------
    float
        sigma [-].

    Examples
    --------
    Closed form: at the throat (M = 1, gamma = 1.2) with T_w / T_0 = 0.25,
    sigma = 1 / ((0.5 * 0.25 * 1.1 + 0.5)^0.68 * 1.1^0.12) = 1.3427:

    >>> round(bartz_sigma(900.0, 3600.0, 1.2, 1.0), 4)
    1.3427
    """
    stag = 1.0 + 0.5 * (gamma - 1.0) * mach * mach
    return 1.0 / ((0.5 * wall_temperature / stagnation_temperature * stag + 0.5) ** (0.8 - exponent / 5.0)
                  * stag ** (exponent / 5.0))


def bartz_coefficient(throat_diameter: float, stagnation_pressure: float, cstar: float, viscosity: float,
                      cp: float, prandtl: float, throat_curvature_radius: float, area_ratio: float,
                      sigma: float) -> float:
    """Hot-gas heat transfer coefficient h_g of the Bartz (1957) correlation [W/(m^2 K)].

    Parameters
    ----------
    throat_diameter : float
        D_t [m].
    stagnation_pressure : float
        p_0 [Pa].
    cstar : float
        Characteristic velocity [m/s].
    viscosity, cp, prandtl : float
        At the stagnation temperature: mu [Pa s], cp [J/(kg K)], Pr [-].
    throat_curvature_radius : float
        R_c [m].
    area_ratio : float
        A / A_t at the station [-].
    sigma : float
        Property-variation correction [-] (:func:`bartz_sigma`).

    Returns
    -------
    float
        h_g [W/(m^2 K)].

    Examples
    --------
    Closed form of Bartz's equation: D_t = 0.1 m, p_0 = 7 MPa, c* = 1800 m/s, mu = 1e-4 Pa s,
    cp = 2000 J/(kg K), Pr = 0.5, R_c = 0.1 m, at the throat with sigma = 1:
    0.026 / 0.1^0.2 * 1e-4^0.2 * 2000 / 0.5^0.6 * 3888.9^0.8 = 14 739 W/(m^2 K):

    >>> round(bartz_coefficient(0.1, 7e6, 1800.0, 1e-4, 2000.0, 0.5, 0.1, 1.0, 1.0))
    14739
    """
    return (0.026 / throat_diameter ** 0.2 * viscosity ** 0.2 * cp / prandtl ** 0.6
            * (stagnation_pressure / cstar) ** 0.8 * (throat_diameter / throat_curvature_radius) ** 0.1
            * area_ratio ** -0.9 * sigma)


def recovery_factor(prandtl: float) -> float:
    """Turbulent recovery factor r = Pr^(1/3) [-] (Sutton & Biblarz ch. 8, from memory).

    Parameters
    ----------
    prandtl : float
        Pr [-].

    Returns
    -------
    float
        r [-].

    Examples
    --------
    >>> round(recovery_factor(0.729), 6)
    0.9
    """
    return prandtl ** (1.0 / 3.0)


def adiabatic_wall_temperature(temperature: float, stagnation_temperature: float, recovery: float) -> float:
    """T_aw = T + r (T_0 - T) [K].

    Parameters
    ----------
    temperature, stagnation_temperature : float
        Local static T and stagnation T_0 [K].
    recovery : float
        Recovery factor r [-].

    Returns
    -------
    float
        [K]

    Examples
    --------
    Closed form: T = 3000 K, T_0 = 3500 K, r = 0.9 gives 3450 K

    >>> adiabatic_wall_temperature(3000.0, 3500.0, 0.9)
    3450.0
    """
    return temperature + recovery * (stagnation_temperature - temperature)


def radiation_heat_flux(h2o_pressure: float, co2_pressure: float, temperature: float, wall_temperature: float,
                        diameter: float, wall_emissivity: float = 0.8) -> float:
    """Approximate radiant heat flux of H2O and CO2 to the wall [W/m^2] (see the module text).

    Parameters
    ----------
    h2o_pressure, co2_pressure : float
        Partial pressures [Pa].
    temperature, wall_temperature : float
        Gas and wall temperature [K].
    diameter : float
        Local diameter of the gas column [m].
    wall_emissivity : float
        eps_w [-] (0.8, common practice for an oxidised metal wall).

    Returns
    -------
    float
        [W/m^2], 0 when the wall is at least as hot as the gas.

    Examples
    --------
    Closed form of the formulas: 20 atm of H2O alone in a 0.2 m column at 3600 K, wall at 0 K
    and black (eps_w = 1): 5.74 (20 * 0.17)^0.3 * 36^3.5 = 2.32 MW/m^2:

    >>> round(radiation_heat_flux(20 * 101325.0, 0.0, 3600.0, 0.0, 0.2, 1.0) / 1e6, 2)
    2.32
    """
    if not temperature > wall_temperature:
        return 0.0
    length = MEAN_BEAM_LENGTH_FACTOR * diameter
    scale = (temperature / 100.0) ** 3.5 * (1.0 - (wall_temperature / temperature) ** 3.5)
    q = 5.74 * (max(h2o_pressure, 0.0) / ONE_ATM * length) ** 0.3 * scale
    q += 4.07 * (max(co2_pressure, 0.0) / ONE_ATM * length) ** (1.0 / 3.0) * scale
    return 0.5 * (wall_emissivity + 1.0) * q


def check_wall_temperature(wall_temperature: float, adiabatic: float, where: str = "") -> float:
    """A wall temperature [K] above 0 and below the adiabatic wall temperature there.

    Parameters
    ----------
    wall_temperature : float
        [K]
    adiabatic : float
        The adiabatic wall temperature at that station [K].
    where : str
        Where along the contour, for the message.

    Returns
    -------
    float

    Examples
    --------
    >>> check_wall_temperature(4000.0, 3400.0, "x = 0.3 m")
    Traceback (most recent call last):
    ...
    perfchain.errors.InputError: wall_temperature: got 4000.0; allowed: a temperature above 0 K and below the adiabatic wall temperature 3400 K (at x = 0.3 m)
    """
    if not (isinstance(wall_temperature, (int, float)) and 0.0 < wall_temperature < adiabatic):
        at = f" (at {where})" if where else ""
        raise InputError("wall_temperature", wall_temperature,
                         f"a temperature above 0 K and below the adiabatic wall temperature {adiabatic:.5g} K{at}")
    return float(wall_temperature)


