"""Closed-form isentropic kernels for a calorically perfect gas.

Fast, numpy-friendly float functions (arrays in, arrays out), used as the
check on the real-gas nozzle expansion and for quick estimates. Notation:
``g`` is the ratio of specific heats, ``M`` the Mach number, ``eps`` the area
ratio A/A*, ``pc`` the nozzle-inlet stagnation pressure. Formulas: NACA Report
1135 (Ames Research Staff, 1953), eqs. 43-45 and 80; thrust coefficient as in
Sutton & Biblarz, "Rocket Propulsion Elements", ch. 3 (from memory).
"""

from __future__ import annotations

import math

import numpy as np

from perfchain.constants import R_UNIVERSAL
from perfchain.errors import InputError
# short local names for the shared checks (public in perfchain.nozzle.inputs)
from perfchain.nozzle.inputs import check_array as _check
from perfchain.nozzle.inputs import check_gamma as _gamma
from perfchain.nozzle.inputs import check_mach as _mach
from perfchain.nozzle.inputs import float_if_scalar as _out
from perfchain.thermo.perfect_gas import mach_at_area_ratio

__all__ = [
    "R_UNIVERSAL", "temperature_ratio", "pressure_ratio", "density_ratio",
    "area_ratio", "mach_from_area_ratio", "mach_from_pressure_ratio",
    "gamma_function", "cstar", "thrust_coefficient", "thrust_coefficient_infinite",
    "exit_pressure_ratio_for_area_ratio", "optimum_area_ratio_closed_form",
]

#: R_UNIVERSAL [J/(kmol K)]: molar gas constant from :mod:`perfchain.constants`, re-exported


def temperature_ratio(M, g):
    """Static-to-stagnation temperature ratio T/T0 = 1 / (1 + (g-1)/2 M^2).

    Parameters
    ----------
    M : float or array_like
        Mach number [-].
    g : float or array_like
        Ratio of specific heats [-].

    Returns
    -------
    float or ndarray
        T/T0 [-].

    Examples
    --------
    NACA Report 1135, isentropic table, g = 1.4, M = 2: 0.5556

    >>> round(temperature_ratio(2.0, 1.4), 4)
    0.5556
    """
    M, gg = _mach(M), _gamma(g)
    return _out(1.0 / (1.0 + 0.5 * (gg - 1.0) * M * M), M, g)


def pressure_ratio(M, g):
    """Static-to-stagnation pressure ratio p/p0 = (T/T0)^(g/(g-1)).

    Parameters
    ----------
    M : float or array_like
        Mach number [-].
    g : float or array_like
        Ratio of specific heats [-].

    Returns
    -------
    float or ndarray
        p/p0 [-].

    Examples
    --------
    NACA Report 1135, g = 1.4, M = 2: 0.1278

    >>> round(pressure_ratio(2.0, 1.4), 4)
    0.1278
    """
    gg = _gamma(g)
    return _out(np.asarray(temperature_ratio(M, g)) ** (gg / (gg - 1.0)), M, g)


def density_ratio(M, g):
    """Static-to-stagnation density ratio rho/rho0 = (T/T0)^(1/(g-1)).

    Parameters
    ----------
    M : float or array_like
        Mach number [-].
    g : float or array_like
        Ratio of specific heats [-].

    Returns
    -------
    float or ndarray
        rho/rho0 [-].

    Examples
    --------
    NACA Report 1135, g = 1.4, M = 2: 0.2300

    >>> round(density_ratio(2.0, 1.4), 4)
    0.23
    """
    gg = _gamma(g)
    return _out(np.asarray(temperature_ratio(M, g)) ** (1.0 / (gg - 1.0)), M, g)


def area_ratio(M, g):
    """Area ratio A/A* = (1/M) [(2/(g+1)) (1 + (g-1)/2 M^2)]^((g+1)/(2(g-1))).

    Parameters
    ----------
    M : float or array_like
        Mach number [-], above 0.
    g : float or array_like
        Ratio of specific heats [-].

    Returns
    -------
    float or ndarray
        A/A* [-].

    Examples
    --------
    NACA Report 1135, g = 1.4, M = 2: 1.688

    >>> round(area_ratio(2.0, 1.4), 3)
    1.688
    """
    M = _check("mach", M, 0.0, "a Mach number above 0")
    gg = _gamma(g)
    base = (2.0 / (gg + 1.0)) * (1.0 + 0.5 * (gg - 1.0) * M * M)
    return _out(base ** ((gg + 1.0) / (2.0 * (gg - 1.0))) / M, M, g)


