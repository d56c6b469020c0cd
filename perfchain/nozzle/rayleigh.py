"""Rayleigh flow: constant-area duct with heat addition, calorically perfect gas.

Closed forms, referred to the sonic (starred) state of the same Rayleigh line
(Anderson, "Modern Compressible Flow", ch. 3; Shapiro, "The Dynamics and
Thermodynamics of Compressible Fluid Flow", ch. 8; from memory):

    p/p*   = (1 + g) / (1 + g M^2)
    T/T*   = M^2 (1 + g)^2 / (1 + g M^2)^2
    T0/T0* = (g + 1) M^2 (2 + (g - 1) M^2) / (1 + g M^2)^2
    p0/p0* = (1 + g)/(1 + g M^2) [ (2 + (g - 1) M^2) / (g + 1) ]^(g/(g-1))

A finite-contraction-ratio combustion chamber is a Rayleigh line from M ~ 0 at
the injector face to the nozzle-inlet Mach number set by the contraction
ratio Ac/At (subsonic root of A/A* = Ac/At). Momentum conservation gives
p_inj = p (1 + g M^2), so the stagnation-pressure ratio is

    p0_inlet / p_inj = (1 + (g - 1)/2 M^2)^(g/(g-1)) / (1 + g M^2)

(-> 1 as Ac/At -> infinity; ~ 1 - g/2 M^2 at low Mach). This closed form is
the check on the real-gas chamber model.
"""

from __future__ import annotations

import numpy as np

from perfchain.errors import InputError
from perfchain.nozzle.inputs import check_gamma as _gamma
from perfchain.nozzle.inputs import check_mach as _mach
from perfchain.nozzle.inputs import float_if_scalar as _out
from perfchain.nozzle.isentropic import mach_from_area_ratio

__all__ = ["pressure_ratio", "temperature_ratio", "stagnation_pressure_ratio",
           "stagnation_temperature_ratio", "mach_from_T0_ratio", "chamber_inlet_mach",
           "chamber_stagnation_pressure_ratio"]


def pressure_ratio(M, g):
    """Rayleigh static-pressure ratio p/p* = (1 + g) / (1 + g M^2).

    Parameters
    ----------
    M : float or array_like
        Mach number [-].
    g : float or array_like
        Ratio of specific heats [-].

    Returns
    -------
    float or ndarray
        p/p* [-].

    Examples
    --------
    Rayleigh table, g = 1.4, M = 0.5: 1.7778 (Anderson, Table A.3; from memory)

    >>> round(pressure_ratio(0.5, 1.4), 4)
    1.7778
    """
    M, gg = _mach(M), _gamma(g)
    return _out((1.0 + gg) / (1.0 + gg * M * M), M, g)


def temperature_ratio(M, g):
    """Rayleigh static-temperature ratio T/T* = M^2 (1 + g)^2 / (1 + g M^2)^2.

    Parameters
    ----------
    M : float or array_like
        Mach number [-].
    g : float or array_like
        Ratio of specific heats [-].

    Returns
    -------
    float or ndarray
        T/T* [-].

    Examples
    --------
    Rayleigh table, g = 1.4, M = 0.5: 0.7901 (Anderson, Table A.3; from memory)

    >>> round(temperature_ratio(0.5, 1.4), 4)
    0.7901
    """
    M, gg = _mach(M), _gamma(g)
    return _out(M * M * (1.0 + gg) ** 2 / (1.0 + gg * M * M) ** 2, M, g)


def stagnation_temperature_ratio(M, g):
    """Rayleigh stagnation-temperature ratio T0/T0* = (g+1) M^2 (2 + (g-1) M^2) / (1 + g M^2)^2.

    Parameters
    ----------
    M : float or array_like
        Mach number [-].
    g : float or array_like
        Ratio of specific heats [-].

    Returns
    -------
    float or ndarray
        T0/T0* [-].

    Examples
    --------
    Rayleigh table, g = 1.4, M = 0.5: 0.6914 (Anderson, Table A.3; from memory)

    >>> round(stagnation_temperature_ratio(0.5, 1.4), 4)
    0.6914
    """
    M, gg = _mach(M), _gamma(g)
    m2 = M * M
    return _out((gg + 1.0) * m2 * (2.0 + (gg - 1.0) * m2) / (1.0 + gg * m2) ** 2, M, g)