def mach_from_area_ratio(eps, g, supersonic=True):
    """Mach number for an area ratio A/A*, supersonic or subsonic branch.

    The root is found by :func:`perfchain.thermo.perfect_gas.mach_at_area_ratio` (the one
    implementation of this inversion, shared with the batch solver's first exit guess).

    Parameters
    ----------
    eps : float or array_like
        Area ratio A/A* [-], at least 1.
    g : float
        Ratio of specific heats [-].
    supersonic : bool, optional
        Which of the two solutions to return (default supersonic).

    Returns
    -------
    float or ndarray
        Mach number [-].

    Examples
    --------
    NACA Report 1135, g = 1.4: A/A* = 1.688 at M = 2 (table printed to 4 digits)

    >>> round(mach_from_area_ratio(1.6875, 1.4), 3)
    2.0
    """
    arr = _check("area_ratio", eps, 1.0 - 1e-12, "an area ratio of 1 or more", inclusive=True)
    arr = np.maximum(arr, 1.0)  # forgive round-off of area_ratio(1.0, g) just below 1
    gg = float(_gamma(g))
    out = np.vectorize(lambda e: mach_at_area_ratio(float(e), gg, bool(supersonic)), otypes=[float])(arr)
    return _out(out, eps)


def mach_from_pressure_ratio(p_p0, g):
    """Mach number for a static-to-stagnation pressure ratio (closed form).

    M = sqrt( 2/(g-1) [ (p/p0)^(-(g-1)/g) - 1 ] )

    Parameters
    ----------
    p_p0 : float or array_like
        p/p0 [-], in (0, 1].
    g : float or array_like
        Ratio of specific heats [-].

    Returns
    -------
    float or ndarray
        Mach number [-].

    Examples
    --------
    NACA Report 1135, g = 1.4: p/p0 = 0.02722 at M = 3 (from memory)

    >>> round(mach_from_pressure_ratio(0.02722, 1.4), 3)
    3.0
    """
    r = _check("pressure_ratio", p_p0, 0.0, "a pressure ratio in (0, 1]", high=1.0)
    gg = _gamma(g)
    return _out(np.sqrt(2.0 / (gg - 1.0) * (r ** (-(gg - 1.0) / gg) - 1.0)), p_p0, g)


def gamma_function(g):
    """Vandenkerckhove function Gamma(g) = sqrt(g) (2/(g+1))^((g+1)/(2(g-1))).

    Parameters
    ----------
    g : float or array_like
        Ratio of specific heats [-].

    Returns
    -------
    float or ndarray
        Gamma [-].

    Examples
    --------
    Closed form, g = 1.4: sqrt(1.4) (5/6)^3 = 0.6847

    >>> round(gamma_function(1.4), 4)
    0.6847
    """
    gg = _gamma(g)
    return _out(np.sqrt(gg) * (2.0 / (gg + 1.0)) ** ((gg + 1.0) / (2.0 * (gg - 1.0))), g)


def cstar(T_c, molar_mass, g):
    """Characteristic velocity c* = sqrt(R T_c / M) / Gamma(g).

    Parameters
    ----------
    T_c : float or array_like
        Chamber (nozzle-inlet stagnation) temperature [K].
    molar_mass : float or array_like
        Molar mass of the gas [kg/kmol].
    g : float or array_like
        Ratio of specific heats [-].

    Returns
    -------
    float or ndarray
        c* [m/s].

    Examples
    --------
    Closed form: T_c = 3000 K, M = 20 kg/kmol, g = 1.2 gives
    sqrt(8314.46 * 3000 / 20) / Gamma(1.2) = 1116.77 / 0.64853 = 1722.0 m/s

    >>> round(cstar(3000.0, 20.0, 1.2), 1)
    1722.0
    """
    t = _check("chamber_temperature", T_c, 0.0, "a temperature above 0 K")
    m = _check("molar_mass", molar_mass, 0.0, "a molar mass above 0 kg/kmol")
    out = np.sqrt(R_UNIVERSAL * t / m) / np.asarray(gamma_function(g))
    return _out(out, T_c, molar_mass, g)


def _cf_momentum(gg, pe_pc):
    k = 2.0 * gg * gg / (gg - 1.0) * (2.0 / (gg + 1.0)) ** ((gg + 1.0) / (gg - 1.0))
    return np.sqrt(k * (1.0 - pe_pc ** ((gg - 1.0) / gg)))


def thrust_coefficient(g, pe_pc, pa_pc, eps):
    """Ideal thrust coefficient Cf = momentum part + (pe - pa)/pc * eps.

    Cf = sqrt( 2 g^2/(g-1) (2/(g+1))^((g+1)/(g-1)) [1 - (pe/pc)^((g-1)/g)] )
    + (pe/pc - pa/pc) eps; the vacuum value has pa = 0.

    Parameters
    ----------
    g : float or array_like
        Ratio of specific heats [-].
    pe_pc : float or array_like
        Exit-to-chamber pressure ratio [-].
    pa_pc : float or array_like
        Ambient-to-chamber pressure ratio [-] (0 for vacuum).
    eps : float or array_like
        Area ratio Ae/At [-].

    Returns
    -------
    float or ndarray
        Cf [-].

    Examples
    --------
    Closed form, g = 1.4, eps = 1.688 with its isentropic pe/pc = 0.1278
    (NACA 1135, M = 2), vacuum: momentum part sqrt(3.2820 * (1 - 0.5556)) =
    1.2078, pressure part 0.1278 * 1.6875 = 0.2157, total 1.4234

    >>> round(thrust_coefficient(1.4, 0.12780452546295096, 0.0, 1.6875), 4)
    1.4234
    """
    gg = _gamma(g)
    pe = _check("exit_pressure_ratio", pe_pc, 0.0, "a ratio in [0, 1)", inclusive=True, high=1.0)
    pa = _check("ambient_pressure_ratio", pa_pc, 0.0, "a ratio of 0 or more", inclusive=True)
    e = _check("area_ratio", eps, 1.0, "an area ratio of 1 or more", inclusive=True)
    out = _cf_momentum(gg, pe) + (pe - pa) * e
    return _out(out, g, pe_pc, pa_pc, eps)


def thrust_coefficient_infinite(g):
    """Vacuum thrust coefficient at infinite area ratio (pe -> 0).

    Cf_inf = sqrt( 2 g^2/(g-1) (2/(g+1))^((g+1)/(g-1)) )

    Parameters
    ----------
    g : float or array_like
        Ratio of specific heats [-].

    Returns
    -------
    float or ndarray
        Cf [-].

    Examples
    --------
    Closed form, evaluated by hand: g = 1.2 -> 2.2466

    >>> round(thrust_coefficient_infinite(1.2), 4)
    2.2466
    """
    return _out(_cf_momentum(_gamma(g), 0.0), g)


def exit_pressure_ratio_for_area_ratio(eps, g):
    """Isentropic exit pressure ratio pe/pc of a supersonic nozzle of area ratio ``eps``.

    Parameters
    ----------
    eps : float or array_like
        Area ratio Ae/At [-], at least 1.
    g : float
        Ratio of specific heats [-].

    Returns
    -------
    float or ndarray
        pe/pc [-].

    Examples
    --------
    NACA Report 1135, g = 1.4: A/A* = 4.235 at M = 3, p/p0 = 0.02722 (from memory)

    >>> round(exit_pressure_ratio_for_area_ratio(4.2346, 1.4), 5)
    0.02722
    """
    return pressure_ratio(mach_from_area_ratio(eps, g, supersonic=True), g)


def optimum_area_ratio_closed_form(g, pc, pa):
    """Area ratio that expands exactly to ambient pressure (pe = pa), optimum Cf.

    Parameters
    ----------
    g : float or array_like
        Ratio of specific heats [-].
    pc : float or array_like
        Nozzle-inlet stagnation pressure [Pa].
    pa : float or array_like
        Ambient pressure [Pa], above 0 and below ``pc``.

    Returns
    -------
    float or ndarray
        Ae/At [-].

    Examples
    --------
    NACA Report 1135, g = 1.4: p/p0 = 0.1278 at M = 2, where A/A* = 1.688

    >>> round(optimum_area_ratio_closed_form(1.4, 1.0e6, 1.278e5), 3)
    1.688
    """
    p = _check("chamber_pressure", pc, 0.0, "a pressure above 0 Pa")
    a = _check("ambient_pressure", pa, 0.0, "a pressure above 0 Pa")
    if np.any(a >= p):
        raise InputError("ambient_pressure", pa, "a pressure below the chamber pressure")
    return _out(area_ratio(mach_from_pressure_ratio(a / p, g), g), g, pc, pa)