def stagnation_pressure_ratio(M, g):
    """Rayleigh stagnation-pressure ratio p0/p0*.

    p0/p0* = (1 + g)/(1 + g M^2) [ (2 + (g - 1) M^2) / (g + 1) ]^(g/(g-1))

    Parameters
    ----------
    M : float or array_like
        Mach number [-].
    g : float or array_like
        Ratio of specific heats [-].

    Returns
    -------
    float or ndarray
        p0/p0* [-].

    Examples
    --------
    Rayleigh table, g = 1.4, M = 0.5: 1.1141 (Anderson, Table A.3; from memory)

    >>> round(stagnation_pressure_ratio(0.5, 1.4), 4)
    1.1141
    """
    M, gg = _mach(M), _gamma(g)
    m2 = M * M
    out = (1.0 + gg) / (1.0 + gg * m2) * ((2.0 + (gg - 1.0) * m2) / (gg + 1.0)) ** (gg / (gg - 1.0))
    return _out(out, M, g)


def mach_from_T0_ratio(T0_ratio, g, supersonic=False):
    """Mach number on a Rayleigh line for a given T0/T0* (closed form, quadratic in M^2).

    With r = T0/T0*: (r g^2 - g^2 + 1) x^2 + 2 (r g - g - 1) x + r = 0, x = M^2,
    whose discriminant is 4 (g + 1)^2 (1 - r); the smaller root is subsonic.

    Parameters
    ----------
    T0_ratio : float or array_like
        T0/T0* [-], in (0, 1] subsonic, in ((g^2 - 1)/g^2, 1] supersonic.
    g : float
        Ratio of specific heats [-].
    supersonic : bool, optional
        Which branch (default subsonic, the combustion-chamber case).

    Returns
    -------
    float or ndarray
        Mach number [-].

    Examples
    --------
    Rayleigh table, g = 1.4: T0/T0* = 0.6914 at M = 0.5 (Anderson, Table A.3; from memory)

    >>> round(mach_from_T0_ratio(0.69136, 1.4), 4)
    0.5
    """
    gg = float(_gamma(g))
    r = np.asarray(T0_ratio, dtype=float)
    low = (gg * gg - 1.0) / (gg * gg) if supersonic else 0.0
    bad = ~np.isfinite(r) | (r <= low) | (r > 1.0 + 1e-12)
    if np.any(bad):
        raise InputError("T0_ratio", float(r[bad].flat[0]) if r.ndim else float(r),
                         f"a ratio in ({low:.4g}, 1] on the {'super' if supersonic else 'sub'}sonic branch")
    r = np.minimum(r, 1.0)  # forgive round-off of the sonic value just above 1
    q = (gg + 1.0 - r * gg) + (gg + 1.0) * np.sqrt(1.0 - r)
    x = q / (r * gg * gg - gg * gg + 1.0) if supersonic else r / q
    return _out(np.sqrt(x), T0_ratio)


def chamber_inlet_mach(contraction_ratio, g):
    """Nozzle-inlet Mach number of a chamber of contraction ratio Ac/At (subsonic A/A* root).

    Parameters
    ----------
    contraction_ratio : float or array_like
        Chamber-to-throat area ratio Ac/At [-], at least 1.
    g : float
        Ratio of specific heats [-].

    Returns
    -------
    float or ndarray
        Mach number at the nozzle inlet [-].

    Examples
    --------
    NACA Report 1135, g = 1.4: A/A* = 1.340 at M = 0.5 (from memory)

    >>> round(chamber_inlet_mach(1.33984, 1.4), 4)
    0.5
    """
    if np.any(~np.isfinite(np.asarray(contraction_ratio, dtype=float))
              | (np.asarray(contraction_ratio, dtype=float) < 1.0)):
        raise InputError("contraction_ratio", contraction_ratio, "a contraction ratio Ac/At of 1 or more")
    return mach_from_area_ratio(contraction_ratio, g, supersonic=False)


def chamber_stagnation_pressure_ratio(contraction_ratio, g):
    """Stagnation-pressure ratio p0_inlet / p_injector of a finite-area chamber.

    Heat addition on a Rayleigh line from M ~ 0 at the injector face to the
    inlet Mach number M of :func:`chamber_inlet_mach`:
    p0_inlet / p_inj = (1 + (g - 1)/2 M^2)^(g/(g-1)) / (1 + g M^2).

    Parameters
    ----------
    contraction_ratio : float or array_like
        Ac/At [-], at least 1.
    g : float
        Ratio of specific heats [-].

    Returns
    -------
    float or ndarray
        p0_inlet / p_inj [-], in (0, 1].

    Examples
    --------
    Ac/At = 1 (thermal choking at the inlet), g = 1.4: the reciprocal of the
    Rayleigh p0/p0* at M = 0, 1/1.2679 = 0.7887 (Rayleigh table; from memory)

    >>> round(chamber_stagnation_pressure_ratio(1.0, 1.4), 4)
    0.7887
    """
    gg = _gamma(g)
    M = np.asarray(chamber_inlet_mach(contraction_ratio, g))
    m2 = M * M
    out = (1.0 + 0.5 * (gg - 1.0) * m2) ** (gg / (gg - 1.0)) / (1.0 + gg * m2)
    return _out(out, contraction_ratio, g)
